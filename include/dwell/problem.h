/* problem.h - a linear-system problem as read from its YAML file, and the
 * classical analysis of it (norm, kappa, variant).
 *
 * The front end (compiler/front) fills dw_problem from PROBLEM.yaml plus
 * --set overrides; dw_problem_analyse fills the analysis fields.  Everything
 * downstream reads it and never changes it.  Conventions (DESIGN 3.1):
 * matrix index j maps to the sys register little-endian (sys[k] holds bit k
 * of j); a Pauli string's character k acts on sys[k]. */
#ifndef DWELL_PROBLEM_H
#define DWELL_PROBLEM_H

#include <complex.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "dwell/diag.h"
#include "dwell/budget.h"

typedef enum { DW_MATRIX_PAULI, DW_MATRIX_FILE, DW_MATRIX_STENCIL } dw_matrix_kind;

typedef struct dw_pauli_term {
	double coeff;     /* real coefficient */
	char *ops;        /* n characters from "IXYZ"; ops[k] acts on sys[k] */
} dw_pauli_term;

/* Sparse matrix in compressed-row form, read-only after construction. */
typedef struct dw_csr {
	int64_t rows, cols, nnz;
	int64_t *rowptr;          /* rows + 1 */
	int64_t *col;             /* nnz */
	double complex *val;      /* nnz */
	bool is_complex;          /* any entry with a nonzero imaginary part */
} dw_csr;

typedef enum {
	DW_RHS_AMPLITUDES, DW_RHS_FILE, DW_RHS_BASIS, DW_RHS_UNIFORM,
	DW_RHS_PRODUCT, DW_RHS_CIRCUIT
} dw_rhs_kind;

typedef enum { DW_SCHED_RANDOMIZED, DW_SCHED_ADIABATIC } dw_sched_kind;
typedef enum { DW_PATH_GAP_ADAPTED, DW_PATH_LINEAR, DW_PATH_POWER, DW_PATH_LIST } dw_path_kind;
typedef enum { DW_BOUND_COMMUTATOR, DW_BOUND_NORM } dw_bound_kind;
typedef enum { DW_GATES_CONTINUOUS, DW_GATES_CLIFFORD_T } dw_gates_kind;
typedef enum { DW_UNCOMPUTE_UNITARY, DW_UNCOMPUTE_MEASURE } dw_uncompute_kind;
typedef enum { DW_LOOKUP_UNARY, DW_LOOKUP_SELECT_SWAP } dw_lookup_kind;

typedef struct dw_stencil {
	int dims;                 /* 1, 2 or 3 */
	int64_t shape[3];         /* points per axis, powers of two */
	int periodic[3];          /* per axis: 1 periodic, 0 dirichlet */
	size_t npoints;
	int (*offset)[3];         /* npoints offsets, one per axis */
	double *coeff;            /* npoints coefficients */
} dw_stencil;

typedef struct dw_problem {
	char *path;               /* the YAML file as given */
	char *name;               /* "name:" or the file's base name */

	/* ---- matrix ---- */
	dw_matrix_kind matrix_kind;
	int n;                    /* system qubits (after dilation, padding) */
	size_t npauli;            /* DW_MATRIX_PAULI */
	dw_pauli_term *pauli;
	char *matrix_file;        /* DW_MATRIX_FILE: path resolved against the YAML dir */
	dw_csr *matrix;           /* DW_MATRIX_FILE: as read (before dilation) */
	dw_stencil stencil;       /* DW_MATRIX_STENCIL */

	/* ---- right-hand side ---- */
	dw_rhs_kind rhs_kind;
	double complex *amps;     /* AMPLITUDES/FILE: 2^n entries, normalised */
	uint64_t basis;           /* BASIS */
	size_t nproduct;          /* PRODUCT: one [theta, phi] per sys qubit */
	double (*product)[2];
	char *rhs_file;           /* FILE / CIRCUIT: resolved path */

	double precision;         /* target trace distance, default 0.05 */

	/* ---- schedule ---- */
	dw_sched_kind sched_kind; /* default randomized */
	dw_path_kind path_kind;   /* default gap-adapted */
	double power;             /* path power, default 1.5 */
	size_t npoints;           /* path list */
	double *points;
	int64_t steps;            /* q; 0 = auto */
	uint64_t seed;            /* default 1 */
	double kappa_user;        /* 0 = auto, else a trusted bound */

	/* ---- product formula ---- */
	int order;                /* 1, 2, 4 (6, 8 later); default 2 */
	int64_t formula_steps;    /* r per segment; 0 = auto */
	dw_bound_kind bound;      /* default commutator */

	/* ---- target, oracle ---- */
	dw_gates_kind gates;      /* default continuous */
	dw_uncompute_kind uncompute; /* default unitary */
	int value_bits;           /* 0 = auto */
	dw_lookup_kind lookup;    /* default unary */

	/* ---- optional audit ---- */
	dw_budget budget;

	/* ---- analysis (dw_problem_analyse) ---- */
	bool analysed;
	double alpha;             /* norm bound used for scaling, >= ||A||_2 */
	double sigma_min;         /* smallest singular value of A (unscaled) */
	double lambda_min, lambda_max; /* extreme eigenvalues of Hermitian A (unscaled) */
	double kappa;             /* alpha / sigma_min, or the user bound */
	char kappa_source[48];    /* "lapacke-zheevd", "user-bound", ... */
	char variant;             /* 'P' (positive definite) or 'I' */
	bool dilated;             /* non-Hermitian A replaced by its dilation */
	int64_t nnz;              /* nonzeros of the (dilated) matrix, 0 if n/a */
} dw_problem;

/* Read PROBLEM.yaml and apply the overrides sets[0..nsets-1], each
 * "key.path=value" with a YAML scalar or flow value.  On error returns
 * DW_EINPUT with "FILE:LINE: message" naming the key, and *out is left
 * freed.  Overrides report "--set key.path=...: message". */
int dw_problem_load(const char *path, const char *const *sets, size_t nsets,
	dw_problem *out, dw_error *err);

/* Fill the analysis fields: Hermitian check (dilation when needed), alpha,
 * sigma_min, kappa, variant.  Refuses singular A or kappa > 1e12. */
int dw_problem_analyse(dw_problem *p, dw_error *err);

void dw_problem_free(dw_problem *p);

/* Dense 2^n x 2^n column-major matrix of the (unscaled) Pauli sum.
 * Returns NULL on allocation failure (e filled). Caller frees. */
double complex *dw_pauli_dense(const dw_problem *p, dw_error *e);

#endif
