/* exact_synth.h - exact synthesis of single-qubit Clifford+T operators.
 *
 * Takes: a 2x2 unitary with entries in D[omega] = Z[1/sqrt2, i].  Gives: a
 * gate sequence over h, s, sdg, t, x, y, z whose product is the unitary up
 * to a power of omega, with the smallest possible T-count (docs/synth.md).
 * Also: the exact D[omega] matrices of the gates and of gate sequences. */
#ifndef DWELL_BACK_EXACT_SYNTH_H
#define DWELL_BACK_EXACT_SYNTH_H

#include <stddef.h>

#include "back/ring.h"
#include "dwell/diag.h"
#include "dwell/synth.h"

typedef struct dw_dmat2 {
	dw_domega e[2][2];        /* e[row][col] */
} dw_dmat2;

void dw_dmat2_init(dw_dmat2 *m);
void dw_dmat2_clear(dw_dmat2 *m);
void dw_dmat2_set(dw_dmat2 *r, const dw_dmat2 *m);
void dw_dmat2_identity(dw_dmat2 *m);
void dw_dmat2_mul(dw_dmat2 *r, const dw_dmat2 *a, const dw_dmat2 *b);
void dw_dmat2_gate(dw_dmat2 *m, dw_sq_gate g);
/* Product of a circuit-order sequence: m = g[n-1] ... g[1] g[0]. */
void dw_dmat2_circuit(dw_dmat2 *m, const dw_sq_gate *g, size_t n);
/* Is a = w^j b for some j in 0..7?  Sets *j. */
int dw_dmat2_equal_phase(const dw_dmat2 *a, const dw_dmat2 *b, int *j);

/* Exact synthesis.  u must be unitary with D[omega] entries.  On success
 * *gates (circuit order, caller frees) has *count gates, t-count equal to
 * the denominator exponent of u's Bloch-sphere (SO(3)) matrix, which is the
 * minimum over all Clifford+T circuits, and u = w^(*phase8) * product.
 * Returns DW_EINPUT if u is not unitary, DW_EINTERNAL on failure. */
int dw_exact_synth(const dw_dmat2 *u, dw_sq_gate **gates, size_t *count,
	int *phase8, dw_error *err);

#endif
