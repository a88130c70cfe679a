/* budget.c - the split of the precision target into error shares.
 * Takes: a problem.  Gives: eps_path (eigenpath following), eps_split
 * (product-formula splitting), eps_synth (rotation synthesis; in continuous
 * mode reserved and used for the T-count estimate), eps_data (fixed-point
 * data; zero for Pauli sums, which are loaded exactly).  The shares add up
 * to the precision target (trace distance; errors add by the triangle
 * inequality). */
#include "dwell/program.h"

void dw_error_budget_split(const dw_problem *p, dw_error_budget *out)
{
	double eps = p->precision;
	double data = p->matrix_kind == DW_MATRIX_PAULI ? 0.0 : 0.1;
	out->total = eps;
	out->data = data * eps;
	out->synth = 0.2 * eps;
	out->split = 0.3 * eps;
	out->path = eps - out->data - out->synth - out->split;
}
