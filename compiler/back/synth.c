/* synth.c - approximate rz(theta) by a Clifford+T sequence (synth.h), and a
 * cache of results by (theta, eps).
 *
 * Takes: theta, eps.  Gives: gates in circuit order with T-count and error.
 *
 * Driver of the method of "Optimal ancilla-free Clifford+T approximation of
 * z-rotations" (QIC 16(11&12), 2016): for k = 0, 1, 2, ... enumerate the
 * grid candidates u = a / sqrt2^k (grid_solve.c) with a not divisible by
 * sqrt2, keep those with |u| <= 1, |u_bullet| <= 1 (exact, in Z[sqrt2])
 * and u in the eps-region (MPFR), solve t^dagger t = 1 - u^dagger u
 * (norm_eq.c; a candidate whose norm cannot be factored within the effort
 * bound is skipped), and synthesise U = [[u, -t^dagger], [t, u^dagger]]
 * exactly (exact_synth.c).  The first success fixes the least denominator
 * exponent reachable with the factoring effort (T-count about 2k); a few
 * more solutions at that exponent are compared.  The search is run for
 * rz(theta) and for rz(theta - pi/4) followed by T (the other class up to
 * global phase) and the lower T-count is kept.  Angles within eps of a
 * multiple of pi/4 are answered by T^m directly. */
#include "dwell/synth.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <mpfr.h>

#include "back/exact_synth.h"
#include "back/grid_solve.h"
#include "back/norm_eq.h"

const char *dw_sq_gate_name(dw_sq_gate g)
{
	switch (g) {
	case DW_SQ_H: return "h";
	case DW_SQ_S: return "s";
	case DW_SQ_SDG: return "sdg";
	case DW_SQ_T: return "t";
	case DW_SQ_TDG: return "tdg";
	case DW_SQ_X: return "x";
	case DW_SQ_Y: return "y";
	case DW_SQ_Z: return "z";
	}
	return "?";
}

void dw_synth_defaults(dw_synth_options *opt)
{
	opt->factor_effort = 4000;
	opt->extra_solutions = 3;
	opt->max_denom_exp = 0;
}

void dw_synth_result_free(dw_synth_result *r)
{
	if (!r)
		return;
	free(r->gates);
	memset(r, 0, sizeof *r);
}

/* phase normalised to (-pi, pi] */
static double norm_phase(double phi)
{
	const double pi = acos(-1.0);
	phi = fmod(phi, 2 * pi);
	if (phi > pi)
		phi -= 2 * pi;
	if (phi <= -pi)
		phi += 2 * pi;
	return phi;
}

/* theta within eps of m pi/4: rz(m pi/4) = e^{-i m pi/8} T^m */
static int try_pi4_multiple(double theta, double eps, dw_synth_result *out,
	dw_error *err)
{
	mpfr_t q, pi, d;
	mpfr_inits2(256, q, pi, d, (mpfr_ptr)0);
	mpfr_const_pi(pi, MPFR_RNDN);
	mpfr_set_d(q, theta, MPFR_RNDN);
	mpfr_mul_ui(q, q, 4, MPFR_RNDN);
	mpfr_div(q, q, pi, MPFR_RNDN);
	mpfr_round(q, q);
	long m = mpfr_get_si(q, MPFR_RNDN);
	/* d = 2 sin(|theta - m pi/4| / 4) */
	mpfr_mul(d, q, pi, MPFR_RNDN);
	mpfr_div_ui(d, d, 4, MPFR_RNDN);
	mpfr_sub_d(d, d, theta, MPFR_RNDN);
	mpfr_abs(d, d, MPFR_RNDN);
	mpfr_div_ui(d, d, 4, MPFR_RNDN);
	mpfr_sin(d, d, MPFR_RNDN);
	mpfr_mul_ui(d, d, 2, MPFR_RNDN);
	double e = mpfr_get_d(d, MPFR_RNDU);
	mpfr_clears(q, pi, d, (mpfr_ptr)0);
	if (!(e <= eps) || !mpfr_fits_slong_p(q, MPFR_RNDN))
		return 0;
	static const dw_sq_gate table[8][2] = {
		{0, 0}, {DW_SQ_T, 0}, {DW_SQ_S, 0}, {DW_SQ_S, DW_SQ_T},
		{DW_SQ_Z, 0}, {DW_SQ_Z, DW_SQ_T}, {DW_SQ_SDG, 0}, {DW_SQ_TDG, 0}};
	static const int len[8] = {0, 1, 1, 2, 1, 2, 1, 1};
	int r = (int)(((m % 8) + 8) % 8);
	out->gates = dw_alloc(err, 2, sizeof *out->gates);
	if (!out->gates)
		return -1;
	for (int i = 0; i < len[r]; i++)
		out->gates[i] = table[r][i];
	out->count = (size_t)len[r];
	out->t_count = (r % 2) ? 1 : 0;
	out->error = e;
	out->global_phase = norm_phase(-(double)(m % 16) * acos(-1.0) / 8);
	out->denom_exp = 0;
	out->candidates = 0;
	return 1;
}

typedef struct search_ctx {
	dw_grid *grid;
	int shift;                  /* 1: approximate rz(theta - pi/4), then T */
	int k;
	uint32_t effort;
	uint32_t candidates;
	int found;
	uint32_t solutions;         /* solved candidates at the current k */
	uint32_t extra;             /* further solutions to try at that k */
	int failed;
	dw_error *err;
	dw_synth_result *out;
} search_ctx;

static int visit_candidate(const dw_zomega *a, void *user)
{
	search_ctx *c = user;
	if (c->k > 0 && dw_zw_div_by_sqrt2(a))
		return 0;                   /* seen at a smaller exponent */
	dw_zroot2 sq, sqb, xi, pk;
	dw_zomega t, ad;
	dw_zr2_init(&sq);
	dw_zr2_init(&sqb);
	dw_zr2_init(&xi);
	dw_zr2_init(&pk);
	dw_zw_init(&t);
	dw_zw_init(&ad);
	int stop = 0;
	/* |a|^2 <= 2^k and |a_bullet|^2 <= 2^k, exactly */
	dw_zw_sqnorm(&sq, a);
	dw_zr2_bullet(&sqb, &sq);
	mpz_set_ui(pk.a, 1);
	mpz_mul_2exp(pk.a, pk.a, (mp_bitcnt_t)c->k);
	mpz_set_ui(pk.b, 0);
	dw_zr2_sub(&xi, &pk, &sq);
	dw_zr2_sub(&sqb, &pk, &sqb);
	if (dw_zr2_sign(&xi) < 0 || dw_zr2_sign(&sqb) < 0)
		goto done;
	if (!dw_grid_in_region(c->grid, a, c->k))
		goto done;
	c->candidates++;
	if (dw_norm_solve(&t, &xi, c->effort) != DW_NORM_SOLVED)
		goto done;
	{
		dw_dmat2 u;
		dw_dmat2_init(&u);
		dw_dw_set_zw(&u.e[0][0], a, c->k);
		dw_zw_conj(&ad, a);
		dw_dw_set_zw(&u.e[1][1], &ad, c->k);
		dw_dw_set_zw(&u.e[1][0], &t, c->k);
		dw_zw_conj(&ad, &t);
		dw_zw_neg(&ad, &ad);
		dw_dw_set_zw(&u.e[0][1], &ad, c->k);
		if (c->shift) {
			/* rz(theta) = rz(theta - pi/4) rz(pi/4)
			 *           = e^{-i pi/8} rz(theta - pi/4) T */
			dw_dmat2 tg;
			dw_dmat2_init(&tg);
			dw_dmat2_gate(&tg, DW_SQ_T);
			dw_dmat2_mul(&u, &u, &tg);
			dw_dmat2_clear(&tg);
		}
		int phase = 0;
		dw_sq_gate *gates = NULL;
		size_t n = 0;
		if (dw_exact_synth(&u, &gates, &n, &phase, c->err) != DW_OK) {
			c->failed = 1;
			stop = 1;
		} else {
			uint32_t tc = 0;
			for (size_t i = 0; i < n; i++)
				tc += gates[i] == DW_SQ_T || gates[i] == DW_SQ_TDG;
			if (!c->found || tc < c->out->t_count) {
				free(c->out->gates);
				c->out->gates = gates;
				c->out->count = n;
				c->out->t_count = tc;
				c->out->error = dw_grid_error(c->grid, a, c->k);
				c->out->global_phase = norm_phase(phase * acos(-1.0) / 4
					- c->shift * acos(-1.0) / 8);
				c->out->denom_exp = c->k;
				c->found = 1;
			} else {
				free(gates);
			}
			/* at exponent k the T-count is at least 2k - 2 (2k - 3 with
			 * the extra T): no better candidate can follow */
			long floor_t = 2L * c->k - 2 - c->shift;
			c->solutions++;
			if (c->solutions > c->extra || (long)c->out->t_count <= floor_t)
				stop = 1;
		}
		dw_dmat2_clear(&u);
	}
done:
	dw_zr2_clear(&sq);
	dw_zr2_clear(&sqb);
	dw_zr2_clear(&xi);
	dw_zr2_clear(&pk);
	dw_zw_clear(&t);
	dw_zw_clear(&ad);
	return stop;
}

/* One search over k = 0 .. kmax for the target rz(theta - shift pi/4). */
static int search(double theta, int shift, double eps, const dw_synth_options *opt,
	int kmax, dw_synth_result *out, int *found, uint32_t *candidates, dw_error *err)
{
	dw_grid *grid = NULL;
	int st = dw_grid_create(&grid, theta, shift, eps, err);
	if (st != DW_OK)
		return st;
	search_ctx c = {grid, shift, 0, opt->factor_effort, 0, 0, 0, opt->extra_solutions,
		0, err, out};
	for (int k = 0; k <= kmax && !c.found && !c.failed; k++) {
		c.k = k;
		int lr = dw_grid_level(grid, k, 2000000, visit_candidate, &c);
		if (lr < 0 && !c.found) {
			dw_grid_destroy(grid);
			return dw_fail(err, DW_EINTERNAL,
				"synth: too many grid points at exponent %d (angle %.17g, eps %g)",
				k, theta, eps);
		}
	}
	*candidates += c.candidates;
	dw_grid_destroy(grid);
	if (c.failed)
		return err && err->status ? err->status : DW_EINTERNAL;
	*found = c.found;
	return DW_OK;
}

int dw_synth_rz_opt(double theta, double eps, const dw_synth_options *opt,
	dw_synth_result *out, dw_error *err)
{
	memset(out, 0, sizeof *out);
	if (!isfinite(theta))
		return dw_fail(err, DW_EINPUT, "synth: angle must be finite");
	if (!(eps >= 1e-30) || !(eps < 1))
		return dw_fail(err, DW_EINPUT, "synth: precision %g outside [1e-30, 1)", eps);
	dw_synth_options defaults;
	if (!opt) {
		dw_synth_defaults(&defaults);
		opt = &defaults;
	}
	int r = try_pi4_multiple(theta, eps, out, err);
	if (r < 0)
		return DW_EINTERNAL;
	if (r > 0)
		return DW_OK;

	int kmax = opt->max_denom_exp > 0 ? opt->max_denom_exp
		: (int)(2.0 * log2(1.0 / eps)) + 40;
	/* Two searches: U ~ rz(theta) directly, and U ~ rz(theta - pi/4)
	 * followed by T (the other class up to global phase); the smaller
	 * T-count wins.  The second search stops at the first one's exponent. */
	dw_synth_result best;
	memset(&best, 0, sizeof best);
	int have = 0;
	uint32_t candidates = 0;
	for (int shift = 0; shift < 2; shift++) {
		dw_synth_result res;
		memset(&res, 0, sizeof res);
		int found = 0;
		/* with the appended T, exponent k costs at least 2k - 3 T: only
		 * k <= (best + 2) / 2 can still win */
		int limit = have ? (int)((best.t_count + 2) / 2) : kmax;
		int st = search(theta, shift, eps, opt, limit, &res, &found, &candidates, err);
		if (st != DW_OK) {
			dw_synth_result_free(&res);
			dw_synth_result_free(&best);
			return st;
		}
		if (found && (!have || res.t_count < best.t_count)) {
			dw_synth_result_free(&best);
			best = res;
			have = 1;
		} else {
			dw_synth_result_free(&res);
		}
	}
	if (!have)
		return dw_fail(err, DW_EINTERNAL,
			"synth: no solution up to exponent %d (angle %.17g, eps %g)",
			kmax, theta, eps);
	*out = best;
	out->candidates = candidates;
	return DW_OK;
}

int dw_synth_rz(double theta, double eps, dw_synth_result *out, dw_error *err)
{
	return dw_synth_rz_opt(theta, eps, NULL, out, err);
}

/* ---------------- cache ---------------- */

typedef struct cache_slot {
	uint64_t theta_bits, eps_bits;
	int used;
	dw_synth_result *res;       /* own allocation: stays put when the
	                               table grows */
} cache_slot;

struct dw_synth_cache {
	cache_slot *slot;
	size_t cap, size, hits;
};

static uint64_t bits_of(double x)
{
	uint64_t b;
	if (x == 0)
		x = 0;                      /* -0 and +0 share an entry */
	memcpy(&b, &x, sizeof b);
	return b;
}

static size_t slot_hash(uint64_t a, uint64_t b, size_t cap)
{
	uint64_t h = a * 0x9e3779b97f4a7c15ULL ^ (b + 0x632be59bd9b4e019ULL);
	h ^= h >> 29;
	h *= 0xbf58476d1ce4e5b9ULL;
	h ^= h >> 32;
	return (size_t)(h & (cap - 1));
}

dw_synth_cache *dw_synth_cache_create(dw_error *err)
{
	dw_synth_cache *c = dw_alloc(err, 1, sizeof *c);
	if (!c)
		return NULL;
	c->cap = 64;
	c->slot = dw_alloc(err, c->cap, sizeof *c->slot);
	if (!c->slot) {
		free(c);
		return NULL;
	}
	return c;
}

void dw_synth_cache_destroy(dw_synth_cache *c)
{
	if (!c)
		return;
	for (size_t i = 0; i < c->cap; i++)
		if (c->slot[i].used) {
			dw_synth_result_free(c->slot[i].res);
			free(c->slot[i].res);
		}
	free(c->slot);
	free(c);
}

static cache_slot *cache_find(dw_synth_cache *c, uint64_t tb, uint64_t eb)
{
	size_t i = slot_hash(tb, eb, c->cap);
	while (c->slot[i].used && !(c->slot[i].theta_bits == tb && c->slot[i].eps_bits == eb))
		i = (i + 1) & (c->cap - 1);
	return &c->slot[i];
}

static int cache_grow(dw_synth_cache *c, dw_error *err)
{
	if (c->cap > SIZE_MAX / 4)
		return dw_fail(err, DW_EINTERNAL, "synth cache: too many entries");
	cache_slot *old = c->slot;
	size_t oldcap = c->cap;
	c->slot = dw_alloc(err, oldcap * 2, sizeof *c->slot);
	if (!c->slot) {
		c->slot = old;
		return DW_EINTERNAL;
	}
	c->cap = oldcap * 2;
	for (size_t i = 0; i < oldcap; i++)
		if (old[i].used)
			*cache_find(c, old[i].theta_bits, old[i].eps_bits) = old[i];
	free(old);
	return DW_OK;
}

int dw_synth_cache_rz(dw_synth_cache *c, double theta, double eps,
	const dw_synth_result **out, dw_error *err)
{
	uint64_t tb = bits_of(theta), eb = bits_of(eps);
	cache_slot *s = cache_find(c, tb, eb);
	if (s->used) {
		c->hits++;
		*out = s->res;
		return DW_OK;
	}
	if (2 * (c->size + 1) > c->cap) {
		int st = cache_grow(c, err);
		if (st != DW_OK)
			return st;
		s = cache_find(c, tb, eb);
	}
	dw_synth_result *res = dw_alloc(err, 1, sizeof *res);
	if (!res)
		return DW_EINTERNAL;
	int st = dw_synth_rz(theta, eps, res, err);
	if (st != DW_OK) {
		free(res);
		return st;
	}
	s->used = 1;
	s->theta_bits = tb;
	s->eps_bits = eb;
	s->res = res;
	c->size++;
	*out = res;
	return DW_OK;
}

size_t dw_synth_cache_size(const dw_synth_cache *c)
{
	return c->size;
}

size_t dw_synth_cache_hits(const dw_synth_cache *c)
{
	return c->hits;
}
