/* test_grid_norm.c - the parts of rotation synthesis: the 1-D and 2-D grid
 * problems (grid_1d.c, grid_solve.c), factoring and the norm equation
 * (norm_eq.c).
 *
 * Outside references:
 *  - brute-force enumeration in long double over boxes that contain every
 *    solution (the definition of the problems);
 *  - for larger exponents, an independent enumeration of the same point set
 *    by the coset decomposition Z[omega] = Z[sqrt2][i] + w Z[sqrt2][i]
 *    (common practice: {1, w} is a Z[sqrt2]-basis and i = w^2) scanning real
 *    and imaginary parts, with no grid operator;
 *  - GMP's own multiplication and primality test for factoring;
 *  - splitting of rational primes in Z[sqrt2] and Z[omega] ("Optimal
 *    ancilla-free Clifford+T approximation of z-rotations", QIC 16(11&12),
 *    2016, the section on the Diophantine equation; small cases by hand). */
#include <complex.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gmp.h>
#include <mpfr.h>

#include "back/grid_solve.h"
#include "back/norm_eq.h"
#include "check.h"

typedef long double complex cld;

static uint64_t rng_state = 0x94d049bb133111ebULL;

static uint64_t rng_next(void)
{
	rng_state ^= rng_state << 13;
	rng_state ^= rng_state >> 7;
	rng_state ^= rng_state << 17;
	return rng_state;
}

static long double rng_unit(void)
{
	return (long double)(rng_next() >> 11) / 9007199254740992.0L;
}

/* ---------------- norm equation and factoring ---------------- */

static void test_factor(void)
{
	/* products of known primes (GMP's own primality test and mpz_mul as
	 * the reference) */
	static const unsigned long primes[] = {2, 3, 7, 1009, 65537, 999983, 2147483647UL};
	for (int it = 0; it < 50; it++) {
		mpz_t n, back, pe;
		mpz_inits(n, back, pe, NULL);
		mpz_set_ui(n, 1);
		for (int j = 0; j < 4; j++)
			mpz_mul_ui(n, n, primes[rng_next() % 7]);
		/* one large prime too */
		mpz_set_ui(pe, rng_next() | 1);
		mpz_nextprime(pe, pe);
		mpz_mul(n, n, pe);
		dw_factors f;
		dw_factors_init(&f);
		CHECK(dw_factor(&f, n, 100000) == 1, "factoring a smooth number");
		mpz_set_ui(back, 1);
		for (size_t i = 0; i < f.count; i++) {
			CHECK(mpz_probab_prime_p(f.prime[i], 30) > 0, "factor is prime");
			mpz_pow_ui(pe, f.prime[i], f.exp[i]);
			mpz_mul(back, back, pe);
		}
		CHECK(mpz_cmp(back, n) == 0, "factors multiply back");
		dw_factors_clear(&f);
		mpz_clears(n, back, pe, NULL);
	}
	/* a semiprime of two 40-bit primes needs Pollard rho */
	mpz_t p1, p2, n;
	mpz_inits(p1, p2, n, NULL);
	mpz_set_ui(p1, 1099511627791UL);
	mpz_nextprime(p1, p1);
	mpz_set_ui(p2, 1099511628211UL);
	mpz_nextprime(p2, p2);
	mpz_mul(n, p1, p2);
	dw_factors f;
	dw_factors_init(&f);
	CHECK(dw_factor(&f, n, 2000000) == 1 && f.count == 2, "rho splits a semiprime");
	dw_factors_clear(&f);
	mpz_clears(p1, p2, n, NULL);
}

static void test_norm_equation(void)
{
	dw_zomega t, s;
	dw_zroot2 xi, back;
	dw_zw_init(&t);
	dw_zw_init(&s);
	dw_zr2_init(&xi);
	dw_zr2_init(&back);
	/* t^dagger t = xi for xi = s^dagger s of random s */
	int solved = 0, tries = 0;
	for (int it = 0; it < 300; it++) {
		dw_zw_set_si(&s, (long)(rng_next() % 2001) - 1000, (long)(rng_next() % 2001) - 1000,
			(long)(rng_next() % 2001) - 1000, (long)(rng_next() % 2001) - 1000);
		if (dw_zw_is_zero(&s))
			continue;
		dw_zw_sqnorm(&xi, &s);
		tries++;
		int r = dw_norm_solve(&t, &xi, 200000);
		CHECK(r == DW_NORM_SOLVED, "norm equation solvable by construction");
		if (r == DW_NORM_SOLVED) {
			solved++;
			dw_zw_sqnorm(&back, &t);
			CHECK(dw_zr2_equal(&back, &xi), "t^dagger t = xi exactly");
		}
	}
	CHECK(solved == tries, "all %d solved", tries);
	/* splitting rules (paper, Diophantine section; and by hand):
	 * 3 = |1 + i sqrt2|^2, 5 = |2 + i|^2, 17 = |1 + 4i|^2 are sums of
	 * norms; 7 = (3 + sqrt2)(3 - sqrt2) with both factors inert in
	 * Z[omega], so t^dagger t = 7 has no solution; 2 + sqrt2 = |1 + w|^2 */
	static const long yes[][2] = {{3, 0}, {5, 0}, {17, 0}, {2, 1}, {49, 0}};
	for (int i = 0; i < 5; i++) {
		dw_zr2_set_si(&xi, yes[i][0], yes[i][1]);
		CHECK(dw_norm_solve(&t, &xi, 1000) == DW_NORM_SOLVED, "xi = %ld + %ld sqrt2 solvable",
			yes[i][0], yes[i][1]);
		dw_zw_sqnorm(&back, &t);
		CHECK(dw_zr2_equal(&back, &xi), "solution exact");
	}
	dw_zr2_set_si(&xi, 7, 0);
	CHECK(dw_norm_solve(&t, &xi, 1000) == DW_NORM_NO_SOLUTION, "7 is not a norm");
	dw_zr2_set_si(&xi, 3, 1);     /* 3 + sqrt2, norm 7 */
	CHECK(dw_norm_solve(&t, &xi, 1000) == DW_NORM_NO_SOLUTION, "3 + sqrt2 is not a norm");
	dw_zr2_set_si(&xi, 1, 1);     /* 1 + sqrt2: bullet negative */
	CHECK(dw_norm_solve(&t, &xi, 1000) == DW_NORM_NO_SOLUTION, "lambda not doubly positive");
	dw_zw_clear(&t);
	dw_zw_clear(&s);
	dw_zr2_clear(&xi);
	dw_zr2_clear(&back);
}

/* ---------------- grid problems against brute force ---------------- */

typedef struct seen_list {
	long v[4096][4];
	int n;
} seen_list;

static int collect1(const dw_zroot2 *x, void *user)
{
	seen_list *l = user;
	if (l->n < 4096) {
		l->v[l->n][0] = mpz_get_si(x->a);
		l->v[l->n][1] = mpz_get_si(x->b);
		l->n++;
	}
	return 0;
}

static int collect2(const dw_zomega *a, void *user)
{
	seen_list *l = user;
	if (l->n < 4096) {
		for (int i = 0; i < 4; i++)
			l->v[l->n][i] = mpz_get_si(a->c[i]);
		l->n++;
	}
	return 0;
}

static void test_grid1(void)
{
	static seen_list got;
	for (int it = 0; it < 200; it++) {
		long double x0 = (rng_unit() - 0.5L) * 40, lx = rng_unit() * 6;
		long double y0 = (rng_unit() - 0.5L) * 40, ly = rng_unit() * 6;
		mpfr_t a0, a1, b0, b1;
		mpfr_inits2(128, a0, a1, b0, b1, (mpfr_ptr)0);
		mpfr_set_ld(a0, x0, MPFR_RNDN);
		mpfr_set_ld(a1, x0 + lx, MPFR_RNDN);
		mpfr_set_ld(b0, y0, MPFR_RNDN);
		mpfr_set_ld(b1, y0 + ly, MPFR_RNDN);
		got.n = 0;
		CHECK(dw_grid1_solve(a0, a1, b0, b1, 100000, collect1, &got) == 0, "1-D grid ran");
		/* brute force over a box that contains every solution */
		int want = 0;
		long double r2 = sqrtl(2.0L);
		for (long a = -60; a <= 60; a++)
			for (long b = -60; b <= 60; b++) {
				long double v = a + b * r2, w = a - b * r2;
				if (v >= x0 && v <= x0 + lx && w >= y0 && w <= y0 + ly) {
					want++;
					int found = 0;
					for (int i = 0; i < got.n; i++)
						found |= got.v[i][0] == a && got.v[i][1] == b;
					CHECK(found, "1-D grid missed %ld + %ld sqrt2", a, b);
				}
			}
		CHECK(got.n == want, "1-D grid count %d, brute force %d", got.n, want);
		mpfr_clears(a0, a1, b0, b1, (mpfr_ptr)0);
	}
}

/* every a with a/sqrt2^k in the eps-region (|u| <= 1, Re(u conj z) >=
 * 1 - eps^2/2) and |a_bullet| <= sqrt2^k, found by brute force in long
 * double, must be enumerated by dw_grid_level */
static void test_grid2(void)
{
	static seen_list got;
	const long double pi = acosl(-1.0L), r2 = sqrtl(0.5L);
	for (int it = 0; it < 6; it++) {
		double theta = (double)((rng_unit() - 0.5L) * 4 * pi);
		double eps = 0.3 + 0.2 * (double)rng_unit();
		dw_grid *g = NULL;
		dw_error err = {0};
		CHECK(dw_grid_create(&g, theta, 0, eps, &err) == DW_OK, "grid: %s", err.msg);
		if (!g)
			continue;
		cld z = cexpl(-I * (long double)theta / 2);
		for (int k = 0; k <= 6; k++) {
			got.n = 0;
			CHECK(dw_grid_level(g, k, 1000000, collect2, &got) == 0, "level ran");
			long double s = powl(sqrtl(2.0L), k);
			long lim = (long)s;
			int want = 0;
			for (long c0 = -lim; c0 <= lim; c0++)
				for (long c1 = -lim; c1 <= lim; c1++)
					for (long c2 = -lim; c2 <= lim; c2++)
						for (long c3 = -lim; c3 <= lim; c3++) {
							cld a = c0 + (c1 - c3) * r2 + I * (c2 + (c1 + c3) * r2);
							cld ab = c0 - (c1 - c3) * r2 + I * (c2 - (c1 + c3) * r2);
							cld u = a / s;
							if (cabsl(u) > 1 || cabsl(ab) > s
								|| creall(u * conjl(z)) < 1 - (long double)eps * eps / 2)
								continue;
							want++;
							int found = 0;
							for (int i = 0; i < got.n; i++)
								found |= got.v[i][0] == c0 && got.v[i][1] == c1
									&& got.v[i][2] == c2 && got.v[i][3] == c3;
							CHECK(found, "grid missed (%ld,%ld,%ld,%ld) at k=%d", c0, c1, c2, c3, k);
						}
			CHECK(got.n >= want, "level %d: %d enumerated, %d in region", k, got.n, want);
		}
		double ratio = dw_grid_reduction_ratio(g);
		CHECK(ratio > 0 && ratio < 20, "grid operator: width product / sqrt(area product) = %g", ratio);
		dw_grid_destroy(g);
	}
}


/* ---------------- independent 2-D enumeration (coset decomposition) ---------------- */

/* a = alpha + i beta + c w (c = 0, 1; alpha, beta in Z[sqrt2]):
 * Re a = alpha + c/sqrt2, Im a = beta + c/sqrt2,
 * Re a_b = alpha_b - c/sqrt2, Im a_b = beta_b - c/sqrt2.  Scan the a with a
 * in sqrt2^k E (E the enclosing ellipse of docs/synth.md: centre
 * (1 - w/2) z, semi-axes sqrt2 w/2 along z and sqrt2 h across, w = eps^2/2,
 * h = sqrt(2w - w^2)) and |a_bullet| <= sqrt2^k, and count those in the
 * eps-region itself. */
enum { CP = 320 };

typedef struct coset_ctx {
	mpfr_t cx, cy, e00, e01, e11, pk, off;
	mpfr_t x, zr, zi, lim;       /* current Re a; z; sqrt2^k (1 - eps^2/2) */
	int coset;
	long count;
} coset_ctx;

/* count the point if it lies in the eps-region itself: |a|^2 <= 2^k and
 * Re(a) zr + Im(a) zi >= sqrt2^k (1 - eps^2/2) */
static int coset_beta(const dw_zroot2 *b, void *user)
{
	coset_ctx *c = user;
	mpfr_t y, t, u;
	mpfr_inits2(CP, y, t, u, (mpfr_ptr)0);
	mpfr_sqrt_ui(t, 2, MPFR_RNDN);
	mpfr_mul_z(t, t, b->b, MPFR_RNDN);
	mpfr_add_z(y, t, b->a, MPFR_RNDN);
	if (c->coset)
		mpfr_add(y, y, c->off, MPFR_RNDN);
	mpfr_sqr(t, c->x, MPFR_RNDN);
	mpfr_sqr(u, y, MPFR_RNDN);
	mpfr_add(t, t, u, MPFR_RNDN);
	int in = mpfr_cmp(t, c->pk) <= 0;
	mpfr_mul(t, c->x, c->zr, MPFR_RNDN);
	mpfr_mul(u, y, c->zi, MPFR_RNDN);
	mpfr_add(t, t, u, MPFR_RNDN);
	in = in && mpfr_cmp(t, c->lim) >= 0;
	c->count += in;
	mpfr_clears(y, t, u, (mpfr_ptr)0);
	return 0;
}

static int coset_alpha(const dw_zroot2 *al, void *user)
{
	coset_ctx *c = user;
	mpfr_t x, xb, t, d, lo, hi, lob, hib, r2, bb;
	mpfr_inits2(CP, x, xb, t, d, lo, hi, lob, hib, r2, bb, (mpfr_ptr)0);
	mpfr_sqrt_ui(r2, 2, MPFR_RNDN);
	mpfr_mul_z(t, r2, al->b, MPFR_RNDN);
	mpfr_add_z(x, t, al->a, MPFR_RNDN);
	mpfr_neg(t, t, MPFR_RNDN);
	mpfr_add_z(xb, t, al->a, MPFR_RNDN);
	if (c->coset) {
		mpfr_add(x, x, c->off, MPFR_RNDN);
		mpfr_sub(xb, xb, c->off, MPFR_RNDN);
	}
	mpfr_set(c->x, x, MPFR_RNDN);
	/* slice of the ellipse at Re a = x: e11 dy^2 + 2 e01 dx dy + e00 dx^2 <= 1 */
	mpfr_sub(t, x, c->cx, MPFR_RNDN);
	mpfr_mul(bb, c->e01, t, MPFR_RNDN);
	mpfr_sqr(d, t, MPFR_RNDN);
	mpfr_mul(d, d, c->e00, MPFR_RNDN);
	mpfr_sub_ui(d, d, 1, MPFR_RNDN);
	mpfr_mul(d, d, c->e11, MPFR_RNDN);
	mpfr_sqr(t, bb, MPFR_RNDN);
	mpfr_sub(d, t, d, MPFR_RNDN);
	if (mpfr_sgn(d) >= 0) {
		mpfr_sqrt(d, d, MPFR_RNDN);
		mpfr_neg(t, bb, MPFR_RNDN);
		mpfr_sub(lo, t, d, MPFR_RNDN);
		mpfr_div(lo, lo, c->e11, MPFR_RNDN);
		mpfr_add(hi, t, d, MPFR_RNDN);
		mpfr_div(hi, hi, c->e11, MPFR_RNDN);
		mpfr_add(lo, lo, c->cy, MPFR_RNDN);
		mpfr_add(hi, hi, c->cy, MPFR_RNDN);
		mpfr_sqr(t, xb, MPFR_RNDN);
		mpfr_sub(t, c->pk, t, MPFR_RNDN);
		if (mpfr_sgn(t) >= 0) {
			mpfr_sqrt(t, t, MPFR_RNDN);
			mpfr_neg(lob, t, MPFR_RNDN);
			mpfr_set(hib, t, MPFR_RNDN);
			if (c->coset) {
				mpfr_sub(lo, lo, c->off, MPFR_RNDN);
				mpfr_sub(hi, hi, c->off, MPFR_RNDN);
				mpfr_add(lob, lob, c->off, MPFR_RNDN);
				mpfr_add(hib, hib, c->off, MPFR_RNDN);
			}
			dw_grid1_solve(lo, hi, lob, hib, 100000000, coset_beta, c);
		}
	}
	mpfr_clears(x, xb, t, d, lo, hi, lob, hib, r2, bb, (mpfr_ptr)0);
	return 0;
}

static long coset_count(double theta, double eps, int k)
{
	coset_ctx c;
	mpfr_t zr, zi, w, h, sc, as2, at2, t, a, b, sk, hw, lo, hi, lob, hib;
	mpfr_inits2(CP, c.x, c.zr, c.zi, c.lim, (mpfr_ptr)0);
	mpfr_inits2(CP, c.cx, c.cy, c.e00, c.e01, c.e11, c.pk, c.off, zr, zi, w, h, sc, as2,
		at2, t, a, b, sk, hw, lo, hi, lob, hib, (mpfr_ptr)0);
	mpfr_sqrt_ui(t, 2, MPFR_RNDN);
	mpfr_ui_div(c.off, 1, t, MPFR_RNDN);
	mpfr_set_d(a, theta, MPFR_RNDN);
	mpfr_div_2ui(a, a, 1, MPFR_RNDN);
	mpfr_sin_cos(zi, zr, a, MPFR_RNDN);
	mpfr_neg(zi, zi, MPFR_RNDN);
	mpfr_set_d(w, eps, MPFR_RNDN);
	mpfr_sqr(w, w, MPFR_RNDN);
	mpfr_div_2ui(w, w, 1, MPFR_RNDN);
	mpfr_mul_2ui(h, w, 1, MPFR_RNDN);
	mpfr_sqr(a, w, MPFR_RNDN);
	mpfr_sub(h, h, a, MPFR_RNDN);
	mpfr_sqrt(h, h, MPFR_RNDN);
	mpfr_set_ui(c.pk, 1, MPFR_RNDN);
	mpfr_mul_2si(c.pk, c.pk, k, MPFR_RNDN);
	mpfr_sqrt(sk, c.pk, MPFR_RNDN);
	mpfr_set(c.zr, zr, MPFR_RNDN);
	mpfr_set(c.zi, zi, MPFR_RNDN);
	mpfr_ui_sub(c.lim, 1, w, MPFR_RNDN);
	mpfr_mul(c.lim, c.lim, sk, MPFR_RNDN);
	mpfr_div_2ui(a, w, 1, MPFR_RNDN);
	mpfr_ui_sub(sc, 1, a, MPFR_RNDN);
	mpfr_mul(sc, sc, sk, MPFR_RNDN);
	mpfr_mul(c.cx, sc, zr, MPFR_RNDN);
	mpfr_mul(c.cy, sc, zi, MPFR_RNDN);
	mpfr_sqrt_ui(b, 2, MPFR_RNDN);
	mpfr_mul(as2, a, b, MPFR_RNDN);            /* sqrt2 w/2 */
	mpfr_mul(as2, as2, sk, MPFR_RNDN);
	mpfr_sqr(as2, as2, MPFR_RNDN);
	mpfr_mul(at2, h, b, MPFR_RNDN);
	mpfr_mul(at2, at2, sk, MPFR_RNDN);
	mpfr_sqr(at2, at2, MPFR_RNDN);
	/* E = m m^T / as2 + n n^T / at2 with m = (zr, zi), n = (-zi, zr) */
	mpfr_sqr(a, zr, MPFR_RNDN);
	mpfr_div(a, a, as2, MPFR_RNDN);
	mpfr_sqr(b, zi, MPFR_RNDN);
	mpfr_div(b, b, at2, MPFR_RNDN);
	mpfr_add(c.e00, a, b, MPFR_RNDN);
	mpfr_sqr(a, zi, MPFR_RNDN);
	mpfr_div(a, a, as2, MPFR_RNDN);
	mpfr_sqr(b, zr, MPFR_RNDN);
	mpfr_div(b, b, at2, MPFR_RNDN);
	mpfr_add(c.e11, a, b, MPFR_RNDN);
	mpfr_mul(a, zr, zi, MPFR_RNDN);
	mpfr_ui_div(b, 1, as2, MPFR_RNDN);
	mpfr_ui_div(t, 1, at2, MPFR_RNDN);
	mpfr_sub(b, b, t, MPFR_RNDN);
	mpfr_mul(c.e01, a, b, MPFR_RNDN);
	/* half-width of the ellipse in Re: sqrt(as2 zr^2 + at2 zi^2) */
	mpfr_sqr(a, zr, MPFR_RNDN);
	mpfr_mul(a, a, as2, MPFR_RNDN);
	mpfr_sqr(b, zi, MPFR_RNDN);
	mpfr_mul(b, b, at2, MPFR_RNDN);
	mpfr_add(hw, a, b, MPFR_RNDN);
	mpfr_sqrt(hw, hw, MPFR_RNDN);
	c.count = 0;
	for (c.coset = 0; c.coset < 2; c.coset++) {
		mpfr_sub(lo, c.cx, hw, MPFR_RNDD);
		mpfr_add(hi, c.cx, hw, MPFR_RNDU);
		mpfr_neg(lob, sk, MPFR_RNDN);
		mpfr_set(hib, sk, MPFR_RNDN);
		if (c.coset) {
			mpfr_sub(lo, lo, c.off, MPFR_RNDN);
			mpfr_sub(hi, hi, c.off, MPFR_RNDN);
			mpfr_add(lob, lob, c.off, MPFR_RNDN);
			mpfr_add(hib, hib, c.off, MPFR_RNDN);
		}
		dw_grid1_solve(lo, hi, lob, hib, 100000000, coset_alpha, &c);
	}
	mpfr_clears(c.x, c.zr, c.zi, c.lim, (mpfr_ptr)0);
	mpfr_clears(c.cx, c.cy, c.e00, c.e01, c.e11, c.pk, c.off, zr, zi, w, h, sc, as2, at2,
		t, a, b, sk, hw, lo, hi, lob, hib, (mpfr_ptr)0);
	return c.count;
}

typedef struct region_count {
	dw_grid *g;
	int k;
	long n;
} region_count;

/* count a grid point if it is in the eps-region (|a|^2 <= 2^k exactly,
 * Re(a conj z) by the grid's own MPFR test) */
static int count_visit(const dw_zomega *a, void *user)
{
	region_count *rc = user;
	dw_zroot2 sq, d;
	dw_zr2_init(&sq);
	dw_zr2_init(&d);
	dw_zw_sqnorm(&sq, a);
	mpz_set_ui(d.a, 1);
	mpz_mul_2exp(d.a, d.a, (mp_bitcnt_t)rc->k);
	mpz_set_ui(d.b, 0);
	dw_zr2_sub(&d, &d, &sq);
	if (dw_zr2_sign(&d) >= 0 && dw_grid_in_region(rc->g, a, rc->k))
		rc->n++;
	dw_zr2_clear(&sq);
	dw_zr2_clear(&d);
	return 0;
}

/* the grid-operator scan and the coset scan find the same number of points
 * of the eps-region at exponents where there are hundreds of them */
static void test_grid2_coset(void)
{
	const long double pi = acosl(-1.0L);
	for (int it = 0; it < 6; it++) {
		double theta = (double)((rng_unit() - 0.5L) * 4 * pi);
		double eps = pow(10.0, -3.0 - (double)rng_unit());
		/* exponent where a few hundred points are expected, about
		 * (pi/6) eps^3 4^k of them (the areas over the covolume) */
		int k = (int)lround(log2(300.0 / (0.52 * eps * eps * eps)) / 2);
		dw_grid *g = NULL;
		dw_error err = {0};
		CHECK(dw_grid_create(&g, theta, 0, eps, &err) == DW_OK, "grid: %s", err.msg);
		if (!g)
			continue;
		for (int dk = 0; dk < 2; dk++) {
			region_count rc = {g, k + dk, 0};
			CHECK(dw_grid_level(g, k + dk, 10000000, count_visit, &rc) == 0, "level ran");
			long grid_n = rc.n;
			long coset_n = coset_count(theta, eps, k + dk);
			CHECK(grid_n == coset_n && grid_n > 0,
				"theta %.17g eps %g k %d: grid scan %ld points, coset scan %ld",
				theta, eps, k + dk, grid_n, coset_n);
		}
		dw_grid_destroy(g);
	}
}

int main(void)
{
	test_factor();
	test_norm_equation();
	test_grid1();
	test_grid2();
	test_grid2_coset();
	return check_done();
}
