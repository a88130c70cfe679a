/* verify.h - simulate compiled instances and compare with the exact
 * solution (runtime/verify.c, `dwell verify`). */
#ifndef DWELL_VERIFY_H
#define DWELL_VERIFY_H

#include <complex.h>
#include <stdbool.h>
#include <stdio.h>

#include "dwell/problem.h"

typedef struct dw_verify_report {
	int instances;
	int qubits;                   /* simulated qubits per instance */
	double trace_distance;        /* averaged state vs target, on anc/sgn/sys */
	double fidelity;              /* mean over instances of |<target|psi_k>|^2 */
	double fidelity_min;
	double work_clean_probability;/* mean probability of work = |0..0> */
	double precision;             /* the target */
	bool passed;                  /* trace_distance <= precision */
} dw_verify_report;

/* The target |0>[|+>]|x> over (anc, [sgn], sys) of the compiled layout,
 * x from LAPACKE_zgesv on the original matrix (2^(n+1 or n+2) entries). */
int dw_verify_target(const dw_problem *p, double complex **target, size_t *dim,
	dw_error *e);

/* Compile, emit, read back and simulate instances 1..K of an analysed
 * problem; progress lines to `progress` when not NULL. */
int dw_verify(const dw_problem *p, int K, FILE *progress, dw_verify_report *out,
	dw_error *e);

#endif
