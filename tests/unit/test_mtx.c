/* test_mtx.c - the Matrix Market reader (compiler/front/mtx.c).
 *
 * Checks, against the format's definition in "The Matrix Market Exchange
 * Formats: Initial Design", NIST Interagency Report 5935 (1996):
 *  - every valid banner combination in tests/cases/mtx/good parses into the
 *    dense matrix written beside it here, worked out by hand from the file
 *    (1-based indices, column-major arrays, lower triangle mirrored as
 *    a_ji = a_ij / -a_ij / conj(a_ij) for symmetric / skew / hermitian);
 *  - the CSR invariants (rows sorted by column, no repeats, rowptr
 *    monotone) and the is_complex flag;
 *  - repeats summed, with exactly one notice line;
 *  - every file in tests/cases/mtx/bad gives DW_EINPUT and the exact
 *    message listed in tests/cases/mtx/bad/EXPECTED;
 *  - randomly generated matrices written in each storage scheme by an
 *    independent writer here read back to the matrix they were made from.
 * Run from the source root (meson sets workdir). */
#include <complex.h>
#include <dirent.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include "dwell/mtx.h"
#include "check.h"

#define GOOD_DIR "tests/cases/mtx/good"
#define BAD_DIR "tests/cases/mtx/bad"
#define MAX_DIM 5

/* A good file and its matrix, row-major, worked out by hand from the file. */
typedef struct good_case {
	const char *name;
	int n;                         /* rows = cols */
	double re[MAX_DIM * MAX_DIM];
	double im[MAX_DIM * MAX_DIM];
	int64_t nnz;                   /* stored entries after mirroring/summing */
	int64_t repeats;               /* expected in the notice, 0 = no notice */
} good_case;

static const good_case good_cases[] = {
	{"coordinate-real-general", 3, {4, 0, 7, -2, 0, 0.25, 0, -1.5, 0}, {0}, 5, 0},
	{"coordinate-real-symmetric", 3, {2, -1, 0, -1, 0, -1, 0, -1, 2}, {0}, 6, 0},
	{"coordinate-real-skew-symmetric", 3, {0, -1.5, 2, 1.5, 0, 0, -2, 0, 0}, {0}, 4, 0},
	{"coordinate-integer-general", 3, {0, 5, 0, 12, 0, 0, 0, 0, -4}, {0}, 3, 0},
	{"coordinate-integer-symmetric", 3, {1, 0, 9, 0, -3, 0, 9, 0, 0}, {0}, 4, 0},
	{"coordinate-integer-skew-symmetric", 3, {0, 6, 0, -6, 0, -4, 0, 4, 0}, {0}, 4, 0},
	{"coordinate-complex-general", 2, {1, 3.5, 0, 0}, {2, 0, -1, 0}, 3, 0},
	{"coordinate-complex-symmetric", 2, {1, 2, 2, 0}, {1, -3, -3, 0}, 3, 0},
	{"coordinate-complex-skew-symmetric", 3, {0, -1, 0, 1, 0, 0, 0, 0, 0},
		{0, -1, 0, 1, 0, -2, 0, 2, 0}, 4, 0},
	{"coordinate-complex-hermitian", 3, {2, 1, 0, 1, 3, 0, 0, 0, 0},
		{0, 1, -4, -1, 0, 0, 4, 0, 0}, 6, 0},
	{"coordinate-pattern-general", 3, {0, 0, 1, 0, 1, 0, 1, 0, 0}, {0}, 3, 0},
	{"coordinate-pattern-symmetric", 3, {1, 0, 1, 0, 0, 1, 1, 1, 0}, {0}, 5, 0},
	{"array-real-general", 3, {1, -4, 0, 2, 5.5, 0, 0, 0, 9}, {0}, 5, 0},
	{"array-real-symmetric", 3, {4, -1, 0, -1, 4, -1, 0, -1, 4}, {0}, 7, 0},
	{"array-real-skew-symmetric", 3, {0, -1, -2, 1, 0, -3, 2, 3, 0}, {0}, 6, 0},
	{"array-integer-general", 2, {3, 0, -1, 7}, {0}, 3, 0},
	{"array-integer-symmetric", 2, {5, 6, 6, -7}, {0}, 4, 0},
	{"array-integer-skew-symmetric", 3, {0, 2, 0, -2, 0, -8, 0, 8, 0}, {0}, 4, 0},
	{"array-complex-general", 2, {1, 2, 0, 0}, {0, -2, 1, 0}, 3, 0},
	{"array-complex-symmetric", 2, {1, 0, 0, 2}, {1, -3, -3, 0}, 4, 0},
	{"array-complex-skew-symmetric", 2, {0, -1.5, 1.5, 0}, {0, 0.5, -0.5, 0}, 2, 0},
	{"array-complex-hermitian", 3, {1, 2, 0, 2, 5, 0, 0, 0, -1},
		{0, -1, 0, 1, 0, 3, 0, -3, 0}, 7, 0},
	{"layout-comments-blanks", 2, {1.25, 0, 0.5, -3}, {0}, 3, 0},
	{"layout-comment-after-blank", 2, {0, -6, 0, 0}, {0}, 1, 0},
	{"layout-banner-case", 2, {1, 2, 2, 0}, {0}, 3, 0},
	{"layout-banner-all-lowercase", 2, {0, 0, 0, 8}, {0}, 1, 0},
	{"layout-crlf", 2, {0, 3, 4, 0}, {0}, 2, 0},
	{"layout-no-final-newline", 2, {1, 3, 2, 4}, {0}, 4, 0},
	{"layout-indented-comment", 2, {1, 2, 2, 3}, {0}, 4, 0},
	{"layout-number-forms", 3, {1e-310, -0.0, 0, 1.5e3, 0.5, 0, -7e-2, 0, 5}, {0}, 6, 0},
	{"layout-one-by-one", 1, {-2.5}, {0}, 1, 0},
	{"layout-no-entries", 3, {0}, {0}, 0, 0},
	{"layout-explicit-zero", 2, {0, 0, 0, 3}, {0}, 2, 0},
	/* 1 + 0.5 at (1,1); 2 + (-2) at (2,1): the zero sum stays an entry. */
	{"repeats-general", 2, {1.5, 0, 0, 0}, {0}, 2, 2},
	/* (2,1) 1 + 2 = 3, mirrored; (3,3) 1 + 1 = 2. */
	{"repeats-symmetric", 3, {0, 3, 0, 3, 0, 0, 0, 0, 2}, {0}, 3, 2},
	/* (2,1) (1+i) + i = 1+2i, mirrored as 1-2i at (1,2). */
	{"repeats-hermitian", 2, {4, 1, 1, 0}, {0, -2, 2, 0}, 3, 1},
};

typedef struct vector_case {
	const char *name;
	int len;
	double re[MAX_DIM];
	double im[MAX_DIM];
	int64_t repeats;
} vector_case;

static const vector_case vector_cases[] = {
	{"vector-array-real", 4, {1, -2, 0, 3.5}, {0}, 0},
	{"vector-array-integer", 3, {7, 0, -1}, {0}, 0},
	{"vector-array-complex", 3, {1, 0, -2}, {1, 0, 0.5}, 0},
	{"vector-coordinate-real", 5, {-1, 0, 0, 2.5, 0}, {0}, 0},
	{"vector-coordinate-complex", 3, {2, 0, 0}, {0, 0, 1}, 0},
	{"vector-coordinate-repeats", 3, {0, 5, -1}, {0}, 1},
};

/* Rows sorted by strictly increasing column, indices in range. */
static void check_csr_shape(const dw_csr *m, const char *name)
{
	CHECK(m->rowptr[0] == 0, "%s: rowptr[0] = %lld", name, (long long)m->rowptr[0]);
	CHECK(m->rowptr[m->rows] == m->nnz, "%s: rowptr end %lld vs nnz %lld", name,
		(long long)m->rowptr[m->rows], (long long)m->nnz);
	for (int64_t r = 0; r < m->rows; r++) {
		CHECK(m->rowptr[r] <= m->rowptr[r + 1], "%s: rowptr not monotone at %lld",
			name, (long long)r);
		for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++) {
			CHECK(m->col[k] >= 0 && m->col[k] < m->cols, "%s: column %lld out of range",
				name, (long long)m->col[k]);
			if (k > m->rowptr[r])
				CHECK(m->col[k - 1] < m->col[k], "%s: row %lld not strictly sorted",
					name, (long long)r);
		}
	}
}

/* Dense row-major copy of a CSR matrix (n x n). */
static double complex *dense_of(const dw_csr *m)
{
	double complex *d = calloc((size_t)(m->rows * m->cols), sizeof *d);
	for (int64_t r = 0; r < m->rows; r++)
		for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++)
			d[r * m->cols + m->col[k]] = m->val[k];
	return d;
}

static char *read_stream(FILE *f)
{
	fflush(f);
	long size = ftell(f);
	char *text = calloc((size_t)size + 1, 1);
	rewind(f);
	size_t got = fread(text, 1, (size_t)size, f);
	text[got] = '\0';
	return text;
}

static void expect_notice(FILE *notes, const char *path, int64_t repeats)
{
	char *text = read_stream(notes);
	if (repeats == 0) {
		CHECK(text[0] == '\0', "%s: unexpected notice '%s'", path, text);
	} else {
		char want[512];
		snprintf(want, sizeof want, "%s: %lld repeated position%s: values at the "
			"same row and column were added together\n", path, (long long)repeats,
			repeats == 1 ? "" : "s");
		CHECK(!strcmp(text, want), "%s: notice '%s', expected '%s'", path, text, want);
	}
	free(text);
}

static void test_good_matrices(void)
{
	for (size_t c = 0; c < sizeof good_cases / sizeof good_cases[0]; c++) {
		const good_case *g = &good_cases[c];
		char path[256];
		snprintf(path, sizeof path, "%s/%s.mtx", GOOD_DIR, g->name);
		FILE *notes = tmpfile();
		dw_csr *m = NULL;
		dw_error err = {0};
		int st = dw_mtx_read_matrix(path, notes, &m, &err);
		CHECK(st == DW_OK, "%s: status %d: %s", path, st, err.msg);
		if (st != DW_OK) {
			fclose(notes);
			continue;
		}
		CHECK(m->rows == g->n && m->cols == g->n, "%s: %lld x %lld, expected %d x %d",
			path, (long long)m->rows, (long long)m->cols, g->n, g->n);
		CHECK(m->nnz == g->nnz, "%s: nnz %lld, expected %lld", path,
			(long long)m->nnz, (long long)g->nnz);
		check_csr_shape(m, path);
		double complex *d = dense_of(m);
		bool any_imag = false;
		for (int k = 0; k < g->n * g->n; k++) {
			CHECK(creal(d[k]) == g->re[k] && cimag(d[k]) == g->im[k],
				"%s: entry (%d, %d) is %g%+gi, expected %g%+gi", path,
				k / g->n + 1, k % g->n + 1, creal(d[k]), cimag(d[k]),
				g->re[k], g->im[k]);
			any_imag |= g->im[k] != 0.0;
		}
		CHECK(m->is_complex == any_imag, "%s: is_complex %d", path, m->is_complex);
		expect_notice(notes, path, g->repeats);
		fclose(notes);
		free(d);
		dw_csr_free(m);
	}
}

static void test_good_vectors(void)
{
	for (size_t c = 0; c < sizeof vector_cases / sizeof vector_cases[0]; c++) {
		const vector_case *g = &vector_cases[c];
		char path[256];
		snprintf(path, sizeof path, "%s/%s.mtx", GOOD_DIR, g->name);
		FILE *notes = tmpfile();
		double complex *v = NULL;
		int64_t len = -1;
		dw_error err = {0};
		int st = dw_mtx_read_vector_noting(path, notes, &v, &len, &err);
		CHECK(st == DW_OK, "%s: status %d: %s", path, st, err.msg);
		if (st == DW_OK) {
			CHECK(len == g->len, "%s: length %lld, expected %d", path, (long long)len, g->len);
			for (int k = 0; k < g->len && k < len; k++)
				CHECK(creal(v[k]) == g->re[k] && cimag(v[k]) == g->im[k],
					"%s: entry %d is %g%+gi, expected %g%+gi", path, k + 1,
					creal(v[k]), cimag(v[k]), g->re[k], g->im[k]);
			expect_notice(notes, path, g->repeats);
		}
		free(v);
		fclose(notes);
		/* The plain entry point agrees (no notices). */
		double complex *w = NULL;
		int64_t wlen = -1;
		dw_error err2 = {0};
		CHECK(dw_mtx_read_vector(path, &w, &wlen, &err2) == DW_OK && wlen == g->len,
			"%s: dw_mtx_read_vector: %s", path, err2.msg);
		free(w);
	}
}

/* Every file in a corpus folder must be covered by the test. */
static void check_corpus_listed(const char *dir, bool (*listed)(const char *name))
{
	DIR *d = opendir(dir);
	CHECK(d != NULL, "cannot open %s", dir);
	if (!d)
		return;
	struct dirent *e;
	int files = 0;
	while ((e = readdir(d))) {
		size_t len = strlen(e->d_name);
		if (len < 5 || strcmp(e->d_name + len - 4, ".mtx"))
			continue;
		files++;
		CHECK(listed(e->d_name), "%s/%s is not covered by test_mtx", dir, e->d_name);
	}
	CHECK(files > 0, "no .mtx files in %s", dir);
	closedir(d);
}

static bool good_listed(const char *file)
{
	size_t len = strlen(file) - 4;
	for (size_t c = 0; c < sizeof good_cases / sizeof good_cases[0]; c++)
		if (strlen(good_cases[c].name) == len && !strncmp(good_cases[c].name, file, len))
			return true;
	for (size_t c = 0; c < sizeof vector_cases / sizeof vector_cases[0]; c++)
		if (strlen(vector_cases[c].name) == len && !strncmp(vector_cases[c].name, file, len))
			return true;
	return false;
}

static char bad_names[256][96];
static int bad_count;

static bool bad_listed(const char *file)
{
	for (int k = 0; k < bad_count; k++)
		if (!strcmp(bad_names[k], file))
			return true;
	return false;
}

static void test_bad_corpus(void)
{
	FILE *list = fopen(BAD_DIR "/EXPECTED", "r");
	CHECK(list != NULL, "cannot open %s/EXPECTED", BAD_DIR);
	if (!list)
		return;
	char line[1024];
	while (fgets(line, sizeof line, list)) {
		line[strcspn(line, "\n")] = '\0';
		if (line[0] == '#' || line[0] == '\0')
			continue;
		char mode[16], *rest = strchr(line, ' ');
		CHECK(rest != NULL, "EXPECTED: bad line '%s'", line);
		if (!rest)
			continue;
		snprintf(mode, sizeof mode, "%.*s", (int)(rest - line), line);
		rest++;
		size_t name_len = strcspn(rest, ":");
		char path[256], want[1100];
		snprintf(path, sizeof path, "%s/%.*s", BAD_DIR, (int)name_len, rest);
		snprintf(want, sizeof want, "%s/%s", BAD_DIR, rest);
		if (bad_count < 256)
			snprintf(bad_names[bad_count++], sizeof bad_names[0], "%.*s",
				(int)name_len, rest);
		dw_error err = {0};
		int st;
		if (!strcmp(mode, "vector")) {
			double complex *v = NULL;
			int64_t len = 0;
			st = dw_mtx_read_vector(path, &v, &len, &err);
			CHECK(v == NULL && len == 0, "%s: output left set on error", path);
			free(v);
		} else {
			dw_csr *m = NULL;
			st = dw_mtx_read_matrix(path, NULL, &m, &err);
			CHECK(m == NULL, "%s: matrix left set on error", path);
			dw_csr_free(m);
		}
		CHECK(st == DW_EINPUT && err.status == DW_EINPUT, "%s: status %d", path, st);
		CHECK(!strcmp(err.msg, want), "%s:\n   got      '%s'\n   expected '%s'",
			path, err.msg, want);
	}
	fclose(list);
}

static void test_missing_file(void)
{
	dw_csr *m = NULL;
	dw_error err = {0};
	const char *path = "tests/cases/mtx/no-such-file.mtx";
	int st = dw_mtx_read_matrix(path, NULL, &m, &err);
	CHECK(st == DW_EINPUT && m == NULL, "missing file: status %d", st);
	CHECK(!strncmp(err.msg, "tests/cases/mtx/no-such-file.mtx: cannot open: ",
		strlen(path) + 15), "missing file: '%s'", err.msg);
}

/* ---- generated matrices ----------------------------------------------------
 * A small deterministic generator (64-bit LCG, constants of Knuth's MMIX,
 * common practice) makes a matrix with a chosen structure; the writer below
 * stores it in the chosen scheme with entries shuffled and some split into
 * repeats, and the reader must give back exactly the matrix made. */

static uint64_t lcg_state;

static uint64_t lcg_next(void)
{
	lcg_state = lcg_state * 6364136223846793005ULL + 1442695040888963407ULL;
	return lcg_state >> 11;
}

static double lcg_value(void)
{
	/* Multiples of 1/8 in [-4, 4): exact in binary, so sums are exact. */
	return (double)(int64_t)(lcg_next() % 64) / 8.0 - 4.0;
}

typedef struct gen_entry {
	int64_t i, j;
	double re, im;
} gen_entry;

/* symmetry: 0 general, 1 symmetric, 2 skew, 3 hermitian. */
static double complex *make_matrix(int n, int symmetry, bool complex_values, double fill)
{
	double complex *a = calloc((size_t)(n * n), sizeof *a);
	for (int j = 0; j < n; j++)
		for (int i = 0; i < n; i++) {
			if (symmetry != 0 && i < j)
				continue;
			if ((double)(lcg_next() % 1000) >= fill * 1000)
				continue;
			double re = lcg_value(), im = complex_values ? lcg_value() : 0.0;
			if (symmetry == 2 && i == j)
				continue;
			if (symmetry == 3 && i == j)
				im = 0.0;
			double complex v = CMPLX(re, im);
			a[i * n + j] = v;
			if (i != j && symmetry == 1)
				a[j * n + i] = v;
			if (i != j && symmetry == 2)
				a[j * n + i] = -v;
			if (i != j && symmetry == 3)
				a[j * n + i] = conj(v);
		}
	return a;
}

static const char *const symmetry_words[] = {"general", "symmetric", "skew-symmetric", "hermitian"};

static void write_coordinate(FILE *f, const double complex *a, int n, int symmetry,
	bool complex_values)
{
	gen_entry *list = malloc(sizeof *list * (size_t)(2 * n * n + 1));
	int64_t count = 0;
	for (int i = 0; i < n; i++)
		for (int j = 0; j < n; j++) {
			if (symmetry != 0 && i < j)
				continue;
			double complex v = a[i * n + j];
			if (v == 0.0)
				continue;
			if (lcg_next() % 4 == 0) {
				/* split into two repeats: v = h + (v - h) */
				double complex h = CMPLX(0.5, symmetry == 3 && i == j ? 0.0 : 0.25);
				if (!complex_values)
					h = 0.5;
				list[count++] = (gen_entry){i, j, creal(h), cimag(h)};
				v -= h;
			}
			list[count++] = (gen_entry){i, j, creal(v), cimag(v)};
		}
	for (int64_t k = count - 1; k > 0; k--) {
		int64_t s = (int64_t)(lcg_next() % (uint64_t)(k + 1));
		gen_entry t = list[k];
		list[k] = list[s];
		list[s] = t;
	}
	fprintf(f, "%%%%MatrixMarket matrix coordinate %s %s\n%% generated (invented)\n%d %d %lld\n",
		complex_values ? "complex" : "real", symmetry_words[symmetry], n, n,
		(long long)count);
	for (int64_t k = 0; k < count; k++) {
		if (complex_values)
			fprintf(f, "%lld %lld %.17g %.17g\n", (long long)list[k].i + 1,
				(long long)list[k].j + 1, list[k].re, list[k].im);
		else
			fprintf(f, "%lld %lld %.17g\n", (long long)list[k].i + 1,
				(long long)list[k].j + 1, list[k].re);
	}
	free(list);
}

static void write_array(FILE *f, const double complex *a, int n, int symmetry,
	bool complex_values)
{
	fprintf(f, "%%%%MatrixMarket matrix array %s %s\n%d %d\n",
		complex_values ? "complex" : "real", symmetry_words[symmetry], n, n);
	for (int j = 0; j < n; j++) {
		int first = symmetry == 0 ? 0 : symmetry == 2 ? j + 1 : j;
		for (int i = first; i < n; i++) {
			double complex v = a[i * n + j];
			if (complex_values)
				fprintf(f, "%.17g %.17g\n", creal(v), cimag(v));
			else
				fprintf(f, "%.17g\n", creal(v));
		}
	}
}

static void test_generated(void)
{
	char path[] = "/tmp/dwell-test-mtx-XXXXXX";
	int fd = mkstemp(path);
	CHECK(fd >= 0, "mkstemp failed");
	if (fd < 0)
		return;
	close(fd);
	lcg_state = 20261201;
	int cases = 0;
	for (int round = 0; round < 12; round++)
		for (int symmetry = 0; symmetry < 4; symmetry++)
			for (int array = 0; array < 2; array++)
				for (int cplx = 0; cplx < 2; cplx++) {
					if (symmetry == 3 && !cplx)
						continue;
					int n = 1 + (int)(lcg_next() % 40);
					double fill = round % 3 == 0 ? 0.9 : 0.2;
					double complex *a = make_matrix(n, symmetry, cplx, fill);
					FILE *f = fopen(path, "w");
					if (array)
						write_array(f, a, n, symmetry, cplx);
					else
						write_coordinate(f, a, n, symmetry, cplx);
					fclose(f);
					dw_csr *m = NULL;
					dw_error err = {0};
					int st = dw_mtx_read_matrix(path, NULL, &m, &err);
					CHECK(st == DW_OK, "generated %s %s n=%d: %s", array ? "array" : "coordinate",
						symmetry_words[symmetry], n, err.msg);
					if (st == DW_OK) {
						check_csr_shape(m, "generated");
						double complex *d = dense_of(m);
						int wrong = 0;
						for (int k = 0; k < n * n; k++)
							wrong += d[k] != a[k];
						CHECK(wrong == 0, "generated %s %s %s n=%d: %d entries differ",
							array ? "array" : "coordinate", cplx ? "complex" : "real",
							symmetry_words[symmetry], n, wrong);
						free(d);
						dw_csr_free(m);
					}
					free(a);
					cases++;
				}
	CHECK(cases == 12 * 14, "generated %d cases", cases);
	remove(path);
}

/* Decimal values: the reader's own fast path for short decimals must give
 * bit for bit what the C library's strtod gives (glibc rounds correctly;
 * common practice to treat it as the reference).  Random strings with 1 to
 * 20 digits, a point anywhere or nowhere, optional exponents, signs.
 * Bit for bit (memcmp), so a last-place rounding difference is caught. */
static void test_decimal_values(void)
{
	enum { COUNT = 20000 };
	char path[] = "/tmp/dwell-test-mtx-dec-XXXXXX";
	int fd = mkstemp(path);
	CHECK(fd >= 0, "mkstemp failed");
	if (fd < 0)
		return;
	FILE *f = fdopen(fd, "w");
	fprintf(f, "%%%%MatrixMarket matrix array real general\n%d 1\n", COUNT);
	static char text[COUNT][48];
	lcg_state = 7;
	for (int k = 0; k < COUNT; k++) {
		char *t = text[k];
		int n = 0, digits = 1 + (int)(lcg_next() % 20);
		int point = (int)(lcg_next() % (uint64_t)(digits + 2)) - 1;
		if (lcg_next() % 3 == 0)
			t[n++] = lcg_next() % 2 ? '-' : '+';
		for (int d = 0; d < digits; d++) {
			if (d == point)
				t[n++] = '.';
			t[n++] = (char)('0' + (d == 0 && lcg_next() % 4 == 0 ? 0 : lcg_next() % 10));
		}
		if (point == digits)
			t[n++] = '.';
		if (lcg_next() % 2)
			n += snprintf(t + n, 48 - (size_t)n, "%c%d", lcg_next() % 2 ? 'e' : 'E',
				(int)(lcg_next() % 61) - 30);
		t[n] = '\0';
		fprintf(f, "%s\n", t);
	}
	fclose(f);
	double complex *v = NULL;
	int64_t len = 0;
	dw_error err = {0};
	int st = dw_mtx_read_vector(path, &v, &len, &err);
	CHECK(st == DW_OK && len == COUNT, "decimal values: %s", err.msg);
	int wrong = 0;
	for (int k = 0; st == DW_OK && k < COUNT; k++) {
		double want = strtod(text[k], NULL), got = creal(v[k]);
		/* Array zeros (also -0) are not entries, so they come back as +0. */
		bool same = want == 0.0 ? got == 0.0 : !memcmp(&want, &got, sizeof want);
		if (!same) {
			if (wrong++ < 5)
				CHECK(0, "'%s' read as %.17g, strtod gives %.17g", text[k], got, want);
		}
	}
	CHECK(wrong == 0, "decimal values: %d of %d differ from strtod", wrong, COUNT);
	free(v);
	remove(path);
}

/* Damaged files: each good coordinate and array file with random bytes
 * replaced, inserted or deleted.  Whatever comes out must be either a
 * matrix with sorted rows or DW_EINPUT with "FILE:LINE: " (a positive line
 * number) - never another status, an unlocated message or (under the
 * sanitizers of the CI build) a crash or leak. */
static void test_damaged_files(void)
{
	static const char *const sources[] = {
		"coordinate-complex-hermitian", "coordinate-pattern-symmetric",
		"coordinate-integer-skew-symmetric", "array-real-symmetric",
		"array-complex-hermitian", "layout-comments-blanks", "repeats-symmetric"};
	static const char noise[] = "0123456789 .-+eE%\n\t\rx";
	char path[] = "/tmp/dwell-test-mtx-dmg-XXXXXX";
	int fd = mkstemp(path);
	CHECK(fd >= 0, "mkstemp failed");
	if (fd < 0)
		return;
	close(fd);
	lcg_state = 99;
	int accepted = 0, refused = 0;
	for (size_t s = 0; s < sizeof sources / sizeof sources[0]; s++) {
		char src[256];
		snprintf(src, sizeof src, "%s/%s.mtx", GOOD_DIR, sources[s]);
		FILE *f = fopen(src, "rb");
		char text[4096];
		size_t len = fread(text, 1, sizeof text - 64, f);
		fclose(f);
		for (int round = 0; round < 300; round++) {
			char damaged[4096];
			memcpy(damaged, text, len);
			size_t n = len;
			int edits = 1 + (int)(lcg_next() % 3);
			for (int e = 0; e < edits && n > 1; e++) {
				size_t at = (size_t)(lcg_next() % n);
				char c = noise[lcg_next() % (sizeof noise - 1)];
				switch (lcg_next() % 3) {
				case 0:
					damaged[at] = c;
					break;
				case 1:
					memmove(damaged + at + 1, damaged + at, n - at);
					damaged[at] = c;
					n++;
					break;
				default:
					memmove(damaged + at, damaged + at + 1, n - at - 1);
					n--;
				}
			}
			f = fopen(path, "wb");
			fwrite(damaged, 1, n, f);
			fclose(f);
			dw_csr *m = NULL;
			dw_error err = {0};
			int st = dw_mtx_read_matrix(path, NULL, &m, &err);
			if (st == DW_OK) {
				check_csr_shape(m, "damaged");
				accepted++;
			} else {
				size_t plen = strlen(path);
				long line = strncmp(err.msg, path, plen) || err.msg[plen] != ':'
					? 0 : strtol(err.msg + plen + 1, NULL, 10);
				CHECK(st == DW_EINPUT && line > 0, "damaged %s: status %d, message '%s'",
					sources[s], st, err.msg);
				refused++;
			}
			dw_csr_free(m);
		}
	}
	CHECK(accepted > 0 && refused > 0, "damaged files: %d accepted, %d refused",
		accepted, refused);
	printf("damaged files: %d read, %d refused with a located error\n", accepted, refused);
	remove(path);
}

/* A file that is not a regular file (a FIFO here): its size is unknown,
 * so entry storage grows by doubling (4096, 8192, then the declared 10000).
 * A child process writes a tridiagonal 5000 x 5000 matrix, lower triangle
 * in a symmetric file, bottom row first. */
static void test_fifo(void)
{
	enum { N = 5000 };
	char dir[] = "/tmp/dwell-test-mtx-fifo-XXXXXX";
	CHECK(mkdtemp(dir) != NULL, "mkdtemp failed");
	char path[64];
	snprintf(path, sizeof path, "%s/pipe.mtx", dir);
	CHECK(mkfifo(path, 0600) == 0, "mkfifo failed");
	fflush(NULL);
	pid_t child = fork();
	if (child == 0) {
		FILE *f = fopen(path, "w");
		if (!f)
			_exit(1);
		fprintf(f, "%%%%MatrixMarket matrix coordinate real symmetric\n%d %d %d\n",
			N, N, 2 * N - 1);
		for (int i = N; i >= 1; i--) {
			fprintf(f, "%d %d 2\n", i, i);
			if (i > 1)
				fprintf(f, "%d %d -1\n", i, i - 1);
		}
		fclose(f);
		_exit(0);
	}
	dw_csr *m = NULL;
	dw_error err = {0};
	int st = dw_mtx_read_matrix(path, NULL, &m, &err);
	int child_status = -1;
	waitpid(child, &child_status, 0);
	CHECK(st == DW_OK, "fifo: %s", err.msg);
	if (st == DW_OK) {
		CHECK(m->nnz == 3 * N - 2, "fifo: nnz %lld", (long long)m->nnz);
		check_csr_shape(m, "fifo");
		int wrong = 0;
		for (int64_t r = 0; r < m->rows; r++)
			for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++)
				wrong += m->val[k] != (m->col[k] == r ? 2.0 : -1.0)
					|| (m->col[k] != r && m->col[k] != r - 1 && m->col[k] != r + 1);
		CHECK(wrong == 0, "fifo: %d wrong entries", wrong);
	}
	dw_csr_free(m);
	remove(path);
	rmdir(dir);
}

int main(void)
{
	test_good_matrices();
	test_good_vectors();
	test_bad_corpus();
	test_missing_file();
	check_corpus_listed(GOOD_DIR, good_listed);
	check_corpus_listed(BAD_DIR, bad_listed);
	test_generated();
	test_decimal_values();
	test_damaged_files();
	test_fifo();
	return check_done();
}
