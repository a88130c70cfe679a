/* cost.c - exact costs of IR definitions without expansion.
 * Takes: a dw_circuit.  Gives: per-definition summaries computed once from
 * the callees' summaries: gate counts per effective stage (saturating
 * uint64), and depth / T-depth / per-stage depth as max-plus matrices over
 * the definition's ports (arguments + ancilla pool): M[i][o] is the
 * largest weight of a gate path from input port i to output port o.  A call
 * composes matrices; a loop of r calls is a max-plus matrix power (by
 * squaring).  The flattened program has the same figures (tests prove it). */
#include "dwell/circuit.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define NEG (INT64_MIN / 4)          /* no path */
#define CAP (INT64_MAX / 4)          /* saturation limit for depths */

enum { W_DEPTH, W_TDEPTH };          /* weightings besides per-stage */

typedef struct mat {
	uint32_t m;
	int64_t *a;                      /* m*m, row i = input, column o = output */
} mat;

struct dw_cost {
	uint64_t gates[DW_STAGE_COUNT][DW_G_COUNT];
	uint64_t cond[DW_STAGE_COUNT];   /* classically controlled gates */
	bool counted;
	bool saturated;
	mat depth, tdepth;
	double tdepth_w;                 /* rotation weight tdepth was built with */
	mat stage[DW_STAGE_COUNT][DW_STAGE_COUNT]; /* [context][stage] */
	unsigned char *touched;          /* ports the definition acts on */
	bool have_depth, have_tdepth;    /* memoised whole-definition values */
	int64_t depth_v, tdepth_v;
	double tdepth_v_w;
};

void dw_cost_free(dw_cost *k);

void dw_cost_free(dw_cost *k)
{
	if (!k)
		return;
	free(k->depth.a);
	free(k->tdepth.a);
	free(k->touched);
	for (int i = 0; i < DW_STAGE_COUNT; i++)
		for (int j = 0; j < DW_STAGE_COUNT; j++)
			free(k->stage[i][j].a);
	free(k);
}

uint32_t dw_def_qubits(const dw_circuit *c, uint32_t id)
{
	return c->defs[id].nargs + c->defs[id].pool;
}

static dw_cost *cost_of(dw_circuit *c, uint32_t id, dw_error *e)
{
	dw_def *d = &c->defs[id];
	if (!d->cost) {
		d->cost = calloc(1, sizeof *d->cost);
		if (!d->cost)
			dw_fail(e, DW_EINTERNAL, "out of memory (costs)");
	}
	return d->cost;
}

/* ---- counts ---- */

static int count_def(dw_circuit *c, uint32_t id, dw_error *e)
{
	dw_cost *k = cost_of(c, id, e);
	if (!k)
		return DW_EINTERNAL;
	if (k->counted)
		return DW_OK;
	const dw_def *d = &c->defs[id];
	int sat = 0;
	for (size_t i = 0; i < d->nops; i++) {
		const dw_op *o = &c->defs[id].ops[i];
		if (o->kind == DW_OP_GATE) {
			k->gates[d->stage][o->gate] = dw_add_sat(k->gates[d->stage][o->gate], 1, &sat);
			if (o->cond)
				k->cond[d->stage] = dw_add_sat(k->cond[d->stage], 1, &sat);
			continue;
		}
		if (count_def(c, o->callee, e))
			return e->status;
		d = &c->defs[id];
		const dw_cost *ck = c->defs[o->callee].cost;
		if (ck->saturated)
			sat = 1;
		for (int s = 0; s < DW_STAGE_COUNT; s++) {
			int to = s == DW_STAGE_NONE ? (int)d->stage : s;
			for (int g = 0; g < DW_G_COUNT; g++) {
				uint64_t v = dw_mul_sat(ck->gates[s][g], o->reps, &sat);
				k->gates[to][g] = dw_add_sat(k->gates[to][g], v, &sat);
			}
			k->cond[to] = dw_add_sat(k->cond[to], dw_mul_sat(ck->cond[s], o->reps, &sat), &sat);
		}
	}
	k->saturated = sat != 0;
	k->counted = true;
	return DW_OK;
}

/* ---- max-plus matrices ---- */

static int64_t sat_add(int64_t a, int64_t b, bool *sat)
{
	if (a == NEG || b == NEG)
		return NEG;
	int64_t r = a + b;   /* both within [NEG, CAP]: no overflow */
	if (r > CAP) {
		*sat = true;
		return CAP;
	}
	return r;
}

static int mat_alloc(mat *x, uint32_t m, dw_error *e)
{
	x->m = m;
	x->a = malloc((size_t)(m ? m : 1) * (m ? m : 1) * sizeof *x->a);
	if (!x->a)
		return dw_fail(e, DW_EINTERNAL, "out of memory (depth matrix %u)", m);
	return DW_OK;
}

static void mat_identity(mat *x)
{
	for (uint32_t i = 0; i < x->m; i++)
		for (uint32_t j = 0; j < x->m; j++)
			x->a[(size_t)i * x->m + j] = i == j ? 0 : NEG;
}

/* r = x (*) y (max-plus product), r distinct from x and y */
static void mat_mul(mat *r, const mat *x, const mat *y, bool *sat)
{
	uint32_t m = x->m;
	for (uint32_t i = 0; i < m; i++)
		for (uint32_t j = 0; j < m; j++) {
			int64_t best = NEG;
			for (uint32_t t = 0; t < m; t++) {
				int64_t v = sat_add(x->a[(size_t)i * m + t], y->a[(size_t)t * m + j], sat);
				if (v > best)
					best = v;
			}
			r->a[(size_t)i * m + j] = best;
		}
}

/* out = x^p by squaring (p >= 1) */
static int mat_pow(mat *out, const mat *x, uint64_t p, bool *sat, dw_error *e)
{
	uint32_t m = x->m;
	mat base = {0}, tmp = {0};
	if (mat_alloc(out, m, e) || mat_alloc(&base, m, e) || mat_alloc(&tmp, m, e)) {
		free(base.a);
		free(tmp.a);
		return DW_EINTERNAL;
	}
	mat_identity(out);
	memcpy(base.a, x->a, (size_t)m * m * sizeof *x->a);
	while (p) {
		if (p & 1) {
			mat_mul(&tmp, out, &base, sat);
			memcpy(out->a, tmp.a, (size_t)m * m * sizeof *tmp.a);
		}
		p >>= 1;
		if (p) {
			mat_mul(&tmp, &base, &base, sat);
			memcpy(base.a, tmp.a, (size_t)m * m * sizeof *tmp.a);
		}
	}
	free(base.a);
	free(tmp.a);
	return DW_OK;
}

/* Which weighting a matrix is for: depth, T-depth, or one stage's depth
 * under a calling context. */
typedef struct weighting {
	int kind;          /* W_DEPTH, W_TDEPTH, or 2 = stage */
	dw_stage ctx, st;  /* for stage weighting */
	double rot_w;      /* T-depth weight of a rotation */
} weighting;

static int64_t gate_weight(const weighting *w, dw_gate g, dw_stage eff)
{
	switch (w->kind) {
	case W_DEPTH:
		return 1;
	case W_TDEPTH:
		if (dw_gates[g].flags & DW_GF_ROTATION)
			return (int64_t)ceil(w->rot_w);
		return dw_gates[g].t_depth;
	default:
		return eff == w->st ? 1 : 0;
	}
}

static int depth_def(dw_circuit *c, uint32_t id, const weighting *w,
	const mat **out, bool *sat, dw_error *e);
static int64_t mat_max(const mat *x);

/* Build the matrix of definition id under weighting w into *x. */
static int build_matrix(dw_circuit *c, uint32_t id, const weighting *w,
	mat *x, bool *sat, dw_error *e)
{
	const dw_def *d = &c->defs[id];
	uint32_t m = d->nargs + d->pool;
	dw_stage eff = d->stage != DW_STAGE_NONE ? d->stage : w->ctx;
	/* R[wire][input]: longest path from input port to the wire's front */
	int64_t *R = malloc((size_t)(m ? m : 1) * (m ? m : 1) * sizeof *R);
	int64_t *v = malloc((size_t)(m ? m : 1) * sizeof *v);
	int64_t *nw = NULL;
	if (!R || !v) {
		free(R);
		free(v);
		return dw_fail(e, DW_EINTERNAL, "out of memory (depth)");
	}
	for (uint32_t i = 0; i < m; i++)
		for (uint32_t j = 0; j < m; j++)
			R[(size_t)i * m + j] = i == j ? 0 : NEG;
	int rc = DW_OK;
	for (size_t oi = 0; oi < c->defs[id].nops && rc == DW_OK; oi++) {
		d = &c->defs[id];
		const dw_op *o = &d->ops[oi];
		const uint32_t *qs = d->qs + o->q;
		if (o->kind == DW_OP_GATE) {
			/* a classically controlled gate also waits for the measured qubit */
			uint32_t wires[4];
			uint32_t nw = o->nq;
			memcpy(wires, qs, o->nq * sizeof *wires);
			if (o->cond) {
				bool dup = false;
				for (uint32_t t = 0; t < o->nq; t++)
					dup |= wires[t] == o->condq;
				if (!dup)
					wires[nw++] = o->condq;
			}
			int64_t wt = gate_weight(w, (dw_gate)o->gate, eff);
			for (uint32_t j = 0; j < m; j++) {
				int64_t best = NEG;
				for (uint32_t t = 0; t < nw; t++) {
					int64_t r = R[(size_t)wires[t] * m + j];
					if (r > best)
						best = r;
				}
				v[j] = sat_add(best, wt, sat);
			}
			for (uint32_t t = 0; t < nw; t++)
				memcpy(R + (size_t)wires[t] * m, v, m * sizeof *v);
			continue;
		}
		/* call: callee ports = its args (mapped by qs) then its pool
		 * (mapped onto our pool after our own ancillas) */
		weighting cw = *w;
		cw.ctx = eff;
		const mat *cm;
		rc = depth_def(c, o->callee, &cw, &cm, sat, e);
		if (rc)
			break;
		d = &c->defs[id];
		qs = d->qs + o->q;
		const dw_def *cd = &c->defs[o->callee];
		uint32_t mc = cd->nargs + cd->pool;
		mat powered = {0};
		const mat *use = cm;
		if (o->reps > 1) {
			rc = mat_pow(&powered, cm, o->reps, sat, e);
			if (rc)
				break;
			use = &powered;
		}
		uint32_t *port = malloc((mc ? mc : 1) * sizeof *port);
		nw = malloc((size_t)(mc ? mc : 1) * (m ? m : 1) * sizeof *nw);
		if (!port || !nw) {
			free(port);
			free(powered.a);
			rc = dw_fail(e, DW_EINTERNAL, "out of memory (depth)");
			break;
		}
		for (uint32_t t = 0; t < cd->nargs; t++)
			port[t] = qs[t];
		for (uint32_t t = 0; t < cd->pool; t++)
			port[cd->nargs + t] = d->nargs + d->nanc + t;
		for (uint32_t ou = 0; ou < mc; ou++)
			for (uint32_t j = 0; j < m; j++) {
				int64_t best = NEG;
				for (uint32_t in = 0; in < mc; in++) {
					int64_t r = sat_add(R[(size_t)port[in] * m + j],
						use->a[(size_t)in * mc + ou], sat);
					if (r > best)
						best = r;
				}
				nw[(size_t)ou * m + j] = best;
			}
		for (uint32_t ou = 0; ou < mc; ou++)
			memcpy(R + (size_t)port[ou] * m, nw + (size_t)ou * m, m * sizeof *nw);
		free(port);
		free(nw);
		nw = NULL;
		free(powered.a);
	}
	if (rc == DW_OK && (rc = mat_alloc(x, m, e)) == DW_OK)
		for (uint32_t i = 0; i < m; i++)
			for (uint32_t o = 0; o < m; o++)
				x->a[(size_t)i * m + o] = R[(size_t)o * m + i];
	free(R);
	free(v);
	return rc;
}

static int depth_def(dw_circuit *c, uint32_t id, const weighting *w,
	const mat **out, bool *sat, dw_error *e)
{
	dw_cost *k = cost_of(c, id, e);
	if (!k)
		return DW_EINTERNAL;
	mat *slot;
	weighting ww = *w;
	if (w->kind == W_DEPTH) {
		slot = &k->depth;
	} else if (w->kind == W_TDEPTH) {
		slot = &k->tdepth;
		if (slot->a && k->tdepth_w != w->rot_w) {
			free(slot->a);
			slot->a = NULL;
		}
		k->tdepth_w = w->rot_w;
	} else {
		/* a labelled definition does not depend on its caller */
		if (c->defs[id].stage != DW_STAGE_NONE)
			ww.ctx = DW_STAGE_NONE;
		slot = &k->stage[ww.ctx][ww.st];
	}
	if (!slot->a) {
		mat x = {0};
		int rc = build_matrix(c, id, &ww, &x, sat, e);
		if (rc)
			return rc;
		k = c->defs[id].cost;   /* defs never move during costing, but be safe */
		*slot = x;
	}
	*out = slot;
	return DW_OK;
}

/* ---- depth by propagating a front vector (large definitions) ----
 * Small definitions (at most small_ports qubits, 40 by default) and long
 * ones (8 operations or more per qubit) keep a max-plus matrix;
 * a larger one is walked with the vector of wire fronts, its small callees
 * applied through their matrices.  A loop is iterated until one iteration
 * shifts every wire the body touches by the same amount c: the body is
 * max-plus linear and leaves the other wires alone, so every later
 * iteration adds c again and the rest is added at once (exact).  A loop
 * that does not settle within SETTLE_MAX iterations falls back to the
 * matrix power. */
#define SETTLE_MAX 64
static uint32_t small_ports = 40;

void dw_cost_set_matrix_limit(uint32_t ports)
{
	small_ports = ports;
}

/* A matrix pays off for few qubits, or for a long body (a table lookup
 * called in every step) that would otherwise be walked at every call. */
static bool use_matrix(const dw_def *d)
{
	uint32_t m = d->nargs + d->pool;
	return m <= small_ports || (small_ports > 0 && d->nops >= 8 * (size_t)m);
}

/* Ports (qubits) a definition touches, as a 0/1 array of nargs + pool. */
static const unsigned char *touched(dw_circuit *c, uint32_t id, dw_error *e)
{
	dw_cost *k = cost_of(c, id, e);
	if (!k)
		return NULL;
	if (k->touched)
		return k->touched;
	const dw_def *d = &c->defs[id];
	uint32_t m = d->nargs + d->pool;
	unsigned char *t = calloc(m ? m : 1, 1);
	if (!t) {
		dw_fail(e, DW_EINTERNAL, "out of memory");
		return NULL;
	}
	for (size_t i = 0; i < c->defs[id].nops; i++) {
		const dw_op *o = &c->defs[id].ops[i];
		if (o->kind == DW_OP_GATE) {
			for (uint32_t q = 0; q < o->nq; q++)
				t[c->defs[id].qs[o->q + q]] = 1;
			if (o->cond)
				t[o->condq] = 1;
			continue;
		}
		const unsigned char *ct = touched(c, o->callee, e);
		if (!ct) {
			free(t);
			return NULL;
		}
		d = &c->defs[id];
		const dw_def *cd = &c->defs[o->callee];
		for (uint32_t q = 0; q < cd->nargs; q++)
			if (ct[q])
				t[d->qs[o->q + q]] = 1;
		for (uint32_t q = 0; q < cd->pool; q++)
			if (ct[cd->nargs + q])
				t[d->nargs + d->nanc + q] = 1;
	}
	k = c->defs[id].cost;
	k->touched = t;
	return t;
}

static int vec_def(dw_circuit *c, uint32_t id, const weighting *w, int64_t *v,
	bool *sat, dw_error *e, int depth);

/* v = v (*) x (max-plus row vector times matrix), tmp as scratch */
static void apply_matrix(int64_t *v, const mat *x, int64_t *tmp, bool *sat)
{
	uint32_t m = x->m;
	for (uint32_t ou = 0; ou < m; ou++) {
		int64_t best = NEG;
		for (uint32_t in = 0; in < m; in++) {
			int64_t r = sat_add(v[in], x->a[(size_t)in * m + ou], sat);
			if (r > best)
				best = r;
		}
		tmp[ou] = best;
	}
	memcpy(v, tmp, m * sizeof *v);
}

/* Apply one call (reps times) of callee to the fronts v[port[.]]. */
static int vec_call(dw_circuit *c, uint32_t callee, const uint32_t *port,
	uint64_t reps, const weighting *w, int64_t *v, bool *sat, dw_error *e, int depth)
{
	const dw_def *cd = &c->defs[callee];
	uint32_t mc = cd->nargs + cd->pool;
	int64_t sub_small[3 * 128];
	int64_t *sub = mc <= 128 ? sub_small : malloc((size_t)mc * 3 * sizeof *sub);
	if (!sub)
		return dw_fail(e, DW_EINTERNAL, "out of memory (depth)");
	int64_t *prev = sub + mc, *tmp = sub + 2 * (size_t)mc;
	for (uint32_t i = 0; i < mc; i++)
		sub[i] = v[port[i]];
	int rc = DW_OK;
	if (use_matrix(cd)) {
		const mat *cm;
		if ((rc = depth_def(c, callee, w, &cm, sat, e)) == DW_OK) {
			mat powered = {0};
			const mat *use = cm;
			if (reps > 1 && (rc = mat_pow(&powered, cm, reps, sat, e)) == DW_OK)
				use = &powered;
			if (rc == DW_OK)
				apply_matrix(sub, use, tmp, sat);
			free(powered.a);
		}
	} else {
		const unsigned char *tc = touched(c, callee, e);
		if (!tc)
			rc = e->status;
		uint64_t done = 0;
		while (rc == DW_OK && done < reps) {
			memcpy(prev, sub, mc * sizeof *sub);
			if ((rc = vec_def(c, callee, w, sub, sat, e, depth + 1)))
				break;
			done++;
			if (done == reps)
				break;
			/* a uniform shift over the touched wires repeats forever */
			int64_t shift = 0;
			bool uniform = true, first = true;
			for (uint32_t i = 0; i < mc && uniform; i++) {
				if (!tc[i])
					continue;
				int64_t dlt = sub[i] - prev[i];
				if (first) {
					shift = dlt;
					first = false;
				} else if (dlt != shift) {
					uniform = false;
				}
			}
			if (uniform) {
				uint64_t left = reps - done;
				int f = 0;
				uint64_t add = dw_mul_sat((uint64_t)(shift < 0 ? 0 : shift), left, &f);
				for (uint32_t i = 0; i < mc; i++)
					if (tc[i])
						sub[i] = sat_add(sub[i], add > (uint64_t)CAP ? CAP : (int64_t)add, sat);
				if (f)
					*sat = true;
				done = reps;
				break;
			}
			if (done >= SETTLE_MAX) {
				/* exact fallback: the matrix power of the rest */
				const mat *cm;
				mat powered = {0};
				if ((rc = depth_def(c, callee, w, &cm, sat, e)) == DW_OK &&
				    (rc = mat_pow(&powered, cm, reps - done, sat, e)) == DW_OK)
					apply_matrix(sub, &powered, tmp, sat);
				free(powered.a);
				done = reps;
			}
		}
	}
	if (rc == DW_OK)
		for (uint32_t i = 0; i < mc; i++)
			v[port[i]] = sub[i];
	if (sub != sub_small)
		free(sub);
	return rc;
}

static int vec_def(dw_circuit *c, uint32_t id, const weighting *w, int64_t *v,
	bool *sat, dw_error *e, int depth)
{
	if (depth > 200)
		return dw_fail(e, DW_EINTERNAL, "internal: definitions nested too deeply");
	const dw_def *d = &c->defs[id];
	dw_stage eff = d->stage != DW_STAGE_NONE ? d->stage : w->ctx;
	weighting cw = *w;
	cw.ctx = eff;
	if (w->kind == 2 && d->stage != DW_STAGE_NONE)
		cw.ctx = d->stage;
	int rc = DW_OK;
	for (size_t i = 0; i < c->defs[id].nops && rc == DW_OK; i++) {
		d = &c->defs[id];
		const dw_op *o = &d->ops[i];
		const uint32_t *qs = d->qs + o->q;
		if (o->kind == DW_OP_GATE) {
			int64_t best = NEG;
			for (uint32_t t = 0; t < o->nq; t++)
				if (v[qs[t]] > best)
					best = v[qs[t]];
			if (o->cond && v[o->condq] > best)
				best = v[o->condq];
			int64_t nv = sat_add(best, gate_weight(w, (dw_gate)o->gate, eff), sat);
			for (uint32_t t = 0; t < o->nq; t++)
				v[qs[t]] = nv;
			if (o->cond)
				v[o->condq] = nv;
			continue;
		}
		const dw_def *cd = &c->defs[o->callee];
		uint32_t mc = cd->nargs + cd->pool;
		uint32_t port_small[256];
		uint32_t *port = mc <= 256 ? port_small : malloc(mc * sizeof *port);
		if (!port)
			return dw_fail(e, DW_EINTERNAL, "out of memory (depth)");
		for (uint32_t t = 0; t < cd->nargs; t++)
			port[t] = qs[t];
		for (uint32_t t = 0; t < cd->pool; t++)
			port[cd->nargs + t] = d->nargs + d->nanc + t;
		uint64_t reps = o->reps;
		uint32_t callee = o->callee;
		rc = vec_call(c, callee, port, reps, &cw, v, sat, e, depth);
		if (port != port_small)
			free(port);
	}
	return rc;
}

/* Depth of a definition from all its qubits at time 0 under weighting w. */
static int depth_value(dw_circuit *c, uint32_t id, const weighting *w, int64_t *out,
	bool *sat, dw_error *e)
{
	const dw_def *d = &c->defs[id];
	uint32_t m = d->nargs + d->pool;
	if (use_matrix(d)) {
		const mat *x;
		if (depth_def(c, id, w, &x, sat, e))
			return e->status;
		*out = mat_max(x);
		return DW_OK;
	}
	int64_t *v = calloc(m ? m : 1, sizeof *v);
	if (!v)
		return dw_fail(e, DW_EINTERNAL, "out of memory (depth)");
	int rc = vec_def(c, id, w, v, sat, e, 0);
	int64_t best = 0;
	for (uint32_t i = 0; i < m; i++)
		if (v[i] > best)
			best = v[i];
	free(v);
	*out = best;
	return rc;
}

static int64_t mat_max(const mat *x)
{
	int64_t best = 0;
	for (size_t i = 0; i < (size_t)x->m * x->m; i++)
		if (x->a[i] > best)
			best = x->a[i];
	return best;
}

static void fill_counts(dw_figures *f, const uint64_t *g, int *sat)
{
	for (int i = 0; i < DW_G_COUNT; i++) {
		f->gates[i] = dw_add_sat(f->gates[i], g[i], sat);
	}
}

static void derive(dw_figures *f, int *sat)
{
	f->gate_count = f->t_count_exact = f->toffoli_count = f->rotation_count = 0;
	f->clifford_count = f->two_qubit_count = f->measure_count = 0;
	for (int g = 0; g < DW_G_COUNT; g++) {
		uint64_t n = f->gates[g];
		int fl = dw_gates[g].flags;
		f->gate_count = dw_add_sat(f->gate_count, n, sat);
		f->t_count_exact = dw_add_sat(f->t_count_exact,
			dw_mul_sat(n, (uint64_t)dw_gates[g].t_count, sat), sat);
		if (g == DW_G_CCX)
			f->toffoli_count = dw_add_sat(f->toffoli_count, n, sat);
		if (fl & DW_GF_ROTATION)
			f->rotation_count = dw_add_sat(f->rotation_count, n, sat);
		if (fl & DW_GF_CLIFFORD)
			f->clifford_count = dw_add_sat(f->clifford_count, n, sat);
		if (fl & DW_GF_TWO_QUBIT)
			f->two_qubit_count = dw_add_sat(f->two_qubit_count, n, sat);
		if (g == DW_G_MEASURE)
			f->measure_count = dw_add_sat(f->measure_count, n, sat);
	}
}

int dw_cost_counts(dw_circuit *c, uint32_t id, dw_figures *out, dw_error *e)
{
	memset(out, 0, sizeof *out);
	if (count_def(c, id, e))
		return e->status;
	int sat = c->defs[id].cost->saturated;
	for (int s = 0; s < DW_STAGE_COUNT; s++) {
		fill_counts(out, c->defs[id].cost->gates[s], &sat);
		out->cond_count = dw_add_sat(out->cond_count, c->defs[id].cost->cond[s], &sat);
	}
	derive(out, &sat);
	out->saturated = sat;
	return DW_OK;
}

int dw_cost_figures(dw_circuit *c, uint32_t id, dw_figures *out, dw_error *e)
{
	if (dw_cost_counts(c, id, out, e))
		return e->status;
	bool sat = out->saturated;
	bool dsat = false;
	weighting w = {W_DEPTH, DW_STAGE_NONE, DW_STAGE_NONE, c->t_weight_rotation};
	dw_cost *k = c->defs[id].cost;
	if (!k->have_depth) {
		if (depth_value(c, id, &w, &k->depth_v, &dsat, e))
			return e->status;
		k = c->defs[id].cost;
		k->have_depth = true;
	}
	out->depth = k->depth_v;
	w.kind = W_TDEPTH;
	if (!k->have_tdepth || k->tdepth_v_w != w.rot_w) {
		if (depth_value(c, id, &w, &k->tdepth_v, &dsat, e))
			return e->status;
		k = c->defs[id].cost;
		k->have_tdepth = true;
		k->tdepth_v_w = w.rot_w;
	}
	out->t_depth = k->tdepth_v;
	out->saturated = sat || dsat || k->depth_v >= CAP || k->tdepth_v >= CAP;
	return DW_OK;
}

int dw_cost_stage_figures(dw_circuit *c, uint32_t id, dw_stage s,
	dw_figures *out, dw_error *e)
{
	memset(out, 0, sizeof *out);
	if (count_def(c, id, e))
		return e->status;
	const dw_cost *k = c->defs[id].cost;
	int sat = k->saturated;
	fill_counts(out, k->gates[s], &sat);
	out->cond_count = k->cond[s];
	/* at the top level, unlabelled gates are "other" (stage NONE) */
	derive(out, &sat);
	bool dsat = false;
	weighting w = {2, DW_STAGE_NONE, s, c->t_weight_rotation};
	if (out->gate_count == 0) {
		out->depth = 0;     /* no gate of this stage: nothing to weigh */
	} else if (depth_value(c, id, &w, &out->depth, &dsat, e)) {
		return e->status;
	}
	out->saturated = sat || dsat;
	return DW_OK;
}
