/* sparse.h - explicit sparse matrices as circuits: bipartite edge
 * colouring, fixed-point tables, table lookups (QROM) and the 1-sparse
 * exponentials built from them (compiler/middle/sparse.c, qrom.c).
 * docs/sparse-oracles.md describes the constructions and their costs. */
#ifndef DWELL_SPARSE_H
#define DWELL_SPARSE_H

#include <stdbool.h>
#include <stdint.h>

#include "dwell/circuit.h"
#include "dwell/problem.h"

/* ---- table lookups (qrom.c) ---- */

/* A table of L words of `width` bits; word l is bits[l*words .. +words),
 * bit t of the word is bit (t % 64) of bits[l*words + t/64]. */
typedef struct dw_table {
	uint64_t L;
	uint32_t width, words;
	const uint64_t *bits;
} dw_table;

/* Index bits needed for L entries: ceil(log2 L) (0 for L <= 1). */
uint32_t dw_lookup_index_bits(uint64_t L);

/* Unary-iteration lookup |l>|0> -> |l>|d_l> ("Encoding electronic spectra
 * in quantum circuits with linear T complexity", Phys. Rev. X 8, 041015
 * (2018)).  Arguments: [control], index (index_bits qubits, little-endian),
 * output (width qubits).  With a control: L - 1 temporary ANDs (4L - 4 T),
 * each uncomputed unitarily (another 4L - 4 T) or, with `measure`, by
 * measurement (0 T, the definition is then not unitary); without a
 * control: L - 2 of each (L >= 2).  Indices >= L may alias entries below L (callers index < L).
 * Stage DW_STAGE_ORACLE. */
uint32_t dw_lookup_unary_def(dw_circuit *c, uint32_t index_bits, const dw_table *t,
	bool controlled, bool measure, dw_error *e);

/* Select-swap lookup with 2^block_log2 words per block ("Trading T-gates
 * for dirty qubits in state preparation and unitary synthesis",
 * arXiv:1812.00954 (2018), the clean-ancilla form): a unary lookup over
 * ceil(L / 2^k) blocks writes whole blocks into width * 2^k clean
 * ancillas, a controlled-swap network on the k low index bits brings word
 * l to slot 0, slot 0 is copied to the output by cx and the block is
 * undone.  Arguments: index (index_bits), output (width).  Like the unary
 * lookup it XORs d_l into the output (its own inverse). */
uint32_t dw_lookup_select_swap_def(dw_circuit *c, uint32_t index_bits,
	const dw_table *t, uint32_t block_log2, bool measure, dw_error *e);

/* ---- the plan for an explicit matrix (sparse.c) ---- */

typedef struct dw_sparse_colour {
	int64_t nedges;           /* edges (nonzeros of A) in this matching */
	int64_t *row, *col;       /* edge k: A[row[k]][col[k]] */
	double complex *val;
	double norm;              /* max |value as loaded| / alpha */
} dw_sparse_colour;

typedef struct dw_sparse_plan {
	int n;                    /* system qubits */
	int64_t dim;              /* 2^n */
	uint32_t ncolours;        /* d: the maximum row/column count */
	dw_sparse_colour *colour;
	bool complex_values;      /* polar form (magnitude, phase) */
	int value_bits;           /* bits per value field */
	bool value_bits_auto;
	double delta_norm;        /* bound on ||A' - A||_2 (unscaled) */
	double data_error;        /* bound on the output trace distance from it */
	double eps_data;          /* the data share of the budget */
	uint32_t lookup_width;    /* partner + value bits */
	uint32_t block_log2;      /* select-swap block (0 for unary) */
} dw_sparse_plan;

/* Colour the nonzeros of p->matrix (a bipartite edge colouring with d
 * colours: each colour is a partial permutation j -> k) and choose the
 * fixed-point format.  Fails (DW_EINPUT) when no value_bits <= 52 meets
 * eps_data. */
int dw_sparse_plan_make(const dw_problem *p, dw_sparse_plan *out, dw_error *e);
void dw_sparse_plan_free(dw_sparse_plan *pl);

/* The table of colour c: index l = j + 2^n a (a = anc), word = partner
 * (n bits) then the value field(s); see docs/sparse-oracles.md.  Returns
 * an allocated array of L = 2^(n+1) words (caller frees). */
uint64_t *dw_sparse_table(const dw_problem *p, const dw_sparse_plan *pl, uint32_t c,
	dw_table *out, dw_error *e);

/* Edge k of colour c as the circuit loads it (unscaled): the value after
 * rounding to the plan's fixed point. */
double complex dw_sparse_loaded(const dw_sparse_plan *pl, uint32_t c, int64_t k);

/* The definition exp(-i theta/2 X_anc (x) [X_sgn (x)] A_c / alpha) on
 * (anc, [sgn], sys[0..n)) with one parameter theta. */
uint32_t dw_sparse_term_def(dw_circuit *c, const dw_problem *p, const dw_sparse_plan *pl,
	uint32_t colour, bool with_sgn, dw_error *e);

#endif
