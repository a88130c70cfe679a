/* stencil.c - terms of X_anc (x) A for constant-coefficient stencils.
 * Takes: an analysed stencil problem.  Gives: dw_term entries.
 * Not lowered yet: reports that clearly. */
#include "dwell/program.h"

int dw_stencil_terms(const dw_problem *p, const dw_layout *lay, dw_circuit *c,
	dw_term **terms, size_t *nterms, dw_error *e)
{
	(void)lay;
	(void)c;
	(void)terms;
	(void)nterms;
	return dw_fail(e, DW_EINPUT, "%s: matrix.stencil: stencils are not lowered to "
		"circuits yet", p->path);
}
