/* lanczos.h - spectrum bounds of a large sparse Hermitian operator.
 *
 * The operator is either a Hermitian CSR matrix H (d x d) or the Hermitian
 * dilation [[0, A], [A^dagger, 0]] (2d x 2d) of a square CSR A given with
 * its adjoint.  dw_lanczos_spectrum gives the norm bound alpha, a lower
 * bound on the smallest |eigenvalue| and bounds on the extreme eigenvalues
 * from Lanczos with full reorthogonalisation (Lanczos, "An iteration method
 * for the solution of the eigenvalue problem of linear differential and
 * integral operators", J. Res. Nat. Bur. Standards, 1950) combined with
 * Gershgorin discs.  Deterministic: a fixed seeded start vector. */
#ifndef DWELL_LANCZOS_H
#define DWELL_LANCZOS_H

#include <stdbool.h>
#include <stdint.h>

#include "dwell/diag.h"
#include "dwell/problem.h"

typedef struct dw_hermitian_op {
	const dw_csr *a;          /* Hermitian H, or A when adj is set */
	const dw_csr *adj;        /* NULL, or A^dagger: the operator is A's dilation */
} dw_hermitian_op;

/* One Lanczos run: the extreme Ritz values and their residual norms
 * |beta_k e_k^T y| (an eigenvalue lies within res of each Ritz value:
 * Parlett, "The symmetric eigenvalue problem", SIAM 1998, ch. 4). */
typedef struct dw_lanczos_run {
	double ritz_min, ritz_max;
	double res_min, res_max;
	int iterations;
	bool converged;           /* both residuals <= 1e-10 * max |Ritz| */
} dw_lanczos_run;

typedef struct dw_lanczos_spectrum {
	double alpha;             /* >= ||op||_2 (see docs/problem-format.md) */
	double lambda_lo;         /* lower bound on the smallest eigenvalue */
	double lambda_hi;         /* upper bound on the largest eigenvalue */
	double sigma_min;         /* lower bound on min |eigenvalue|, 0 if not certified */
	bool definite;            /* lambda_lo > 0 */
	dw_lanczos_run plain;     /* run on op */
	dw_lanczos_run squared;   /* run on op^2 (indefinite op only) */
	bool used_squared;
} dw_lanczos_spectrum;

/* Dimension of the operator (d, or 2d for a dilation). */
int64_t dw_hermitian_op_dim(const dw_hermitian_op *op);

/* y = op x (x, y of dw_hermitian_op_dim entries, not aliased). */
void dw_hermitian_op_apply(const dw_hermitian_op *op, const double complex *x,
	double complex *y);

/* Lanczos on op (squared: on op^2) for at most max_iter steps (capped by a
 * 64 MiB basis budget). */
int dw_lanczos_extremes(const dw_hermitian_op *op, bool squared, int max_iter,
	dw_lanczos_run *out, dw_error *err);

/* Bounds as described above.  sigma_min is 0 when neither Gershgorin nor
 * the Ritz residual bound certifies it (the caller refuses or falls back). */
int dw_lanczos_spectrum_of(const dw_hermitian_op *op, dw_lanczos_spectrum *out,
	dw_error *err);

#endif
