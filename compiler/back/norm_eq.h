/* norm_eq.h - the norm equation t^dagger t = xi over Z[omega], and the
 * integer factoring it needs (trial division, then Pollard's rho with
 * Brent's cycle search, with a bounded effort).
 *
 * Takes: xi in Z[sqrt2] with xi >= 0 and xi_bullet >= 0.  Gives: t in
 * Z[omega] with t^dagger t = xi exactly, or "no solution / gave up". */
#ifndef DWELL_BACK_NORM_EQ_H
#define DWELL_BACK_NORM_EQ_H

#include <stdint.h>

#include <gmp.h>

#include "back/ring.h"

/* Prime factorisation of a positive integer (distinct primes, ascending
 * order not guaranteed). */
typedef struct dw_factors {
	mpz_t *prime;
	unsigned long *exp;
	size_t count, cap;
} dw_factors;

void dw_factors_init(dw_factors *f);
void dw_factors_clear(dw_factors *f);

/* Factor n > 0.  effort bounds the total number of Pollard rho steps.
 * Returns 1 when every factor was found (primes are "probable primes" with
 * 30 Miller-Rabin rounds), 0 when the effort ran out. */
int dw_factor(dw_factors *out, const mpz_t n, uint32_t effort);

/* Outcome of dw_norm_solve. */
enum {
	DW_NORM_SOLVED = 1,
	DW_NORM_NO_SOLUTION = 0,   /* a prime 7 mod 8 to an odd power, or xi
	                              not doubly positive */
	DW_NORM_GAVE_UP = -1       /* factoring effort exhausted */
};

/* Solve t^dagger t = xi.  On DW_NORM_SOLVED t holds a solution. */
int dw_norm_solve(dw_zomega *t, const dw_zroot2 *xi, uint32_t effort);

#endif
