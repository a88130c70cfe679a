/* irsim.h - a small dense state-vector simulator over the IR walk, for
 * tests only (the runtime's simulator reads OpenQASM text instead).
 * Gate matrices follow the OpenQASM 3 stdgates.inc definitions
 * (rz(t) = diag(e^{-it/2}, e^{it/2}), p(t) = diag(1, e^{it}) ...).
 * Qubit q is bit q of the basis index. */
#ifndef DWELL_TEST_IRSIM_H
#define DWELL_TEST_IRSIM_H

#include <complex.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"

typedef struct irsim {
	int nq;
	size_t dim;
	double complex *psi;
} irsim;

static inline void irsim_init(irsim *s, int nq)
{
	s->nq = nq;
	s->dim = (size_t)1 << nq;
	s->psi = calloc(s->dim, sizeof *s->psi);
	s->psi[0] = 1;
}

static inline void irsim_1q(irsim *s, uint32_t q, const double complex m[4],
	uint64_t cmask)
{
	size_t bit = (size_t)1 << q, half = s->dim / 2;
	bool diag = m[1] == 0 && m[2] == 0;
	for (size_t k = 0; k < half; k++) {
		size_t i = ((k >> q) << (q + 1)) | (k & (bit - 1));
		if ((i & cmask) != cmask)
			continue;
		if (diag) {
			s->psi[i] *= m[0];
			s->psi[i | bit] *= m[3];
			continue;
		}
		double complex a = s->psi[i], b = s->psi[i | bit];
		s->psi[i] = m[0] * a + m[1] * b;
		s->psi[i | bit] = m[2] * a + m[3] * b;
	}
}

static inline void irsim_matrix(dw_gate g, const double *ang, double complex m[4])
{
	double t = ang ? ang[0] : 0, c = cos(t / 2), sn = sin(t / 2);
	const double r = 1 / sqrt(2.0);
	switch (g) {
	case DW_G_X: case DW_G_CX: case DW_G_CCX:
		m[0] = 0; m[1] = 1; m[2] = 1; m[3] = 0; break;
	case DW_G_Y: case DW_G_CY:
		m[0] = 0; m[1] = -I; m[2] = I; m[3] = 0; break;
	case DW_G_Z: case DW_G_CZ:
		m[0] = 1; m[1] = 0; m[2] = 0; m[3] = -1; break;
	case DW_G_H: case DW_G_CH:
		m[0] = r; m[1] = r; m[2] = r; m[3] = -r; break;
	case DW_G_S: m[0] = 1; m[1] = 0; m[2] = 0; m[3] = I; break;
	case DW_G_SDG: m[0] = 1; m[1] = 0; m[2] = 0; m[3] = -I; break;
	case DW_G_T: m[0] = 1; m[1] = 0; m[2] = 0; m[3] = cexp(I * M_PI / 4); break;
	case DW_G_TDG: m[0] = 1; m[1] = 0; m[2] = 0; m[3] = cexp(-I * M_PI / 4); break;
	case DW_G_RX: case DW_G_CRX:
		m[0] = c; m[1] = -I * sn; m[2] = -I * sn; m[3] = c; break;
	case DW_G_RY: case DW_G_CRY:
		m[0] = c; m[1] = -sn; m[2] = sn; m[3] = c; break;
	case DW_G_RZ: case DW_G_CRZ:
		m[0] = cexp(-I * t / 2); m[1] = 0; m[2] = 0; m[3] = cexp(I * t / 2); break;
	case DW_G_P: case DW_G_CP:
		m[0] = 1; m[1] = 0; m[2] = 0; m[3] = cexp(I * t); break;
	default:
		m[0] = 1; m[1] = 0; m[2] = 0; m[3] = 1; break;
	}
}

static inline int irsim_gate(const dw_walk_gate *g, void *ctx)
{
	irsim *s = ctx;
	double complex m[4];
	const uint32_t *q = g->qubits;
	irsim_matrix(g->gate, g->angles, m);
	switch (dw_gates[g->gate].nqubits) {
	case 1:
		if (g->gate == DW_G_MEASURE || g->gate == DW_G_RESET)
			return 1;   /* not supported here */
		irsim_1q(s, q[0], m, 0);
		return 0;
	case 2:
		if (g->gate == DW_G_SWAP) {
			double complex x[4] = {0, 1, 1, 0};
			irsim_1q(s, q[0], x, (uint64_t)1 << q[1]);
			irsim_1q(s, q[1], x, (uint64_t)1 << q[0]);
			irsim_1q(s, q[0], x, (uint64_t)1 << q[1]);
			return 0;
		}
		irsim_1q(s, q[1], m, (uint64_t)1 << q[0]);
		return 0;
	default:
		if (g->gate == DW_G_CSWAP) {
			double complex x[4] = {0, 1, 1, 0};
			uint64_t c0 = (uint64_t)1 << q[0];
			irsim_1q(s, q[1], x, c0 | (uint64_t)1 << q[2]);
			irsim_1q(s, q[2], x, c0 | (uint64_t)1 << q[1]);
			irsim_1q(s, q[1], x, c0 | (uint64_t)1 << q[2]);
			return 0;
		}
		irsim_1q(s, q[2], m, ((uint64_t)1 << q[0]) | ((uint64_t)1 << q[1]));
		return 0;
	}
}

/* Apply definition id to the state with qubit map identity offset by
 * `first` (args then pool) and the given parameters. */
static inline int irsim_apply(irsim *s, const dw_circuit *c, uint32_t id,
	const uint32_t *map, const double *params)
{
	return dw_walk(c, id, map, params, irsim_gate, s);
}

#endif
