/* stateprep.c - state preparation U_b |0..0> = |b> (up to a global phase).
 * Takes: the rhs of a problem.  Gives: a definition on the n sys qubits,
 * stage state_prep:
 *  - basis k: x on the set bits; uniform: h on every qubit;
 *  - product [theta, phi]: ry(theta) then p(phi) on each qubit;
 *  - amplitudes: magnitudes by uniformly controlled ry rotations, most
 *    significant qubit first, then the phases as a diagonal built from
 *    uniformly controlled rz rotations ("Transformation of quantum states
 *    using uniformly controlled rotations", Quantum Inf. Comput. 5(6), 467,
 *    2005).  Real amplitudes need no rz: the last level uses the signed
 *    angle 2 atan2(a1, a0).  Counts for real amplitudes: 2^n - 1 ry and
 *    2^n - 2 cx. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/prep_circuit.h"
#include "dwell/program.h"

static uint32_t gray(uint32_t i) { return i ^ (i >> 1); }

/* Uniformly controlled rotation: for each value c of the controls
 * (bit i of c on ctl[i]) apply g(alpha[c]) to the target. */
static void ucr(dw_builder *b, dw_gate g, const uint32_t *ctl, uint32_t k,
	uint32_t target, const double *alpha, double *theta)
{
	uint32_t n = 1u << k;
	if (k == 0) {
		if (alpha[0] != 0.0)
			dw_r1(b, g, target, dw_const(alpha[0]));
		return;
	}
	for (uint32_t i = 0; i < n; i++) {
		double s = 0;
		for (uint32_t j = 0; j < n; j++)
			s += (__builtin_popcount(j & gray(i)) & 1) ? -alpha[j] : alpha[j];
		theta[i] = s / n;
	}
	for (uint32_t i = 0; i < n; i++) {
		if (fabs(theta[i]) > 1e-15)
			dw_r1(b, g, target, dw_const(theta[i]));
		uint32_t diff = gray(i) ^ gray((i + 1) & (n - 1));
		uint32_t bit = (uint32_t)__builtin_ctz(diff);
		dw_g2(b, DW_G_CX, ctl[bit], target);
	}
}

uint32_t dw_stateprep_amplitudes(dw_circuit *c, int n, const double complex *amps,
	dw_error *e)
{
	size_t N = (size_t)1 << n;
	double *mag = malloc(N * sizeof *mag);
	double *alpha = malloc(N * sizeof *alpha);
	double *theta = malloc(N * sizeof *theta);
	double *prob = malloc(2 * N * sizeof *prob);   /* subtree sums, heap order */
	double *phase = malloc(N * sizeof *phase);
	uint32_t *ctl = malloc(((size_t)n + 1) * sizeof *ctl);
	if (!mag || !alpha || !theta || !prob || !phase || !ctl) {
		free(mag); free(alpha); free(theta); free(prob); free(phase); free(ctl);
		dw_fail(e, DW_EINTERNAL, "out of memory (state preparation of 2^%d amplitudes)", n);
		return DW_NO_DEF;
	}
	bool real = true;
	for (size_t j = 0; j < N; j++) {
		if (cimag(amps[j]) != 0.0)
			real = false;
	}
	for (size_t j = 0; j < N; j++)
		mag[j] = real ? creal(amps[j]) : cabs(amps[j]);
	dw_builder *b = dw_begin(c, "prep_amplitudes", (uint32_t)n, 0, DW_STAGE_STATE_PREP);
	/* Level l targets qubit t = n-1-l with controls t+1..n-1: the index
	 * bits above t select the subtree. */
	for (int l = 0; l < n; l++) {
		int t = n - 1 - l;
		uint32_t k = (uint32_t)l;
		uint32_t nc = 1u << k;
		size_t width = (size_t)1 << t;      /* entries per half-subtree */
		for (uint32_t cval = 0; cval < nc; cval++) {
			size_t base = (size_t)cval << (t + 1);
			if (t == 0 && real) {
				double a0 = mag[base], a1 = mag[base + 1];
				alpha[cval] = 2.0 * atan2(a1, a0);
				continue;
			}
			double p0 = 0, p1 = 0;
			for (size_t j = 0; j < width; j++) {
				p0 += mag[base + j] * mag[base + j];
				p1 += mag[base + width + j] * mag[base + width + j];
			}
			alpha[cval] = 2.0 * atan2(sqrt(p1), sqrt(p0));
		}
		for (uint32_t i = 0; i < k; i++)
			ctl[i] = (uint32_t)(t + 1) + i;
		ucr(b, DW_G_RY, ctl, k, (uint32_t)t, alpha, theta);
	}
	if (!real) {
		/* diagonal diag(e^{i phi_j}): peel qubit 0, 1, ... */
		for (size_t j = 0; j < N; j++)
			phase[j] = cabs(amps[j]) > 0 ? carg(amps[j]) : 0.0;
		size_t len = N;
		for (int t = 0; t < n; t++) {
			size_t half = len / 2;
			uint32_t k = (uint32_t)(n - 1 - t);
			for (size_t cv = 0; cv < half; cv++) {
				double f0 = phase[2 * cv], f1 = phase[2 * cv + 1];
				alpha[cv] = f1 - f0;
				phase[cv] = (f0 + f1) / 2.0;
			}
			for (uint32_t i = 0; i < k; i++)
				ctl[i] = (uint32_t)t + 1 + i;
			ucr(b, DW_G_RZ, ctl, k, (uint32_t)t, alpha, theta);
			len = half;
		}
		/* phase[0] is left as a global phase */
	}
	free(mag); free(alpha); free(theta); free(prob); free(phase); free(ctl);
	return dw_end(b, e);
}

uint32_t dw_stateprep_def(dw_circuit *c, const dw_problem *p, dw_error *e)
{
	uint32_t n = (uint32_t)p->n;
	dw_builder *b;
	switch (p->rhs_kind) {
	case DW_RHS_AMPLITUDES:
	case DW_RHS_FILE:
		if (p->n > 30) {
			dw_fail(e, DW_EINPUT, "%s: rhs amplitudes: 2^%d amplitudes do not fit in memory",
				p->path, p->n);
			return DW_NO_DEF;
		}
		return dw_stateprep_amplitudes(c, p->n, p->amps, e);
	case DW_RHS_BASIS:
		b = dw_begin(c, "prep_basis", n, 0, DW_STAGE_STATE_PREP);
		for (uint32_t k = 0; k < n; k++)
			if ((p->basis >> k) & 1)
				dw_g1(b, DW_G_X, k);
		return dw_end(b, e);
	case DW_RHS_UNIFORM:
		b = dw_begin(c, "prep_uniform", n, 0, DW_STAGE_STATE_PREP);
		for (uint32_t k = 0; k < n; k++)
			dw_g1(b, DW_G_H, k);
		return dw_end(b, e);
	case DW_RHS_PRODUCT:
		b = dw_begin(c, "prep_product", n, 0, DW_STAGE_STATE_PREP);
		for (uint32_t k = 0; k < n && k < p->nproduct; k++) {
			if (p->product[k][0] != 0.0)
				dw_r1(b, DW_G_RY, k, dw_const(p->product[k][0]));
			if (p->product[k][1] != 0.0)
				dw_r1(b, DW_G_P, k, dw_const(p->product[k][1]));
		}
		return dw_end(b, e);
	case DW_RHS_CIRCUIT:
		return dw_stateprep_circuit(c, p, e);   /* prep_circuit.c */
	default:
		dw_fail(e, DW_EINTERNAL, "internal: unknown rhs kind");
		return DW_NO_DEF;
	}
}
