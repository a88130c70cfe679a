/* grid_solve.h - the grid problems of z-rotation synthesis.
 *
 * Takes: theta and eps.  Gives, for each denominator exponent k, the
 * points a in Z[omega] with a / sqrt2^k in the eps-region
 * R_eps = {|u| <= 1, Re(u conj(z)) >= 1 - eps^2/2}, z = e^{-i theta/2} (up
 * to a relative slack of 2^-(prec/2); an enclosing ellipse E drives the
 * scan) and a_bullet in the disk of radius sqrt2^k; plus the MPFR
 * membership test for R_eps and the achieved error (grid_solve.c).  Also
 * the one-dimensional grid problem over Z[sqrt2] (grid_1d.c). */
#ifndef DWELL_BACK_GRID_SOLVE_H
#define DWELL_BACK_GRID_SOLVE_H

#include <stdint.h>

#include <gmp.h>
#include <mpfr.h>

#include "back/ring.h"
#include "dwell/diag.h"

/* Visitors return 0 to continue, 1 to stop the enumeration. */
typedef int (*dw_grid1_visit)(const dw_zroot2 *x, void *user);
typedef int (*dw_grid2_visit)(const dw_zomega *a, void *user);

/* All x = a + b sqrt2 with x in [x0, x1] and x_bullet in [y0, y1].
 * Returns 1 if the visitor stopped, 0 when done, -1 when more than
 * max_points candidates would be scanned. */
int dw_grid1_solve(const mpfr_t x0, const mpfr_t x1, const mpfr_t y0,
	const mpfr_t y1, uint64_t max_points, dw_grid1_visit visit, void *user);

typedef struct dw_grid dw_grid;

/* The target angle is theta - shift * pi/4 (shift 0 or 1), computed in
 * MPFR from the exact binary value of theta. */
int dw_grid_create(dw_grid **out, double theta, int shift, double eps,
	dw_error *err);
void dw_grid_destroy(dw_grid *g);

/* Enumerate the candidates of exponent k (each point once; points
 * divisible by sqrt2 included; the caller filters with dw_grid_in_region).  Returns 1 if the visitor stopped, 0 when
 * exhausted, -1 when the candidate count exceeded max_points. */
int dw_grid_level(dw_grid *g, int k, uint64_t max_points,
	dw_grid2_visit visit, void *user);

/* Is a / sqrt2^k in R_eps?  (|u| <= 1 is checked exactly by the caller.) */
int dw_grid_in_region(dw_grid *g, const dw_zomega *a, int k);

/* sqrt(2 - 2 Re(u conj(z))) for u = a / sqrt2^k with |u|^2 + |t|^2 = 1:
 * the operator-norm distance of [[u, -t^dagger], [t, u^dagger]] to
 * rz(theta). */
double dw_grid_error(dw_grid *g, const dw_zomega *a, int k);

/* Diagnostics of the grid operator chosen (for tests and docs): the
 * product of the two projected widths of the regions along the chosen
 * direction, relative to the square root of the product of their areas. */
double dw_grid_reduction_ratio(const dw_grid *g);

#endif
