/* audit.h - reading ledgers back: the delta between two ledgers (dwell
 * diff) and the budget audit (dwell check, and compile-time `budget:`).
 *
 * Both work on parsed ledgers (dwell/json.h), so the compiler can audit
 * the ledger text it has just written (dw_json_parse_string) and the
 * command line can audit a ledger file. */
#ifndef DWELL_AUDIT_H
#define DWELL_AUDIT_H

#include <stdint.h>
#include <stdio.h>

#include "dwell/budget.h"
#include "dwell/diag.h"
#include "dwell/json.h"

/* ---- ledger diff (compiler/back/ledger_diff.c) ---- */

typedef enum dw_delta_kind {
	DW_DELTA_SAME,     /* equal values */
	DW_DELTA_CHANGED,  /* both present, values differ */
	DW_DELTA_NEW,      /* only in B */
	DW_DELTA_GONE      /* only in A */
} dw_delta_kind;

/* One numeric figure compared between ledger A and ledger B. */
typedef struct dw_delta {
	char *name;             /* dotted path ("qubits.total", "gates.cx") or,
	                           inside a stage, the field's path in it */
	const dw_json *a, *b;   /* the numbers; NULL on the side lacking it */
	dw_delta_kind kind;
	int exact;              /* both integers: delta_neg/delta_mag exact */
	int delta_neg;          /* exact: B < A */
	uint64_t delta_mag;     /* exact: |B - A| (saturates at UINT64_MAX
	                           only when the signs differ and it overflows;
	                           then exact is 0) */
	double delta;           /* B - A (A or B taken as 0 when absent) */
	int has_pct;            /* 0 when new, gone, or A is 0 */
	double pct;             /* 100 (B - A) / |A| */
} dw_delta;

/* Stages matched by their "stage" name. */
typedef struct dw_stage_delta {
	const char *stage;      /* the name (points into A or B) */
	int in_a, in_b;
	dw_delta *field;
	size_t nfield;
} dw_stage_delta;

/* A non-numeric leaf (string, boolean, null) whose value differs. */
typedef struct dw_setting_change {
	char *name;
	const dw_json *a, *b;   /* NULL on the side lacking it */
} dw_setting_change;

typedef struct dw_ledger_diff {
	dw_delta *figure;       /* A's figures in order, then B-only ones */
	size_t nfigure;
	dw_stage_delta *stage;  /* A's stages in order, then B-only ones */
	size_t nstage;
	dw_setting_change *setting;
	size_t nsetting;
	const dw_json *problem_a, *problem_b;  /* problem.name strings or NULL */
	int problem_differs;    /* problem.name differs (a warning, not an error) */
} dw_ledger_diff;

/* Compare two parsed ledgers (each must be an object; "stages", when
 * present, an array of objects each with a string "stage").  a_name and
 * b_name locate errors.  The result points into a and b: keep them alive
 * until dw_ledger_diff_free. */
int dw_ledger_diff_build(const dw_json *a, const char *a_name,
	const dw_json *b, const char *b_name, dw_ledger_diff *out, dw_error *err);
void dw_ledger_diff_free(dw_ledger_diff *d);

/* The readable report and the same as a JSON document. */
void dw_ledger_diff_write_text(FILE *f, const dw_ledger_diff *d,
	const char *a_name, const char *b_name);
void dw_ledger_diff_write_json(FILE *f, const dw_ledger_diff *d,
	const char *a_name, const char *b_name);

/* ---- budget audit (compiler/back/budget_check.c) ---- */

/* The ledger path a budget key stands for: "qubits" -> "qubits.total";
 * the other named figures and any dotted path map to themselves. */
const char *dw_budget_figure_path(const char *key);

/* Compare every budget line with the ledger.  A key that names no numeric
 * ledger figure is DW_EINPUT "ORIGIN:LINE: ..." (checked for all lines
 * before anything is written).  Otherwise writes one line
 * "dwell: ORIGIN:LINE: ..." to report (when not NULL) per exceeded figure
 * and returns DW_EBUDGET if there was one, DW_OK if all are within. */
int dw_budget_audit(const dw_json *ledger, const dw_budget *budget,
	const char *budget_origin, FILE *report, dw_error *err);

#endif
