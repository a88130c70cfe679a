/* test_spectrum.c - classical analysis (compiler/front/spectrum.c): the dense
 * Pauli sum against hand-built Kronecker products, eigenvalues, alpha,
 * sigma_min and kappa against closed forms, the variant, the dilation of a
 * non-Hermitian matrix and the padding to a power of two.  Matrix files are
 * the invented examples in tests/cases/front/; the test runs from the
 * project root. */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>
#include <string.h>

#include <lapacke.h>

#include "dwell/dwell.h"
#include "check.h"

#define CASES "tests/cases/front/"

/* The Pauli matrices, row-major [row][col] (common practice). */
static double complex pauli_matrix(char op, int row, int col)
{
	switch (op) {
	case 'I':
		return row == col;
	case 'X':
		return row != col;
	case 'Y':
		return row == col ? 0 : row == 0 ? -I : I;
	default: /* Z */
		return row == col ? (row == 0 ? 1 : -1) : 0;
	}
}

/* A problem holding one Pauli sum, built in memory (freed by dw_problem_free). */
static void make_pauli(dw_problem *p, int n, size_t nterms, const double *coeff,
	const char *const *ops)
{
	memset(p, 0, sizeof *p);
	p->matrix_kind = DW_MATRIX_PAULI;
	p->n = n;
	p->npauli = nterms;
	p->pauli = calloc(nterms, sizeof *p->pauli);
	for (size_t t = 0; t < nterms; t++) {
		p->pauli[t].coeff = coeff[t];
		p->pauli[t].ops = strdup(ops[t]);
	}
	p->path = strdup("in-memory.yaml");
	p->rhs_kind = DW_RHS_BASIS;
}

/* dw_pauli_dense against the Kronecker product built by hand: sys[0] is the
 * least significant bit of the index, so for "AB" the matrix is B (x) A. */
static void test_dense_kron(void)
{
	static const char letters[] = "IXYZ";
	for (int a = 0; a < 4; a++) {
		char ops[2] = {letters[a], 0};
		const char *o = ops;
		double c = 0.75;
		dw_problem p;
		make_pauli(&p, 1, 1, &c, &o);
		dw_error e = {0};
		double complex *m = dw_pauli_dense(&p, &e);
		CHECK(m != NULL, "dense %s: %s", ops, e.msg);
		for (int r = 0; m && r < 2; r++)
			for (int col = 0; col < 2; col++)
				CHECK(cabs(m[r + 2 * col] - c * pauli_matrix(ops[0], r, col)) == 0,
					"%s[%d][%d]", ops, r, col);
		free(m);
		dw_problem_free(&p);
	}
	for (int a = 0; a < 4; a++)
		for (int b = 0; b < 4; b++) {
			char ops[3] = {letters[a], letters[b], 0};
			const char *o = ops;
			double c = -1.5;
			dw_problem p;
			make_pauli(&p, 2, 1, &c, &o);
			dw_error e = {0};
			double complex *m = dw_pauli_dense(&p, &e);
			CHECK(m != NULL, "dense %s: %s", ops, e.msg);
			int bad = 0;
			for (int r = 0; m && r < 4; r++)
				for (int col = 0; col < 4; col++) {
					double complex want = c
						* pauli_matrix(ops[1], r >> 1, col >> 1)
						* pauli_matrix(ops[0], r & 1, col & 1);
					bad += cabs(m[r + 4 * col] - want) != 0;
				}
			CHECK(m && bad == 0, "%s: %d entries differ from kron(P[1], P[0])", ops, bad);
			free(m);
			dw_problem_free(&p);
		}
	/* a sum is the sum of its terms */
	const char *ops[] = {"XZ", "YI", "ZZ"};
	const double coeff[] = {0.5, -0.25, 2};
	dw_problem p;
	make_pauli(&p, 2, 3, coeff, ops);
	dw_error e = {0};
	double complex *m = dw_pauli_dense(&p, &e);
	double worst = 0;
	for (int r = 0; m && r < 4; r++)
		for (int col = 0; col < 4; col++) {
			double complex want = 0;
			for (int t = 0; t < 3; t++)
				want += coeff[t] * pauli_matrix(ops[t][1], r >> 1, col >> 1)
					* pauli_matrix(ops[t][0], r & 1, col & 1);
			worst = fmax(worst, cabs(m[r + 4 * col] - want));
		}
	CHECK(m && worst < 1e-15, "sum of terms: worst %g", worst);
	free(m);
	dw_problem_free(&p);
}

static int analyse_pauli(int n, size_t nterms, const double *coeff,
	const char *const *ops, double kappa_user, dw_problem *p, dw_error *e)
{
	make_pauli(p, n, nterms, coeff, ops);
	p->kappa_user = kappa_user;
	memset(e, 0, sizeof *e);
	return dw_problem_analyse(p, e);
}

static void test_pauli_spectra(void)
{
	dw_problem p;
	dw_error e;
	/* a Z + b X: eigenvalues +-sqrt(a^2 + b^2) (common practice) */
	const char *zx[] = {"Z", "X"};
	const double ab[] = {0.3, -0.4};
	int rc = analyse_pauli(1, 2, ab, zx, 0, &p, &e);
	CHECK(rc == DW_OK, "aZ+bX: %s", e.msg);
	CHECK_NEAR(p.lambda_max, 0.5, 1e-14, "aZ+bX lambda_max");
	CHECK_NEAR(p.lambda_min, -0.5, 1e-14, "aZ+bX lambda_min");
	CHECK_NEAR(p.alpha, 0.5, 1e-14, "alpha");
	CHECK_NEAR(p.sigma_min, 0.5, 1e-14, "sigma_min");
	CHECK_NEAR(p.kappa, 1, 1e-13, "kappa");
	CHECK(p.variant == 'I' && !strcmp(p.kappa_source, "lapacke-zheevd") && p.analysed,
		"variant %c source %s", p.variant, p.kappa_source);
	CHECK(p.nnz == 4, "nnz %lld", (long long)p.nnz);
	dw_problem_free(&p);

	/* c I + a Z + b X, c > r: eigenvalues c +- r, positive definite */
	const char *izx[] = {"I", "Z", "X"};
	const double cab[] = {2, 1.2, 0.5};   /* r = 1.3 */
	rc = analyse_pauli(1, 3, cab, izx, 0, &p, &e);
	CHECK(rc == DW_OK, "cI+aZ+bX: %s", e.msg);
	CHECK_NEAR(p.lambda_min, 0.7, 1e-14, "lambda_min = c - r");
	CHECK_NEAR(p.lambda_max, 3.3, 1e-14, "lambda_max = c + r");
	CHECK_NEAR(p.kappa, 3.3 / 0.7, 1e-12, "kappa = (c + r) / (c - r)");
	CHECK(p.variant == 'P', "positive definite -> P, got %c", p.variant);
	dw_problem_free(&p);

	/* 1.5 II + 0.5 ZZ + 0.25 XX: ZZ and XX commute; on the Bell basis they
	 * take the signs (+,+), (+,-), (-,+), (-,-) (common practice), so the
	 * eigenvalues are 1.5 +- 0.5 +- 0.25. */
	const char *bell[] = {"II", "ZZ", "XX"};
	const double bc[] = {1.5, 0.5, 0.25};
	rc = analyse_pauli(2, 3, bc, bell, 0, &p, &e);
	CHECK(rc == DW_OK, "Bell: %s", e.msg);
	CHECK_NEAR(p.alpha, 2.25, 1e-14, "Bell alpha");
	CHECK_NEAR(p.sigma_min, 0.75, 1e-14, "Bell sigma_min");
	CHECK_NEAR(p.kappa, 3, 1e-13, "Bell kappa");
	CHECK(p.variant == 'P', "Bell variant");
	dw_problem_free(&p);

	/* -2 ZY (indefinite): eigenvalues +-2; a trusted user bound is kept */
	const char *zy[] = {"ZY"};
	const double m2[] = {-2};
	rc = analyse_pauli(2, 1, m2, zy, 10, &p, &e);
	CHECK(rc == DW_OK, "ZY: %s", e.msg);
	CHECK_NEAR(p.alpha, 2, 1e-14, "ZY alpha");
	CHECK_NEAR(p.lambda_min, -2, 1e-14, "ZY lambda_min");
	CHECK(p.variant == 'I', "ZY variant");
	CHECK_NEAR(p.kappa, 10, 0, "user bound kept");
	CHECK(!strcmp(p.kappa_source, "user-bound"), "source %s", p.kappa_source);
	/* a second call changes nothing */
	CHECK(dw_problem_analyse(&p, &e) == DW_OK && p.n == 2 && p.kappa == 10, "idempotent");
	dw_problem_free(&p);

	/* singular: ZI + IZ has eigenvalues 2, 0, 0, -2 */
	const char *sing[] = {"ZI", "IZ"};
	const double ones[] = {1, 1};
	rc = analyse_pauli(2, 2, ones, sing, 0, &p, &e);
	CHECK(rc == DW_EINPUT && strstr(e.msg, "singular") && strstr(e.msg, "largest 2"),
		"singular refused with figures: %s", e.msg);
	dw_problem_free(&p);

	/* nearly singular: I - (1 - 1e-14) Z has sigma_min 1e-14, alpha ~ 2 */
	const char *iz[] = {"I", "Z"};
	const double near[] = {1, -(1 - 1e-14)};
	rc = analyse_pauli(1, 2, near, iz, 0, &p, &e);
	CHECK(rc == DW_EINPUT && strstr(e.msg, "singular"), "kappa ~ 2e14 refused: %s", e.msg);
	dw_problem_free(&p);

	/* a user bound above 1e12 is refused */
	rc = analyse_pauli(1, 2, cab, izx, 1e13, &p, &e);
	CHECK(rc == DW_EINPUT && strstr(e.msg, "schedule.kappa") && strstr(e.msg, "1e+13"),
		"user bound 1e13: %s", e.msg);
	dw_problem_free(&p);

	/* dense analysis stops at 12 qubits */
	const char *big[] = {"ZZZZZZZZZZZZZ"};
	rc = analyse_pauli(13, 1, ones, big, 0, &p, &e);
	CHECK(rc == DW_EINPUT && strstr(e.msg, "limited to 12 qubits"), "13 qubits: %s", e.msg);
	dw_problem_free(&p);
}

/* Dense column-major copy of a CSR matrix. */
static double complex *csr_dense(const dw_csr *m)
{
	double complex *d = calloc((size_t)(m->rows * m->cols), sizeof *d);
	for (int64_t r = 0; r < m->rows; r++)
		for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++)
			d[r + m->col[k] * m->rows] += m->val[k];
	return d;
}

/* Ascending eigenvalues of a stored Hermitian matrix, by LAPACKE here in the
 * test (independent of the code under test's bookkeeping). */
static double *stored_eigenvalues(const dw_csr *m)
{
	double complex *d = csr_dense(m);
	double *w = calloc((size_t)m->rows, sizeof *w);
	int info = LAPACKE_zheevd(LAPACK_COL_MAJOR, 'N', 'U', (int)m->rows, d,
		(int)m->rows, w);
	CHECK(info == 0, "zheevd info %d", info);
	free(d);
	return w;
}

static double hermitian_defect(const dw_csr *m)
{
	double complex *d = csr_dense(m);
	double worst = 0;
	for (int64_t i = 0; i < m->rows; i++)
		for (int64_t j = 0; j < m->rows; j++)
			worst = fmax(worst, cabs(d[i + j * m->rows] - conj(d[j + i * m->rows])));
	free(d);
	return worst;
}

static void test_file_matrices(void)
{
	dw_problem p;
	dw_error e = {0};
	/* Padding: tridiag(-1, 2, -1) of order 3 has eigenvalues
	 * 2 - 2 cos(k pi / 4), k = 1..3 (common practice) = 2 - sqrt 2, 2, 2 + sqrt 2.
	 * Padded to 4 with alpha = 2 + sqrt 2 on the new diagonal. */
	int rc = dw_problem_load(CASES "good_file.yaml", NULL, 0, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	CHECK(rc == DW_OK, "good_file: %s", e.msg);
	if (!rc) {
		double s2 = sqrt(2.0);
		CHECK_NEAR(p.alpha, 2 + s2, 1e-13, "alpha");
		CHECK_NEAR(p.sigma_min, 2 - s2, 1e-13, "sigma_min");
		CHECK_NEAR(p.kappa, 3 + 2 * s2, 1e-12, "kappa = (2+r2)/(2-r2) = 3+2 r2");
		CHECK_NEAR(p.lambda_min, 2 - s2, 1e-13, "lambda_min");
		CHECK_NEAR(p.lambda_max, 2 + s2, 1e-13, "lambda_max");
		CHECK(p.variant == 'P' && !p.dilated && p.n == 2, "P, not dilated, n 2");
		CHECK(p.matrix->rows == 4 && p.nnz == 8 && p.matrix->nnz == 8, "4x4, 8 entries");
		double complex *d = csr_dense(p.matrix);
		CHECK_NEAR(creal(d[3 + 3 * 4]), 2 + s2, 1e-13, "padding block = alpha");
		CHECK(d[3 + 0 * 4] == 0 && d[0 + 3 * 4] == 0 && d[3 + 2 * 4] == 0,
			"padding decoupled");
		CHECK(d[1 + 0 * 4] == -1 && d[1 + 1 * 4] == 2, "entries kept");
		free(d);
		double *w = stored_eigenvalues(p.matrix);
		CHECK_NEAR(w[0], 2 - s2, 1e-13, "padded spectrum 0");
		CHECK_NEAR(w[1], 2, 1e-13, "padded spectrum 1");
		CHECK_NEAR(w[2], 2 + s2, 1e-13, "padded spectrum 2");
		CHECK_NEAR(w[3], 2 + s2, 1e-13, "padded spectrum 3 (the padding)");
		free(w);
		CHECK(cabs(p.amps[3]) == 0, "rhs zero on the padding");
	}
	dw_problem_free(&p);

	/* Complex Hermitian [[a, b], [conj b, d]] has eigenvalues
	 * (a+d)/2 +- sqrt(((a-d)/2)^2 + |b|^2) (common practice): a = 2, d = 3,
	 * b = 1 - i give 2.5 +- 1.5, so 1 and 4. */
	memset(&e, 0, sizeof e);
	rc = dw_problem_load(CASES "good_herm2.yaml", NULL, 0, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	CHECK(rc == DW_OK, "good_herm2: %s", e.msg);
	if (!rc) {
		CHECK(!p.dilated && p.n == 1 && p.variant == 'P', "Hermitian, n 1, P");
		CHECK_NEAR(p.lambda_min, 1, 1e-14, "lambda_min");
		CHECK_NEAR(p.lambda_max, 4, 1e-14, "lambda_max");
		CHECK_NEAR(p.kappa, 4, 1e-13, "kappa");
		CHECK(p.matrix->is_complex && p.nnz == 4, "complex, 4 entries");
		double complex *d = csr_dense(p.matrix);
		CHECK(d[0 + 1 * 2] == 1 - I && d[1 + 0 * 2] == 1 + I, "off-diagonal kept");
		free(d);
	}
	dw_problem_free(&p);

	/* Dilation: A = [[1, 2], [0, 3]].  A^T A = [[1, 2], [2, 13]] has
	 * eigenvalues 7 +- 2 sqrt 10, so sigma = sqrt(7 +- 2 sqrt 10) (singular
	 * values as square roots of the eigenvalues of A^T A: common practice);
	 * the dilation has eigenvalues +-sigma. */
	memset(&e, 0, sizeof e);
	rc = dw_problem_load(CASES "good_nonherm.yaml", NULL, 0, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	CHECK(rc == DW_OK, "good_nonherm: %s", e.msg);
	if (!rc) {
		double s1 = sqrt(7 + 2 * sqrt(10.0)), s2 = sqrt(7 - 2 * sqrt(10.0));
		CHECK(p.dilated && p.n == 2 && p.variant == 'I', "dilated, n %d", p.n);
		CHECK(!strcmp(p.kappa_source, "lapacke-zgesdd"), "source %s", p.kappa_source);
		CHECK_NEAR(p.alpha, s1, 1e-13, "alpha = sigma_max");
		CHECK_NEAR(p.sigma_min, s2, 1e-13, "sigma_min");
		CHECK_NEAR(p.sigma_min * p.alpha, 3, 1e-13, "product of singular values = |det A|");
		CHECK_NEAR(p.lambda_min, -s1, 1e-13, "lambda_min");
		CHECK(hermitian_defect(p.matrix) == 0, "dilation is Hermitian");
		double complex *d = csr_dense(p.matrix);
		CHECK(d[0 + 2 * 4] == 1 && d[0 + 3 * 4] == 2 && d[1 + 3 * 4] == 3
			&& d[1 + 2 * 4] == 0, "upper-right block is A");
		CHECK(d[0] == 0 && d[1 + 1 * 4] == 0 && d[2 + 2 * 4] == 0, "diagonal blocks zero");
		free(d);
		double *w = stored_eigenvalues(p.matrix);
		CHECK_NEAR(w[0], -s1, 1e-13, "eig 0");
		CHECK_NEAR(w[1], -s2, 1e-13, "eig 1");
		CHECK_NEAR(w[2], s2, 1e-13, "eig 2");
		CHECK_NEAR(w[3], s1, 1e-13, "eig 3");
		free(w);
		/* rhs |0>|b>, b = (3, 4)/5 */
		CHECK_NEAR(creal(p.amps[0]), 0.6, 1e-15, "rhs 0");
		CHECK_NEAR(creal(p.amps[1]), 0.8, 1e-15, "rhs 1");
		CHECK(p.amps[2] == 0 && p.amps[3] == 0, "rhs second half zero");
	}
	dw_problem_free(&p);

	/* Dilation and padding: A e1 = e2, A e2 = 2 e3, A e3 = 3 e1 has
	 * A^T A = diag(1, 4, 9), singular values 1, 2, 3.  Padded to 4 (alpha
	 * = 3 on the padding), dilated to 8: eigenvalues +-1, +-2, +-3, +-3. */
	memset(&e, 0, sizeof e);
	rc = dw_problem_load(CASES "good_nonherm3.yaml", NULL, 0, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	CHECK(rc == DW_OK, "good_nonherm3: %s", e.msg);
	if (!rc) {
		CHECK(p.dilated && p.n == 3 && p.matrix->rows == 8, "n %d rows %lld", p.n,
			(long long)p.matrix->rows);
		CHECK_NEAR(p.alpha, 3, 1e-14, "alpha");
		CHECK_NEAR(p.sigma_min, 1, 1e-14, "sigma_min");
		CHECK_NEAR(p.kappa, 3, 1e-13, "kappa");
		CHECK(hermitian_defect(p.matrix) == 0, "Hermitian");
		double *w = stored_eigenvalues(p.matrix);
		static const double want[8] = {-3, -3, -2, -1, 1, 2, 3, 3};
		for (int i = 0; i < 8; i++)
			CHECK_NEAR(w[i], want[i], 1e-13, "dilated padded spectrum");
		free(w);
		/* uniform over the 3 real rows, zero on padding and second half */
		CHECK(p.rhs_kind == DW_RHS_AMPLITUDES, "uniform made explicit");
		for (int i = 0; i < 8; i++)
			CHECK_NEAR(creal(p.amps[i]), i < 3 ? 1 / sqrt(3.0) : 0, 1e-15, "rhs entry");
	}
	dw_problem_free(&p);

	/* product rhs cannot be padded */
	const char *prod[] = {"rhs.product=[[1, 0], [1, 0]]"};
	memset(&e, 0, sizeof e);
	rc = dw_problem_load(CASES "good_file.yaml", prod, 1, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	CHECK(rc == DW_EINPUT && strstr(e.msg, "rhs.product: the matrix has 3 rows, padded to 4"),
		"product with padding: %s", e.msg);
	dw_problem_free(&p);

	/* a product rhs on a dilated 2x2 gains |0> (theta 0) on the top qubit */
	const char *prod1[] = {"rhs.product=[[0.5, 0.25]]"};
	memset(&e, 0, sizeof e);
	rc = dw_problem_load(CASES "good_nonherm.yaml", prod1, 1, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	CHECK(rc == DW_OK && p.nproduct == 2 && p.product[0][0] == 0.5
		&& p.product[0][1] == 0.25 && p.product[1][0] == 0 && p.product[1][1] == 0,
		"product extended: %s", e.msg);
	dw_problem_free(&p);

	/* beyond 4096 rows Lanczos (lanczos.c) takes over: a 4097 x 4097
	 * identity in a temporary file has every eigenvalue 1 (common practice) */
	char mtx[] = "/tmp/dwell-big-XXXXXX";
	int fd = mkstemp(mtx);
	FILE *f = fd >= 0 ? fdopen(fd, "w") : NULL;
	CHECK(f != NULL, "temporary file");
	if (f) {
		fprintf(f, "%%%%MatrixMarket matrix coordinate real general\n4097 4097 4097\n");
		for (int i = 1; i <= 4097; i++)
			fprintf(f, "%d %d 1\n", i, i);
		fclose(f);
		char yaml[] = "/tmp/dwell-big-yaml-XXXXXX";
		int yd = mkstemp(yaml);
		FILE *y = yd >= 0 ? fdopen(yd, "w") : NULL;
		CHECK(y != NULL, "temporary yaml");
		if (y) {
			fprintf(y, "matrix: {file: \"%s\"}\nrhs: {basis: 0}\n", mtx);
			fclose(y);
			memset(&e, 0, sizeof e);
			rc = dw_problem_load(yaml, NULL, 0, &p, &e);
			if (!rc)
				rc = dw_problem_analyse(&p, &e);
			CHECK(rc == DW_OK && !strcmp(p.kappa_source, "lanczos")
				&& fabs(p.alpha - 1) <= 1e-12 && fabs(p.kappa - 1) <= 1e-12
				&& p.variant == 'P' && p.n == 13,
				"4097 rows by Lanczos: %s (alpha %.17g kappa %.17g)", e.msg,
				p.alpha, p.kappa);
			dw_problem_free(&p);
			remove(yaml);
		}
		remove(mtx);
	}

	/* stencils: closed forms (tests/unit/test_stencil.c has the rest); the
	 * 16 x 8 case, periodic x Dirichlet, has eigenvalues
	 * 4 - 2 cos(2 pi j/16) - 2 cos(k pi/9) (circulant and sine modes,
	 * "Iterative methods for sparse linear systems", SIAM 2003) */
	memset(&e, 0, sizeof e);
	rc = dw_problem_load(CASES "good_stencil.yaml", NULL, 0, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	CHECK(rc == DW_OK && !strcmp(p.kappa_source, "closed-form-sine-fourier"),
		"stencil: %s %s", e.msg, p.kappa_source);
	CHECK_NEAR(p.lambda_min, 2 - 2 * cos(M_PI / 9), 1e-12, "stencil lambda_min");
	CHECK_NEAR(p.lambda_max, 6 + 2 * cos(M_PI / 9), 1e-12, "stencil lambda_max");
	dw_problem_free(&p);
}

int main(void)
{
	test_dense_kron();
	test_pauli_spectra();
	test_file_matrices();
	return check_done();
}
