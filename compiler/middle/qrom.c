/* qrom.c - table lookups (QROM) for the sparse-access oracles.
 * Takes: a table of L words and an index width.  Gives: definitions of
 *   - the unary-iteration lookup ("Encoding electronic spectra in quantum
 *     circuits with linear T complexity", Phys. Rev. X 8, 041015 (2018)):
 *     a segment tree over [0, L) walked with one AND per node that has two
 *     non-empty children, the right child reached by a cx from the parent
 *     control (no T), the data written by cx fan-out at the leaves;
 *   - the select-swap lookup ("Trading T-gates for dirty qubits in state
 *     preparation and unitary synthesis", arXiv:1812.00954 (2018), clean
 *     form): a unary lookup of whole blocks, then a cswap network; slot 0
 *     is copied to the output and the block undone, so the output is
 *     clean (the other slots must not stay entangled with the index).
 * A lookup XORs its word into the output, so it is its own inverse: the
 * uncomputation calls it again.
 * The temporary logical AND (4 T, arith.c) is uncomputed by its unitary
 * inverse (4 T), or with target.uncompute: measure by measurement and a
 * classically controlled cz (0 T; arith.c): then the controlled lookup
 * costs exactly the published 4L - 4 T. */
#include <stdlib.h>

#include "dwell/program.h"
#include "dwell/sparse.h"

uint32_t dw_lookup_index_bits(uint64_t L)
{
	uint32_t m = 0;
	while (m < 64 && ((uint64_t)1 << m) < L)
		m++;
	return m;
}

typedef struct walker {
	dw_builder *b;
	const dw_table *t;
	uint32_t and_c, and_u;     /* AND and its inverse */
	uint32_t idx0, out0;       /* first index / output qubit */
	uint32_t anc0;             /* ancilla of level k: anc0 + k */
	uint32_t out_stride;       /* 1 (word bit t -> out0 + t) */
} walker;

static void leaf(walker *w, uint64_t l, bool has_ctl, uint32_t ctl)
{
	if (l >= w->t->L)
		return;
	const uint64_t *word = w->t->bits + l * w->t->words;
	for (uint32_t k = 0; k < w->t->width; k++) {
		if (!((word[k / 64] >> (k % 64)) & 1))
			continue;
		if (has_ctl)
			dw_g2(w->b, DW_G_CX, ctl, w->out0 + k);
		else
			dw_g1(w->b, DW_G_X, w->out0 + k);
	}
}

/* Node covering [lo, lo + 2^level) whose indices all lie below L at lo;
 * `ctl` is 1 exactly when the control is on and the index bits >= level
 * equal those of lo. */
static void node(walker *w, uint32_t ctl, uint32_t level, uint64_t lo)
{
	if (level == 0) {
		leaf(w, lo, true, ctl);
		return;
	}
	uint32_t bit = level - 1;
	uint64_t mid = lo + ((uint64_t)1 << bit);
	if (mid >= w->t->L) {
		node(w, ctl, bit, lo);
		return;
	}
	uint32_t a = w->anc0 + bit, x = w->idx0 + bit;
	uint32_t q[3] = {ctl, x, a};
	dw_g1(w->b, DW_G_X, x);
	dw_call(w->b, w->and_c, q, NULL, 1);     /* a = ctl and not x */
	dw_g1(w->b, DW_G_X, x);
	node(w, a, bit, lo);
	dw_g2(w->b, DW_G_CX, ctl, a);            /* a = ctl and x */
	node(w, a, bit, mid);
	dw_call(w->b, w->and_u, q, NULL, 1);
}

/* The top without a control: the top index bit itself (negated, then as
 * is) controls the two halves. */
static void root(walker *w, uint32_t level, uint64_t lo)
{
	if (level == 0) {
		leaf(w, lo, false, 0);
		return;
	}
	uint32_t bit = level - 1;
	uint64_t mid = lo + ((uint64_t)1 << bit);
	if (mid >= w->t->L) {
		root(w, bit, lo);
		return;
	}
	uint32_t x = w->idx0 + bit;
	dw_g1(w->b, DW_G_X, x);
	node(w, x, bit, lo);
	dw_g1(w->b, DW_G_X, x);
	node(w, x, bit, mid);
}

uint32_t dw_lookup_unary_def(dw_circuit *c, uint32_t index_bits, const dw_table *t,
	bool controlled, bool measure, dw_error *e)
{
	if (t->L == 0 || t->width == 0 || index_bits > 40 ||
		dw_lookup_index_bits(t->L) > index_bits) {
		dw_fail(e, DW_EINTERNAL, "internal: lookup of %llu words into %u index bits",
			(unsigned long long)t->L, index_bits);
		return DW_NO_DEF;
	}
	uint32_t and_c = dw_and_compute_def(c, e);
	if (and_c == DW_NO_DEF)
		return DW_NO_DEF;
	uint32_t and_u = measure ? dw_and_erase_def(c, e) : dw_inverse(c, and_c, e);
	if (and_u == DW_NO_DEF)
		return DW_NO_DEF;
	uint32_t nctl = controlled ? 1 : 0;
	walker w = {0};
	w.t = t;
	w.and_c = and_c;
	w.and_u = and_u;
	w.idx0 = nctl;
	w.out0 = nctl + index_bits;
	w.b = dw_begin(c, "lookup", nctl + index_bits + t->width, 0, DW_STAGE_ORACLE);
	/* one ancilla per tree level below the top; without a control the top
	 * split uses the index bit itself */
	uint32_t levels = controlled ? index_bits : (index_bits ? index_bits - 1 : 0);
	w.anc0 = levels ? dw_add_ancillas(w.b, levels) : 0;
	if (controlled)
		node(&w, 0, index_bits, 0);
	else
		root(&w, index_bits, 0);
	return dw_end(w.b, e);
}

uint32_t dw_lookup_select_swap_def(dw_circuit *c, uint32_t index_bits,
	const dw_table *t, uint32_t block_log2, bool measure, dw_error *e)
{
	if (block_log2 == 0 || block_log2 > index_bits || block_log2 > 16 ||
		dw_lookup_index_bits(t->L) > index_bits || t->width == 0) {
		dw_fail(e, DW_EINTERNAL, "internal: select-swap block 2^%u over %u index bits",
			block_log2, index_bits);
		return DW_NO_DEF;
	}
	uint64_t K = (uint64_t)1 << block_log2;
	uint64_t nblocks = (t->L + K - 1) / K;
	uint64_t bw = (uint64_t)t->width * K;      /* block width in bits */
	if (bw > (1u << 20)) {
		dw_fail(e, DW_EINPUT, "select-swap block of %llu bits is too wide",
			(unsigned long long)bw);
		return DW_NO_DEF;
	}
	uint32_t words = (uint32_t)((bw + 63) / 64);
	uint64_t *bits = dw_alloc(e, (size_t)(nblocks * words), sizeof *bits);
	if (!bits)
		return DW_NO_DEF;
	for (uint64_t l = 0; l < t->L; l++) {
		const uint64_t *src = t->bits + l * t->words;
		uint64_t h = l / K, s = l % K;
		for (uint32_t k = 0; k < t->width; k++)
			if ((src[k / 64] >> (k % 64)) & 1) {
				uint64_t pos = s * t->width + k;
				bits[h * words + pos / 64] |= (uint64_t)1 << (pos % 64);
			}
	}
	dw_table bt = {nblocks, (uint32_t)bw, words, bits};
	uint32_t hi_bits = index_bits - block_log2;
	uint32_t look = dw_lookup_unary_def(c, hi_bits, &bt, false, measure, e);
	free(bits);
	if (look == DW_NO_DEF)
		return DW_NO_DEF;
	if (index_bits + bw + t->width > UINT32_MAX / 2) {
		dw_fail(e, DW_EINPUT, "select-swap lookup too wide");
		return DW_NO_DEF;
	}
	uint32_t nargs = index_bits + (uint32_t)bw;
	/* level i: slots s and s + 2^i (s a multiple of 2^(i+1)) swap when
	 * index bit i is set; afterwards slot 0 holds word (index mod K) */
	dw_builder *b = dw_begin(c, "swap_network", block_log2 + (uint32_t)bw, 0,
		DW_STAGE_ORACLE);
	for (uint32_t i = 0; i < block_log2; i++) {
		uint64_t step = (uint64_t)1 << i;
		for (uint64_t s = 0; s + step < K; s += 2 * step)
			for (uint32_t k = 0; k < t->width; k++)
				dw_g3(b, DW_G_CSWAP, i, block_log2 + (uint32_t)(s * t->width) + k,
					block_log2 + (uint32_t)((s + step) * t->width) + k);
	}
	uint32_t net = dw_end(b, e);
	uint32_t unnet = net == DW_NO_DEF ? DW_NO_DEF : dw_inverse(c, net, e);
	if (unnet == DW_NO_DEF)
		return DW_NO_DEF;
	uint32_t *q = malloc((size_t)(index_bits + bw) * sizeof *q);
	if (!q) {
		dw_fail(e, DW_EINTERNAL, "out of memory");
		return DW_NO_DEF;
	}
	uint32_t *qn = malloc((size_t)(block_log2 + bw) * sizeof *qn);
	if (!qn) {
		free(q);
		dw_fail(e, DW_EINTERNAL, "out of memory");
		return DW_NO_DEF;
	}
	/* the block lookup and the network, and the same undone (a lookup is
	 * its own inverse, so this works with measured ANDs too) */
	uint32_t blk = DW_NO_DEF, unblk = DW_NO_DEF;
	for (int pass = 0; pass < 2; pass++) {
		b = dw_begin(c, pass ? "select_swap_unblock" : "select_swap_block", nargs, 0,
			DW_STAGE_ORACLE);
		for (uint32_t k = 0; k < hi_bits; k++)
			q[k] = block_log2 + k;
		for (uint64_t k = 0; k < bw; k++)
			q[hi_bits + k] = index_bits + (uint32_t)k;
		for (uint32_t k = 0; k < block_log2; k++)
			qn[k] = k;
		for (uint64_t k = 0; k < bw; k++)
			qn[block_log2 + k] = index_bits + (uint32_t)k;
		if (pass == 0) {
			dw_call(b, look, q, NULL, 1);
			dw_call(b, net, qn, NULL, 1);
			blk = dw_end(b, e);
		} else {
			dw_call(b, unnet, qn, NULL, 1);
			dw_call(b, look, q, NULL, 1);
			unblk = dw_end(b, e);
		}
	}
	free(qn);
	if (blk == DW_NO_DEF || unblk == DW_NO_DEF) {
		free(q);
		return DW_NO_DEF;
	}
	/* clean output: block, copy slot 0 out, block undone */
	b = dw_begin(c, "select_swap", index_bits + t->width, 0, DW_STAGE_ORACLE);
	uint32_t a0 = dw_add_ancillas(b, (uint32_t)bw);
	for (uint32_t k = 0; k < index_bits; k++)
		q[k] = k;
	for (uint64_t k = 0; k < bw; k++)
		q[index_bits + k] = a0 + (uint32_t)k;
	dw_call(b, blk, q, NULL, 1);
	for (uint32_t k = 0; k < t->width; k++)
		dw_g2(b, DW_G_CX, a0 + k, index_bits + k);
	dw_call(b, unblk, q, NULL, 1);
	free(q);
	return dw_end(b, e);
}
