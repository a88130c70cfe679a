/* norm_eq.c - solve t^dagger t = xi in Z[omega] for xi in Z[sqrt2].
 *
 * Takes: xi with xi >= 0 and xi_bullet >= 0.  Gives: t, or no solution.
 *
 * Method ("Optimal ancilla-free Clifford+T approximation of z-rotations",
 * QIC 16(11&12), 2016, Section on the Diophantine equation; the splitting
 * facts are standard algebraic number theory, common practice).  Factor the
 * integer n = xi xi_bullet.  For each rational prime p | n:
 *   p = 2:          sqrt2 = delta^dagger delta / lambda with delta = 1 + w;
 *   p = 3, 5 mod 8: p is prime in Z[sqrt2] and p = pi^dagger pi (up to a
 *                   unit) with pi = gcd(p, h + i) for h^2 = -1 (p = 5 mod 8)
 *                   or pi = gcd(p, h + w + w^3) for h^2 = -2 (p = 3 mod 8);
 *   p = 1 mod 8:    the four primes of Z[omega] above p are
 *                   gcd(p, w - r^j), r a primitive 8th root of unity mod p;
 *                   gcd(p, w - r) and gcd(p, w - r^3) lie above the two
 *                   primes of Z[sqrt2] above p;
 *   p = 7 mod 8:    p = q q_bullet in Z[sqrt2] with q = gcd(p, h - sqrt2),
 *                   h^2 = 2; q stays prime in Z[omega], so it must divide xi
 *                   to an even power (otherwise there is no solution).
 * Multiplying the pieces gives t with t^dagger t = xi * mu for a doubly
 * positive unit mu = lambda^(2m); then t lambda^-m solves the equation.
 * The result is verified exactly before it is returned. */
#include "back/norm_eq.h"

#include <stdlib.h>

void dw_factors_init(dw_factors *f)
{
	f->prime = NULL;
	f->exp = NULL;
	f->count = f->cap = 0;
}

void dw_factors_clear(dw_factors *f)
{
	for (size_t i = 0; i < f->count; i++)
		mpz_clear(f->prime[i]);
	free(f->prime);
	free(f->exp);
	dw_factors_init(f);
}

/* add p^e (merging with an existing entry); returns 0 on allocation failure */
static int factors_add(dw_factors *f, const mpz_t p, unsigned long e)
{
	for (size_t i = 0; i < f->count; i++)
		if (mpz_cmp(f->prime[i], p) == 0) {
			f->exp[i] += e;
			return 1;
		}
	if (f->count == f->cap) {
		size_t cap = f->cap ? f->cap * 2 : 8;
		mpz_t *np = realloc(f->prime, cap * sizeof *np);
		if (!np)
			return 0;
		f->prime = np;
		unsigned long *ne = realloc(f->exp, cap * sizeof *ne);
		if (!ne)
			return 0;
		f->exp = ne;
		f->cap = cap;
	}
	mpz_init_set(f->prime[f->count], p);
	f->exp[f->count] = e;
	f->count++;
	return 1;
}

/* Pollard rho with Brent's cycle detection: a nontrivial factor d of the
 * composite n, or 0 when *budget steps run out. */
static int rho_split(mpz_t d, const mpz_t n, unsigned long c, uint32_t *budget)
{
	mpz_t x, y, ys, q, diff;
	mpz_inits(x, y, ys, q, diff, NULL);
	mpz_set_ui(y, 2);
	mpz_set_ui(q, 1);
	mpz_set_ui(d, 1);
	unsigned long r = 1;
	const unsigned long batch = 64;
	int found = 0, out_of_budget = 0;
	while (mpz_cmp_ui(d, 1) == 0 && !out_of_budget) {
		mpz_set(x, y);
		for (unsigned long i = 0; i < r; i++) {
			mpz_mul(y, y, y);
			mpz_add_ui(y, y, c);
			mpz_mod(y, y, n);
		}
		unsigned long k = 0;
		while (k < r && mpz_cmp_ui(d, 1) == 0) {
			mpz_set(ys, y);
			unsigned long lim = batch < r - k ? batch : r - k;
			for (unsigned long i = 0; i < lim; i++) {
				mpz_mul(y, y, y);
				mpz_add_ui(y, y, c);
				mpz_mod(y, y, n);
				mpz_sub(diff, x, y);
				mpz_mul(q, q, diff);
				mpz_mod(q, q, n);
			}
			mpz_gcd(d, q, n);
			k += lim;
			if (*budget <= lim) {
				*budget = 0;
				out_of_budget = mpz_cmp_ui(d, 1) == 0;
				break;
			}
			*budget -= (uint32_t)lim;
		}
		r *= 2;
	}
	if (mpz_cmp(d, n) == 0) {
		/* the batch overshot: step one at a time from ys */
		do {
			mpz_mul(ys, ys, ys);
			mpz_add_ui(ys, ys, c);
			mpz_mod(ys, ys, n);
			mpz_sub(diff, x, ys);
			mpz_gcd(d, diff, n);
		} while (mpz_cmp_ui(d, 1) == 0);
	}
	found = mpz_cmp_ui(d, 1) != 0 && mpz_cmp(d, n) != 0;
	mpz_clears(x, y, ys, q, diff, NULL);
	return found;
}

/* factor m (> 1, free of small primes) into out; 0 if effort ran out */
static int factor_large(dw_factors *out, const mpz_t m, unsigned long e, uint32_t *budget)
{
	if (mpz_probab_prime_p(m, 30))
		return factors_add(out, m, e);
	mpz_t d, cof;
	mpz_inits(d, cof, NULL);
	int ok = 0;
	for (unsigned long c = 1; c < 6 && *budget > 0; c += 2)
		if (rho_split(d, m, c, budget)) {
			mpz_divexact(cof, m, d);
			ok = factor_large(out, d, e, budget)
				&& factor_large(out, cof, e, budget);
			break;
		}
	mpz_clears(d, cof, NULL);
	return ok;
}

int dw_factor(dw_factors *out, const mpz_t n, uint32_t effort)
{
	mpz_t m, p;
	mpz_init_set(m, n);
	mpz_init(p);
	int ok = 1;
	/* trial division by the primes below 1024 */
	enum { TRIAL = 1024 };
	unsigned char composite[TRIAL] = {0};
	for (unsigned long d = 2; d < TRIAL && mpz_cmp_ui(m, 1) > 0 && ok; d++) {
		if (composite[d])
			continue;
		for (unsigned long j = d * d; j < TRIAL; j += d)
			composite[j] = 1;
		unsigned long e = 0;
		while (mpz_divisible_ui_p(m, d)) {
			mpz_divexact_ui(m, m, d);
			e++;
		}
		if (e) {
			mpz_set_ui(p, d);
			ok = factors_add(out, p, e);
		}
	}
	if (ok && mpz_cmp_ui(m, 1) > 0) {
		uint32_t budget = effort;
		ok = factor_large(out, m, 1, &budget);
	}
	mpz_clears(m, p, NULL);
	return ok;
}

/* ---------------- square roots modulo a prime ---------------- */

/* h with h^2 = a mod p, for p = 3 mod 4 and a a square mod p */
static void sqrt_p3mod4(mpz_t h, long a, const mpz_t p)
{
	mpz_t e, base;
	mpz_inits(e, base, NULL);
	mpz_add_ui(e, p, 1);
	mpz_fdiv_q_2exp(e, e, 2);
	mpz_set_si(base, a);
	mpz_mod(base, base, p);
	mpz_powm(h, base, e, p);
	mpz_clears(e, base, NULL);
}

/* r with r^4 = -1 mod p (p = 1 mod 4, 8 | p - 1 when order 8 is asked):
 * r = g^((p-1)/order) for a quadratic non-residue g */
static void root_of_unity(mpz_t r, const mpz_t p, unsigned long order)
{
	mpz_t g, e;
	mpz_inits(g, e, NULL);
	for (mpz_set_ui(g, 2);; mpz_add_ui(g, g, 1))
		if (mpz_legendre(g, p) == -1)
			break;
	mpz_sub_ui(e, p, 1);
	mpz_divexact_ui(e, e, order);
	mpz_powm(r, g, e, p);
	mpz_clears(g, e, NULL);
}

/* ---------------- the equation ---------------- */

static void zw_from_si(dw_zomega *x, const mpz_t c0, long c1, long c2, long c3)
{
	mpz_set(x->c[0], c0);
	mpz_set_si(x->c[1], c1);
	mpz_set_si(x->c[2], c2);
	mpz_set_si(x->c[3], c3);
}

/* x^dagger x as Z[sqrt2] */
static void pi_norm(dw_zroot2 *q, const dw_zomega *pi)
{
	dw_zw_sqnorm(q, pi);
}

int dw_norm_solve(dw_zomega *t_out, const dw_zroot2 *xi, uint32_t effort)
{
	if (dw_zr2_is_zero(xi)) {
		dw_zw_set_si(t_out, 0, 0, 0, 0);
		return DW_NORM_SOLVED;
	}
	dw_zroot2 xb;
	dw_zr2_init(&xb);
	dw_zr2_bullet(&xb, xi);
	int pos = dw_zr2_sign(xi) > 0 && dw_zr2_sign(&xb) > 0;
	dw_zr2_clear(&xb);
	if (!pos)
		return DW_NORM_NO_SOLUTION;

	int result = DW_NORM_SOLVED;
	mpz_t n, h, pm, tmp;
	dw_factors fac;
	dw_zroot2 rem, q, qb, tt, mu, one;
	dw_zomega t, pi, pz, aux;
	mpz_inits(n, h, pm, tmp, NULL);
	dw_factors_init(&fac);
	dw_zr2_init(&rem);
	dw_zr2_init(&q);
	dw_zr2_init(&qb);
	dw_zr2_init(&tt);
	dw_zr2_init(&mu);
	dw_zr2_init(&one);
	dw_zw_init(&t);
	dw_zw_init(&pi);
	dw_zw_init(&pz);
	dw_zw_init(&aux);

	dw_zr2_norm(n, xi);
	if (!dw_factor(&fac, n, effort)) {
		result = DW_NORM_GAVE_UP;
		goto done;
	}
	dw_zw_set_si(&t, 1, 0, 0, 0);
	dw_zr2_set(&rem, xi);
	for (size_t i = 0; i < fac.count && result == DW_NORM_SOLVED; i++) {
		mpz_srcptr p = fac.prime[i];
		unsigned long p8 = mpz_fdiv_ui(p, 8);
		if (mpz_cmp_ui(p, 2) == 0) {
			while (dw_zr2_div_by_sqrt2(&rem) && !dw_zr2_is_zero(&rem)) {
				dw_zr2_div_sqrt2(&rem, &rem);
				dw_zw_set_si(&aux, 1, 1, 0, 0);        /* delta = 1 + w */
				dw_zw_mul(&t, &t, &aux);
			}
		} else if (p8 == 3 || p8 == 5) {
			if (p8 == 5) {
				root_of_unity(h, p, 4);               /* h^2 = -1 */
				zw_from_si(&aux, h, 0, 1, 0);          /* h + i */
			} else {
				sqrt_p3mod4(h, -2, p);                /* h^2 = -2 */
				zw_from_si(&aux, h, 1, 0, 1);          /* h + w + w^3 */
			}
			zw_from_si(&pz, p, 0, 0, 0);
			if (dw_zw_gcd(&pi, &pz, &aux)) {
				result = DW_NORM_GAVE_UP;
				break;
			}
			dw_zw_norm(tmp, &pi);
			mpz_mul(pm, p, p);
			if (mpz_cmp(tmp, pm) != 0) {
				result = DW_NORM_GAVE_UP;
				break;
			}
			while (mpz_divisible_p(rem.a, p) && mpz_divisible_p(rem.b, p)
				&& !dw_zr2_is_zero(&rem)) {
				mpz_divexact(rem.a, rem.a, p);
				mpz_divexact(rem.b, rem.b, p);
				dw_zw_mul(&t, &t, &pi);
			}
		} else if (p8 == 1) {
			mpz_t r, r3;
			mpz_inits(r, r3, NULL);
			root_of_unity(r, p, 8);
			mpz_powm_ui(r3, r, 3, p);
			for (int which = 0; which < 2 && result == DW_NORM_SOLVED; which++) {
				mpz_neg(tmp, which ? r3 : r);
				zw_from_si(&aux, tmp, 1, 0, 0);        /* w - r */
				zw_from_si(&pz, p, 0, 0, 0);
				if (dw_zw_gcd(&pi, &pz, &aux)) {
					result = DW_NORM_GAVE_UP;
					break;
				}
				dw_zw_norm(tmp, &pi);
				if (mpz_cmp(tmp, p) != 0) {
					result = DW_NORM_GAVE_UP;
					break;
				}
				pi_norm(&q, &pi);
				while (!dw_zr2_is_zero(&rem) && dw_zr2_divexact(&qb, &rem, &q)) {
					dw_zr2_set(&rem, &qb);
					dw_zw_mul(&t, &t, &pi);
				}
			}
			mpz_clears(r, r3, NULL);
		} else { /* p = 7 mod 8 */
			sqrt_p3mod4(h, 2, p);                     /* h^2 = 2 */
			dw_zroot2 pp, hs;
			dw_zr2_init(&pp);
			dw_zr2_init(&hs);
			mpz_set(pp.a, p);
			mpz_set_ui(pp.b, 0);
			mpz_set(hs.a, h);
			mpz_set_si(hs.b, -1);
			dw_zr2_gcd(&q, &pp, &hs);
			dw_zr2_norm(tmp, &q);
			mpz_abs(tmp, tmp);
			if (mpz_cmp(tmp, p) != 0)
				result = DW_NORM_GAVE_UP;
			for (int which = 0; which < 2 && result == DW_NORM_SOLVED; which++) {
				if (which)
					dw_zr2_bullet(&q, &q);
				unsigned long m = 0;
				while (!dw_zr2_is_zero(&rem) && dw_zr2_divexact(&qb, &rem, &q)) {
					dw_zr2_set(&rem, &qb);
					m++;
				}
				if (m % 2) {
					result = DW_NORM_NO_SOLUTION;
					break;
				}
				dw_zw_from_zr2(&aux, &q);
				for (unsigned long j = 0; j < m / 2; j++)
					dw_zw_mul(&t, &t, &aux);
			}
			dw_zr2_clear(&pp);
			dw_zr2_clear(&hs);
		}
	}
	if (result != DW_NORM_SOLVED)
		goto done;
	/* fix the unit: xi = (t^dagger t) mu with mu = lambda^(2m) */
	dw_zw_sqnorm(&tt, &t);
	if (!dw_zr2_divexact(&mu, xi, &tt)) {
		result = DW_NORM_GAVE_UP;
		goto done;
	}
	dw_zr2_norm(tmp, &mu);
	dw_zr2_bullet(&qb, &mu);
	if (mpz_cmp_ui(tmp, 1) != 0 || dw_zr2_sign(&mu) <= 0 || dw_zr2_sign(&qb) <= 0) {
		result = DW_NORM_GAVE_UP;
		goto done;
	}
	{
		long m = 0;
		dw_zr2_set_si(&one, 1, 0);
		while (!dw_zr2_equal(&mu, &one) && labs(m) < 100000) {
			dw_zr2_sub(&q, &mu, &one);
			if (dw_zr2_sign(&q) > 0) {
				dw_zr2_mul_lambda_pow(&mu, &mu, -2);
				m++;
			} else {
				dw_zr2_mul_lambda_pow(&mu, &mu, 2);
				m--;
			}
		}
		/* t <- t lambda^m */
		dw_zr2_mul_lambda_pow(&q, &one, m);
		dw_zw_from_zr2(&aux, &q);
		dw_zw_mul(&t, &t, &aux);
	}
	dw_zw_sqnorm(&tt, &t);
	if (!dw_zr2_equal(&tt, xi)) {
		result = DW_NORM_GAVE_UP;
		goto done;
	}
	dw_zw_set(t_out, &t);
done:
	mpz_clears(n, h, pm, tmp, NULL);
	dw_factors_clear(&fac);
	dw_zr2_clear(&rem);
	dw_zr2_clear(&q);
	dw_zr2_clear(&qb);
	dw_zr2_clear(&tt);
	dw_zr2_clear(&mu);
	dw_zr2_clear(&one);
	dw_zw_clear(&t);
	dw_zw_clear(&pi);
	dw_zw_clear(&pz);
	dw_zw_clear(&aux);
	return result;
}
