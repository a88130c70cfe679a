/* libquantum_peer.c - dwell's reader and dense simulator against an
 * independent simulator, Debian's libquantum (libquantum-dev 1.1.1,
 * quantum.h).
 *
 * Takes: nothing (circuits are generated here).  Gives: checks that the
 * final states agree.  Each circuit is written as OpenQASM 3 text, read
 * and simulated by dwell, and applied gate by gate through libquantum's
 * API; the two states must agree up to a global phase within 1e-5
 * (libquantum computes in single precision and drops amplitudes near
 * 1e-6/2^n), and -- because every gate used has the same matrix in both,
 * as checked first -- the fitted phase must be 1 within the same bound.
 * libquantum's measurement uses the unseeded C rand(), so only states are
 * compared, never samples.  Given the dwell binary and sample problems as
 * arguments, it also compiles each sample (short, flat) and compares the
 * two simulators on dwell's own output (see compiled_sample).
 *
 * Conventions observed in libquantum 1.1.1 (checked below, on basis
 * states):
 *   - qubit t is bit t of the basis index (little-endian, as dwell);
 *   - quantum_r_x/r_y(t, g) = exp(-i g X/2), exp(-i g Y/2) (OpenQASM rx, ry);
 *   - quantum_r_z(t, g) = diag(e^{-ig/2}, e^{ig/2}) (OpenQASM rz);
 *   - quantum_phase_kick(t, g) = diag(1, e^{ig}) (OpenQASM p);
 *   - quantum_phase_scale(t, g) multiplies the whole state by e^{ig};
 *   - quantum_cond_phase_kick(c, t, g) = controlled diag(1, e^{ig}) (cp);
 *   - quantum_cond_phase_shift(c, t, g) = controlled rz(g) (crz);
 *   - quantum_hadamard, quantum_sigma_x/y/z: the standard H, X, Y, Z;
 *   - quantum_cnot(c, t), quantum_toffoli(c1, c2, t): control(s) first;
 *   - quantum_gate1(t, m): m.t row-major, m.t[1] the <0|m|1> entry;
 *   - after a one-qubit gate it removes basis states whose probability is
 *     below 1e-6 / 2^width (width = qubits of the register).  On 8 qubits
 *     that drops amplitudes up to 6e-5, and the states then differed by
 *     up to 1e-4; so the libquantum register is given LQ_IDLE extra qubits
 *     that stay |0>, which lowers the threshold to an amplitude near 1e-6
 *     without changing the state. */
#include <complex.h>
#include <math.h>
#include <quantum.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "../unit/check.h"
#include "dwell/qasm.h"
#include "dwell/sim.h"

#define LQ_IDLE 12   /* idle qubits added to libquantum registers (see above) */

enum { G_H, G_X, G_Y, G_RX, G_RY, G_RZ, G_P, G_CX, G_CP, G_CRZ, G_CCX, G_SWAP, G_U3, G_COUNT };

typedef struct op {
	int kind;
	int q[3];
	double a[3];
} op;

typedef struct circuit {
	int n;
	size_t len;
	op ops[600];
} circuit;

static uint64_t lcg = 20260101u;

static double unif(void)
{
	lcg = lcg * 6364136223846793005ull + 1442695040888963407ull;
	return (double)(lcg >> 11) * 0x1.0p-53;
}

static int pick(int n)
{
	return (int)(unif() * n);
}

/* ---- the two simulators ---- */

/* OpenQASM 3 text of one operation. */
static int qasm_op(char *s, size_t cap, const op *o)
{
	switch (o->kind) {
	case G_H: return snprintf(s, cap, "h q[%d];\n", o->q[0]);
	case G_X: return snprintf(s, cap, "x q[%d];\n", o->q[0]);
	case G_Y: return snprintf(s, cap, "y q[%d];\n", o->q[0]);
	case G_RX: return snprintf(s, cap, "rx(%.17g) q[%d];\n", o->a[0], o->q[0]);
	case G_RY: return snprintf(s, cap, "ry(%.17g) q[%d];\n", o->a[0], o->q[0]);
	case G_RZ: return snprintf(s, cap, "rz(%.17g) q[%d];\n", o->a[0], o->q[0]);
	case G_P: return snprintf(s, cap, "p(%.17g) q[%d];\n", o->a[0], o->q[0]);
	case G_CX: return snprintf(s, cap, "cx q[%d], q[%d];\n", o->q[0], o->q[1]);
	case G_CP: return snprintf(s, cap, "cp(%.17g) q[%d], q[%d];\n", o->a[0], o->q[0], o->q[1]);
	case G_CRZ: return snprintf(s, cap, "crz(%.17g) q[%d], q[%d];\n", o->a[0], o->q[0], o->q[1]);
	case G_CCX: return snprintf(s, cap, "ccx q[%d], q[%d], q[%d];\n", o->q[0], o->q[1], o->q[2]);
	case G_SWAP: return snprintf(s, cap, "swap q[%d], q[%d];\n", o->q[0], o->q[1]);
	case G_U3:
		/* OpenQASM 3 U (spec v3.0.0) with the e^{iθ/2} factor */
		return snprintf(s, cap, "U(%.17g, %.17g, %.17g) q[%d];\n", o->a[0], o->a[1], o->a[2],
			o->q[0]);
	default: return 0;
	}
}

/* The same operation through libquantum's API. */
static void lq_op(quantum_reg *r, const op *o)
{
	switch (o->kind) {
	case G_H: quantum_hadamard(o->q[0], r); break;
	case G_X: quantum_sigma_x(o->q[0], r); break;
	case G_Y: quantum_sigma_y(o->q[0], r); break;
	case G_RX: quantum_r_x(o->q[0], (float)o->a[0], r); break;
	case G_RY: quantum_r_y(o->q[0], (float)o->a[0], r); break;
	case G_RZ: quantum_r_z(o->q[0], (float)o->a[0], r); break;
	case G_P: quantum_phase_kick(o->q[0], (float)o->a[0], r); break;
	case G_CX: quantum_cnot(o->q[0], o->q[1], r); break;
	case G_CP: quantum_cond_phase_kick(o->q[0], o->q[1], (float)o->a[0], r); break;
	case G_CRZ: quantum_cond_phase_shift(o->q[0], o->q[1], (float)o->a[0], r); break;
	case G_CCX: quantum_toffoli(o->q[0], o->q[1], o->q[2], r); break;
	case G_SWAP:
		quantum_cnot(o->q[0], o->q[1], r);
		quantum_cnot(o->q[1], o->q[0], r);
		quantum_cnot(o->q[0], o->q[1], r);
		break;
	case G_U3: {
		/* U(θ,φ,λ) = e^{iθ/2} [[c, -e^{iλ}s], [e^{iφ}s, e^{i(φ+λ)}c]] */
		double th = o->a[0], ph = o->a[1], la = o->a[2];
		double complex g = cexp(I * th / 2);
		quantum_matrix m = quantum_new_matrix(2, 2);
		m.t[0] = (float complex)(g * cos(th / 2));
		m.t[1] = (float complex)(-g * cexp(I * la) * sin(th / 2));
		m.t[2] = (float complex)(g * cexp(I * ph) * sin(th / 2));
		m.t[3] = (float complex)(g * cexp(I * (ph + la)) * cos(th / 2));
		quantum_gate1(o->q[0], m, r);
		quantum_delete_matrix(&m);
		break;
	}
	default: break;
	}
}

/* Dense copy of a libquantum register. */
static void lq_dense(const quantum_reg *r, double complex *out, uint64_t dim)
{
	memset(out, 0, dim * sizeof *out);
	for (int i = 0; i < r->size; i++)
		if (r->state[i] < dim)
			out[r->state[i]] += r->amplitude[i];
}

/* dwell's state of OpenQASM 3 text; dim amplitudes to out. */
static int dwell_state(const char *text, double complex *out, uint64_t dim)
{
	dw_error err = {0};
	dw_qasm_program *prog = NULL;
	dw_state *st = NULL;
	int rc = dw_qasm_parse_string(text, "<peer>", &prog, &err);
	if (rc == DW_OK)
		rc = dw_sim_run(prog, NULL, 1, &st, &err);
	if (rc == DW_OK)
		memcpy(out, st->amp, dim * sizeof *out);
	else
		fprintf(stderr, "dwell: %s\n", err.msg);
	dw_state_free(st);
	dw_qasm_free(prog);
	return rc;
}

/* Compare a and b up to a global phase fitted on the largest entry. */
static void compare(const char *what, const double complex *ours, const double complex *peer,
	uint64_t dim, double tol)
{
	uint64_t big = 0;
	for (uint64_t i = 1; i < dim; i++)
		if (cabs(ours[i]) > cabs(ours[big]))
			big = i;
	double complex phase = peer[big] != 0 ? ours[big] / peer[big] : 0;
	phase /= cabs(phase) > 0 ? cabs(phase) : 1;
	double worst = 0, norm_peer = 0;
	for (uint64_t i = 0; i < dim; i++) {
		worst = fmax(worst, cabs(ours[i] - phase * peer[i]));
		norm_peer += creal(peer[i] * conj(peer[i]));
	}
	printf("%s: largest difference up to global phase %.3g, phase %.9f%+.9fi, "
		"libquantum norm %.9f\n", what, worst, creal(phase), cimag(phase), norm_peer);
	CHECK(worst <= tol, "%s: dwell vs libquantum differ by %.3g (> %.3g)", what, worst, tol);
	CHECK(cabs(phase - 1) <= tol, "%s: global phase %.9f%+.9fi, expected 1 (same gate "
		"matrices in both)", what, creal(phase), cimag(phase));
}

/* Run circuit c through both; prefix is extra OpenQASM text placed
 * before the gates (definitions), body replaces the generated gate text
 * when not NULL (the libquantum side always applies c->ops). */
static void run_both(const char *what, const circuit *c, const char *prefix, const char *body)
{
	size_t cap = 64 * 1024;
	char *text = malloc(cap);
	size_t len = (size_t)snprintf(text, cap, "OPENQASM 3.0;\ninclude \"stdgates.inc\";\n"
		"qubit[%d] q;\n%s", c->n, prefix ? prefix : "");
	if (body)
		len += (size_t)snprintf(text + len, cap - len, "%s", body);
	else
		for (size_t i = 0; i < c->len && len < cap; i++)
			len += (size_t)qasm_op(text + len, cap - len, &c->ops[i]);
	uint64_t dim = (uint64_t)1 << c->n;
	double complex *ours = calloc(dim, sizeof *ours), *peer = calloc(dim, sizeof *peer);
	if (dwell_state(text, ours, dim) == DW_OK) {
		quantum_reg r = quantum_new_qureg(0, c->n + LQ_IDLE);
		for (size_t i = 0; i < c->len; i++)
			lq_op(&r, &c->ops[i]);
		lq_dense(&r, peer, dim);
		quantum_delete_qureg(&r);
		compare(what, ours, peer, dim, 1e-5);
	} else {
		CHECK(0, "%s: dwell could not run its circuit", what);
	}
	free(ours);
	free(peer);
	free(text);
}

/* ---- conventions, on basis states ---- */

static void basis_check(const char *what, int n, uint64_t in, void (*apply)(quantum_reg *),
	const double complex *want)
{
	quantum_reg r = quantum_new_qureg(in, n);
	apply(&r);
	double complex got[8];
	lq_dense(&r, got, (uint64_t)1 << n);
	quantum_delete_qureg(&r);
	double worst = 0;
	for (int i = 0; i < (1 << n); i++)
		worst = fmax(worst, cabs(got[i] - want[i]));
	CHECK(worst < 1e-6, "libquantum convention %s: deviation %.3g", what, worst);
}

static void a_rx(quantum_reg *r) { quantum_r_x(0, 0.7f, r); }
static void a_ry(quantum_reg *r) { quantum_r_y(0, 0.7f, r); }
static void a_rz(quantum_reg *r) { quantum_r_z(0, 0.7f, r); }
static void a_kick(quantum_reg *r) { quantum_phase_kick(0, 0.7f, r); }
static void a_scale(quantum_reg *r) { quantum_phase_scale(0, 0.7f, r); }
static void a_cpk(quantum_reg *r) { quantum_cond_phase_kick(0, 1, 0.7f, r); }
static void a_cps(quantum_reg *r) { quantum_cond_phase_shift(0, 1, 0.7f, r); }
static void a_x1(quantum_reg *r) { quantum_sigma_x(1, r); }
static void a_cnot(quantum_reg *r) { quantum_cnot(0, 1, r); }

/* libquantum's pruning: a ry leaving |1> with probability p on a register
 * of width w keeps |1> only when p >= 1e-6 / 2^w. */
static void pruning(void)
{
	for (int w = 1; w <= 4; w++) {
		double limit = 1e-6 / (1 << w);
		for (int k = 0; k < 2; k++) {
			double p = k ? 1.3 * limit : 0.7 * limit;
			quantum_reg r = quantum_new_qureg(0, w);
			quantum_r_y(0, (float)(2 * asin(sqrt(p))), &r);
			CHECK(r.size == 1 + k, "libquantum width %d keeps |1> of probability %.3g: %s "
				"(observed threshold 1e-6/2^width = %.3g)", w, p, r.size == 2 ? "yes" : "no", limit);
			quantum_delete_qureg(&r);
		}
	}
}

static void conventions(void)
{
	double c = cos(0.35), s = sin(0.35);
	double complex w[4];
	w[0] = c; w[1] = -I * s; w[2] = w[3] = 0;
	basis_check("r_x = exp(-i g X/2)", 2, 0, a_rx, w);
	w[0] = c; w[1] = s;
	basis_check("r_y = exp(-i g Y/2)", 2, 0, a_ry, w);
	w[0] = 0; w[1] = cexp(I * 0.35);
	basis_check("r_z = diag(e^{-ig/2}, e^{ig/2}) on |1>", 2, 1, a_rz, w);
	w[0] = cexp(-I * 0.35); w[1] = 0;
	basis_check("r_z on |0>", 2, 0, a_rz, w);
	w[0] = 1; w[1] = 0;
	basis_check("phase_kick leaves |0>", 2, 0, a_kick, w);
	w[0] = 0; w[1] = cexp(I * 0.7);
	basis_check("phase_kick = diag(1, e^{ig})", 2, 1, a_kick, w);
	w[0] = cexp(I * 0.7); w[1] = 0;
	basis_check("phase_scale multiplies |0> by e^{ig}", 2, 0, a_scale, w);
	w[0] = w[1] = w[2] = 0; w[3] = cexp(I * 0.7);
	basis_check("cond_phase_kick = cp on |11>", 2, 3, a_cpk, w);
	w[3] = 0; w[2] = 1;
	basis_check("cond_phase_kick leaves |target=1, control=0>", 2, 2, a_cpk, w);
	w[2] = 0; w[1] = cexp(-I * 0.35);
	basis_check("cond_phase_shift = crz: control 1, target 0", 2, 1, a_cps, w);
	w[1] = 0; w[3] = cexp(I * 0.35);
	basis_check("cond_phase_shift = crz: control 1, target 1", 2, 3, a_cps, w);
	w[3] = 0; w[2] = 1;
	basis_check("qubit 1 is bit 1 of the index", 2, 0, a_x1, w);
	w[2] = 0; w[3] = 1;
	basis_check("cnot(0, 1): qubit 0 controls", 2, 1, a_cnot, w);
}

/* ---- circuits ---- */

static void random_circuit(circuit *c, int n, size_t len)
{
	c->n = n;
	c->len = len;
	for (size_t i = 0; i < len; i++) {
		op *o = &c->ops[i];
		static const int kinds[] = {G_H, G_RX, G_RY, G_RZ, G_CX, G_CCX, G_H, G_RX, G_RY,
			G_RZ, G_CX, G_CCX, G_P, G_CP, G_CRZ, G_SWAP, G_Y, G_X, G_U3};
		o->kind = kinds[pick((int)(sizeof kinds / sizeof kinds[0]))];
		o->q[0] = pick(n);
		do
			o->q[1] = pick(n);
		while (o->q[1] == o->q[0]);
		do
			o->q[2] = pick(n);
		while (o->q[2] == o->q[0] || o->q[2] == o->q[1]);
		for (int k = 0; k < 3; k++)
			o->a[k] = (2 * unif() - 1) * 3.14159265358979;
	}
}

/* A Fourier transform (h, cp, final swaps) on n qubits, after rx/ry on
 * every qubit so that the input is not a basis state. */
static void fourier_circuit(circuit *c, int n)
{
	c->n = n;
	c->len = 0;
	for (int q = 0; q < n; q++) {
		c->ops[c->len++] = (op){G_RX, {q, 0, 0}, {0.3 + 0.4 * q, 0, 0}};
		c->ops[c->len++] = (op){G_RY, {q, 0, 0}, {1.1 - 0.25 * q, 0, 0}};
	}
	for (int j = n - 1; j >= 0; j--) {
		c->ops[c->len++] = (op){G_H, {j, 0, 0}, {0, 0, 0}};
		for (int k = j - 1; k >= 0; k--)
			c->ops[c->len++] = (op){G_CP, {k, j, 0}, {3.14159265358979323846 / (1 << (j - k)), 0, 0}};
	}
	for (int q = 0; q < n / 2; q++)
		c->ops[c->len++] = (op){G_SWAP, {q, n - 1 - q, 0}, {0, 0, 0}};
}

/* A program with a parameterised gate definition, a loop over layers and
 * modifiers, against its expansion by hand for libquantum. */
static void structured(void)
{
	const int n = 6, layers = 4;
	circuit c = {n, 0, {{0}}};
	const char *prefix =
		"gate layer(a, b) x0, x1, x2 { ry(a) x0; cx x0, x1; crz(b) x1, x2; h x2; }\n";
	const char *body =
		"for int l in [0:3] {\n"
		"  for int k in [0:3] { layer(0.2 * (l + 1) + 0.1 * k, pi / (k + 2)) q[k], q[k + 1], q[k + 2]; }\n"
		"  ctrl @ rx(0.5 * l - 0.3) q[5], q[0];\n"
		"  inv @ p(0.4 + l) q[l];\n"
		"  pow(2) @ h q[3];\n"
		"}\n";
	for (int l = 0; l < layers; l++) {
		for (int k = 0; k < 4; k++) {
			double a = 0.2 * (l + 1) + 0.1 * k, b = 3.14159265358979323846 / (k + 2);
			c.ops[c.len++] = (op){G_RY, {k, 0, 0}, {a, 0, 0}};
			c.ops[c.len++] = (op){G_CX, {k, k + 1, 0}, {0, 0, 0}};
			c.ops[c.len++] = (op){G_CRZ, {k + 1, k + 2, 0}, {b, 0, 0}};
			c.ops[c.len++] = (op){G_H, {k + 2, 0, 0}, {0, 0, 0}};
		}
		/* ctrl @ rx(g) = controlled exp(-i g X/2): h, crz(g), h on the target */
		double g = 0.5 * l - 0.3;
		c.ops[c.len++] = (op){G_H, {0, 0, 0}, {0, 0, 0}};
		c.ops[c.len++] = (op){G_CRZ, {5, 0, 0}, {g, 0, 0}};
		c.ops[c.len++] = (op){G_H, {0, 0, 0}, {0, 0, 0}};
		c.ops[c.len++] = (op){G_P, {l, 0, 0}, {-(0.4 + l), 0, 0}};
		/* pow(2) @ h = identity: nothing on the libquantum side */
	}
	run_both("loops, definitions and modifiers (6 qubits)", &c, prefix, body);
}

/* ---- compiled samples ----
 *
 * `dwell compile SAMPLE --flat --set schedule.steps=1 --set formula.steps=1`
 * writes a short flat program (the full circuits have about 10^6 gates,
 * over which libquantum's single precision drifts to about 4e-3, and they
 * take it minutes).  The flat text is read here by a separate line reader
 * -- one gate per line, `name[(angle)] reg[i], ...;` -- and applied
 * through libquantum; dwell reads and runs the same file itself. */

typedef struct lq_regs {
	int n;
	char name[16][32];
	int offset[16];
	int qubits;
} lq_regs;

/* Apply one flat line to r; 0 when done, 1 for a skipped line, -1 on a
 * line this reader does not know (message in why). */
static int lq_line(quantum_reg *r, const lq_regs *g, const char *line, char *why, size_t cap)
{
	char name[16] = "";
	int k = 0;
	const char *p = line;
	while (*p && *p != ' ' && *p != '(' && *p != ';' && k < 15)
		name[k++] = *p++;
	name[k] = '\0';
	double a = 0;
	if (*p == '(') {
		char *end;
		a = strtod(p + 1, &end);
		p = strchr(end, ')');
		if (!p) {
			snprintf(why, cap, "no ')' in: %s", line);
			return -1;
		}
		p++;
	}
	int q[3], nq = 0;
	while (nq < 3 && (p = strpbrk(p, "abcdefghijklmnopqrstuvwxyz"))) {
		char reg[32];
		int idx;
		if (sscanf(p, "%31[a-z_0-9][%d]", reg, &idx) != 2)
			break;
		int found = 0;
		for (int i = 0; i < g->n; i++)
			if (!strcmp(reg, g->name[i])) {
				q[nq++] = g->offset[i] + idx;
				found = 1;
			}
		if (!found) {
			snprintf(why, cap, "unknown register in: %s", line);
			return -1;
		}
		p = strchr(p, ']');
		if (!p)
			break;
		p++;
	}
	const double pi = 3.14159265358979323846;
	int want = !strcmp(name, "cx") || !strcmp(name, "cz") || !strcmp(name, "cp")
		|| !strcmp(name, "crz") || !strcmp(name, "swap") ? 2 : !strcmp(name, "ccx") ? 3 : 1;
	if (nq != want) {
		snprintf(why, cap, "expected %d operands in: %s", want, line);
		return -1;
	}
	if (!strcmp(name, "h")) quantum_hadamard(q[0], r);
	else if (!strcmp(name, "x")) quantum_sigma_x(q[0], r);
	else if (!strcmp(name, "y")) quantum_sigma_y(q[0], r);
	else if (!strcmp(name, "z")) quantum_sigma_z(q[0], r);
	else if (!strcmp(name, "s")) quantum_phase_kick(q[0], (float)(pi / 2), r);
	else if (!strcmp(name, "sdg")) quantum_phase_kick(q[0], (float)(-pi / 2), r);
	else if (!strcmp(name, "t")) quantum_phase_kick(q[0], (float)(pi / 4), r);
	else if (!strcmp(name, "tdg")) quantum_phase_kick(q[0], (float)(-pi / 4), r);
	else if (!strcmp(name, "p")) quantum_phase_kick(q[0], (float)a, r);
	else if (!strcmp(name, "rx")) quantum_r_x(q[0], (float)a, r);
	else if (!strcmp(name, "ry")) quantum_r_y(q[0], (float)a, r);
	else if (!strcmp(name, "rz")) quantum_r_z(q[0], (float)a, r);
	else if (!strcmp(name, "cx")) quantum_cnot(q[0], q[1], r);
	else if (!strcmp(name, "cz")) quantum_cond_phase_kick(q[0], q[1], (float)pi, r);
	else if (!strcmp(name, "cp")) quantum_cond_phase_kick(q[0], q[1], (float)a, r);
	else if (!strcmp(name, "crz")) quantum_cond_phase_shift(q[0], q[1], (float)a, r);
	else if (!strcmp(name, "ccx")) quantum_toffoli(q[0], q[1], q[2], r);
	else if (!strcmp(name, "swap")) {
		quantum_cnot(q[0], q[1], r);
		quantum_cnot(q[1], q[0], r);
		quantum_cnot(q[0], q[1], r);
	} else {
		snprintf(why, cap, "gate '%s' has no libquantum mapping here: %s", name, line);
		return -1;
	}
	return 0;
}

static void compiled_sample(const char *dwell, const char *yaml)
{
	char dir[] = "/tmp/dwell-lq-XXXXXX";
	if (!mkdtemp(dir)) {
		CHECK(0, "mkdtemp");
		return;
	}
	char cmd[2048], path[512];
	snprintf(cmd, sizeof cmd, "'%s' compile '%s' -o '%s' --flat --set schedule.steps=1 "
		"--set formula.steps=1 > /dev/null", dwell, yaml, dir);
	int rc = system(cmd);
	snprintf(path, sizeof path, "%s/circuit.qasm", dir);
	FILE *f = rc == 0 ? fopen(path, "r") : NULL;
	CHECK(f, "%s: `dwell compile --flat` gave status %d and no %s", yaml, rc, path);
	if (f) {
		lq_regs g = {0};
		char line[1024], why[1200] = "";
		quantum_reg r;
		int started = 0, bad = 0;
		long gates = 0;
		while (!bad && fgets(line, sizeof line, f)) {
			char *l = line;
			while (*l == ' ' || *l == '\t')
				l++;
			int size;
			char reg[32];
			if (sscanf(l, "qubit[%d] %31[a-z_0-9];", &size, reg) == 2 && g.n < 16) {
				snprintf(g.name[g.n], sizeof g.name[g.n], "%s", reg);
				g.offset[g.n++] = g.qubits;
				g.qubits += size;
				continue;
			}
			if (!*l || *l == '\n' || !strncmp(l, "//", 2) || !strncmp(l, "OPENQASM", 8)
				|| !strncmp(l, "include", 7))
				continue;
			if (!started) {
				r = quantum_new_qureg(0, g.qubits + LQ_IDLE);
				started = 1;
			}
			bad = lq_line(&r, &g, l, why, sizeof why) < 0;
			gates++;
		}
		fclose(f);
		CHECK(!bad, "%s: %s", yaml, why);
		if (started && !bad) {
			uint64_t dim = (uint64_t)1 << g.qubits;
			double complex *ours = calloc(dim, sizeof *ours), *peer = calloc(dim, sizeof *peer);
			dw_error err = {0};
			dw_qasm_program *prog = NULL;
			dw_state *st = NULL;
			int st_rc = dw_qasm_parse_file(path, &prog, &err);
			if (st_rc == DW_OK)
				st_rc = dw_sim_run(prog, NULL, 1, &st, &err);
			CHECK(st_rc == DW_OK && st->dim == dim, "%s: dwell run: %s", yaml, err.msg);
			if (st_rc == DW_OK && st->dim == dim) {
				memcpy(ours, st->amp, dim * sizeof *ours);
				lq_dense(&r, peer, dim);
				char what[600];
				snprintf(what, sizeof what, "sample %s, starved (%ld gates, %d qubits)", yaml,
					gates, g.qubits);
				/* single precision: each gate may add a rounding of about 2^-24
				 * (common practice), so the bound grows with the gate count
				 * (seen: 2.9e-7 for 128 gates, 9.9e-6 for 1123) */
				compare(what, ours, peer, dim, 1e-5 + (double)gates * 0x1.0p-24);
			}
			dw_state_free(st);
			dw_qasm_free(prog);
			free(ours);
			free(peer);
		}
		if (started)
			quantum_delete_qureg(&r);
	}
	remove(path);
	snprintf(path, sizeof path, "%s/ledger.json", dir);
	remove(path);
	rmdir(dir);
}

/* Arguments: [DWELL SAMPLE.yaml...] to add the compiled samples. */
int main(int argc, char **argv)
{
	conventions();
	pruning();
	static circuit c;
	random_circuit(&c, 8, 400);
	run_both("random circuit (8 qubits, 400 gates)", &c, NULL, NULL);
	random_circuit(&c, 10, 300);
	run_both("random circuit (10 qubits, 300 gates)", &c, NULL, NULL);
	fourier_circuit(&c, 7);
	run_both("Fourier transform (7 qubits)", &c, NULL, NULL);
	structured();
	for (int i = 2; i < argc; i++)
		compiled_sample(argv[1], argv[i]);
	return check_done();
}
