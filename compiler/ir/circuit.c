/* circuit.c - definitions, hash-consing, inverses and walking of the IR.
 * Takes: builder calls from the middle end.  Gives: immutable, shared
 * definitions (include/dwell/circuit.h) and an in-order walk of the
 * expanded program. */
#include "dwell/circuit.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define C_ (DW_GF_CLIFFORD)
#define R_ (DW_GF_ROTATION)
#define T2 (DW_GF_TWO_QUBIT)

const dw_gate_info dw_gates[DW_G_COUNT] = {
	[DW_G_X] = {"x", 1, 0, C_, DW_G_X, 0, 0},
	[DW_G_Y] = {"y", 1, 0, C_, DW_G_Y, 0, 0},
	[DW_G_Z] = {"z", 1, 0, C_, DW_G_Z, 0, 0},
	[DW_G_H] = {"h", 1, 0, C_, DW_G_H, 0, 0},
	[DW_G_S] = {"s", 1, 0, C_, DW_G_SDG, 0, 0},
	[DW_G_SDG] = {"sdg", 1, 0, C_, DW_G_S, 0, 0},
	[DW_G_T] = {"t", 1, 0, DW_GF_T, DW_G_TDG, 1, 1},
	[DW_G_TDG] = {"tdg", 1, 0, DW_GF_T, DW_G_T, 1, 1},
	[DW_G_RX] = {"rx", 1, 1, R_, DW_G_RX, 0, 0},
	[DW_G_RY] = {"ry", 1, 1, R_, DW_G_RY, 0, 0},
	[DW_G_RZ] = {"rz", 1, 1, R_, DW_G_RZ, 0, 0},
	[DW_G_P] = {"p", 1, 1, R_, DW_G_P, 0, 0},
	[DW_G_CX] = {"cx", 2, 0, C_ | T2, DW_G_CX, 0, 0},
	[DW_G_CY] = {"cy", 2, 0, C_ | T2, DW_G_CY, 0, 0},
	[DW_G_CZ] = {"cz", 2, 0, C_ | T2, DW_G_CZ, 0, 0},
	[DW_G_CH] = {"ch", 2, 0, T2, DW_G_CH, 2, 2},
	[DW_G_SWAP] = {"swap", 2, 0, C_ | T2, DW_G_SWAP, 0, 0},
	[DW_G_CP] = {"cp", 2, 1, R_ | T2, DW_G_CP, 0, 0},
	[DW_G_CRX] = {"crx", 2, 1, R_ | T2, DW_G_CRX, 0, 0},
	[DW_G_CRY] = {"cry", 2, 1, R_ | T2, DW_G_CRY, 0, 0},
	[DW_G_CRZ] = {"crz", 2, 1, R_ | T2, DW_G_CRZ, 0, 0},
	[DW_G_CCX] = {"ccx", 3, 0, 0, DW_G_CCX, 7, 3},
	[DW_G_CSWAP] = {"cswap", 3, 0, 0, DW_G_CSWAP, 7, 3},
	[DW_G_MEASURE] = {"measure", 1, 0, DW_GF_NONUNITARY, DW_G_MEASURE, 0, 0},
	[DW_G_RESET] = {"reset", 1, 0, DW_GF_NONUNITARY, DW_G_RESET, 0, 0},
};

const char *const dw_stage_names[DW_STAGE_COUNT] = {
	[DW_STAGE_NONE] = "other",
	[DW_STAGE_STATE_PREP] = "state_prep",
	[DW_STAGE_REFLECTION] = "reflection",
	[DW_STAGE_TERM] = "term_rotation",
	[DW_STAGE_ORACLE] = "oracle",
	[DW_STAGE_ARITH] = "arithmetic",
	[DW_STAGE_SYNTH] = "synthesis",
};

/* ---- expressions ---- */

dw_expr dw_const(double v)
{
	dw_expr e;
	memset(&e, 0, sizeof e);
	e.c0 = v;
	return e;
}

dw_expr dw_par(int param, double coeff)
{
	dw_expr e = dw_const(0.0);
	e.n = 1;
	e.p[0] = (uint8_t)param;
	e.c[0] = coeff;
	return e;
}

dw_expr dw_expr_scale(dw_expr e, double f)
{
	e.c0 *= f;
	for (int i = 0; i < e.n; i++)
		e.c[i] *= f;
	return e;
}

double dw_expr_eval(const dw_expr *e, const double *params)
{
	double v = e->c0;
	for (int i = 0; i < e->n; i++)
		v += e->c[i] * params[e->p[i]];
	return v;
}

/* Canonical form: +0.0 for zeros so that hashing by bytes is stable. */
static dw_expr expr_canon(dw_expr e)
{
	dw_expr r;
	memset(&r, 0, sizeof r);
	r.c0 = e.c0 == 0.0 ? 0.0 : e.c0;
	for (int i = 0; i < e.n; i++) {
		if (e.c[i] == 0.0)
			continue;
		r.p[r.n] = e.p[i];
		r.c[r.n] = e.c[i];
		r.n++;
	}
	return r;
}

/* ---- circuit ---- */

dw_circuit *dw_circuit_new(void)
{
	dw_circuit *c = calloc(1, sizeof *c);
	if (!c)
		return NULL;
	c->t_weight_rotation = 0.0;
	return c;
}

void dw_cost_free(dw_cost *k);   /* cost.c */

void dw_circuit_free(dw_circuit *c)
{
	if (!c)
		return;
	for (size_t i = 0; i < c->ndefs; i++) {
		dw_def *d = &c->defs[i];
		free(d->ops);
		free(d->qs);
		free(d->ex);
		dw_cost_free(d->cost);
	}
	free(c->defs);
	free(c->table);
	free(c);
}

#define DW_MAX_BITS 64

struct dw_builder {
	dw_circuit *c;
	dw_def d;
	uint32_t bit_source[DW_MAX_BITS]; /* last qubit measured into each bit */
	size_t capo, capq, cape;
	int failed;       /* 0, or a DW_E* status */
	char why[160];
};

dw_builder *dw_begin(dw_circuit *c, const char *name, uint32_t nargs,
	uint32_t nparams, dw_stage stage)
{
	dw_builder *b = calloc(1, sizeof *b);
	if (!b)
		return NULL;
	b->c = c;
	snprintf(b->d.name, sizeof b->d.name, "%s", name);
	b->d.nargs = nargs;
	b->d.nparams = nparams;
	b->d.stage = stage;
	b->d.inverse = DW_NO_DEF;
	b->d.unitary = true;
	for (int i = 0; i < DW_MAX_BITS; i++)
		b->bit_source[i] = UINT32_MAX;
	if (nparams > 255) {
		b->failed = DW_EINTERNAL;
		snprintf(b->why, sizeof b->why, "too many parameters (%u)", nparams);
	}
	return b;
}

uint32_t dw_add_ancillas(dw_builder *b, uint32_t k)
{
	uint32_t first = b->d.nargs + b->d.nanc;
	b->d.nanc += k;
	return first;
}

static void bfail(dw_builder *b, int status, const char *why)
{
	if (!b->failed) {
		b->failed = status;
		snprintf(b->why, sizeof b->why, "%s", why);
	}
}

static int grow(void **p, size_t *cap, size_t need, size_t elt)
{
	if (need <= *cap)
		return 0;
	size_t n = *cap ? *cap : 8;
	while (n < need) {
		if (n > SIZE_MAX / 2 / elt)
			return -1;
		n *= 2;
	}
	void *q = realloc(*p, n * elt);
	if (!q)
		return -1;
	*p = q;
	*cap = n;
	return 0;
}

static void push_op(dw_builder *b, dw_op op, const uint32_t *qs, const dw_expr *ex)
{
	if (b->failed)
		return;
	dw_def *d = &b->d;
	if (grow((void **)&d->ops, &b->capo, d->nops + 1, sizeof *d->ops) ||
	    grow((void **)&d->qs, &b->capq, d->nqs + op.nq, sizeof *d->qs) ||
	    grow((void **)&d->ex, &b->cape, d->nex + op.na, sizeof *d->ex)) {
		bfail(b, DW_EINTERNAL, "out of memory");
		return;
	}
	uint32_t limit = d->nargs + d->nanc;
	for (uint32_t i = 0; i < op.nq; i++) {
		if (qs[i] >= limit) {
			bfail(b, DW_EINTERNAL, "qubit operand out of range");
			return;
		}
		for (uint32_t j = 0; j < i; j++)
			if (qs[j] == qs[i]) {
				bfail(b, DW_EINTERNAL, "the same qubit passed twice");
				return;
			}
	}
	for (uint32_t i = 0; i < op.na; i++)
		for (int t = 0; t < ex[i].n; t++)
			if (ex[i].p[t] >= d->nparams) {
				bfail(b, DW_EINTERNAL, "expression uses an unknown parameter");
				return;
			}
	op.q = (uint32_t)d->nqs;
	op.a = (uint32_t)d->nex;
	if (op.nq)
		memcpy(d->qs + d->nqs, qs, op.nq * sizeof *qs);
	for (uint32_t i = 0; i < op.na; i++)
		d->ex[d->nex + i] = expr_canon(ex[i]);
	d->nqs += op.nq;
	d->nex += op.na;
	d->ops[d->nops++] = op;
}

void dw_gate_op(dw_builder *b, dw_gate g, const uint32_t *qubits, const dw_expr *angles)
{
	dw_op op = {0};
	op.kind = DW_OP_GATE;
	op.gate = (uint8_t)g;
	op.reps = 1;
	op.nq = (uint32_t)dw_gates[g].nqubits;
	op.na = (uint32_t)dw_gates[g].nangles;
	if (dw_gates[g].flags & DW_GF_NONUNITARY)
		b->d.unitary = false;
	push_op(b, op, qubits, angles);
}

uint32_t dw_add_bits(dw_builder *b, uint32_t k)
{
	uint32_t first = b->d.nbits;
	if (b->d.nbits + k > 65535 || b->d.nbits + k > DW_MAX_BITS)
		bfail(b, DW_EINTERNAL, "too many classical bits in one definition");
	else
		b->d.nbits += k;
	return first;
}

void dw_measure(dw_builder *b, uint32_t q, uint32_t bit)
{
	if (bit >= b->d.nbits) {
		bfail(b, DW_EINTERNAL, "measurement into an undeclared bit");
		return;
	}
	dw_op op = {0};
	op.kind = DW_OP_GATE;
	op.gate = DW_G_MEASURE;
	op.reps = 1;
	op.nq = 1;
	op.bit = (uint16_t)bit;
	b->d.unitary = false;
	b->bit_source[bit] = q;
	push_op(b, op, &q, NULL);
}

void dw_cond_gate(dw_builder *b, uint32_t bit, dw_gate g, const uint32_t *qubits)
{
	if (bit >= b->d.nbits || b->bit_source[bit] == UINT32_MAX ||
	    dw_gates[g].nangles || (dw_gates[g].flags & DW_GF_NONUNITARY)) {
		bfail(b, DW_EINTERNAL, "bad classically controlled gate");
		return;
	}
	dw_op op = {0};
	op.kind = DW_OP_GATE;
	op.gate = (uint8_t)g;
	op.reps = 1;
	op.nq = (uint32_t)dw_gates[g].nqubits;
	op.cond = 1;
	op.bit = (uint16_t)bit;
	op.condq = b->bit_source[bit];
	b->d.unitary = false;
	push_op(b, op, qubits, NULL);
}

void dw_g1(dw_builder *b, dw_gate g, uint32_t q)
{
	dw_gate_op(b, g, &q, NULL);
}

void dw_g2(dw_builder *b, dw_gate g, uint32_t q0, uint32_t q1)
{
	uint32_t q[2] = {q0, q1};
	dw_gate_op(b, g, q, NULL);
}

void dw_g3(dw_builder *b, dw_gate g, uint32_t q0, uint32_t q1, uint32_t q2)
{
	uint32_t q[3] = {q0, q1, q2};
	dw_gate_op(b, g, q, NULL);
}

void dw_r1(dw_builder *b, dw_gate g, uint32_t q, dw_expr angle)
{
	dw_gate_op(b, g, &q, &angle);
}

void dw_call(dw_builder *b, uint32_t callee, const uint32_t *qubits,
	const dw_expr *params, uint64_t reps)
{
	if (b->failed)
		return;
	if (callee >= b->c->ndefs) {
		bfail(b, DW_EINTERNAL, "call of an unknown definition");
		return;
	}
	if (reps == 0)
		return;
	const dw_def *cd = &b->c->defs[callee];
	dw_op op = {0};
	op.kind = DW_OP_CALL;
	op.callee = callee;
	op.reps = reps;
	op.nq = cd->nargs;
	op.na = cd->nparams;
	if (!cd->unitary)
		b->d.unitary = false;
	push_op(b, op, qubits, params);
	if (!b->failed && cd->pool + b->d.nanc > b->d.pool)
		b->d.pool = cd->pool + b->d.nanc;
}

/* FNV-1a over the bytes that define a definition (not its name). */
static uint64_t fnv(uint64_t h, const void *p, size_t n)
{
	const unsigned char *s = p;
	for (size_t i = 0; i < n; i++) {
		h ^= s[i];
		h *= 1099511628211ULL;
	}
	return h;
}

static uint64_t def_hash(const dw_def *d)
{
	uint64_t h = 1469598103934665603ULL;
	uint32_t hdr[5] = {d->nargs, d->nanc, d->nparams, (uint32_t)d->stage, d->nbits};
	h = fnv(h, hdr, sizeof hdr);
	for (size_t i = 0; i < d->nops; i++) {
		const dw_op *o = &d->ops[i];
		uint64_t w[7] = {o->kind, o->gate, o->callee, o->reps, o->cond, o->bit, o->condq};
		h = fnv(h, w, sizeof w);
		if (o->nq)
			h = fnv(h, d->qs + o->q, o->nq * sizeof *d->qs);
		if (o->na)
			h = fnv(h, d->ex + o->a, o->na * sizeof *d->ex);
	}
	return h;
}

static bool def_equal(const dw_def *a, const dw_def *b)
{
	if (a->nargs != b->nargs || a->nanc != b->nanc || a->nparams != b->nparams ||
	    a->nbits != b->nbits ||
	    a->stage != b->stage || a->nops != b->nops || a->nqs != b->nqs ||
	    a->nex != b->nex)
		return false;
	for (size_t i = 0; i < a->nops; i++) {
		const dw_op *x = &a->ops[i], *y = &b->ops[i];
		if (x->kind != y->kind || x->gate != y->gate || x->callee != y->callee ||
		    x->reps != y->reps || x->nq != y->nq || x->na != y->na ||
		    x->cond != y->cond || x->bit != y->bit || x->condq != y->condq)
			return false;
	}
	return (a->nqs == 0 || !memcmp(a->qs, b->qs, a->nqs * sizeof *a->qs)) &&
	       (a->nex == 0 || !memcmp(a->ex, b->ex, a->nex * sizeof *a->ex));
}

static int table_insert(dw_circuit *c, uint32_t id)
{
	if ((c->ndefs + 1) * 2 > c->tcap) {
		size_t ncap = c->tcap ? c->tcap * 2 : 64;
		uint32_t *t = malloc(ncap * sizeof *t);
		if (!t)
			return -1;
		for (size_t i = 0; i < ncap; i++)
			t[i] = DW_NO_DEF;
		for (size_t i = 0; i < c->tcap; i++) {
			uint32_t v = c->table[i];
			if (v == DW_NO_DEF)
				continue;
			size_t h = c->defs[v].hash & (ncap - 1);
			while (t[h] != DW_NO_DEF)
				h = (h + 1) & (ncap - 1);
			t[h] = v;
		}
		free(c->table);
		c->table = t;
		c->tcap = ncap;
	}
	size_t h = c->defs[id].hash & (c->tcap - 1);
	while (c->table[h] != DW_NO_DEF)
		h = (h + 1) & (c->tcap - 1);
	c->table[h] = id;
	return 0;
}

static uint32_t table_find(const dw_circuit *c, const dw_def *d)
{
	if (!c->tcap)
		return DW_NO_DEF;
	size_t h = d->hash & (c->tcap - 1);
	while (c->table[h] != DW_NO_DEF) {
		const dw_def *e = &c->defs[c->table[h]];
		if (e->hash == d->hash && def_equal(e, d))
			return c->table[h];
		h = (h + 1) & (c->tcap - 1);
	}
	return DW_NO_DEF;
}

/* Make the name a unique identifier: [a-z0-9_], then a numeric suffix. */
static void unique_name(const dw_circuit *c, dw_def *d)
{
	char base[48];
	size_t j = 0;
	for (const char *s = d->name; *s && j < sizeof base - 1; s++) {
		char ch = *s;
		if ((ch >= 'a' && ch <= 'z') || (ch >= '0' && ch <= '9') || ch == '_')
			base[j++] = ch;
		else if (ch >= 'A' && ch <= 'Z')
			base[j++] = (char)(ch - 'A' + 'a');
		else
			base[j++] = '_';
	}
	base[j] = 0;
	if (j == 0 || (base[0] >= '0' && base[0] <= '9'))
		snprintf(base, sizeof base, "g_%.40s", d->name);
	/* Definitions are numbered by id, which is unique and deterministic. */
	snprintf(d->name, sizeof d->name, "%s_%zu", base, c->ndefs);
}

uint32_t dw_end(dw_builder *b, dw_error *e)
{
	if (!b) {
		dw_fail(e, DW_EINTERNAL, "out of memory");
		return DW_NO_DEF;
	}
	dw_circuit *c = b->c;
	if (b->failed) {
		dw_fail(e, b->failed, "internal: building %s: %s", b->d.name, b->why);
		free(b->d.ops);
		free(b->d.qs);
		free(b->d.ex);
		free(b);
		return DW_NO_DEF;
	}
	dw_def d = b->d;
	if (d.pool < d.nanc)
		d.pool = d.nanc;
	free(b);
	d.hash = def_hash(&d);
	uint32_t found = table_find(c, &d);
	if (found != DW_NO_DEF) {
		free(d.ops);
		free(d.qs);
		free(d.ex);
		return found;
	}
	if (c->ndefs >= UINT32_MAX - 1 ||
	    grow((void **)&c->defs, &c->cap, c->ndefs + 1, sizeof *c->defs)) {
		free(d.ops);
		free(d.qs);
		free(d.ex);
		dw_fail(e, DW_EINTERNAL, "out of memory (definitions)");
		return DW_NO_DEF;
	}
	unique_name(c, &d);
	uint32_t id = (uint32_t)c->ndefs;
	c->defs[c->ndefs++] = d;
	if (table_insert(c, id)) {
		dw_fail(e, DW_EINTERNAL, "out of memory (definition table)");
		return DW_NO_DEF;
	}
	return id;
}

uint32_t dw_inverse(dw_circuit *c, uint32_t id, dw_error *e)
{
	if (c->defs[id].inverse != DW_NO_DEF)
		return c->defs[id].inverse;
	if (!c->defs[id].unitary) {
		dw_fail(e, DW_EINTERNAL, "internal: inverse of non-unitary %s", c->defs[id].name);
		return DW_NO_DEF;
	}
	/* Inverses of callees first (may grow c->defs: re-read pointers). */
	for (size_t i = 0; i < c->defs[id].nops; i++) {
		dw_op o = c->defs[id].ops[i];
		if (o.kind == DW_OP_CALL && dw_inverse(c, o.callee, e) == DW_NO_DEF)
			return DW_NO_DEF;
	}
	char name[64];
	snprintf(name, sizeof name, "%.50s", c->defs[id].name);
	{
		/* drop the numeric suffix of the original name: "prep_12" */
		char *u = strrchr(name, '_');
		if (u && u[1] && strspn(u + 1, "0123456789") == strlen(u + 1))
			*u = 0;
		strcat(name, "_inv");
	}
	const dw_def *d = &c->defs[id];
	dw_builder *b = dw_begin(c, name, d->nargs, d->nparams, d->stage);
	if (!b) {
		dw_fail(e, DW_EINTERNAL, "out of memory");
		return DW_NO_DEF;
	}
	dw_add_ancillas(b, d->nanc);
	for (size_t i = d->nops; i-- > 0;) {
		d = &c->defs[id];
		const dw_op *o = &d->ops[i];
		dw_expr ex[8];
		const uint32_t *qs = d->qs + o->q;
		if (o->kind == DW_OP_GATE) {
			for (uint32_t k = 0; k < o->na; k++)
				ex[k] = dw_expr_scale(d->ex[o->a + k], -1.0);
			dw_gate_op(b, dw_gates[o->gate].inverse, qs, ex);
		} else {
			/* call the callee's inverse with the same parameters;
			 * d's arrays stay put until dw_end */
			dw_call(b, c->defs[o->callee].inverse, qs, d->ex + o->a, o->reps);
		}
	}
	uint32_t r = dw_end(b, e);
	if (r == DW_NO_DEF)
		return r;
	c->defs[id].inverse = r;
	if (c->defs[r].inverse == DW_NO_DEF)
		c->defs[r].inverse = id;
	return r;
}

/* ---- walking ---- */

static int walk_rec(const dw_circuit *c, uint32_t id, const uint32_t *map,
	const double *params, dw_stage ctx, dw_walk_fn fn, void *user, int depth)
{
	const dw_def *d = &c->defs[id];
	dw_stage st = d->stage != DW_STAGE_NONE ? d->stage : ctx;
	if (depth > 200)
		return DW_EINTERNAL;
	for (size_t i = 0; i < d->nops; i++) {
		const dw_op *o = &d->ops[i];
		if (o->kind == DW_OP_GATE) {
			uint32_t q[3];
			double a[3];
			for (uint32_t k = 0; k < o->nq; k++)
				q[k] = map[d->qs[o->q + k]];
			for (uint32_t k = 0; k < o->na; k++)
				a[k] = dw_expr_eval(&d->ex[o->a + k], params);
			dw_walk_gate g = {(dw_gate)o->gate, o->cond != 0, o->bit,
				o->cond ? map[o->condq] : 0, q, a, st};
			int r = fn(&g, user);
			if (r)
				return r;
			continue;
		}
		const dw_def *cd = &c->defs[o->callee];
		size_t nq = (size_t)cd->nargs + cd->pool;
		uint32_t sub_small[128];
		double pv_small[16];
		uint32_t *sub = nq <= 128 ? sub_small : malloc(nq * sizeof *sub);
		double *pv = cd->nparams <= 16 ? pv_small : malloc(cd->nparams * sizeof *pv);
		if (!sub || !pv) {
			if (sub != sub_small)
				free(sub);
			if (pv != pv_small)
				free(pv);
			return DW_EINTERNAL;
		}
		for (uint32_t k = 0; k < cd->nargs; k++)
			sub[k] = map[d->qs[o->q + k]];
		for (uint32_t k = 0; k < cd->pool; k++)
			sub[cd->nargs + k] = map[d->nargs + d->nanc + k];
		for (uint32_t k = 0; k < cd->nparams; k++)
			pv[k] = dw_expr_eval(&d->ex[o->a + k], params);
		int r = 0;
		for (uint64_t rep = 0; rep < o->reps && !r; rep++)
			r = walk_rec(c, o->callee, sub, pv, st, fn, user, depth + 1);
		if (sub != sub_small)
			free(sub);
		if (pv != pv_small)
			free(pv);
		if (r)
			return r;
	}
	return 0;
}

int dw_walk(const dw_circuit *c, uint32_t id, const uint32_t *map,
	const double *params, dw_walk_fn fn, void *ctx)
{
	return walk_rec(c, id, map, params, DW_STAGE_NONE, fn, ctx, 0);
}
