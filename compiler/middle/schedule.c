/* schedule.c - the randomization schedule (DESIGN 5).
 * Takes: an analysed problem, the path share of the error budget, a seed.
 * Gives: q points 0 < s_1 < ... < s_q = 1, the gap bound at each, and dwell
 * times t_j drawn uniformly from [0, 2 pi / Delta(s_j)].
 *
 * The path is parametrised by v(s) = c int_0^s ds / Delta(s), with c a
 * bound on ||dH/ds|| (variant P: ||A - I|| <= 1 - 1/kappa; variant I:
 * sqrt(1 + ||A||^2) = sqrt 2).  With perfect dephasing each step keeps an
 * overlap >= 1 - (v_j - v_{j-1})^2 / 2, so the infidelity is at most
 * sum_j (v_j - v_{j-1})^2 (= L^2 / q on the gap-adapted path, equal steps
 * in v).  Auto q makes that sum at most eps_path. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/program.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

uint64_t dw_rng_next(dw_rng *r)
{
	uint64_t z = (r->state += 0x9E3779B97F4A7C15ULL);
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
	z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
	return z ^ (z >> 31);
}

double dw_rng_uniform(dw_rng *r)
{
	return (double)(dw_rng_next(r) >> 11) * 0x1.0p-53;
}

double dw_gap_bound(char variant, double kappa, double s)
{
	if (variant == 'P')
		return 1.0 - s + s / kappa;
	double a = 1.0 - s, b = s / kappa;
	return sqrt(a * a + b * b);
}

typedef struct pathfn {
	char variant;
	double kappa, speed;
} pathfn;

static double integrand(const pathfn *f, double s)
{
	return f->speed / dw_gap_bound(f->variant, f->kappa, s);
}

static double simpson_rec(const pathfn *f, double a, double b, double fa,
	double fm, double fb, double whole, double tol, int depth)
{
	double m = 0.5 * (a + b);
	double lm = 0.5 * (a + m), rm = 0.5 * (m + b);
	double flm = integrand(f, lm), frm = integrand(f, rm);
	double left = (m - a) / 6.0 * (fa + 4.0 * flm + fm);
	double right = (b - m) / 6.0 * (fm + 4.0 * frm + fb);
	double diff = left + right - whole;
	if (depth <= 0 || fabs(diff) <= 15.0 * tol)
		return left + right + diff / 15.0;
	return simpson_rec(f, a, m, fa, flm, fm, left, tol / 2, depth - 1) +
	       simpson_rec(f, m, b, fm, frm, fb, right, tol / 2, depth - 1);
}

/* int_a^b c / Delta by adaptive Simpson (relative tolerance ~1e-13). */
static double integrate(const pathfn *f, double a, double b)
{
	if (b <= a)
		return 0.0;
	double fa = integrand(f, a), fb = integrand(f, b), fm = integrand(f, 0.5 * (a + b));
	double whole = (b - a) / 6.0 * (fa + 4.0 * fm + fb);
	double tol = 1e-13 * fabs(whole) + 1e-300;
	return simpson_rec(f, a, b, fa, fm, fb, whole, tol, 60);
}

double dw_path_v(char variant, double kappa, double speed, double s)
{
	pathfn f = {variant, kappa, speed};
	/* split at points where 1/Delta changes fast (near s = 1 for large kappa) */
	double v = 0, a = 0;
	for (int k = 1; k <= 40 && a < s; k++) {
		double b = 1.0 - pow(0.5, k);
		if (b > s || k == 40)
			b = s;
		v += integrate(&f, a, b);
		a = b;
	}
	return v;
}

/* Solve v(s) = target for s in [lo, 1], knowing v(lo) = vlo: safeguarded
 * Newton with bisection; dv/ds = c / Delta(s). */
static double invert(const pathfn *f, double lo, double vlo, double target)
{
	double a = lo, b = 1.0;
	double s = lo + (target - vlo) * dw_gap_bound(f->variant, f->kappa, lo) / f->speed;
	if (!(s > a && s < b))
		s = 0.5 * (a + b);
	for (int it = 0; it < 200; it++) {
		double v = vlo + integrate(f, lo, s);
		double g = v - target;
		if (g > 0)
			b = s;
		else
			a = s;
		if (fabs(g) <= 1e-14 * fmax(1.0, fabs(target)) || b - a < 1e-16)
			break;
		double ns = s - g / integrand(f, s);
		s = ns > a && ns < b ? ns : 0.5 * (a + b);
	}
	return s;
}

int dw_schedule_build(const dw_problem *p, double eps_path, uint64_t seed,
	dw_schedule *out, dw_error *e)
{
	memset(out, 0, sizeof *out);
	out->path = p->path_kind;
	out->seed = seed;
	double kappa = p->kappa;
	char var = p->variant;
	pathfn f = {var, kappa, var == 'P' ? 1.0 - 1.0 / kappa : sqrt(2.0)};
	if (f.speed <= 0)
		f.speed = 0;
	out->speed = f.speed;
	out->length = dw_path_v(var, kappa, f.speed, 1.0);
	double L = out->length;
	int64_t q = p->steps;
	if (p->sched_kind != DW_SCHED_RANDOMIZED)
		return dw_fail(e, DW_EINPUT, "%s: schedule.kind: only 'randomized' is implemented",
			p->path);
	switch (p->path_kind) {
	case DW_PATH_GAP_ADAPTED:
		if (q == 0) {
			double qq = ceil(L * L / eps_path);
			if (!(qq < 1e8))
				return dw_fail(e, DW_EINPUT, "%s: schedule: auto steps would be %.3g "
					"(path length %.4g, path error share %.3g): too many",
					p->path, qq, L, eps_path);
			q = qq < 1 ? 1 : (int64_t)qq;
			out->q_auto = true;
		}
		break;
	case DW_PATH_LINEAR:
		if (q == 0) {
			/* sum_j (dv)^2 ~ (1/q) int_0^1 (c/Delta)^2 ds */
			double I2 = 0;
			int M = 20000;
			for (int k = 0; k < M; k++) {
				double s = (k + 0.5) / M;
				double g = integrand(&f, s);
				I2 += g * g / M;
			}
			double qq = ceil(I2 / eps_path);
			if (!(qq < 1e8))
				return dw_fail(e, DW_EINPUT, "%s: schedule: auto steps on the linear "
					"path would be %.3g: too many", p->path, qq);
			q = qq < 1 ? 1 : (int64_t)qq;
			out->q_auto = true;
		}
		break;
	case DW_PATH_LIST:
		q = (int64_t)p->npoints;
		break;
	case DW_PATH_POWER:
	default:
		return dw_fail(e, DW_EINPUT, "%s: schedule.path: 'power' is not implemented yet",
			p->path);
	}
	if (q > 100000000)
		return dw_fail(e, DW_EINPUT, "%s: schedule.steps: %lld segments is more than "
			"the limit of 10^8", p->path, (long long)q);
	out->q = q;
	out->seg = calloc((size_t)q, sizeof *out->seg);
	if (!out->seg)
		return dw_fail(e, DW_EINTERNAL, "out of memory (schedule of %lld points)", (long long)q);
	double vprev = 0, sprev = 0;
	for (int64_t j = 1; j <= q; j++) {
		double s, v;
		if (p->path_kind == DW_PATH_GAP_ADAPTED) {
			v = L * (double)j / (double)q;
			s = j == q ? 1.0 : invert(&f, sprev, vprev, v);
		} else if (p->path_kind == DW_PATH_LINEAR) {
			s = (double)j / (double)q;
			v = vprev + integrate(&f, sprev, s);
		} else {
			s = p->points[j - 1];
			v = vprev + integrate(&f, sprev, s);
		}
		out->path_error += (v - vprev) * (v - vprev);
		out->seg[j - 1].s = s;
		vprev = v;
		sprev = s;
	}
	dw_rng rng = {seed};
	for (int64_t j = 0; j < q; j++) {
		dw_segment *sg = &out->seg[j];
		sg->gap = dw_gap_bound(var, kappa, sg->s);
		sg->dwell = dw_rng_uniform(&rng) * 2.0 * M_PI / sg->gap;
		out->time_expected += M_PI / sg->gap;
		out->time_drawn += sg->dwell;
	}
	return DW_OK;
}
