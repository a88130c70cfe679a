/* budget.h - an audit budget: upper limits on ledger figures.
 * Read from `budget:` in a problem file or from a budget YAML file
 * (`dwell check LEDGER --budget B.yaml`). */
#ifndef DWELL_BUDGET_H
#define DWELL_BUDGET_H

#include <stddef.h>

#include "dwell/diag.h"

#define DW_BUDGET_MAX 16

typedef struct dw_budget_line {
	char key[48];     /* a top-level numeric ledger figure: qubits,
	                     t_count, depth, t_depth, toffoli_count,
	                     rotation_count, two_qubit_count, measure_count,
	                     gate_count ... */
	double limit;
	long line;        /* line in the file it came from (for messages) */
} dw_budget_line;

typedef struct dw_budget {
	size_t n;         /* 0: no budget */
	dw_budget_line line[DW_BUDGET_MAX];
} dw_budget;

/* Read a budget YAML file: a mapping figure -> non-negative number,
 * optionally under a top-level `budget:` key (docs/problem-format.md lists
 * the figures).  On error returns DW_EINPUT ("FILE:LINE: message") and *out
 * is zeroed. */
int dw_budget_load(const char *path, dw_budget *out, dw_error *err);

#endif
