/* mtx.h - Matrix Market (NIST exchange format) reader.
 * Takes: a .mtx path.  Gives: a compressed-row dw_csr (matrix) or a dense
 * vector (rhs.file).  Errors: DW_EINPUT with "FILE:LINE: message". */
#ifndef DWELL_MTX_H
#define DWELL_MTX_H

#include <complex.h>
#include <stdint.h>
#include <stdio.h>

#include "dwell/diag.h"
#include "dwell/problem.h"

/* Read a square matrix (any valid banner combination; symmetric, skew and
 * hermitian storage mirrored; duplicates summed, with a notice written to
 * `notices` when it is not NULL).  *out is owned by the caller. */
int dw_mtx_read_matrix(const char *path, FILE *notices, dw_csr **out, dw_error *err);

/* Read a vector: an array file with one column, or a coordinate file with
 * one column.  *out has *len entries (unset entries zero). */
int dw_mtx_read_vector(const char *path, double complex **out, int64_t *len, dw_error *err);

/* The same, writing a notice line to `notices` (when not NULL) if repeated
 * coordinate entries were summed. */
int dw_mtx_read_vector_noting(const char *path, FILE *notices,
	double complex **out, int64_t *len, dw_error *err);

void dw_csr_free(dw_csr *m);

#endif
