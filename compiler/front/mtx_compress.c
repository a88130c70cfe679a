/* mtx_compress.c - Matrix Market triplets to compressed rows (or a vector).
 *
 * Takes: the stored entries of one file (mtx_triplets.h): 0-based, lower
 * triangle only for the symmetric kinds, repeats allowed.  Gives: a dw_csr
 * with the mirrored half filled in (symmetric a_ji = a_ij, skew-symmetric
 * a_ji = -a_ij, hermitian a_ji = conj(a_ij)), each row sorted by column,
 * repeated positions summed (one notice line says how many), read-only from
 * then on; or, for a one-column file, a dense vector.
 *
 * Method: count entries per row, scatter into place (a counting sort by
 * row), free the triplets, then sort each row by column in place and merge
 * repeats.  Peak memory: the triplets plus the compressed arrays. */
#include <complex.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/mtx.h"
#include "front/mtx_triplets.h"

void dw_csr_free(dw_csr *m)
{
	if (!m)
		return;
	free(m->rowptr);
	free(m->col);
	free(m->val);
	free(m);
}

/* The one notice line: how many entries were summed into earlier ones. */
static void note_repeats(FILE *notices, const char *path, int64_t repeats)
{
	if (repeats > 0 && notices)
		fprintf(notices, "%s: %lld repeated position%s: values at the same "
			"row and column were added together\n", path, (long long)repeats,
			repeats == 1 ? "" : "s");
}

static void swap_entries(int64_t *col, double complex *val, int64_t a, int64_t b)
{
	int64_t c = col[a];
	col[a] = col[b];
	col[b] = c;
	double complex v = val[a];
	val[a] = val[b];
	val[b] = v;
}

/* Heap sort of col[0, n) carrying val along (in place, n log n worst case). */
static void sift_down(int64_t *col, double complex *val, int64_t root, int64_t n)
{
	for (;;) {
		int64_t child = 2 * root + 1;
		if (child >= n)
			return;
		if (child + 1 < n && col[child + 1] > col[child])
			child++;
		if (col[root] >= col[child])
			return;
		swap_entries(col, val, root, child);
		root = child;
	}
}

static void sort_row(int64_t *col, double complex *val, int64_t n)
{
	bool sorted = true;
	for (int64_t k = 1; k < n && sorted; k++)
		sorted = col[k - 1] <= col[k];
	if (sorted)
		return;
	if (n <= 16) {
		for (int64_t k = 1; k < n; k++)
			for (int64_t m = k; m > 0 && col[m - 1] > col[m]; m--)
				swap_entries(col, val, m - 1, m);
		return;
	}
	for (int64_t root = n / 2 - 1; root >= 0; root--)
		sift_down(col, val, root, n);
	for (int64_t last = n - 1; last > 0; last--) {
		swap_entries(col, val, 0, last);
		sift_down(col, val, 0, last);
	}
}

static double complex mirrored(mtx_symmetry symmetry, double complex v)
{
	switch (symmetry) {
	case MTX_SKEW:
		return -v;
	case MTX_HERMITIAN:
		return conj(v);
	default:
		return v;
	}
}

int mtx_compress(mtx_triplets *t, FILE *notices, dw_csr **out, dw_error *err)
{
	*out = NULL;
	bool mirror = t->symmetry != MTX_GENERAL;
	int64_t rows = t->rows;
	dw_csr *m = dw_alloc(err, 1, sizeof *m);
	int64_t *next = NULL;
	if (!m)
		goto fail;
	m->rows = rows;
	m->cols = t->cols;
	m->rowptr = dw_alloc(err, (size_t)rows + 1, sizeof *m->rowptr);
	if (!m->rowptr)
		goto fail;

	/* Count per row (rowptr[r + 1]), then prefix sums. */
	for (int64_t k = 0; k < t->count; k++) {
		m->rowptr[t->row[k] + 1]++;
		if (mirror && t->row[k] != t->col[k])
			m->rowptr[t->col[k] + 1]++;
	}
	for (int64_t r = 0; r < rows; r++)
		m->rowptr[r + 1] += m->rowptr[r];
	int64_t total = m->rowptr[rows];   /* <= 2 * count: no overflow */

	m->col = dw_alloc(err, (size_t)total, sizeof *m->col);
	m->val = dw_alloc(err, (size_t)total, sizeof *m->val);
	next = dw_alloc(err, (size_t)rows, sizeof *next);
	if (!m->col || !m->val || !next)
		goto fail;
	memcpy(next, m->rowptr, (size_t)rows * sizeof *next);
	for (int64_t k = 0; k < t->count; k++) {
		int64_t i = t->row[k], j = t->col[k];
		double complex v = CMPLX(t->re[k], t->im ? t->im[k] : 0.0);
		int64_t at = next[i]++;
		m->col[at] = j;
		m->val[at] = v;
		if (mirror && i != j) {
			at = next[j]++;
			m->col[at] = i;
			m->val[at] = mirrored(t->symmetry, v);
		}
	}
	free(next);
	next = NULL;
	mtx_triplets_free(t);

	/* Sort each row, sum repeats, compact in place. A repeat in a mirrored
	 * file shows up twice (once per triangle); count it once. */
	int64_t written = 0, begin = 0, repeats = 0;
	for (int64_t r = 0; r < rows; r++) {
		int64_t end = m->rowptr[r + 1];
		sort_row(m->col + begin, m->val + begin, end - begin);
		int64_t row_start = written;
		m->rowptr[r] = written;
		for (int64_t k = begin; k < end; k++) {
			if (written > row_start && m->col[written - 1] == m->col[k]) {
				m->val[written - 1] += m->val[k];
				if (!mirror || m->col[k] <= r)
					repeats++;
			} else {
				m->col[written] = m->col[k];
				m->val[written] = m->val[k];
				written++;
			}
		}
		begin = end;
	}
	m->rowptr[rows] = written;
	m->nnz = written;
	if (written < total && written > 0) {
		int64_t *col = realloc(m->col, (size_t)written * sizeof *col);
		if (col)
			m->col = col;
		double complex *val = realloc(m->val, (size_t)written * sizeof *val);
		if (val)
			m->val = val;
	}
	for (int64_t k = 0; k < written && !m->is_complex; k++)
		m->is_complex = cimag(m->val[k]) != 0.0;
	note_repeats(notices, t->path, repeats);
	*out = m;
	return DW_OK;
fail:
	free(next);
	dw_csr_free(m);
	mtx_triplets_free(t);
	return err->status ? err->status : DW_EINTERNAL;
}

int mtx_densify_vector(mtx_triplets *t, FILE *notices, double complex **out,
	int64_t *len, dw_error *err)
{
	*out = NULL;
	*len = 0;
	double complex *v = dw_alloc(err, (size_t)t->rows, sizeof *v);
	unsigned char *set = NULL;
	if (v && t->format == MTX_COORDINATE)
		set = dw_alloc(err, (size_t)t->rows, 1);
	if (!v || (t->format == MTX_COORDINATE && !set)) {
		free(v);
		mtx_triplets_free(t);
		return err->status ? err->status : DW_EINTERNAL;
	}
	/* One column: the symmetric kinds can only be 1 x 1 here, so there is
	 * nothing to mirror. */
	int64_t repeats = 0;
	for (int64_t k = 0; k < t->count; k++) {
		int64_t i = t->row[k];
		v[i] += CMPLX(t->re[k], t->im ? t->im[k] : 0.0);
		if (set) {
			repeats += set[i];
			set[i] = 1;
		}
	}
	note_repeats(notices, t->path, repeats);
	free(set);
	mtx_triplets_free(t);
	*out = v;
	*len = t->rows;
	return DW_OK;
}
