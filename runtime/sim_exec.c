/* sim_exec.c - execute a parsed OpenQASM 3 program on a dense state.
 * Takes: a dw_qasm_program (qasm_prog.h), input values, a dw_state.
 * Gives: the state after the program, its classical bits.
 *
 * Walks the statement tree.  A gate call evaluates its arguments in the
 * caller's frame, then applies its modifiers left to right: ctrl/negctrl
 * take the next operands as controls (kept as an index mask and value),
 * inv toggles the direction, pow(k) repeats (k < 0 inverts).  A standard
 * gate becomes one kernel call with its exact matrix; a user gate runs its
 * body in a new frame, backwards and with every gate inverted when the
 * direction is inverted.  gphase multiplies the amplitudes that satisfy
 * the current controls.  A def call (never under modifiers) resolves its
 * qubit arguments, runs its body with fresh variable slots and a fresh,
 * zeroed frame of local bits; measure, reset and if in it act on those. */
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/sim.h"
#include "qasm_prog.h"

typedef struct ctx {
	uint64_t cmask, cval;     /* controls in force */
	int inv;                  /* apply inverses, in reverse order */
} ctx;

typedef struct exec {
	const dw_qasm_program *prog;
	dw_state *st;
	dw_error *err;
	double *vars;             /* frames of variable slots */
	size_t nvars, capvars;
	int depth;                /* nesting of user gate and def calls */
	unsigned char *lbits;     /* frames of def-local bits */
	size_t nlbits, caplbits;
} exec;

static int fail_at(exec *x, long line, long col, const char *fmt, ...)
	__attribute__((format(printf, 4, 5)));

static int fail_at(exec *x, long line, long col, const char *fmt, ...)
{
	char what[700];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(what, sizeof what, fmt, ap);
	va_end(ap);
	return dw_fail(x->err, DW_EINPUT, "%s:%ld:%ld: %s", x->prog->name, line, col, what);
}

/* Push a frame of n zeroed slots; gives its base index. */
static int push_frame(exec *x, int n, size_t *base)
{
	*base = x->nvars;
	if (n == 0)
		return DW_OK;
	if (x->nvars + (size_t)n > x->capvars) {
		size_t cap = x->capvars ? x->capvars : 64;
		while (cap < x->nvars + (size_t)n)
			cap *= 2;
		double *v = realloc(x->vars, cap * sizeof *v);
		if (!v)
			return dw_fail(x->err, DW_EINTERNAL, "out of memory running %s", x->prog->name);
		x->vars = v;
		x->capvars = cap;
	}
	*base = x->nvars;
	memset(x->vars + x->nvars, 0, (size_t)n * sizeof *x->vars);
	x->nvars += (size_t)n;
	return DW_OK;
}

static int eval(exec *x, int e, size_t vb, double *out)
{
	return qx_eval(x->prog, e, x->vars + vb, out, x->err);
}

/* An integer-valued expression (loop bound, index, exponent). */
static int eval_int(exec *x, int e, size_t vb, const char *what, long long *out)
{
	double v;
	int st = eval(x, e, vb, &v);
	if (st)
		return st;
	const qx_expr *n = &x->prog->ex[e];
	if (v != floor(v) || fabs(v) > 9007199254740992.0)
		return fail_at(x, n->line, n->col, "expected an integer %s, got %.17g", what, v);
	*out = (long long)v;
	return DW_OK;
}

/* ---- exact matrices of the built-in and standard gates ---- */

/* e^{ia} [[c, -e^{il} s], [e^{ip} s, e^{i(p+l)} c]], c = cos(th/2), s = sin(th/2):
 * with a = th/2 this is OpenQASM 3's U(th, p, l). */
static void u_matrix(double th, double ph, double la, double a, double complex m[4])
{
	double c = cos(th / 2), s = sin(th / 2);
	double complex g = cexp(I * a);
	m[0] = g * c;
	m[1] = -g * cexp(I * la) * s;
	m[2] = g * cexp(I * ph) * s;
	m[3] = g * cexp(I * (ph + la)) * c;
}

static void set(double complex m[4], double complex a, double complex b,
	double complex c, double complex d)
{
	m[0] = a;
	m[1] = b;
	m[2] = c;
	m[3] = d;
}

/* Matrix of a one-target standard gate and its number of controls (the
 * leading qubit operands).  Definitions: stdgates.inc of the OpenQASM 3
 * specification v3.0.0 (METHODS 10.2), worked out in closed form. */
static int builtin_matrix(int id, const double *p, double complex m[4])
{
	const double r = M_SQRT1_2;
	switch (id) {
	case QB_U: u_matrix(p[0], p[1], p[2], p[0] / 2, m); return 0;
	case QB_P: case QB_PHASE: case QB_U1: set(m, 1, 0, 0, cexp(I * p[0])); return 0;
	case QB_CP: case QB_CPHASE: set(m, 1, 0, 0, cexp(I * p[0])); return 1;
	case QB_X: set(m, 0, 1, 1, 0); return 0;
	case QB_CX: set(m, 0, 1, 1, 0); return 1;
	case QB_CCX: set(m, 0, 1, 1, 0); return 2;
	/* CX := ctrl @ U(pi, 0, pi), and U(pi, 0, pi) = i X exactly */
	case QB_CX_OLD: set(m, 0, I, I, 0); return 1;
	case QB_Y: set(m, 0, -I, I, 0); return 0;
	case QB_CY: set(m, 0, -I, I, 0); return 1;
	case QB_Z: set(m, 1, 0, 0, -1); return 0;
	case QB_CZ: set(m, 1, 0, 0, -1); return 1;
	case QB_H: set(m, r, r, r, -r); return 0;
	case QB_CH: set(m, r, r, r, -r); return 1;
	case QB_S: set(m, 1, 0, 0, I); return 0;
	case QB_SDG: set(m, 1, 0, 0, -I); return 0;
	case QB_T: set(m, 1, 0, 0, CMPLX(r, r)); return 0;
	case QB_TDG: set(m, 1, 0, 0, CMPLX(r, -r)); return 0;
	case QB_SX: set(m, CMPLX(0.5, 0.5), CMPLX(0.5, -0.5), CMPLX(0.5, -0.5), CMPLX(0.5, 0.5)); return 0;
	case QB_RX: case QB_CRX: {
		double c = cos(p[0] / 2), s = sin(p[0] / 2);
		set(m, c, CMPLX(0, -s), CMPLX(0, -s), c);
		return id == QB_CRX;
	}
	case QB_RY: case QB_CRY: {
		double c = cos(p[0] / 2), s = sin(p[0] / 2);
		set(m, c, -s, s, c);
		return id == QB_CRY;
	}
	case QB_RZ: case QB_CRZ:
		set(m, cexp(-I * p[0] / 2), 0, 0, cexp(I * p[0] / 2));
		return id == QB_CRZ;
	/* cu(th, ph, la, ga) c, t = p(ga - th/2) c; ctrl @ U(th, ph, la) c, t */
	case QB_CU: u_matrix(p[0], p[1], p[2], p[3], m); return 1;
	case QB_ID: set(m, 1, 0, 0, 1); return 0;
	/* u2(ph, la) = gphase(-(ph + la + pi/2)/2); U(pi/2, ph, la) */
	case QB_U2: u_matrix(M_PI / 2, p[0], p[1], -(p[0] + p[1]) / 2, m); return 0;
	/* u3(th, ph, la) = gphase(-(ph + la + th)/2); U(th, ph, la) */
	case QB_U3: u_matrix(p[0], p[1], p[2], -(p[1] + p[2]) / 2, m); return 0;
	default: set(m, 1, 0, 0, 1); return 0;
	}
}

/* ---- execution ---- */

/* Where a statement runs: its variable frame, the qubits of the gate or def
 * whose body it is in, and for a def body the def and its bit frame. */
typedef struct scope {
	size_t vb;
	const int *qargs;
	const qx_gatedef *def;
	size_t bb;                /* local bits of def at x->lbits[bb ...] */
} scope;

static int exec_block(exec *x, const qx_block *b, const scope *sc, ctx c);

/* The base gate of a call (after its modifiers) on qubits q. */
static int apply_gate(exec *x, const qx_stmt *s, const int *q, const double *par,
	size_t frame, ctx c)
{
	dw_state *st = x->st;
	if (s->user >= 0) {
		scope body = {frame, q, NULL, 0};
		return exec_block(x, &x->prog->gates[s->user].body, &body, c);
	}
	switch (s->builtin) {
	case QB_GPHASE:
		dw_state_apply_phase(st, cexp(I * (c.inv ? -par[0] : par[0])), c.cmask, c.cval);
		return DW_OK;
	case QB_SWAP:
		dw_state_apply_swap(st, q[0], q[1], c.cmask, c.cval);
		return DW_OK;
	case QB_CSWAP: {
		uint64_t b = (uint64_t)1 << q[0];
		dw_state_apply_swap(st, q[1], q[2], c.cmask | b, c.cval | b);
		return DW_OK;
	}
	case QB_ID:
		st->gates_applied++;
		return DW_OK;
	default:
		break;
	}
	double complex m[4];
	int nctrl = builtin_matrix(s->builtin, par, m);
	for (int i = 0; i < nctrl; i++) {
		c.cmask |= (uint64_t)1 << q[i];
		c.cval |= (uint64_t)1 << q[i];
	}
	if (c.inv) {
		double complex a = conj(m[0]), b = conj(m[2]), d = conj(m[1]), e = conj(m[3]);
		set(m, a, b, d, e);
	}
	dw_state_apply_1q(st, q[nctrl], m, c.cmask, c.cval);
	return DW_OK;
}

/* Apply modifiers mi.. of s; q[qoff..] are the operands left. */
static int apply_mods(exec *x, const qx_stmt *s, int mi, const int *q, const double *par,
	size_t frame, size_t vb, ctx c)
{
	if (mi == s->nmods)
		return apply_gate(x, s, q, par, frame, c);
	const qx_mod *m = &s->mods[mi];
	switch (m->kind) {
	case QM_CTRL:
	case QM_NEGCTRL:
		for (int j = 0; j < m->count; j++) {
			c.cmask |= (uint64_t)1 << q[j];
			if (m->kind == QM_CTRL)
				c.cval |= (uint64_t)1 << q[j];
		}
		return apply_mods(x, s, mi + 1, q + m->count, par, frame, vb, c);
	case QM_INV:
		c.inv ^= 1;
		return apply_mods(x, s, mi + 1, q, par, frame, vb, c);
	default: {
		long long k;
		int st = eval_int(x, m->expr, vb, "exponent for pow (only integer powers are "
			"simulated)", &k);
		if (st)
			return st;
		if (k < 0) {
			c.inv ^= 1;
			k = -k;
		}
		for (long long i = 0; i < k && st == DW_OK; i++)
			st = apply_mods(x, s, mi + 1, q, par, frame, vb, c);
		return st;
	}
	}
}

/* Are the n qubits q distinct from each other and from the controls in
 * mask? */
static int distinct(exec *x, const qx_stmt *s, const int *q, int n, uint64_t mask,
	const char *what)
{
	for (int i = 0; i < n; i++) {
		uint64_t b = (uint64_t)1 << q[i];
		if (mask & b)
			return fail_at(x, s->line, s->col, "expected distinct qubits (qubit %d is %s)",
				q[i], what);
		mask |= b;
	}
	return DW_OK;
}

/* One call on concrete qubits q (controls first). */
static int apply_call(exec *x, const qx_stmt *s, const int *q, size_t vb, ctx c)
{
	int st = distinct(x, s, q, s->nops, c.cmask, "used twice, or is also a control");
	if (st)
		return st;
	double par[4] = {0};
	size_t frame = 0;
	if (s->user >= 0) {
		const qx_gatedef *d = &x->prog->gates[s->user];
		if (x->depth >= QX_MAX_NEST)
			return fail_at(x, s->line, s->col, "expected gate calls nested at most %d deep",
				QX_MAX_NEST);
		if ((st = push_frame(x, d->nslots, &frame)))
			return st;
		x->depth++;
		for (int i = 0; i < s->nparams && st == DW_OK; i++) {
			double v;
			st = eval(x, s->params[i], vb, &v);
			x->vars[frame + (size_t)i] = v;
		}
		if (st == DW_OK)
			st = apply_mods(x, s, 0, q, par, frame, vb, c);
		x->nvars = frame;
		x->depth--;
		return st;
	}
	for (int i = 0; i < s->nparams && st == DW_OK; i++)
		st = eval(x, s->params[i], vb, &par[i]);
	if (st == DW_OK)
		st = apply_mods(x, s, 0, q, par, frame, vb, c);
	return st;
}

/* The register an operand names: global, or a def's qubit[n] argument or
 * local bit register. */
static const dw_qasm_reg *op_reg(const exec *x, const scope *sc, const qx_operand *o,
	int quantum)
{
	if (o->local)
		return quantum ? &sc->def->lq[o->reg] : &sc->def->lbits[o->reg];
	return quantum ? &x->prog->qregs[o->reg] : &x->prog->cregs[o->reg];
}

/* Position within the register of element j of operand o. */
static int op_index(exec *x, const qx_operand *o, const dw_qasm_reg *r, size_t vb,
	long long j, int *out)
{
	long long i = j;
	if (o->kind == QO_ELEM && o->index < 0) {
		i = o->fixed;      /* checked when read */
	} else if (o->kind == QO_ELEM) {
		int st = eval_int(x, o->index, vb, "index", &i);
		if (st)
			return st;
		if (i < 0 || i >= r->size)
			return fail_at(x, o->line, o->col, "expected an index from 0 to %d into "
				"'%s', got %lld", r->size - 1, r->name, i);
	}
	*out = (int)i;
	return DW_OK;
}

/* Qubit of a single-qubit operand (element j of a whole register). */
static int resolve(exec *x, const qx_operand *o, const scope *sc, long long j, int *out)
{
	if (o->kind == QO_ARG) {
		*out = sc->qargs[o->reg];
		return DW_OK;
	}
	const dw_qasm_reg *r = op_reg(x, sc, o, 1);
	int i, st = op_index(x, o, r, sc->vb, j, &i);
	if (st == DW_OK)
		*out = o->local ? sc->qargs[r->offset + i] : r->offset + i;
	return st;
}

/* The stored bit of a bit operand (element j of a whole register). */
static int resolve_bit(exec *x, const qx_operand *o, const scope *sc, long long j,
	unsigned char **out)
{
	const dw_qasm_reg *r = op_reg(x, sc, o, 0);
	int i, st = op_index(x, o, r, sc->vb, j, &i);
	if (st == DW_OK)
		*out = o->local ? &x->lbits[sc->bb + (size_t)(r->offset + i)]
			: &x->st->bits[r->offset + i];
	return st;
}

/* Broadcast length of the operands: 0 when all are single qubits/bits. */
static int broadcast(exec *x, const qx_stmt *s, const scope *sc, int with_bit, int *len)
{
	*len = 0;
	for (int i = 0; i < s->nops; i++) {
		const qx_operand *o = &s->ops[i];
		if (o->kind != QO_REG)
			continue;
		int size = op_reg(x, sc, o, !(with_bit && i == s->nops - 1))->size;
		if (*len && size != *len)
			return fail_at(x, o->line, o->col, "expected registers of equal size in one "
				"statement (%d and %d)", *len, size);
		*len = size;
	}
	return DW_OK;
}

static int exec_gate_stmt(exec *x, const qx_stmt *s, const scope *sc, ctx c)
{
	int q[64];
	if (s->nops > 64)
		return fail_at(x, s->line, s->col, "expected at most 64 qubit operands");
	int len, st = broadcast(x, s, sc, 0, &len);
	for (int j = 0; st == DW_OK && j < (len ? len : 1); j++) {
		for (int i = 0; i < s->nops && st == DW_OK; i++)
			st = resolve(x, &s->ops[i], sc, j, &q[i]);
		if (st == DW_OK)
			st = apply_call(x, s, q, sc->vb, c);
	}
	return st;
}

/* A def call: qubit arguments resolved in the caller (a qubit[n] argument
 * takes a whole register), values evaluated there, then the body in a new
 * variable frame and a new, zeroed bit frame.  Modifiers never reach here
 * (the reader refuses them), so c carries no controls and no inversion. */
static int exec_call(exec *x, const qx_stmt *s, const scope *sc, ctx c)
{
	const qx_gatedef *d = &x->prog->gates[s->user];
	int q[QX_MAX_QUBITS + 1], nq = 0, st = DW_OK;
	for (int i = 0; i < s->nops && st == DW_OK; i++) {
		const qx_operand *o = &s->ops[i];
		int n = o->kind == QO_REG ? op_reg(x, sc, o, 1)->size : 1;
		if (nq + n > d->nqubits)
			return dw_fail(x->err, DW_EINTERNAL, "%s:%ld:%ld: internal: %d qubits passed to "
				"'%s', which takes %d", x->prog->name, s->line, s->col, nq + n, d->name,
				d->nqubits);
		for (int j = 0; j < n && st == DW_OK; j++)
			st = resolve(x, o, sc, j, &q[nq++]);
	}
	if (st == DW_OK && nq != d->nqubits)
		return dw_fail(x->err, DW_EINTERNAL, "%s:%ld:%ld: internal: %d qubits passed to "
			"'%s', which takes %d", x->prog->name, s->line, s->col, nq, d->name, d->nqubits);
	if (st == DW_OK)
		st = distinct(x, s, q, nq, 0, "passed twice to one def call");
	if (st)
		return st;
	if (x->depth >= QX_MAX_NEST)
		return fail_at(x, s->line, s->col, "expected gate and def calls nested at most %d deep",
			QX_MAX_NEST);
	size_t frame;
	if ((st = push_frame(x, d->nslots, &frame)))
		return st;
	for (int i = 0; i < s->nparams && st == DW_OK; i++) {
		double v;
		st = eval(x, s->params[i], sc->vb, &v);
		x->vars[frame + (size_t)i] = v;     /* value arguments hold slots 0.. in order */
	}
	size_t bb = x->nlbits;
	if (st == DW_OK && d->nbits) {
		if (x->nlbits + (size_t)d->nbits > x->caplbits) {
			size_t cap = x->caplbits ? x->caplbits : 64;
			while (cap < x->nlbits + (size_t)d->nbits)
				cap *= 2;
			unsigned char *b = realloc(x->lbits, cap);
			if (!b)
				st = dw_fail(x->err, DW_EINTERNAL, "out of memory running %s", x->prog->name);
			else {
				x->lbits = b;
				x->caplbits = cap;
			}
		}
		if (st == DW_OK) {
			memset(x->lbits + bb, 0, (size_t)d->nbits);
			x->nlbits += (size_t)d->nbits;
		}
	}
	if (st == DW_OK) {
		scope body = {frame, q, d, bb};
		x->depth++;
		st = exec_block(x, &d->body, &body, c);
		x->depth--;
	}
	x->nlbits = bb;
	x->nvars = frame;
	return st;
}

static int exec_for(exec *x, const qx_stmt *s, const scope *sc, ctx c)
{
	long long a, b, step = 1;
	size_t vb = sc->vb;
	int st = eval_int(x, s->start, vb, "loop bound", &a);
	if (st == DW_OK)
		st = eval_int(x, s->stop, vb, "loop bound", &b);
	if (st == DW_OK && s->step >= 0)
		st = eval_int(x, s->step, vb, "loop step", &step);
	if (st)
		return st;
	if (step == 0)
		return fail_at(x, s->line, s->col, "expected a nonzero loop step");
	/* inclusive range: a, a + step, ... up to b */
	long long count = step > 0 ? (a > b ? 0 : (b - a) / step + 1)
		: (a < b ? 0 : (a - b) / -step + 1);
	for (long long i = 0; i < count && st == DW_OK; i++) {
		long long k = c.inv ? count - 1 - i : i;
		x->vars[vb + (size_t)s->slot] = (double)(a + k * step);
		st = exec_block(x, s->body, sc, c);
	}
	return st;
}

static int exec_measure(exec *x, const qx_stmt *s, const scope *sc)
{
	int len, st = broadcast(x, s, sc, s->nops == 2, &len);
	for (int j = 0; st == DW_OK && j < (len ? len : 1); j++) {
		int q;
		unsigned char *bit = NULL;
		st = resolve(x, &s->ops[0], sc, j, &q);
		if (st == DW_OK && s->nops == 2)
			st = resolve_bit(x, &s->ops[1], sc, j, &bit);
		if (st)
			break;
		if (s->kind == QS_RESET) {
			dw_state_reset(x->st, q);
			continue;
		}
		int v = dw_state_measure(x->st, q);
		if (bit)
			*bit = (unsigned char)v;
	}
	return st;
}

static int exec_if(exec *x, const qx_stmt *s, const scope *sc, ctx c)
{
	const qx_operand *o = &s->ops[0];
	const dw_qasm_reg *r = op_reg(x, sc, o, 0);
	long long want;
	int st = eval_int(x, s->cond_value, sc->vb, "value to compare bits with", &want);
	if (st)
		return st;
	unsigned long long have = 0;
	unsigned char *bit;
	if (o->kind == QO_ELEM) {
		if ((st = resolve_bit(x, o, sc, 0, &bit)))
			return st;
		have = *bit;
	} else {
		if (r->size > 62)
			return fail_at(x, o->line, o->col, "expected a bit register of at most 62 bits "
				"to compare with an integer");
		for (int i = 0; i < r->size; i++) {
			if ((st = resolve_bit(x, o, sc, i, &bit)))
				return st;
			have |= (unsigned long long)*bit << i;
		}
	}
	int equal = want >= 0 && have == (unsigned long long)want;
	if (equal != s->cond_not)
		return exec_block(x, s->body, sc, c);
	if (s->orelse)
		return exec_block(x, s->orelse, sc, c);
	return DW_OK;
}

static int exec_stmt(exec *x, const qx_stmt *s, const scope *sc, ctx c)
{
	switch (s->kind) {
	case QS_GATE:
	case QS_GPHASE:
		return exec_gate_stmt(x, s, sc, c);
	case QS_FOR:
		return exec_for(x, s, sc, c);
	case QS_MEASURE:
	case QS_RESET:
		return exec_measure(x, s, sc);
	case QS_IF:
		return exec_if(x, s, sc, c);
	case QS_CALL:
		return exec_call(x, s, sc, c);
	case QS_BITDECL: {
		const dw_qasm_reg *r = &sc->def->lbits[s->slot];
		memset(x->lbits + sc->bb + (size_t)r->offset, 0, (size_t)r->size);
		return DW_OK;
	}
	default:
		return dw_fail(x->err, DW_EINTERNAL, "unknown statement kind %d", s->kind);
	}
}

static int exec_block(exec *x, const qx_block *b, const scope *sc, ctx c)
{
	int st = DW_OK;
	for (size_t i = 0; i < b->n && st == DW_OK; i++)
		st = exec_stmt(x, &b->s[c.inv ? b->n - 1 - i : i], sc, c);
	return st;
}

int dw_sim_exec(const dw_qasm_program *prog, const dw_qasm_params *params,
	dw_state *st, dw_error *err)
{
	if (st->nqubits != prog->nqubits)
		return dw_fail(err, DW_EINTERNAL, "%s: state has %d qubits, program %d", prog->name,
			st->nqubits, prog->nqubits);
	exec x = {prog, st, err, NULL, 0, 0, 0, NULL, 0, 0};
	size_t base;
	int rc = push_frame(&x, prog->nslots, &base);
	/* bind inputs */
	size_t nparams = params ? params->n : 0;
	for (size_t i = 0; rc == DW_OK && i < nparams; i++) {
		size_t k;
		for (k = 0; k < prog->ninputs; k++)
			if (!strcmp(prog->inputs[k].name, params->list[i].name))
				break;
		if (k == prog->ninputs)
			rc = dw_fail(err, DW_EINPUT, "%s: parameter '%s' given, but the program has no "
				"input of that name", prog->name, params->list[i].name);
		else if (!isfinite(params->list[i].value))
			rc = dw_fail(err, DW_EINPUT, "%s: parameter '%s' is not a finite number",
				prog->name, params->list[i].name);
		else
			x.vars[prog->inputs[k].slot] = params->list[i].value;
	}
	for (size_t k = 0; rc == DW_OK && k < prog->ninputs; k++) {
		size_t i;
		for (i = 0; i < nparams; i++)
			if (!strcmp(prog->inputs[k].name, params->list[i].name))
				break;
		if (i == nparams)
			rc = dw_fail(err, DW_EINPUT, "%s: input '%s' has no value (give "
				"--param %s=VALUE)", prog->name, prog->inputs[k].name, prog->inputs[k].name);
	}
	if (rc == DW_OK && st->nbits != prog->nbits) {
		free(st->bits);
		st->bits = calloc((size_t)prog->nbits + 1, 1);
		st->nbits = st->bits ? prog->nbits : 0;
		if (!st->bits)
			rc = dw_fail(err, DW_EINTERNAL, "out of memory running %s", prog->name);
	} else if (rc == DW_OK && st->bits) {
		memset(st->bits, 0, (size_t)st->nbits);
	}
	ctx c = {0, 0, 0};
	scope top = {base, NULL, NULL, 0};
	if (rc == DW_OK)
		rc = exec_block(&x, &prog->main, &top, c);
	free(x.vars);
	free(x.lbits);
	return rc;
}

int dw_sim_run(const dw_qasm_program *prog, const dw_qasm_params *params,
	uint64_t seed, dw_state **out, dw_error *err)
{
	*out = NULL;
	dw_state *st;
	int rc = dw_state_new(prog->nqubits, &st, err);
	if (rc)
		return rc;
	dw_state_seed(st, seed);
	rc = dw_sim_exec(prog, params, st, err);
	if (rc) {
		dw_state_free(st);
		return rc;
	}
	dw_state_compact(st);
	*out = st;
	return DW_OK;
}
