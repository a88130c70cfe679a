/* test_sim_dense.c - the dense simulator's kernels against a plain
 * reference written here from the definition of a gate on a little-endian
 * state vector (common practice: amplitude index bit k is qubit k; a 2x2
 * matrix m on qubit t maps the pair (a[i], a[i | 2^t]), bit t of i clear,
 * to (m00 a0 + m01 a1, m10 a0 + m11 a1) where the controls hold).
 *
 * Random states of 1, 3 and 12 qubits (every target, every swap pair) and
 * of 17 qubits (2^17 amplitudes, above the OpenMP threshold: low, middle
 * and top qubits); the top qubit lives in a separate half; dense,
 * diagonal, anti-diagonal and X matrices; controls and anti-controls on
 * every side of the target; swaps; controlled phases; measurement (Born
 * rule, collapse, renormalisation); the size refusal message; compaction. */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "dwell/sim.h"

static uint64_t rng = 0x1234567u;

static double unif(void)
{
	rng = rng * 6364136223846793005ull + 1442695040888963407ull;
	return (double)(rng >> 11) * 0x1.0p-53;
}

static double complex crand(void)
{
	return CMPLX(2 * unif() - 1, 2 * unif() - 1);
}

/* reference kernels on a plain array */
static void ref_1q(double complex *a, int n, int t, const double complex m[4],
	uint64_t cmask, uint64_t cval)
{
	for (uint64_t i = 0; i < ((uint64_t)1 << n); i++) {
		if ((i >> t) & 1 || (i & cmask) != cval)
			continue;
		uint64_t j = i | ((uint64_t)1 << t);
		double complex a0 = a[i], a1 = a[j];
		a[i] = m[0] * a0 + m[1] * a1;
		a[j] = m[2] * a0 + m[3] * a1;
	}
}

static void ref_swap(double complex *a, int n, int p, int q, uint64_t cmask, uint64_t cval)
{
	for (uint64_t i = 0; i < ((uint64_t)1 << n); i++) {
		if (!((i >> p) & 1) || ((i >> q) & 1) || (i & cmask) != cval)
			continue;
		uint64_t j = (i & ~((uint64_t)1 << p)) | ((uint64_t)1 << q);
		double complex t = a[i];
		a[i] = a[j];
		a[j] = t;
	}
}

static double compare(const dw_state *st, const double complex *ref)
{
	double worst = 0;
	for (uint64_t i = 0; i < st->dim; i++)
		worst = fmax(worst, cabs(dw_state_get(st, i) - ref[i]));
	return worst;
}

/* A random control pattern on qubits other than the ones in `avoid`. */
static void random_controls(int n, uint64_t avoid, uint64_t *cmask, uint64_t *cval)
{
	*cmask = *cval = 0;
	for (int k = 0; k < n; k++) {
		uint64_t b = (uint64_t)1 << k;
		if (avoid & b || unif() < 0.75)
			continue;
		*cmask |= b;
		if (unif() < 0.5)
			*cval |= b;
	}
}

/* Every target and every swap pair when full, else the low, middle and
 * top qubits (enough to run each kernel's parallel path at 17 qubits
 * without hundreds of parallel regions on a busy machine). */
static int chosen(int n, int full, int q)
{
	return full || q == 0 || q == 1 || q == n / 2 || q == n - 1;
}

static void kernels(int n, int full)
{
	dw_state *st = NULL;
	dw_error err = {0};
	int rc = dw_state_new(n, &st, &err);
	CHECK(rc == DW_OK, "%s", err.msg);
	if (rc)
		return;
	uint64_t dim = (uint64_t)1 << n;
	double complex *ref = malloc(dim * sizeof *ref);
	for (uint64_t i = 0; i < dim; i++) {
		ref[i] = crand();
		dw_state_set(st, i, ref[i]);
	}
	const double complex kinds[5][4] = {
		{CMPLX(0.6, 0.1), CMPLX(-0.3, 0.7), CMPLX(0.2, -0.5), CMPLX(0.9, 0.4)},  /* dense */
		{CMPLX(0.8, -0.6), 0, 0, CMPLX(0, 1)},                                  /* diagonal */
		{1, 0, 0, CMPLX(-0.6, 0.8)},                                            /* phase */
		{0, CMPLX(0, -1), CMPLX(0, 1), 0},                                       /* y */
		{0, 1, 1, 0},                                                            /* x */
	};
	for (int t = 0; t < n; t++)
		for (int k = 0; k < 5 && chosen(n, full, t); k++)
			for (int rep = 0; rep < 2; rep++) {
				uint64_t cm = 0, cv = 0;
				if (rep)
					random_controls(n, (uint64_t)1 << t, &cm, &cv);
				dw_state_apply_1q(st, t, kinds[k], cm, cv);
				ref_1q(ref, n, t, kinds[k], cm, cv);
				double d = compare(st, ref);
				CHECK(d < 1e-12, "n=%d target %d kind %d controls %#llx/%#llx: %.3g", n, t, k,
					(unsigned long long)cm, (unsigned long long)cv, d);
			}
	for (int p = 0; p < n; p++)
		for (int q = 0; q < n; q++) {
			if (p == q || !chosen(n, full, p) || !chosen(n, full, q))
				continue;
			uint64_t cm = 0, cv = 0;
			random_controls(n, ((uint64_t)1 << p) | ((uint64_t)1 << q), &cm, &cv);
			dw_state_apply_swap(st, p, q, cm, cv);
			ref_swap(ref, n, p, q, cm, cv);
			double d = compare(st, ref);
			CHECK(d < 1e-12, "n=%d swap %d %d controls %#llx: %.3g", n, p, q,
				(unsigned long long)cm, d);
		}
	/* controlled phases, including one conditioned on the top qubit */
	for (int rep = 0; rep < 6; rep++) {
		uint64_t cm = 0, cv = 0;
		random_controls(n, 0, &cm, &cv);
		if (rep == 0)
			cm = cv = (uint64_t)1 << (n - 1);
		double complex ph = cexp(I * (0.3 + rep));
		dw_state_apply_phase(st, ph, cm, cv);
		for (uint64_t i = 0; i < dim; i++)
			if ((i & cm) == cv)
				ref[i] *= ph;
		double d = compare(st, ref);
		CHECK(d < 1e-12, "n=%d phase mask %#llx: %.3g", n, (unsigned long long)cm, d);
	}
	/* norm and probabilities */
	double norm = 0;
	for (uint64_t i = 0; i < dim; i++)
		norm += creal(ref[i] * conj(ref[i]));
	CHECK(fabs(dw_state_norm2(st) - norm) < 1e-9 * norm, "norm2 %.17g vs %.17g",
		dw_state_norm2(st), norm);
	for (int q = 0; q < n; q++) {
		double p1 = 0;
		for (uint64_t i = 0; i < dim; i++)
			if ((i >> q) & 1)
				p1 += creal(ref[i] * conj(ref[i]));
		CHECK(fabs(dw_state_prob1(st, q) - p1) < 1e-9 * norm, "n=%d prob1(%d)", n, q);
	}
	/* compaction keeps every amplitude */
	double complex *flat = dw_state_compact(st);
	double worst = 0;
	for (uint64_t i = 0; i < dim; i++)
		worst = fmax(worst, cabs(flat[i] - ref[i]));
	CHECK(worst < 1e-12 && flat == st->amp, "compact: %.3g", worst);
	/* kernels still work after compaction (top qubit, contiguous halves) */
	dw_state_apply_1q(st, n - 1, kinds[0], 0, 0);
	ref_1q(ref, n, n - 1, kinds[0], 0, 0);
	CHECK(compare(st, ref) < 1e-12, "kernel after compaction");
	/* measurement: normalise, then measure the top qubit; the state must be
	 * the projection renormalised (Born rule) */
	double s = 1 / sqrt(dw_state_norm2(st));
	dw_state_apply_phase(st, s, 0, 0);
	for (uint64_t i = 0; i < dim; i++)
		ref[i] *= s;
	int q = n - 1;
	double p1 = dw_state_prob1(st, q);
	int o = dw_state_measure(st, q);
	double p = o ? p1 : 1 - p1;
	for (uint64_t i = 0; i < dim; i++)
		ref[i] = (int)((i >> q) & 1) == o ? ref[i] / sqrt(p) : 0;
	CHECK(compare(st, ref) < 1e-12, "collapse after measuring qubit %d -> %d", q, o);
	CHECK(fabs(dw_state_norm2(st) - 1) < 1e-12, "renormalised");
	dw_state_reset(st, 0);
	CHECK(dw_state_prob1(st, 0) < 1e-24, "reset leaves qubit 0 in |0>");
	CHECK(fabs(dw_state_norm2(st) - 1) < 1e-12, "reset keeps the norm");
	free(ref);
	dw_state_free(st);
}

/* Born rule frequencies: qubit in cos(a)|0> + sin(a)|1>, many seeds
 * (binomial bound, 5 standard deviations). */
static void born(void)
{
	const double a = 0.6, p1 = sin(a) * sin(a);
	const int runs = 4000;
	int ones = 0;
	dw_state *st = NULL;
	dw_error err = {0};
	if (dw_state_new(1, &st, &err)) {
		CHECK(0, "%s", err.msg);
		return;
	}
	dw_state_seed(st, 7);
	for (int r = 0; r < runs; r++) {
		dw_state_set(st, 0, cos(a));
		dw_state_set(st, 1, sin(a));
		ones += dw_state_measure(st, 0);
	}
	double sd = sqrt(runs * p1 * (1 - p1));
	CHECK(fabs(ones - runs * p1) < 5 * sd, "%d ones in %d draws, expected %.1f +- %.1f", ones,
		runs, runs * p1, sd);
	dw_state_free(st);
}

static void limits(void)
{
	dw_state *st = NULL;
	dw_error err = {0};
	int rc = dw_state_new(31, &st, &err);
	CHECK(rc == DW_EINPUT && st == NULL, "31 qubits refused");
	CHECK(strstr(err.msg, "31 qubits") && strstr(err.msg, "34359740928 bytes"),
		"message names the bytes: %s", err.msg);
	CHECK(dw_state_bytes(3) == (8 + 160) * 16, "bytes for 3 qubits (with the gap)");
	dw_error e0 = {0};
	rc = dw_state_new(0, &st, &e0);
	CHECK(rc == DW_OK && st->dim == 1 && dw_state_get(st, 0) == 1, "0 qubits: one amplitude");
	if (st) {
		dw_state_apply_phase(st, I, 0, 0);
		CHECK(dw_state_get(st, 0) == I, "global phase on a 0-qubit state");
	}
	dw_state_free(st);
}

int main(void)
{
	kernels(3, 1);
	kernels(12, 1);
	kernels(17, 0);
	kernels(1, 1);
	born();
	limits();
	return check_done();
}
