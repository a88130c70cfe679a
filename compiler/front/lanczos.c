/* lanczos.c - spectrum bounds of a large sparse Hermitian operator
 * (include/dwell/lanczos.h).
 * Takes: a Hermitian CSR H, or a square CSR A with its adjoint (operator:
 * the dilation [[0, A], [A^dagger, 0]]).  Gives: alpha >= ||op||, bounds on
 * the extreme eigenvalues and a lower bound on min |eigenvalue|.
 *
 * Method: Lanczos with full reorthogonalisation (classical Gram-Schmidt
 * applied twice, common practice) from a fixed pseudo-random start vector;
 * every 10 steps the tridiagonal T_k is solved (LAPACKE_dstev) and the
 * extreme Ritz pairs' residuals |beta_k e_k^T y| are read off.  Each Ritz
 * value has an eigenvalue within its residual (Parlett, "The symmetric
 * eigenvalue problem", SIAM 1998), so once the extreme Ritz values track
 * the extreme eigenvalues, theta_max + res bounds lambda_max from above and
 * theta_min - res bounds lambda_min from below (plus a rounding
 * allowance of 1e-13 max |theta|).  These are intersected with
 * Gershgorin's discs (Gershgorin, "Ueber die Abgrenzung der Eigenwerte
 * einer Matrix", Izv. Akad. Nauk SSSR, 1931), which are rigorous.  For an
 * indefinite operator, min |eigenvalue| = sqrt(lambda_min(op^2)): Lanczos
 * on op^2 (two products per step), the lower bound sqrt(theta - res),
 * or the Gershgorin gap min_i (|a_ii| - sum_j!=i |a_ij|) when larger. */
#include <complex.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <lapacke.h>

#include "dwell/lanczos.h"

/* Basis memory budget and iteration cap. */
#define BASIS_BYTES ((size_t)64 << 20)
#define MAX_ITER 200
#define CHECK_EVERY 10
#define CONVERGED_RTOL 1e-10
/* Rounding allowance added to each residual bound, relative to the
 * largest |Ritz value| (the computed Ritz values carry rounding errors of
 * a few ulps of ||op|| times the step count: common practice). */
#define ROUNDING_RTOL 1e-13

int64_t dw_hermitian_op_dim(const dw_hermitian_op *op)
{
	return op->adj ? 2 * op->a->rows : op->a->rows;
}

/* y[0, rows) = m x */
static void csr_apply(const dw_csr *m, const double complex *x, double complex *y)
{
	for (int64_t r = 0; r < m->rows; r++) {
		double complex s = 0;
		for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++)
			s += m->val[k] * x[m->col[k]];
		y[r] = s;
	}
}

void dw_hermitian_op_apply(const dw_hermitian_op *op, const double complex *x,
	double complex *y)
{
	if (!op->adj) {
		csr_apply(op->a, x, y);
		return;
	}
	int64_t d = op->a->rows;
	csr_apply(op->a, x + d, y);        /* top: A x_bottom */
	csr_apply(op->adj, x, y + d);      /* bottom: A^dagger x_top */
}

static double complex dot(const double complex *u, const double complex *v, int64_t n)
{
	double complex s = 0;
	for (int64_t i = 0; i < n; i++)
		s += conj(u[i]) * v[i];
	return s;
}

static double norm2(const double complex *u, int64_t n)
{
	double s = 0;
	for (int64_t i = 0; i < n; i++)
		s += creal(u[i]) * creal(u[i]) + cimag(u[i]) * cimag(u[i]);
	return sqrt(s);
}

/* splitmix64 (Steele, Lea and Flood, "Fast splittable pseudorandom number
 * generators", OOPSLA 2014): a fixed, platform-independent start vector. */
static uint64_t splitmix(uint64_t *s)
{
	uint64_t z = (*s += 0x9e3779b97f4a7c15ULL);
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
	z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
	return z ^ (z >> 31);
}

static double unit_uniform(uint64_t *s)
{
	return (double)(splitmix(s) >> 11) * 0x1.0p-53 * 2 - 1;
}

/* Extreme eigenpairs of the k x k tridiagonal (diag a, off b): fills the
 * Ritz values and residuals with beta = b[k-1]. */
static int ritz_extremes(const double *a, const double *b, int k, double beta,
	double *work, double *z, dw_lanczos_run *out, dw_error *err)
{
	double *d = work, *e = work + k;
	memcpy(d, a, (size_t)k * sizeof *d);
	if (k > 1)
		memcpy(e, b, (size_t)(k - 1) * sizeof *e);
	lapack_int info = LAPACKE_dstev(LAPACK_COL_MAJOR, 'V', k, d, e, z, k);
	if (info != 0)
		return dw_fail(err, DW_EINTERNAL, "LAPACKE_dstev failed (info %d)", (int)info);
	out->ritz_min = d[0];
	out->ritz_max = d[k - 1];
	out->res_min = fabs(beta * z[(k - 1) + 0 * (size_t)k]);
	out->res_max = fabs(beta * z[(k - 1) + (size_t)(k - 1) * k]);
	return DW_OK;
}

int dw_lanczos_extremes(const dw_hermitian_op *op, bool squared, int max_iter,
	dw_lanczos_run *out, dw_error *err)
{
	int64_t n = dw_hermitian_op_dim(op);
	if (n < 1)
		return dw_fail(err, DW_EINTERNAL, "lanczos: empty operator");
	size_t cap = BASIS_BYTES / ((size_t)n * sizeof(double complex));
	int m = max_iter;
	if ((size_t)m > cap)
		m = (int)cap;
	if (m > n)
		m = (int)n;
	if (m < 2)
		m = n < 2 ? (int)n : 2;
	double complex *basis = dw_alloc(err, (size_t)m * (size_t)n, sizeof *basis);
	double complex *w = dw_alloc(err, (size_t)n, sizeof *w);
	double complex *tmp = dw_alloc(err, (size_t)n, sizeof *tmp);
	double *ta = dw_alloc(err, (size_t)m, sizeof *ta);
	double *tb = dw_alloc(err, (size_t)m, sizeof *tb);
	double *work = dw_alloc(err, 2 * (size_t)m, sizeof *work);
	double *z = dw_alloc(err, (size_t)m * (size_t)m, sizeof *z);
	int rc = basis && w && tmp && ta && tb && work && z ? DW_OK : err->status;
	uint64_t seed = 0x6477656c6c4c5aULL;
	for (int64_t i = 0; !rc && i < n; i++)
		basis[i] = unit_uniform(&seed) + I * unit_uniform(&seed);
	double nv = rc ? 1 : norm2(basis, n);
	for (int64_t i = 0; !rc && i < n; i++)
		basis[i] /= nv;
	memset(out, 0, sizeof *out);
	double seen = 0;      /* largest |alpha_j|, beta_j so far */
	for (int j = 0; !rc && j < m; j++) {
		double complex *v = basis + (size_t)j * n;
		if (squared) {
			dw_hermitian_op_apply(op, v, tmp);
			dw_hermitian_op_apply(op, tmp, w);
		} else {
			dw_hermitian_op_apply(op, v, w);
		}
		ta[j] = creal(dot(v, w, n));
		for (int64_t i = 0; i < n; i++)
			w[i] -= ta[j] * v[i];
		if (j > 0)
			for (int64_t i = 0; i < n; i++)
				w[i] -= tb[j - 1] * (v - n)[i];
		for (int pass = 0; pass < 2; pass++)
			for (int q = 0; q <= j; q++) {
				const double complex *u = basis + (size_t)q * n;
				double complex c = dot(u, w, n);
				for (int64_t i = 0; i < n; i++)
					w[i] -= c * u[i];
			}
		double beta = norm2(w, n);
		int k = j + 1;
		bool last = k == m;
		seen = fmax(seen, fmax(fabs(ta[j]), beta));
		bool breakdown = beta <= 1e-14 * seen;
		if (breakdown || last || k % CHECK_EVERY == 0) {
			rc = ritz_extremes(ta, tb, k, breakdown ? 0 : beta, work, z, out, err);
			if (rc)
				break;
			out->iterations = k;
			double scale = fmax(fabs(out->ritz_min), fabs(out->ritz_max));
			out->converged = out->res_min <= CONVERGED_RTOL * scale
				&& out->res_max <= CONVERGED_RTOL * scale;
			if (breakdown || out->converged || last)
				break;
		}
		tb[j] = beta;
		double complex *next = basis + (size_t)(j + 1) * n;
		for (int64_t i = 0; i < n; i++)
			next[i] = w[i] / beta;
	}
	free(basis);
	free(w);
	free(tmp);
	free(ta);
	free(tb);
	free(work);
	free(z);
	return rc;
}

/* Gershgorin: every eigenvalue lies in some disc |z - a_ii| <= R_i. */
static void gershgorin(const dw_hermitian_op *op, double *lo, double *hi, double *gap)
{
	*lo = INFINITY;
	*hi = -INFINITY;
	*gap = INFINITY;
	const dw_csr *parts[2] = {op->a, op->adj};
	for (int p = 0; p < (op->adj ? 2 : 1); p++) {
		const dw_csr *m = parts[p];
		for (int64_t r = 0; r < m->rows; r++) {
			double diag = 0, radius = 0;
			for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++) {
				if (!op->adj && m->col[k] == r)
					diag += creal(m->val[k]);
				else
					radius += cabs(m->val[k]);
			}
			*lo = fmin(*lo, diag - radius);
			*hi = fmax(*hi, diag + radius);
			*gap = fmin(*gap, fabs(diag) - radius);
		}
	}
}

int dw_lanczos_spectrum_of(const dw_hermitian_op *op, dw_lanczos_spectrum *out,
	dw_error *err)
{
	memset(out, 0, sizeof *out);
	double glo, ghi, ggap;
	gershgorin(op, &glo, &ghi, &ggap);
	int rc = dw_lanczos_extremes(op, false, MAX_ITER, &out->plain, err);
	if (rc)
		return rc;
	const dw_lanczos_run *r = &out->plain;
	double slack = ROUNDING_RTOL * fmax(fabs(r->ritz_min), fabs(r->ritz_max));
	out->lambda_lo = fmax(glo, r->ritz_min - r->res_min - slack);
	out->lambda_hi = fmin(ghi, r->ritz_max + r->res_max + slack);
	out->alpha = fmax(fabs(out->lambda_lo), fabs(out->lambda_hi));
	out->definite = out->lambda_lo > 0;
	if (out->definite) {
		out->sigma_min = out->lambda_lo;
	} else if (out->lambda_hi < 0) {
		out->sigma_min = -out->lambda_hi;
	} else {
		rc = dw_lanczos_extremes(op, true, MAX_ITER, &out->squared, err);
		if (rc)
			return rc;
		out->used_squared = true;
		double sq = out->squared.ritz_min - out->squared.res_min
			- ROUNDING_RTOL * out->squared.ritz_max;
		out->sigma_min = fmax(sq > 0 ? sqrt(sq) : 0, ggap > 0 ? ggap : 0);
	}
	return DW_OK;
}
