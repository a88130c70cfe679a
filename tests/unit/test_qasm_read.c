/* test_qasm_read.c - the OpenQASM 3 reader: every construct of the subset
 * it takes (docs/runtime.md), its register layout, and its errors with
 * their exact FILE:LINE:COL.  The syntax follows the OpenQASM 3
 * specification (spec v3.0.0: types, gates, loops and branching as
 * quoted in METHODS.md 10.4); the effect of each construct is checked on
 * small states whose amplitudes are worked out by hand in the comments. */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "check.h"
#include "dwell/cli.h"
#include "dwell/qasm.h"
#include "dwell/sim.h"

static const double R = 0.70710678118654752440;   /* 1/sqrt(2) */

/* Parse and run text (inputs from params); amplitudes to out (2^n), bits
 * to bits; returns the status, error message in msg. */
static int run(const char *text, const dw_qasm_params *params, uint64_t seed,
	double complex *out, size_t outlen, unsigned char *bits, char *msg)
{
	dw_error err = {0};
	dw_qasm_program *prog = NULL;
	dw_state *st = NULL;
	int rc = dw_qasm_parse_string(text, "t.qasm", &prog, &err);
	if (rc == DW_OK)
		rc = dw_sim_run(prog, params, seed, &st, &err);
	if (rc == DW_OK) {
		for (size_t i = 0; i < outlen && i < st->dim; i++)
			out[i] = st->amp[i];
		if (bits)
			memcpy(bits, st->bits, (size_t)st->nbits);
	}
	if (msg)
		snprintf(msg, 1024, "%s", err.msg);
	dw_state_free(st);
	dw_qasm_free(prog);
	return rc;
}

/* The program's final state must equal want[0..n-1] within 1e-15. */
static void check_state(const char *what, const char *text, const double complex *want, size_t n)
{
	double complex out[64] = {0};
	char msg[1024];
	int rc = run(text, NULL, 1, out, n, NULL, msg);
	CHECK(rc == DW_OK, "%s: %s", what, msg);
	double worst = 0;
	for (size_t i = 0; i < n; i++)
		worst = fmax(worst, cabs(out[i] - want[i]));
	CHECK(worst <= 1e-15, "%s: deviation %.3g from the hand-computed state", what, worst);
}

/* Reading (or running) text must fail with exactly msg. */
static void check_error(const char *text, const char *want)
{
	char msg[1024] = "";
	double complex out[4];
	int rc = run(text, NULL, 1, out, 4, NULL, msg);
	CHECK(rc == DW_EINPUT, "expected DW_EINPUT for: %s (got %d)", text, rc);
	CHECK(!strcmp(msg, want), "message\n  got:  %s\n  want: %s", msg, want);
}

static void test_layout(void)
{
	const char *text =
		"OPENQASM 3.0;\n"
		"include \"stdgates.inc\";\n"
		"// registers in declaration order\n"
		"qubit[3] a;\n"
		"qubit b;\n"
		"qreg c[2];\n"
		"bit[2] m;\n"
		"bit one;\n"
		"creg old[3];\n"
		"output bit[1] res;\n"
		"input float theta;\n"
		"input angle[32] phi;\n"
		"const int n = 2;\n"
		"qubit[n] d;\n";
	dw_error err = {0};
	dw_qasm_program *p = NULL;
	int rc = dw_qasm_parse_string(text, "layout.qasm", &p, &err);
	CHECK(rc == DW_OK, "%s", err.msg);
	if (rc)
		return;
	CHECK(dw_qasm_num_qubits(p) == 8, "qubits %d", dw_qasm_num_qubits(p));
	CHECK(dw_qasm_num_bits(p) == 7, "bits %d", dw_qasm_num_bits(p));
	CHECK(dw_qasm_num_qregs(p) == 4 && dw_qasm_num_cregs(p) == 4, "register counts");
	const dw_qasm_reg *r = dw_qasm_qreg(p, 2);
	CHECK(!strcmp(r->name, "c") && r->offset == 4 && r->size == 2, "qreg c at 4..5");
	r = dw_qasm_qreg(p, 3);
	CHECK(!strcmp(r->name, "d") && r->offset == 6 && r->size == 2, "qubit[n] d at 6..7");
	r = dw_qasm_creg(p, 3);
	CHECK(!strcmp(r->name, "res") && r->offset == 6 && r->size == 1, "output bit res");
	CHECK(dw_qasm_num_inputs(p) == 2 && !strcmp(dw_qasm_input_at(p, 1)->name, "phi")
		&& dw_qasm_input_at(p, 1)->is_angle, "inputs");
	dw_qasm_free(p);
}

static void test_programs(void)
{
	/* Bell: h then cx gives (|00> + |11>)/sqrt 2 */
	double complex bell[4] = {R, 0, 0, R};
	check_state("bell", "OPENQASM 3.0; include \"stdgates.inc\"; qubit[2] q; h q[0]; cx q[0], q[1];",
		bell, 4);

	/* GHZ over a loop, version line without a minor number, block comment */
	double complex ghz[32] = {0};
	ghz[0] = ghz[31] = R;
	check_state("ghz loop", "OPENQASM 3; include \"stdgates.inc\"; /* five qubits */ qubit[5] q;\n"
		"h q[0]; for int i in [0:3] { cx q[i], q[i + 1]; }", ghz, 32);

	/* a loop with a step and a negative step: x on q[0], q[2], q[4] and back
	 * over q[4], q[2] leaves only q[0] set: index 1 */
	double complex step[32] = {0};
	step[1] = 1;
	check_state("loop steps", "OPENQASM 3.0; include \"stdgates.inc\"; qubit[5] q;\n"
		"for int i in [0:2:4] { x q[i]; } for uint j in [4:-2:1] { x q[j]; }", step, 32);

	/* untyped const and untyped loop variable (the form of early drafts) */
	double complex all3[8] = {0};
	all3[7] = 1;
	check_state("untyped const", "OPENQASM 3; include \"stdgates.inc\"; const n = 2; qubit[3] q;\n"
		"for k in [0:n] { x q[k]; }", all3, 8);

	/* a gate with parameters called with expressions:
	 * rot(pi/2, 2*pi/3 - pi/6) = rz(pi/2) then ry(pi/2) on |0>
	 * = e^{-i pi/4} (|0> + |1>)/sqrt 2 */
	double complex rot[2] = {cexp(-I * M_PI / 4) * R, cexp(-I * M_PI / 4) * R};
	check_state("gate with parameters", "OPENQASM 3.0; include \"stdgates.inc\"; qubit q;\n"
		"gate rot(a, b) r { rz(a) r; ry(b) r; }\nrot(pi/2, 2*pi/3 - pi/6) q;", rot, 2);

	/* nested definitions and a loop inside a body: twice(θ) applies rx(θ)
	 * three times through inner; with θ = π/3 the total is rx(π) = -iX */
	double complex nest[2] = {0, -I};
	check_state("nested gates", "OPENQASM 3.0; include \"stdgates.inc\"; qubit q;\n"
		"gate inner(t) a { rx(t) a; }\n"
		"gate twice(t) a { for int k in [1:3] { inner(t * k / k) a; } }\n"
		"twice(π/3) q;", nest, 2);

	/* modifiers: x q[0]; ctrl @ h q[0], q[1] -> q[0]=1, H on q[1]:
	 * (|01> + |11>)/sqrt 2 in index terms 1 and 3; then negctrl @ x q[1], q[2]
	 * flips q[2] where q[1] = 0: index 1 -> 5.  inv @ s q[1] multiplies
	 * q[1] = 1 by -i: index 3 gets -i/sqrt 2.  pow(2) @ t q[0] = s: both
	 * have q[0] = 1: times i.  Final: 5 -> i/sqrt 2, 3 -> 1/sqrt 2. */
	double complex mods[8] = {0};
	mods[5] = I * R;
	mods[3] = R;
	check_state("modifiers", "OPENQASM 3.0; include \"stdgates.inc\"; qubit[3] q;\n"
		"x q[0]; ctrl @ h q[0], q[1]; negctrl @ x q[1], q[2]; inv @ s q[1];\n"
		"pow(2) @ t q[0];", mods, 8);

	/* ctrl(2) @ and ctrl @ ctrl @ agree with ccx; inv @ ctrl @ rx = ctrl @ rx(-θ) */
	double complex tof[8] = {0};
	tof[7] = 1;
	check_state("ctrl(2)", "OPENQASM 3.0; include \"stdgates.inc\"; qubit[3] q; x q[0]; x q[1];\n"
		"ctrl(2) @ x q[0], q[1], q[2]; ctrl @ ctrl @ x q[0], q[1], q[2]; ccx q[0], q[1], q[2];",
		tof, 8);
	double complex crx[4] = {0, cos(0.35), 0, I * sin(0.35)};
	check_state("inv @ ctrl", "OPENQASM 3.0; include \"stdgates.inc\"; qubit[2] q; x q[0];\n"
		"inv @ ctrl @ rx(0.7) q[0], q[1];", crx, 4);

	/* inverse of a gate whose body has a loop: inv @ g undoes g */
	double complex undo[4] = {1, 0, 0, 0};
	check_state("inv of a loop body", "OPENQASM 3.0; include \"stdgates.inc\"; qubit[2] q;\n"
		"gate g(a) x0, x1 { for int i in [1:3] { ry(a * i) x0; cx x0, x1; rz(a / i) x1; } h x1; }\n"
		"g(0.3) q[0], q[1]; inv @ g(0.3) q[0], q[1];", undo, 4);

	/* broadcasting over registers: h on both, then cx pairwise */
	double complex bc[4] = {0.5, 0.5, 0.5, 0.5};
	check_state("broadcast", "OPENQASM 3.0; include \"stdgates.inc\"; qubit[2] q; h q;", bc, 4);

	/* constant arithmetic: rz(tau/4 + sqrt(4) - 2 + 0*sin(1) + cos(0) - 1) = rz(pi/2) on |1>
	 * = e^{i pi/4}; exponents in literals: 0.5e1 - 5 = 0; unary minus */
	double complex ar[2] = {0, cexp(I * M_PI / 4)};
	check_state("arithmetic", "OPENQASM 3.0; include \"stdgates.inc\"; qubit q; x q;\n"
		"rz(tau/4 + sqrt(4) - 2 + 0*sin(1) + cos(0) - 1) q; rx(0.5e1 - 5) q; rz(-(-0)) q;",
		ar, 2);

	/* U and gphase need no include; barrier is read and has no effect */
	double complex ug[2] = {0, cexp(I * 0.25)};
	check_state("U, gphase, barrier", "OPENQASM 3.0; qubit q; U(pi, 0, pi) q; gphase(-pi/2);\n"
		"barrier q; gphase(0.25);", ug, 2);
}

static void test_inputs(void)
{
	/* input angle bound from params: ry(theta) on |0> */
	const char *text = "OPENQASM 3.0; include \"stdgates.inc\"; input angle theta;\n"
		"input float k; qubit q; ry(theta * k) q;";
	dw_qasm_param list[2] = {{"theta", 0.6}, {"k", 0.5}};
	dw_qasm_params ps = {2, list};
	double complex out[2];
	char msg[1024];
	int rc = run(text, &ps, 1, out, 2, NULL, msg);
	CHECK(rc == DW_OK && cabs(out[0] - cos(0.15)) < 1e-15 && cabs(out[1] - sin(0.15)) < 1e-15,
		"ry(theta*k) with theta=0.6, k=0.5: %s", msg);
	dw_qasm_params one = {1, list};
	rc = run(text, &one, 1, out, 2, NULL, msg);
	CHECK(rc == DW_EINPUT && !strcmp(msg, "t.qasm: input 'k' has no value (give --param k=VALUE)"),
		"missing input: %s", msg);
	dw_qasm_param extra[3] = {{"theta", 1}, {"k", 1}, {"z", 1}};
	dw_qasm_params three = {3, extra};
	rc = run(text, &three, 1, out, 2, NULL, msg);
	CHECK(rc == DW_EINPUT && !strcmp(msg, "t.qasm: parameter 'z' given, but the program has "
		"no input of that name"), "unknown parameter: %s", msg);
}

static void test_measure(void)
{
	/* measure/reset/if: after h, measuring gives 0 or 1; the branch sets q[1]
	 * (outcome 1) or q[2] (outcome 0); reset returns q[0] to |0>.  So the
	 * state is exactly |index 2> with c[0] = 1 or |index 4> with c[0] = 0. */
	const char *text = "OPENQASM 3.0; include \"stdgates.inc\"; qubit[3] q; bit[2] c;\n"
		"h q[0]; c[0] = measure q[0];\n"
		"if (c[0] == 1) { x q[1]; } else { x q[2]; }\n"
		"reset q[0]; measure q[1] -> c[1];";
	int seen[2] = {0, 0};
	for (uint64_t seed = 1; seed <= 40; seed++) {
		double complex out[8];
		unsigned char bits[2] = {9, 9};
		char msg[1024];
		int rc = run(text, NULL, seed, out, 8, bits, msg);
		CHECK(rc == DW_OK, "%s", msg);
		if (rc)
			return;
		int o = bits[0];
		seen[o & 1]++;
		uint64_t want = o ? 2 : 4;
		CHECK(cabs(out[want] - 1) < 1e-15, "seed %llu: outcome %d leaves |%llu>",
			(unsigned long long)seed, o, (unsigned long long)want);
		CHECK(bits[1] == o, "seed %llu: c[1] = measure q[1] = %d", (unsigned long long)seed, bits[1]);
		/* the same seed gives the same outcome */
		unsigned char again[2];
		run(text, NULL, seed, out, 8, again, NULL);
		CHECK(again[0] == bits[0], "seed %llu is reproducible", (unsigned long long)seed);
	}
	CHECK(seen[0] > 5 && seen[1] > 5, "both outcomes occur over 40 seeds (%d, %d)", seen[0], seen[1]);

	/* whole-register measure and if on a register value, `if (c)`, `!c`. */
	double complex out[4];
	unsigned char bits[2];
	char msg[1024];
	int rc = run("OPENQASM 3.0; include \"stdgates.inc\"; qubit[2] q; bit[2] c; x q[1];\n"
		"c = measure q; if (c == 2) { x q[0]; } if (c != 2) { x q[1]; }\n"
		"if (c[1]) { z q[0]; } if (!c[0]) { y q[0]; }", NULL, 1, out, 4, bits, msg);
	/* c = 2 (c[1] = 1): x q[0] -> |11>; z q[0] -> -|11>; y q[0] (c[0] = 0):
	 * y|1> = -i|0> -> -(-i)|10> = i at index 2 */
	CHECK(rc == DW_OK && bits[0] == 0 && bits[1] == 1 && cabs(out[2] - I) < 1e-15,
		"register measure and conditions: %s", msg);
}

static void test_errors(void)
{
	check_error("OPENQASM 2.0;\nqreg q[1];",
		"t.qasm:1:10: expected version 3 or 3.x (OpenQASM 2 programs are not read: their U "
		"and gate library differ), found '2.0'");
	check_error("OPENQASM 3.0;\nqubit[2] q\nh q[0];",
		"t.qasm:3:1: expected ';', found 'h'");
	check_error("OPENQASM 3.0;\nqubit q;\nh q;",
		"t.qasm:3:1: expected a declared gate (include \"stdgates.inc\" to use the standard "
		"gates), found 'h'");
	check_error("include \"qelib1.inc\";",
		"t.qasm:1:9: expected \"stdgates.inc\" (the only include file read), found '\"qelib1.inc\"'");
	check_error("include \"stdgates.inc\";\nqubit[2] q;\n  h q[5];",
		"t.qasm:3:7: expected an index from 0 to 1 into 'q' (got 5)");
	check_error("include \"stdgates.inc\";\nqubit q;\nrx q;",
		"t.qasm:3:1: expected 1 parameter for 'rx', found 0");
	check_error("include \"stdgates.inc\";\nqubit[2] q;\nctrl @ cx q[0], q[1];",
		"t.qasm:3:8: expected 3 qubit operands for 'cx' with its controls, found 2");
	check_error("qubit q;\nwhile (true) { }",
		"t.qasm:2:1: expected a statement (a declaration, gate or def call, for, if, measure "
		"or reset), found 'while'");
	check_error("qubit q;\ndef f() -> bit { }",
		"t.qasm:2:9: expected '{' (a def returning a value is not read; only defs used as "
		"statements are), found '->'");
	check_error("include \"stdgates.inc\";\ngate g a { measure a; }",
		"t.qasm:2:12: expected a gate call, gphase or for loop (a gate body is unitary), "
		"found 'measure'");
	check_error("input float n;\nqubit[n] q;",
		"t.qasm:2:7: expected a constant expression (no inputs, parameters or loop "
		"variables)");
	check_error("qubit q;\nqubit q;",
		"t.qasm:2:7: expected a new name ('q' is already declared), found 'q'");
	check_error("include \"stdgates.inc\";\nqubit[2] h;",
		"t.qasm:2:10: expected a name that is not a built-in or standard gate, found 'h'");
	check_error("qubit q; /* open",
		"t.qasm:1:10: unterminated comment (expected '*/')");
	check_error("qubit q;\nU(pi, 0, pi/) q;",
		"t.qasm:2:13: expected a number, a name or '(', found ')'");
	check_error("qubit q;\nU(1/0, 0, 0) q;",
		"t.qasm:2:4: division by zero");
	check_error("qubit q;\nU(0, 0, 0) q;\nOPENQASM 3;",
		"t.qasm:3:1: expected the version line only as the first statement, found 'OPENQASM'");
	check_error("include \"stdgates.inc\";\nqubit q;\nfor int i in {1, 2} { x q; }",
		"t.qasm:3:14: expected '[' (loops over sets are not read; use a range [a:b] or "
		"[a:step:b]), found '{'");
	check_error("include \"stdgates.inc\";\nqubit q;\nfor int i in [0:1] { qubit r; }",
		"t.qasm:3:22: expected a gate or def call, for, if, measure or reset (declarations "
		"other than a def's local bits are read only at the top level), found 'qubit'");
	check_error("qubit q;\nU(0, 0, 0) q[0:1];",
		"t.qasm:2:15: expected ']' (register slices are not read), found ':'");
	check_error("qubit q;\ngate g(a) b { U(a, 0, 0) q; }",
		"t.qasm:2:26: expected a qubit argument of the gate, found 'q'");
	check_error("input float w;\nqubit q;\ngate g(a) b { U(w, 0, 0) b; }",
		"t.qasm:3:17: expected a gate parameter, loop variable or constant (a gate body cannot "
		"read outer variables), found 'w'");
	check_error("qubit q;\nU(0, 0, 0) q; $",
		"t.qasm:2:15: unexpected character '$' (byte 0x24)");
	check_error("qubit q;\nU(0, 0, 0 q;",
		"t.qasm:2:11: expected ',', found 'q'");
	/* run-time errors carry the location of the operand or statement */
	check_error("include \"stdgates.inc\";\nqubit[2] q;\nfor int i in [0:2] {\n  h q[i];\n}",
		"t.qasm:4:5: expected an index from 0 to 1 into 'q', got 2");
	check_error("include \"stdgates.inc\";\nqubit[2] q;\n  cx q[1], q[1];",
		"t.qasm:3:3: expected distinct qubits (qubit 1 is used twice, or is also a control)");
	check_error("include \"stdgates.inc\";\nqubit q;\npow(0.5) @ x q;",
		"t.qasm:3:5: expected an integer exponent for pow (only integer powers are simulated), "
		"got 0.5");
	check_error("include \"stdgates.inc\";\nqubit[2] q;\nfor int i in [0:0.5] { x q[0]; }",
		"t.qasm:3:17: expected an integer loop bound, got 0.5");
	check_error("include \"stdgates.inc\";\nqubit[2] q;\nfor int i in [0:0:3] { x q[0]; }",
		"t.qasm:3:1: expected a nonzero loop step");
}

/* Inputs built to exhaust recursion are refused, not crashed on. */
static void test_limits(void)
{
	static char text[200000];
	char msg[1024];
	double complex out[2];
	/* 1500 nested parentheses */
	int n = snprintf(text, sizeof text, "qubit q;\nU(");
	for (int i = 0; i < 1500; i++)
		text[n++] = '(';
	text[n++] = '1';
	for (int i = 0; i < 1500; i++)
		text[n++] = ')';
	snprintf(text + n, sizeof text - (size_t)n, ", 0, 0) q;");
	int rc = run(text, NULL, 1, out, 2, NULL, msg);
	CHECK(rc == DW_EINPUT && strstr(msg, "expected an expression nested at most 1000 levels deep"),
		"deep parentheses: %s", msg);
	/* a left-deep chain x+1+1+... that constant folding cannot shorten: the
	 * k-th + (column 2 + 2k) makes depth k; the 1001st is refused */
	n = snprintf(text, sizeof text, "input float x;\nqubit q;\nU(x");
	for (int i = 0; i < 1200; i++)
		n += snprintf(text + n, sizeof text - (size_t)n, "+1");
	snprintf(text + n, sizeof text - (size_t)n, ", 0, 0) q;");
	rc = run(text, NULL, 1, out, 2, NULL, msg);
	CHECK(rc == DW_EINPUT && !strcmp(msg, "t.qasm:3:2004: expected an expression nested at most "
		"1000 levels deep"), "long chain: %s", msg);
	/* 1100 gates, each calling the one before */
	n = snprintf(text, sizeof text, "qubit q;\ngate g0 a { U(0, 0, 0) a; }\n");
	for (int i = 1; i < 1100; i++)
		n += snprintf(text + n, sizeof text - (size_t)n, "gate g%d a { g%d a; }\n", i, i - 1);
	snprintf(text + n, sizeof text - (size_t)n, "g1099 q;\n");
	rc = run(text, NULL, 1, out, 2, NULL, msg);
	CHECK(rc == DW_EINPUT && strstr(msg, "expected gate calls nested at most 1000 deep"),
		"deep gate chain: %s", msg);
}

/* Damaged programs: 3000 copies of a valid program with bytes deleted,
 * duplicated or replaced must each read (and run) cleanly or fail with
 * DW_EINPUT and a message that starts with the file name and a line.  Run
 * under AddressSanitizer this is a memory-safety check of the reader. */
static void test_damaged(void)
{
	const char *good =
		"OPENQASM 3.0;\ninclude \"stdgates.inc\";\ninput angle th;\nqubit[3] q;\nbit[2] c;\n"
		"const int n = 2;\ngate g(a, b) x, y { for int i in [0:1] { crz(a * i - b) x, y; } ry(b) y; }\n"
		"h q[0];\nfor int k in [0:n-1] { ctrl @ g(pi/3, -th) q[2 * k], q[1], q[2 - 2 * k]; }\n"
		"negctrl(2) @ x q[0], q[1], q[2]; inv @ pow(2) @ sx q[1];\n"
		"c[0] = measure q[0]; if (c[0] == 1) { x q[1]; } else { reset q[2]; }\n"
		"measure q[1] -> c[1]; /* end */ U(1e-3, 2.5, tau) q[2]; // done\n";
	const char alphabet[] = "q[]();{}@,:=0123456789.-+*/ \n\"abcxyz_π";
	char text[1024];
	uint64_t r = 12345;
	int ok = 0, bad = 0;
	for (int trial = 0; trial < 3000; trial++) {
		size_t len = strlen(good);
		memcpy(text, good, len + 1);
		int edits = 1 + trial % 3;
		for (int e = 0; e < edits; e++) {
			r = r * 6364136223846793005ull + 1442695040888963407ull;
			size_t at = (size_t)((r >> 20) % len);
			int kind = (int)((r >> 8) % 3);
			char ch = alphabet[(r >> 40) % (sizeof alphabet - 1)];
			if (kind == 0 && len > 1) {            /* delete */
				memmove(text + at, text + at + 1, len - at);
				len--;
			} else if (kind == 1 && len + 2 < sizeof text) { /* duplicate */
				memmove(text + at + 1, text + at, len - at + 1);
				len++;
			} else {                                 /* replace */
				text[at] = ch;
			}
		}
		char msg[1024];
		double complex out[8];
		dw_qasm_param th = {"th", 0.25};
		dw_qasm_params ps = {1, &th};
		int rc = run(text, &ps, (uint64_t)trial, out, 8, NULL, msg);
		if (rc == DW_OK)
			ok++;
		else
			bad++;
		CHECK(rc == DW_OK || (rc == DW_EINPUT && !strncmp(msg, "t.qasm:", 7)) || (rc == DW_EINPUT
			&& strstr(msg, "input 'th'")), "damaged program %d: status %d, %s", trial, rc, msg);
	}
	printf("damaged programs: %d read and ran, %d refused\n", ok, bad);
	CHECK(ok > 50 && bad > 1000, "damaged programs: %d read, %d refused", ok, bad);
}

static void test_angle_eval(void)
{
	/* constants and functions (values: C math library, common practice) */
	struct { const char *text; double want; } ok[] = {
		{"pi/4", M_PI / 4}, {"-3*π/8", -3 * M_PI / 8}, {"tau", 2 * M_PI},
		{"2**3**2", 512}, {"-2**2", -4}, {"1.5e-3", 1.5e-3}, {".5E+1", 5},
		{"sqrt(2)/2", M_SQRT1_2}, {"(1 + 2) * 3", 9}, {"sin(pi/6) + cos(0)", 1.5},
		{"euler", M_E}, {"arctan(1) * 4", M_PI}, {"ln(exp(2))", 2}, {"7 - 2 - 1", 4},
		{"8 / 4 / 2", 1},
	};
	for (size_t i = 0; i < sizeof ok / sizeof ok[0]; i++) {
		double v = 0;
		dw_error err = {0};
		int rc = dw_angle_expr_eval(ok[i].text, &v, &err);
		CHECK(rc == DW_OK && fabs(v - ok[i].want) <= 4e-16 * fmax(1, fabs(ok[i].want)),
			"%s = %.17g (want %.17g) %s", ok[i].text, v, ok[i].want, err.msg);
	}
	struct { const char *text, *msg; } bad[] = {
		{"pi/", "angle 'pi/': column 4: expected a number, a name or '(', found the end of the input"},
		{"1/0", "angle '1/0': column 2: division by zero"},
		{"sqrt(-1)", "angle 'sqrt(-1)': column 1: result is not a finite number in sqrt"},
		{"3 4", "angle '3 4': column 3: expected an operator or the end of the expression, found '4'"},
		{"1e", "angle '1e': column 1: expected digits after the exponent of a number"},
		{"theta", "angle 'theta': column 1: expected a number, a constant (pi, tau, euler), a "
			"function or a declared variable, found 'theta'"},
	};
	for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		double v = 42;
		dw_error err = {0};
		int rc = dw_angle_expr_eval(bad[i].text, &v, &err);
		CHECK(rc == DW_EINPUT && v == 42 && !strcmp(err.msg, bad[i].msg), "%s: %s",
			bad[i].text, err.msg);
	}
}

/* Run `dwell run` with args; its stdout into out. */
static int run_cli(int argc, char **argv, char *out, size_t cap)
{
	fflush(stdout);
	int saved = dup(1);
	FILE *tmp = tmpfile();
	if (saved < 0 || !tmp)
		return -1;
	dup2(fileno(tmp), 1);
	int rc = dw_cmd_run(argc, argv);
	fflush(stdout);
	dup2(saved, 1);
	close(saved);
	rewind(tmp);
	size_t n = fread(out, 1, cap - 1, tmp);
	out[n] = '\0';
	fclose(tmp);
	return rc;
}

static void write_file(const char *path, const char *text)
{
	FILE *f = fopen(path, "w");
	if (f) {
		fputs(text, f);
		fclose(f);
	}
}

static void test_cli(void)
{
	char dir[] = "/tmp/dwell-run-XXXXXX";
	if (!mkdtemp(dir)) {
		CHECK(0, "mkdtemp");
		return;
	}
	char bell[64], big[64], in[64];
	snprintf(bell, sizeof bell, "%s/bell.qasm", dir);
	snprintf(big, sizeof big, "%s/big.qasm", dir);
	snprintf(in, sizeof in, "%s/in.qasm", dir);
	write_file(bell, "OPENQASM 3.0;\ninclude \"stdgates.inc\";\nqubit[2] q;\nbit[2] c;\n"
		"h q[0];\ncx q[0], q[1];\n");
	/* a product state ry(0.1 (i+1)) on 21 qubits: above 20 qubits the most
	 * probable basis states are listed */
	write_file(big, "OPENQASM 3.0;\ninclude \"stdgates.inc\";\nqubit[21] q;\n"
		"for int i in [0:20] { ry(0.1 * (i + 1)) q[i]; }\n");
	write_file(in, "OPENQASM 3.0;\ninclude \"stdgates.inc\";\ninput angle a;\nqubit q;\n"
		"rx(a) q;\n");
	static char out[1 << 16];
	char *a1[] = {"run", bell, "--json", NULL};
	int rc = run_cli(3, a1, out, sizeof out);
	/* 1/sqrt(2) printed with 17 significant digits (%.17g, common practice) */
	CHECK(rc == 0 && !strcmp(out, "{\"qubits\": 2, \"seed\": 1, \"registers\": [{\"name\": \"q\", "
		"\"offset\": 0, \"size\": 2}], \"bits\": {\"c\": [0, 0]}, \"amplitudes\": "
		"[[0.70710678118654757, 0], [0, 0], [0, 0], [0.70710678118654757, 0]]}\n"),
		"bell --json: %s", out);
	char *a2[] = {"run", big, "--json", NULL};
	rc = run_cli(3, a2, out, sizeof out);
	/* the most probable outcome sets the qubits with sin^2(θ/2) > 1/2,
	 * θ = 0.1 (i+1) > π/2: i = 15..20, index 2^21 - 2^15 */
	double p = 1;
	for (int i = 0; i < 21; i++) {
		double s2 = sin(0.05 * (i + 1)) * sin(0.05 * (i + 1));
		p *= i >= 15 ? s2 : 1 - s2;
	}
	char want[128];
	snprintf(want, sizeof want, "\"outcomes\": [{\"index\": 2064384, \"probability\": ");
	const char *at = strstr(out, want);
	CHECK(rc == 0 && at, "21 qubits: outcomes start with index 2064384: %.300s", out);
	if (at) {
		double got = strtod(at + strlen(want), NULL);
		CHECK(fabs(got - p) < 1e-15, "top probability %.17g vs %.17g", got, p);
	}
	int count = 0;
	for (const char *c = out; (c = strstr(c, "\"index\"")); c++)
		count++;
	CHECK(count == 32, "32 outcomes listed, got %d", count);
	char *a3[] = {"run", in, "--param", "a=pi", NULL};
	rc = run_cli(4, a3, out, sizeof out);
	CHECK(rc == 0 && strstr(out, "         1  q=1  [0, -1]  1\n"), "rx(pi)|0> = -i|1>: %s", out);
	/* exit statuses: 1 usage, 2 bad input */
	char *u1[] = {"run", NULL};
	CHECK(run_cli(1, u1, out, sizeof out) == DW_EUSAGE, "no file: usage");
	char *u2[] = {"run", bell, "--seed", "x", NULL};
	CHECK(run_cli(4, u2, out, sizeof out) == DW_EUSAGE, "bad seed: usage");
	char *u3[] = {"run", in, "--param", "a=pi/", NULL};
	CHECK(run_cli(4, u3, out, sizeof out) == DW_EUSAGE, "bad param value: usage");
	char *e1[] = {"run", in, NULL};
	CHECK(run_cli(2, e1, out, sizeof out) == DW_EINPUT, "missing input: bad input");
	char nofile[80];
	snprintf(nofile, sizeof nofile, "%s/none.qasm", dir);
	char *e2[] = {"run", nofile, NULL};
	CHECK(run_cli(2, e2, out, sizeof out) == DW_EINPUT, "missing file: bad input");
	remove(bell);
	remove(big);
	remove(in);
	rmdir(dir);
}

int main(void)
{
	test_layout();
	test_programs();
	test_inputs();
	test_measure();
	test_errors();
	test_angle_eval();
	test_limits();
	test_damaged();
	test_cli();
	return check_done();
}
