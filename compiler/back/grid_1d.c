/* grid_1d.c - the one-dimensional grid problem over Z[sqrt2].
 *
 * Takes: intervals [x0, x1] and [y0, y1] (MPFR).  Gives: every
 * x = a + b sqrt2 in Z[sqrt2] with x in [x0, x1] and x_bullet = a - b sqrt2
 * in [y0, y1], to a visitor.
 *
 * Method (as in "Optimal ancilla-free Clifford+T approximation of
 * z-rotations", QIC 16(11&12), 2016, the one-dimensional grid problem):
 * multiply by lambda^n (lambda = 1 + sqrt2, lambda_bullet = -1/lambda), which
 * maps Z[sqrt2] onto itself, so that both intervals have about the same
 * length; then 2a = x + x_bullet runs over an interval of integers, and for
 * each a the admissible b form the intersection of two intervals.  Work is
 * the number of solutions plus about sqrt(|x1 - x0| |y1 - y0|) + 1. */
#include "back/grid_solve.h"

#include <math.h>

int dw_grid1_solve(const mpfr_t x0, const mpfr_t x1, const mpfr_t y0,
	const mpfr_t y1, uint64_t max_points, dw_grid1_visit visit, void *user)
{
	if (mpfr_cmp(x1, x0) < 0 || mpfr_cmp(y1, y0) < 0)
		return 0;
	mpfr_prec_t prec = mpfr_get_prec(x0);
	mpfr_t lx, ly, lam, sc, X0, X1, Y0, Y1, t, u, lo, hi, r2;
	mpfr_inits2(prec, lx, ly, lam, sc, X0, X1, Y0, Y1, t, u, lo, hi, r2, (mpfr_ptr)0);
	mpz_t a, amax, b, bmax;
	mpz_inits(a, amax, b, bmax, NULL);
	dw_zroot2 x, xs;
	dw_zr2_init(&x);
	dw_zr2_init(&xs);
	int status = 0;

	/* scale by lambda^n so that both intervals have similar lengths:
	 * x' = lambda^n x, x'_bullet = (-1/lambda)^n x_bullet */
	mpfr_sqrt_ui(r2, 2, MPFR_RNDN);
	mpfr_add_ui(lam, r2, 1, MPFR_RNDN);
	mpfr_sub(lx, x1, x0, MPFR_RNDN);
	mpfr_sub(ly, y1, y0, MPFR_RNDN);
	long n = 0;
	if (mpfr_zero_p(lx) || mpfr_zero_p(ly)) {
		n = 0;
	} else {
		mpfr_div(t, ly, lx, MPFR_RNDN);
		mpfr_log(t, t, MPFR_RNDN);
		mpfr_log(u, lam, MPFR_RNDN);
		mpfr_div(t, t, u, MPFR_RNDN);
		double d = mpfr_get_d(t, MPFR_RNDN) / 2.0;
		if (d > 1e6 || d < -1e6) {
			status = -1;
			goto done;
		}
		n = lround(d);
	}
	mpfr_pow_si(sc, lam, n, MPFR_RNDN);
	mpfr_mul(X0, x0, sc, MPFR_RNDN);
	mpfr_mul(X1, x1, sc, MPFR_RNDN);
	mpfr_pow_si(sc, lam, -n, MPFR_RNDN);
	if (n % 2) {
		mpfr_mul(Y0, y1, sc, MPFR_RNDN);
		mpfr_neg(Y0, Y0, MPFR_RNDN);
		mpfr_mul(Y1, y0, sc, MPFR_RNDN);
		mpfr_neg(Y1, Y1, MPFR_RNDN);
	} else {
		mpfr_mul(Y0, y0, sc, MPFR_RNDN);
		mpfr_mul(Y1, y1, sc, MPFR_RNDN);
	}
	/* x' = a + b sqrt2: 2a = x' + x'_bullet in [X0 + Y0, X1 + Y1] */
	mpfr_add(t, X0, Y0, MPFR_RNDD);
	mpfr_div_2ui(t, t, 1, MPFR_RNDD);
	mpfr_get_z(a, t, MPFR_RNDU);
	mpfr_add(t, X1, Y1, MPFR_RNDU);
	mpfr_div_2ui(t, t, 1, MPFR_RNDU);
	mpfr_get_z(amax, t, MPFR_RNDD);
	uint64_t scanned = 0;
	for (; mpz_cmp(a, amax) <= 0 && status == 0; mpz_add_ui(a, a, 1)) {
		if (++scanned > max_points) {
			status = -1;
			break;
		}
		/* b sqrt2 in [X0 - a, X1 - a] and in [a - Y1, a - Y0] */
		mpfr_sub_z(lo, X0, a, MPFR_RNDD);
		mpfr_sub_z(t, Y1, a, MPFR_RNDU);
		mpfr_neg(t, t, MPFR_RNDD);
		if (mpfr_cmp(t, lo) > 0)
			mpfr_set(lo, t, MPFR_RNDD);
		mpfr_sub_z(hi, X1, a, MPFR_RNDU);
		mpfr_sub_z(t, Y0, a, MPFR_RNDD);
		mpfr_neg(t, t, MPFR_RNDU);
		if (mpfr_cmp(t, hi) < 0)
			mpfr_set(hi, t, MPFR_RNDU);
		if (mpfr_cmp(hi, lo) < 0)
			continue;
		mpfr_div(lo, lo, r2, MPFR_RNDD);
		mpfr_div(hi, hi, r2, MPFR_RNDU);
		mpfr_get_z(b, lo, MPFR_RNDU);
		mpfr_get_z(bmax, hi, MPFR_RNDD);
		for (; mpz_cmp(b, bmax) <= 0; mpz_add_ui(b, b, 1)) {
			if (++scanned > max_points) {
				status = -1;
				break;
			}
			mpz_set(xs.a, a);
			mpz_set(xs.b, b);
			dw_zr2_mul_lambda_pow(&x, &xs, -n);
			if (visit(&x, user)) {
				status = 1;
				break;
			}
		}
	}
done:
	mpfr_clears(lx, ly, lam, sc, X0, X1, Y0, Y1, t, u, lo, hi, r2, (mpfr_ptr)0);
	mpz_clears(a, amax, b, bmax, NULL);
	dw_zr2_clear(&x);
	dw_zr2_clear(&xs);
	return status;
}

