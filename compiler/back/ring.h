/* ring.h - exact arithmetic in the rings used by Clifford+T synthesis.
 *
 *   Z[sqrt2]  elements a + b*sqrt2                  (dw_zroot2)
 *   Z[omega]  elements c0 + c1 w + c2 w^2 + c3 w^3,  w = e^{i pi/4}
 *             (w^4 = -1)                            (dw_zomega)
 *   D[omega]  = Z[1/sqrt2, i]: n / sqrt2^k with n in Z[omega], k >= 0
 *             kept with k minimal ("least denominator exponent")
 *                                                    (dw_domega)
 *
 * Coefficients are GMP integers.  Every value must be initialised with its
 * _init function and released with _clear.  Output arguments may alias
 * inputs.  Two conjugations: the complex conjugate (dagger, w -> w^7) and
 * the sqrt2-conjugate (bullet, sqrt2 -> -sqrt2, i.e. w -> w^5 = -w).
 * Both Z[sqrt2] and Z[omega] are Euclidean; division with remainder and gcd
 * are provided for the norm equation (norm_eq.c).
 *
 * Nothing here allocates beyond GMP, prints or fails, except the
 * Euclidean steps in Z[omega], which report a (never observed) failure to
 * decrease the norm by returning nonzero. */
#ifndef DWELL_BACK_RING_H
#define DWELL_BACK_RING_H

#include <gmp.h>

typedef struct dw_zroot2 {
	mpz_t a, b;           /* a + b sqrt2 */
} dw_zroot2;

typedef struct dw_zomega {
	mpz_t c[4];           /* c0 + c1 w + c2 w^2 + c3 w^3 */
} dw_zomega;

typedef struct dw_domega {
	dw_zomega num;
	long k;               /* value = num / sqrt2^k, k >= 0 and minimal */
} dw_domega;

/* ---- Z[sqrt2] ---- */
void dw_zr2_init(dw_zroot2 *x);
void dw_zr2_clear(dw_zroot2 *x);
void dw_zr2_set(dw_zroot2 *r, const dw_zroot2 *x);
void dw_zr2_set_si(dw_zroot2 *r, long a, long b);
void dw_zr2_add(dw_zroot2 *r, const dw_zroot2 *x, const dw_zroot2 *y);
void dw_zr2_sub(dw_zroot2 *r, const dw_zroot2 *x, const dw_zroot2 *y);
void dw_zr2_mul(dw_zroot2 *r, const dw_zroot2 *x, const dw_zroot2 *y);
void dw_zr2_neg(dw_zroot2 *r, const dw_zroot2 *x);
void dw_zr2_bullet(dw_zroot2 *r, const dw_zroot2 *x);
void dw_zr2_mul_sqrt2(dw_zroot2 *r, const dw_zroot2 *x);
/* Norm x * x_bullet = a^2 - 2 b^2 (may be negative). */
void dw_zr2_norm(mpz_t n, const dw_zroot2 *x);
/* Exact sign of a + b sqrt2: -1, 0 or 1. */
int dw_zr2_sign(const dw_zroot2 *x);
int dw_zr2_is_zero(const dw_zroot2 *x);
int dw_zr2_equal(const dw_zroot2 *x, const dw_zroot2 *y);
/* sqrt2 divides x iff a is even. */
int dw_zr2_div_by_sqrt2(const dw_zroot2 *x);
/* r = x / sqrt2; x must be divisible. */
void dw_zr2_div_sqrt2(dw_zroot2 *r, const dw_zroot2 *x);
/* q, rem with x = q y + rem and |N(rem)| < |N(y)|; y nonzero. */
void dw_zr2_divmod(dw_zroot2 *q, dw_zroot2 *rem, const dw_zroot2 *x,
	const dw_zroot2 *y);
/* If y divides x, set q = x / y and return 1; else return 0 (q untouched). */
int dw_zr2_divexact(dw_zroot2 *q, const dw_zroot2 *x, const dw_zroot2 *y);
/* A greatest common divisor (defined up to a unit). */
void dw_zr2_gcd(dw_zroot2 *g, const dw_zroot2 *x, const dw_zroot2 *y);
/* Extended gcd: g = s x + t y. */
void dw_zr2_gcdext(dw_zroot2 *g, dw_zroot2 *s, dw_zroot2 *t,
	const dw_zroot2 *x, const dw_zroot2 *y);
/* lambda = 1 + sqrt2, the fundamental unit; r = x * lambda^n (n any sign). */
void dw_zr2_mul_lambda_pow(dw_zroot2 *r, const dw_zroot2 *x, long n);
/* If x is a unit (norm +-1), r = 1/x and return 1; else 0. */
int dw_zr2_unit_inverse(dw_zroot2 *r, const dw_zroot2 *x);
double dw_zr2_to_double(const dw_zroot2 *x);

/* ---- Z[omega] ---- */
void dw_zw_init(dw_zomega *x);
void dw_zw_clear(dw_zomega *x);
void dw_zw_set(dw_zomega *r, const dw_zomega *x);
void dw_zw_set_si(dw_zomega *r, long c0, long c1, long c2, long c3);
void dw_zw_from_zr2(dw_zomega *r, const dw_zroot2 *x);
/* If x is real (an element of Z[sqrt2]) set r and return 1, else 0. */
int dw_zw_to_zr2(dw_zroot2 *r, const dw_zomega *x);
void dw_zw_add(dw_zomega *r, const dw_zomega *x, const dw_zomega *y);
void dw_zw_sub(dw_zomega *r, const dw_zomega *x, const dw_zomega *y);
void dw_zw_mul(dw_zomega *r, const dw_zomega *x, const dw_zomega *y);
void dw_zw_neg(dw_zomega *r, const dw_zomega *x);
void dw_zw_conj(dw_zomega *r, const dw_zomega *x);      /* dagger */
void dw_zw_bullet(dw_zomega *r, const dw_zomega *x);    /* sqrt2 -> -sqrt2 */
/* r = x * w^j for any integer j. */
void dw_zw_mul_omega_pow(dw_zomega *r, const dw_zomega *x, long j);
void dw_zw_mul_sqrt2(dw_zomega *r, const dw_zomega *x);
int dw_zw_div_by_sqrt2(const dw_zomega *x);
void dw_zw_div_sqrt2(dw_zomega *r, const dw_zomega *x); /* exact */
int dw_zw_is_zero(const dw_zomega *x);
int dw_zw_equal(const dw_zomega *x, const dw_zomega *y);
/* x^dagger x, an element of Z[sqrt2] (nonnegative, as is its bullet). */
void dw_zw_sqnorm(dw_zroot2 *r, const dw_zomega *x);
/* Absolute norm N(x) = product of the four conjugates, a nonnegative
 * integer; N(xy) = N(x) N(y). */
void dw_zw_norm(mpz_t n, const dw_zomega *x);
/* Euclidean division: x = q y + rem with N(rem) < N(y).  y nonzero.
 * Returns 0 on success, 1 if no decreasing remainder was found. */
int dw_zw_divmod(dw_zomega *q, dw_zomega *rem, const dw_zomega *x,
	const dw_zomega *y);
int dw_zw_divexact(dw_zomega *q, const dw_zomega *x, const dw_zomega *y);
/* A gcd (up to a unit); returns 0, or 1 if a Euclidean step failed. */
int dw_zw_gcd(dw_zomega *g, const dw_zomega *x, const dw_zomega *y);

/* ---- D[omega] ---- */
void dw_dw_init(dw_domega *x);
void dw_dw_clear(dw_domega *x);
void dw_dw_set(dw_domega *r, const dw_domega *x);
/* r = n / sqrt2^k, reduced; k may be any integer (negative multiplies). */
void dw_dw_set_zw(dw_domega *r, const dw_zomega *n, long k);
void dw_dw_set_si(dw_domega *r, long c0, long c1, long c2, long c3, long k);
void dw_dw_reduce(dw_domega *x);
void dw_dw_add(dw_domega *r, const dw_domega *x, const dw_domega *y);
void dw_dw_sub(dw_domega *r, const dw_domega *x, const dw_domega *y);
void dw_dw_mul(dw_domega *r, const dw_domega *x, const dw_domega *y);
void dw_dw_conj(dw_domega *r, const dw_domega *x);
void dw_dw_mul_omega_pow(dw_domega *r, const dw_domega *x, long j);
int dw_dw_equal(const dw_domega *x, const dw_domega *y);
int dw_dw_is_zero(const dw_domega *x);
/* Complex value in long double (for printing and quick checks only). */
void dw_dw_to_ld(const dw_domega *x, long double *re, long double *im);

#endif
