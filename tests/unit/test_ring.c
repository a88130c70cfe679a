/* test_ring.c - identities of the exact rings Z[sqrt2], Z[omega], D[omega]
 * (compiler/back/ring.c).
 *
 * Outside references: each ring element is also evaluated as a complex
 * number in long double with omega = e^{i pi/4} taken from cosl/sinl (the
 * definition of the ring as a subring of C, common practice); sums,
 * products and conjugates must agree with complex arithmetic, and the
 * sqrt2-conjugate must agree with evaluating at omega^5 (the Galois
 * automorphism sqrt2 -> -sqrt2 of Q(omega), common practice).  Known
 * values: lambda = 1 + sqrt2 has norm -1 (Pell equation 1 - 2 = -1, common
 * practice); N(1 + omega) = 2, since 2 is totally ramified in the 8th
 * cyclotomic field (common practice); (1 + omega)^dagger (1 + omega) =
 * 2 + sqrt2 (direct expansion, from memory). */
#include <complex.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>

#include "back/ring.h"
#include "check.h"

static uint64_t rng_state = 0x9e3779b97f4a7c15ULL;

static uint64_t rng_next(void)
{
	rng_state ^= rng_state << 13;
	rng_state ^= rng_state >> 7;
	rng_state ^= rng_state << 17;
	return rng_state;
}

static long rnd_small(long range)
{
	return (long)(rng_next() % (uint64_t)(2 * range + 1)) - range;
}

static void rand_zw(dw_zomega *x, long range)
{
	dw_zw_set_si(x, rnd_small(range), rnd_small(range), rnd_small(range),
		rnd_small(range));
}

static void rand_zr2(dw_zroot2 *x, long range)
{
	dw_zr2_set_si(x, rnd_small(range), rnd_small(range));
}

/* value at omega^j for odd j (j = 1: the element itself; 7: its complex
 * conjugate; 5: its bullet) */
static long double complex zw_value_at(const dw_zomega *x, int j)
{
	long double complex w = cexpl(I * (long double)j * acosl(-1.0L) / 4.0L);
	long double complex v = 0, p = 1;
	for (int i = 0; i < 4; i++) {
		v += (long double)mpz_get_d(x->c[i]) * p;
		p *= w;
	}
	return v;
}

static long double zr2_value(const dw_zroot2 *x)
{
	return (long double)mpz_get_d(x->a) + sqrtl(2.0L) * (long double)mpz_get_d(x->b);
}

static int close_c(long double complex a, long double complex b)
{
	return cabsl(a - b) <= 1e-12L * (1.0L + cabsl(a) + cabsl(b));
}

static void test_known_values(void)
{
	dw_zroot2 lam, r;
	mpz_t n;
	dw_zr2_init(&lam);
	dw_zr2_init(&r);
	mpz_init(n);
	dw_zr2_set_si(&lam, 1, 1);
	dw_zr2_norm(n, &lam);
	CHECK(mpz_cmp_si(n, -1) == 0, "N(1+sqrt2) = -1 (Pell)");
	CHECK(dw_zr2_unit_inverse(&r, &lam), "lambda is a unit");
	CHECK(mpz_cmp_si(r.a, -1) == 0 && mpz_cmp_si(r.b, 1) == 0,
		"1/lambda = sqrt2 - 1");

	dw_zomega d;
	dw_zw_init(&d);
	dw_zw_set_si(&d, 1, 1, 0, 0);
	dw_zw_norm(n, &d);
	CHECK(mpz_cmp_ui(n, 2) == 0, "N(1 + omega) = 2");
	dw_zw_sqnorm(&r, &d);
	CHECK(mpz_cmp_si(r.a, 2) == 0 && mpz_cmp_si(r.b, 1) == 0,
		"(1+w)^dagger (1+w) = 2 + sqrt2");
	/* omega^8 = 1 and omega^4 = -1 */
	dw_zomega one, t;
	dw_zw_init(&one);
	dw_zw_init(&t);
	dw_zw_set_si(&one, 1, 0, 0, 0);
	dw_zw_mul_omega_pow(&t, &one, 4);
	CHECK(mpz_cmp_si(t.c[0], -1) == 0 && dw_zw_to_zr2(&r, &t), "w^4 = -1");
	dw_zw_mul_omega_pow(&t, &one, 8);
	CHECK(dw_zw_equal(&t, &one), "w^8 = 1");
	dw_zw_mul_omega_pow(&t, &one, -1);
	dw_zw_mul_omega_pow(&t, &t, 1);
	CHECK(dw_zw_equal(&t, &one), "w^-1 w = 1");
	dw_zr2_clear(&lam);
	dw_zr2_clear(&r);
	dw_zw_clear(&d);
	dw_zw_clear(&one);
	dw_zw_clear(&t);
	mpz_clear(n);
}

static void test_zroot2(void)
{
	dw_zroot2 x, y, p, q, rem, g, s, t, u, v;
	dw_zroot2 *all[] = {&x, &y, &p, &q, &rem, &g, &s, &t, &u, &v};
	mpz_t nx, ny, np;
	for (int i = 0; i < 10; i++)
		dw_zr2_init(all[i]);
	mpz_inits(nx, ny, np, NULL);
	for (int it = 0; it < 2000; it++) {
		rand_zr2(&x, 1000);
		rand_zr2(&y, 1000);
		if (dw_zr2_is_zero(&y))
			continue;
		/* product against real arithmetic */
		dw_zr2_mul(&p, &x, &y);
		long double ex = zr2_value(&x) * zr2_value(&y);
		CHECK(fabsl(zr2_value(&p) - ex) <= 1e-12L * (1 + fabsl(ex)),
			"Z[sqrt2] product");
		/* norm multiplicative; bullet a ring map */
		dw_zr2_norm(nx, &x);
		dw_zr2_norm(ny, &y);
		dw_zr2_norm(np, &p);
		mpz_mul(nx, nx, ny);
		CHECK(mpz_cmp(nx, np) == 0, "N(xy) = N(x)N(y) in Z[sqrt2]");
		dw_zr2_bullet(&u, &p);
		dw_zr2_bullet(&s, &x);
		dw_zr2_bullet(&t, &y);
		dw_zr2_mul(&v, &s, &t);
		CHECK(dw_zr2_equal(&u, &v), "(xy)* = x* y*");
		/* exact sign agrees with the real value */
		long double xv = zr2_value(&x);
		int sg = dw_zr2_sign(&x);
		CHECK((xv > 0 && sg == 1) || (xv < 0 && sg == -1) || (xv == 0 && sg == 0),
			"sign of %Lg is %d", xv, sg);
		/* Euclidean division */
		dw_zr2_divmod(&q, &rem, &x, &y);
		dw_zr2_mul(&u, &q, &y);
		dw_zr2_add(&u, &u, &rem);
		CHECK(dw_zr2_equal(&u, &x), "x = qy + r");
		dw_zr2_norm(np, &rem);
		dw_zr2_norm(ny, &y);
		CHECK(mpz_cmpabs(np, ny) < 0, "|N(r)| < |N(y)|");
		/* exact division recovers the factor */
		CHECK(dw_zr2_divexact(&q, &p, &y) && dw_zr2_equal(&q, &x), "xy / y = x");
		/* gcd and extended gcd */
		dw_zr2_gcdext(&g, &s, &t, &x, &y);
		dw_zr2_mul(&u, &s, &x);
		dw_zr2_mul(&v, &t, &y);
		dw_zr2_add(&u, &u, &v);
		CHECK(dw_zr2_equal(&u, &g), "g = sx + ty");
		if (!dw_zr2_is_zero(&g))
			CHECK(dw_zr2_divexact(&q, &x, &g) && dw_zr2_divexact(&q, &y, &g),
				"gcd divides both");
		/* sqrt2 division */
		dw_zr2_mul_sqrt2(&u, &x);
		CHECK(dw_zr2_div_by_sqrt2(&u), "sqrt2 x divisible by sqrt2");
		dw_zr2_div_sqrt2(&v, &u);
		CHECK(dw_zr2_equal(&v, &x), "(sqrt2 x)/sqrt2 = x");
	}
	/* units: lambda^n lambda^-n = 1 */
	dw_zr2_set_si(&x, 1, 0);
	dw_zr2_mul_lambda_pow(&u, &x, 25);
	dw_zr2_mul_lambda_pow(&v, &u, -25);
	CHECK(dw_zr2_equal(&v, &x), "lambda^25 lambda^-25 = 1");
	for (int i = 0; i < 10; i++)
		dw_zr2_clear(all[i]);
	mpz_clears(nx, ny, np, NULL);
}

static void test_zomega(void)
{
	dw_zomega x, y, p, q, rem, g, u, v;
	dw_zomega *all[] = {&x, &y, &p, &q, &rem, &g, &u, &v};
	dw_zroot2 r1, r2;
	mpz_t nx, ny, np;
	for (int i = 0; i < 8; i++)
		dw_zw_init(all[i]);
	dw_zr2_init(&r1);
	dw_zr2_init(&r2);
	mpz_inits(nx, ny, np, NULL);
	for (int it = 0; it < 2000; it++) {
		rand_zw(&x, 300);
		rand_zw(&y, 300);
		if (dw_zw_is_zero(&y))
			continue;
		dw_zw_mul(&p, &x, &y);
		CHECK(close_c(zw_value_at(&p, 1), zw_value_at(&x, 1) * zw_value_at(&y, 1)),
			"Z[w] product against complex arithmetic");
		dw_zw_conj(&u, &x);
		CHECK(close_c(zw_value_at(&u, 1), conjl(zw_value_at(&x, 1))),
			"dagger is complex conjugation");
		dw_zw_bullet(&u, &x);
		CHECK(close_c(zw_value_at(&u, 1), zw_value_at(&x, 5)),
			"bullet evaluates at w^5");
		dw_zw_conj(&v, &u);
		dw_zw_bullet(&u, &x);
		dw_zw_conj(&u, &u);
		dw_zw_bullet(&u, &u);
		dw_zw_conj(&g, &x);
		CHECK(dw_zw_equal(&u, &g), "bullet and dagger commute");
		/* norms */
		dw_zw_norm(nx, &x);
		dw_zw_norm(ny, &y);
		dw_zw_norm(np, &p);
		mpz_mul(nx, nx, ny);
		CHECK(mpz_cmp(nx, np) == 0, "N(xy) = N(x)N(y) in Z[w]");
		dw_zw_sqnorm(&r1, &x);
		long double m = cabsl(zw_value_at(&x, 1));
		CHECK(fabsl(zr2_value(&r1) - m * m) <= 1e-9L * (1 + m * m), "x^dagger x = |x|^2");
		/* division */
		CHECK(dw_zw_divmod(&q, &rem, &x, &y) == 0, "Euclidean step");
		dw_zw_mul(&u, &q, &y);
		dw_zw_add(&u, &u, &rem);
		CHECK(dw_zw_equal(&u, &x), "x = qy + r in Z[w]");
		dw_zw_norm(np, &rem);
		dw_zw_norm(ny, &y);
		CHECK(mpz_cmp(np, ny) < 0, "N(r) < N(y)");
		CHECK(dw_zw_divexact(&q, &p, &y) && dw_zw_equal(&q, &x), "xy / y = x in Z[w]");
		CHECK(dw_zw_gcd(&g, &x, &y) == 0, "gcd ran");
		if (!dw_zw_is_zero(&g))
			CHECK(dw_zw_divexact(&q, &x, &g) && dw_zw_divexact(&q, &y, &g),
				"gcd divides both in Z[w]");
		/* sqrt2 */
		dw_zw_mul_sqrt2(&u, &x);
		CHECK(close_c(zw_value_at(&u, 1), sqrtl(2.0L) * zw_value_at(&x, 1)), "times sqrt2");
		CHECK(dw_zw_div_by_sqrt2(&u), "divisible by sqrt2");
		dw_zw_div_sqrt2(&v, &u);
		CHECK(dw_zw_equal(&v, &x), "(sqrt2 x)/sqrt2 = x");
		/* Z[sqrt2] embeds as the real elements */
		rand_zr2(&r1, 1000);
		dw_zw_from_zr2(&u, &r1);
		CHECK(dw_zw_to_zr2(&r2, &u) && dw_zr2_equal(&r1, &r2), "Z[sqrt2] round trip");
		CHECK(close_c(zw_value_at(&u, 1), zr2_value(&r1)), "real embedding");
	}
	for (int i = 0; i < 8; i++)
		dw_zw_clear(all[i]);
	dw_zr2_clear(&r1);
	dw_zr2_clear(&r2);
	mpz_clears(nx, ny, np, NULL);
}

static void test_domega(void)
{
	dw_domega x, y, p, s, u;
	dw_domega *all[] = {&x, &y, &p, &s, &u};
	for (int i = 0; i < 5; i++)
		dw_dw_init(all[i]);
	for (int it = 0; it < 1000; it++) {
		long kx = (long)(rng_next() % 6), ky = (long)(rng_next() % 6);
		dw_dw_set_si(&x, rnd_small(50), rnd_small(50), rnd_small(50), rnd_small(50), kx);
		dw_dw_set_si(&y, rnd_small(50), rnd_small(50), rnd_small(50), rnd_small(50), ky);
		long double xr, xi, yr, yi, pr, pi_, sr, si;
		dw_dw_to_ld(&x, &xr, &xi);
		dw_dw_to_ld(&y, &yr, &yi);
		dw_dw_mul(&p, &x, &y);
		dw_dw_add(&s, &x, &y);
		dw_dw_to_ld(&p, &pr, &pi_);
		dw_dw_to_ld(&s, &sr, &si);
		long double complex cx = xr + I * xi, cy = yr + I * yi;
		CHECK(close_c(pr + I * pi_, cx * cy), "D[w] product");
		CHECK(close_c(sr + I * si, cx + cy), "D[w] sum");
		dw_dw_sub(&u, &s, &y);
		CHECK(dw_dw_equal(&u, &x), "(x + y) - y = x (reduced forms equal)");
		/* least denominator exponent: reduced numerator not divisible */
		CHECK(x.k == 0 || !dw_zw_div_by_sqrt2(&x.num), "k minimal");
	}
	for (int i = 0; i < 5; i++)
		dw_dw_clear(all[i]);
}

int main(void)
{
	test_known_values();
	test_zroot2();
	test_zomega();
	test_domega();
	return check_done();
}
