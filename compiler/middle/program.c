/* program.c - assemble one instance of the compiled program.
 * Takes: an analysed problem and an instance number k (seed + k - 1).
 * Gives: the circuit IR of
 *     start (|0>|b> or |0>|->|b>), then for j = 1..q:
 *     exp(-i t_j H(s_j)) by r_j product-formula steps,
 * where H(s) = (K(s) + R K(s) R) / 2 with K(s) = X_anc (x) A(s) and
 * R = I - 2|v><v|, v = |1>_anc |b~> (DESIGN 4), together with the schedule,
 * the error budget and the choice of r_j.
 *
 * Terms of K(s): variant P, A(s) = (1-s) I + s A/alpha:
 *     X_anc (coefficient (1-s) + s c_I/alpha), X_anc P_k (s c_k/alpha);
 * variant I, A(s) = (1-s) Z_sgn + s X_sgn (x) A/alpha:
 *     X_anc Z_sgn ((1-s)), X_anc X_sgn P_k (s c_k/alpha).
 * The reflection is V X (mcz) X V^dagger on (anc, sgn, sys) with
 * V = [h_sgn] U_b: the x gates on anc of U_v = X_anc V cancel. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/formula.h"
#include "dwell/program.h"

typedef struct ctx {
	dw_program *prog;
	dw_circuit *c;
	uint32_t nq;
	uint32_t *rot;        /* rotation definition per term */
	uint32_t reflect;
	dw_items items;
	dw_error *e;
} ctx;

static int add_term(dw_program *pg, dw_pauli p, double ca, double cb, dw_error *e)
{
	for (size_t i = 0; i < pg->nterms; i++)
		if (pg->terms[i].pauli && pg->terms[i].p.x == p.x && pg->terms[i].p.z == p.z) {
			pg->terms[i].ca += ca;
			pg->terms[i].cb += cb;
			return DW_OK;
		}
	dw_term *t = realloc(pg->terms, (pg->nterms + 1) * sizeof *t);
	if (!t)
		return dw_fail(e, DW_EINTERNAL, "out of memory (terms)");
	pg->terms = t;
	dw_term *n = &pg->terms[pg->nterms++];
	memset(n, 0, sizeof *n);
	n->p = p;
	n->pauli = true;
	n->ca = ca;
	n->cb = cb;
	n->norm = 1.0;
	n->def = DW_NO_DEF;
	return DW_OK;
}

static int build_terms(dw_program *pg, dw_error *e)
{
	const dw_problem *p = pg->problem;
	bool ind = p->variant == 'I';
	uint32_t sys0 = ind ? 2 : 1;
	dw_pauli xa = {1, 0};
	if (ind) {
		dw_pauli t = {1, 2};            /* X_anc Z_sgn */
		if (add_term(pg, t, 1.0, 0.0, e))
			return e->status;
	} else if (add_term(pg, xa, 1.0, 0.0, e)) {
		return e->status;
	}
	if (p->matrix_kind != DW_MATRIX_PAULI) {
		dw_layout lay = {p->variant, 0, ind ? 1 : 0, sys0, (uint32_t)p->n, pg->nqubits};
		dw_term_builder build = p->matrix_kind == DW_MATRIX_FILE ? dw_sparse_terms
			: dw_stencil_terms;
		return build(p, &lay, pg->circ, &pg->terms, &pg->nterms, e);
	}
	for (size_t k = 0; k < p->npauli; k++) {
		dw_pauli t = xa;
		if (ind)
			t.x |= 2;                  /* X_sgn */
		for (int q = 0; q < p->n; q++) {
			uint64_t bit = 1ULL << (sys0 + (uint32_t)q);
			switch (p->pauli[k].ops[q]) {
			case 'X': t.x |= bit; break;
			case 'Y': t.x |= bit; t.z |= bit; break;
			case 'Z': t.z |= bit; break;
			default: break;
			}
		}
		if (add_term(pg, t, 0.0, p->pauli[k].coeff / p->alpha, e))
			return e->status;
	}
	/* drop terms that cancelled */
	size_t w = 0;
	for (size_t i = 0; i < pg->nterms; i++)
		if (pg->terms[i].ca != 0.0 || pg->terms[i].cb != 0.0 || !pg->terms[i].pauli)
			pg->terms[w++] = pg->terms[i];
	pg->nterms = w;
	return DW_OK;
}

/* Emit items[lo, hi) into b; group-1 runs are wrapped in reflections.
 * `last_frac` >= 0 replaces the fraction of the final item. */
static void emit_items(ctx *x, dw_builder *b, size_t lo, size_t hi, double last_frac)
{
	const dw_item *v = x->items.v;
	uint32_t all[64];
	for (uint32_t q = 0; q < x->nq; q++)
		all[q] = q;
	bool in_r = false;
	for (size_t i = lo; i < hi; i++) {
		if (v[i].group == 1 && !in_r) {
			dw_call(b, x->reflect, all, NULL, 1);
			in_r = true;
		} else if (v[i].group == 0 && in_r) {
			dw_call(b, x->reflect, all, NULL, 1);
			in_r = false;
		}
		const dw_term *t = &x->prog->terms[v[i].term];
		double f = (i + 1 == hi && last_frac >= 0) ? last_frac : v[i].frac;
		dw_expr ang = dw_const(0.0);
		ang.n = 2;
		ang.p[0] = 0;
		ang.c[0] = f * t->ca;
		ang.p[1] = 1;
		ang.c[1] = f * t->cb;
		if (t->pauli) {
			uint32_t sup[64];
			dw_pauli_support(t->p, sup);
			dw_call(b, x->rot[v[i].term], sup, &ang, 1);
		} else {
			dw_call(b, t->def, t->q, &ang, 1);
		}
	}
	if (in_r)
		dw_call(b, x->reflect, all, NULL, 1);
}

/* The definition of r steps with parameters (a, b) = ((1-s) dt, s dt). */
static uint32_t segment_def(ctx *x, int64_t r)
{
	size_t n = x->items.n;
	const dw_item *v = x->items.v;
	uint32_t all[64];
	for (uint32_t q = 0; q < x->nq; q++)
		all[q] = q;
	dw_expr par[2] = {dw_par(0, 1.0), dw_par(1, 1.0)};
	bool merge = n >= 3 && v[0].group == v[n - 1].group && v[0].term == v[n - 1].term;
	if (!merge) {
		dw_builder *b = dw_begin(x->c, "trotter_step", x->nq, 2, DW_STAGE_NONE);
		emit_items(x, b, 0, n, -1);
		uint32_t step = dw_end(b, x->e);
		if (step == DW_NO_DEF)
			return DW_NO_DEF;
		b = dw_begin(x->c, "segment", x->nq, 2, DW_STAGE_NONE);
		dw_call(b, step, all, par, (uint64_t)r);
		return dw_end(b, x->e);
	}
	/* head, (middle + joined ends) x (r-1), middle + tail */
	uint32_t body = DW_NO_DEF;
	if (r > 1) {
		dw_builder *b = dw_begin(x->c, "trotter_step", x->nq, 2, DW_STAGE_NONE);
		emit_items(x, b, 1, n, v[0].frac + v[n - 1].frac);
		body = dw_end(b, x->e);
		if (body == DW_NO_DEF)
			return DW_NO_DEF;
	}
	/* the tail is the same for every segment: one shared definition, so
	 * the text stays small however many segments there are */
	dw_builder *tb = dw_begin(x->c, "trotter_tail", x->nq, 2, DW_STAGE_NONE);
	emit_items(x, tb, 1, n, -1);
	uint32_t tail = dw_end(tb, x->e);
	if (tail == DW_NO_DEF)
		return DW_NO_DEF;
	dw_builder *b = dw_begin(x->c, "segment", x->nq, 2, DW_STAGE_NONE);
	emit_items(x, b, 0, 1, -1);
	if (r > 1)
		dw_call(b, body, all, par, (uint64_t)(r - 1));
	dw_call(b, tail, all, par, 1);
	return dw_end(b, x->e);
}

static int build_circuit(ctx *x)
{
	dw_program *pg = x->prog;
	const dw_problem *p = pg->problem;
	dw_error *e = x->e;
	bool ind = p->variant == 'I';
	uint32_t sys0 = ind ? 2 : 1;
	uint32_t n = (uint32_t)p->n;

	uint32_t prep = dw_stateprep_def(x->c, p, e);
	if (prep == DW_NO_DEF)
		return e->status;
	/* V = [h_sgn] U_b on (sgn, sys) */
	uint32_t vargs = n + (ind ? 1 : 0);
	dw_builder *b = dw_begin(x->c, "prep_v", vargs, 0, DW_STAGE_STATE_PREP);
	uint32_t sq[64];
	for (uint32_t k = 0; k < n; k++)
		sq[k] = k + (ind ? 1 : 0);
	if (ind)
		dw_g1(b, DW_G_H, 0);
	dw_call(b, prep, sq, NULL, 1);
	uint32_t V = dw_end(b, e);
	if (V == DW_NO_DEF)
		return e->status;
	uint32_t Vinv = dw_inverse(x->c, V, e);
	uint32_t mcz = dw_mcz_def(x->c, x->nq, p->uncompute == DW_UNCOMPUTE_MEASURE, e);
	if (Vinv == DW_NO_DEF || mcz == DW_NO_DEF)
		return e->status;
	uint32_t rest[64], all[64];
	for (uint32_t q = 0; q < x->nq; q++)
		all[q] = q;
	for (uint32_t q = 1; q < x->nq; q++)
		rest[q - 1] = q;
	b = dw_begin(x->c, "reflect", x->nq, 0, DW_STAGE_REFLECTION);
	dw_call(b, Vinv, rest, NULL, 1);
	for (uint32_t q = 1; q < x->nq; q++)
		dw_g1(b, DW_G_X, q);
	dw_call(b, mcz, all, NULL, 1);
	for (uint32_t q = 1; q < x->nq; q++)
		dw_g1(b, DW_G_X, q);
	dw_call(b, V, rest, NULL, 1);
	x->reflect = dw_end(b, e);
	if (x->reflect == DW_NO_DEF)
		return e->status;

	x->rot = calloc(pg->nterms ? pg->nterms : 1, sizeof *x->rot);
	if (!x->rot)
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	for (size_t k = 0; k < pg->nterms; k++) {
		if (!pg->terms[k].pauli) {
			x->rot[k] = pg->terms[k].def;
			continue;
		}
		x->rot[k] = dw_pauli_rotation_def(x->c, pg->terms[k].p, e);
		if (x->rot[k] == DW_NO_DEF)
			return e->status;
	}

	/* start: [x sgn] V, so that (with h) sgn holds |-> */
	b = dw_begin(x->c, "start", vargs, 0, DW_STAGE_STATE_PREP);
	uint32_t vq[64];
	for (uint32_t k = 0; k < vargs; k++)
		vq[k] = k;
	if (ind)
		dw_g1(b, DW_G_X, 0);
	dw_call(b, V, vq, NULL, 1);
	uint32_t start = dw_end(b, e);
	if (start == DW_NO_DEF)
		return e->status;

	b = dw_begin(x->c, "main", x->nq, 0, DW_STAGE_NONE);
	dw_call(b, start, rest, NULL, 1);
	pg->first_segment_op = 1;
	/* segment definitions, one per distinct r (memo in a small table) */
	int64_t *rs = NULL;
	uint32_t *defs = NULL;
	size_t nr = 0;
	int rc = DW_OK;
	for (int64_t j = 0; j < pg->sched.q && rc == DW_OK; j++) {
		const dw_segment *sg = &pg->sched.seg[j];
		uint32_t d = DW_NO_DEF;
		for (size_t i = 0; i < nr; i++)
			if (rs[i] == sg->steps)
				d = defs[i];
		if (d == DW_NO_DEF) {
			d = segment_def(x, sg->steps);
			if (d == DW_NO_DEF) {
				rc = e->status;
				break;
			}
			int64_t *nrs = realloc(rs, (nr + 1) * sizeof *rs);
			uint32_t *nd = nrs ? realloc(defs, (nr + 1) * sizeof *defs) : NULL;
			if (!nrs || !nd) {
				if (nrs)
					rs = nrs;
				rc = dw_fail(e, DW_EINTERNAL, "out of memory");
				break;
			}
			rs = nrs;
			defs = nd;
			rs[nr] = sg->steps;
			defs[nr++] = d;
		}
		double dt = sg->dwell / (double)sg->steps;
		dw_expr par[2] = {dw_const((1 - sg->s) * dt), dw_const(sg->s * dt)};
		dw_call(b, d, all, par, 1);
	}
	free(rs);
	free(defs);
	if (rc) {
		dw_end(b, NULL);
		return rc;
	}
	(void)sys0;
	pg->top = dw_end(b, e);
	return pg->top == DW_NO_DEF ? e->status : DW_OK;
}

int dw_program_build(const dw_problem *p, uint32_t instance, dw_program *out,
	dw_error *e)
{
	memset(out, 0, sizeof *out);
	out->problem = p;
	out->instance = instance;
	out->order = p->order;
	if (!p->analysed)
		return dw_fail(e, DW_EINTERNAL, "internal: problem not analysed");
	bool ind = p->variant == 'I';
	out->nqubits = 1u + (ind ? 1u : 0u) + (uint32_t)p->n;
	if (out->nqubits > 62)
		return dw_fail(e, DW_EINPUT, "%s: %d system qubits is more than this lowering "
			"supports (60)", p->path, p->n);
	int r = 0;
	snprintf(out->reg[r].name, sizeof out->reg[r].name, "anc");
	out->reg[r].offset = 0;
	out->reg[r++].size = 1;
	if (ind) {
		snprintf(out->reg[r].name, sizeof out->reg[r].name, "sgn");
		out->reg[r].offset = 1;
		out->reg[r++].size = 1;
	}
	snprintf(out->reg[r].name, sizeof out->reg[r].name, "sys");
	out->reg[r].offset = ind ? 2 : 1;
	out->reg[r++].size = (uint32_t)p->n;
	out->nreg = r;

	dw_error_budget_split(p, &out->budget);
	out->circ = dw_circuit_new();
	if (!out->circ)
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	if (build_terms(out, e))
		return e->status;
	uint64_t seed = p->seed + (uint64_t)instance - 1;
	if (dw_schedule_build(p, out->budget.path, seed, &out->sched, e))
		return e->status;

	ctx x = {0};
	x.prog = out;
	x.nq = out->nqubits;
	x.e = e;
	if (dw_formula_items((uint32_t)out->nterms, p->order, &x.items, e))
		return e->status;
	dw_bound bound;
	if (dw_formula_bound_prepare(out->terms, (uint32_t)out->nterms, p->order,
		p->bound, &bound, e)) {
		free(x.items.v);
		return e->status;
	}
	if (p->formula_steps > 0)
		snprintf(out->bound_used, sizeof out->bound_used, "given");
	else
		snprintf(out->bound_used, sizeof out->bound_used, "%s", bound.name);
	int rc = DW_OK;
	for (int64_t j = 0; j < out->sched.q; j++) {
		dw_segment *sg = &out->sched.seg[j];
		sg->eps = out->sched.time_drawn > 0
			? out->budget.split * sg->dwell / out->sched.time_drawn : 0;
		if (p->formula_steps > 0) {
			sg->steps = p->formula_steps;
		} else {
			sg->steps = dw_formula_steps(&bound, sg->s, sg->dwell, sg->eps);
			if (sg->steps < 0) {
				rc = dw_fail(e, DW_EINPUT, "%s: formula: segment %lld needs more "
					"than 2^60 steps", p->path, (long long)j + 1);
				break;
			}
		}
		sg->bound = (double)sg->steps *
			dw_formula_step_bound(&bound, sg->s, sg->dwell / (double)sg->steps);
		int of = 0;
		out->steps_total = dw_add_sat(out->steps_total, (uint64_t)sg->steps, &of);
	}
	if (rc == DW_OK) {
		x.c = out->circ;
		rc = build_circuit(&x);
	}
	free(x.items.v);
	free(x.rot);
	if (rc)
		return rc;
	if (p->gates == DW_GATES_CLIFFORD_T && dw_lower_clifford_t(out, e))
		return e->status;
	/* the work register: the top's ancilla pool */
	out->nwork = out->circ->defs[out->top].pool;
	if (out->nwork) {
		snprintf(out->reg[out->nreg].name, sizeof out->reg[0].name, "work");
		out->reg[out->nreg].offset = out->nqubits;
		out->reg[out->nreg++].size = out->nwork;
	}
	return DW_OK;
}

void dw_program_free(dw_program *pg)
{
	if (!pg)
		return;
	dw_circuit_free(pg->circ);
	free(pg->sched.seg);
	free(pg->terms);
	memset(pg, 0, sizeof *pg);
}
