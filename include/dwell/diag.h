/* diag.h - error reporting and exit statuses shared by every part of dwell.
 *
 * Library functions never print and never exit: they fill a dw_error and
 * return its status.  The command line prints "dwell: <msg>" and exits with
 * the status.  Messages about input start with "FILE:LINE: ". */
#ifndef DWELL_DIAG_H
#define DWELL_DIAG_H

#include <stddef.h>
#include <stdint.h>

enum {
	DW_OK = 0,        /* success */
	DW_EUSAGE = 1,    /* bad command line */
	DW_EINPUT = 2,    /* bad input file or value */
	DW_EBUDGET = 3,   /* over budget, or verification failed */
	DW_EINTERNAL = 4  /* internal error, resource failure */
};

typedef struct dw_error {
	int status;       /* one of the DW_E* values, DW_OK when clear */
	char msg[1024];   /* message without the "dwell: " prefix */
} dw_error;

/* Record an error; returns status so callers can `return dw_fail(...)`.
 * The first error recorded wins (later calls are ignored). */
int dw_fail(dw_error *e, int status, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));

/* Same, prefixed with "FILE:LINE: " (line 0 prints FILE only). */
int dw_fail_at(dw_error *e, int status, const char *file, long line,
	const char *fmt, ...) __attribute__((format(printf, 5, 6)));

/* Allocation that reports failure through e (returns NULL). */
void *dw_alloc(dw_error *e, size_t count, size_t size);

/* Overflow-checked arithmetic on counts: saturate at UINT64_MAX and set
 * *flag (if flag is not NULL) instead of wrapping. */
uint64_t dw_add_sat(uint64_t a, uint64_t b, int *flag);
uint64_t dw_mul_sat(uint64_t a, uint64_t b, int *flag);

#endif
