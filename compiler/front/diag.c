/* diag.c - error records and checked arithmetic (see include/dwell/diag.h).
 * Takes: formatted messages, sizes.  Gives: filled dw_error, checked counts. */
#include "dwell/diag.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>

int dw_fail(dw_error *e, int status, const char *fmt, ...)
{
	if (e && e->status == DW_OK) {
		va_list ap;
		va_start(ap, fmt);
		vsnprintf(e->msg, sizeof e->msg, fmt, ap);
		va_end(ap);
		e->status = status;
	}
	return status;
}

int dw_fail_at(dw_error *e, int status, const char *file, long line,
	const char *fmt, ...)
{
	if (e && e->status == DW_OK) {
		int n = line > 0
			? snprintf(e->msg, sizeof e->msg, "%s:%ld: ", file, line)
			: snprintf(e->msg, sizeof e->msg, "%s: ", file);
		if (n < 0 || (size_t)n >= sizeof e->msg)
			n = 0;
		va_list ap;
		va_start(ap, fmt);
		vsnprintf(e->msg + n, sizeof e->msg - (size_t)n, fmt, ap);
		va_end(ap);
		e->status = status;
	}
	return status;
}

void *dw_alloc(dw_error *e, size_t count, size_t size)
{
	if (count == 0)
		count = 1;
	if (size != 0 && count > SIZE_MAX / size) {
		dw_fail(e, DW_EINTERNAL, "allocation of %zu x %zu bytes overflows",
			count, size);
		return NULL;
	}
	void *p = calloc(count, size);
	if (!p)
		dw_fail(e, DW_EINTERNAL, "out of memory (%zu x %zu bytes)",
			count, size);
	return p;
}

uint64_t dw_add_sat(uint64_t a, uint64_t b, int *flag)
{
	if (a > UINT64_MAX - b) {
		if (flag)
			*flag = 1;
		return UINT64_MAX;
	}
	return a + b;
}

uint64_t dw_mul_sat(uint64_t a, uint64_t b, int *flag)
{
	if (a != 0 && b > UINT64_MAX / a) {
		if (flag)
			*flag = 1;
		return UINT64_MAX;
	}
	return a * b;
}
