/* sparse.c - terms of X_anc (x) A for explicit sparse matrices
 * (edge colouring into 1-sparse matchings, sparse-access oracles).
 * Takes: an analysed problem with p->matrix.  Gives: dw_term entries.
 * Not lowered yet: reports that clearly. */
#include "dwell/program.h"

int dw_sparse_terms(const dw_problem *p, const dw_layout *lay, dw_circuit *c,
	dw_term **terms, size_t *nterms, dw_error *e)
{
	(void)lay;
	(void)c;
	(void)terms;
	(void)nterms;
	return dw_fail(e, DW_EINPUT, "%s: matrix.file: explicit matrices are analysed but "
		"not lowered to circuits yet (sparse-access oracles are being built)", p->path);
}
