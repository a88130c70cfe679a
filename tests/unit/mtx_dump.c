/* mtx_dump.c - test helper: read a Matrix Market file with libdwell and
 * print it as JSON, for tests/external/check_mtx_scipy.py.
 * Takes: "matrix FILE" or "vector FILE".  Gives on stdout
 *   {"rows": R, "cols": C, "entries": [[i, j, re, im], ...]}
 * with 0-based indices in row-major order (vector: cols 1, j 0, every
 * entry including zeros); notices go to stderr.  On a reader error prints
 * "dwell: MESSAGE" on stderr and exits with the reader's status. */
#include <complex.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/mtx.h"

static void print_entry(int64_t i, int64_t j, double complex v, int first)
{
	printf("%s[%lld, %lld, %.17g, %.17g]", first ? "" : ",\n  ",
		(long long)i, (long long)j, creal(v), cimag(v));
}

int main(int argc, char **argv)
{
	if (argc != 3 || (strcmp(argv[1], "matrix") && strcmp(argv[1], "vector"))) {
		fprintf(stderr, "usage: mtx_dump matrix|vector FILE\n");
		return 1;
	}
	dw_error err = {0};
	if (!strcmp(argv[1], "matrix")) {
		dw_csr *m = NULL;
		if (dw_mtx_read_matrix(argv[2], stderr, &m, &err)) {
			fprintf(stderr, "dwell: %s\n", err.msg);
			return err.status;
		}
		printf("{\"rows\": %lld, \"cols\": %lld, \"is_complex\": %s, \"entries\": [\n  ",
			(long long)m->rows, (long long)m->cols, m->is_complex ? "true" : "false");
		for (int64_t r = 0; r < m->rows; r++)
			for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++)
				print_entry(r, m->col[k], m->val[k], k == 0);
		printf("]}\n");
		dw_csr_free(m);
	} else {
		double complex *v = NULL;
		int64_t len = 0;
		if (dw_mtx_read_vector_noting(argv[2], stderr, &v, &len, &err)) {
			fprintf(stderr, "dwell: %s\n", err.msg);
			return err.status;
		}
		printf("{\"rows\": %lld, \"cols\": 1, \"entries\": [\n  ", (long long)len);
		for (int64_t i = 0; i < len; i++)
			print_entry(i, 0, v[i], i == 0);
		printf("]}\n");
		free(v);
	}
	return 0;
}
