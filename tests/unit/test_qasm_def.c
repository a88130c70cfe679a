/* test_qasm_def.c - `def` subroutines in the runtime reader and simulator.
 * The syntax and scoping rules are those of the OpenQASM 3 specification
 * (source/language/subroutines.rst and scope.rst of the openqasm/openqasm
 * repository, summarised in METHODS.md 10.4): arguments declared with
 * their types, qubits passed by reference and at most once per call,
 * qubits global and invisible inside a subroutine body, modifiers for
 * gates only.  Every state below is worked out by hand in the comments
 * from the gate matrices of stdgates.inc (spec v3.0.0): h = [[1,1],[1,-1]]/
 * sqrt 2, x = [[0,1],[1,0]], rz(t) = diag(e^{-it/2}, e^{it/2}),
 * ry(t) = [[c,-s],[s,c]] with c = cos(t/2), s = sin(t/2), cz = diag(1,1,
 * 1,-1); qubit k is bit k of the amplitude index (docs/runtime.md). */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "dwell/qasm.h"
#include "dwell/sim.h"

static const double R = 0.70710678118654752440;   /* 1/sqrt(2) */

/* Parse and run text with a seed; amplitudes to out (up to outlen);
 * returns the status, the error message in msg. */
static int run(const char *text, const dw_qasm_params *params, uint64_t seed,
	double complex *out, size_t outlen, char *msg)
{
	dw_error err = {0};
	dw_qasm_program *prog = NULL;
	dw_state *st = NULL;
	int rc = dw_qasm_parse_string(text, "d.qasm", &prog, &err);
	if (rc == DW_OK)
		rc = dw_sim_run(prog, params, seed, &st, &err);
	if (rc == DW_OK)
		for (size_t i = 0; i < outlen; i++)
			out[i] = i < st->dim ? st->amp[i] : 0;
	snprintf(msg, 1024, "%s", err.msg);
	dw_state_free(st);
	dw_qasm_free(prog);
	return rc;
}

/* Largest |out - want| over n amplitudes. */
static double deviation(const double complex *out, const double complex *want, size_t n)
{
	double worst = 0;
	for (size_t i = 0; i < n; i++)
		worst = fmax(worst, cabs(out[i] - want[i]));
	return worst;
}

/* The program (seed 1, inputs params) must end in want[0..n-1] within 1e-15. */
static void check_state_p(const char *what, const char *text, const dw_qasm_params *params,
	const double complex *want, size_t n)
{
	double complex out[64];
	char msg[1024];
	int rc = run(text, params, 1, out, n, msg);
	CHECK(rc == DW_OK, "%s: %s", what, msg);
	if (rc == DW_OK)
		CHECK(deviation(out, want, n) <= 1e-15, "%s: deviation %.3g from the hand-computed "
			"state", what, deviation(out, want, n));
}

static void check_state(const char *what, const char *text, const double complex *want, size_t n)
{
	check_state_p(what, text, NULL, want, n);
}

/* Reading or running text must fail with DW_EINPUT and exactly want. */
static void check_error(const char *text, const char *want)
{
	double complex out[4];
	char msg[1024] = "";
	int rc = run(text, NULL, 1, out, 4, msg);
	CHECK(rc == DW_EINPUT, "expected DW_EINPUT for: %s (got %d)", text, rc);
	CHECK(!strcmp(msg, want), "message\n  got:  %s\n  want: %s", msg, want);
}

#define STD "OPENQASM 3.0;\ninclude \"stdgates.inc\";\n"

static void test_unitary_defs(void)
{
	/* Bell pair by a def on two single-qubit arguments: h a; cx a, b on
	 * |00> gives (|00> + |11>)/sqrt 2: indices 0 and 3 */
	double complex bell[4] = {R, 0, 0, R};
	check_state("bell def", STD "def bell(qubit a, qubit b) { h a; cx a, b; }\n"
		"qubit[2] q;\nbell(q[0], q[1]);", bell, 4);

	/* the same with the arguments swapped: h on q[1], cx q[1] -> q[0];
	 * still indices 0 and 3 */
	check_state("bell def, arguments swapped", STD "def bell(qubit a, qubit b) { h a; cx a, b; }\n"
		"qubit[2] q;\nbell(q[1], q[0]);", bell, 4);

	/* a qubit[2] argument indexed in the body, given a whole register that
	 * sits at qubits 3..4 after q[0..2]: the pair on bits 3 and 4, indices
	 * 0 and 8 + 16 = 24 */
	double complex bell_hi[32] = {0};
	bell_hi[0] = bell_hi[24] = R;
	check_state("qubit[2] argument", STD "def bell2(qubit[2] r) { h r[0]; cx r[0], r[1]; }\n"
		"qubit[3] q;\nqubit[2] pp;\nbell2(pp);", bell_hi, 32);

	/* a whole qubit[3] argument broadcast in the body: x r flips all three,
	 * index 7 */
	double complex all[8] = {0};
	all[7] = 1;
	check_state("qubit[3] broadcast", STD "def flipall(qubit[3] r) { x r; }\nqubit[3] q;\n"
		"flipall(q);", all, 8);

	/* a float[64] value used in rz: h then rz(t/2) with t = pi/3, so
	 * rz(pi/6) (R, R) = (R e^{-i pi/12}, R e^{i pi/12}) */
	double complex turned[2] = {R * cexp(-I * M_PI / 12), R * cexp(I * M_PI / 12)};
	check_state("float[64] value", STD "def turn(float[64] t, qubit a) { h a; rz(t / 2) a; }\n"
		"qubit q;\nturn(pi / 3, q);", turned, 2);
	/* the same with `angle[32]`, `float` and `angle`, the argument an
	 * expression of a top-level input (th = pi/6, so 2*th = pi/3) */
	dw_qasm_param th = {"th", M_PI / 6};
	dw_qasm_params ps = {1, &th};
	check_state_p("angle[32] value from an input", STD "input float th;\n"
		"def turn(angle[32] t, qubit a) { h a; rz(t / 2) a; }\nqubit q;\nturn(2 * th, q);",
		&ps, turned, 2);
	check_state("float value", STD "def turn(float t, qubit a) { h a; rz(t / 2) a; }\n"
		"qubit q;\nturn(pi / 3, q);", turned, 2);
	check_state("angle value", STD "def turn(angle t, qubit a) { h a; rz(t / 2) a; }\n"
		"qubit q;\nturn(pi / 3, q);", turned, 2);

	/* values and qubits interleaved, matched by declared kind; a global
	 * const read inside the body (scope.rst: globals are visible, as
	 * constants): ry(k) with k = pi/2 on a, then rz(t) with t = 0.4 on b =
	 * |1> (x b first).  ry(pi/2)|0> = (R, R); rz(0.4) on b = 1 gives the
	 * factor e^{0.2i}: indices 2 (a=0, b=1) and 3, both R e^{0.2 i} */
	double complex mixed[4] = {0, 0, R * cexp(0.2 * I), R * cexp(0.2 * I)};
	check_state("interleaved arguments and a const", STD "const float k = pi / 2;\n"
		"def mix(qubit a, float t, qubit b) { ry(k) a; x b; rz(t) b; }\n"
		"qubit[2] q;\nmix(q[0], 0.4, q[1]);", mixed, 4);

	/* a def called in a for loop, the loop variable in its value argument:
	 * h, then rz(i*pi/12) for i = 1, 2, 3, i.e. rz(pi/2) in all:
	 * (R e^{-i pi/4}, R e^{i pi/4}) */
	double complex looped[2] = {R * cexp(-I * M_PI / 4), R * cexp(I * M_PI / 4)};
	check_state("def in a for loop (value)", STD "def kick(float k, qubit a) { rz(k) a; }\n"
		"qubit q;\nh q;\nfor int i in [1:3] { kick(i * pi / 12, q); }", looped, 2);
	/* ... and in its qubit argument: x on q[0], q[1], q[2]: index 7 */
	check_state("def in a for loop (qubit index)", STD "def flip(qubit a) { x a; }\n"
		"qubit[3] q;\nfor int i in [0:2] { flip(q[i]); }", all, 8);

	/* a def calling a gate and an earlier def, with a loop in its body:
	 * sq = h on a: R(|0> + |1>) on a = q[0]; inner = cx a, b: indices 0 and
	 * 3; rz(0.4) on b twice (the loop) = rz(0.8): index 0 (b = 0) gets
	 * e^{-0.4 i}, index 3 (b = 1) e^{0.4 i} */
	double complex nested[4] = {R * cexp(-0.4 * I), 0, 0, R * cexp(0.4 * I)};
	check_state("def calling a gate and a def", STD "gate sq a { h a; }\n"
		"def inner(qubit a, qubit b) { cx a, b; }\n"
		"def outer(float t, qubit a, qubit b) { sq a; inner(a, b); "
		"for int i in [1:2] { rz(t) b; } }\n"
		"qubit[2] q;\nouter(0.4, q[0], q[1]);", nested, 4);

	/* a def handing its own qubit[2] argument on, whole and by element, and
	 * a gate with modifiers inside a def: inner2 = x r[1] (q[1]) then ctrl
	 * @ x r[1], r[0] flips q[0]: index 3 */
	double complex three[4] = {0, 0, 0, 1};
	check_state("qubit[2] passed on", STD "def inner2(qubit[2] r) { x r[1]; }\n"
		"def outer2(qubit[2] r) { inner2(r); ctrl @ x r[1], r[0]; }\n"
		"qubit[2] q;\nouter2(q);", three, 4);

	/* an element of a def's qubit[2] argument passed on to a def taking a
	 * single qubit, its index a loop variable of the body: x on r[1] only
	 * (i = 1), i.e. q[1]: index 2 */
	double complex two[4] = {0, 0, 1, 0};
	check_state("element of a qubit[2] argument passed on", STD
		"def flip(qubit a) { x a; }\n"
		"def second(qubit[2] r) { for int i in [1:1] { flip(r[i]); } }\n"
		"qubit[2] q;\nsecond(q);", two, 4);

	/* a local name may shadow a global register (scope.rst): the argument
	 * q of the def is the qubit passed, r (qubit 1): index 2 */
	double complex shadow[4] = {0, 0, 1, 0};
	check_state("argument shadowing a global register", STD "qubit q;\nqubit r;\n"
		"def f(qubit q) { x q; }\nf(r);", shadow, 4);
}

/* The measurement-based erasure of a logical AND, the form dwell emits for
 * target.uncompute: measure: controls c0, c1 in a superposition, t = c0 AND
 * c1 by ccx, then h t; m = measure t; if m, cz c0, c1 and x t.  After h,
 * t reads 1 with probability 1/2 exactly, and on either outcome the state
 * returns to the controls' superposition with t = 0 (the cz undoes the
 * phase (-1)^(c0 c1) of the 1 branch).  A witness qubit w records the
 * outcome (x w when m is set), so both branches can be checked.
 *   controls: ry(pi/3) c0 = (sqrt3/2, 1/2), ry(pi/2) c1 = (R, R); index
 *   c0 + 2 c1 + 4 t + 8 w: amplitudes sqrt3/2 R, R/2, sqrt3/2 R, R/2 on
 *   indices 0..3 (outcome 0) or 8..11 (outcome 1), zeros elsewhere. */
static void test_measure_defs(void)
{
	const char *text = STD
		"def and_erase(qubit a, qubit b, qubit t, qubit w) {\n"
		"    bit[1] m;\n"
		"    h t;\n"
		"    m[0] = measure t;\n"
		"    if (m[0]) { cz a, b; }\n"
		"    if (m[0] == 1) { x t; }\n"
		"    if (m) { x w; }\n"
		"}\n"
		"qubit[2] c;\nqubit tg;\nqubit w;\n"
		"ry(pi / 3) c[0];\nry(pi / 2) c[1];\nccx c[0], c[1], tg;\n"
		"and_erase(c[0], c[1], tg, w);\n";
	double complex base[4] = {sqrt(3) / 2 * R, 0.5 * R, sqrt(3) / 2 * R, 0.5 * R};
	int seen[2] = {0, 0};
	for (uint64_t seed = 1; seed <= 24; seed++) {
		double complex out[16], want[16] = {0};
		char msg[1024];
		int rc = run(text, NULL, seed, out, 16, msg);
		CHECK(rc == DW_OK, "and_erase seed %llu: %s", (unsigned long long)seed, msg);
		if (rc)
			return;
		int outcome = cabs(out[8]) > 0.5 * R;   /* the witness qubit */
		seen[outcome]++;
		for (int i = 0; i < 4; i++)
			want[i + 8 * outcome] = base[i];
		CHECK(deviation(out, want, 16) <= 1e-15, "and_erase seed %llu, outcome %d: deviation "
			"%.3g", (unsigned long long)seed, outcome, deviation(out, want, 16));
	}
	CHECK(seen[0] > 0 && seen[1] > 0, "both outcomes over 24 seeds (%d zeros, %d ones)",
		seen[0], seen[1]);

	/* `measure q -> m[i]`, `if (...) else`, reset, and a bit register
	 * compared as an integer, all on local bits: a = |1> measured into m[1]
	 * (certain), so m == 2: x b; the else branch (h b) not taken; reset a
	 * returns a to |0>: index 2 (b = 1) */
	double complex picked[4] = {0, 0, 1, 0};
	check_state("measure ->, if/else, reset in a def", STD
		"def pick(qubit a, qubit b) { bit[2] m; x a; measure a -> m[1];\n"
		"  if (m == 2) { x b; } else { h b; } reset a; }\n"
		"qubit[2] q;\npick(q[0], q[1]);", picked, 4);
	/* the other branch: a stays |0>, m == 0, else: h b: indices 0 and 2 */
	double complex other[4] = {R, 0, R, 0};
	check_state("else branch in a def", STD
		"def pick(qubit a, qubit b) { bit[2] m; measure a -> m[1];\n"
		"  if (m == 2) { x b; } else { h b; } }\n"
		"qubit[2] q;\npick(q[0], q[1]);", other, 4);

	/* local bits are fresh on every call: with a = |1>, each call reads m
	 * before measuring a into it, so m reads 0 on every call and w is never
	 * turned: index 1.  Were m kept from the call before (or left as it
	 * was in memory), calls 2 and 3 (and maybe 1) would each apply
	 * ry(pi/3) to w, 2 or 3 turns of pi/3, and w would not be |0>. */
	double complex one[4] = {0, 1, 0, 0};
	check_state("local bits fresh per call", STD
		"def once(qubit a, qubit w) { bit m; if (m) { ry(pi / 3) w; } m = measure a; }\n"
		"qubit a;\nqubit w;\nx a;\nonce(a, w);\nonce(a, w);\nonce(a, w);", one, 4);
	/* ... also when the def is called in a loop */
	check_state("local bits fresh per call in a loop", STD
		"def once(qubit a, qubit w) { bit m; if (m) { ry(pi / 3) w; } m = measure a; }\n"
		"qubit a;\nqubit w;\nx a;\nfor int i in [1:4] { once(a, w); }", one, 4);
	/* ... and a declaration inside a loop body is set to zeros on every
	 * pass (docs/runtime.md): pass 1 stores 1 in m, passes 2 and 3
	 * redeclare it, so w is never turned: index 1 */
	check_state("local bits set to zeros where declared", STD
		"def loopy(qubit a, qubit w) { for int i in [1:3] { bit m; if (m) { ry(pi / 3) w; }\n"
		"  m = measure a; } }\nqubit a;\nqubit w;\nx a;\nloopy(a, w);", one, 4);
	/* the same name in two defs, and a global register named like a local:
	 * each def has its own m, and the global m is untouched (its bits are
	 * the program's output) */
	dw_error err = {0};
	dw_qasm_program *prog = NULL;
	dw_state *st = NULL;
	int rc = dw_qasm_parse_string(STD "bit[2] m;\nqubit q;\n"
		"def f(qubit a) { bit m; x a; m = measure a; }\n"
		"def g(qubit a) { bit m; m = measure a; if (m) { x a; } }\n"
		"f(q);\ng(q);\nm[1] = measure q;\n", "d.qasm", &prog, &err);
	if (rc == DW_OK)
		rc = dw_sim_run(prog, NULL, 1, &st, &err);
	CHECK(rc == DW_OK, "two defs with a local m: %s", err.msg);
	/* f: a = 1; g: m = 1, x a: a = 0; then the global m[1] = 0, m[0] never
	 * written: both 0, state index 0 */
	if (rc == DW_OK)
		CHECK(st->nbits == 2 && st->bits[0] == 0 && st->bits[1] == 0 && cabs(st->amp[0] - 1)
			<= 1e-15, "two defs with a local m: bits %d %d", st->bits[0], st->bits[1]);
	dw_state_free(st);
	dw_qasm_free(prog);
}

static void test_def_errors(void)
{
	/* an undeclared name called */
	check_error(STD "qubit q;\nnodef(q);",
		"d.qasm:4:1: expected a statement (a declaration, gate or def call, for, if, "
		"measure or reset), found 'nodef'");
	/* argument counts */
	check_error(STD "def f(float t, qubit a) { rz(t) a; }\nqubit q;\nf(0.5);",
		"d.qasm:5:1: expected 2 arguments for 'f', found 1");
	check_error(STD "def f(qubit a) { x a; }\nqubit[2] q;\nf(q[0], q[1]);",
		"d.qasm:5:9: expected ')' ('f' takes 1 argument), found 'q'");
	/* argument kinds */
	check_error(STD "def f(float t, qubit a) { rz(t) a; }\nqubit q;\nf(q, 0.5);",
		"d.qasm:5:3: expected a value for argument 1 of 'f' (declared float or angle), not "
		"qubits, found 'q'");
	check_error(STD "def f(float t, qubit a) { rz(t) a; }\nqubit q;\nf(0.5, 0.5);",
		"d.qasm:5:8: expected a qubit for argument 2 of 'f' (declared qubit), found '0.5'");
	check_error(STD "def f(qubit a) { x a; }\nqubit[2] q;\nf(q);",
		"d.qasm:5:3: expected 1 qubit for argument 1 of 'f', found 2");
	check_error(STD "def f(qubit[3] r) { x r; }\nqubit[2] q;\nf(q);",
		"d.qasm:5:3: expected 3 qubits for argument 1 of 'f', found 2");
	check_error(STD "def f(qubit[2] r) { x r; }\nqubit[2] q;\nf(q[0]);",
		"d.qasm:5:3: expected 2 qubits for argument 1 of 'f', found 1");
	check_error(STD "def f(int n, qubit a) { x a; }",
		"d.qasm:3:7: expected an argument type: 'float', 'angle', 'qubit' or 'qubit[n]' "
		"(other argument types are not read), found 'int'");
	check_error(STD "def f(qubit a) { x a; }\nqubit q;\nf q;",
		"d.qasm:5:3: expected '(' ('f' is a def, called as f(arguments);), found 'q'");
	/* the same qubit twice in one call (subroutines.rst: at most once) */
	check_error(STD "def f(qubit a, qubit b) { cx a, b; }\nqubit[2] q;\nf(q[1], q[1]);",
		"d.qasm:5:1: expected distinct qubits (qubit 1 is passed twice to one def call)");
	/* recursion */
	check_error(STD "def f(qubit a) { x a; f(a); }",
		"d.qasm:3:23: expected a call of a gate or def declared earlier ('f' calls itself; "
		"recursion is not read), found 'f'");
	/* modifiers apply to gates only */
	check_error(STD "def f(qubit a) { x a; }\nqubit[2] q;\ninv @ f(q[0]);",
		"d.qasm:5:7: expected a gate after the modifiers ('f' is a def; ctrl, negctrl, inv "
		"and pow apply to gates only), found 'f'");
	check_error(STD "def f(qubit a) { x a; }\nqubit[2] q;\nctrl @ f(q[0], q[1]);",
		"d.qasm:5:8: expected a gate after the modifiers ('f' is a def; ctrl, negctrl, inv "
		"and pow apply to gates only), found 'f'");
	/* a gate body cannot call a def */
	check_error(STD "def f(qubit a) { x a; }\ngate g b { f(b); }",
		"d.qasm:4:12: expected a gate ('f' is a def, and a gate body, being unitary, cannot "
		"call one), found 'f'");
	/* global registers and inputs are invisible in a def body (scope.rst) */
	check_error(STD "qubit[2] q;\ndef f(qubit a) { cx a, q[1]; }",
		"d.qasm:4:24: expected a qubit argument of the def (global qubit registers are not "
		"visible inside a def body; pass them as arguments), found 'q'");
	check_error(STD "bit c;\ndef f(qubit a) { c = measure a; }",
		"d.qasm:4:18: expected a bit register declared in the def (global bit registers are "
		"not visible inside a def body), found 'c'");
	check_error(STD "input float w;\ndef f(qubit a) { rz(w) a; }",
		"d.qasm:4:21: expected a def parameter, loop variable or constant (a def body cannot "
		"read outer variables), found 'w'");
	/* no qubit declarations, no other declarations, no result type */
	check_error(STD "def f(qubit a) { qubit b; }",
		"d.qasm:3:18: expected a statement of the def body (qubits are global and cannot be "
		"declared in a def; pass them as arguments), found 'qubit'");
	check_error(STD "def f(qubit a) { const int n = 2; }",
		"d.qasm:3:18: expected a gate or def call, for, if, measure or reset (declarations "
		"other than a def's local bits are read only at the top level), found 'const'");
	check_error(STD "def f(qubit a) -> bit { h a; }",
		"d.qasm:3:16: expected '{' (a def returning a value is not read; only defs used as "
		"statements are), found '->'");
	check_error(STD "qubit q;\nif (true) { def f(qubit a) { x a; } }",
		"d.qasm:4:5: expected a bit register, found 'true'");
	check_error(STD "bit c;\nqubit q;\nfor int i in [0:1] { def f(qubit a) { x a; } }",
		"d.qasm:5:22: expected a gate or def call, for, if, measure or reset (declarations "
		"other than a def's local bits are read only at the top level), found 'def'");
	/* names: a def may not reuse a gate's or another def's name, a qubit
	 * argument cannot be indexed, a local register index is checked */
	check_error(STD "gate g a { x a; }\ndef g(qubit a) { x a; }",
		"d.qasm:4:5: expected a new def name ('g' is already declared), found 'g'");
	check_error(STD "def f(qubit a) { x a; }\ndef f(qubit b) { x b; }",
		"d.qasm:4:5: expected a new def name ('f' is already declared), found 'f'");
	check_error(STD "def f(qubit a) { x a[0]; }",
		"d.qasm:3:21: expected ',' or ';' (def arguments declared 'qubit' are single qubits "
		"and cannot be indexed), found '['");
	check_error(STD "def f(qubit[2] r) { x r[2]; }",
		"d.qasm:3:25: expected an index from 0 to 1 into 'r' (got 2)");
	check_error(STD "def f(qubit a) { bit[2] m; m[2] = measure a; }",
		"d.qasm:3:30: expected an index from 0 to 1 into 'm' (got 2)");
	/* run-time: an index from a loop variable out of range, with its place */
	check_error(STD "def f(qubit[2] r) { for int i in [0:2] { x r[i]; } }\nqubit[2] q;\nf(q);",
		"d.qasm:3:44: expected an index from 0 to 1 into 'r', got 2");
	/* a local register's scope ends with its block */
	check_error(STD "def f(qubit a) { if (true) { } }",
		"d.qasm:3:22: expected a bit register, found 'true'");
	check_error(STD "def f(qubit a) { for int i in [0:1] { bit m; } m = measure a; }",
		"d.qasm:3:48: expected a statement (a declaration, gate or def call, for, if, measure "
		"or reset), found 'm'");
}

/* Damaged def programs (bytes deleted, duplicated or replaced) must read
 * and run, or fail with a located DW_EINPUT; under AddressSanitizer this
 * is a memory-safety check of the def reader and executor. */
static void test_damaged_defs(void)
{
	const char *good = STD
		"const int n = 2;\ngate g(p) a, b { cx a, b; rz(p) b; }\n"
		"def e(qubit a, qubit b, qubit t) { bit[1] m; h t; m[0] = measure t;\n"
		"  if (m[0]) { cz a, b; } if (m) { x t; } }\n"
		"def seg(float[64] p, qubit[2] r, qubit t) { g(0.5 * p) r[0], r[1];\n"
		"  for int i in [1:n] { e(r[0], r[1], t); } ccx r[0], r[1], t; e(r[1], r[0], t); }\n"
		"qubit[2] q;\nqubit w;\nh q;\nseg(0.25, q, w);\nseg(pi, q, w);\n";
	const char alphabet[] = "q[]();{}@,:=0123456789.-+*/ \n\"abcdefmrstw_";
	char text[1024];
	uint64_t r = 777;
	int ok = 0, bad = 0;
	for (int trial = 0; trial < 2000; trial++) {
		size_t len = strlen(good);
		memcpy(text, good, len + 1);
		int edits = 1 + trial % 3;
		for (int k = 0; k < edits; k++) {
			r = r * 6364136223846793005ull + 1442695040888963407ull;
			size_t at = (size_t)((r >> 20) % len);
			int kind = (int)((r >> 8) % 3);
			char ch = alphabet[(r >> 40) % (sizeof alphabet - 1)];
			if (kind == 0 && len > 1) {
				memmove(text + at, text + at + 1, len - at);
				len--;
			} else if (kind == 1 && len + 2 < sizeof text) {
				memmove(text + at + 1, text + at, len - at + 1);
				len++;
			} else {
				text[at] = ch;
			}
		}
		double complex out[8];
		char msg[1024];
		int rc = run(text, NULL, (uint64_t)trial, out, 8, msg);
		if (rc == DW_OK)
			ok++;
		else
			bad++;
		CHECK(rc == DW_OK || (rc == DW_EINPUT && !strncmp(msg, "d.qasm:", 7)),
			"damaged def program %d: status %d, %s", trial, rc, msg);
	}
	printf("damaged def programs: %d read and ran, %d refused\n", ok, bad);
	CHECK(ok > 20 && bad > 500, "damaged def programs: %d read, %d refused", ok, bad);
}

int main(void)
{
	test_unitary_defs();
	test_measure_defs();
	test_def_errors();
	test_damaged_defs();
	return check_done();
}
