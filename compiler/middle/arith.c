/* arith.c - multi-controlled gates.
 * Takes: a qubit count k.  Gives: the definition of the multi-controlled Z
 * I - 2|1..1><1..1| on k qubits: z (k=1), cz (k=2), h-ccx-h (k=3), and for
 * k >= 4 an AND ladder of Toffolis into k-3 clean ancillas, the final ccx
 * onto the last qubit (between h gates), and the ladder undone:
 * 2(k-1) - 3 Toffolis for k-1 controls ("Elementary gates for quantum
 * computation", Phys. Rev. A 52, 3457 (1995), the clean-ancilla form). */
#include "dwell/program.h"

uint32_t dw_mcz_def(dw_circuit *c, uint32_t k, dw_error *e)
{
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
