/* ring.c - exact arithmetic in Z[sqrt2], Z[omega] and D[omega] (ring.h).
 * Takes: ring elements with GMP coefficients.  Gives: sums, products,
 * conjugates, norms, Euclidean division and gcds, all exact. */
#include "back/ring.h"

#include <math.h>

/* r = round(p / n) to the nearest integer (halves rounded up), n != 0:
 * floor((2p' + n') / (2n')) with the signs moved so that n' > 0 */
static void round_div(mpz_t r, const mpz_t p, const mpz_t n)
{
	mpz_t a, b;
	mpz_inits(a, b, NULL);
	mpz_set(a, p);
	mpz_set(b, n);
	if (mpz_sgn(b) < 0) {
		mpz_neg(a, a);
		mpz_neg(b, b);
	}
	mpz_mul_2exp(a, a, 1);
	mpz_add(a, a, b);
	mpz_mul_2exp(b, b, 1);
	mpz_fdiv_q(r, a, b);
	mpz_clears(a, b, NULL);
}

/* ---------------- Z[sqrt2] ---------------- */

void dw_zr2_init(dw_zroot2 *x)
{
	mpz_inits(x->a, x->b, NULL);
}

void dw_zr2_clear(dw_zroot2 *x)
{
	mpz_clears(x->a, x->b, NULL);
}

void dw_zr2_set(dw_zroot2 *r, const dw_zroot2 *x)
{
	mpz_set(r->a, x->a);
	mpz_set(r->b, x->b);
}

void dw_zr2_set_si(dw_zroot2 *r, long a, long b)
{
	mpz_set_si(r->a, a);
	mpz_set_si(r->b, b);
}

void dw_zr2_add(dw_zroot2 *r, const dw_zroot2 *x, const dw_zroot2 *y)
{
	mpz_add(r->a, x->a, y->a);
	mpz_add(r->b, x->b, y->b);
}

void dw_zr2_sub(dw_zroot2 *r, const dw_zroot2 *x, const dw_zroot2 *y)
{
	mpz_sub(r->a, x->a, y->a);
	mpz_sub(r->b, x->b, y->b);
}

void dw_zr2_mul(dw_zroot2 *r, const dw_zroot2 *x, const dw_zroot2 *y)
{
	/* (a + b s)(c + d s) = (ac + 2bd) + (ad + bc) s */
	mpz_t ra, rb, t;
	mpz_inits(ra, rb, t, NULL);
	mpz_mul(ra, x->a, y->a);
	mpz_mul(t, x->b, y->b);
	mpz_addmul_ui(ra, t, 2);
	mpz_mul(rb, x->a, y->b);
	mpz_addmul(rb, x->b, y->a);
	mpz_swap(r->a, ra);
	mpz_swap(r->b, rb);
	mpz_clears(ra, rb, t, NULL);
}

void dw_zr2_neg(dw_zroot2 *r, const dw_zroot2 *x)
{
	mpz_neg(r->a, x->a);
	mpz_neg(r->b, x->b);
}

void dw_zr2_bullet(dw_zroot2 *r, const dw_zroot2 *x)
{
	mpz_set(r->a, x->a);
	mpz_neg(r->b, x->b);
}

void dw_zr2_mul_sqrt2(dw_zroot2 *r, const dw_zroot2 *x)
{
	/* (a + b s) s = 2b + a s */
	mpz_t t;
	mpz_init(t);
	mpz_mul_2exp(t, x->b, 1);
	mpz_set(r->b, x->a);
	mpz_swap(r->a, t);
	mpz_clear(t);
}

void dw_zr2_norm(mpz_t n, const dw_zroot2 *x)
{
	mpz_t t;
	mpz_init(t);
	mpz_mul(t, x->b, x->b);
	mpz_mul_2exp(t, t, 1);
	mpz_mul(n, x->a, x->a);
	mpz_sub(n, n, t);
	mpz_clear(t);
}

int dw_zr2_sign(const dw_zroot2 *x)
{
	int sa = mpz_sgn(x->a), sb = mpz_sgn(x->b);
	if (sa >= 0 && sb >= 0)
		return (sa || sb) ? 1 : 0;
	if (sa <= 0 && sb <= 0)
		return -1;
	/* opposite signs: compare a^2 with 2 b^2 */
	mpz_t n;
	mpz_init(n);
	dw_zr2_norm(n, x);
	int cmp = mpz_sgn(n);      /* > 0 means |a| > |b| sqrt2 */
	mpz_clear(n);
	return cmp > 0 ? sa : sb;
}

int dw_zr2_is_zero(const dw_zroot2 *x)
{
	return mpz_sgn(x->a) == 0 && mpz_sgn(x->b) == 0;
}

int dw_zr2_equal(const dw_zroot2 *x, const dw_zroot2 *y)
{
	return mpz_cmp(x->a, y->a) == 0 && mpz_cmp(x->b, y->b) == 0;
}

int dw_zr2_div_by_sqrt2(const dw_zroot2 *x)
{
	return mpz_even_p(x->a);
}

void dw_zr2_div_sqrt2(dw_zroot2 *r, const dw_zroot2 *x)
{
	/* (a + b s) / s = b + (a/2) s */
	mpz_t t;
	mpz_init(t);
	mpz_fdiv_q_2exp(t, x->a, 1);
	mpz_set(r->a, x->b);
	mpz_swap(r->b, t);
	mpz_clear(t);
}

void dw_zr2_divmod(dw_zroot2 *q, dw_zroot2 *rem, const dw_zroot2 *x,
	const dw_zroot2 *y)
{
	dw_zroot2 yb, num, qq, t;
	mpz_t n;
	dw_zr2_init(&yb);
	dw_zr2_init(&num);
	dw_zr2_init(&qq);
	dw_zr2_init(&t);
	mpz_init(n);
	dw_zr2_bullet(&yb, y);
	dw_zr2_mul(&num, x, &yb);
	dw_zr2_norm(n, y);
	round_div(qq.a, num.a, n);
	round_div(qq.b, num.b, n);
	dw_zr2_mul(&t, &qq, y);
	dw_zr2_sub(rem, x, &t);
	dw_zr2_set(q, &qq);
	dw_zr2_clear(&yb);
	dw_zr2_clear(&num);
	dw_zr2_clear(&qq);
	dw_zr2_clear(&t);
	mpz_clear(n);
}

int dw_zr2_divexact(dw_zroot2 *q, const dw_zroot2 *x, const dw_zroot2 *y)
{
	if (dw_zr2_is_zero(y))
		return 0;
	dw_zroot2 yb, num;
	mpz_t n;
	dw_zr2_init(&yb);
	dw_zr2_init(&num);
	mpz_init(n);
	dw_zr2_bullet(&yb, y);
	dw_zr2_mul(&num, x, &yb);
	dw_zr2_norm(n, y);
	int ok = mpz_divisible_p(num.a, n) && mpz_divisible_p(num.b, n);
	if (ok) {
		mpz_divexact(q->a, num.a, n);
		mpz_divexact(q->b, num.b, n);
	}
	dw_zr2_clear(&yb);
	dw_zr2_clear(&num);
	mpz_clear(n);
	return ok;
}

void dw_zr2_gcd(dw_zroot2 *g, const dw_zroot2 *x, const dw_zroot2 *y)
{
	dw_zroot2 a, b, q, r;
	dw_zr2_init(&a);
	dw_zr2_init(&b);
	dw_zr2_init(&q);
	dw_zr2_init(&r);
	dw_zr2_set(&a, x);
	dw_zr2_set(&b, y);
	while (!dw_zr2_is_zero(&b)) {
		dw_zr2_divmod(&q, &r, &a, &b);
		dw_zr2_set(&a, &b);
		dw_zr2_set(&b, &r);
	}
	dw_zr2_set(g, &a);
	dw_zr2_clear(&a);
	dw_zr2_clear(&b);
	dw_zr2_clear(&q);
	dw_zr2_clear(&r);
}

void dw_zr2_gcdext(dw_zroot2 *g, dw_zroot2 *s, dw_zroot2 *t,
	const dw_zroot2 *x, const dw_zroot2 *y)
{
	/* invariant: a = s0 x + t0 y, b = s1 x + t1 y */
	dw_zroot2 a, b, q, r, s0, t0, s1, t1, tmp;
	dw_zroot2 *all[] = {&a, &b, &q, &r, &s0, &t0, &s1, &t1, &tmp};
	for (int i = 0; i < 9; i++)
		dw_zr2_init(all[i]);
	dw_zr2_set(&a, x);
	dw_zr2_set(&b, y);
	dw_zr2_set_si(&s0, 1, 0);
	dw_zr2_set_si(&t0, 0, 0);
	dw_zr2_set_si(&s1, 0, 0);
	dw_zr2_set_si(&t1, 1, 0);
	while (!dw_zr2_is_zero(&b)) {
		dw_zr2_divmod(&q, &r, &a, &b);
		dw_zr2_set(&a, &b);
		dw_zr2_set(&b, &r);
		dw_zr2_mul(&tmp, &q, &s1);
		dw_zr2_sub(&tmp, &s0, &tmp);
		dw_zr2_set(&s0, &s1);
		dw_zr2_set(&s1, &tmp);
		dw_zr2_mul(&tmp, &q, &t1);
		dw_zr2_sub(&tmp, &t0, &tmp);
		dw_zr2_set(&t0, &t1);
		dw_zr2_set(&t1, &tmp);
	}
	dw_zr2_set(g, &a);
	dw_zr2_set(s, &s0);
	dw_zr2_set(t, &t0);
	for (int i = 0; i < 9; i++)
		dw_zr2_clear(all[i]);
}

void dw_zr2_mul_lambda_pow(dw_zroot2 *r, const dw_zroot2 *x, long n)
{
	dw_zroot2 u;
	dw_zr2_init(&u);
	/* lambda = 1 + s, lambda^-1 = -1 + s */
	dw_zr2_set_si(&u, n >= 0 ? 1 : -1, 1);
	dw_zr2_set(r, x);
	for (long i = 0; i < (n >= 0 ? n : -n); i++)
		dw_zr2_mul(r, r, &u);
	dw_zr2_clear(&u);
}

int dw_zr2_unit_inverse(dw_zroot2 *r, const dw_zroot2 *x)
{
	mpz_t n;
	mpz_init(n);
	dw_zr2_norm(n, x);
	int ok = mpz_cmpabs_ui(n, 1) == 0;
	if (ok) {
		/* x x_bullet = n = +-1, so 1/x = n x_bullet */
		int neg = mpz_sgn(n) < 0;
		dw_zr2_bullet(r, x);
		if (neg)
			dw_zr2_neg(r, r);
	}
	mpz_clear(n);
	return ok;
}

double dw_zr2_to_double(const dw_zroot2 *x)
{
	return mpz_get_d(x->a) + sqrt(2.0) * mpz_get_d(x->b);
}

/* ---------------- Z[omega] ---------------- */

void dw_zw_init(dw_zomega *x)
{
	mpz_inits(x->c[0], x->c[1], x->c[2], x->c[3], NULL);
}

void dw_zw_clear(dw_zomega *x)
{
	mpz_clears(x->c[0], x->c[1], x->c[2], x->c[3], NULL);
}

void dw_zw_set(dw_zomega *r, const dw_zomega *x)
{
	for (int i = 0; i < 4; i++)
		mpz_set(r->c[i], x->c[i]);
}

void dw_zw_set_si(dw_zomega *r, long c0, long c1, long c2, long c3)
{
	mpz_set_si(r->c[0], c0);
	mpz_set_si(r->c[1], c1);
	mpz_set_si(r->c[2], c2);
	mpz_set_si(r->c[3], c3);
}

void dw_zw_from_zr2(dw_zomega *r, const dw_zroot2 *x)
{
	/* sqrt2 = w - w^3 */
	mpz_set(r->c[0], x->a);
	mpz_set(r->c[1], x->b);
	mpz_set_ui(r->c[2], 0);
	mpz_neg(r->c[3], x->b);
}

int dw_zw_to_zr2(dw_zroot2 *r, const dw_zomega *x)
{
	if (mpz_sgn(x->c[2]) != 0)
		return 0;
	mpz_t t;
	mpz_init(t);
	mpz_add(t, x->c[1], x->c[3]);
	int real = mpz_sgn(t) == 0;
	mpz_clear(t);
	if (!real)
		return 0;
	mpz_set(r->a, x->c[0]);
	mpz_set(r->b, x->c[1]);
	return 1;
}

void dw_zw_add(dw_zomega *r, const dw_zomega *x, const dw_zomega *y)
{
	for (int i = 0; i < 4; i++)
		mpz_add(r->c[i], x->c[i], y->c[i]);
}

void dw_zw_sub(dw_zomega *r, const dw_zomega *x, const dw_zomega *y)
{
	for (int i = 0; i < 4; i++)
		mpz_sub(r->c[i], x->c[i], y->c[i]);
}

void dw_zw_mul(dw_zomega *r, const dw_zomega *x, const dw_zomega *y)
{
	mpz_t out[4];
	for (int i = 0; i < 4; i++)
		mpz_init(out[i]);
	for (int i = 0; i < 4; i++)
		for (int j = 0; j < 4; j++) {
			if (i + j < 4)
				mpz_addmul(out[i + j], x->c[i], y->c[j]);
			else
				mpz_submul(out[i + j - 4], x->c[i], y->c[j]);
		}
	for (int i = 0; i < 4; i++) {
		mpz_swap(r->c[i], out[i]);
		mpz_clear(out[i]);
	}
}

void dw_zw_neg(dw_zomega *r, const dw_zomega *x)
{
	for (int i = 0; i < 4; i++)
		mpz_neg(r->c[i], x->c[i]);
}

void dw_zw_conj(dw_zomega *r, const dw_zomega *x)
{
	/* w^j -> w^-j: (c0, c1, c2, c3) -> (c0, -c3, -c2, -c1) */
	mpz_t t;
	mpz_init(t);
	mpz_set(t, x->c[1]);
	mpz_set(r->c[0], x->c[0]);
	mpz_neg(r->c[1], x->c[3]);
	mpz_neg(r->c[2], x->c[2]);
	mpz_neg(r->c[3], t);
	mpz_clear(t);
}

void dw_zw_bullet(dw_zomega *r, const dw_zomega *x)
{
	/* w -> -w */
	mpz_set(r->c[0], x->c[0]);
	mpz_neg(r->c[1], x->c[1]);
	mpz_set(r->c[2], x->c[2]);
	mpz_neg(r->c[3], x->c[3]);
}

void dw_zw_mul_omega_pow(dw_zomega *r, const dw_zomega *x, long j)
{
	long s = ((j % 8) + 8) % 8;
	dw_zw_set(r, x);
	for (long step = 0; step < s; step++) {
		/* times w: (c0, c1, c2, c3) -> (-c3, c0, c1, c2) */
		mpz_swap(r->c[3], r->c[2]);
		mpz_swap(r->c[2], r->c[1]);
		mpz_swap(r->c[1], r->c[0]);
		mpz_neg(r->c[0], r->c[0]);
	}
}

void dw_zw_mul_sqrt2(dw_zomega *r, const dw_zomega *x)
{
	/* x (w - w^3) = (c1 - c3, c0 + c2, c1 + c3, c2 - c0) */
	mpz_t o[4];
	for (int i = 0; i < 4; i++)
		mpz_init(o[i]);
	mpz_sub(o[0], x->c[1], x->c[3]);
	mpz_add(o[1], x->c[0], x->c[2]);
	mpz_add(o[2], x->c[1], x->c[3]);
	mpz_sub(o[3], x->c[2], x->c[0]);
	for (int i = 0; i < 4; i++) {
		mpz_swap(r->c[i], o[i]);
		mpz_clear(o[i]);
	}
}

int dw_zw_div_by_sqrt2(const dw_zomega *x)
{
	return mpz_even_p(x->c[0]) == mpz_even_p(x->c[2])
		&& mpz_even_p(x->c[1]) == mpz_even_p(x->c[3]);
}

void dw_zw_div_sqrt2(dw_zomega *r, const dw_zomega *x)
{
	dw_zw_mul_sqrt2(r, x);
	for (int i = 0; i < 4; i++)
		mpz_divexact_ui(r->c[i], r->c[i], 2);
}

int dw_zw_is_zero(const dw_zomega *x)
{
	for (int i = 0; i < 4; i++)
		if (mpz_sgn(x->c[i]) != 0)
			return 0;
	return 1;
}

int dw_zw_equal(const dw_zomega *x, const dw_zomega *y)
{
	for (int i = 0; i < 4; i++)
		if (mpz_cmp(x->c[i], y->c[i]) != 0)
			return 0;
	return 1;
}

void dw_zw_sqnorm(dw_zroot2 *r, const dw_zomega *x)
{
	dw_zomega t;
	dw_zw_init(&t);
	dw_zw_conj(&t, x);
	dw_zw_mul(&t, &t, x);
	dw_zw_to_zr2(r, &t);       /* always real */
	dw_zw_clear(&t);
}

void dw_zw_norm(mpz_t n, const dw_zomega *x)
{
	dw_zroot2 s;
	dw_zr2_init(&s);
	dw_zw_sqnorm(&s, x);
	dw_zr2_norm(n, &s);
	dw_zr2_clear(&s);
}

/* r = y^dagger y^bullet y^bullet-dagger, so that y r = N(y) */
static void zw_coproduct(dw_zomega *r, const dw_zomega *y)
{
	dw_zomega a, b;
	dw_zw_init(&a);
	dw_zw_init(&b);
	dw_zw_conj(&a, y);
	dw_zw_bullet(&b, y);
	dw_zw_mul(&a, &a, &b);
	dw_zw_conj(&b, &b);
	dw_zw_mul(r, &a, &b);
	dw_zw_clear(&a);
	dw_zw_clear(&b);
}

int dw_zw_divmod(dw_zomega *q, dw_zomega *rem, const dw_zomega *x,
	const dw_zomega *y)
{
	dw_zomega co, qq, t, best_q, best_r;
	mpz_t n, nr;
	dw_zw_init(&co);
	dw_zw_init(&qq);
	dw_zw_init(&t);
	dw_zw_init(&best_q);
	dw_zw_init(&best_r);
	mpz_inits(n, nr, NULL);
	zw_coproduct(&co, y);
	dw_zw_mul(&co, x, &co);
	dw_zw_norm(n, y);
	for (int i = 0; i < 4; i++)
		round_div(qq.c[i], co.c[i], n);
	/* the rounded quotient almost always works; ties (all coefficients
	 * exactly half-way) may need a neighbour */
	int found = 0;
	for (int trial = 0; trial < 9 && !found; trial++) {
		dw_zw_set(&t, &qq);
		if (trial > 0) {
			int j = (trial - 1) / 2;
			if ((trial - 1) % 2 == 0)
				mpz_add_ui(t.c[j], t.c[j], 1);
			else
				mpz_sub_ui(t.c[j], t.c[j], 1);
		}
		dw_zomega prod;
		dw_zw_init(&prod);
		dw_zw_mul(&prod, &t, y);
		dw_zw_sub(&prod, x, &prod);
		dw_zw_norm(nr, &prod);
		if (mpz_cmp(nr, n) < 0) {
			dw_zw_set(&best_q, &t);
			dw_zw_set(&best_r, &prod);
			found = 1;
		}
		dw_zw_clear(&prod);
	}
	if (found) {
		dw_zw_set(q, &best_q);
		dw_zw_set(rem, &best_r);
	}
	dw_zw_clear(&co);
	dw_zw_clear(&qq);
	dw_zw_clear(&t);
	dw_zw_clear(&best_q);
	dw_zw_clear(&best_r);
	mpz_clears(n, nr, NULL);
	return found ? 0 : 1;
}

int dw_zw_divexact(dw_zomega *q, const dw_zomega *x, const dw_zomega *y)
{
	if (dw_zw_is_zero(y))
		return 0;
	dw_zomega co;
	mpz_t n;
	dw_zw_init(&co);
	mpz_init(n);
	zw_coproduct(&co, y);
	dw_zw_mul(&co, x, &co);
	dw_zw_norm(n, y);
	int ok = 1;
	for (int i = 0; i < 4; i++)
		if (!mpz_divisible_p(co.c[i], n))
			ok = 0;
	if (ok)
		for (int i = 0; i < 4; i++)
			mpz_divexact(q->c[i], co.c[i], n);
	dw_zw_clear(&co);
	mpz_clear(n);
	return ok;
}

int dw_zw_gcd(dw_zomega *g, const dw_zomega *x, const dw_zomega *y)
{
	dw_zomega a, b, q, r;
	dw_zw_init(&a);
	dw_zw_init(&b);
	dw_zw_init(&q);
	dw_zw_init(&r);
	dw_zw_set(&a, x);
	dw_zw_set(&b, y);
	int fail = 0;
	while (!dw_zw_is_zero(&b)) {
		if (dw_zw_divmod(&q, &r, &a, &b)) {
			fail = 1;
			break;
		}
		dw_zw_set(&a, &b);
		dw_zw_set(&b, &r);
	}
	dw_zw_set(g, &a);
	dw_zw_clear(&a);
	dw_zw_clear(&b);
	dw_zw_clear(&q);
	dw_zw_clear(&r);
	return fail;
}

/* ---------------- D[omega] ---------------- */

void dw_dw_init(dw_domega *x)
{
	dw_zw_init(&x->num);
	x->k = 0;
}

void dw_dw_clear(dw_domega *x)
{
	dw_zw_clear(&x->num);
}

void dw_dw_set(dw_domega *r, const dw_domega *x)
{
	dw_zw_set(&r->num, &x->num);
	r->k = x->k;
}

void dw_dw_reduce(dw_domega *x)
{
	if (dw_zw_is_zero(&x->num)) {
		x->k = 0;
		return;
	}
	while (x->k < 0) {
		dw_zw_mul_sqrt2(&x->num, &x->num);
		x->k++;
	}
	while (x->k > 0 && dw_zw_div_by_sqrt2(&x->num)) {
		dw_zw_div_sqrt2(&x->num, &x->num);
		x->k--;
	}
}

void dw_dw_set_zw(dw_domega *r, const dw_zomega *n, long k)
{
	dw_zw_set(&r->num, n);
	r->k = k;
	dw_dw_reduce(r);
}

void dw_dw_set_si(dw_domega *r, long c0, long c1, long c2, long c3, long k)
{
	dw_zw_set_si(&r->num, c0, c1, c2, c3);
	r->k = k;
	dw_dw_reduce(r);
}

/* numerator of x scaled to denominator sqrt2^k (k >= x->k) */
static void dw_scaled_num(dw_zomega *out, const dw_domega *x, long k)
{
	/* sqrt2^d = 2^(d/2), times sqrt2 when d is odd */
	long d = k - x->k;
	for (int i = 0; i < 4; i++)
		mpz_mul_2exp(out->c[i], x->num.c[i], (mp_bitcnt_t)(d / 2));
	if (d % 2)
		dw_zw_mul_sqrt2(out, out);
}

static void dw_addsub(dw_domega *r, const dw_domega *x, const dw_domega *y,
	int sub)
{
	if (dw_zw_is_zero(&y->num) || dw_zw_is_zero(&x->num)) {
		const dw_domega *nz = dw_zw_is_zero(&y->num) ? x : y;
		int negate = sub && nz == y;
		dw_dw_set(r, nz);
		if (negate)
			dw_zw_neg(&r->num, &r->num);
		return;
	}
	long k = x->k > y->k ? x->k : y->k;
	dw_zomega a, b;
	dw_zw_init(&a);
	dw_zw_init(&b);
	dw_scaled_num(&a, x, k);
	dw_scaled_num(&b, y, k);
	if (sub)
		dw_zw_sub(&r->num, &a, &b);
	else
		dw_zw_add(&r->num, &a, &b);
	r->k = k;
	dw_dw_reduce(r);
	dw_zw_clear(&a);
	dw_zw_clear(&b);
}

void dw_dw_add(dw_domega *r, const dw_domega *x, const dw_domega *y)
{
	dw_addsub(r, x, y, 0);
}

void dw_dw_sub(dw_domega *r, const dw_domega *x, const dw_domega *y)
{
	dw_addsub(r, x, y, 1);
}

void dw_dw_mul(dw_domega *r, const dw_domega *x, const dw_domega *y)
{
	long k = x->k + y->k;
	dw_zw_mul(&r->num, &x->num, &y->num);
	r->k = k;
	dw_dw_reduce(r);
}

void dw_dw_conj(dw_domega *r, const dw_domega *x)
{
	dw_zw_conj(&r->num, &x->num);
	r->k = x->k;
}

void dw_dw_mul_omega_pow(dw_domega *r, const dw_domega *x, long j)
{
	dw_zw_mul_omega_pow(&r->num, &x->num, j);
	r->k = x->k;
}

int dw_dw_equal(const dw_domega *x, const dw_domega *y)
{
	return x->k == y->k && dw_zw_equal(&x->num, &y->num);
}

int dw_dw_is_zero(const dw_domega *x)
{
	return dw_zw_is_zero(&x->num);
}

void dw_dw_to_ld(const dw_domega *x, long double *re, long double *im)
{
	long double r2 = sqrtl(0.5L);
	long double c0 = (long double)mpz_get_d(x->num.c[0]);
	long double c1 = (long double)mpz_get_d(x->num.c[1]);
	long double c2 = (long double)mpz_get_d(x->num.c[2]);
	long double c3 = (long double)mpz_get_d(x->num.c[3]);
	long double scale = powl(r2, (long double)x->k);
	*re = (c0 + (c1 - c3) * r2) * scale;
	*im = (c2 + (c1 + c3) * r2) * scale;
}
