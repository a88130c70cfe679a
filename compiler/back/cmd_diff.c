/* cmd_diff.c - the `dwell diff` and `dwell check` subcommands.
 * Takes: ledger JSON files (and a budget YAML file for check).
 * Gives: diff - the per-figure and per-stage deltas on stdout (text or
 * --json), exit 0; check - exit 3 with one stderr line per exceeded budget
 * line, or exit 0 with one line on stdout.  Bad input: exit 2. */
#include <stdio.h>
#include <string.h>

#include "dwell/audit.h"
#include "dwell/budget.h"
#include "dwell/cli.h"
#include "dwell/json.h"

static void diff_usage(FILE *f)
{
	fprintf(f, "usage: dwell diff A.json B.json [--json]\n"
		"  compare two cost ledgers: every numeric figure and every stage,\n"
		"  with B - A and the change relative to A\n");
}

static void check_usage(FILE *f)
{
	fprintf(f, "usage: dwell check LEDGER.json --budget BUDGET.yaml\n"
		"  exit 3 when a ledger figure is over its budget limit\n");
}

/* Parse a ledger file and require an object. */
static int load_ledger(const char *path, dw_json **out, dw_error *err)
{
	if (dw_json_parse_file(path, out, err))
		return err->status;
	if ((*out)->kind != DW_JSON_OBJECT) {
		dw_fail(err, DW_EINPUT, "%s:%ld:%ld: a ledger is a JSON object", path,
			(*out)->line, (*out)->col);
		dw_json_free(*out);
		*out = NULL;
	}
	return err->status;
}

int dw_cmd_diff(int argc, char **argv)
{
	const char *file[2] = {NULL, NULL};
	int nfile = 0, as_json = 0;
	for (int i = 1; i < argc; i++) {
		if (!strcmp(argv[i], "--json")) {
			as_json = 1;
		} else if (!strcmp(argv[i], "-h") || !strcmp(argv[i], "--help")) {
			diff_usage(stdout);
			return DW_OK;
		} else if (argv[i][0] == '-' && argv[i][1] != '\0') {
			fprintf(stderr, "dwell: diff: unknown option '%s'\n", argv[i]);
			diff_usage(stderr);
			return DW_EUSAGE;
		} else if (nfile < 2) {
			file[nfile++] = argv[i];
		} else {
			fprintf(stderr, "dwell: diff: more than two ledgers given\n");
			diff_usage(stderr);
			return DW_EUSAGE;
		}
	}
	if (nfile != 2) {
		diff_usage(stderr);
		return DW_EUSAGE;
	}
	dw_error err = {0};
	dw_json *a = NULL, *b = NULL;
	dw_ledger_diff d;
	if (load_ledger(file[0], &a, &err) || load_ledger(file[1], &b, &err)
		|| dw_ledger_diff_build(a, file[0], b, file[1], &d, &err)) {
		dw_json_free(a);
		dw_json_free(b);
		return dw_report(&err);
	}
	if (d.problem_differs) {
		fprintf(stderr, "dwell: warning: the ledgers describe different problems (");
		dw_json_write_string(stderr, d.problem_a->str, d.problem_a->len);
		fprintf(stderr, " and ");
		dw_json_write_string(stderr, d.problem_b->str, d.problem_b->len);
		fprintf(stderr, ")\n");
	}
	if (as_json)
		dw_ledger_diff_write_json(stdout, &d, file[0], file[1]);
	else
		dw_ledger_diff_write_text(stdout, &d, file[0], file[1]);
	dw_ledger_diff_free(&d);
	dw_json_free(a);
	dw_json_free(b);
	if (fflush(stdout) != 0 || ferror(stdout)) {
		fprintf(stderr, "dwell: diff: cannot write the report\n");
		return DW_EINTERNAL;
	}
	return DW_OK;
}

int dw_cmd_check(int argc, char **argv)
{
	const char *ledger_path = NULL, *budget_path = NULL;
	for (int i = 1; i < argc; i++) {
		if (!strcmp(argv[i], "--budget") && i + 1 < argc) {
			budget_path = argv[++i];
		} else if (!strncmp(argv[i], "--budget=", 9)) {
			budget_path = argv[i] + 9;
		} else if (!strcmp(argv[i], "-h") || !strcmp(argv[i], "--help")) {
			check_usage(stdout);
			return DW_OK;
		} else if (argv[i][0] == '-' && argv[i][1] != '\0') {
			fprintf(stderr, "dwell: check: unknown option or missing value '%s'\n", argv[i]);
			check_usage(stderr);
			return DW_EUSAGE;
		} else if (!ledger_path) {
			ledger_path = argv[i];
		} else {
			fprintf(stderr, "dwell: check: more than one ledger given\n");
			check_usage(stderr);
			return DW_EUSAGE;
		}
	}
	if (!ledger_path || !budget_path || !*budget_path) {
		check_usage(stderr);
		return DW_EUSAGE;
	}
	dw_error err = {0};
	dw_json *ledger = NULL;
	dw_budget budget;
	if (load_ledger(ledger_path, &ledger, &err) || dw_budget_load(budget_path, &budget, &err)) {
		dw_json_free(ledger);
		return dw_report(&err);
	}
	fflush(stdout);
	int st = dw_budget_audit(ledger, &budget, budget_path, stderr, &err);
	dw_json_free(ledger);
	if (st == DW_OK)
		printf("%s: within budget (%zu limit%s in %s)\n", ledger_path, budget.n,
			budget.n == 1 ? "" : "s", budget_path);
	return dw_report(&err);
}
