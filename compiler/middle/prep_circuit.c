/* prep_circuit.c - rhs.circuit: the user's OpenQASM 3 state preparation.
 * Takes: a problem whose rhs is `circuit: FILE`.  Gives: the definition
 * U_b on the sys qubits (stage state_prep); the reflection uses its
 * inverse (dw_inverse), like every other state preparation.
 *
 * The runtime reader (qasm.h) parses the file.  Its statements (the
 * runtime's internal form, runtime/qasm_prog.h) are translated gate by
 * gate into the IR, at any size: standard gates, gate definitions (inlined
 * with their parameters), `for` loops, and the modifiers inv, pow(k) with
 * an integer k, ctrl and negctrl where the controlled gate is a standard
 * one (cx, ccx, cy, cz, ch, cp, crx, cry, crz, cswap; ctrl @ gphase is a
 * phase on the control).  U, u2, u3 and sx are taken up to their global
 * phase, which a state preparation may ignore (U_b is only needed up to a
 * global phase), and gphase without controls is dropped for the same
 * reason.  A circuit outside that subset (cu, a controlled U, a control
 * count no standard gate has) is loaded instead through its state vector
 * (run by the runtime simulator, loaded by uniformly controlled rotations)
 * when the register has at most PREP_MAX_QUBITS qubits, and refused with
 * the reason beyond.  The file must declare exactly the problem's system
 * qubits (the grid's, before a dilation), no classical bits (a
 * measurement would make b random) and no inputs. */
#include <complex.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "../../runtime/qasm_prog.h"
#include "dwell/prep_circuit.h"
#include "dwell/program.h"
#include "dwell/qasm.h"
#include "dwell/sim.h"

#define PREP_MAX_QUBITS 20

typedef struct tx {
	const dw_qasm_program *prog;
	dw_builder *b;
	dw_error *e;
	double *vars;
	size_t nvars, cap;
	int depth;
} tx;

typedef struct ctl {
	uint32_t q[64];
	bool neg[64];
	int n;
	bool inv;
} ctl;

static int tfail(tx *x, long line, long col, const char *fmt, ...)
	__attribute__((format(printf, 4, 5)));

static int tfail(tx *x, long line, long col, const char *fmt, ...)
{
	char what[600];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(what, sizeof what, fmt, ap);
	va_end(ap);
	return dw_fail(x->e, DW_EINPUT, "%s:%ld:%ld: %s", x->prog->name, line, col, what);
}

static int push_frame(tx *x, int n, size_t *base)
{
	*base = x->nvars;
	if (n <= 0)
		return DW_OK;
	if (x->nvars + (size_t)n > x->cap) {
		size_t cap = x->cap ? x->cap : 64;
		while (cap < x->nvars + (size_t)n)
			cap *= 2;
		double *v = realloc(x->vars, cap * sizeof *v);
		if (!v)
			return dw_fail(x->e, DW_EINTERNAL, "out of memory (rhs.circuit)");
		x->vars = v;
		x->cap = cap;
	}
	memset(x->vars + x->nvars, 0, (size_t)n * sizeof *x->vars);
	x->nvars += (size_t)n;
	return DW_OK;
}

static int eval_int(tx *x, int ex, size_t vb, long long *out)
{
	double v;
	if (qx_eval(x->prog, ex, x->vars + vb, &v, x->e))
		return x->e->status;
	const qx_expr *n = &x->prog->ex[ex];
	if (v != floor(v) || fabs(v) > 9007199254740992.0)
		return tfail(x, n->line, n->col, "expected an integer, got %.17g", v);
	*out = (long long)v;
	return DW_OK;
}

/* One primitive gate with angles, inverted when c->inv. */
static void prim(tx *x, const ctl *c, dw_gate g, const uint32_t *q, double ang)
{
	if (c->inv) {
		g = dw_gates[g].inverse;
		ang = -ang;
	}
	dw_expr a = dw_const(ang);
	dw_gate_op(x->b, g, q, dw_gates[g].nangles ? &a : NULL);
}

typedef struct step { dw_gate g; uint32_t q[3]; double ang; } step;

/* Emit steps in order, or reversed and inverted under inv. */
static void steps(tx *x, const ctl *c, const step *s, int n)
{
	for (int i = 0; i < n; i++) {
		const step *t = &s[c->inv ? n - 1 - i : i];
		prim(x, c, t->g, t->q, t->ang);
	}
}

/* The standard gate `id` with parameters par on qubits q (its own
 * controls first), under the extra controls of c. */
static int builtin(tx *x, const qx_stmt *s, int id, const double *par, const uint32_t *q,
	const ctl *c)
{
	/* base gate, its own control count */
	dw_gate g = DW_G_COUNT;
	int own = 0;
	bool phase_free = false;      /* defined only up to a global phase */
	step seq[3];
	int nseq = 0;
	switch (id) {
	case QB_X: g = DW_G_X; break;
	case QB_Y: g = DW_G_Y; break;
	case QB_Z: g = DW_G_Z; break;
	case QB_H: g = DW_G_H; break;
	case QB_S: g = DW_G_S; break;
	case QB_SDG: g = DW_G_SDG; break;
	case QB_T: g = DW_G_T; break;
	case QB_TDG: g = DW_G_TDG; break;
	case QB_RX: g = DW_G_RX; break;
	case QB_RY: g = DW_G_RY; break;
	case QB_RZ: g = DW_G_RZ; break;
	case QB_P: case QB_PHASE: case QB_U1: g = DW_G_P; break;
	case QB_SWAP: g = DW_G_SWAP; break;
	case QB_CX: g = DW_G_X; own = 1; break;
	case QB_CCX: g = DW_G_X; own = 2; break;
	case QB_CY: g = DW_G_Y; own = 1; break;
	case QB_CZ: g = DW_G_Z; own = 1; break;
	case QB_CH: g = DW_G_H; own = 1; break;
	case QB_CP: case QB_CPHASE: g = DW_G_P; own = 1; break;
	case QB_CRX: g = DW_G_RX; own = 1; break;
	case QB_CRY: g = DW_G_RY; own = 1; break;
	case QB_CRZ: g = DW_G_RZ; own = 1; break;
	case QB_CSWAP: g = DW_G_SWAP; own = 1; break;
	case QB_ID: return DW_OK;
	case QB_GPHASE:
		if (c->n == 0)
			return DW_OK;             /* a global phase */
		if (c->n == 1) {              /* ctrl @ gphase(a) = p(a) on the control */
			uint32_t cq = c->q[0];
			if (c->neg[0])
				prim(x, c, DW_G_X, &cq, 0);
			prim(x, c, DW_G_P, &cq, par[0]);
			if (c->neg[0])
				prim(x, c, DW_G_X, &cq, 0);
			return DW_OK;
		}
		return tfail(x, s->line, s->col, "a state preparation may control gphase by one "
			"qubit only");
	/* up to a global phase: U(th, ph, la) ~ rz(ph) ry(th) rz(la) */
	case QB_U: case QB_U3:
		seq[0] = (step){DW_G_RZ, {q[0]}, par[2]};
		seq[1] = (step){DW_G_RY, {q[0]}, par[0]};
		seq[2] = (step){DW_G_RZ, {q[0]}, par[1]};
		nseq = 3;
		phase_free = true;
		break;
	case QB_U2:
		seq[0] = (step){DW_G_RZ, {q[0]}, par[1]};
		seq[1] = (step){DW_G_RY, {q[0]}, M_PI / 2};
		seq[2] = (step){DW_G_RZ, {q[0]}, par[0]};
		nseq = 3;
		phase_free = true;
		break;
	case QB_SX:
		seq[0] = (step){DW_G_RX, {q[0]}, M_PI / 2};
		nseq = 1;
		phase_free = true;
		break;
	case QB_CX_OLD:               /* ctrl @ U(pi, 0, pi) = cx then s on the control */
		if (c->n == 0) {
			seq[0] = (step){DW_G_CX, {q[0], q[1]}, 0};
			seq[1] = (step){DW_G_S, {q[0]}, 0};
			steps(x, c, seq, 2);
			return DW_OK;
		}
		break;
	default:
		break;
	}
	if (nseq) {
		if (c->n)
			return tfail(x, s->line, s->col, "'%s' under ctrl is defined with its global "
				"phase, which this translation drops; write it with standard gates",
				qx_builtins[id].name);
		(void)phase_free;
		steps(x, c, seq, nseq);
		return DW_OK;
	}
	if (g == DW_G_COUNT)
		return tfail(x, s->line, s->col, "'%s' is not translated for a state preparation "
			"(cu and the old CX need their phases)", qx_builtins[id].name);
	int k = own + c->n;
	dw_gate cg = DW_G_COUNT;
	if (k == 0)
		cg = g;
	else if (k == 1) {
		switch (g) {
		case DW_G_X: cg = DW_G_CX; break;
		case DW_G_Y: cg = DW_G_CY; break;
		case DW_G_Z: cg = DW_G_CZ; break;
		case DW_G_H: cg = DW_G_CH; break;
		case DW_G_P: cg = DW_G_CP; break;
		case DW_G_RX: cg = DW_G_CRX; break;
		case DW_G_RY: cg = DW_G_CRY; break;
		case DW_G_RZ: cg = DW_G_CRZ; break;
		case DW_G_SWAP: cg = DW_G_CSWAP; break;
		default: break;
		}
	} else if (k == 2 && g == DW_G_X) {
		cg = DW_G_CCX;
	}
	if (cg == DW_G_COUNT)
		return tfail(x, s->line, s->col, "'%s' with %d control%s has no standard gate",
			qx_builtins[id].name, k, k == 1 ? "" : "s");
	/* operands: the modifier controls, then the gate's own qubits */
	uint32_t ops[4];
	int no = 0;
	for (int i = 0; i < c->n; i++)
		ops[no++] = c->q[i];
	int tq = dw_gates[cg].nqubits - c->n;
	for (int i = 0; i < tq; i++)
		ops[no++] = q[i];
	for (int i = 0; i < c->n; i++)
		if (c->neg[i])
			dw_g1(x->b, DW_G_X, c->q[i]);
	prim(x, c, cg, ops, dw_gates[cg].nangles ? par[0] : 0);
	for (int i = 0; i < c->n; i++)
		if (c->neg[i])
			dw_g1(x->b, DW_G_X, c->q[i]);
	return DW_OK;
}

static int block(tx *x, const qx_block *bl, size_t vb, const uint32_t *qargs, ctl c);

/* A call after its modifiers mi..; q holds the operands left. */
static int call(tx *x, const qx_stmt *s, int mi, const uint32_t *q, const double *par,
	size_t frame, size_t vb, ctl c)
{
	if (mi == s->nmods) {
		if (s->user >= 0)
			return block(x, &x->prog->gates[s->user].body, frame, q, c);
		return builtin(x, s, s->builtin, par, q, &c);
	}
	const qx_mod *m = &s->mods[mi];
	switch (m->kind) {
	case QM_CTRL:
	case QM_NEGCTRL:
		if (c.n + m->count > 64)
			return tfail(x, s->line, s->col, "too many controls");
		for (int j = 0; j < m->count; j++) {
			c.q[c.n] = q[j];
			c.neg[c.n++] = m->kind == QM_NEGCTRL;
		}
		return call(x, s, mi + 1, q + m->count, par, frame, vb, c);
	case QM_INV:
		c.inv = !c.inv;
		return call(x, s, mi + 1, q, par, frame, vb, c);
	default: {
		long long k;
		if (eval_int(x, m->expr, vb, &k))
			return x->e->status;
		if (k < 0) {
			c.inv = !c.inv;
			k = -k;
		}
		if (k > 1000000)
			return tfail(x, s->line, s->col, "pow(%lld) is too large to translate", k);
		for (long long i = 0; i < k; i++)
			if (call(x, s, mi + 1, q, par, frame, vb, c))
				return x->e->status;
		return DW_OK;
	}
	}
}

static int resolve(tx *x, const qx_operand *o, size_t vb, const uint32_t *qargs,
	long long j, uint32_t *out)
{
	if (o->kind == QO_ARG) {
		*out = qargs[o->reg];
		return DW_OK;
	}
	const dw_qasm_reg *r = &x->prog->qregs[o->reg];
	long long i = j;
	if (o->kind == QO_ELEM && o->index < 0) {
		i = o->fixed;
	} else if (o->kind == QO_ELEM) {
		if (eval_int(x, o->index, vb, &i))
			return x->e->status;
		if (i < 0 || i >= r->size)
			return tfail(x, o->line, o->col, "index %lld out of range for '%s'", i, r->name);
	}
	*out = (uint32_t)(r->offset + (int)i);
	return DW_OK;
}

static int gate_stmt(tx *x, const qx_stmt *s, size_t vb, const uint32_t *qargs, ctl c)
{
	if (s->nops > 64)
		return tfail(x, s->line, s->col, "at most 64 operands");
	int len = 0;
	for (int i = 0; i < s->nops; i++)
		if (s->ops[i].kind == QO_REG) {
			int size = x->prog->qregs[s->ops[i].reg].size;
			if (len && size != len)
				return tfail(x, s->ops[i].line, s->ops[i].col, "registers of unequal size");
			len = size;
		}
	for (int j = 0; j < (len ? len : 1); j++) {
		uint32_t q[64];
		for (int i = 0; i < s->nops; i++)
			if (resolve(x, &s->ops[i], vb, qargs, j, &q[i]))
				return x->e->status;
		double par[4] = {0};
		size_t frame = 0;
		if (s->user >= 0) {
			const qx_gatedef *d = &x->prog->gates[s->user];
			if (x->depth >= QX_MAX_NEST)
				return tfail(x, s->line, s->col, "gate calls nested too deep");
			size_t saved = x->nvars;
			if (push_frame(x, d->nslots, &frame))
				return x->e->status;
			for (int i = 0; i < s->nparams; i++) {
				double v;
				if (qx_eval(x->prog, s->params[i], x->vars + vb, &v, x->e))
					return x->e->status;
				x->vars[frame + (size_t)i] = v;
			}
			x->depth++;
			int rc = call(x, s, 0, q, par, frame, vb, c);
			x->depth--;
			x->nvars = saved;
			if (rc)
				return rc;
			continue;
		}
		for (int i = 0; i < s->nparams && i < 4; i++)
			if (qx_eval(x->prog, s->params[i], x->vars + vb, &par[i], x->e))
				return x->e->status;
		if (call(x, s, 0, q, par, frame, vb, c))
			return x->e->status;
	}
	return DW_OK;
}

static int stmt(tx *x, const qx_stmt *s, size_t vb, const uint32_t *qargs, ctl c)
{
	switch (s->kind) {
	case QS_GATE:
	case QS_GPHASE:
		return gate_stmt(x, s, vb, qargs, c);
	case QS_FOR: {
		long long a, b, st = 1;
		if (eval_int(x, s->start, vb, &a) || eval_int(x, s->stop, vb, &b)
				|| (s->step >= 0 && eval_int(x, s->step, vb, &st)))
			return x->e->status;
		if (st == 0)
			return tfail(x, s->line, s->col, "a loop step of zero");
		long long count = st > 0 ? (a > b ? 0 : (b - a) / st + 1)
			: (a < b ? 0 : (a - b) / -st + 1);
		for (long long i = 0; i < count; i++) {
			long long k = c.inv ? count - 1 - i : i;
			x->vars[vb + (size_t)s->slot] = (double)(a + k * st);
			if (block(x, s->body, vb, qargs, c))
				return x->e->status;
		}
		return DW_OK;
	}
	default:
		return tfail(x, s->line, s->col, "measurement, reset and if have no place in a "
			"state preparation");
	}
}

static int block(tx *x, const qx_block *bl, size_t vb, const uint32_t *qargs, ctl c)
{
	for (size_t i = 0; i < bl->n; i++)
		if (stmt(x, &bl->s[c.inv ? bl->n - 1 - i : i], vb, qargs, c))
			return x->e->status;
	return DW_OK;
}

/* The state-vector route for circuits outside the translated subset. */
static uint32_t by_state(dw_circuit *c, const dw_problem *p, const dw_qasm_program *prog,
	int want, dw_error *e)
{
	dw_state *st = NULL;
	uint32_t id = DW_NO_DEF;
	if (dw_sim_run(prog, NULL, 1, &st, e) == DW_OK) {
		size_t dim = (size_t)1 << p->n;
		double complex *amps = calloc(dim, sizeof *amps);
		if (!amps) {
			dw_fail(e, DW_EINTERNAL, "out of memory (rhs.circuit)");
		} else {
			memcpy(amps, st->amp, ((size_t)1 << want) * sizeof *amps);
			id = dw_stateprep_amplitudes(c, p->n, amps, e);
		}
		free(amps);
	}
	dw_state_free(st);
	return id;
}

uint32_t dw_stateprep_circuit(dw_circuit *c, const dw_problem *p, dw_error *e)
{
	int want = p->dilated ? p->n - 1 : p->n;
	if (!p->rhs_file) {
		dw_fail(e, DW_EINTERNAL, "internal: rhs.circuit without a file");
		return DW_NO_DEF;
	}
	dw_qasm_program *prog = NULL;
	if (dw_qasm_parse_file(p->rhs_file, &prog, e))
		return DW_NO_DEF;
	int nq = dw_qasm_num_qubits(prog);
	uint32_t id = DW_NO_DEF;
	if (nq != want) {
		dw_fail(e, DW_EINPUT, "%s: rhs.circuit: %s declares %d qubit%s; the system "
			"register has %d", p->path, p->rhs_file, nq, nq == 1 ? "" : "s", want);
	} else if (dw_qasm_num_bits(prog) != 0) {
		dw_fail(e, DW_EINPUT, "%s: rhs.circuit: %s declares classical bits; a state "
			"preparation must be unitary (no measurement)", p->path, p->rhs_file);
	} else if (dw_qasm_num_inputs(prog) != 0) {
		dw_fail(e, DW_EINPUT, "%s: rhs.circuit: %s has `input` parameters; give "
			"their values in the file", p->path, p->rhs_file);
	} else {
		tx x = {prog, NULL, NULL, NULL, 0, 0, 0};
		dw_error te = {0};
		x.e = &te;
		x.b = dw_begin(c, "prep_circuit", (uint32_t)p->n, 0, DW_STAGE_STATE_PREP);
		size_t base;
		ctl none;
		memset(&none, 0, sizeof none);
		int rc = push_frame(&x, prog->nslots, &base);
		if (!rc)
			rc = block(&x, &prog->main, base, NULL, none);
		free(x.vars);
		if (!rc) {
			id = dw_end(x.b, e);
		} else {
			dw_end(x.b, NULL);
			if (te.status == DW_EINPUT && want <= PREP_MAX_QUBITS)
				id = by_state(c, p, prog, want, e);
			else
				dw_fail(e, te.status, "%s: rhs.circuit: %s", p->path, te.msg);
		}
	}
	dw_qasm_free(prog);
	return id;
}
