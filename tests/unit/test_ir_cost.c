/* test_ir_cost.c - hierarchical costs equal brute-force counts of the
 * flattened program, on random nested circuits with loops, ancillas and
 * stages; hash-consing shares identical definitions; inverses undo. */
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"
#include "check.h"

static uint64_t rng = 0x9E3779B97F4A7C15ULL;
static uint64_t next(void)
{
	rng ^= rng << 13;
	rng ^= rng >> 7;
	rng ^= rng << 17;
	return rng;
}
static uint32_t pick(uint32_t n) { return (uint32_t)(next() % n); }

typedef struct brute {
	uint64_t gates[DW_G_COUNT];
	uint64_t cond;
	int64_t *t, *tt, *ts;
	dw_stage st;
	double rot_w;
} brute;

static int visit(const dw_walk_gate *g, void *ctx)
{
	brute *b = ctx;
	const dw_gate_info *gi = &dw_gates[g->gate];
	b->gates[g->gate]++;
	if (g->cond)
		b->cond++;
	int64_t m = 0, mt = 0, ms = 0;
	uint32_t wires[4];
	int nw = gi->nqubits;
	for (int i = 0; i < nw; i++)
		wires[i] = g->qubits[i];
	if (g->cond) {
		bool dup = false;
		for (int i = 0; i < gi->nqubits; i++)
			dup |= wires[i] == g->cond_qubit;
		if (!dup)
			wires[nw++] = g->cond_qubit;
	}
	for (int i = 0; i < nw; i++) {
		uint32_t q = wires[i];
		if (b->t[q] > m) m = b->t[q];
		if (b->tt[q] > mt) mt = b->tt[q];
		if (b->ts[q] > ms) ms = b->ts[q];
	}
	int64_t wt = (gi->flags & DW_GF_ROTATION) ? (int64_t)ceil(b->rot_w) : gi->t_depth;
	int64_t ws = g->stage == b->st ? 1 : 0;
	for (int i = 0; i < nw; i++) {
		uint32_t q = wires[i];
		b->t[q] = m + 1;
		b->tt[q] = mt + wt;
		b->ts[q] = ms + ws;
	}
	return 0;
}

static int64_t maxof(const int64_t *a, size_t n)
{
	int64_t m = 0;
	for (size_t i = 0; i < n; i++)
		if (a[i] > m) m = a[i];
	return m;
}

static const dw_gate pool1[] = {DW_G_H, DW_G_X, DW_G_T, DW_G_TDG, DW_G_S, DW_G_RZ, DW_G_RY};
static const dw_gate pool2[] = {DW_G_CX, DW_G_CZ, DW_G_SWAP};

/* A random definition on nargs qubits calling earlier ones. */
static uint32_t random_def(dw_circuit *c, uint32_t *made, size_t nmade, dw_error *e)
{
	uint32_t nargs = 2 + pick(4);
	dw_stage st = (dw_stage)pick(DW_STAGE_COUNT);
	dw_builder *b = dw_begin(c, "rand", nargs, 1, st);
	uint32_t nanc = pick(3);
	dw_add_ancillas(b, nanc);
	uint32_t nq = nargs + nanc;
	int nops = 1 + (int)pick(8);
	for (int i = 0; i < nops; i++) {
		uint32_t kind = pick(4);
		if (kind == 0 && nmade) {
			uint32_t callee = made[pick((uint32_t)nmade)];
			const dw_def *cd = &c->defs[callee];
			if (cd->nargs <= nq) {
				uint32_t q[16];
				/* a random injective map */
				uint32_t perm[16];
				for (uint32_t k = 0; k < nq; k++) perm[k] = k;
				for (uint32_t k = nq - 1; k > 0; k--) {
					uint32_t j = pick(k + 1), t = perm[k];
					perm[k] = perm[j];
					perm[j] = t;
				}
				for (uint32_t k = 0; k < cd->nargs; k++) q[k] = perm[k];
				dw_expr px = dw_par(0, 0.5);
				px.c0 = 0.25;
				dw_call(b, callee, q, &px, 1 + pick(3) * (pick(2) ? 1 : 7));
				continue;
			}
		}
		if (kind == 3 && pick(3) == 0) {
			/* measure a qubit, then a classically controlled cz / x */
			uint32_t bit = dw_add_bits(b, 1);
			uint32_t mq = pick(nq), a = pick(nq), bq = (a + 1) % nq;
			dw_measure(b, mq, bit);
			uint32_t two[2] = {a, bq};
			if (pick(2))
				dw_cond_gate(b, bit, DW_G_CZ, two);
			else
				dw_cond_gate(b, bit, DW_G_X, &a);
			continue;
		}
		if (kind == 1) {
			uint32_t a = pick(nq), bq = pick(nq);
			if (a == bq) bq = (a + 1) % nq;
			dw_g2(b, pool2[pick(3)], a, bq);
		} else if (kind == 2 && nq >= 3) {
			uint32_t a = pick(nq), bq = (a + 1) % nq, cq = (a + 2) % nq;
			dw_g3(b, DW_G_CCX, a, bq, cq);
		} else {
			dw_gate g = pool1[pick(7)];
			if (dw_gates[g].nangles)
				dw_r1(b, g, pick(nq), dw_par(0, 1.5));
			else
				dw_g1(b, g, pick(nq));
		}
	}
	return dw_end(b, e);
}

static void compare(dw_circuit *c, uint32_t top)
{
	dw_error e = {0};
	uint32_t nq = dw_def_qubits(c, top);
	uint32_t *map = malloc(nq * sizeof *map);
	for (uint32_t i = 0; i < nq; i++) map[i] = i;
	double par = 0.3;
	for (int s = 0; s < DW_STAGE_COUNT; s++) {
		brute b;
		memset(&b, 0, sizeof b);
		b.t = calloc(nq, sizeof *b.t);
		b.tt = calloc(nq, sizeof *b.tt);
		b.ts = calloc(nq, sizeof *b.ts);
		b.st = (dw_stage)s;
		b.rot_w = c->t_weight_rotation;
		CHECK(dw_walk(c, top, map, &par, visit, &b) == 0, "walk");
		dw_figures f, fs;
		CHECK(dw_cost_figures(c, top, &f, &e) == 0, "%s", e.msg);
		CHECK(dw_cost_stage_figures(c, top, (dw_stage)s, &fs, &e) == 0, "%s", e.msg);
		if (s == 0) {
			for (int g = 0; g < DW_G_COUNT; g++)
				CHECK(f.gates[g] == b.gates[g], "gate %s: %llu vs %llu",
					dw_gates[g].name, (unsigned long long)f.gates[g],
					(unsigned long long)b.gates[g]);
			CHECK(f.depth == maxof(b.t, nq), "depth %lld vs %lld",
				(long long)f.depth, (long long)maxof(b.t, nq));
			CHECK(f.t_depth == maxof(b.tt, nq), "t_depth %lld vs %lld",
				(long long)f.t_depth, (long long)maxof(b.tt, nq));
			CHECK(!f.saturated, "not saturated");
			CHECK(f.cond_count == b.cond, "classically controlled %llu vs %llu",
				(unsigned long long)f.cond_count, (unsigned long long)b.cond);
		}
		CHECK(fs.depth == maxof(b.ts, nq), "stage %s depth %lld vs %lld",
			dw_stage_names[s], (long long)fs.depth, (long long)maxof(b.ts, nq));
		free(b.t);
		free(b.tt);
		free(b.ts);
	}
	/* stage counts add up to the totals */
	dw_figures f, fs;
	uint64_t sum = 0;
	dw_cost_figures(c, top, &f, &e);
	for (int s = 0; s < DW_STAGE_COUNT; s++) {
		dw_cost_stage_figures(c, top, (dw_stage)s, &fs, &e);
		sum += fs.gate_count;
	}
	CHECK(sum == f.gate_count, "stage gate counts sum %llu vs %llu",
		(unsigned long long)sum, (unsigned long long)f.gate_count);
	free(map);
}

static void test_random(void)
{
	int compared = 0;
	for (int trial = 0; trial < 60; trial++) {
		dw_circuit *c = dw_circuit_new();
		c->t_weight_rotation = (double)(trial % 5) * 3.5;
		dw_error e = {0};
		uint32_t made[12];
		size_t nmade = 0;
		for (int i = 0; i < 12; i++) {
			uint32_t id = random_def(c, made, nmade, &e);
			CHECK(id != DW_NO_DEF, "%s", e.msg);
			if (id != DW_NO_DEF) made[nmade++] = id;
		}
		dw_figures f;
		CHECK(dw_cost_figures(c, made[nmade - 1], &f, &e) == 0, "%s", e.msg);
		if (f.gate_count <= 2000000) {
			compare(c, made[nmade - 1]);
			compared++;
		}
		dw_circuit_free(c);
	}
	CHECK(compared >= 40, "enough random programs compared: %d", compared);
}

static void test_hash_consing_and_loops(void)
{
	dw_circuit *c = dw_circuit_new();
	dw_error e = {0};
	dw_builder *b = dw_begin(c, "pair", 2, 1, DW_STAGE_TERM);
	dw_g2(b, DW_G_CX, 0, 1);
	dw_r1(b, DW_G_RZ, 1, dw_par(0, 2.0));
	dw_g2(b, DW_G_CX, 0, 1);
	uint32_t a = dw_end(b, &e);
	b = dw_begin(c, "other_name", 2, 1, DW_STAGE_TERM);
	dw_g2(b, DW_G_CX, 0, 1);
	dw_r1(b, DW_G_RZ, 1, dw_par(0, 2.0));
	dw_g2(b, DW_G_CX, 0, 1);
	uint32_t a2 = dw_end(b, &e);
	CHECK(a == a2, "identical definitions are shared (%u, %u)", a, a2);
	CHECK(c->ndefs == 1, "one definition, got %zu", c->ndefs);
	/* a loop of 10^12 calls costs without expansion */
	b = dw_begin(c, "big", 2, 0, DW_STAGE_NONE);
	uint32_t q[2] = {0, 1};
	dw_expr p = dw_const(0.1);
	dw_call(b, a, q, &p, 1000000000000ULL);
	uint32_t big = dw_end(b, &e);
	dw_figures f;
	CHECK(dw_cost_figures(c, big, &f, &e) == 0, "%s", e.msg);
	CHECK(f.gates[DW_G_CX] == 2000000000000ULL, "cx %llu", (unsigned long long)f.gates[DW_G_CX]);
	CHECK(f.depth == 3000000000000LL, "depth %lld", (long long)f.depth);
	/* saturation instead of wrap-around */
	b = dw_begin(c, "huge", 2, 0, DW_STAGE_NONE);
	dw_call(b, big, q, NULL, 100000000000ULL);
	uint32_t huge = dw_end(b, &e);
	CHECK(dw_cost_figures(c, huge, &f, &e) == 0, "%s", e.msg);
	CHECK(f.saturated, "saturation flagged");
	CHECK(f.gates[DW_G_CX] == UINT64_MAX, "saturated at 2^64-1");
	/* inverse of the inverse is the original */
	uint32_t inv = dw_inverse(c, a, &e);
	CHECK(inv != DW_NO_DEF && dw_inverse(c, inv, &e) == a, "inverse pairs");
	CHECK(c->defs[inv].ex[0].c[0] == -2.0, "negated angle");
	dw_circuit_free(c);
}

int main(void)
{
	test_random();                 /* max-plus matrices (small definitions) */
	dw_cost_set_matrix_limit(0);   /* front vectors and loop settling */
	test_random();
	test_hash_consing_and_loops();
	dw_cost_set_matrix_limit(40);
	test_hash_consing_and_loops();
	return check_done();
}
