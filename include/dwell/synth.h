/* synth.h - Clifford+T synthesis of single-qubit z-rotations (DESIGN 8).
 *
 * Takes: an angle theta and a precision eps.  Gives: a sequence of
 * single-qubit Clifford+T gates (h, s, sdg, t, tdg, x, y, z) in circuit
 * order (the first element is applied first) whose product equals
 * rz(theta) = diag(e^{-i theta/2}, e^{i theta/2}) up to a global phase
 * within eps in operator norm, with its T-count and achieved error.
 *
 * Method: "Optimal ancilla-free Clifford+T approximation of z-rotations"
 * (Quantum Inf. Comput. 16(11&12), 2016): candidates u of increasing
 * denominator exponent from a two-dimensional grid problem, the norm
 * equation t^dagger t = 1 - u^dagger u, then exact synthesis (docs/synth.md).
 * Odd multiples of pi/4 within eps give one T (rz(pi/4) is T up to phase),
 * multiples of pi/2 give none.
 *
 * Library code: errors are reported through dw_error (DW_EINPUT for a bad
 * angle or precision, DW_EINTERNAL when the search gives up). */
#ifndef DWELL_SYNTH_H
#define DWELL_SYNTH_H

#include <stddef.h>
#include <stdint.h>

#include "dwell/diag.h"

typedef enum dw_sq_gate {
	DW_SQ_H,
	DW_SQ_S,
	DW_SQ_SDG,
	DW_SQ_T,
	DW_SQ_TDG,
	DW_SQ_X,
	DW_SQ_Y,
	DW_SQ_Z
} dw_sq_gate;

/* OpenQASM 3 spelling: "h", "s", "sdg", "t", "tdg", "x", "y", "z". */
const char *dw_sq_gate_name(dw_sq_gate g);

typedef struct dw_synth_result {
	dw_sq_gate *gates;    /* circuit order; owned (dw_synth_result_free) */
	size_t count;
	uint32_t t_count;     /* number of t and tdg in gates */
	double error;         /* operator-norm distance to rz(theta) up to
	                         global phase (computed in 50+ digit arithmetic) */
	double global_phase;  /* phi with rz(theta) ~= e^{i phi} * product */
	int denom_exp;        /* least denominator exponent k of the solution */
	uint32_t candidates;  /* grid candidates tried (norm equations) */
} dw_synth_result;

/* Limits of the search; dw_synth_defaults fills sensible values. */
typedef struct dw_synth_options {
	uint32_t factor_effort;   /* Pollard rho iterations per candidate */
	int max_denom_exp;        /* give up beyond this k (0: automatic) */
	uint32_t extra_solutions; /* after the first solution at the least k,
	                             try this many more there, keep the best */
} dw_synth_options;

void dw_synth_defaults(dw_synth_options *opt);

/* Synthesise rz(theta) within eps (1e-30 <= eps < 1, theta finite).
 * opt may be NULL (defaults).  On success out holds an owned sequence. */
int dw_synth_rz_opt(double theta, double eps, const dw_synth_options *opt,
	dw_synth_result *out, dw_error *err);
int dw_synth_rz(double theta, double eps, dw_synth_result *out, dw_error *err);

void dw_synth_result_free(dw_synth_result *r);

/* A cache of results by (theta, eps) bit patterns, for lowering programs
 * where angles recur.  Results stay owned by the cache; the pointers it
 * hands out stay valid until dw_synth_cache_destroy. */
typedef struct dw_synth_cache dw_synth_cache;

dw_synth_cache *dw_synth_cache_create(dw_error *err);
void dw_synth_cache_destroy(dw_synth_cache *c);
int dw_synth_cache_rz(dw_synth_cache *c, double theta, double eps,
	const dw_synth_result **out, dw_error *err);
/* Number of distinct (theta, eps) entries and of lookups served. */
size_t dw_synth_cache_size(const dw_synth_cache *c);
size_t dw_synth_cache_hits(const dw_synth_cache *c);

#endif
