/* program.h - the middle end: from an analysed problem to a compiled
 * program (circuit IR + schedule + error budget) for one instance.
 *
 * Registers of every program, in declaration order (bit 0 first):
 * anc (1 qubit, the pivot ancilla), sgn (1 qubit, variant I only),
 * sys (n qubits), work (the ancilla pool of the top definition). */
#ifndef DWELL_PROGRAM_H
#define DWELL_PROGRAM_H

#include <stdint.h>

#include "dwell/circuit.h"
#include "dwell/problem.h"

/* ---- Pauli strings on the top-level qubits (anc, sgn, sys) ---- */
typedef struct dw_pauli {
	uint64_t x, z;        /* bit q set: X (x only), Z (z only), Y (both) */
} dw_pauli;

int dw_pauli_commute(dw_pauli a, dw_pauli b);

/* A term of K(s) = X_anc (x) A(s): coefficient (ca (1-s) + cb s) times an
 * operator T with ||T|| <= norm.  Either a Pauli string p (def ==
 * DW_NO_DEF: the rotation is built from p, and commutators with other
 * Pauli terms are exact), or a definition `def` with one parameter theta
 * that applies exp(-i theta/2 T) to the top-level qubits q[0..nq) (plus its
 * own clean ancillas).  The product formula uses the terms of K(s)/2. */
typedef struct dw_term {
	dw_pauli p;           /* valid when pauli is true */
	bool pauli;
	double ca, cb;
	double norm;          /* ||T||: 1 for Pauli strings */
	uint32_t def;         /* DW_NO_DEF for Pauli terms */
	uint32_t nq;          /* def terms: qubits of the call */
	uint32_t q[64];
} dw_term;

/* Top-level qubit layout: anc = 0, sgn = 1 (variant I), sys from sys0. */
typedef struct dw_layout {
	char variant;
	uint32_t anc, sgn, sys0, n, nqubits;
} dw_layout;

/* Terms of X_anc (x) [X_sgn (x)] A/alpha for non-Pauli matrices (explicit:
 * sparse.c; stencil: stencil.c), appended to *terms with ca = 0, cb = 1
 * (or the entry scale).  Defined by the files that lower those matrices. */
typedef int (*dw_term_builder)(const dw_problem *p, const dw_layout *lay,
	dw_circuit *c, dw_term **terms, size_t *nterms, dw_error *e);

int dw_sparse_terms(const dw_problem *p, const dw_layout *lay, dw_circuit *c,
	dw_term **terms, size_t *nterms, dw_error *e);
int dw_stencil_terms(const dw_problem *p, const dw_layout *lay, dw_circuit *c,
	dw_term **terms, size_t *nterms, dw_error *e);

/* ---- schedule (schedule.c) ---- */
typedef struct dw_segment {
	double s;             /* s_j */
	double gap;           /* gap lower bound Delta(s_j) */
	double dwell;         /* drawn dwell time t_j in [0, 2 pi / gap] */
	int64_t steps;        /* product-formula steps r_j */
	double eps;           /* splitting error allotted to this segment */
	double bound;         /* bound on its splitting error (<= eps when auto) */
} dw_segment;

typedef struct dw_schedule {
	dw_path_kind path;
	int64_t q;            /* number of segments */
	bool q_auto;
	double speed;         /* ||dH/ds|| bound c in dv/ds = c / Delta */
	double length;        /* path length L = v(1) */
	double path_error;    /* estimated path error sum_j (v_j - v_{j-1})^2 */
	double time_expected; /* sum_j pi / Delta(s_j) */
	double time_drawn;    /* sum_j t_j */
	uint64_t seed;        /* seed of this instance */
	dw_segment *seg;      /* q entries */
} dw_schedule;

/* Gap lower bound of DESIGN 4 for variant 'P' or 'I'. */
double dw_gap_bound(char variant, double kappa, double s);
/* v(s) = speed * int_0^s ds / Delta(s) by adaptive quadrature. */
double dw_path_v(char variant, double kappa, double speed, double s);

/* The documented, platform-independent generator (splitmix64):
 * state += 0x9E3779B97F4A7C15; z = state; z = (z ^ z>>30) * 0xBF58476D1CE4E5B9;
 * z = (z ^ z>>27) * 0x94D049BB133111EB; z ^= z>>31.  Uniform [0,1): (z>>11) 2^-53. */
typedef struct dw_rng { uint64_t state; } dw_rng;
uint64_t dw_rng_next(dw_rng *r);
double dw_rng_uniform(dw_rng *r);

/* Fill the schedule (points, gaps, dwell times; steps left 0). */
int dw_schedule_build(const dw_problem *p, double eps_path, uint64_t seed,
	dw_schedule *out, dw_error *e);

/* ---- error budget (budget.c) ---- */
typedef struct dw_error_budget {
	double path, split, synth, data, total;
} dw_error_budget;

void dw_error_budget_split(const dw_problem *p, dw_error_budget *out);

/* ---- the compiled program (program.c) ---- */
typedef struct dw_register {
	char name[16];
	uint32_t offset, size;
} dw_register;

typedef struct dw_program {
	const dw_problem *problem;
	uint32_t instance;        /* 1-based */
	dw_circuit *circ;
	uint32_t top;             /* the main definition */
	dw_register reg[4];
	int nreg;                 /* anc, [sgn], sys, [work] */
	uint32_t nqubits;         /* anc + sgn + sys (top arguments) */
	uint32_t nwork;           /* work qubits (the top's pool) */
	dw_schedule sched;
	dw_error_budget budget;
	int order;
	uint64_t steps_total;     /* sum of r_j (saturates at 2^64-1) */
	char bound_used[64];      /* how r_j was chosen */
	size_t nterms;            /* terms of K(s) */
	dw_term *terms;
	uint32_t first_segment_op;/* index in the top's ops of segment 1 */
	double eps_rotation;      /* synthesis error allotted to one rotation */
	uint64_t t_per_rotation;  /* estimated T per rotation (continuous) */
	/* clifford+t lowering (compiler/back/lower.c) */
	uint64_t synth_rotations_planned; /* rotations of the continuous program */
	size_t synth_distinct;    /* distinct (angle, eps) synthesised */
	double synth_max_error;   /* largest achieved rotation error */
} dw_program;

/* Lower the program to Clifford+T in place (pg->top replaced). */
int dw_lower_clifford_t(dw_program *pg, dw_error *e);

int dw_program_build(const dw_problem *p, uint32_t instance, dw_program *out,
	dw_error *e);
void dw_program_free(dw_program *prog);

/* ---- pieces (used by program.c and tested on their own) ---- */

/* Definition of exp(-i theta/2 P) on the support of P (qubits in
 * increasing order, P restricted to them), one parameter theta. */
uint32_t dw_pauli_rotation_def(dw_circuit *c, dw_pauli p, dw_error *e);
/* Support qubits of p in increasing order; returns their number. */
uint32_t dw_pauli_support(dw_pauli p, uint32_t *qubits);

/* State preparation U_b on n qubits (|0> -> |b>, up to global phase). */
uint32_t dw_stateprep_def(dw_circuit *c, const dw_problem *p, dw_error *e);
/* Amplitude loading by uniformly controlled rotations (n qubits, 2^n amps). */
uint32_t dw_stateprep_amplitudes(dw_circuit *c, int n, const double complex *amps,
	dw_error *e);

/* Multi-controlled Z on k qubits (I - 2|1..1><1..1|), with clean ancillas:
 * a Toffoli ladder, or (measure) temporary ANDs erased by measurement. */
uint32_t dw_mcz_def(dw_circuit *c, uint32_t k, bool measure, dw_error *e);
/* Temporary logical-AND (a, b, t=|0>) -> (a, b, ab), 4 T; and its erasure
 * by measurement (non-unitary: an OpenQASM def). */
uint32_t dw_and_compute_def(dw_circuit *c, dw_error *e);
uint32_t dw_and_erase_def(dw_circuit *c, dw_error *e);

#endif
