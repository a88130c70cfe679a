/* test_lanczos.c - Lanczos spectrum bounds (compiler/front/lanczos.c) on
 * matrices whose spectra are known from outside the project:
 *  - the 1-D Dirichlet Laplacian tridiag(-1, 2, -1) of order N, eigenvalues
 *    2 - 2 cos(k pi / (N + 1)), k = 1..N (Saad, "Iterative methods for
 *    sparse linear systems", 2nd ed., SIAM 2003; METHODS.md 11.1), shifted
 *    to be definite, and a block form diag(L + sI, -(L + sI)) that is
 *    indefinite with eigenvalues +-(s + 2 - 2 cos(k pi / (N + 1)));
 *  - random sparse Hermitian and non-Hermitian matrices compared with
 *    LAPACKE zheevd / zgesdd on their dense form (LAPACK, Debian).
 * Checks: alpha never below the true norm and close to it; sigma_min never
 * above the truth and close to it (so kappa is an upper estimate within a
 * few percent); definiteness detected.  Figures are printed. */
#include <complex.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <lapacke.h>

#include "check.h"
#include "dwell/lanczos.h"
#include "dwell/mtx.h"

/* Tridiagonal (off, diag + shift, off) of order n, optionally with the
 * negated copy as a second diagonal block (2n rows). */
static dw_csr *laplacian(int64_t n, double shift, bool with_negated)
{
	int64_t rows = with_negated ? 2 * n : n;
	dw_csr *m = calloc(1, sizeof *m);
	m->rows = m->cols = rows;
	m->rowptr = calloc((size_t)rows + 1, sizeof *m->rowptr);
	m->col = calloc((size_t)rows * 3, sizeof *m->col);
	m->val = calloc((size_t)rows * 3, sizeof *m->val);
	for (int64_t r = 0; r < rows; r++) {
		int64_t base = r < n ? 0 : n, i = r - base;
		double sign = r < n ? 1 : -1;
		m->rowptr[r] = m->nnz;
		if (i > 0) {
			m->col[m->nnz] = r - 1;
			m->val[m->nnz++] = -sign;
		}
		m->col[m->nnz] = r;
		m->val[m->nnz++] = sign * (2 + shift);
		if (i < n - 1) {
			m->col[m->nnz] = r + 1;
			m->val[m->nnz++] = -sign;
		}
	}
	m->rowptr[rows] = m->nnz;
	return m;
}

static double lap_eig(int64_t n, double shift, int64_t k)
{
	return shift + 2 - 2 * cos((double)k * M_PI / (double)(n + 1));
}

/* For the Laplacian the extreme eigenvalues are spaced about 3 pi^2 / N^2
 * apart, so a few hundred Lanczos steps cannot resolve them; the Gershgorin
 * interval [shift, shift + 4] is then the tighter bound, 2 - 2 cos(pi /
 * (N + 1)) ~ (pi / N)^2 away from the truth: alpha_rtol is set from that
 * (about 9e-8 at N = 5000, 2e-10 at N = 100000). */
static void test_laplacian(int64_t n, double shift, double alpha_rtol)
{
	dw_csr *m = laplacian(n, shift, false);
	dw_hermitian_op op = {m, NULL};
	dw_lanczos_spectrum s;
	dw_error e = {0};
	int rc = dw_lanczos_spectrum_of(&op, &s, &e);
	CHECK(rc == DW_OK, "laplacian %lld: %s", (long long)n, e.msg);
	double lmax = lap_eig(n, shift, n), lmin = lap_eig(n, shift, 1);
	printf("laplacian N=%lld shift %g: alpha %.15g (true %.15g, rel %.3g), "
		"sigma_min %.15g (true %.15g, rel %.3g), %d steps%s\n", (long long)n,
		shift, s.alpha, lmax, (s.alpha - lmax) / lmax, s.sigma_min, lmin,
		(lmin - s.sigma_min) / lmin, s.plain.iterations,
		s.plain.converged ? "" : " (not converged)");
	CHECK(s.alpha >= lmax, "alpha %.17g never below the norm %.17g", s.alpha, lmax);
	CHECK(s.alpha <= lmax * (1 + alpha_rtol), "alpha %.17g near %.17g", s.alpha, lmax);
	CHECK(s.definite, "positive definite detected");
	CHECK(s.sigma_min <= lmin && s.sigma_min >= lmin * 0.97,
		"sigma_min %.17g within 3%% below %.17g", s.sigma_min, lmin);
	/* the Ritz values lie inside the spectrum (Cauchy interlacing,
	 * common practice) and within their residuals of an eigenvalue */
	CHECK(s.plain.ritz_max <= lmax + 1e-12 && s.plain.ritz_min >= lmin - 1e-12,
		"Ritz values inside [%.17g, %.17g]", lmin, lmax);
	double kappa = s.alpha / s.sigma_min, kt = lmax / lmin;
	CHECK(kappa >= kt && kappa <= kt * 1.03, "kappa %.17g vs %.17g", kappa, kt);
	dw_csr_free(m);
}

static void test_block_indefinite(int64_t n, double shift)
{
	dw_csr *m = laplacian(n, shift, true);
	dw_hermitian_op op = {m, NULL};
	dw_lanczos_spectrum s;
	dw_error e = {0};
	int rc = dw_lanczos_spectrum_of(&op, &s, &e);
	CHECK(rc == DW_OK, "block: %s", e.msg);
	double lmax = lap_eig(n, shift, n), smin = lap_eig(n, shift, 1);
	printf("block +-(L+%gI), 2x%lld rows: alpha %.15g (true %.15g), sigma_min %.15g "
		"(true %.15g), squared run %d steps%s\n", shift, (long long)n, s.alpha,
		lmax, s.sigma_min, smin, s.squared.iterations,
		s.squared.converged ? "" : " (not converged)");
	CHECK(!s.definite && s.used_squared, "indefinite detected");
	CHECK(s.alpha >= lmax && s.alpha <= lmax * (1 + 1e-7), "alpha %.17g vs %.17g",
		s.alpha, lmax);
	CHECK(s.sigma_min <= smin && s.sigma_min >= 0.97 * smin,
		"sigma_min %.17g vs %.17g", s.sigma_min, smin);
	dw_csr_free(m);
}

static uint64_t rng_state = 12345;
static double urand(void)
{
	rng_state = rng_state * 6364136223846793005ULL + 1442695040888963407ULL;
	return (double)(rng_state >> 11) * 0x1.0p-53;
}

/* Random sparse n x n matrix, about per_row entries a row plus a diagonal
 * d_i = diag_shift + U(-1, 1); Hermitian when hermitian is set. */
static dw_csr *random_sparse(int n, int per_row, double diag_shift, bool hermitian,
	double complex *dense)
{
	memset(dense, 0, (size_t)n * n * sizeof *dense);
	for (int i = 0; i < n; i++) {
		dense[i + (size_t)i * n] = diag_shift + 2 * urand() - 1;
		for (int t = 0; t < per_row; t++) {
			int j = (int)(urand() * n);
			double complex v = (2 * urand() - 1) + I * (2 * urand() - 1);
			if (hermitian && j == i)
				continue;
			dense[i + (size_t)j * n] += v;
			if (hermitian)
				dense[j + (size_t)i * n] += conj(v);
		}
	}
	dw_csr *m = calloc(1, sizeof *m);
	m->rows = m->cols = n;
	int64_t nnz = 0;
	for (size_t k = 0; k < (size_t)n * n; k++)
		nnz += dense[k] != 0;
	m->rowptr = calloc((size_t)n + 1, sizeof *m->rowptr);
	m->col = calloc((size_t)nnz, sizeof *m->col);
	m->val = calloc((size_t)nnz, sizeof *m->val);
	for (int r = 0; r < n; r++) {
		m->rowptr[r] = m->nnz;
		for (int c = 0; c < n; c++)
			if (dense[r + (size_t)c * n] != 0) {
				m->col[m->nnz] = c;
				m->val[m->nnz++] = dense[r + (size_t)c * n];
			}
	}
	m->rowptr[n] = m->nnz;
	m->is_complex = true;
	return m;
}

static dw_csr *adjoint(const dw_csr *a, const double complex *dense)
{
	int n = (int)a->rows;
	dw_csr *t = calloc(1, sizeof *t);
	t->rows = t->cols = n;
	t->rowptr = calloc((size_t)n + 1, sizeof *t->rowptr);
	t->col = calloc((size_t)a->nnz, sizeof *t->col);
	t->val = calloc((size_t)a->nnz, sizeof *t->val);
	for (int r = 0; r < n; r++) {
		t->rowptr[r] = t->nnz;
		for (int c = 0; c < n; c++)
			if (dense[c + (size_t)r * n] != 0) {
				t->col[t->nnz] = c;
				t->val[t->nnz++] = conj(dense[c + (size_t)r * n]);
			}
	}
	t->rowptr[n] = t->nnz;
	return t;
}

static void test_random_hermitian(int n, double diag_shift)
{
	double complex *dense = malloc((size_t)n * n * sizeof *dense);
	double *w = malloc((size_t)n * sizeof *w);
	dw_csr *m = random_sparse(n, 3, diag_shift, true, dense);
	CHECK(LAPACKE_zheevd(LAPACK_COL_MAJOR, 'N', 'U', n, dense, n, w) == 0, "zheevd");
	double norm = fmax(fabs(w[0]), fabs(w[n - 1])), smin = INFINITY;
	for (int i = 0; i < n; i++)
		smin = fmin(smin, fabs(w[i]));
	dw_hermitian_op op = {m, NULL};
	dw_lanczos_spectrum s;
	dw_error e = {0};
	CHECK(dw_lanczos_spectrum_of(&op, &s, &e) == DW_OK, "random: %s", e.msg);
	printf("random Hermitian %d rows, shift %g: alpha %.15g (zheevd %.15g, rel %.3g), "
		"sigma_min %.15g (zheevd %.15g), %d + %d steps\n", n, diag_shift, s.alpha,
		norm, (s.alpha - norm) / norm, s.sigma_min, smin, s.plain.iterations,
		s.squared.iterations);
	CHECK(s.alpha >= norm && s.alpha <= norm * (1 + 1e-8), "alpha %.17g vs %.17g",
		s.alpha, norm);
	CHECK(s.definite == (w[0] > 0), "definiteness: lambda_min %.17g", w[0]);
	CHECK(s.sigma_min <= smin, "sigma_min %.17g never above %.17g", s.sigma_min, smin);
	if (w[0] > 0)
		CHECK(s.sigma_min >= 0.97 * smin, "sigma_min %.17g within 3%% of %.17g",
			s.sigma_min, smin);
	dw_csr_free(m);
	free(dense);
	free(w);
}

static void test_random_dilation(int n)
{
	double complex *dense = malloc((size_t)n * n * sizeof *dense);
	double *sv = malloc((size_t)n * sizeof *sv);
	dw_csr *a = random_sparse(n, 3, 4, false, dense);
	dw_csr *ah = adjoint(a, dense);
	CHECK(LAPACKE_zgesdd(LAPACK_COL_MAJOR, 'N', n, n, dense, n, sv, NULL, 1, NULL,
		1) == 0, "zgesdd");
	dw_hermitian_op op = {a, ah};
	dw_lanczos_spectrum s;
	dw_error e = {0};
	CHECK(dw_lanczos_spectrum_of(&op, &s, &e) == DW_OK, "dilation: %s", e.msg);
	printf("random non-Hermitian %d rows (dilation): alpha %.15g (zgesdd %.15g), "
		"sigma_min %.15g (zgesdd %.15g), %d + %d steps\n", n, s.alpha, sv[0],
		s.sigma_min, sv[n - 1], s.plain.iterations, s.squared.iterations);
	CHECK(s.alpha >= sv[0] && s.alpha <= sv[0] * (1 + 1e-8), "alpha %.17g vs %.17g",
		s.alpha, sv[0]);
	CHECK(!s.definite, "a dilation is indefinite");
	CHECK(s.sigma_min <= sv[n - 1], "sigma_min %.17g never above %.17g",
		s.sigma_min, sv[n - 1]);
	dw_csr_free(a);
	dw_csr_free(ah);
	free(dense);
	free(sv);
}

/* End to end through the front end: an invented scenario, a fictional
 * pipeline of 100,000 pressure nodes, tridiag(-1, 2.5, -1) written as a
 * symmetric Matrix Market file, analysed by dw_problem_analyse: Lanczos,
 * P, padded to 2^17 rows; kappa against the Laplacian closed form. */
static void test_pipeline_file(void)
{
	const int64_t n = 100000;
	char mtx[] = "/tmp/dwell-pipeline-XXXXXX";
	int fd = mkstemp(mtx);
	FILE *f = fd >= 0 ? fdopen(fd, "w") : NULL;
	CHECK(f != NULL, "temporary matrix file");
	if (!f)
		return;
	fprintf(f, "%%%%MatrixMarket matrix coordinate real symmetric\n"
		"%% invented: a fictional pipeline of 100000 pressure nodes\n"
		"%lld %lld %lld\n", (long long)n, (long long)n, (long long)(2 * n - 1));
	for (int64_t i = 1; i <= n; i++) {
		fprintf(f, "%lld %lld 2.5\n", (long long)i, (long long)i);
		if (i < n)
			fprintf(f, "%lld %lld -1\n", (long long)(i + 1), (long long)i);
	}
	fclose(f);
	char yaml[] = "/tmp/dwell-pipeline-yaml-XXXXXX";
	int yd = mkstemp(yaml);
	FILE *y = yd >= 0 ? fdopen(yd, "w") : NULL;
	CHECK(y != NULL, "temporary yaml");
	if (y) {
		fprintf(y, "# invented scenario: fictional pipeline\n"
			"matrix: {file: \"%s\"}\nrhs: {uniform: true}\n", mtx);
		fclose(y);
		dw_problem p;
		dw_error e = {0};
		int rc = dw_problem_load(yaml, NULL, 0, &p, &e);
		if (!rc)
			rc = dw_problem_analyse(&p, &e);
		CHECK(rc == DW_OK, "pipeline: %s", e.msg);
		if (!rc) {
			double lmax = lap_eig(n, 0.5, n), lmin = lap_eig(n, 0.5, 1);
			printf("pipeline file: kappa %.12g (%s, true %.12g), alpha %.12g, "
				"variant %c, n %d\n", p.kappa, p.kappa_source, lmax / lmin,
				p.alpha, p.variant, p.n);
			CHECK(!strcmp(p.kappa_source, "lanczos"), "source %s", p.kappa_source);
			CHECK(p.variant == 'P' && p.n == 17 && !p.dilated, "P, 17 qubits");
			CHECK(p.alpha >= lmax && p.kappa >= lmax / lmin
				&& p.kappa <= 1.03 * lmax / lmin, "kappa %.17g", p.kappa);
			dw_problem_free(&p);
		}
		remove(yaml);
	}
	remove(mtx);
}

int main(void)
{
	test_laplacian(5000, 0.5, 1e-7);
	test_laplacian(100000, 1.0, 1e-8);
	test_block_indefinite(5000, 0.5);   /* alpha_rtol 1e-7 as above */
	test_random_hermitian(1500, 0);
	test_random_hermitian(1500, 6);
	test_random_dilation(1200);
	test_pipeline_file();
	return check_done();
}
