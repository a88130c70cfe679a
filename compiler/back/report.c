/* report.c - print a dw_error the way every subcommand does.
 * Takes: a filled dw_error.  Gives: "dwell: message" on stderr, the status. */
#include <stdio.h>

#include "dwell/dwell.h"

int dw_report(const dw_error *e)
{
	if (e->status != DW_OK)
		fprintf(stderr, "dwell: %s\n", e->msg);
	return e->status;
}
