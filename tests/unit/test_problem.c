/* test_problem.c - the problem-file reader (compiler/front/problem.c), the
 * --set overrides and the budget reader, against the key reference in
 * docs/problem-format.md.  Inputs are the files in tests/cases/front/ (all
 * invented examples); the test runs from the project root. */
#include <complex.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"
#include "check.h"

#define CASES "tests/cases/front/"

static bool starts_with(const char *s, const char *prefix)
{
	return !strncmp(s, prefix, strlen(prefix));
}

static bool all_zero(const void *p, size_t n)
{
	const unsigned char *b = p;
	for (size_t i = 0; i < n; i++)
		if (b[i])
			return false;
	return true;
}

static int load(const char *path, const char *const *sets, size_t nsets,
	dw_problem *p, dw_error *e)
{
	memset(e, 0, sizeof *e);
	return dw_problem_load(path, sets, nsets, p, e);
}

static void test_full(void)
{
	dw_problem p;
	dw_error e;
	int rc = load(CASES "good_full.yaml", NULL, 0, &p, &e);
	CHECK(rc == DW_OK, "good_full: %s", e.msg);
	if (rc)
		return;
	CHECK(!strcmp(p.name, "two-qubit toy (invented)"), "name %s", p.name);
	CHECK(!strcmp(p.path, CASES "good_full.yaml"), "path %s", p.path);
	CHECK(p.matrix_kind == DW_MATRIX_PAULI, "kind %d", p.matrix_kind);
	CHECK(p.n == 2 && p.npauli == 3, "n %d npauli %zu", p.n, p.npauli);
	CHECK_NEAR(p.pauli[0].coeff, 1.25, 0, "coeff 0");
	CHECK_NEAR(p.pauli[1].coeff, -0.5, 0, "coeff 1");
	CHECK_NEAR(p.pauli[2].coeff, 0.25, 0, "coeff 2");
	CHECK(!strcmp(p.pauli[0].ops, "II") && !strcmp(p.pauli[1].ops, "XZ")
		&& !strcmp(p.pauli[2].ops, "YY"), "ops");
	/* [1, i, -1, 0] / sqrt(3) */
	CHECK(p.rhs_kind == DW_RHS_AMPLITUDES && p.amps, "rhs kind %d", p.rhs_kind);
	double r3 = 1 / sqrt(3.0);
	CHECK_NEAR(creal(p.amps[0]), r3, 1e-15, "amp 0");
	CHECK_NEAR(cimag(p.amps[1]), r3, 1e-15, "amp 1 imaginary");
	CHECK_NEAR(creal(p.amps[1]), 0, 0, "amp 1 real");
	CHECK_NEAR(creal(p.amps[2]), -r3, 1e-15, "amp 2");
	CHECK_NEAR(cabs(p.amps[3]), 0, 0, "amp 3");
	CHECK_NEAR(p.precision, 0.01, 0, "precision");
	CHECK(p.sched_kind == DW_SCHED_ADIABATIC, "sched kind");
	CHECK(p.path_kind == DW_PATH_LIST, "path kind");
	CHECK_NEAR(p.power, 2.5, 0, "power");
	CHECK(p.npoints == 3, "npoints %zu", p.npoints);
	if (p.npoints == 3) {
		CHECK_NEAR(p.points[0], 0.25, 0, "point 0");
		CHECK_NEAR(p.points[1], 0.5, 0, "point 1");
		CHECK_NEAR(p.points[2], 1.0, 0, "point 2");
	}
	CHECK(p.steps == 400, "steps %lld", (long long)p.steps);
	CHECK(p.seed == UINT64_MAX, "seed %llu", (unsigned long long)p.seed);
	CHECK_NEAR(p.kappa_user, 3.5, 0, "kappa");
	CHECK(p.order == 4 && p.formula_steps == 12 && p.bound == DW_BOUND_NORM, "formula");
	CHECK(p.gates == DW_GATES_CLIFFORD_T && p.uncompute == DW_UNCOMPUTE_MEASURE, "target");
	CHECK(p.value_bits == 20 && p.lookup == DW_LOOKUP_SELECT_SWAP, "oracle");
	CHECK(p.budget.n == 3, "budget n %zu", p.budget.n);
	if (p.budget.n == 3) {
		CHECK(!strcmp(p.budget.line[0].key, "qubits") && p.budget.line[0].limit == 40
			&& p.budget.line[0].line == 31, "budget qubits line %ld",
			p.budget.line[0].line);
		CHECK(!strcmp(p.budget.line[1].key, "t_count") && p.budget.line[1].limit == 1e9,
			"budget t_count");
		CHECK(!strcmp(p.budget.line[2].key, "depth") && p.budget.line[2].limit == 2e6,
			"budget depth");
	}
	CHECK(!p.analysed, "not analysed yet");
	dw_problem_free(&p);
	CHECK(all_zero(&p, sizeof p), "free zeroes the struct");
}

static void test_defaults(void)
{
	dw_problem p;
	dw_error e;
	int rc = load(CASES "good_minimal.yaml", NULL, 0, &p, &e);
	CHECK(rc == DW_OK, "good_minimal: %s", e.msg);
	if (rc)
		return;
	CHECK(!strcmp(p.name, "good_minimal"), "name from file %s", p.name);
	CHECK(p.n == 1 && p.npauli == 1 && !strcmp(p.pauli[0].ops, "Z"), "pauli");
	CHECK(p.rhs_kind == DW_RHS_BASIS && p.basis == 1 && !p.amps, "rhs");
	CHECK_NEAR(p.precision, 0.05, 0, "default precision");
	CHECK(p.sched_kind == DW_SCHED_RANDOMIZED, "default kind");
	CHECK(p.path_kind == DW_PATH_GAP_ADAPTED, "default path");
	CHECK_NEAR(p.power, 1.5, 0, "default power");
	CHECK(p.npoints == 0 && !p.points, "no points");
	CHECK(p.steps == 0 && p.seed == 1 && p.kappa_user == 0, "default steps/seed/kappa");
	CHECK(p.order == 2 && p.formula_steps == 0 && p.bound == DW_BOUND_COMMUTATOR,
		"default formula");
	CHECK(p.gates == DW_GATES_CONTINUOUS && p.uncompute == DW_UNCOMPUTE_UNITARY,
		"default target");
	CHECK(p.value_bits == 0 && p.lookup == DW_LOOKUP_UNARY, "default oracle");
	CHECK(p.budget.n == 0, "no budget");
	dw_problem_free(&p);
}

static void test_stencil(void)
{
	dw_problem p;
	dw_error e;
	int rc = load(CASES "good_stencil.yaml", NULL, 0, &p, &e);
	CHECK(rc == DW_OK, "good_stencil: %s", e.msg);
	if (rc)
		return;
	const dw_stencil *s = &p.stencil;
	CHECK(p.matrix_kind == DW_MATRIX_STENCIL && p.n == 7, "kind %d n %d",
		p.matrix_kind, p.n);
	CHECK(s->dims == 2 && s->shape[0] == 16 && s->shape[1] == 8, "shape");
	CHECK(s->periodic[0] == 1 && s->periodic[1] == 0, "boundary per axis");
	CHECK(s->npoints == 5, "npoints %zu", s->npoints);
	static const int want[5][2] = {{0, 0}, {1, 0}, {-1, 0}, {0, 1}, {0, -1}};
	static const double wantc[5] = {4, -1, -1, -1, -1};
	for (size_t i = 0; i < 5 && i < s->npoints; i++) {
		CHECK(s->offset[i][0] == want[i][0] && s->offset[i][1] == want[i][1],
			"point %zu offset %d,%d", i, s->offset[i][0], s->offset[i][1]);
		CHECK_NEAR(s->coeff[i], wantc[i], 0, "point coefficient");
	}
	CHECK(p.rhs_kind == DW_RHS_UNIFORM, "uniform");
	CHECK(p.path_kind == DW_PATH_POWER && p.steps == 0 && p.kappa_user == 0
		&& p.value_bits == 0, "auto values");
	dw_problem_free(&p);
}

static void test_file_and_product(void)
{
	dw_problem p;
	dw_error e;
	int rc = load(CASES "good_file.yaml", NULL, 0, &p, &e);
	CHECK(rc == DW_OK, "good_file: %s", e.msg);
	if (!rc) {
		CHECK(p.matrix_kind == DW_MATRIX_FILE && p.matrix, "file kind");
		CHECK(!strcmp(p.matrix_file, CASES "spd3.mtx"), "resolved %s", p.matrix_file);
		CHECK(!strcmp(p.rhs_file, CASES "b3.mtx"), "resolved %s", p.rhs_file);
		CHECK(p.matrix->rows == 3 && p.matrix->nnz == 7, "3x3 with 7 entries");
		CHECK(p.n == 2, "n = ceil(log2 3) = %d", p.n);
		/* b = (1, 2, 2) / 3, zero on the padding row */
		CHECK(p.rhs_kind == DW_RHS_FILE && p.amps, "rhs file");
		if (p.amps) {
			CHECK_NEAR(creal(p.amps[0]), 1.0 / 3, 1e-15, "b0");
			CHECK_NEAR(creal(p.amps[1]), 2.0 / 3, 1e-15, "b1");
			CHECK_NEAR(creal(p.amps[2]), 2.0 / 3, 1e-15, "b2");
			CHECK_NEAR(cabs(p.amps[3]), 0, 0, "padding");
		}
		dw_problem_free(&p);
	}
	rc = load(CASES "good_product.yaml", NULL, 0, &p, &e);
	CHECK(rc == DW_OK, "good_product: %s", e.msg);
	if (!rc) {
		CHECK(p.rhs_kind == DW_RHS_PRODUCT && p.nproduct == 3 && p.n == 3, "product");
		CHECK_NEAR(p.product[1][0], 1.0, 0, "theta 1");
		CHECK_NEAR(p.product[1][1], 0.25, 0, "phi 1");
		CHECK_NEAR(p.product[2][1], -1, 0, "phi 2");
		dw_problem_free(&p);
	}
}

/* Every bad-input class: status, the FILE:LINE prefix, the key path. */
static void test_bad_files(void)
{
	static const struct {
		const char *file;
		long line;
		const char *needle;
	} cases[] = {
		{"bad_unknown_key", 8, "schedule.stpes: unknown key"},
		{"bad_unknown_top", 7, "colour: unknown key"},
		{"bad_type_steps", 9, "schedule.steps: expected a positive integer or 'auto', got 'lots'"},
		{"bad_type_section", 7, "formula: expected a mapping"},
		{"bad_missing_matrix", 2, "matrix: missing required key"},
		{"bad_missing_rhs", 2, "rhs: missing required key"},
		{"bad_two_matrix", 4, "matrix: give only one of file, stencil, pauli (found both file and pauli)"},
		{"bad_two_rhs", 8, "rhs: give only one of"},
		{"bad_amp_length", 7, "rhs.amplitudes: 3 entries, but the matrix has 4 rows"},
		{"bad_product_length", 7, "rhs.product: 1 [theta, phi] pairs, but the system has 2 qubits"},
		{"bad_ops_length", 5, "matrix.pauli[1].ops: 3 characters, but the first term has 2"},
		{"bad_ops_char", 4, "matrix.pauli[0].ops: character 'Q'"},
		{"bad_zero_vector", 7, "rhs.amplitudes: the right-hand side is the zero vector"},
		{"bad_nan", 4, "matrix.pauli[0].coeff: expected a finite number, got '.nan'"},
		{"bad_inf", 7, "rhs.amplitudes[1]: expected a finite number, got '-.inf'"},
		{"bad_overflow_real", 8, "budget.t_count: number '1e999' is out of range"},
		{"bad_negative_power", 9, "schedule.power: must be positive"},
		{"bad_negative_budget", 8, "budget.qubits: a limit must not be negative"},
		{"bad_negative_seed", 7, "schedule.seed: expected a non-negative integer, got '-1'"},
		{"bad_seed_overflow", 8, "schedule.seed: expected a non-negative integer below 2^64"},
		{"bad_steps_overflow", 8, "formula.steps: expected a positive integer or 'auto'"},
		{"bad_precision", 7, "precision: must lie strictly between 0 and 1"},
		{"bad_syntax", 8, "YAML syntax: did not find expected ',' or ']'"},
		{"bad_duplicate", 8, "precision: duplicate key (first at line 7)"},
		{"bad_points", 9, "schedule.points[1]: points must increase strictly"},
		{"bad_points_last", 9, "schedule.points: the last point must be 1"},
		{"bad_value_bits", 8, "oracle.value_bits: expected an integer or 'auto' (1..52), got '53'"},
		{"bad_order", 7, "formula.order: expected 1, 2, 4, 6 or 8, got '3'"},
		{"bad_kappa", 8, "schedule.kappa: a condition-number bound lies in [1, 1e12], got 0.5"},
		{"bad_basis", 7, "rhs.basis: expected a basis index below the matrix size (0..3), got '4'"},
		{"bad_uniform_false", 7, "rhs.uniform: only 'true'"},
		{"bad_alias", 9, "aliases (*p) are not supported"},
		{"bad_shape", 4, "matrix.stencil.shape[1]: 12 is not a power of two"},
		{"bad_offset", 7, "matrix.stencil.points.\"+5\": offsets must lie within -4..+4"},
		{"bad_offset_axes", 7, "matrix.stencil.points.\"+1\": 1 offset for 2 axes"},
		{"bad_boundary", 6, "matrix.stencil.boundary[0]: expected dirichlet or periodic, got 'wrap'"},
		{"bad_top_list", 2, "expected a mapping of keys, got a sequence"},
		{"bad_pauli_key", 4, "matrix.pauli[0].weight: unknown key"},
		{"bad_name", 2, "name: expected a text value, got a sequence"},
		{"bad_matrix_file", 3, "matrix.file: cannot open '" CASES "no-such.mtx'"},
	};
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		char path[200], prefix[240];
		snprintf(path, sizeof path, CASES "%s.yaml", cases[i].file);
		snprintf(prefix, sizeof prefix, "%s:%ld: ", path, cases[i].line);
		dw_problem p;
		dw_error e;
		memset(&p, 0x5a, sizeof p);   /* must come back zeroed */
		int rc = load(path, NULL, 0, &p, &e);
		CHECK(rc == DW_EINPUT && e.status == DW_EINPUT, "%s: status %d", path, rc);
		CHECK(starts_with(e.msg, prefix), "%s: message '%s' should start with '%s'",
			cases[i].file, e.msg, prefix);
		CHECK(strstr(e.msg, cases[i].needle) != NULL, "%s: message '%s' lacks '%s'",
			cases[i].file, e.msg, cases[i].needle);
		CHECK(all_zero(&p, sizeof p), "%s: *out zeroed after the error", cases[i].file);
	}
	dw_problem p;
	dw_error e;
	int rc = load(CASES "no-such-file.yaml", NULL, 0, &p, &e);
	CHECK(rc == DW_EINPUT && starts_with(e.msg, CASES "no-such-file.yaml: cannot open"),
		"missing file: %s", e.msg);
}

static void test_overrides(void)
{
	dw_problem p;
	dw_error e;
	const char *auto_steps[] = {"schedule.steps=17", "schedule.steps=auto"};
	int rc = load(CASES "good_full.yaml", auto_steps, 2, &p, &e);
	CHECK(rc == DW_OK && p.steps == 0, "later override wins, auto -> 0: %s", e.msg);
	if (!rc)
		dw_problem_free(&p);

	/* switching the rhs kind drops the file's amplitudes */
	const char *basis[] = {"rhs.basis=2"};
	rc = load(CASES "good_full.yaml", basis, 1, &p, &e);
	CHECK(rc == DW_OK, "rhs.basis: %s", e.msg);
	if (!rc) {
		CHECK(p.rhs_kind == DW_RHS_BASIS && p.basis == 2 && !p.amps, "basis 2");
		dw_problem_free(&p);
	}
	const char *amps[] = {"rhs.amplitudes=[1,0,0,1]"};
	rc = load(CASES "good_minimal.yaml", amps, 1, &p, &e);
	CHECK(rc == DW_EINPUT && starts_with(e.msg, "--set rhs.amplitudes=[1,0,0,1]: "
		"rhs.amplitudes: 4 entries, but the matrix has 2 rows"),
		"4 amplitudes on 1 qubit: %s", e.msg);
	rc = load(CASES "good_full.yaml", amps, 1, &p, &e);
	CHECK(rc == DW_OK, "rhs.amplitudes: %s", e.msg);
	if (!rc) {
		CHECK(p.rhs_kind == DW_RHS_AMPLITUDES, "amplitudes kind");
		CHECK_NEAR(creal(p.amps[0]), 1 / sqrt(2.0), 1e-15, "normalised 0");
		CHECK_NEAR(creal(p.amps[3]), 1 / sqrt(2.0), 1e-15, "normalised 3");
		CHECK_NEAR(cabs(p.amps[1]), 0, 0, "entry 1");
		dw_problem_free(&p);
	}

	/* nested keys, new sections, list indexes, a new matrix kind */
	const char *nested[] = {"schedule.seed=42", "formula.order=8",
		"target.gates=clifford+t", "schedule.path=list", "schedule.points=[0.5, 1]",
		"budget.qubits=9", "name=renamed"};
	rc = load(CASES "good_minimal.yaml", nested, 7, &p, &e);
	CHECK(rc == DW_OK, "nested: %s", e.msg);
	if (!rc) {
		CHECK(p.seed == 42 && p.order == 8 && p.gates == DW_GATES_CLIFFORD_T, "set");
		CHECK(p.path_kind == DW_PATH_LIST && p.npoints == 2 && p.points[0] == 0.5, "points");
		CHECK(p.budget.n == 1 && p.budget.line[0].limit == 9 && p.budget.line[0].line == 0,
			"budget from an override");
		CHECK(!strcmp(p.name, "renamed"), "name %s", p.name);
		dw_problem_free(&p);
	}
	const char *index[] = {"matrix.pauli.1.coeff=3", "matrix.pauli.2={coeff: 2, ops: ZZ}"};
	rc = load(CASES "good_full.yaml", index, 2, &p, &e);
	CHECK(rc == DW_OK, "list index: %s", e.msg);
	if (!rc) {
		CHECK(p.pauli[1].coeff == 3 && p.pauli[2].coeff == 2
			&& !strcmp(p.pauli[2].ops, "ZZ"), "terms replaced");
		dw_problem_free(&p);
	}
	const char *tofile[] = {"matrix.file=spd3.mtx", "rhs.uniform=true"};
	rc = load(CASES "good_full.yaml", tofile, 2, &p, &e);
	CHECK(rc == DW_OK, "matrix.file: %s", e.msg);
	if (!rc) {
		CHECK(p.matrix_kind == DW_MATRIX_FILE && p.npauli == 0 && p.matrix
			&& !strcmp(p.matrix_file, CASES "spd3.mtx"), "switched to the file");
		CHECK(p.rhs_kind == DW_RHS_UNIFORM, "uniform");
		dw_problem_free(&p);
	}

	/* bad overrides name themselves, without file:line */
	static const struct {
		const char *set;
		const char *want;
	} bad[] = {
		{"schedule.steps=x", "--set schedule.steps=x: schedule.steps: expected a positive integer or 'auto', got 'x'"},
		{"schedule.stpes=3", "--set schedule.stpes=3: schedule.stpes: unknown key"},
		{"shedule.steps=3", "--set shedule.steps=3: shedule: unknown key"},
		{"noequals", "--set noequals: expected key.path=value"},
		{"=3", "--set =3: expected key.path=value"},
		{"schedule..steps=3", "--set schedule..steps=3: empty key in the path"},
		{"rhs.amplitudes=[1,2", "--set rhs.amplitudes=[1,2: YAML syntax"},
		{"precision.x=1", "--set precision.x=1: 'x' is inside a value"},
		{"matrix.pauli.7.coeff=1", "--set matrix.pauli.7.coeff=1: '7' is not an index of a list of 3"},
		{"precision=.nan", "--set precision=.nan: precision: expected a finite number"},
		{"schedule.kappa=1e13", "--set schedule.kappa=1e13: schedule.kappa: a condition-number bound lies in [1, 1e12]"},
		{"rhs.basis=99", "--set rhs.basis=99: rhs.basis: expected a basis index below the matrix size (0..3)"},
	};
	for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		memset(&p, 0x5a, sizeof p);
		rc = load(CASES "good_full.yaml", &bad[i].set, 1, &p, &e);
		CHECK(rc == DW_EINPUT, "%s: status %d", bad[i].set, rc);
		CHECK(starts_with(e.msg, bad[i].want), "%s: got '%s'", bad[i].set, e.msg);
		CHECK(all_zero(&p, sizeof p), "%s: zeroed", bad[i].set);
	}
}

static void test_budget_files(void)
{
	dw_budget b;
	dw_error e = {0};
	int rc = dw_budget_load(CASES "budget_plain.yaml", &b, &e);
	CHECK(rc == DW_OK && b.n == 3, "plain: %s", e.msg);
	if (!rc && b.n == 3) {
		CHECK(!strcmp(b.line[0].key, "qubits") && b.line[0].limit == 120
			&& b.line[0].line == 2, "qubits");
		CHECK(!strcmp(b.line[1].key, "t_count") && b.line[1].limit == 1e9, "t_count");
		CHECK(!strcmp(b.line[2].key, "t_depth") && b.line[2].limit == 5e7
			&& b.line[2].line == 4, "t_depth");
	}
	memset(&e, 0, sizeof e);
	rc = dw_budget_load(CASES "budget_nested.yaml", &b, &e);
	CHECK(rc == DW_OK && b.n == 2, "nested: %s", e.msg);
	if (!rc && b.n == 2)
		CHECK(!strcmp(b.line[0].key, "depth") && b.line[0].limit == 1e8
			&& !strcmp(b.line[1].key, "toffoli_count") && b.line[1].limit == 2500
			&& b.line[1].line == 4, "nested figures");
	memset(&e, 0, sizeof e);
	rc = dw_budget_load(CASES "budget_bad.yaml", &b, &e);
	CHECK(rc == DW_EINPUT && starts_with(e.msg, CASES "budget_bad.yaml:3: budget.t_cout: unknown key"),
		"bad budget: %s", e.msg);
	CHECK(b.n == 0, "zeroed");
	memset(&e, 0, sizeof e);
	rc = dw_budget_load(CASES "good_full.yaml", &b, &e);
	CHECK(rc == DW_EINPUT && strstr(e.msg, "name: unknown key"), "a problem file "
		"is not a budget file: %s", e.msg);
}

int main(void)
{
	test_full();
	test_defaults();
	test_stencil();
	test_file_and_product();
	test_bad_files();
	test_overrides();
	test_budget_files();
	return check_done();
}
