/* test_synth.c - Clifford+T synthesis: exact synthesis (exact_synth.c) and
 * z-rotation approximation (synth.c, grid_solve.c, norm_eq.c).
 *
 * Outside references:
 *  - gate matrices h, s, sdg, t, tdg, x, y, z and rz(theta) =
 *    diag(e^{-i theta/2}, e^{i theta/2}) as defined by the OpenQASM 3
 *    specification (stdgates.inc, "OpenQASM 3: A broader and deeper quantum
 *    assembly language", ACM TQC 2022); products are formed here in long
 *    double complex arithmetic, independent of the synthesis code's GMP and
 *    MPFR arithmetic;
 *  - the distance up to global phase: min_phi |e^{i phi} P - R| is reached
 *    at phi = -arg tr(R^dagger P) for 2x2 unitaries near each other
 *    (common practice); the operator norm of a 2x2 matrix M is the square
 *    root of the largest eigenvalue of M^dagger M (common practice);
 *  - T-count bound 3 log2(1/eps) + O(log log 1/eps) for the optimal
 *    ancilla-free method ("Optimal ancilla-free Clifford+T approximation of
 *    z-rotations", QIC 16(11&12), 2016); we require <= 3 log2(1/eps) + 15;
 *  - small exact identities derived by hand from the gate matrices:
 *    T T = S, X T X = w T^dagger, so T X T X = w I (zero T), H T H needs one
 *    T, rz(pi/4) = e^{-i pi/8} T (one T), rz(pi/2) = e^{-i pi/4} S (none). */
#include <complex.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "back/exact_synth.h"
#include "check.h"
#include "dwell/synth.h"

typedef long double complex cld;

static uint64_t rng_state = 0x2545f4914f6cdd1dULL;

static uint64_t rng_next(void)
{
	rng_state ^= rng_state << 13;
	rng_state ^= rng_state >> 7;
	rng_state ^= rng_state << 17;
	return rng_state;
}

static long double rng_unit(void)
{
	return (long double)(rng_next() >> 11) / 9007199254740992.0L;
}

/* gate matrices from the OpenQASM 3 definitions, long double */
static void gate_ld(dw_sq_gate g, cld m[2][2])
{
	const long double r = sqrtl(0.5L);
	const cld w = r + I * r;
	m[0][0] = 1;
	m[0][1] = 0;
	m[1][0] = 0;
	m[1][1] = 1;
	switch (g) {
	case DW_SQ_H: m[0][0] = r; m[0][1] = r; m[1][0] = r; m[1][1] = -r; break;
	case DW_SQ_S: m[1][1] = I; break;
	case DW_SQ_SDG: m[1][1] = -I; break;
	case DW_SQ_T: m[1][1] = w; break;
	case DW_SQ_TDG: m[1][1] = conjl(w); break;
	case DW_SQ_X: m[0][0] = 0; m[0][1] = 1; m[1][0] = 1; m[1][1] = 0; break;
	case DW_SQ_Y: m[0][0] = 0; m[0][1] = -I; m[1][0] = I; m[1][1] = 0; break;
	case DW_SQ_Z: m[1][1] = -1; break;
	}
}

/* product of a circuit-order sequence */
static void circuit_ld(const dw_sq_gate *g, size_t n, cld p[2][2])
{
	p[0][0] = 1;
	p[0][1] = 0;
	p[1][0] = 0;
	p[1][1] = 1;
	for (size_t i = 0; i < n; i++) {
		cld m[2][2], q[2][2];
		gate_ld(g[i], m);
		for (int a = 0; a < 2; a++)
			for (int b = 0; b < 2; b++)
				q[a][b] = m[a][0] * p[0][b] + m[a][1] * p[1][b];
		memcpy(p, q, sizeof q);
	}
}

/* operator norm of a 2x2 complex matrix */
static long double opnorm_ld(cld m[2][2])
{
	long double a = creall(conjl(m[0][0]) * m[0][0] + conjl(m[1][0]) * m[1][0]);
	long double d = creall(conjl(m[0][1]) * m[0][1] + conjl(m[1][1]) * m[1][1]);
	cld b = conjl(m[0][0]) * m[0][1] + conjl(m[1][0]) * m[1][1];
	long double tr = a + d, det = a * d - creall(b * conjl(b));
	long double disc = tr * tr / 4 - det;
	if (disc < 0)
		disc = 0;
	return sqrtl(tr / 2 + sqrtl(disc));
}

/* distance of p to r up to global phase */
static long double dist_phase_ld(cld p[2][2], cld r[2][2])
{
	cld tr = conjl(r[0][0]) * p[0][0] + conjl(r[1][0]) * p[1][0]
		+ conjl(r[0][1]) * p[0][1] + conjl(r[1][1]) * p[1][1];
	cld ph = cabsl(tr) > 0 ? conjl(tr) / cabsl(tr) : 1;
	cld d[2][2];
	for (int a = 0; a < 2; a++)
		for (int b = 0; b < 2; b++)
			d[a][b] = ph * p[a][b] - r[a][b];
	return opnorm_ld(d);
}

static void rz_ld(long double theta, cld r[2][2])
{
	r[0][0] = cexpl(-I * theta / 2);
	r[0][1] = 0;
	r[1][0] = 0;
	r[1][1] = cexpl(I * theta / 2);
}

static uint32_t count_t(const dw_sq_gate *g, size_t n)
{
	uint32_t c = 0;
	for (size_t i = 0; i < n; i++)
		c += (g[i] == DW_SQ_T || g[i] == DW_SQ_TDG);
	return c;
}

/* ---------------- exact synthesis ---------------- */

static void exact_case(const dw_sq_gate *word, size_t n, long expect_t, const char *what)
{
	dw_dmat2 u, p;
	dw_error err = {0};
	dw_sq_gate *out = NULL;
	size_t nout = 0;
	int phase = -1;
	dw_dmat2_init(&u);
	dw_dmat2_init(&p);
	dw_dmat2_circuit(&u, word, n);
	int st = dw_exact_synth(&u, &out, &nout, &phase, &err);
	CHECK(st == DW_OK, "%s: exact synthesis failed: %s", what, err.msg);
	if (st == DW_OK) {
		uint32_t tin = count_t(word, n), tout = count_t(out, nout);
		CHECK(tout <= tin, "%s: T-count grew %u -> %u", what, tin, tout);
		if (expect_t >= 0)
			CHECK(tout == (uint32_t)expect_t, "%s: T-count %u, expected %ld", what, tout, expect_t);
		/* exact: u = w^phase * product, compared in D[omega] */
		dw_dmat2_circuit(&p, out, nout);
		int j = -1;
		CHECK(dw_dmat2_equal_phase(&u, &p, &j) && j == phase,
			"%s: product differs from input in D[omega]", what);
		/* independent: long double products of both words */
		cld a[2][2], b[2][2];
		circuit_ld(word, n, a);
		circuit_ld(out, nout, b);
		cld w = cexpl(I * acosl(-1.0L) / 4 * phase);
		long double dev = 0;
		for (int r = 0; r < 2; r++)
			for (int c = 0; c < 2; c++)
				dev = fmaxl(dev, cabsl(a[r][c] - w * b[r][c]));
		CHECK(dev < 1e-12L, "%s: long double products differ by %Lg", what, dev);
	}
	free(out);
	dw_dmat2_clear(&u);
	dw_dmat2_clear(&p);
}

static void test_exact_small(void)
{
	const dw_sq_gate tt[] = {DW_SQ_T, DW_SQ_T};
	const dw_sq_gate txtx[] = {DW_SQ_T, DW_SQ_X, DW_SQ_T, DW_SQ_X};
	const dw_sq_gate hth[] = {DW_SQ_H, DW_SQ_T, DW_SQ_H};
	const dw_sq_gate t1[] = {DW_SQ_T};
	const dw_sq_gate tdg[] = {DW_SQ_TDG};
	const dw_sq_gate cl[] = {DW_SQ_H, DW_SQ_S, DW_SQ_H, DW_SQ_Y, DW_SQ_SDG};
	exact_case(tt, 2, 0, "T T = S");
	exact_case(txtx, 4, 0, "T X T X = w I");
	exact_case(hth, 3, 1, "H T H");
	exact_case(t1, 1, 1, "T");
	exact_case(tdg, 1, 1, "T^dagger");
	exact_case(cl, 5, 0, "Clifford word");
	exact_case(cl, 0, 0, "empty word");
}

static void test_exact_random(int words)
{
	dw_sq_gate word[200];
	for (int it = 0; it < words; it++) {
		size_t n = 1 + (size_t)(rng_next() % 200);
		for (size_t i = 0; i < n; i++)
			word[i] = (dw_sq_gate)(rng_next() % 8);
		char what[64];
		snprintf(what, sizeof what, "random word %d (length %zu)", it, n);
		exact_case(word, n, -1, what);
	}
	/* words that are already T-optimal (normal-form syllables HT / SHT)
	 * must keep their T-count exactly */
	for (int it = 0; it < words / 4; it++) {
		size_t n = 0;
		int syl = 1 + (int)(rng_next() % 60);
		for (int s = 0; s < syl; s++) {
			if (rng_next() & 1)
				word[n++] = DW_SQ_S;
			word[n++] = DW_SQ_H;
			word[n++] = DW_SQ_T;
		}
		/* reverse: the syllables above are in operator order */
		for (size_t i = 0; i < n / 2; i++) {
			dw_sq_gate t = word[i];
			word[i] = word[n - 1 - i];
			word[n - 1 - i] = t;
		}
		char what[64];
		snprintf(what, sizeof what, "normal-form word %d (%d T)", it, syl);
		exact_case(word, n, syl, what);
	}
}

/* The test's own distance function against closed forms (derived by hand):
 * |rz(a) - e^{i phi} rz(b)| minimised over phi is 2 sin(|a - b| / 4) for
 * |a - b| <= pi; rz(pi/4) = e^{-i pi/8} T; rz(pi/2) = e^{-i pi/4} S. */
static void test_reference_distance(void)
{
	cld r[2][2], q[2][2];
	const dw_sq_gate t1[] = {DW_SQ_T}, s1[] = {DW_SQ_S};
	long double pi = acosl(-1.0L);
	rz_ld(pi / 4, r);
	circuit_ld(t1, 1, q);
	CHECK(dist_phase_ld(q, r) < 1e-17L, "rz(pi/4) = T up to phase");
	rz_ld(pi / 2, r);
	circuit_ld(s1, 1, q);
	CHECK(dist_phase_ld(q, r) < 1e-17L, "rz(pi/2) = S up to phase");
	for (int i = 0; i < 100; i++) {
		long double a = (rng_unit() - 0.5L) * 20, d = (rng_unit() - 0.5L) * 1e-3L;
		rz_ld(a, r);
		rz_ld(a + d, q);
		long double want = 2 * sinl(fabsl(d) / 4);
		CHECK(fabsl(dist_phase_ld(q, r) - want) < 1e-15L, "distance formula");
	}
}

int main(int argc, char **argv)
{
	(void)argc;
	(void)argv;
	test_reference_distance();
	test_exact_small();
	test_exact_random(400);
	return check_done();
}
