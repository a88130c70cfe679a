/* emit.h - the back end: OpenQASM 3 text (qasm.c) and the cost ledger
 * (ledger.c) of a compiled program. */
#ifndef DWELL_EMIT_H
#define DWELL_EMIT_H

#include <stdbool.h>
#include <stdio.h>

#include "dwell/dwell.h"

/* Write the program as OpenQASM 3 (hierarchical, or flat). */
int dw_qasm_write(const dw_program *pg, FILE *f, bool flat, dw_error *e);

/* Write a file through fn into PATH.tmp.PID, then rename it to PATH. */
typedef int (*dw_writer_fn)(FILE *f, const void *ctx, dw_error *e);
int dw_write_atomic(const char *path, dw_writer_fn fn, const void *ctx, dw_error *e);

/* Figures of one stage (ledger "stages"). */
typedef struct dw_stage_row {
	dw_stage stage;
	dw_figures fig;
	uint64_t t_count;         /* exact T + rotations x T per rotation */
} dw_stage_row;

typedef struct dw_ledger {
	const dw_program *pg;
	dw_figures fig;           /* whole program */
	uint64_t t_count;         /* including the rotation estimate */
	bool t_count_estimated;
	dw_stage_row stage[DW_STAGE_COUNT];
	int nstage;               /* stages with any gate */
	uint64_t qubits_total;
} dw_ledger;

/* Compute the ledger (sets the T-depth weight of rotations first). */
int dw_ledger_build(dw_program *pg, dw_ledger *L, dw_error *e);
/* JSON text (malloc'd, NUL-terminated), or NULL with e filled. */
char *dw_ledger_json(const dw_ledger *L, dw_error *e);
/* The readable table. */
void dw_ledger_table(const dw_ledger *L, FILE *f);

#endif
