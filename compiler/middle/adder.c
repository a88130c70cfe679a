/* adder.c - reversible arithmetic on a sub-register, for the stencil
 * lowering.  Takes: a width w (and a constant).  Gives: definitions (stage
 * arith) of
 *  - the increment |x> -> |x + 1 mod 2^w>, optionally controlled: the
 *    prefix ANDs a_k = [ctl] x_0 ... x_(k-1) go into clean ancillas by a
 *    Toffoli ladder, then from the top bit down x_k ^= a_k and a_k is
 *    undone (x_(k-1) is still unchanged at that point), and x_0 ^= [ctl];
 *  - the comparator with a constant, t ^= [z < bound]: z >= bound exactly
 *    when z + (2^w - bound) carries out of w bits, and the carries of an
 *    addition of a constant k are c_(i+1) = z_i OR c_i where bit i of k is
 *    1 and z_i AND c_i where it is 0 (ripple-carry addition, as in "Halving
 *    the cost of quantum addition", Quantum 2, 74 (2018), with a constant
 *    addend); each carry is one Toffoli into a clean ancilla, undone after
 *    use.
 * Decrements are dw_inverse of the increments.
 *
 * With `measure` (target.uncompute: measure, METHODS 7) each Toffoli into
 * a clean ancilla becomes a temporary logical-AND (4 T, arith.c) and its
 * undo an erasure by measurement (no T): the definitions are then
 * non-unitary, so a decrement is built as X^w, increment, X^w (x - 1 =
 * NOT(NOT x + 1); under a control the X gates cancel when it is 0). */
#include "dwell/program.h"
#include "dwell/stencil.h"

/* t ^= a AND b into a clean t, and its undo: a Toffoli both ways, or a
 * temporary AND and its erasure by measurement. */
typedef struct ander {
	uint32_t compute, erase;      /* DW_NO_DEF: Toffolis */
} ander;

static int ander_init(dw_circuit *c, bool measure, ander *a, dw_error *e)
{
	a->compute = a->erase = DW_NO_DEF;
	if (!measure)
		return DW_OK;
	a->compute = dw_and_compute_def(c, e);
	a->erase = dw_and_erase_def(c, e);
	return a->compute == DW_NO_DEF || a->erase == DW_NO_DEF ? e->status : DW_OK;
}

static void and_do(dw_builder *b, const ander *a, bool undo, uint32_t x, uint32_t y, uint32_t t)
{
	uint32_t id = undo ? a->erase : a->compute;
	if (id == DW_NO_DEF) {
		dw_g3(b, DW_G_CCX, x, y, t);
		return;
	}
	uint32_t q[3] = {x, y, t};
	dw_call(b, id, q, NULL, 1);
}

uint32_t dw_increment_def(dw_circuit *c, uint32_t w, bool controlled, bool measure,
	dw_error *e)
{
	ander an;
	if (w == 0 || w > 62) {
		dw_fail(e, DW_EINTERNAL, "internal: increment of width %u", w);
		return DW_NO_DEF;
	}
	if (ander_init(c, measure, &an, e))
		return DW_NO_DEF;
	uint32_t nargs = w + (controlled ? 1 : 0);
	dw_builder *b = dw_begin(c, controlled ? "cincrement" : "increment", nargs, 0,
		DW_STAGE_ARITH);
	uint32_t x0 = controlled ? 1 : 0;   /* x_i = x0 + i */
	if (!controlled) {
		if (w >= 3) {
			/* a_1 = x_0 (no ancilla), a_k (k >= 2) at anc + k - 2 */
			uint32_t anc = dw_add_ancillas(b, w - 2);
#define A_UNC(k) ((k) == 1 ? x0 : anc + (k) - 2)
			for (uint32_t k = 2; k < w; k++)
				and_do(b, &an, false, A_UNC(k - 1), x0 + k - 1, A_UNC(k));
			for (uint32_t i = w - 1; i >= 2; i--) {
				dw_g2(b, DW_G_CX, A_UNC(i), x0 + i);
				and_do(b, &an, true, A_UNC(i - 1), x0 + i - 1, A_UNC(i));
			}
#undef A_UNC
		}
		if (w >= 2)
			dw_g2(b, DW_G_CX, x0, x0 + 1);
		dw_g1(b, DW_G_X, x0);
		return dw_end(b, e);
	}
	/* controlled: a_0 = ctl (qubit 0), a_k (k >= 1) at anc + k - 1 */
	if (w >= 2) {
		uint32_t anc = dw_add_ancillas(b, w - 1);
#define A_CTL(k) ((k) == 0 ? 0u : anc + (k) - 1)
		for (uint32_t k = 1; k < w; k++)
			and_do(b, &an, false, A_CTL(k - 1), x0 + k - 1, A_CTL(k));
		for (uint32_t i = w - 1; i >= 1; i--) {
			dw_g2(b, DW_G_CX, A_CTL(i), x0 + i);
			and_do(b, &an, true, A_CTL(i - 1), x0 + i - 1, A_CTL(i));
		}
#undef A_CTL
	}
	dw_g2(b, DW_G_CX, 0, x0);
	return dw_end(b, e);
}

uint32_t dw_decrement_def(dw_circuit *c, uint32_t w, bool controlled, bool measure,
	dw_error *e)
{
	uint32_t inc = dw_increment_def(c, w, controlled, measure, e);
	if (inc == DW_NO_DEF || !measure)
		return inc == DW_NO_DEF ? DW_NO_DEF : dw_inverse(c, inc, e);
	uint32_t nargs = w + (controlled ? 1 : 0), x0 = controlled ? 1 : 0;
	dw_builder *b = dw_begin(c, controlled ? "cdecrement" : "decrement", nargs, 0,
		DW_STAGE_ARITH);
	uint32_t q[64];
	for (uint32_t i = 0; i < nargs; i++)
		q[i] = i;
	for (uint32_t i = x0; i < nargs; i++)
		dw_g1(b, DW_G_X, i);
	dw_call(b, inc, q, NULL, 1);
	for (uint32_t i = x0; i < nargs; i++)
		dw_g1(b, DW_G_X, i);
	return dw_end(b, e);
}

/* One carry step: out = z AND c (or z OR c), into a clean ancilla, or
 * its undo. */
static void carry_step(dw_builder *b, const ander *an, bool undo, bool or_step,
	uint32_t z, uint32_t cin, uint32_t out)
{
	if (or_step) {
		dw_g1(b, DW_G_X, z);
		dw_g1(b, DW_G_X, cin);
		if (undo)
			dw_g1(b, DW_G_X, out);
		and_do(b, an, undo, z, cin, out);
		if (!undo)
			dw_g1(b, DW_G_X, out);
		dw_g1(b, DW_G_X, z);
		dw_g1(b, DW_G_X, cin);
	} else {
		and_do(b, an, undo, z, cin, out);
	}
}

uint32_t dw_less_const_def(dw_circuit *c, uint32_t w, uint64_t bound, bool measure,
	dw_error *e)
{
	ander an;
	if (w == 0 || w > 62 || bound == 0 || bound >= (UINT64_C(1) << w)) {
		dw_fail(e, DW_EINTERNAL, "internal: comparator z < %llu on %u bits",
			(unsigned long long)bound, w);
		return DW_NO_DEF;
	}
	if (ander_init(c, measure, &an, e))
		return DW_NO_DEF;
	uint64_t k = (UINT64_C(1) << w) - bound;
	uint32_t i0 = (uint32_t)__builtin_ctzll(k);
	char name[64];
	snprintf(name, sizeof name, "less_than_%llu", (unsigned long long)bound);
	dw_builder *b = dw_begin(c, name, w + 1, 0, DW_STAGE_ARITH);
	uint32_t t = w;
	uint32_t nanc = w - 1 - i0;
	uint32_t anc = nanc ? dw_add_ancillas(b, nanc) : 0;
	/* carry into bit i (i > i0): c_(i0+1) = z_(i0); c_(i+1) at anc + i - i0 - 1 */
#define CARRY(i) ((i) == i0 + 1 ? i0 : anc + (i) - i0 - 2)
	for (uint32_t i = i0 + 1; i < w; i++)
		carry_step(b, &an, false, (k >> i) & 1, i, CARRY(i), CARRY(i + 1));
	dw_g2(b, DW_G_CX, CARRY(w), t);
	dw_g1(b, DW_G_X, t);
	for (uint32_t i = w; i-- > i0 + 1;)
		carry_step(b, &an, true, (k >> i) & 1, i, CARRY(i), CARRY(i + 1));
#undef CARRY
	return dw_end(b, e);
}
