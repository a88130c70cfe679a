/* grid_solve.c - the two-dimensional grid problem over Z[omega] for
 * z-rotation synthesis (the one-dimensional one is in grid_1d.c).
 *
 * Takes: theta, eps; a denominator exponent k.  Gives: the candidates a in
 * Z[omega] with a in sqrt2^k E and a_bullet in sqrt2^k D (E an ellipse
 * around the eps-region, D the unit disk), as in "Optimal ancilla-free
 * Clifford+T approximation of z-rotations" (QIC 16(11&12), 2016).
 *
 * Coordinates.  Z[omega] = Z[sqrt2] + Z[sqrt2] w, so a = v1 + v2 w with
 * v = (v1, v2) in Z[sqrt2]^2; a_bullet = v1_bullet - v2_bullet w.  Both
 * regions become ellipses in v-coordinates: (v - c)^T Dm (v - c) <= 1 for
 * a and v_bullet^T Dl v_bullet <= 1 for a_bullet.
 *
 * Grid operator.  A grid operator is an invertible 2x2 matrix M over
 * Z[sqrt2] with unit determinant; v = M (x, y) maps Z[sqrt2]^2 onto itself
 * and acts on the bullet side by M_bullet.  The paper reaches upright
 * regions by a sequence of elementary grid operators that reduce the skew
 * of the ellipse pair.  We choose the operator in one step instead: its
 * second dual row f in Z[sqrt2]^2 is a short vector of the four-dimensional
 * lattice {(f, f_bullet)} under the form s f^T Dm^-1 f + f_b^T Dl^-1 f_b / s
 * (found by LLL reduction, s balancing the two determinants), made
 * primitive and completed to M^-1 = [[*, *], f] by the extended Euclidean
 * algorithm in Z[sqrt2].  Then y = f.v ranges over a 1-D grid problem whose
 * two intervals (the projections of both ellipses on f) have a product of
 * lengths within a constant of the square root of the product of the
 * areas, and for each y the slice of both ellipses gives a 1-D problem for
 * x.  This is the "upright" enumeration: its work is proportional to the
 * number of lattice points plus a constant.
 *
 * The 1-D problem is in grid_1d.c.
 *
 * Arithmetic: MPFR at 256 + 10 log2(1/eps) bits, enough for the eps^2-thin
 * region at eps = 1e-15 and far beyond (the region's width is eps^2/2). */
#include "back/grid_solve.h"

#include <math.h>
#include <stdlib.h>

/* ---------------- the two-dimensional problem ---------------- */

struct dw_grid {
	mpfr_prec_t prec;
	mpfr_t zr, zi, eps, rt2;
	mpfr_t dm[2][2], dl[2][2];   /* the two ellipse forms (k = 0) */
	mpfr_t c[2];                 /* centre of the a-ellipse (k = 0) */
	mpfr_t dmi[2][2], dli[2][2]; /* their inverses */
	dw_zroot2 e1[2], e2[2], f[2];/* grid operator columns; dual row f */
	mpfr_t fe[2], fbe[2];        /* f and f_bullet as reals */
	mpfr_t e1v[2], e2v[2], e1b[2], e2b[2];
	mpfr_t sa, ca, sb;           /* projections on f (k = 0) */
	mpfr_t gm[2][2];             /* |a|^2 = v^T gm v */
	mpfr_t q[2], lim;            /* Re(a conj z) = q.v; bound 1 - eps^2/2 */
	double ratio;
};

static void zr2_to_mpfr(mpfr_t r, const dw_zroot2 *x, const mpfr_t rt2)
{
	mpfr_t t;
	mpfr_init2(t, mpfr_get_prec(r));
	mpfr_mul_z(t, rt2, x->b, MPFR_RNDN);
	mpfr_set_z(r, x->a, MPFR_RNDN);
	mpfr_add(r, r, t, MPFR_RNDN);
	mpfr_clear(t);
}

static void zr2_bullet_to_mpfr(mpfr_t r, const dw_zroot2 *x, const mpfr_t rt2)
{
	mpfr_t t;
	mpfr_init2(t, mpfr_get_prec(r));
	mpfr_mul_z(t, rt2, x->b, MPFR_RNDN);
	mpfr_set_z(r, x->a, MPFR_RNDN);
	mpfr_sub(r, r, t, MPFR_RNDN);
	mpfr_clear(t);
}

/* r = u^T M v for 2-vectors */
static void quad(mpfr_t r, mpfr_t (*m)[2], mpfr_t *u, mpfr_t *v)
{
	mpfr_t t, acc;
	mpfr_inits2(mpfr_get_prec(r), t, acc, (mpfr_ptr)0);
	mpfr_set_ui(acc, 0, MPFR_RNDN);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++) {
			mpfr_mul(t, m[i][j], u[i], MPFR_RNDN);
			mpfr_mul(t, t, v[j], MPFR_RNDN);
			mpfr_add(acc, acc, t, MPFR_RNDN);
		}
	mpfr_set(r, acc, MPFR_RNDN);
	mpfr_clears(t, acc, (mpfr_ptr)0);
}

/* ---- LLL on the lattice {(f, f_bullet)}, f in Z[sqrt2]^2 ---- */

typedef struct lll_ctx {
	mpfr_prec_t prec;
	mpfr_t wm[2][2], wl[2][2];   /* weighted forms s Dm^-1, Dl^-1 / s */
	mpfr_t rt2;
} lll_ctx;

/* integer coefficient vector -> Z[sqrt2]^2 */
static void coef_to_vec(dw_zroot2 f[2], mpz_t c[4])
{
	mpz_set(f[0].a, c[0]);
	mpz_set(f[0].b, c[1]);
	mpz_set(f[1].a, c[2]);
	mpz_set(f[1].b, c[3]);
}

/* real coordinates (f1, f2, f1_bullet, f2_bullet) of a coefficient vector */
static void lll_vector(lll_ctx *L, mpfr_t out[4], mpz_t c[4])
{
	dw_zroot2 f[2];
	dw_zr2_init(&f[0]);
	dw_zr2_init(&f[1]);
	coef_to_vec(f, c);
	for (int i = 0; i < 2; i++) {
		zr2_to_mpfr(out[i], &f[i], L->rt2);
		zr2_bullet_to_mpfr(out[2 + i], &f[i], L->rt2);
	}
	dw_zr2_clear(&f[0]);
	dw_zr2_clear(&f[1]);
}

static void lll_inner(mpfr_t r, lll_ctx *L, mpfr_t u[4], mpfr_t v[4])
{
	mpfr_t t;
	mpfr_init2(t, L->prec);
	quad(r, L->wm, u, v);
	quad(t, L->wl, u + 2, v + 2);
	mpfr_add(r, r, t, MPFR_RNDN);
	mpfr_clear(t);
}

/* LLL (delta = 0.99) of the four basis vectors c[0..3]; the Gram row of
 * a vector is recomputed from its exact integer coefficients whenever the
 * vector changes. */
static void lll_reduce(lll_ctx *L, mpz_t c[4][4])
{
	mpfr_prec_t p = L->prec;
	mpfr_t G[4][4], mu[4][4], B[4], V[4][4], t, q;
	mpz_t qz;
	for (int i = 0; i < 4; i++) {
		for (int j = 0; j < 4; j++)
			mpfr_inits2(p, G[i][j], mu[i][j], V[i][j], (mpfr_ptr)0);
		mpfr_init2(B[i], p);
	}
	mpfr_inits2(p, t, q, (mpfr_ptr)0);
	mpz_init(qz);
	for (int i = 0; i < 4; i++)
		lll_vector(L, V[i], c[i]);
	for (int i = 0; i < 4; i++)
		for (int j = 0; j <= i; j++) {
			lll_inner(G[i][j], L, V[i], V[j]);
			mpfr_set(G[j][i], G[i][j], MPFR_RNDN);
		}
	int k = 1, iterations = 0;
	for (;;) {
		/* Gram-Schmidt from the Gram matrix */
		for (int i = 0; i < 4; i++) {
			for (int j = 0; j < i; j++) {
				mpfr_set(mu[i][j], G[i][j], MPFR_RNDN);
				for (int l = 0; l < j; l++) {
					mpfr_mul(t, mu[j][l], mu[i][l], MPFR_RNDN);
					mpfr_mul(t, t, B[l], MPFR_RNDN);
					mpfr_sub(mu[i][j], mu[i][j], t, MPFR_RNDN);
				}
				mpfr_div(mu[i][j], mu[i][j], B[j], MPFR_RNDN);
			}
			mpfr_set(B[i], G[i][i], MPFR_RNDN);
			for (int j = 0; j < i; j++) {
				mpfr_mul(t, mu[i][j], mu[i][j], MPFR_RNDN);
				mpfr_mul(t, t, B[j], MPFR_RNDN);
				mpfr_sub(B[i], B[i], t, MPFR_RNDN);
			}
		}
		if (k >= 4 || ++iterations > 20000)
			break;
		/* size-reduce b_k against b_{k-1} .. b_0 */
		int changed = 0;
		for (int j = k - 1; j >= 0; j--) {
			mpfr_abs(t, mu[k][j], MPFR_RNDN);
			if (mpfr_cmp_d(t, 0.5) > 0) {
				mpfr_round(q, mu[k][j]);
				mpfr_get_z(qz, q, MPFR_RNDN);
				for (int l = 0; l < 4; l++)
					mpz_submul(c[k][l], qz, c[j][l]);
				for (int l = 0; l < j; l++) {
					mpfr_mul(t, q, mu[j][l], MPFR_RNDN);
					mpfr_sub(mu[k][l], mu[k][l], t, MPFR_RNDN);
				}
				mpfr_sub(mu[k][j], mu[k][j], q, MPFR_RNDN);
				changed = 1;
			}
		}
		if (changed) {
			lll_vector(L, V[k], c[k]);
			for (int j = 0; j < 4; j++) {
				lll_inner(G[k][j], L, V[k], V[j]);
				mpfr_set(G[j][k], G[k][j], MPFR_RNDN);
			}
			continue;
		}
		/* Lovasz condition */
		mpfr_mul(t, mu[k][k - 1], mu[k][k - 1], MPFR_RNDN);
		mpfr_d_sub(t, 0.99, t, MPFR_RNDN);
		mpfr_mul(t, t, B[k - 1], MPFR_RNDN);
		if (mpfr_cmp(B[k], t) >= 0) {
			k++;
		} else {
			for (int l = 0; l < 4; l++) {
				mpz_swap(c[k][l], c[k - 1][l]);
				mpfr_swap(V[k][l], V[k - 1][l]);
			}
			for (int l = 0; l < 4; l++) {
				mpfr_swap(G[k][l], G[k - 1][l]);
			}
			for (int l = 0; l < 4; l++) {
				mpfr_swap(G[l][k], G[l][k - 1]);
			}
			k = k > 1 ? k - 1 : 1;
		}
	}
	for (int i = 0; i < 4; i++) {
		for (int j = 0; j < 4; j++)
			mpfr_clears(G[i][j], mu[i][j], V[i][j], (mpfr_ptr)0);
		mpfr_clear(B[i]);
	}
	mpfr_clears(t, q, (mpfr_ptr)0);
	mpz_clear(qz);
}

static void inv2(mpfr_t (*out)[2], mpfr_t (*m)[2], mpfr_prec_t p)
{
	mpfr_t det, t;
	mpfr_inits2(p, det, t, (mpfr_ptr)0);
	mpfr_mul(det, m[0][0], m[1][1], MPFR_RNDN);
	mpfr_mul(t, m[0][1], m[1][0], MPFR_RNDN);
	mpfr_sub(det, det, t, MPFR_RNDN);
	mpfr_div(out[0][0], m[1][1], det, MPFR_RNDN);
	mpfr_div(out[1][1], m[0][0], det, MPFR_RNDN);
	mpfr_div(out[0][1], m[0][1], det, MPFR_RNDN);
	mpfr_neg(out[0][1], out[0][1], MPFR_RNDN);
	mpfr_set(out[1][0], out[0][1], MPFR_RNDN);
	mpfr_clears(det, t, (mpfr_ptr)0);
}

static void det2(mpfr_t d, mpfr_t (*m)[2])
{
	mpfr_t t;
	mpfr_init2(t, mpfr_get_prec(d));
	mpfr_mul(d, m[0][0], m[1][1], MPFR_RNDN);
	mpfr_mul(t, m[0][1], m[1][0], MPFR_RNDN);
	mpfr_sub(d, d, t, MPFR_RNDN);
	mpfr_clear(t);
}

/* Choose the grid operator: f short in the dual pair, e1 = (-f2, f1),
 * e2 with f.e2 = 1. */
static int choose_operator(dw_grid *g)
{
	mpfr_prec_t p = g->prec;
	lll_ctx L;
	L.prec = p / 2 + 64;
	mpfr_init2(L.rt2, L.prec);
	mpfr_set(L.rt2, g->rt2, MPFR_RNDN);
	mpfr_t s, da, db, t, best, fa, fb;
	mpfr_inits2(p, s, da, db, t, best, fa, fb, (mpfr_ptr)0);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++)
			mpfr_inits2(L.prec, L.wm[i][j], L.wl[i][j], (mpfr_ptr)0);
	/* s = (det Dl^-1 / det Dm^-1)^(1/4) balances the determinants */
	det2(da, g->dmi);
	det2(db, g->dli);
	mpfr_div(s, db, da, MPFR_RNDN);
	mpfr_sqrt(s, s, MPFR_RNDN);
	mpfr_sqrt(s, s, MPFR_RNDN);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++) {
			mpfr_mul(L.wm[i][j], g->dmi[i][j], s, MPFR_RNDN);
			mpfr_div(L.wl[i][j], g->dli[i][j], s, MPFR_RNDN);
		}
	mpz_t c[4][4];
	for (int i = 0; i < 4; i++)
		for (int j = 0; j < 4; j++)
			mpz_init_set_ui(c[i][j], i == j);
	lll_reduce(&L, c);

	/* the basis vector with the smallest product of projections */
	dw_zroot2 fv[2], fbest[2];
	for (int i = 0; i < 2; i++) {
		dw_zr2_init(&fv[i]);
		dw_zr2_init(&fbest[i]);
	}
	mpfr_t u[2], ub[2];
	for (int i = 0; i < 2; i++)
		mpfr_inits2(p, u[i], ub[i], (mpfr_ptr)0);
	int have = 0;
	for (int v = 0; v < 4; v++) {
		coef_to_vec(fv, c[v]);
		if (dw_zr2_is_zero(&fv[0]) && dw_zr2_is_zero(&fv[1]))
			continue;
		for (int i = 0; i < 2; i++) {
			zr2_to_mpfr(u[i], &fv[i], g->rt2);
			zr2_bullet_to_mpfr(ub[i], &fv[i], g->rt2);
		}
		quad(fa, g->dmi, u, u);
		quad(fb, g->dli, ub, ub);
		mpfr_mul(t, fa, fb, MPFR_RNDN);
		if (!have || mpfr_cmp(t, best) < 0) {
			mpfr_set(best, t, MPFR_RNDN);
			dw_zr2_set(&fbest[0], &fv[0]);
			dw_zr2_set(&fbest[1], &fv[1]);
			have = 1;
		}
	}
	/* make f primitive, then complete: f1 a + f2 b = 1 */
	dw_zroot2 gg, sa, sb, q, uinv;
	dw_zr2_init(&gg);
	dw_zr2_init(&sa);
	dw_zr2_init(&sb);
	dw_zr2_init(&q);
	dw_zr2_init(&uinv);
	int ok = have;
	if (ok) {
		dw_zr2_gcd(&gg, &fbest[0], &fbest[1]);
		ok = dw_zr2_divexact(&fbest[0], &fbest[0], &gg)
			&& dw_zr2_divexact(&fbest[1], &fbest[1], &gg);
	}
	if (ok) {
		dw_zr2_gcdext(&gg, &sa, &sb, &fbest[0], &fbest[1]);
		ok = dw_zr2_unit_inverse(&uinv, &gg);
	}
	if (ok) {
		dw_zr2_mul(&sa, &sa, &uinv);
		dw_zr2_mul(&sb, &sb, &uinv);
		dw_zr2_set(&g->f[0], &fbest[0]);
		dw_zr2_set(&g->f[1], &fbest[1]);
		dw_zr2_neg(&g->e1[0], &fbest[1]);
		dw_zr2_set(&g->e1[1], &fbest[0]);
		dw_zr2_set(&g->e2[0], &sa);
		dw_zr2_set(&g->e2[1], &sb);
		for (int i = 0; i < 2; i++) {
			zr2_to_mpfr(g->fe[i], &g->f[i], g->rt2);
			zr2_bullet_to_mpfr(g->fbe[i], &g->f[i], g->rt2);
			zr2_to_mpfr(g->e1v[i], &g->e1[i], g->rt2);
			zr2_bullet_to_mpfr(g->e1b[i], &g->e1[i], g->rt2);
			zr2_to_mpfr(g->e2v[i], &g->e2[i], g->rt2);
			zr2_bullet_to_mpfr(g->e2b[i], &g->e2[i], g->rt2);
		}
		quad(g->sa, g->dmi, g->fe, g->fe);
		mpfr_sqrt(g->sa, g->sa, MPFR_RNDN);
		quad(g->sb, g->dli, g->fbe, g->fbe);
		mpfr_sqrt(g->sb, g->sb, MPFR_RNDN);
		mpfr_mul(g->ca, g->fe[0], g->c[0], MPFR_RNDN);
		mpfr_mul(t, g->fe[1], g->c[1], MPFR_RNDN);
		mpfr_add(g->ca, g->ca, t, MPFR_RNDN);
		/* ratio: (2 sa)(2 sb) / sqrt(area_a area_b / pi^2), areas
		 * pi / sqrt(det) */
		mpfr_mul(t, g->sa, g->sb, MPFR_RNDN);
		mpfr_mul_ui(t, t, 4, MPFR_RNDN);
		det2(da, g->dm);
		det2(db, g->dl);
		mpfr_mul(da, da, db, MPFR_RNDN);
		mpfr_sqrt(da, da, MPFR_RNDN);
		mpfr_sqrt(da, da, MPFR_RNDN);
		mpfr_mul(t, t, da, MPFR_RNDN);
		g->ratio = mpfr_get_d(t, MPFR_RNDN);
	}
	for (int i = 0; i < 2; i++) {
		dw_zr2_clear(&fv[i]);
		dw_zr2_clear(&fbest[i]);
		mpfr_clears(u[i], ub[i], (mpfr_ptr)0);
	}
	dw_zr2_clear(&gg);
	dw_zr2_clear(&sa);
	dw_zr2_clear(&sb);
	dw_zr2_clear(&q);
	dw_zr2_clear(&uinv);
	for (int i = 0; i < 4; i++)
		for (int j = 0; j < 4; j++)
			mpz_clear(c[i][j]);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++)
			mpfr_clears(L.wm[i][j], L.wl[i][j], (mpfr_ptr)0);
	mpfr_clear(L.rt2);
	mpfr_clears(s, da, db, t, best, fa, fb, (mpfr_ptr)0);
	return ok;
}

static void grid_init_fields(dw_grid *g)
{
	mpfr_prec_t p = g->prec;
	mpfr_inits2(p, g->zr, g->zi, g->eps, g->rt2, g->sa, g->ca, g->sb, g->lim, (mpfr_ptr)0);
	for (int i = 0; i < 2; i++) {
		for (int j = 0; j < 2; j++)
			mpfr_inits2(p, g->dm[i][j], g->dl[i][j], g->dmi[i][j], g->dli[i][j],
				g->gm[i][j], (mpfr_ptr)0);
		mpfr_inits2(p, g->q[i], g->c[i], g->fe[i], g->fbe[i], g->e1v[i], g->e2v[i], g->e1b[i],
			g->e2b[i], (mpfr_ptr)0);
		dw_zr2_init(&g->e1[i]);
		dw_zr2_init(&g->e2[i]);
		dw_zr2_init(&g->f[i]);
	}
}

void dw_grid_destroy(dw_grid *g)
{
	if (!g)
		return;
	mpfr_clears(g->zr, g->zi, g->eps, g->rt2, g->sa, g->ca, g->sb, g->lim, (mpfr_ptr)0);
	for (int i = 0; i < 2; i++) {
		for (int j = 0; j < 2; j++)
			mpfr_clears(g->dm[i][j], g->dl[i][j], g->dmi[i][j], g->dli[i][j],
				g->gm[i][j], (mpfr_ptr)0);
		mpfr_clears(g->q[i], g->c[i], g->fe[i], g->fbe[i], g->e1v[i], g->e2v[i], g->e1b[i],
			g->e2b[i], (mpfr_ptr)0);
		dw_zr2_clear(&g->e1[i]);
		dw_zr2_clear(&g->e2[i]);
		dw_zr2_clear(&g->f[i]);
	}
	free(g);
}

int dw_grid_create(dw_grid **out, double theta, int shift, double eps,
	dw_error *err)
{
	*out = NULL;
	if (!isfinite(theta) || !(eps > 0) || !(eps < 1))
		return dw_fail(err, DW_EINPUT, "grid: need finite theta and 0 < eps < 1");
	dw_grid *g = dw_alloc(err, 1, sizeof *g);
	if (!g)
		return DW_EINTERNAL;
	g->prec = 256 + (mpfr_prec_t)(10.0 * log2(1.0 / eps));
	grid_init_fields(g);
	mpfr_prec_t p = g->prec;
	mpfr_t w, h, as, at, sc, m[2], n[2], t, E[2][2], Ei[2][2], r;
	mpfr_inits2(p, w, h, as, at, sc, t, r, m[0], m[1], n[0], n[1], (mpfr_ptr)0);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++)
			mpfr_inits2(p, E[i][j], Ei[i][j], (mpfr_ptr)0);

	mpfr_sqrt_ui(g->rt2, 2, MPFR_RNDN);
	mpfr_set_d(t, theta, MPFR_RNDN);            /* exact: theta is binary */
	if (shift) {
		mpfr_const_pi(r, MPFR_RNDN);
		mpfr_mul_si(r, r, shift, MPFR_RNDN);
		mpfr_div_2ui(r, r, 2, MPFR_RNDN);
		mpfr_sub(t, t, r, MPFR_RNDN);
	}
	mpfr_div_2ui(t, t, 1, MPFR_RNDN);
	mpfr_sin_cos(g->zi, g->zr, t, MPFR_RNDN);
	mpfr_neg(g->zi, g->zi, MPFR_RNDN);          /* z = e^{-i theta/2} */
	mpfr_set_d(g->eps, eps, MPFR_RNDN);
	/* segment height w = eps^2/2, half chord h = sqrt(2w - w^2) */
	mpfr_sqr(w, g->eps, MPFR_RNDN);
	mpfr_div_2ui(w, w, 1, MPFR_RNDN);
	mpfr_mul_2ui(h, w, 1, MPFR_RNDN);
	mpfr_sqr(t, w, MPFR_RNDN);
	mpfr_sub(h, h, t, MPFR_RNDN);
	mpfr_sqrt(h, h, MPFR_RNDN);
	/* enclosing ellipse: centre (1 - w/2) z, semi-axes sqrt2 w/2 along z
	 * and sqrt2 h across (it passes through the corners of the segment's
	 * bounding rectangle) */
	mpfr_div_2ui(t, w, 1, MPFR_RNDN);
	mpfr_mul(as, t, g->rt2, MPFR_RNDN);
	mpfr_mul(at, h, g->rt2, MPFR_RNDN);
	mpfr_ui_sub(sc, 1, t, MPFR_RNDN);
	mpfr_set(m[0], g->zr, MPFR_RNDN);
	mpfr_set(m[1], g->zi, MPFR_RNDN);
	mpfr_neg(n[0], g->zi, MPFR_RNDN);
	mpfr_set(n[1], g->zr, MPFR_RNDN);
	/* E = m m^T / as^2 + n n^T / at^2; E^-1 = as^2 m m^T + at^2 n n^T */
	mpfr_t as2, at2, ias2, iat2;
	mpfr_inits2(p, as2, at2, ias2, iat2, (mpfr_ptr)0);
	mpfr_sqr(as2, as, MPFR_RNDN);
	mpfr_sqr(at2, at, MPFR_RNDN);
	mpfr_ui_div(ias2, 1, as2, MPFR_RNDN);
	mpfr_ui_div(iat2, 1, at2, MPFR_RNDN);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++) {
			mpfr_mul(t, m[i], m[j], MPFR_RNDN);
			mpfr_mul(E[i][j], t, ias2, MPFR_RNDN);
			mpfr_mul(Ei[i][j], t, as2, MPFR_RNDN);
			mpfr_mul(t, n[i], n[j], MPFR_RNDN);
			mpfr_mul(r, t, iat2, MPFR_RNDN);
			mpfr_add(E[i][j], E[i][j], r, MPFR_RNDN);
			mpfr_mul(r, t, at2, MPFR_RNDN);
			mpfr_add(Ei[i][j], Ei[i][j], r, MPFR_RNDN);
		}
	/* v-coordinates: point = P v with P = [[1, 1/sqrt2], [0, 1/sqrt2]],
	 * P^-1 = [[1, -1], [0, sqrt2]].  Dm = P^T E P, Dm^-1 = P^-1 E^-1 P^-T,
	 * centre c = P^-1 (sc z). */
	mpfr_t P[2][2], Pi[2][2], tmp[2][2];
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++)
			mpfr_inits2(p, P[i][j], Pi[i][j], tmp[i][j], (mpfr_ptr)0);
	mpfr_set_ui(P[0][0], 1, MPFR_RNDN);
	mpfr_ui_div(P[0][1], 1, g->rt2, MPFR_RNDN);
	mpfr_set_ui(P[1][0], 0, MPFR_RNDN);
	mpfr_set(P[1][1], P[0][1], MPFR_RNDN);
	mpfr_set_ui(Pi[0][0], 1, MPFR_RNDN);
	mpfr_set_si(Pi[0][1], -1, MPFR_RNDN);
	mpfr_set_ui(Pi[1][0], 0, MPFR_RNDN);
	mpfr_set(Pi[1][1], g->rt2, MPFR_RNDN);
	/* Dm_ij = sum_kl P_ki E_kl P_lj */
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++) {
			mpfr_set_ui(g->dm[i][j], 0, MPFR_RNDN);
			mpfr_set_ui(g->dmi[i][j], 0, MPFR_RNDN);
			for (int k = 0; k < 2; k++)
				for (int l = 0; l < 2; l++) {
					mpfr_mul(t, P[k][i], E[k][l], MPFR_RNDN);
					mpfr_mul(t, t, P[l][j], MPFR_RNDN);
					mpfr_add(g->dm[i][j], g->dm[i][j], t, MPFR_RNDN);
					mpfr_mul(t, Pi[i][k], Ei[k][l], MPFR_RNDN);
					mpfr_mul(t, t, Pi[j][l], MPFR_RNDN);
					mpfr_add(g->dmi[i][j], g->dmi[i][j], t, MPFR_RNDN);
				}
		}
	mpfr_mul(t, sc, g->zr, MPFR_RNDN);
	mpfr_mul(r, sc, g->zi, MPFR_RNDN);
	mpfr_sub(g->c[0], t, r, MPFR_RNDN);
	mpfr_mul(g->c[1], r, g->rt2, MPFR_RNDN);
	/* bullet side: a_bullet = v1b - v2b w: Pb = [[1, -1/sqrt2], [0, -1/sqrt2]],
	 * unit disk: Dl = Pb^T Pb = [[1, -1/sqrt2], [-1/sqrt2, 1]] */
	mpfr_set_ui(g->dl[0][0], 1, MPFR_RNDN);
	mpfr_set_ui(g->dl[1][1], 1, MPFR_RNDN);
	mpfr_ui_div(g->dl[0][1], 1, g->rt2, MPFR_RNDN);
	mpfr_neg(g->dl[0][1], g->dl[0][1], MPFR_RNDN);
	mpfr_set(g->dl[1][0], g->dl[0][1], MPFR_RNDN);
	inv2(g->dli, g->dl, p);
	/* the exact region, for slicing: |a|^2 = v^T (P^T P) v with
	 * P^T P = [[1, 1/sqrt2], [1/sqrt2, 1]]; Re(a conj z) = (P^T z).v */
	mpfr_set_ui(g->gm[0][0], 1, MPFR_RNDN);
	mpfr_set_ui(g->gm[1][1], 1, MPFR_RNDN);
	mpfr_ui_div(g->gm[0][1], 1, g->rt2, MPFR_RNDN);
	mpfr_set(g->gm[1][0], g->gm[0][1], MPFR_RNDN);
	mpfr_set(g->q[0], g->zr, MPFR_RNDN);
	mpfr_add(g->q[1], g->zr, g->zi, MPFR_RNDN);
	mpfr_div(g->q[1], g->q[1], g->rt2, MPFR_RNDN);
	mpfr_sqr(g->lim, g->eps, MPFR_RNDN);
	mpfr_div_2ui(g->lim, g->lim, 1, MPFR_RNDN);
	mpfr_ui_sub(g->lim, 1, g->lim, MPFR_RNDN);

	int ok = choose_operator(g);
	mpfr_clears(w, h, as, at, sc, t, r, m[0], m[1], n[0], n[1], as2, at2, ias2, iat2,
		(mpfr_ptr)0);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++)
			mpfr_clears(E[i][j], Ei[i][j], P[i][j], Pi[i][j], tmp[i][j], (mpfr_ptr)0);
	if (!ok) {
		dw_grid_destroy(g);
		return dw_fail(err, DW_EINTERNAL, "grid: no grid operator found");
	}
	*out = g;
	return DW_OK;
}

double dw_grid_reduction_ratio(const dw_grid *g)
{
	return g->ratio;
}

/* ---- level enumeration ---- */

typedef struct level_state {
	dw_grid *g;
	int k;
	uint64_t budget;
	int over;
	dw_grid2_visit visit;
	void *user;
	const dw_zroot2 *eta;        /* current y */
	mpfr_t pow;                  /* sqrt2^k */
	mpfr_t pow2;                 /* 2^k */
} level_state;

/* x found for the current eta: a = v1 + v2 w, v = x e1 + eta e2 */
static int visit_x(const dw_zroot2 *x, void *user)
{
	level_state *st = user;
	dw_grid *g = st->g;
	dw_zroot2 v1, v2, t;
	dw_zomega a;
	dw_zr2_init(&v1);
	dw_zr2_init(&v2);
	dw_zr2_init(&t);
	dw_zw_init(&a);
	dw_zr2_mul(&v1, x, &g->e1[0]);
	dw_zr2_mul(&t, st->eta, &g->e2[0]);
	dw_zr2_add(&v1, &v1, &t);
	dw_zr2_mul(&v2, x, &g->e1[1]);
	dw_zr2_mul(&t, st->eta, &g->e2[1]);
	dw_zr2_add(&v2, &v2, &t);
	/* v1 = p + q sqrt2 -> (p, q, 0, -q); v2 w = (q', p', q', 0) */
	mpz_add(a.c[0], v1.a, v2.b);
	mpz_add(a.c[1], v1.b, v2.a);
	mpz_set(a.c[2], v2.b);
	mpz_neg(a.c[3], v1.b);
	int stop = st->visit(&a, st->user);
	dw_zr2_clear(&v1);
	dw_zr2_clear(&v2);
	dw_zr2_clear(&t);
	dw_zw_clear(&a);
	return stop;
}

/* roots of al x^2 + 2 be x + ga <= 0 into [lo, hi]; 0 if empty */
static int quad_interval(mpfr_t lo, mpfr_t hi, mpfr_t al, mpfr_t be, mpfr_t ga)
{
	mpfr_t d, t;
	mpfr_inits2(mpfr_get_prec(lo), d, t, (mpfr_ptr)0);
	mpfr_sqr(d, be, MPFR_RNDN);
	mpfr_mul(t, al, ga, MPFR_RNDN);
	mpfr_sub(d, d, t, MPFR_RNDN);
	int ok = mpfr_sgn(d) >= 0;
	if (ok) {
		mpfr_sqrt(d, d, MPFR_RNDN);
		mpfr_neg(t, be, MPFR_RNDN);
		mpfr_sub(lo, t, d, MPFR_RNDN);
		mpfr_div(lo, lo, al, MPFR_RNDD);
		mpfr_add(hi, t, d, MPFR_RNDN);
		mpfr_div(hi, hi, al, MPFR_RNDU);
	}
	mpfr_clears(d, t, (mpfr_ptr)0);
	return ok;
}

/* Narrow [lo, hi] (values of x on the line v = x e1 + eta e2) to the exact
 * eps-region: |a|^2 <= 2^k and Re(a conj z) >= sqrt2^k (1 - eps^2/2).
 * The ellipse only encloses the region; without this, lines that cross the
 * ellipse outside the unit circle would be scanned for nothing.  A relative
 * slack of 2^(-prec/2) keeps boundary points.  Returns 0 if empty. */
static int clip_to_region(dw_grid *g, level_state *st, mpfr_t ev, mpfr_t lo, mpfr_t hi)
{
	mpfr_prec_t p = g->prec;
	mpfr_t w0[2], al, be, ga, a, b, s1, s0, t, slack;
	mpfr_inits2(p, w0[0], w0[1], al, be, ga, a, b, s1, s0, t, slack, (mpfr_ptr)0);
	for (int i = 0; i < 2; i++)
		mpfr_mul(w0[i], ev, g->e2v[i], MPFR_RNDN);
	int ok = 1;
	quad(al, g->gm, g->e1v, g->e1v);
	quad(be, g->gm, g->e1v, w0);
	quad(ga, g->gm, w0, w0);
	mpfr_sub(ga, ga, st->pow2, MPFR_RNDN);
	if (quad_interval(a, b, al, be, ga)) {
		if (mpfr_cmp(a, lo) > 0)
			mpfr_set(lo, a, MPFR_RNDN);
		if (mpfr_cmp(b, hi) < 0)
			mpfr_set(hi, b, MPFR_RNDN);
	} else {
		ok = 0;
	}
	/* x (e1.q) + (eta e2).q >= sqrt2^k lim */
	mpfr_mul(s1, g->e1v[0], g->q[0], MPFR_RNDN);
	mpfr_mul(t, g->e1v[1], g->q[1], MPFR_RNDN);
	mpfr_add(s1, s1, t, MPFR_RNDN);
	mpfr_mul(s0, w0[0], g->q[0], MPFR_RNDN);
	mpfr_mul(t, w0[1], g->q[1], MPFR_RNDN);
	mpfr_add(s0, s0, t, MPFR_RNDN);
	mpfr_mul(t, st->pow, g->lim, MPFR_RNDN);
	mpfr_sub(t, t, s0, MPFR_RNDN);
	if (ok && !mpfr_zero_p(s1)) {
		mpfr_div(t, t, s1, MPFR_RNDN);
		if (mpfr_sgn(s1) > 0) {
			if (mpfr_cmp(t, lo) > 0)
				mpfr_set(lo, t, MPFR_RNDN);
		} else if (mpfr_cmp(t, hi) < 0) {
			mpfr_set(hi, t, MPFR_RNDN);
		}
	} else if (ok && mpfr_sgn(t) > 0) {
		ok = 0;
	}
	if (ok) {
		/* slack, relative to the size of the numbers involved */
		mpfr_abs(slack, lo, MPFR_RNDN);
		mpfr_abs(t, hi, MPFR_RNDN);
		mpfr_add(slack, slack, t, MPFR_RNDN);
		mpfr_add_ui(slack, slack, 1, MPFR_RNDN);
		mpfr_mul_2si(slack, slack, -(long)(p / 2), MPFR_RNDN);
		mpfr_sub(lo, lo, slack, MPFR_RNDD);
		mpfr_add(hi, hi, slack, MPFR_RNDU);
		ok = mpfr_cmp(lo, hi) <= 0;
	}
	mpfr_clears(w0[0], w0[1], al, be, ga, a, b, s1, s0, t, slack, (mpfr_ptr)0);
	return ok;
}

static int visit_eta(const dw_zroot2 *eta, void *user)
{
	level_state *st = user;
	dw_grid *g = st->g;
	mpfr_prec_t p = g->prec;
	mpfr_t ev, eb, w[2], wb[2], al, be, ga, lo, hi, lob, hib, t;
	mpfr_inits2(p, ev, eb, w[0], w[1], wb[0], wb[1], al, be, ga, lo, hi, lob, hib, t,
		(mpfr_ptr)0);
	zr2_to_mpfr(ev, eta, g->rt2);
	zr2_bullet_to_mpfr(eb, eta, g->rt2);
	int stop = 0;
	/* a side: w = eta e2 - sqrt2^k c; al x^2 + 2 be x + ga <= 0 with
	 * al = e1^T Dm e1, be = e1^T Dm w, ga = w^T Dm w - 2^k */
	for (int i = 0; i < 2; i++) {
		mpfr_mul(w[i], ev, g->e2v[i], MPFR_RNDN);
		mpfr_mul(t, st->pow, g->c[i], MPFR_RNDN);
		mpfr_sub(w[i], w[i], t, MPFR_RNDN);
		mpfr_mul(wb[i], eb, g->e2b[i], MPFR_RNDN);
	}
	quad(al, g->dm, g->e1v, g->e1v);
	quad(be, g->dm, g->e1v, w);
	quad(ga, g->dm, w, w);
	mpfr_sub(ga, ga, st->pow2, MPFR_RNDN);
	int ok = quad_interval(lo, hi, al, be, ga);
	if (ok)
		ok = clip_to_region(g, st, ev, lo, hi);
	if (ok) {
		quad(al, g->dl, g->e1b, g->e1b);
		quad(be, g->dl, g->e1b, wb);
		quad(ga, g->dl, wb, wb);
		mpfr_sub(ga, ga, st->pow2, MPFR_RNDN);
		ok = quad_interval(lob, hib, al, be, ga);
	}
	if (ok) {
		st->eta = eta;
		int r = dw_grid1_solve(lo, hi, lob, hib, st->budget, visit_x, st);
		if (r < 0)
			st->over = 1;
		stop = r != 0;
	}
	mpfr_clears(ev, eb, w[0], w[1], wb[0], wb[1], al, be, ga, lo, hi, lob, hib, t,
		(mpfr_ptr)0);
	return stop;
}

int dw_grid_level(dw_grid *g, int k, uint64_t max_points,
	dw_grid2_visit visit, void *user)
{
	mpfr_prec_t p = g->prec;
	level_state st;
	st.g = g;
	st.k = k;
	st.budget = max_points;
	st.over = 0;
	st.visit = visit;
	st.user = user;
	st.eta = NULL;
	mpfr_inits2(p, st.pow, st.pow2, (mpfr_ptr)0);
	mpfr_set_ui(st.pow2, 1, MPFR_RNDN);
	mpfr_mul_2si(st.pow2, st.pow2, k, MPFR_RNDN);
	mpfr_sqrt(st.pow, st.pow2, MPFR_RNDN);
	mpfr_t x0, x1, y0, y1, t;
	mpfr_inits2(p, x0, x1, y0, y1, t, (mpfr_ptr)0);
	/* eta = f.v in sqrt2^k [ca - sa, ca + sa]; eta_b in sqrt2^k [-sb, sb] */
	mpfr_sub(x0, g->ca, g->sa, MPFR_RNDD);
	mpfr_mul(x0, x0, st.pow, MPFR_RNDD);
	mpfr_add(x1, g->ca, g->sa, MPFR_RNDU);
	mpfr_mul(x1, x1, st.pow, MPFR_RNDU);
	mpfr_mul(y1, g->sb, st.pow, MPFR_RNDU);
	mpfr_neg(y0, y1, MPFR_RNDD);
	int r = dw_grid1_solve(x0, x1, y0, y1, max_points, visit_eta, &st);
	mpfr_clears(x0, x1, y0, y1, t, st.pow, st.pow2, (mpfr_ptr)0);
	if (r < 0 || st.over)
		return -1;
	return r;
}

/* Re(a conj(z)) / sqrt2^k into r */
static void re_a_zbar(dw_grid *g, mpfr_t r, const dw_zomega *a, int k)
{
	mpfr_prec_t p = g->prec;
	mpfr_t re, im, t;
	mpfr_inits2(p, re, im, t, (mpfr_ptr)0);
	/* Re a = c0 + (c1 - c3)/sqrt2, Im a = c2 + (c1 + c3)/sqrt2 */
	mpz_t d;
	mpz_init(d);
	mpz_sub(d, a->c[1], a->c[3]);
	mpfr_set_z(t, d, MPFR_RNDN);
	mpfr_div(t, t, g->rt2, MPFR_RNDN);
	mpfr_add_z(re, t, a->c[0], MPFR_RNDN);
	mpz_add(d, a->c[1], a->c[3]);
	mpfr_set_z(t, d, MPFR_RNDN);
	mpfr_div(t, t, g->rt2, MPFR_RNDN);
	mpfr_add_z(im, t, a->c[2], MPFR_RNDN);
	mpfr_mul(re, re, g->zr, MPFR_RNDN);
	mpfr_mul(im, im, g->zi, MPFR_RNDN);
	mpfr_add(r, re, im, MPFR_RNDN);
	mpfr_set_ui(t, 1, MPFR_RNDN);
	mpfr_mul_2si(t, t, k, MPFR_RNDN);
	mpfr_sqrt(t, t, MPFR_RNDN);
	mpfr_div(r, r, t, MPFR_RNDN);
	mpz_clear(d);
	mpfr_clears(re, im, t, (mpfr_ptr)0);
}

int dw_grid_in_region(dw_grid *g, const dw_zomega *a, int k)
{
	mpfr_t r, lim;
	mpfr_inits2(g->prec, r, lim, (mpfr_ptr)0);
	re_a_zbar(g, r, a, k);
	mpfr_sqr(lim, g->eps, MPFR_RNDN);
	mpfr_div_2ui(lim, lim, 1, MPFR_RNDN);
	mpfr_ui_sub(lim, 1, lim, MPFR_RNDN);
	int in = mpfr_cmp(r, lim) >= 0;
	mpfr_clears(r, lim, (mpfr_ptr)0);
	return in;
}

double dw_grid_error(dw_grid *g, const dw_zomega *a, int k)
{
	mpfr_t r;
	mpfr_init2(r, g->prec);
	re_a_zbar(g, r, a, k);
	mpfr_ui_sub(r, 1, r, MPFR_RNDN);
	mpfr_mul_2ui(r, r, 1, MPFR_RNDN);
	if (mpfr_sgn(r) < 0)
		mpfr_set_ui(r, 0, MPFR_RNDN);
	mpfr_sqrt(r, r, MPFR_RNDN);
	double e = mpfr_get_d(r, MPFR_RNDU);
	mpfr_clear(r);
	return e;
}
