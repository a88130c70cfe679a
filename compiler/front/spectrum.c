/* spectrum.c - classical analysis of a loaded problem (DESIGN 3.3).
 * Takes: a dw_problem from dw_problem_load.  Gives: alpha (the norm used for
 * scaling), sigma_min, the extreme eigenvalues, kappa and its source, the
 * variant ('P' positive definite, 'I' otherwise).  For a matrix file it also
 * makes A Hermitian and of size 2^n: a non-Hermitian A is replaced by its
 * dilation [[0, A], [A^dagger, 0]] (one more, most significant, sys qubit;
 * rhs |0>|b>), and the dimension is padded with the diagonal block alpha*I
 * (rhs zero there), so the scaled spectrum stays inside [1/kappa, 1] and the
 * solution's padding part is zero.  The result replaces p->matrix.
 * Dense LAPACKE (zheevd / zgesdd) up to 4096 rows; beyond that a clear
 * refusal.  Stencils: closed forms in stencil_spectrum.c. */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cblas.h>
#include <lapacke.h>

#include "dwell/mtx.h"
#include "dwell/problem.h"
#include "dwell/stencil.h"

/* Dense analysis limits: 2^12 rows for Pauli sums, 4096 rows for files. */
#define DENSE_MAX_QUBITS 12
#define DENSE_MAX_ROWS 4096
/* Relative tolerance of the Hermitian check (to the largest entry). */
#define HERMITIAN_RTOL 1e-12
/* Refusal thresholds: singular to working precision, or kappa too large. */
#define SINGULAR_RTOL 1e-12
#define KAPPA_MAX 1e12

double complex *dw_pauli_dense(const dw_problem *p, dw_error *e)
{
	if (p->matrix_kind != DW_MATRIX_PAULI || p->n < 1 || !p->pauli) {
		dw_fail(e, DW_EINTERNAL, "dw_pauli_dense: not a Pauli-sum problem");
		return NULL;
	}
	if (p->n > DENSE_MAX_QUBITS) {
		dw_fail_at(e, DW_EINPUT, p->path, 0, "matrix.pauli: dense analysis is "
			"limited to %d qubits for now; this sum acts on %d",
			DENSE_MAX_QUBITS, p->n);
		return NULL;
	}
	size_t dim = (size_t)1 << p->n;
	double complex *m = dw_alloc(e, dim * dim, sizeof *m);
	if (!m)
		return NULL;
	for (size_t t = 0; t < p->npauli; t++) {
		/* P|j> = i^(#Y) (-1)^popcount(j & (Y|Z mask)) |j ^ (X|Y mask)>:
		 * X|b> = |1-b>, Z|b> = (-1)^b |b>, Y|b> = i (-1)^b |1-b>. */
		const char *ops = p->pauli[t].ops;
		size_t flip = 0, sign = 0;
		int ny = 0;
		for (int k = 0; k < p->n; k++) {
			if (ops[k] == 'X' || ops[k] == 'Y')
				flip |= (size_t)1 << k;
			if (ops[k] == 'Z' || ops[k] == 'Y')
				sign |= (size_t)1 << k;
			ny += ops[k] == 'Y';
		}
		static const double complex ipow[4] = {1, I, -1, -I};
		double complex c = p->pauli[t].coeff * ipow[ny % 4];
		for (size_t j = 0; j < dim; j++) {
			size_t row = j ^ flip;
			double s = __builtin_parityll((unsigned long long)(j & sign)) ? -1 : 1;
			m[row + j * dim] += s * c;
		}
	}
	return m;
}

/* Eigenvalues (ascending) of the Hermitian dim x dim column-major a,
 * destroying a; upper triangle used. */
static int eig_hermitian(double complex *a, int64_t dim, double *w, dw_error *err)
{
	lapack_int info = LAPACKE_zheevd(LAPACK_COL_MAJOR, 'N', 'U', (lapack_int)dim,
		a, (lapack_int)dim, w);
	if (info != 0)
		return dw_fail(err, DW_EINTERNAL, "LAPACKE_zheevd failed (info %d)", (int)info);
	return DW_OK;
}

/* Record the figures and refuse singular or badly conditioned A. */
static int settle(dw_problem *p, double alpha, double sigma_min, double lmin,
	double lmax, const char *source, dw_error *err)
{
	if (!(alpha > 0))
		return dw_fail_at(err, DW_EINPUT, p->path, 0, "matrix: the matrix is zero");
	if (sigma_min <= SINGULAR_RTOL * alpha)
		return dw_fail_at(err, DW_EINPUT, p->path, 0, "matrix: singular to working "
			"precision: smallest singular value %.6g, largest %.6g (ratio below "
			"%g); dwell needs an invertible A", sigma_min, alpha, SINGULAR_RTOL);
	double kappa = alpha / sigma_min;
	if (kappa > KAPPA_MAX)
		return dw_fail_at(err, DW_EINPUT, p->path, 0, "matrix: condition number "
			"%.6g (alpha %.6g / sigma_min %.6g) exceeds %g", kappa, alpha,
			sigma_min, KAPPA_MAX);
	p->alpha = alpha;
	p->sigma_min = sigma_min;
	p->lambda_min = lmin;
	p->lambda_max = lmax;
	p->variant = lmin > 0 ? 'P' : 'I';
	if (p->kappa_user > 0) {
		if (p->kappa_user > KAPPA_MAX)
			return dw_fail_at(err, DW_EINPUT, p->path, 0, "schedule.kappa: the "
				"bound %.6g exceeds %g", p->kappa_user, KAPPA_MAX);
		p->kappa = p->kappa_user;
		snprintf(p->kappa_source, sizeof p->kappa_source, "user-bound");
	} else {
		p->kappa = kappa;
		snprintf(p->kappa_source, sizeof p->kappa_source, "%s", source);
	}
	p->analysed = true;
	return DW_OK;
}

static int analyse_pauli(dw_problem *p, dw_error *err)
{
	double complex *m = dw_pauli_dense(p, err);
	if (!m)
		return err->status;
	int64_t dim = (int64_t)1 << p->n;
	int64_t nnz = 0;
	for (int64_t i = 0; i < dim * dim; i++)
		nnz += m[i] != 0;
	double *w = dw_alloc(err, (size_t)dim, sizeof *w);
	int rc = w ? eig_hermitian(m, dim, w, err) : err->status;
	free(m);
	if (rc) {
		free(w);
		return rc;
	}
	double alpha = 0, smin = INFINITY;
	for (int64_t i = 0; i < dim; i++) {
		alpha = fmax(alpha, fabs(w[i]));
		smin = fmin(smin, fabs(w[i]));
	}
	rc = settle(p, alpha, smin, w[0], w[dim - 1], "lapacke-zheevd", err);
	free(w);
	if (!rc)
		p->nnz = nnz;
	return rc;
}

/* New CSR with rows rows and room for nnz entries. */
static dw_csr *csr_new(int64_t rows, int64_t nnz, dw_error *err)
{
	dw_csr *m = dw_alloc(err, 1, sizeof *m);
	if (!m)
		return NULL;
	m->rows = m->cols = rows;
	m->rowptr = dw_alloc(err, (size_t)rows + 1, sizeof *m->rowptr);
	m->col = dw_alloc(err, (size_t)nnz, sizeof *m->col);
	m->val = dw_alloc(err, (size_t)nnz, sizeof *m->val);
	if (!m->rowptr || !m->col || !m->val) {
		free(m->rowptr);
		free(m->col);
		free(m->val);
		free(m);
		return NULL;
	}
	return m;
}

static void csr_push(dw_csr *m, int64_t col, double complex v)
{
	m->col[m->nnz] = col;
	m->val[m->nnz] = v;
	m->is_complex = m->is_complex || cimag(v) != 0;
	m->nnz++;
}

/* Hermitian, padded: rows r < d are conj of column r of the (symmetrised)
 * dense d; rows d..dp-1 hold alpha on the diagonal (set later). */
static dw_csr *build_padded(const double complex *a, int64_t d, int64_t dp,
	dw_error *err)
{
	int64_t nnz = dp - d;
	for (int64_t i = 0; i < d * d; i++)
		nnz += a[i] != 0;
	dw_csr *m = csr_new(dp, nnz, err);
	if (!m)
		return NULL;
	for (int64_t r = 0; r < dp; r++) {
		m->rowptr[r] = m->nnz;
		if (r >= d) {
			csr_push(m, r, 0);
			continue;
		}
		for (int64_t c = 0; c < d; c++)
			if (a[c + r * d] != 0)
				csr_push(m, c, conj(a[c + r * d]));
	}
	m->rowptr[dp] = m->nnz;
	return m;
}

/* Dilation of the padded A (dp x dp, dense a is d x d column-major):
 * rows i < dp hold A in columns dp + j; rows dp + j hold A^dagger. */
static dw_csr *build_dilation(const double complex *a, int64_t d, int64_t dp,
	dw_error *err)
{
	int64_t nnz = 2 * (dp - d);
	for (int64_t i = 0; i < d * d; i++)
		nnz += 2 * (a[i] != 0);
	dw_csr *m = csr_new(2 * dp, nnz, err);
	if (!m)
		return NULL;
	for (int64_t i = 0; i < dp; i++) {
		m->rowptr[i] = m->nnz;
		if (i >= d) {
			csr_push(m, dp + i, 0);
			continue;
		}
		for (int64_t j = 0; j < d; j++)
			if (a[i + j * d] != 0)
				csr_push(m, dp + j, a[i + j * d]);
	}
	for (int64_t j = 0; j < dp; j++) {
		m->rowptr[dp + j] = m->nnz;
		if (j >= d) {
			csr_push(m, j, 0);
			continue;
		}
		for (int64_t i = 0; i < d; i++)
			if (a[i + j * d] != 0)
				csr_push(m, i, conj(a[i + j * d]));
	}
	m->rowptr[2 * dp] = m->nnz;
	return m;
}

/* Put alpha on the padding diagonal: each padding row has its one entry. */
static void set_padding(dw_csr *m, int64_t d, int64_t dp, bool dilated, double alpha)
{
	for (int64_t r = d; r < dp; r++) {
		m->val[m->rowptr[r]] = alpha;
		if (dilated)
			m->val[m->rowptr[dp + r]] = alpha;
	}
}

/* Bring the right-hand side to the padded (and dilated) size: amplitudes
 * get zeros; uniform over a non-power-of-two size becomes explicit
 * amplitudes over the d real rows; product and circuit (checked earlier to
 * need no padding) gain |0> on the top qubit when dilated. */
static int adapt_rhs(dw_problem *p, int64_t d, int64_t dp, bool dilate, dw_error *err)
{
	bool padded = d != dp;
	int64_t full = dilate ? 2 * dp : dp;
	if (p->rhs_kind == DW_RHS_UNIFORM && padded) {
		p->amps = dw_alloc(err, (size_t)full, sizeof *p->amps);
		if (!p->amps)
			return err->status;
		for (int64_t i = 0; i < d; i++)
			p->amps[i] = 1 / sqrt((double)d);
		p->rhs_kind = DW_RHS_AMPLITUDES;
		return DW_OK;
	}
	if (!dilate)
		return DW_OK;
	if (p->amps) {
		double complex *a = realloc(p->amps, (size_t)full * sizeof *a);
		if (!a)
			return dw_fail(err, DW_EINTERNAL, "out of memory extending the rhs");
		memset(a + dp, 0, (size_t)dp * sizeof *a);
		p->amps = a;
	} else if (p->rhs_kind == DW_RHS_UNIFORM || p->rhs_kind == DW_RHS_PRODUCT) {
		/* |0> on the new top qubit: theta = 0; uniform is theta = pi/2 */
		int m = p->n;
		double (*prod)[2] = dw_alloc(err, (size_t)m + 1, sizeof *prod);
		if (!prod)
			return err->status;
		for (int k = 0; k < m; k++) {
			prod[k][0] = p->product ? p->product[k][0] : M_PI / 2;
			prod[k][1] = p->product ? p->product[k][1] : 0;
		}
		free(p->product);
		p->product = prod;
		p->nproduct = (size_t)m + 1;
		p->rhs_kind = DW_RHS_PRODUCT;
	}
	/* basis k stays k (top bit 0); a circuit acts on the low n qubits */
	return DW_OK;
}

static int analyse_file(dw_problem *p, dw_error *err)
{
	const dw_csr *in = p->matrix;
	int64_t d = in->rows;
	if (d > DENSE_MAX_ROWS)
		return dw_fail_at(err, DW_EINPUT, p->path, 0, "matrix.file: %lld rows; "
			"sparse spectrum estimation not yet available (dense analysis "
			"handles up to %d rows)", (long long)d, DENSE_MAX_ROWS);
	int64_t dp = (int64_t)1 << p->n;
	if (d != dp && (p->rhs_kind == DW_RHS_PRODUCT || p->rhs_kind == DW_RHS_CIRCUIT))
		return dw_fail_at(err, DW_EINPUT, p->path, 0, "rhs.%s: the matrix has "
			"%lld rows, padded to %lld; such a state need not be zero on the "
			"padding, so give rhs.amplitudes or rhs.file instead",
			p->rhs_kind == DW_RHS_PRODUCT ? "product" : "circuit",
			(long long)d, (long long)dp);
	double complex *a = dw_alloc(err, (size_t)(d * d), sizeof *a);
	if (!a)
		return err->status;
	double maxabs = 0;
	for (int64_t r = 0; r < d; r++)
		for (int64_t k = in->rowptr[r]; k < in->rowptr[r + 1]; k++) {
			a[r + in->col[k] * d] += in->val[k];
		}
	for (int64_t i = 0; i < d * d; i++)
		maxabs = fmax(maxabs, cabs(a[i]));
	bool hermitian = true;
	for (int64_t j = 0; j < d && hermitian; j++)
		for (int64_t i = 0; i <= j && hermitian; i++)
			hermitian = cabs(a[i + j * d] - conj(a[j + i * d])) <= HERMITIAN_RTOL * maxabs;
	int rc = DW_OK;
	dw_csr *out = NULL;
	double *w = NULL;
	double alpha = 0, smin = INFINITY, lmin = 0, lmax = 0;
	if (!rc && hermitian) {
		for (int64_t j = 0; j < d; j++) {
			a[j + j * d] = creal(a[j + j * d]);
			for (int64_t i = 0; i < j; i++) {
				double complex h = (a[i + j * d] + conj(a[j + i * d])) / 2;
				a[i + j * d] = h;
				a[j + i * d] = conj(h);
			}
		}
		out = build_padded(a, d, dp, err);
		w = dw_alloc(err, (size_t)d, sizeof *w);
		rc = out && w ? eig_hermitian(a, d, w, err) : err->status;
		for (int64_t i = 0; !rc && i < d; i++) {
			alpha = fmax(alpha, fabs(w[i]));
			smin = fmin(smin, fabs(w[i]));
		}
		if (!rc) {
			lmin = w[0];
			lmax = d < dp ? fmax(w[d - 1], alpha) : w[d - 1];
		}
	} else if (!rc) {
		out = build_dilation(a, d, dp, err);
		w = dw_alloc(err, (size_t)d, sizeof *w);
		if (out && w) {
			lapack_int info = LAPACKE_zgesdd(LAPACK_COL_MAJOR, 'N', (lapack_int)d,
				(lapack_int)d, a, (lapack_int)d, w, NULL, 1, NULL, 1);
			if (info != 0)
				rc = dw_fail(err, DW_EINTERNAL, "LAPACKE_zgesdd failed (info %d)",
					(int)info);
		} else {
			rc = err->status;
		}
		if (!rc) {
			alpha = w[0];
			smin = w[d - 1];
			lmin = -alpha;
			lmax = alpha;
		}
	}
	free(a);
	free(w);
	if (!rc)
		rc = settle(p, alpha, smin, lmin, lmax,
			hermitian ? "lapacke-zheevd" : "lapacke-zgesdd", err);
	if (!rc)
		rc = adapt_rhs(p, d, dp, !hermitian, err);
	if (rc) {
		dw_csr_free(out);
		return rc;
	}
	set_padding(out, d, dp, !hermitian, alpha);
	dw_csr_free(p->matrix);
	p->matrix = out;
	p->dilated = !hermitian;
	if (!hermitian)
		p->n++;
	p->nnz = out->nnz;
	return DW_OK;
}

int dw_problem_analyse(dw_problem *p, dw_error *err)
{
	dw_error local = {0};
	if (!err)
		err = &local;
	if (p->analysed)
		return DW_OK;
	/* Debian's pthread OpenBLAS, running its own threads inside a process
	 * that also uses OpenMP (the simulator), was seen to crash in
	 * zheevd's zgemv on a 2048-row problem: keep OpenBLAS on one thread. */
	openblas_set_num_threads(1);
	switch (p->matrix_kind) {
	case DW_MATRIX_PAULI:
		return analyse_pauli(p, err);
	case DW_MATRIX_FILE:
		return analyse_file(p, err);
	case DW_MATRIX_STENCIL: {
		dw_stencil_spectrum s;     /* stencil_spectrum.c: closed forms */
		if (dw_stencil_analyse(p, &s, err)
				|| settle(p, s.alpha, s.sigma_min, s.lmin, s.lmax, s.source, err))
			return err->status;
		return dw_stencil_finish(p, &s, err);
	}
	}
	return dw_fail(err, DW_EINTERNAL, "unknown matrix kind");
}
