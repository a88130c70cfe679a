/* test_lower.c - the Clifford+T lowering (compiler/back/lower.c):
 * a circuit of ccx, cy, swap, cswap, rx, ry, rz, p lowered and simulated on
 * every basis state equals the original up to one global phase within the
 * synthesis share; only Clifford+T gates remain; the Toffoli form has 7 T
 * and T-depth 3 ("A meet-in-the-middle algorithm for fast synthesis of
 * depth-optimal quantum circuits", IEEE Trans. CAD 32(6), 2013) and equals
 * the Toffoli matrix exactly. */
#include <complex.h>
#include <string.h>

#include "dwell/dwell.h"
#include "check.h"
#include "irsim.h"

static void unitary(const dw_circuit *c, uint32_t id, int nq, double complex *U)
{
	uint32_t map[8] = {0, 1, 2, 3, 4, 5, 6, 7};
	size_t D = (size_t)1 << nq;
	for (size_t e0 = 0; e0 < D; e0++) {
		irsim s;
		irsim_init(&s, nq);
		s.psi[0] = 0;
		s.psi[e0] = 1;
		irsim_apply(&s, c, id, map, NULL);
		for (size_t i = 0; i < D; i++)
			U[i * D + e0] = s.psi[i];
		free(s.psi);
	}
}

int main(void)
{
	dw_circuit *c = dw_circuit_new();
	dw_error e = {0};
	dw_builder *b = dw_begin(c, "mix", 3, 0, DW_STAGE_NONE);
	dw_g3(b, DW_G_CCX, 0, 1, 2);
	dw_g2(b, DW_G_CY, 1, 0);
	dw_g2(b, DW_G_SWAP, 0, 2);
	dw_g3(b, DW_G_CSWAP, 2, 0, 1);
	dw_r1(b, DW_G_RX, 0, dw_const(0.3));
	dw_r1(b, DW_G_RY, 1, dw_const(-1.1));
	dw_r1(b, DW_G_RZ, 2, dw_const(2.2));
	dw_r1(b, DW_G_P, 0, dw_const(0.7));
	dw_g3(b, DW_G_CCX, 2, 0, 1);
	uint32_t top = dw_end(b, &e);
	dw_problem prob;
	memset(&prob, 0, sizeof prob);
	prob.path = "test";
	prob.gates = DW_GATES_CLIFFORD_T;
	dw_program pg;
	memset(&pg, 0, sizeof pg);
	pg.problem = &prob;
	pg.circ = c;
	pg.top = top;
	pg.budget.synth = 4e-6;
	double complex U0[64], U1[64];
	unitary(c, top, 3, U0);
	CHECK(dw_lower_clifford_t(&pg, &e) == 0, "%s", e.msg);
	CHECK(pg.top != top, "a new main definition");
	CHECK(pg.eps_rotation == 1e-6, "eps per rotation %g", pg.eps_rotation);
	unitary(c, pg.top, 3, U1);
	/* one global phase for the whole unitary */
	double complex ph = 0;
	for (int i = 0; i < 64; i++)
		ph += conj(U0[i]) * U1[i];
	ph /= cabs(ph);
	double err = 0;
	for (int i = 0; i < 64; i++)
		err = fmax(err, cabs(U1[i] - ph * U0[i]));
	CHECK(err <= 4 * 1e-6 * 2, "lowered unitary within the synthesis share: %.3g", err);
	dw_figures f;
	CHECK(dw_cost_figures(c, pg.top, &f, &e) == 0, "%s", e.msg);
	for (int g = 0; g < DW_G_COUNT; g++) {
		bool ct = g == DW_G_H || g == DW_G_S || g == DW_G_SDG || g == DW_G_T ||
			g == DW_G_TDG || g == DW_G_X || g == DW_G_Y || g == DW_G_Z ||
			g == DW_G_CX || g == DW_G_CZ;
		CHECK(ct || f.gates[g] == 0, "gate %s left after lowering", dw_gates[g].name);
	}
	CHECK(f.rotation_count == 0 && f.toffoli_count == 0, "no rotation or ccx left");
	/* the Toffoli form alone: exact, 7 T, T-depth 3 */
	uint32_t ccx = DW_NO_DEF;
	for (size_t i = 0; i < c->ndefs; i++)
		if (!strncmp(c->defs[i].name, "ccx_t", 5))
			ccx = (uint32_t)i;
	CHECK(ccx != DW_NO_DEF, "ccx_t definition");
	dw_figures fc;
	dw_cost_figures(c, ccx, &fc, &e);
	CHECK(fc.t_count_exact == 7, "Toffoli T-count %llu", (unsigned long long)fc.t_count_exact);
	CHECK(fc.t_depth == 3, "Toffoli T-depth %lld", (long long)fc.t_depth);
	double complex T[64];
	unitary(c, ccx, 3, T);
	double terr = 0;
	for (size_t col = 0; col < 8; col++) {
		size_t want = (col & 3) == 3 ? col ^ 4 : col;   /* controls 0, 1; target 2 */
		for (size_t row = 0; row < 8; row++)
			terr = fmax(terr, cabs(T[row * 8 + col] - (row == want ? 1 : 0)));
	}
	CHECK(terr < 1e-12, "Toffoli matrix exact: %.3g", terr);
	dw_circuit_free(c);
	return check_done();
}
