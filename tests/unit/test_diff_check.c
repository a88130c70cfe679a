/* test_diff_check.c - ledger deltas (dwell diff) and the budget audit
 * (dwell check) on the hand-written ledgers in tests/cases/ledger.
 * Takes: base.json, changed.json, the budget-*.yaml files there.  Gives:
 * checks of every delta and percentage, stage matching, the --json output
 * read back, and the exit statuses and messages of check.
 *
 * Outside reference: the expected deltas and percentages were computed
 * from the same two files with Debian's python3 (json module, exact
 * integer arithmetic, (B - A) / |A| * 100 in IEEE double); the percentage
 * formula itself is common practice. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "dwell/audit.h"
#include "dwell/cli.h"
#include "dwell/json.h"
#include "check.h"

#define LEDGERS "tests/cases/ledger/"

static dw_json *load(const char *path)
{
	dw_error err = {0};
	dw_json *v = NULL;
	if (dw_json_parse_file(path, &v, &err))
		fprintf(stderr, "%s\n", err.msg);
	return v;
}

static const dw_delta *find(const dw_delta *rows, size_t n, const char *name)
{
	for (size_t i = 0; i < n; i++)
		if (!strcmp(rows[i].name, name))
			return &rows[i];
	return NULL;
}

/* An exact integer delta and, when pct_known, its percentage. */
static void expect_delta(const dw_delta *rows, size_t n, const char *name,
	dw_delta_kind kind, int64_t delta, int pct_known, double pct)
{
	const dw_delta *d = find(rows, n, name);
	CHECK(d != NULL, "row %s missing", name);
	if (!d)
		return;
	CHECK(d->kind == kind, "%s: kind %d, want %d", name, d->kind, kind);
	CHECK(d->exact, "%s: not exact", name);
	uint64_t mag = delta < 0 ? (uint64_t)(-delta) : (uint64_t)delta;
	CHECK(d->delta_mag == mag && d->delta_neg == (delta < 0), "%s: delta %s%llu, want %lld",
		name, d->delta_neg ? "-" : "", (unsigned long long)d->delta_mag, (long long)delta);
	CHECK(d->has_pct == pct_known, "%s: has_pct %d", name, d->has_pct);
	if (pct_known)
		CHECK_NEAR(d->pct, pct, fabs(pct) * 1e-12, name);
}

static void test_diff_library(void)
{
	dw_json *a = load(LEDGERS "base.json"), *b = load(LEDGERS "changed.json");
	CHECK(a && b, "sample ledgers load");
	if (!a || !b)
		goto out;
	dw_ledger_diff d;
	dw_error err = {0};
	CHECK(dw_ledger_diff_build(a, "A", b, "B", &d, &err) == DW_OK, "build: %s", err.msg);
	if (err.status)
		goto out;
	/* 32 numeric leaves in A (outside stages) plus gates.ccx only in B */
	CHECK(d.nfigure == 33, "figures %zu", d.nfigure);
	CHECK(!strcmp(d.figure[0].name, "problem.n"), "first %s", d.figure[0].name);
	CHECK(!strcmp(d.figure[d.nfigure - 1].name, "gates.ccx"), "B-only last: %s",
		d.figure[d.nfigure - 1].name);
	const dw_delta *f = d.figure;
	size_t n = d.nfigure;
	expect_delta(f, n, "qubits.total", DW_DELTA_CHANGED, 1, 1, 16.666666666666664);
	expect_delta(f, n, "qubits.registers.work", DW_DELTA_CHANGED, 1, 1, 50.0);
	expect_delta(f, n, "qubits.registers.sys", DW_DELTA_SAME, 0, 1, 0.0);
	expect_delta(f, n, "gates.cx", DW_DELTA_CHANGED, 300, 1, 25.0);
	expect_delta(f, n, "gates.x", DW_DELTA_GONE, -80, 0, 0);
	expect_delta(f, n, "gates.ccx", DW_DELTA_NEW, 16, 0, 0);
	expect_delta(f, n, "schedule.steps", DW_DELTA_CHANGED, 10, 1, 25.0);
	/* above 2^53: doubles cannot see these deltas, the exact path must */
	expect_delta(f, n, "t_count", DW_DELTA_CHANGED, 2, 1, 2.2204460492503128e-14);
	expect_delta(f, n, "t_depth", DW_DELTA_CHANGED, -1, 1, -5.421010862427522e-18);
	expect_delta(f, n, "toffoli_count", DW_DELTA_CHANGED, 16, 0, 0); /* A is 0: n/a */
	expect_delta(f, n, "measure_count", DW_DELTA_SAME, 0, 0, 0);
	expect_delta(f, n, "gate_count", DW_DELTA_CHANGED, 316, 1, 15.192307692307692);
	expect_delta(f, n, "clifford_count", DW_DELTA_CHANGED, 220, 1, 12.5);
	const dw_delta *pl = find(f, n, "schedule.path_length");
	CHECK(pl && !pl->exact && pl->kind == DW_DELTA_CHANGED, "path_length inexact");
	if (pl) {
		CHECK_NEAR(pl->delta, 0.6499999999999999, 1e-15, "path_length delta");
		CHECK_NEAR(pl->pct, 20.0, 1e-12, "path_length pct");
	}
	const dw_delta *al = find(f, n, "problem.alpha");
	CHECK(al && al->kind == DW_DELTA_SAME, "alpha 4.0 = 4.0");
	/* non-numeric leaves: only schedule.path differs */
	CHECK(d.nsetting == 1 && !strcmp(d.setting[0].name, "schedule.path")
		&& !strcmp(d.setting[0].a->str, "gap-adapted") && !strcmp(d.setting[0].b->str, "linear"),
		"settings %zu", d.nsetting);
	CHECK(!d.problem_differs, "same problem");

	/* stages: A's order, then B-only */
	static const char *order[] = {"state_preparation", "reflections", "rotations",
		"idle_padding", "oracles"};
	CHECK(d.nstage == 5, "stages %zu", d.nstage);
	for (size_t i = 0; i < 5 && i < d.nstage; i++)
		CHECK(!strcmp(d.stage[i].stage, order[i]), "stage %zu: %s", i, d.stage[i].stage);
	if (d.nstage == 5) {
		CHECK(d.stage[3].in_a && !d.stage[3].in_b && d.stage[4].in_b && !d.stage[4].in_a,
			"one-sided stages");
		const dw_stage_delta *rot = &d.stage[2];
		CHECK(rot->nfield == 3, "rotations fields %zu", rot->nfield);
		expect_delta(rot->field, rot->nfield, "gates", DW_DELTA_CHANGED, 104, 1, 8.227848101265822);
		expect_delta(rot->field, rot->nfield, "t_count", DW_DELTA_CHANGED, -1110, 1,
			-1.2323475573344708e-11);
		expect_delta(rot->field, rot->nfield, "depth", DW_DELTA_CHANGED, 338, 1, 24.299065420560748);
		const dw_stage_delta *sp = &d.stage[0];
		expect_delta(sp->field, sp->nfield, "t_count", DW_DELTA_SAME, 0, 0, 0);
		const dw_stage_delta *pad = &d.stage[3];
		expect_delta(pad->field, pad->nfield, "depth", DW_DELTA_GONE, -4, 0, 0);
		const dw_stage_delta *orc = &d.stage[4];
		expect_delta(orc->field, orc->nfield, "t_count", DW_DELTA_NEW, 112, 0, 0);
	}
	dw_ledger_diff_free(&d);
out:
	dw_json_free(a);
	dw_json_free(b);
}

static dw_json *parse_text(const char *text)
{
	dw_error err = {0};
	dw_json *v = NULL;
	if (dw_json_parse_string(text, strlen(text), "mem", &v, &err))
		fprintf(stderr, "%s\n", err.msg);
	return v;
}

/* Repeated stage names pair in order; differing problems are allowed;
 * a mixed integer/fraction pair is compared as doubles; negatives. */
static void test_diff_edges(void)
{
	dw_json *a = parse_text("{\"problem\": {\"name\": \"p1\"}, \"x\": 3, \"y\": -5,"
		" \"stages\": [{\"stage\": \"step\", \"gates\": 1}, {\"stage\": \"step\", \"gates\": 2}]}");
	dw_json *b = parse_text("{\"problem\": {\"name\": \"p2\"}, \"x\": 3.5, \"y\": 4,"
		" \"stages\": [{\"stage\": \"step\", \"gates\": 10}, {\"stage\": \"step\", \"gates\": 20},"
		" {\"stage\": \"step\", \"gates\": 30}]}");
	dw_ledger_diff d;
	dw_error err = {0};
	CHECK(a && b && dw_ledger_diff_build(a, "A", b, "B", &d, &err) == DW_OK, "build: %s", err.msg);
	if (!err.status && a && b) {
		CHECK(d.problem_differs == 1, "problem names differ");
		const dw_delta *x = find(d.figure, d.nfigure, "x");
		CHECK(x && !x->exact && x->delta == 0.5, "3 -> 3.5 inexact");
		if (x)
			CHECK_NEAR(x->pct, 50.0 / 3.0, 1e-12, "3 -> 3.5 percent");
		/* -5 -> 4: +9, relative to |A| = 5: +180% */
		expect_delta(d.figure, d.nfigure, "y", DW_DELTA_CHANGED, 9, 1, 180.0);
		CHECK(d.nstage == 3, "three stages %zu", d.nstage);
		if (d.nstage == 3) {
			expect_delta(d.stage[0].field, d.stage[0].nfield, "gates", DW_DELTA_CHANGED, 9, 1, 900.0);
			expect_delta(d.stage[1].field, d.stage[1].nfield, "gates", DW_DELTA_CHANGED, 18, 1, 900.0);
			CHECK(!d.stage[2].in_a && d.stage[2].in_b, "third step only in B");
			expect_delta(d.stage[2].field, d.stage[2].nfield, "gates", DW_DELTA_NEW, 30, 0, 0);
		}
		dw_ledger_diff_free(&d);
	}
	dw_json_free(a);
	dw_json_free(b);

	a = parse_text("{\"stages\":[{\"gates\":1}]}");
	b = parse_text("{}");
	memset(&err, 0, sizeof err);
	CHECK(a && b && dw_ledger_diff_build(a, "A.json", b, "B.json", &d, &err) == DW_EINPUT
		&& !strcmp(err.msg, "A.json:1:12: stage entry 1 is not an object with a string \"stage\" name"),
		"nameless stage: %s", err.msg);
	dw_json_free(a);
	dw_json_free(b);
}

static char *slurp(FILE *f)
{
	long len;
	fflush(f);
	if (fseek(f, 0, SEEK_END) || (len = ftell(f)) < 0 || fseek(f, 0, SEEK_SET))
		return NULL;
	char *s = calloc((size_t)len + 1, 1);
	if (s && fread(s, 1, (size_t)len, f) != (size_t)len) {
		free(s);
		return NULL;
	}
	return s;
}

/* Run a subcommand with stdout and stderr captured. */
static int run(int (*cmd)(int, char **), int argc, char **argv, char **out, char **errs)
{
	fflush(stdout);
	fflush(stderr);
	FILE *fo = tmpfile(), *fe = tmpfile();
	int so = dup(1), se = dup(2);
	dup2(fileno(fo), 1);
	dup2(fileno(fe), 2);
	int st = cmd(argc, argv);
	fflush(stdout);
	fflush(stderr);
	dup2(so, 1);
	dup2(se, 2);
	close(so);
	close(se);
	*out = slurp(fo);
	*errs = slurp(fe);
	fclose(fo);
	fclose(fe);
	return st;
}

/* The figure entry named `name` in the --json output. */
static const dw_json *json_row(const dw_json *list, const char *label, const char *name)
{
	for (size_t i = 0; list && i < list->n; i++) {
		const dw_json *k = dw_json_member(&list->item[i], label);
		if (k && k->kind == DW_JSON_STRING && !strcmp(k->str, name))
			return &list->item[i];
	}
	return NULL;
}

static void test_diff_command(void)
{
	char *out, *errs;
	char *argv[] = {"diff", LEDGERS "base.json", LEDGERS "changed.json", "--json", NULL};
	int st = run(dw_cmd_diff, 4, argv, &out, &errs);
	CHECK(st == DW_OK, "diff --json exit %d: %s", st, errs);
	dw_json *doc = NULL;
	dw_error err = {0};
	CHECK(out && dw_json_parse_string(out, strlen(out), "<diff output>", &doc, &err) == DW_OK,
		"--json output parses: %s", err.msg);
	const dw_json *figs = dw_json_member(doc, "figures");
	CHECK(figs && figs->n == 33, "33 figures in JSON");
	const dw_json *t = json_row(figs, "figure", "t_count");
	uint64_t u = 0;
	CHECK(t && dw_json_get_u64(dw_json_member(t, "delta"), &u) == DW_OK && u == 2, "t_count delta 2");
	CHECK(t && dw_json_get_u64(dw_json_member(t, "b"), &u) == DW_OK && u == 9007199254740995u,
		"t_count b exact");
	const dw_json *dep = json_row(figs, "figure", "depth");
	CHECK(dep && dw_json_member(dep, "change_percent")->num == 25.0
		&& !strcmp(dw_json_member(dep, "status")->str, "changed"), "depth +25%%");
	const dw_json *td = json_row(figs, "figure", "t_depth");
	CHECK(td && !strcmp(dw_json_member(td, "delta")->str, "-1"), "t_depth delta -1");
	const dw_json *x = json_row(figs, "figure", "gates.x");
	CHECK(x && !strcmp(dw_json_member(x, "status")->str, "gone")
		&& dw_json_member(x, "b")->kind == DW_JSON_NULL
		&& dw_json_member(x, "change_percent")->kind == DW_JSON_NULL, "gates.x gone");
	const dw_json *tof = json_row(figs, "figure", "toffoli_count");
	CHECK(tof && dw_json_member(tof, "change_percent")->kind == DW_JSON_NULL, "A = 0: no percentage");
	const dw_json *stages = dw_json_member(doc, "stages");
	const dw_json *rot = json_row(stages, "stage", "rotations");
	const dw_json *rt = rot ? json_row(dw_json_member(rot, "fields"), "field", "t_count") : NULL;
	CHECK(rt && !strcmp(dw_json_member(rt, "delta")->str, "-1110"), "rotations t_count -1110");
	const dw_json *orc = json_row(stages, "stage", "oracles");
	CHECK(orc && !dw_json_member(orc, "in_a")->boolean && dw_json_member(orc, "in_b")->boolean,
		"oracles only in B");
	CHECK(dw_json_path(doc, "other_differences.0.b") &&
		!strcmp(dw_json_path(doc, "other_differences.0.b")->str, "linear"), "path setting");
	dw_json_free(doc);
	free(out);
	free(errs);

	/* the readable report: a changed row and a one-sided stage */
	argv[3] = NULL;
	st = run(dw_cmd_diff, 3, argv, &out, &errs);
	CHECK(st == DW_OK && out, "diff exit %d", st);
	CHECK(out && strstr(out, "+500") && strstr(out, "+25.00%"), "depth row in text");
	CHECK(out && strstr(out, "[oracles]  only in B"), "one-sided stage marked");
	CHECK(out && strstr(out, "(unchanged)") && strstr(out, "gates.h=480"), "unchanged grouped");
	free(out);
	free(errs);

	/* a malformed ledger is bad input */
	char *bad[] = {"diff", LEDGERS "base.json", LEDGERS "bad-trailing-comma.json", NULL};
	st = run(dw_cmd_diff, 3, bad, &out, &errs);
	CHECK(st == DW_EINPUT && errs && strstr(errs, "bad-trailing-comma.json:5:1: trailing comma"),
		"diff of a bad ledger: %d %s", st, errs ? errs : "");
	free(out);
	free(errs);
}

static void test_audit_library(void)
{
	dw_json *ledger = load(LEDGERS "base.json");
	if (!ledger)
		return;
	dw_budget b = {0};
	/* 2^53 as a limit: t_count 2^53 + 1 is over, which a double
	 * comparison (9007199254740993 rounds to 2^53) would miss */
	b.line[b.n++] = (dw_budget_line){"t_count", 9007199254740992.0, 2};
	b.line[b.n++] = (dw_budget_line){"gates.cx", 1200, 3};        /* equal: within */
	b.line[b.n++] = (dw_budget_line){"qubits", 5, 4};             /* 6 > 5 */
	b.line[b.n++] = (dw_budget_line){"t_depth", 18446744073709551616.0, 5}; /* 2^64: within */
	b.line[b.n++] = (dw_budget_line){"depth", 1999.5, 6};         /* 2000 > 1999.5 */
	FILE *rep = tmpfile();
	dw_error err = {0};
	int st = dw_budget_audit(ledger, &b, "b.yaml", rep, &err);
	char *text = slurp(rep);
	fclose(rep);
	CHECK(st == DW_EBUDGET, "status %d", st);
	CHECK(!strcmp(err.msg, "b.yaml: 3 of 5 budget limits exceeded"), "summary: %s", err.msg);
	const char *want =
		"dwell: b.yaml:2: over budget: t_count is 9007199254740993 against a limit of "
		"9007199254740992, 1 too many (+<0.01%)\n"
		"dwell: b.yaml:4: over budget: qubits (qubits.total) is 6 against a limit of 5, "
		"1 too many (+20.00%)\n"
		"dwell: b.yaml:6: over budget: depth is 2000 against a limit of 1999.5, "
		"0.5 too many (+0.03%)\n";
	CHECK(text && !strcmp(text, want), "report:\n%s", text ? text : "");
	free(text);

	/* all within */
	dw_budget ok = {0};
	ok.line[ok.n++] = (dw_budget_line){"gate_count", 2080, 1};
	ok.line[ok.n++] = (dw_budget_line){"t_depth", 18446744073709551616.0, 2};
	memset(&err, 0, sizeof err);
	CHECK(dw_budget_audit(ledger, &ok, "ok.yaml", NULL, &err) == DW_OK, "within: %s", err.msg);

	/* unknown figures name the budget line */
	dw_budget bad = {0};
	bad.line[bad.n++] = (dw_budget_line){"depth", 1, 1};
	bad.line[bad.n++] = (dw_budget_line){"gates.ccx", 1, 7};
	memset(&err, 0, sizeof err);
	rep = tmpfile();
	CHECK(dw_budget_audit(ledger, &bad, "x.yaml", rep, &err) == DW_EINPUT
		&& !strncmp(err.msg, "x.yaml:7: unknown budget figure 'gates.ccx'", 43), "unknown: %s", err.msg);
	text = slurp(rep);
	fclose(rep);
	CHECK(text && !*text, "no partial report before a bad key: %s", text ? text : "");
	free(text);
	bad.line[1] = (dw_budget_line){"problem.variant", 1, 8};
	memset(&err, 0, sizeof err);
	CHECK(dw_budget_audit(ledger, &bad, "x.yaml", NULL, &err) == DW_EINPUT
		&& !strcmp(err.msg, "x.yaml:8: budget figure 'problem.variant' names a ledger field that is not a number"),
		"string field: %s", err.msg);
	dw_json_free(ledger);

	/* the compiler's path: a ledger held in memory */
	const char *mem = "{\"qubits\": {\"total\": 41}, \"t_count\": 18446744073709551615}";
	dw_json *v = NULL;
	memset(&err, 0, sizeof err);
	CHECK(dw_json_parse_string(mem, strlen(mem), "<ledger>", &v, &err) == DW_OK, "in-memory ledger");
	dw_budget m = {0};
	m.line[m.n++] = (dw_budget_line){"qubits", 40, 3};
	m.line[m.n++] = (dw_budget_line){"t_count", 1.8446744073709550e19, 4}; /* < 2^64 - 1 */
	CHECK(dw_budget_audit(v, &m, "p.yaml", NULL, &err) == DW_EBUDGET
		&& !strcmp(err.msg, "p.yaml: 2 of 2 budget limits exceeded"), "in memory: %s", err.msg);
	dw_json_free(v);
}

static void test_check_command(void)
{
	char *out, *errs;
	char *within[] = {"check", LEDGERS "base.json", "--budget", LEDGERS "budget-within.yaml", NULL};
	int st = run(dw_cmd_check, 4, within, &out, &errs);
	CHECK(st == DW_OK, "within: exit %d %s", st, errs ? errs : "");
	CHECK(out && strstr(out, "within budget (4 limits"), "within line: %s", out ? out : "");
	free(out);
	free(errs);

	char *over[] = {"check", LEDGERS "base.json", "--budget", LEDGERS "budget-over.yaml", NULL};
	st = run(dw_cmd_check, 4, over, &out, &errs);
	CHECK(st == DW_EBUDGET, "over: exit %d", st);
	CHECK(errs && strstr(errs, "budget-over.yaml:3: over budget: qubits (qubits.total) is 6")
		&& strstr(errs, "budget-over.yaml:4: over budget: t_count is 9007199254740993")
		&& !strstr(errs, ":5: over") && !strstr(errs, ":6: over"),
		"every exceeded line named, no other:\n%s", errs ? errs : "");
	free(out);
	free(errs);

	char *unknown[] = {"check", LEDGERS "base.json", "--budget", LEDGERS "budget-unknown.yaml", NULL};
	st = run(dw_cmd_check, 4, unknown, &out, &errs);
	CHECK(st == DW_EINPUT && errs && strstr(errs, "budget-unknown.yaml:3"),
		"unknown key: exit %d %s", st, errs ? errs : "");
	free(out);
	free(errs);

	char *bad[] = {"check", LEDGERS "bad-trailing-comma.json", "--budget",
		LEDGERS "budget-within.yaml", NULL};
	st = run(dw_cmd_check, 4, bad, &out, &errs);
	CHECK(st == DW_EINPUT && errs && strstr(errs, "bad-trailing-comma.json:5:1:"),
		"malformed ledger: exit %d %s", st, errs ? errs : "");
	free(out);
	free(errs);

	char *usage[] = {"check", LEDGERS "base.json", NULL};
	st = run(dw_cmd_check, 2, usage, &out, &errs);
	CHECK(st == DW_EUSAGE, "no --budget: exit %d", st);
	free(out);
	free(errs);
}

int main(void)
{
	test_diff_library();
	test_diff_edges();
	test_diff_command();
	test_audit_library();
	test_check_command();
	return check_done();
}
