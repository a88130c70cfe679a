/* pauli.c - Pauli strings and their exponentials.
 * Takes: a Pauli string on the top-level qubits.  Gives: commutation tests
 * and the definition of exp(-i theta/2 P): basis change (h for X; sdg then
 * h for Y), a CNOT ladder onto the last support qubit, rz(theta), undo. */
#include <string.h>

#include "dwell/program.h"

int dw_pauli_commute(dw_pauli a, dw_pauli b)
{
	uint64_t s = (a.x & b.z) ^ (a.z & b.x);
	return __builtin_popcountll(s) % 2 == 0;
}

uint32_t dw_pauli_support(dw_pauli p, uint32_t *qubits)
{
	uint64_t m = p.x | p.z;
	uint32_t k = 0;
	while (m) {
		qubits[k++] = (uint32_t)__builtin_ctzll(m);
		m &= m - 1;
	}
	return k;
}

uint32_t dw_pauli_rotation_def(dw_circuit *c, dw_pauli p, dw_error *e)
{
	uint32_t sup[64];
	uint32_t k = dw_pauli_support(p, sup);
	char name[80] = "pauli_";
	for (uint32_t i = 0; i < k && i < 60; i++) {
		uint64_t bit = 1ULL << sup[i];
		bool x = p.x & bit, z = p.z & bit;
		name[6 + i] = x && z ? 'y' : x ? 'x' : 'z';
		name[7 + i] = 0;
	}
	if (k == 0)
		strcpy(name, "pauli_i");
	dw_builder *b = dw_begin(c, name, k, 1, DW_STAGE_TERM);
	if (k == 0) {
		/* exp(-i theta/2 I) is a global phase: nothing to apply */
		return dw_end(b, e);
	}
	for (uint32_t i = 0; i < k; i++) {
		uint64_t bit = 1ULL << sup[i];
		bool x = p.x & bit, z = p.z & bit;
		if (x && z) {
			dw_g1(b, DW_G_SDG, i);
			dw_g1(b, DW_G_H, i);
		} else if (x) {
			dw_g1(b, DW_G_H, i);
		}
	}
	for (uint32_t i = 0; i + 1 < k; i++)
		dw_g2(b, DW_G_CX, i, i + 1);
	dw_r1(b, DW_G_RZ, k - 1, dw_par(0, 1.0));
	for (uint32_t i = k - 1; i-- > 0;)
		dw_g2(b, DW_G_CX, i, i + 1);
	for (uint32_t i = 0; i < k; i++) {
		uint64_t bit = 1ULL << sup[i];
		bool x = p.x & bit, z = p.z & bit;
		if (x && z) {
			dw_g1(b, DW_G_H, i);
			dw_g1(b, DW_G_S, i);
		} else if (x) {
			dw_g1(b, DW_G_H, i);
		}
	}
	return dw_end(b, e);
}
