/* budget_check.c - audit a cost ledger against a budget (dwell check, and
 * the `budget:` section of a problem file at compile time).
 * Takes: a parsed ledger (dwell/json.h) and a dw_budget.  Gives: one
 * report line per exceeded figure and DW_EBUDGET, or DW_OK; DW_EINPUT
 * "BUDGET:LINE: ..." when a budget key names no numeric ledger figure.
 * Integer figures are compared with the limit exactly (no rounding of
 * counts above 2^53). */
#include "dwell/audit.h"

#include <inttypes.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Budget keys with a fixed meaning, and where the ledger keeps them. */
static const struct {
	const char *key, *path;
} named_figures[] = {
	{"qubits", "qubits.total"},
	{"t_count", "t_count"},
	{"t_depth", "t_depth"},
	{"depth", "depth"},
	{"toffoli_count", "toffoli_count"},
	{"rotation_count", "rotation_count"},
	{"clifford_count", "clifford_count"},
	{"two_qubit_count", "two_qubit_count"},
	{"measure_count", "measure_count"},
	{"gate_count", "gate_count"},
};
#define N_NAMED (sizeof named_figures / sizeof named_figures[0])

static int is_named(const char *key)
{
	for (size_t i = 0; i < N_NAMED; i++)
		if (!strcmp(named_figures[i].key, key))
			return 1;
	return 0;
}

const char *dw_budget_figure_path(const char *key)
{
	for (size_t i = 0; i < N_NAMED; i++)
		if (!strcmp(named_figures[i].key, key))
			return named_figures[i].path;
	return key;
}

/* Shortest of %.15g..%.17g that reads back as x. */
static void format_limit(char *buf, size_t size, double x)
{
	for (int prec = 15; prec <= 17; prec++) {
		snprintf(buf, size, "%.*g", prec, x);
		if (strtod(buf, NULL) == x)
			return;
	}
}

/* value > limit, exactly when the value is a non-negative integer. */
static int exceeds(const dw_json *v, double limit)
{
	if (v->is_int && !v->negative) {
		if (limit >= 18446744073709551616.0) /* 2^64 */
			return 0;
		if (limit < 0)
			return 1;
		/* for an integer v and limit >= 0: v > limit iff v > floor(limit) */
		return v->mag > (uint64_t)limit;
	}
	return v->num > limit;
}

/* "ORIGIN:LINE" or "ORIGIN" when the line is unknown. */
static void format_where(char *buf, size_t size, const char *origin, long line)
{
	if (line > 0)
		snprintf(buf, size, "%s:%ld", origin, line);
	else
		snprintf(buf, size, "%s", origin);
}

static void write_excess(FILE *report, const char *where, const dw_budget_line *l,
	const char *path, const dw_json *v)
{
	char lim[40], excess[48];
	if (l->limit >= 0 && l->limit < 18446744073709551616.0 && l->limit == floor(l->limit))
		snprintf(lim, sizeof lim, "%" PRIu64, (uint64_t)l->limit);
	else
		format_limit(lim, sizeof lim, l->limit);
	if (v->is_int && !v->negative && l->limit >= 0 && l->limit == floor(l->limit))
		snprintf(excess, sizeof excess, "%" PRIu64, v->mag - (uint64_t)l->limit);
	else
		snprintf(excess, sizeof excess, "%.6g", v->num - l->limit);
	fprintf(report, "dwell: %s: over budget: %s", where, l->key);
	if (strcmp(path, l->key))
		fprintf(report, " (%s)", path);
	fprintf(report, " is %s against a limit of %s, %s too many", v->str, lim, excess);
	if (l->limit > 0) {
		double pct = (v->num - l->limit) / l->limit * 100.0;
		if (pct < 0.005)
			fprintf(report, " (+<0.01%%)");
		else
			fprintf(report, " (+%.2f%%)", pct);
	}
	fputc('\n', report);
}

int dw_budget_audit(const dw_json *ledger, const dw_budget *budget,
	const char *budget_origin, FILE *report, dw_error *err)
{
	const char *origin = budget_origin ? budget_origin : "<budget>";
	const dw_json *value[DW_BUDGET_MAX];
	char where[400];
	if (!ledger || ledger->kind != DW_JSON_OBJECT)
		return dw_fail(err, DW_EINPUT, "the ledger is not a JSON object");
	if (budget->n > DW_BUDGET_MAX)
		return dw_fail(err, DW_EINTERNAL, "%s: budget with %zu lines (at most %d)",
			origin, budget->n, DW_BUDGET_MAX);
	/* First every key, so a bad budget writes no partial report. */
	for (size_t i = 0; i < budget->n; i++) {
		const dw_budget_line *l = &budget->line[i];
		if (!memchr(l->key, '\0', sizeof l->key))
			return dw_fail_at(err, DW_EINPUT, origin, l->line, "budget key too long");
		const char *path = dw_budget_figure_path(l->key);
		const dw_json *v = dw_json_path(ledger, path);
		if (!v && is_named(l->key))
			return dw_fail_at(err, DW_EINPUT, origin, l->line,
				"the ledger has no %s figure to compare with", path);
		if (!v)
			return dw_fail_at(err, DW_EINPUT, origin, l->line,
				"unknown budget figure '%s': neither a known figure (qubits, "
				"t_count, t_depth, depth, ...) nor a field of the ledger", l->key);
		if (v->kind != DW_JSON_NUMBER)
			return dw_fail_at(err, DW_EINPUT, origin, l->line,
				"budget figure '%s' names a ledger field that is not a number", l->key);
		if (isnan(l->limit))
			return dw_fail_at(err, DW_EINPUT, origin, l->line,
				"the limit for %s is not a number", l->key);
		value[i] = v;
	}
	size_t over = 0;
	for (size_t i = 0; i < budget->n; i++) {
		const dw_budget_line *l = &budget->line[i];
		if (!exceeds(value[i], l->limit))
			continue;
		over++;
		if (report) {
			format_where(where, sizeof where, origin, l->line);
			write_excess(report, where, l, dw_budget_figure_path(l->key), value[i]);
		}
	}
	if (over)
		return dw_fail(err, DW_EBUDGET, "%s: %zu of %zu budget limits exceeded",
			origin, over, budget->n);
	return DW_OK;
}
