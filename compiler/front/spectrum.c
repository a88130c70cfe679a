/* spectrum.c - classical analysis of a loaded problem (DESIGN 3.3).
 * Takes: a dw_problem from dw_problem_load.  Gives: alpha (the norm used for
 * scaling), sigma_min, the extreme eigenvalues, kappa and its source, the
 * variant ('P' positive definite, 'I' otherwise).  For a matrix file it also
 * makes A Hermitian and of size 2^n: a non-Hermitian A is replaced by its
 * dilation [[0, A], [A^dagger, 0]] (one more, most significant, sys qubit;
 * rhs |0>|b>), and the dimension is padded with the diagonal block alpha*I
 * (rhs zero there), so the scaled spectrum stays inside [1/kappa, 1] and the
 * solution's padding part is zero.  The result replaces p->matrix.
 * Dense LAPACKE (zheevd / zgesdd) up to 4096 rows; beyond that Lanczos
 * bounds (lanczos.c, kappa_source "lanczos").  Stencils: closed forms in stencil_spectrum.c. */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cblas.h>
#include <lapacke.h>

#include "dwell/lanczos.h"
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

/* A^dagger of the square CSR a (rows sorted by column, as the reader
 * gives them; the counting sort keeps them sorted). */
static dw_csr *csr_adjoint(const dw_csr *a, dw_error *err)
{
	dw_csr *t = csr_new(a->rows, a->nnz, err);
	if (!t)
		return NULL;
	memset(t->rowptr, 0, ((size_t)a->rows + 1) * sizeof *t->rowptr);
	for (int64_t k = 0; k < a->nnz; k++)
		t->rowptr[a->col[k] + 1]++;
	for (int64_t r = 0; r < a->rows; r++)
		t->rowptr[r + 1] += t->rowptr[r];
	for (int64_t r = 0; r < a->rows; r++)
		for (int64_t k = a->rowptr[r]; k < a->rowptr[r + 1]; k++) {
			int64_t at = t->rowptr[a->col[k]]++;
			t->col[at] = r;
			t->val[at] = conj(a->val[k]);
		}
	for (int64_t r = a->rows; r > 0; r--)
		t->rowptr[r] = t->rowptr[r - 1];
	t->rowptr[0] = 0;
	t->nnz = a->nnz;
	t->is_complex = a->is_complex;
	return t;
}

/* Walk row r of a and of ah (both sorted by column) together: *k and *l
 * advance past column *c; *x and *y are the two entries there (0 if
 * absent).  Returns false at the end of the row. */
static bool merge_next(const dw_csr *a, const dw_csr *ah, int64_t r, int64_t *k,
	int64_t *l, int64_t *c, double complex *x, double complex *y)
{
	int64_t ke = a->rowptr[r + 1], le = ah->rowptr[r + 1];
	if (*k >= ke && *l >= le)
		return false;
	int64_t ca = *k < ke ? a->col[*k] : INT64_MAX;
	int64_t cb = *l < le ? ah->col[*l] : INT64_MAX;
	*c = ca < cb ? ca : cb;
	*x = ca == *c ? a->val[(*k)++] : 0;
	*y = cb == *c ? ah->val[(*l)++] : 0;
	return true;
}

/* Entry by entry: |a_ij - conj(a_ji)| <= HERMITIAN_RTOL * max |a_ij|. */
static bool csr_is_hermitian(const dw_csr *a, const dw_csr *ah)
{
	double maxabs = 0;
	for (int64_t k = 0; k < a->nnz; k++)
		maxabs = fmax(maxabs, cabs(a->val[k]));
	for (int64_t r = 0; r < a->rows; r++) {
		int64_t k = a->rowptr[r], l = ah->rowptr[r], c;
		double complex x, y;
		while (merge_next(a, ah, r, &k, &l, &c, &x, &y))
			if (cabs(x - y) > HERMITIAN_RTOL * maxabs)
				return false;
	}
	return true;
}

/* The Hermitian part of a nearly Hermitian a, padded to dp rows: entry
 * (i, j), i < j, is h = (a_ij + conj(a_ji)) / 2 and (j, i) is conj(h);
 * the diagonal is real; exact zeros dropped.  Rows d..dp-1 hold one
 * diagonal entry (alpha, set later by set_padding). */
static dw_csr *build_padded(const dw_csr *a, const dw_csr *ah, int64_t dp,
	dw_error *err)
{
	int64_t d = a->rows, nnz = dp - d;
	for (int64_t r = 0; r < d; r++) {
		int64_t k = a->rowptr[r], l = ah->rowptr[r], c;
		double complex x, y;
		while (merge_next(a, ah, r, &k, &l, &c, &x, &y))
			nnz++;
	}
	dw_csr *m = csr_new(dp, nnz, err);
	if (!m)
		return NULL;
	for (int64_t r = 0; r < dp; r++) {
		m->rowptr[r] = m->nnz;
		if (r >= d) {
			csr_push(m, r, 0);
			continue;
		}
		int64_t k = a->rowptr[r], l = ah->rowptr[r], c;
		double complex x, y, h;
		while (merge_next(a, ah, r, &k, &l, &c, &x, &y)) {
			/* y = conj(a_cr); the upper entry (min, max) is averaged
			 * first, as in (a_ij + conj(a_ji)) / 2 */
			if (c == r)
				h = creal(x);
			else if (r < c)
				h = (x + y) / 2;
			else
				h = conj((conj(y) + conj(x)) / 2);
			if (h != 0)
				csr_push(m, c, h);
		}
	}
	m->rowptr[dp] = m->nnz;
	return m;
}

/* Dilation of the padded A (dp x dp, a is d x d with adjoint ah): rows
 * i < dp hold A in columns dp + j; rows dp + j hold A^dagger. */
static dw_csr *build_dilation(const dw_csr *a, const dw_csr *ah, int64_t dp,
	dw_error *err)
{
	int64_t d = a->rows;
	dw_csr *m = csr_new(2 * dp, 2 * (dp - d) + 2 * a->nnz, err);
	if (!m)
		return NULL;
	for (int half = 0; half < 2; half++) {
		const dw_csr *src = half ? ah : a;
		for (int64_t i = 0; i < dp; i++) {
			int64_t row = half * dp + i;
			m->rowptr[row] = m->nnz;
			if (i >= d) {
				csr_push(m, half ? i : dp + i, 0);
				continue;
			}
			for (int64_t k = src->rowptr[i]; k < src->rowptr[i + 1]; k++)
				if (src->val[k] != 0)
					csr_push(m, (half ? 0 : dp) + src->col[k], src->val[k]);
		}
	}
	m->rowptr[2 * dp] = m->nnz;
	return m;
}

/* Column-major dense copy of the first d rows/columns of m. */
static double complex *csr_dense(const dw_csr *m, int64_t d, dw_error *err)
{
	double complex *a = dw_alloc(err, (size_t)(d * d), sizeof *a);
	for (int64_t r = 0; a && r < d; r++)
		for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++)
			a[r + m->col[k] * d] += m->val[k];
	return a;
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

/* Dense spectrum (d <= DENSE_MAX_ROWS): eigenvalues of the Hermitian
 * part (first d rows of the padded h), or singular values of a. */
static int dense_spectrum(const dw_csr *src, int64_t d, bool hermitian,
	int64_t dp, double *alpha, double *smin, double *lmin, double *lmax,
	dw_error *err)
{
	double complex *a = csr_dense(src, d, err);
	double *w = dw_alloc(err, (size_t)d, sizeof *w);
	int rc = a && w ? DW_OK : err->status;
	*alpha = 0;
	*smin = INFINITY;
	if (!rc && hermitian) {
		rc = eig_hermitian(a, d, w, err);
		for (int64_t i = 0; !rc && i < d; i++) {
			*alpha = fmax(*alpha, fabs(w[i]));
			*smin = fmin(*smin, fabs(w[i]));
		}
		if (!rc) {
			*lmin = w[0];
			*lmax = d < dp ? fmax(w[d - 1], *alpha) : w[d - 1];
		}
	} else if (!rc) {
		lapack_int info = LAPACKE_zgesdd(LAPACK_COL_MAJOR, 'N', (lapack_int)d,
			(lapack_int)d, a, (lapack_int)d, w, NULL, 1, NULL, 1);
		if (info != 0)
			rc = dw_fail(err, DW_EINTERNAL, "LAPACKE_zgesdd failed (info %d)",
				(int)info);
		if (!rc) {
			*alpha = w[0];
			*smin = w[d - 1];
			*lmin = -*alpha;
			*lmax = *alpha;
		}
	}
	free(a);
	free(w);
	return rc;
}

/* Sparse spectrum (lanczos.c) of the Hermitian part h (padded rows
 * excluded), or of the dilation of a.  The figures are safe bounds:
 * alpha >= ||A||, smin <= sigma_min, so kappa is an upper estimate. */
static int sparse_spectrum(dw_problem *p, const dw_csr *h, const dw_csr *a,
	const dw_csr *ah, int64_t dp, double *alpha, double *smin, double *lmin,
	double *lmax, dw_error *err)
{
	dw_csr hview = {0};
	if (h) {   /* the first d rows of the padded h: no padding entries */
		hview = *h;
		hview.rows = hview.cols = a->rows;
		hview.nnz = h->rowptr[a->rows];
	}
	dw_hermitian_op op = h ? (dw_hermitian_op){&hview, NULL}
		: (dw_hermitian_op){a, ah};
	dw_lanczos_spectrum s;
	if (dw_lanczos_spectrum_of(&op, &s, err))
		return err->status;
	*alpha = s.alpha;
	*smin = s.sigma_min;
	if (!(s.sigma_min > 0)) {
		const dw_lanczos_run *r = s.used_squared ? &s.squared : &s.plain;
		if (p->kappa_user > 0) {   /* trusted bound: sigma_min from it */
			*smin = s.alpha / p->kappa_user;
		} else {
			return dw_fail_at(err, DW_EINPUT, p->path, 0, "matrix.file: Lanczos "
				"could not bound the smallest |eigenvalue| of this %lld-row "
				"matrix away from zero (%s after %d steps: Ritz value %.6g, "
				"residual %.3g%s); it may be singular or badly conditioned; "
				"give schedule.kappa to supply a trusted bound",
				(long long)a->rows, s.used_squared ? "on A^2" : "on A",
				r->iterations, r->ritz_min, r->res_min,
				r->converged ? "" : ", not converged");
		}
	}
	if (h) {
		*lmin = s.lambda_lo;
		*lmax = a->rows < dp ? fmax(s.lambda_hi, s.alpha) : s.lambda_hi;
	} else {
		*lmin = -s.alpha;
		*lmax = s.alpha;
	}
	return DW_OK;
}

static int analyse_file(dw_problem *p, dw_error *err)
{
	const dw_csr *in = p->matrix;
	int64_t d = in->rows;
	int64_t dp = (int64_t)1 << p->n;
	if (d != dp && (p->rhs_kind == DW_RHS_PRODUCT || p->rhs_kind == DW_RHS_CIRCUIT))
		return dw_fail_at(err, DW_EINPUT, p->path, 0, "rhs.%s: the matrix has "
			"%lld rows, padded to %lld; such a state need not be zero on the "
			"padding, so give rhs.amplitudes or rhs.file instead",
			p->rhs_kind == DW_RHS_PRODUCT ? "product" : "circuit",
			(long long)d, (long long)dp);
	dw_csr *ah = csr_adjoint(in, err);
	if (!ah)
		return err->status;
	bool hermitian = csr_is_hermitian(in, ah);
	dw_csr *out = hermitian ? build_padded(in, ah, dp, err)
		: build_dilation(in, ah, dp, err);
	int rc = out ? DW_OK : err->status;
	double alpha = 0, smin = 0, lmin = 0, lmax = 0;
	bool sparse = d > DENSE_MAX_ROWS;
	if (!rc && !sparse)
		rc = dense_spectrum(hermitian ? out : in, d, hermitian, dp, &alpha, &smin,
			&lmin, &lmax, err);
	else if (!rc)
		rc = sparse_spectrum(p, hermitian ? out : NULL, in, ah, dp, &alpha,
			&smin, &lmin, &lmax, err);
	dw_csr_free(ah);
	if (!rc)
		rc = settle(p, alpha, smin, lmin, lmax, sparse ? "lanczos"
			: hermitian ? "lapacke-zheevd" : "lapacke-zgesdd", err);
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
