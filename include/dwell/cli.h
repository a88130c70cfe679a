/* cli.h - the subcommands of the dwell binary.  Each takes the arguments
 * after "dwell" (argv[0] is the subcommand name) and returns the exit
 * status (DESIGN 10: 0 ok, 1 usage, 2 bad input, 3 over budget or
 * verification failed, 4 internal error).  They print their own output;
 * errors go to stderr as "dwell: FILE:LINE: message". */
#ifndef DWELL_CLI_H
#define DWELL_CLI_H

#include "dwell/diag.h"

int dw_cmd_compile(int argc, char **argv);
int dw_cmd_cost(int argc, char **argv);
int dw_cmd_inspect(int argc, char **argv);
int dw_cmd_verify(int argc, char **argv);
int dw_cmd_diff(int argc, char **argv);
int dw_cmd_check(int argc, char **argv);
int dw_cmd_run(int argc, char **argv);
int dw_cmd_synth(int argc, char **argv);

/* Print "dwell: msg" to stderr and return the status of e. */
int dw_report(const struct dw_error *e);

#endif
