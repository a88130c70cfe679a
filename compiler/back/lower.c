/* lower.c - lowering a compiled program to Clifford+T (DESIGN 8).
 * Takes: a dw_program in continuous gates and the synthesis share of the
 * error budget.  Gives: a new main definition in the same circuit whose
 * every gate is one of h, s, sdg, t, tdg, x, y, z, cx, cz (measure and
 * reset pass through), with the hierarchy kept:
 *  - each definition is specialised to the concrete parameter values of
 *    its calls (memoised, so a loop body is specialised once);
 *  - rz(theta) becomes a call of a synthesised definition (stage
 *    synthesis; hash-consed, so a recurring angle exists once), within
 *    eps_rotation = eps_synth / (rotations of the program), by dw_synth
 *    ("Optimal ancilla-free Clifford+T approximation of z-rotations",
 *    QIC 16, 2016); rx = h rz h, ry = sdg h rz h s, p = rz up to a global
 *    phase (p only appears outside controlled contexts);
 *  - ccx becomes 7 T / 10 cx of T-depth 3: h on the target, then the
 *    phase polynomial 4abc = a + b + c - (a^b) - (a^c) - (b^c) + (a^b^c)
 *    with the T layers {a, b, c}, {a^b, a^c, a^b^c}, {b^c}
 *    ("A meet-in-the-middle algorithm for fast synthesis of depth-optimal
 *    quantum circuits", IEEE Trans. CAD 32(6), 2013, shows T-depth 3);
 *  - cy = sdg.cx.s on the target, swap = 3 cx, cswap = cx.ccx.cx. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/emit.h"
#include "dwell/synth.h"

typedef struct memo_entry {
	uint32_t id;
	uint32_t nparams;
	double *params;
	uint32_t lowered;
} memo_entry;

typedef struct lctx {
	dw_circuit *c;
	dw_synth_cache *cache;
	double eps;
	memo_entry *memo;
	size_t nmemo, capmemo;
	uint32_t *table;      /* open addressing over memo indices */
	size_t tcap;
	uint32_t ccx_def;
	uint64_t rotations;   /* rotations synthesised (with repetition in defs) */
	double max_error;
	dw_error *e;
} lctx;

static uint64_t key_hash(uint32_t id, const double *p, uint32_t n)
{
	uint64_t h = 1469598103934665603ULL ^ id;
	h *= 1099511628211ULL;
	for (uint32_t i = 0; i < n; i++) {
		uint64_t bits;
		double v = p[i] == 0.0 ? 0.0 : p[i];
		memcpy(&bits, &v, sizeof bits);
		h ^= bits;
		h *= 1099511628211ULL;
	}
	return h;
}

static bool key_eq(const memo_entry *m, uint32_t id, const double *p, uint32_t n)
{
	if (m->id != id || m->nparams != n)
		return false;
	for (uint32_t i = 0; i < n; i++) {
		double a = m->params[i] == 0.0 ? 0.0 : m->params[i];
		double b = p[i] == 0.0 ? 0.0 : p[i];
		if (memcmp(&a, &b, sizeof a))
			return false;
	}
	return true;
}

static uint32_t memo_find(lctx *L, uint32_t id, const double *p, uint32_t n)
{
	if (!L->tcap)
		return DW_NO_DEF;
	size_t h = key_hash(id, p, n) & (L->tcap - 1);
	while (L->table[h] != UINT32_MAX) {
		const memo_entry *m = &L->memo[L->table[h]];
		if (key_eq(m, id, p, n))
			return m->lowered;
		h = (h + 1) & (L->tcap - 1);
	}
	return DW_NO_DEF;
}

static int memo_add(lctx *L, uint32_t id, const double *p, uint32_t n, uint32_t lowered)
{
	if ((L->nmemo + 1) * 2 > L->tcap) {
		size_t nc = L->tcap ? L->tcap * 2 : 256;
		uint32_t *t = malloc(nc * sizeof *t);
		if (!t)
			return -1;
		for (size_t i = 0; i < nc; i++)
			t[i] = UINT32_MAX;
		for (size_t i = 0; i < L->nmemo; i++) {
			const memo_entry *m = &L->memo[i];
			size_t h = key_hash(m->id, m->params, m->nparams) & (nc - 1);
			while (t[h] != UINT32_MAX)
				h = (h + 1) & (nc - 1);
			t[h] = (uint32_t)i;
		}
		free(L->table);
		L->table = t;
		L->tcap = nc;
	}
	if (L->nmemo == L->capmemo) {
		size_t nc = L->capmemo ? L->capmemo * 2 : 256;
		memo_entry *m = realloc(L->memo, nc * sizeof *m);
		if (!m)
			return -1;
		L->memo = m;
		L->capmemo = nc;
	}
	memo_entry *m = &L->memo[L->nmemo];
	m->id = id;
	m->nparams = n;
	m->params = malloc((n ? n : 1) * sizeof *m->params);
	if (!m->params)
		return -1;
	if (n)
		memcpy(m->params, p, n * sizeof *p);
	m->lowered = lowered;
	size_t h = key_hash(id, p, n) & (L->tcap - 1);
	while (L->table[h] != UINT32_MAX)
		h = (h + 1) & (L->tcap - 1);
	L->table[h] = (uint32_t)L->nmemo++;
	return 0;
}

static const dw_gate sq_to_gate[] = {
	[DW_SQ_H] = DW_G_H, [DW_SQ_S] = DW_G_S, [DW_SQ_SDG] = DW_G_SDG,
	[DW_SQ_T] = DW_G_T, [DW_SQ_TDG] = DW_G_TDG, [DW_SQ_X] = DW_G_X,
	[DW_SQ_Y] = DW_G_Y, [DW_SQ_Z] = DW_G_Z,
};

/* rz(theta) on qubit q of b, synthesised (nothing for theta == 0). */
static int emit_rz(lctx *L, dw_builder *b, uint32_t q, double theta)
{
	if (theta == 0.0)
		return DW_OK;
	const dw_synth_result *r;
	if (dw_synth_cache_rz(L->cache, theta, L->eps, &r, L->e))
		return L->e->status;
	L->rotations++;
	if (r->error > L->max_error)
		L->max_error = r->error;
	if (r->count == 0)
		return DW_OK;
	dw_builder *sb = dw_begin(L->c, "rz_ct", 1, 0, DW_STAGE_SYNTH);
	for (size_t i = 0; i < r->count; i++)
		dw_g1(sb, sq_to_gate[r->gates[i]], 0);
	uint32_t d = dw_end(sb, L->e);
	if (d == DW_NO_DEF)
		return L->e->status;
	dw_call(b, d, &q, NULL, 1);
	return DW_OK;
}

static uint32_t ccx_def(lctx *L)
{
	if (L->ccx_def != DW_NO_DEF)
		return L->ccx_def;
	dw_builder *b = dw_begin(L->c, "ccx_t", 3, 0, DW_STAGE_NONE);
	uint32_t A = 0, B = 1, C = 2;
	dw_g1(b, DW_G_H, C);
	dw_g1(b, DW_G_T, A);
	dw_g1(b, DW_G_T, B);
	dw_g1(b, DW_G_T, C);
	dw_g2(b, DW_G_CX, A, B);      /* B = a^b */
	dw_g2(b, DW_G_CX, A, C);      /* C = a^c */
	dw_g2(b, DW_G_CX, B, A);      /* A = b */
	dw_g2(b, DW_G_CX, C, A);      /* A = a^b^c */
	dw_g1(b, DW_G_T, A);
	dw_g1(b, DW_G_TDG, B);
	dw_g1(b, DW_G_TDG, C);
	dw_g2(b, DW_G_CX, B, C);      /* C = b^c */
	dw_g1(b, DW_G_TDG, C);
	dw_g2(b, DW_G_CX, B, C);
	dw_g2(b, DW_G_CX, C, A);
	dw_g2(b, DW_G_CX, B, A);
	dw_g2(b, DW_G_CX, A, C);
	dw_g2(b, DW_G_CX, A, B);
	dw_g1(b, DW_G_H, C);
	L->ccx_def = dw_end(b, L->e);
	return L->ccx_def;
}

static int lower_gate(lctx *L, dw_builder *b, dw_gate g, const uint32_t *q, const double *a)
{
	switch (g) {
	case DW_G_X: case DW_G_Y: case DW_G_Z: case DW_G_H: case DW_G_S: case DW_G_SDG:
	case DW_G_T: case DW_G_TDG: case DW_G_CX: case DW_G_CZ:
	case DW_G_MEASURE: case DW_G_RESET:
		dw_gate_op(b, g, q, NULL);
		return DW_OK;
	case DW_G_RZ:
	case DW_G_P:
		return emit_rz(L, b, q[0], a[0]);
	case DW_G_RX:
		dw_g1(b, DW_G_H, q[0]);
		if (emit_rz(L, b, q[0], a[0]))
			return L->e->status;
		dw_g1(b, DW_G_H, q[0]);
		return DW_OK;
	case DW_G_RY:
		dw_g1(b, DW_G_SDG, q[0]);
		dw_g1(b, DW_G_H, q[0]);
		if (emit_rz(L, b, q[0], a[0]))
			return L->e->status;
		dw_g1(b, DW_G_H, q[0]);
		dw_g1(b, DW_G_S, q[0]);
		return DW_OK;
	case DW_G_CY:
		dw_g1(b, DW_G_SDG, q[1]);
		dw_g2(b, DW_G_CX, q[0], q[1]);
		dw_g1(b, DW_G_S, q[1]);
		return DW_OK;
	case DW_G_SWAP:
		dw_g2(b, DW_G_CX, q[0], q[1]);
		dw_g2(b, DW_G_CX, q[1], q[0]);
		dw_g2(b, DW_G_CX, q[0], q[1]);
		return DW_OK;
	case DW_G_CCX: {
		uint32_t d = ccx_def(L);
		if (d == DW_NO_DEF)
			return L->e->status;
		dw_call(b, d, q, NULL, 1);
		return DW_OK;
	}
	case DW_G_CSWAP: {
		uint32_t d = ccx_def(L);
		if (d == DW_NO_DEF)
			return L->e->status;
		uint32_t t[3] = {q[0], q[1], q[2]};
		dw_g2(b, DW_G_CX, q[2], q[1]);
		dw_call(b, d, t, NULL, 1);
		dw_g2(b, DW_G_CX, q[2], q[1]);
		return DW_OK;
	}
	default:
		return dw_fail(L->e, DW_EINTERNAL, "internal: no Clifford+T lowering for %s",
			dw_gates[g].name);
	}
}

static uint32_t lower_def(lctx *L, uint32_t id, const double *params)
{
	uint32_t np = L->c->defs[id].nparams;
	uint32_t found = memo_find(L, id, params, np);
	if (found != DW_NO_DEF)
		return found;
	const dw_def *d = &L->c->defs[id];
	char name[64];
	snprintf(name, sizeof name, "%.40s", d->name);
	char *u = strrchr(name, '_');
	if (u && u[1] && strspn(u + 1, "0123456789") == strlen(u + 1))
		*u = 0;
	dw_builder *b = dw_begin(L->c, name, d->nargs, 0, d->stage);
	if (!b) {
		dw_fail(L->e, DW_EINTERNAL, "out of memory");
		return DW_NO_DEF;
	}
	dw_add_ancillas(b, d->nanc);
	if (d->nbits)
		dw_add_bits(b, d->nbits);
	int rc = DW_OK;
	for (size_t i = 0; i < L->c->defs[id].nops && rc == DW_OK; i++) {
		d = &L->c->defs[id];            /* defs may move as we add */
		dw_op o = d->ops[i];
		uint32_t qs[128];
		double vals[256];
		if (o.nq > 128 || o.na > 256) {
			rc = dw_fail(L->e, DW_EINTERNAL, "internal: operation too wide to lower");
			break;
		}
		memcpy(qs, d->qs + o.q, o.nq * sizeof *qs);
		for (uint32_t k = 0; k < o.na; k++)
			vals[k] = dw_expr_eval(&d->ex[o.a + k], params);
		if (o.kind == DW_OP_GATE && o.gate == DW_G_MEASURE) {
			dw_measure(b, qs[0], o.bit);
		} else if (o.kind == DW_OP_GATE && o.cond) {
			/* classically controlled Paulis and cz are Clifford already */
			dw_cond_gate(b, o.bit, (dw_gate)o.gate, qs);
		} else if (o.kind == DW_OP_GATE) {
			rc = lower_gate(L, b, (dw_gate)o.gate, qs, vals);
		} else {
			uint32_t sub = lower_def(L, o.callee, vals);
			if (sub == DW_NO_DEF)
				rc = L->e->status ? L->e->status : DW_EINTERNAL;
			else
				dw_call(b, sub, qs, NULL, o.reps);
		}
	}
	if (rc) {
		dw_end(b, NULL);
		return DW_NO_DEF;
	}
	uint32_t r = dw_end(b, L->e);
	if (r != DW_NO_DEF && memo_add(L, id, params, np, r)) {
		dw_fail(L->e, DW_EINTERNAL, "out of memory (lowering)");
		return DW_NO_DEF;
	}
	return r;
}

int dw_lower_clifford_t(dw_program *pg, dw_error *e)
{
	dw_figures f;
	if (dw_cost_counts(pg->circ, pg->top, &f, e))
		return e->status;
	pg->synth_rotations_planned = f.rotation_count;
	pg->eps_rotation = f.rotation_count ? pg->budget.synth / (double)f.rotation_count : 0;
	if (f.saturated || f.rotation_count > 100000000ULL)
		return dw_fail(e, DW_EINPUT, "%s: target.gates: clifford+t: %llu rotations to "
			"synthesise is more than this lowering handles (10^8)", pg->problem->path,
			(unsigned long long)f.rotation_count);
	lctx L;
	memset(&L, 0, sizeof L);
	L.c = pg->circ;
	L.eps = pg->eps_rotation;
	L.ccx_def = DW_NO_DEF;
	L.e = e;
	L.cache = dw_synth_cache_create(e);
	if (!L.cache)
		return e->status;
	uint32_t top = lower_def(&L, pg->top, NULL);
	int rc = top == DW_NO_DEF ? (e->status ? e->status : DW_EINTERNAL) : DW_OK;
	if (rc == DW_OK) {
		pg->top = top;
		pg->synth_distinct = dw_synth_cache_size(L.cache);
		pg->synth_max_error = L.max_error;
		pg->t_per_rotation = 0;
	}
	for (size_t i = 0; i < L.nmemo; i++)
		free(L.memo[i].params);
	free(L.memo);
	free(L.table);
	dw_synth_cache_destroy(L.cache);
	return rc;
}
