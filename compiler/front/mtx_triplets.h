/* mtx_triplets.h - internal to the Matrix Market reader.
 * mtx.c parses a file into the triplet list below (one entry per stored
 * line, 0-based indices, nothing mirrored yet); mtx_compress.c turns it into
 * a dw_csr or a dense vector.  Not a public interface. */
#ifndef DWELL_FRONT_MTX_TRIPLETS_H
#define DWELL_FRONT_MTX_TRIPLETS_H

#include <complex.h>
#include <stdint.h>
#include <stdio.h>

#include "dwell/diag.h"
#include "dwell/problem.h"

typedef enum { MTX_COORDINATE, MTX_ARRAY } mtx_format;
typedef enum { MTX_REAL, MTX_INTEGER, MTX_COMPLEX, MTX_PATTERN } mtx_field;
typedef enum { MTX_GENERAL, MTX_SYMMETRIC, MTX_SKEW, MTX_HERMITIAN } mtx_symmetry;

/* What the caller wants; it decides which shape errors are raised while
 * the size line is read (so they carry that line's number). */
typedef enum { MTX_WANT_MATRIX, MTX_WANT_VECTOR } mtx_want;

typedef struct mtx_triplets {
	const char *path;         /* for messages; not owned */
	mtx_format format;
	mtx_field field;
	mtx_symmetry symmetry;
	int64_t rows, cols;       /* from the size line */
	int64_t count;            /* entries held */
	int64_t capacity;         /* entries allocated */
	int64_t *row, *col;       /* 0-based, count each */
	double *re;               /* count */
	double *im;               /* count when field is complex, else NULL */
} mtx_triplets;

/* Parse PATH into *t (entries as stored: lower triangle only for the
 * symmetric kinds; array zeros dropped).  On error *t holds nothing. */
int mtx_read_triplets(const char *path, mtx_want want, mtx_triplets *t,
	dw_error *err);

void mtx_triplets_free(mtx_triplets *t);

/* Mirror, sort rows by column, sum repeats; consumes t (freed on return,
 * success or not).  Writes one notice line when repeats were summed. */
int mtx_compress(mtx_triplets *t, FILE *notices, dw_csr **out, dw_error *err);

/* Dense vector of t->rows entries (t->cols is 1); consumes t. */
int mtx_densify_vector(mtx_triplets *t, FILE *notices, double complex **out,
	int64_t *len, dw_error *err);

#endif
