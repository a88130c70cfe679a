/* arith.c - multi-controlled gates.
 * Takes: a qubit count k.  Gives: the definition of the multi-controlled Z
 * I - 2|1..1><1..1| on k qubits: z (k=1), cz (k=2), h-ccx-h (k=3), and for
 * k >= 4 an AND ladder of Toffolis into k-3 clean ancillas, the final ccx
 * onto the last qubit (between h gates), and the ladder undone:
 * 2(k-1) - 3 Toffolis for k-1 controls ("Elementary gates for quantum
 * computation", Phys. Rev. A 52, 3457 (1995), the clean-ancilla form).
 * With target.uncompute: measure, temporary logical-ANDs erased by
 * measurement replace the Toffolis (see below). */
#include "dwell/program.h"

/* Temporary logical-AND ("Halving the cost of quantum addition", Quantum 2,
 * 74, 2018): |a, b, 0> -> |a, b, ab> with 4 T.  Derivation: with t in |+>,
 * the phases T on c, T+ on a^c, T+ on b^c, T on a^b^c give
 * w^(c - (a^c) - (b^c) + (a^b^c)) = (-1)^(abc) (-i)^(ab); h maps t to |ab>
 * and s on t cancels (-i)^(ab). */
uint32_t dw_and_compute_def(dw_circuit *c, dw_error *e)
{
	dw_builder *b = dw_begin(c, "and_compute", 3, 0, DW_STAGE_NONE);
	uint32_t A = 0, B = 1, T = 2;
	dw_g1(b, DW_G_H, T);
	dw_g1(b, DW_G_T, T);          /* c */
	dw_g2(b, DW_G_CX, A, T);
	dw_g1(b, DW_G_TDG, T);        /* a^c */
	dw_g2(b, DW_G_CX, B, T);
	dw_g1(b, DW_G_T, T);          /* a^b^c */
	dw_g2(b, DW_G_CX, A, T);
	dw_g1(b, DW_G_TDG, T);        /* b^c */
	dw_g2(b, DW_G_CX, B, T);      /* c */
	dw_g1(b, DW_G_H, T);
	dw_g1(b, DW_G_S, T);
	return dw_end(b, e);
}

/* Erase a temporary AND by measurement: h on t, measure; outcome 1 means a
 * phase (-1)^(ab) to undo with cz and t left in |1> to flip back.  No T. */
uint32_t dw_and_erase_def(dw_circuit *c, dw_error *e)
{
	dw_builder *b = dw_begin(c, "and_erase", 3, 0, DW_STAGE_NONE);
	uint32_t bit = dw_add_bits(b, 1);
	uint32_t ab[2] = {0, 1}, t = 2;
	dw_g1(b, DW_G_H, 2);
	dw_measure(b, 2, bit);
	dw_cond_gate(b, bit, DW_G_CZ, ab);
	dw_cond_gate(b, bit, DW_G_X, &t);
	return dw_end(b, e);
}

/* Measure mode: a ladder of k-2 temporary ANDs of the first k-1 qubits
 * into clean ancillas, cz of the last AND with the last qubit, then the
 * ladder erased by measurement: 4(k-2) T and no Toffoli (the unitary form
 * needs 2(k-1)-3 Toffolis, 7 T each). */
static uint32_t mcz_measured(dw_circuit *c, uint32_t k, dw_error *e)
{
	uint32_t and_c = dw_and_compute_def(c, e), and_e = dw_and_erase_def(c, e);
	if (and_c == DW_NO_DEF || and_e == DW_NO_DEF)
		return DW_NO_DEF;
	dw_builder *b = dw_begin(c, "mcz_m", k, 0, DW_STAGE_REFLECTION);
	uint32_t a = dw_add_ancillas(b, k - 2);
	for (uint32_t i = 0; i + 2 < k; i++) {
		uint32_t q[3] = {i == 0 ? 0 : a + i - 1, i + 1, a + i};
		dw_call(b, and_c, q, NULL, 1);
	}
	dw_g2(b, DW_G_CZ, a + k - 3, k - 1);
	for (uint32_t i = k - 2; i-- > 0;) {
		uint32_t q[3] = {i == 0 ? 0 : a + i - 1, i + 1, a + i};
		dw_call(b, and_e, q, NULL, 1);
	}
	return dw_end(b, e);
}

uint32_t dw_mcz_def(dw_circuit *c, uint32_t k, bool measure, dw_error *e)
{
	if (measure && k >= 3)
		return mcz_measured(c, k, e);
	dw_builder *b = dw_begin(c, "mcz", k, 0, DW_STAGE_REFLECTION);
	if (k == 0) {
		dw_end(b, e);
		dw_fail(e, DW_EINTERNAL, "internal: multi-controlled Z on no qubit");
		return DW_NO_DEF;
	}
	uint32_t t = k - 1;          /* target */
	if (k == 1) {
		dw_g1(b, DW_G_Z, 0);
	} else if (k == 2) {
		dw_g2(b, DW_G_CZ, 0, 1);
	} else if (k == 3) {
		dw_g1(b, DW_G_H, t);
		dw_g3(b, DW_G_CCX, 0, 1, t);
		dw_g1(b, DW_G_H, t);
	} else {
		uint32_t nc = k - 1;     /* controls 0..nc-1 */
		uint32_t a = dw_add_ancillas(b, nc - 2);
		dw_g3(b, DW_G_CCX, 0, 1, a);
		for (uint32_t i = 2; i + 1 < nc; i++)
			dw_g3(b, DW_G_CCX, a + i - 2, i, a + i - 1);
		dw_g1(b, DW_G_H, t);
		dw_g3(b, DW_G_CCX, a + nc - 3, nc - 1, t);
		dw_g1(b, DW_G_H, t);
		for (uint32_t i = nc - 2; i >= 2; i--)
			dw_g3(b, DW_G_CCX, a + i - 2, i, a + i - 1);
		dw_g3(b, DW_G_CCX, 0, 1, a);
	}
	return dw_end(b, e);
}
