/* mtx_compress.c - Matrix Market triplets to compressed rows (or a vector).
 *
 * Takes: the stored entries of one file (mtx_triplets.h): 0-based, lower
 * triangle only for the symmetric kinds, repeats allowed.  Gives: a dw_csr
 * with the mirrored half filled in (symmetric a_ji = a_ij, skew-symmetric
 * a_ji = -a_ij, hermitian a_ji = conj(a_ij)), each row sorted by column,
 * repeated positions summed (one notice line says how many), read-only from
 * then on; or, for a one-column file, a dense vector.
 *
 * Method: the triplet index arrays are reused as the result's (enlarged
 * for the mirrored half), values turned complex, entries bucket-sorted by
 * row in place, then each row sorted by column in place and repeats
 * merged.  Peak memory: two index arrays, the triplet values and the
 * complex values (40 bytes per entry for a real general file). */
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

/* Swap entries a and b of the three parallel arrays. */
static void swap_triple(int64_t *row, int64_t *col, double complex *val,
	int64_t a, int64_t b)
{
	int64_t r = row[a];
	row[a] = row[b];
	row[b] = r;
	swap_entries(col, val, a, b);
}

int mtx_compress(mtx_triplets *t, FILE *notices, dw_csr **out, dw_error *err)
{
	*out = NULL;
	bool mirror = t->symmetry != MTX_GENERAL;
	int64_t rows = t->rows, count = t->count;
	int64_t *row = t->row, *next = NULL;
	dw_csr *m = dw_alloc(err, 1, sizeof *m);
	t->row = NULL;
	if (!m)
		goto fail;
	m->rows = rows;
	m->cols = t->cols;
	m->col = t->col;
	t->col = NULL;

	/* 1. The triplets' index arrays become the result's, enlarged for the
	 * mirrored half (total <= 2 * count: no overflow); values become
	 * complex and the triplets' value arrays go. */
	int64_t total = count;
	if (mirror)
		for (int64_t k = 0; k < count; k++)
			total += row[k] != m->col[k];
	size_t slots = total > 0 ? (size_t)total : 1;
	int64_t *grown = realloc(row, slots * sizeof *row);
	if (!grown)
		goto out_of_memory;
	row = grown;
	grown = realloc(m->col, slots * sizeof *m->col);
	if (!grown)
		goto out_of_memory;
	m->col = grown;
	m->val = dw_alloc(err, slots, sizeof *m->val);
	if (!m->val)
		goto fail;
	for (int64_t k = 0; k < count; k++)
		m->val[k] = CMPLX(t->re[k], t->im ? t->im[k] : 0.0);
	mtx_triplets_free(t);
	int64_t at = count;
	for (int64_t k = 0; mirror && k < count; k++)
		if (row[k] != m->col[k]) {
			row[at] = m->col[k];
			m->col[at] = row[k];
			m->val[at] = mirrored(t->symmetry, m->val[k]);
			at++;
		}

	/* 2. Row counts, then an in-place bucket sort by row ("American flag
	 * sort", McIlroy, Bostic and McIlroy, "Engineering Radix Sort",
	 * Computing Systems 1993): each swap puts one entry into its row. */
	m->rowptr = dw_alloc(err, (size_t)rows + 1, sizeof *m->rowptr);
	next = dw_alloc(err, (size_t)rows, sizeof *next);
	if (!m->rowptr || !next)
		goto fail;
	for (int64_t k = 0; k < total; k++)
		m->rowptr[row[k] + 1]++;
	for (int64_t r = 0; r < rows; r++)
		m->rowptr[r + 1] += m->rowptr[r];
	memcpy(next, m->rowptr, (size_t)rows * sizeof *next);
	for (int64_t r = 0; r < rows; r++) {
		int64_t end = m->rowptr[r + 1];
		while (next[r] < end) {
			int64_t k = next[r], bucket = row[k];
			if (bucket == r)
				next[r]++;
			else
				swap_triple(row, m->col, m->val, k, next[bucket]++);
		}
	}
	free(next);
	next = NULL;
	free(row);
	row = NULL;

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
out_of_memory:
	dw_fail(err, DW_EINTERNAL, "out of memory for %lld entries of %s",
		(long long)total, t->path);
fail:
	free(next);
	free(row);
	dw_csr_free(m);
	mtx_triplets_free(t);
	return DW_EINTERNAL;
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
		return DW_EINTERNAL;
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
