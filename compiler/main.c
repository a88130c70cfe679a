/* main.c - the dwell command line: dispatch to a subcommand (cli.h).
 * Takes: argv.  Gives: the subcommand's exit status. */
#include <stdio.h>
#include <string.h>

#include "dwell/dwell.h"

static int cmd_version(int argc, char **argv)
{
	(void)argc;
	(void)argv;
	printf("dwell %s\n", DWELL_VERSION);
	return DW_OK;
}

typedef struct command {
	const char *name;
	int (*run)(int argc, char **argv);
	const char *summary;
} command;

/* One line per subcommand. */
static const command commands[] = {
	{"compile", dw_cmd_compile, "PROBLEM.yaml [-o DIR] [--instances K] [--flat] [--set k=v]..."},
	{"cost",    dw_cmd_cost,    "PROBLEM.yaml [--json] [--set k=v]...   (ledger only, no circuit)"},
	{"inspect", dw_cmd_inspect, "PROBLEM.yaml [--set k=v]...   (analysis and schedule preview)"},
	{"verify",  dw_cmd_verify,  "PROBLEM.yaml [--instances K] [--json] [--set k=v]...  (simulate, compare with x)"},
	{"version", cmd_version, "  (print the version)"},
	{"diff", dw_cmd_diff, "A.json B.json [--json]  (ledger deltas, per figure and per stage)"},
	{"check", dw_cmd_check, "LEDGER.json --budget B.yaml  (exit 3 when over budget)"},
	{"run", dw_cmd_run, "CIRCUIT.qasm [--param name=value]... [--json] [--seed S]"},
	{"synth", dw_cmd_synth, "ANGLE --precision EPS [--json]  (Clifford+T sequence for rz)"},
};

static void usage(FILE *f)
{
	fprintf(f, "usage: dwell COMMAND ARGS...\n\ncommands:\n");
	for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
		fprintf(f, "  dwell %-8s %s\n", commands[i].name, commands[i].summary);
	fprintf(f, "\nexit status: 0 ok, 1 usage, 2 bad input, 3 over budget or "
		"verification failed, 4 internal error\n");
}

int main(int argc, char **argv)
{
	if (argc < 2) {
		usage(stderr);
		return DW_EUSAGE;
	}
	if (!strcmp(argv[1], "-h") || !strcmp(argv[1], "--help") || !strcmp(argv[1], "help")) {
		usage(stdout);
		return DW_OK;
	}
	if (!strcmp(argv[1], "--version")) {
		printf("dwell %s\n", DWELL_VERSION);
		return DW_OK;
	}
	for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
		if (!strcmp(argv[1], commands[i].name))
			return commands[i].run(argc - 1, argv + 1);
	fprintf(stderr, "dwell: unknown command '%s'\n", argv[1]);
	usage(stderr);
	return DW_EUSAGE;
}
