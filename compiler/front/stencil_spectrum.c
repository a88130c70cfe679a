/* stencil_spectrum.c - spectrum of a constant-coefficient stencil matrix.
 * Takes: a loaded stencil problem (p->stencil: shape, points, boundary per
 * axis).  Gives: alpha (= ||A||_2), the smallest singular value, the
 * extreme eigenvalues, the source of the figures, whether A needs the
 * Hermitian dilation, and the number of nonzeros; dw_stencil_finish then
 * records the dilation (one more sys qubit, rhs |0>|b>).
 *
 * Closed forms, exact at any size:
 *  - Fourier symbols ("closed-form-fourier"): with periodic boundaries the
 *    matrix is a (multilevel) circulant, diagonalised by the discrete
 *    Fourier transform: eigenvalues lambda(k) = sum_o c_o
 *    exp(2 pi i sum_a k_a o_a / N_a) over all wave vectors k, and A is
 *    normal, so its singular values are |lambda(k)| (common practice).
 *  - Sine modes ("closed-form-sine"): a symmetric 3-point stencil along an
 *    axis with Dirichlet boundaries is tridiag(c, c_0, c) with eigenvalues
 *    c_0 + 2 c cos(k pi / (N + 1)), k = 1..N, eigenvectors sin(j k pi /
 *    (N + 1)) ("Iterative methods for sparse linear systems", SIAM 2003).
 *  - A separable stencil (no point moves along two axes) is a Kronecker sum
 *    of the per-axis operators, so its eigenvalues are c_0 plus one
 *    eigenvalue per axis (common practice); axes may mix both boundaries.
 * Per axis the extreme values come in closed form (3-point) or from the
 * list of the N_a values (up to 2^24); the smallest |lambda| of an
 * indefinite operator is found by a nearest-root search (one axis) or a
 * sorted search over the lists.  Other stencils: periodic grids up to 2^22
 * points by evaluating every symbol value, any grid up to 4096 points by
 * dense LAPACKE (zheevd, or zgesdd for a non-symmetric stencil); beyond
 * that a clear refusal. */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <lapacke.h>

#include "dwell/stencil.h"

#define DENSE_MAX_POINTS 4096
#define ENUM_MAX_POINTS (1 << 22)
#define AXIS_LIST_MAX ((int64_t)1 << 24)
#define SEARCH_MAX ((int64_t)1 << 24)
#define SYM_RTOL 1e-12

static void canonical(const dw_stencil *st, const int in[3], int out[3])
{
	for (int a = 0; a < 3; a++) {
		int v = a < st->dims ? in[a] : 0;
		if (a < st->dims && st->periodic[a]) {
			int64_t N = st->shape[a];
			int64_t r = ((v % N) + N) % N;
			if (r > N / 2)
				r -= N;
			v = (int)r;
		}
		out[a] = v;
	}
}

size_t dw_stencil_classes(const dw_stencil *st, dw_stencil_class *cls)
{
	size_t n = 0;
	for (size_t i = 0; i < st->npoints; i++) {
		int o[3];
		canonical(st, st->offset[i], o);
		size_t k = 0;
		while (k < n && memcmp(cls[k].off, o, sizeof o))
			k++;
		if (k == n) {
			memcpy(cls[n].off, o, sizeof o);
			cls[n++].coeff = 0;
		}
		cls[k].coeff += st->coeff[i];
	}
	size_t w = 0;
	for (size_t k = 0; k < n; k++)
		if (cls[k].coeff != 0.0)
			cls[w++] = cls[k];
	return w;
}

long dw_stencil_class_find(const dw_stencil *st, const dw_stencil_class *cls,
	size_t n, const int off[3])
{
	int o[3];
	canonical(st, off, o);
	for (size_t k = 0; k < n; k++)
		if (!memcmp(cls[k].off, o, sizeof o))
			return (long)k;
	return -1;
}

static bool symmetric(const dw_stencil *st, const dw_stencil_class *cls, size_t n)
{
	double big = 0;
	for (size_t k = 0; k < n; k++)
		big = fmax(big, fabs(cls[k].coeff));
	for (size_t k = 0; k < n; k++) {
		int neg[3] = {-cls[k].off[0], -cls[k].off[1], -cls[k].off[2]};
		long m = dw_stencil_class_find(st, cls, n, neg);
		double c = m < 0 ? 0 : cls[m].coeff;
		if (fabs(c - cls[k].coeff) > SYM_RTOL * big)
			return false;
	}
	return true;
}

bool dw_stencil_symmetric(const dw_stencil *st)
{
	dw_stencil_class *cls = malloc((st->npoints ? st->npoints : 1) * sizeof *cls);
	if (!cls)
		return false;
	size_t n = dw_stencil_classes(st, cls);
	bool s = symmetric(st, cls, n);
	free(cls);
	return s;
}

/* k o mod N in [0, N) for 0 <= k, |o| <= 4, N <= 2^62, without overflow
 * (each partial sum stays below 2^63). */
static int64_t mulmod_small(int64_t k, int o, int64_t N)
{
	int64_t r = k % N, acc = 0;
	for (int i = 0; i < abs(o); i++)
		acc = (acc + r) % N;
	return o < 0 ? (N - acc) % N : acc;
}

static int64_t total_points(const dw_stencil *st)
{
	int64_t t = 1;
	for (int a = 0; a < st->dims; a++)
		t *= st->shape[a];
	return t;
}

/* ---- separable stencils: one operator per axis ---- */

typedef struct axis_op {
	int64_t N;
	bool periodic, active;
	bool three_point;     /* only offsets +-1, equal coefficients c1 */
	double c1;
	double complex c[9];  /* coefficient of offset o at c[o + 4] */
	double vmin, vmax;    /* extreme (real) eigenvalues, Hermitian case */
	double *list;         /* sorted eigenvalues (N of them) or NULL */
	double complex *clist;/* complex eigenvalues in k order, non-Hermitian */
} axis_op;

static double complex axis_symbol(const axis_op *ax, int64_t k)
{
	if (!ax->periodic)   /* sine mode k = 1..N */
		return 2 * ax->c1 * cos((double)k * M_PI / (double)(ax->N + 1));
	double complex s = 0;
	for (int o = -4; o <= 4; o++)
		if (ax->c[o + 4] != 0) {
			/* reduce k*o mod N exactly before taking the angle */
			int64_t r = mulmod_small(k, o, ax->N);
			double th = 2 * M_PI * (double)r / (double)ax->N;
			s += ax->c[o + 4] * cexp(I * th);
		}
	return s;
}

static int cmp_double(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return x < y ? -1 : x > y;
}

/* Hermitian case, evaluated without cancellation: the axis's eigenvalue
 * is base + dev(k), base = its value at zero frequency (sum of its
 * coefficients; 2 c1 for the sine modes) and dev(k) = -2 sum_o c_o
 * sin^2(pi k o / N) (periodic) or -4 c1 sin^2(k pi / (2(N+1)))
 * (Dirichlet, k = 1..N), since cos x = 1 - 2 sin^2(x/2). */
static double axis_base(const axis_op *ax)
{
	if (!ax->periodic)
		return 2 * ax->c1;
	double b = 0;
	for (int o = -4; o <= 4; o++)
		b += creal(ax->c[o + 4]);
	return b;
}

static double axis_dev(const axis_op *ax, int64_t k)
{
	if (!ax->periodic) {
		double sn = sin((double)k * M_PI / (double)(2 * (ax->N + 1)));
		return -4 * ax->c1 * sn * sn;
	}
	double d = 0;
	for (int o = -4; o <= 4; o++)
		if (ax->c[o + 4] != 0) {
			int64_t r = mulmod_small(k, o, ax->N);
			double sn = sin(M_PI * (double)r / (double)ax->N);
			d -= 2 * creal(ax->c[o + 4]) * sn * sn;
		}
	return d;
}

/* Smallest |t + dev(k)| over the 3-point axis's modes: dev = -4 c1
 * sin^2(phi_k), so search next to sin^2(phi) = t / (4 c1). */
static double three_point_min_abs(const axis_op *ax, double t)
{
	if (ax->c1 == 0)
		return fabs(t);
	double step = ax->periodic ? M_PI / (double)ax->N : M_PI / (double)(2 * (ax->N + 1));
	int64_t lo = ax->periodic ? 0 : 1, hi = ax->periodic ? ax->N / 2 : ax->N;
	double x = t / (4 * ax->c1);
	if (x > 1)
		x = 1;
	if (x < 0)
		x = 0;
	double kstar = asin(sqrt(x)) / step;
	double best = fmin(fabs(t + axis_dev(ax, lo)), fabs(t + axis_dev(ax, hi)));
	for (int64_t d = -2; d <= 3; d++) {
		int64_t k = (int64_t)floor(kstar) + d;
		if (k >= lo && k <= hi)
			best = fmin(best, fabs(t + axis_dev(ax, k)));
	}
	return best;
}

/* min over k of |t + sum_{a >= from} v_a(k_a)| with lists for every active
 * axis; the last active axis is searched in its sorted list. */
static double min_abs_lists(axis_op *ax, int dims, int from, double t)
{
	int a = from;
	while (a < dims && !ax[a].active)
		a++;
	if (a == dims)
		return fabs(t);
	int b = a + 1;
	while (b < dims && !ax[b].active)
		b++;
	if (b == dims) {
		/* binary search for -t in the sorted list */
		const double *v = ax[a].list;
		int64_t lo = 0, hi = ax[a].N;
		while (lo < hi) {
			int64_t mid = lo + (hi - lo) / 2;
			if (v[mid] < -t)
				lo = mid + 1;
			else
				hi = mid;
		}
		double best = INFINITY;
		if (lo < ax[a].N)
			best = fabs(t + v[lo]);
		if (lo > 0)
			best = fmin(best, fabs(t + v[lo - 1]));
		return best;
	}
	double best = INFINITY;
	for (int64_t k = 0; k < ax[a].N; k++)
		best = fmin(best, min_abs_lists(ax, dims, b, t + ax[a].list[k]));
	return best;
}

/* The sorted deviations of an axis (1, or -status on failure). */
static int axis_list(axis_op *x, dw_error *e)
{
	x->list = dw_alloc(e, (size_t)x->N, sizeof *x->list);
	if (!x->list)
		return -(e->status ? e->status : DW_EINTERNAL);
	for (int64_t k = 0; k < x->N; k++)
		x->list[k] = axis_dev(x, x->periodic ? k : k + 1);
	qsort(x->list, (size_t)x->N, sizeof *x->list, cmp_double);
	return 1;
}

/* 1: handled (out filled); 0: not separable in closed form; <0 error */
static int analyse_separable(const dw_stencil *st, const dw_stencil_class *cls,
	size_t ncls, bool herm, dw_stencil_spectrum *out, dw_error *e)
{
	axis_op ax[3];
	memset(ax, 0, sizeof ax);
	double c0 = 0;
	for (size_t k = 0; k < ncls; k++) {
		int nz = 0, axis = 0;
		for (int a = 0; a < st->dims; a++)
			if (cls[k].off[a]) {
				nz++;
				axis = a;
			}
		if (nz > 1)
			return 0;
		if (nz == 0) {
			c0 += cls[k].coeff;
			continue;
		}
		ax[axis].active = true;
		ax[axis].c[cls[k].off[axis] + 4] += cls[k].coeff;
	}
	bool any_dir = false, any_per = false;
	for (int a = 0; a < st->dims; a++) {
		axis_op *x = &ax[a];
		x->N = st->shape[a];
		x->periodic = st->periodic[a];
		bool only1 = true;
		for (int o = -4; o <= 4; o++)
			if (o != 1 && o != -1 && x->c[o + 4] != 0)
				only1 = false;
		x->three_point = only1 && x->c[5] == x->c[3];
		x->c1 = creal(x->c[5]);
		if (!x->active)
			continue;
		if (!x->periodic && !x->three_point)
			return 0;   /* no sine-mode closed form */
		if (x->periodic)
			any_per = true;
		else
			any_dir = true;
	}
	snprintf(out->source, sizeof out->source, "%s", any_dir && any_per
		? "closed-form-sine-fourier" : any_dir ? "closed-form-sine" : "closed-form-fourier");
	int rc = 1;
	if (!herm) {
		/* normal (periodic axes only are non-symmetric): singular values
		 * |c0 + sum_a lambda_a(k_a)|, every combination evaluated */
		int64_t tot = total_points(st);
		if (tot > ENUM_MAX_POINTS)
			return 0;
		for (int a = 0; a < st->dims && rc == 1; a++) {
			ax[a].clist = dw_alloc(e, (size_t)ax[a].N, sizeof *ax[a].clist);
			if (!ax[a].clist) {
				rc = e->status ? -e->status : -DW_EINTERNAL;
				break;
			}
			for (int64_t k = 0; k < ax[a].N; k++)
				ax[a].clist[k] = ax[a].active ? axis_symbol(&ax[a], ax[a].periodic ? k : k + 1) : 0;
		}
		if (rc == 1) {
			double amax = 0, amin = INFINITY;
			int64_t n0 = ax[0].N, n1 = st->dims > 1 ? ax[1].N : 1, n2 = st->dims > 2 ? ax[2].N : 1;
			for (int64_t k2 = 0; k2 < n2; k2++)
				for (int64_t k1 = 0; k1 < n1; k1++)
					for (int64_t k0 = 0; k0 < n0; k0++) {
						double complex l = c0 + ax[0].clist[k0]
							+ (st->dims > 1 ? ax[1].clist[k1] : 0)
							+ (st->dims > 2 ? ax[2].clist[k2] : 0);
						amax = fmax(amax, cabs(l));
						amin = fmin(amin, cabs(l));
					}
			out->alpha = amax;
			out->sigma_min = amin;
			out->lmin = -amax;
			out->lmax = amax;
			out->dilate = true;
		}
		for (int a = 0; a < 3; a++)
			free(ax[a].clist);
		return rc;
	}
	/* zero-frequency total first: exact when the coefficients cancel */
	for (int a = 0; a < st->dims; a++)
		if (ax[a].active)
			c0 += axis_base(&ax[a]);
	double lmin = c0, lmax = c0;
	for (int a = 0; a < st->dims; a++) {
		axis_op *x = &ax[a];
		if (!x->active)
			continue;
		if (x->three_point) {
			/* extremes at k = 1, N (Dirichlet) or k = 0, N/2 (periodic) */
			double d1 = axis_dev(x, x->periodic ? 0 : 1);
			double d2 = axis_dev(x, x->periodic ? x->N / 2 : x->N);
			x->vmin = fmin(d1, d2);
			x->vmax = fmax(d1, d2);
		} else if (x->N <= AXIS_LIST_MAX) {
			if ((rc = axis_list(x, e)) != 1)
				break;
			x->vmin = x->list[0];
			x->vmax = x->list[x->N - 1];
		} else {
			rc = 0;   /* wide periodic stencil on a huge axis */
			break;
		}
		lmin += x->vmin;
		lmax += x->vmax;
	}
	if (rc == 1) {
		out->lmin = lmin;
		out->lmax = lmax;
		out->alpha = fmax(fabs(lmin), fabs(lmax));
		if (lmin > 0) {
			out->sigma_min = lmin;
		} else if (lmax < 0) {
			out->sigma_min = -lmax;
		} else {
			/* indefinite: the smallest |c0 + sum_a dev_a| */
			int nact = 0, single = -1;
			int64_t others = 1, last = 1;   /* the last active axis is searched */
			for (int a = 0; a < st->dims; a++)
				if (ax[a].active) {
					nact++;
					single = a;
					others *= last;
					last = ax[a].N;
				}
			if (nact == 0) {
				out->sigma_min = fabs(c0);
			} else if (nact == 1 && ax[single].three_point) {
				out->sigma_min = three_point_min_abs(&ax[single], c0);
			} else if (others <= SEARCH_MAX) {
				for (int a = 0; a < st->dims && rc == 1; a++)
					if (ax[a].active && !ax[a].list)
						rc = ax[a].N <= AXIS_LIST_MAX ? axis_list(&ax[a], e) : 0;
				if (rc == 1)
					out->sigma_min = min_abs_lists(ax, st->dims, 0, c0);
			} else {
				rc = 0;
			}
		}
	}
	for (int a = 0; a < 3; a++)
		free(ax[a].list);
	return rc;
}

/* ---- tensor products of 3-point operators (compact 9- and 27-point
 * stencils) ----
 * When every point moves by at most 1 along each axis and all 2^|T| sign
 * patterns of a support T carry the same coefficient c_T, A = sum_T c_T
 * (x)_(a in T) (S_a + S_a^T), and every factor is diagonalised by the
 * axis's modes (sine or Fourier), so the eigenvalues are sum_T c_T
 * prod_(a in T) u_a with u_a = 2 cos(theta_a) = 2 - d_a,
 * d_a = 4 sin^2(theta_a / 2) (common practice).  That is multilinear in
 * the d_a, so its extremes over the grid sit at the corners of the box of
 * the d_a's extreme values, which are grid values.  Expanded in the d_a
 * with the constant term summed first, it stays exact when the
 * coefficients cancel.  Only definite operators are settled here. */
static int analyse_tensor3(const dw_stencil *st, const dw_stencil_class *cls,
	size_t ncls, bool herm, dw_stencil_spectrum *out)
{
	if (!herm)
		return 0;
	double cT[8] = {0};
	int count[8] = {0};
	for (size_t k = 0; k < ncls; k++) {
		unsigned T = 0;
		for (int a = 0; a < st->dims; a++) {
			int o = cls[k].off[a];
			if (o < -1 || o > 1)
				return 0;
			if (o)
				T |= 1u << a;
		}
		if (count[T] && fabs(cT[T] - cls[k].coeff) > SYM_RTOL * fmax(1, fabs(cT[T])))
			return 0;
		cT[T] = cls[k].coeff;
		count[T]++;
	}
	bool any_dir = false, any_per = false;
	unsigned used = 0;
	for (unsigned T = 0; T < (1u << st->dims); T++) {
		if (!count[T])
			continue;
		if (count[T] != 1 << __builtin_popcount(T))
			return 0;      /* a sign pattern missing (or merged on a short axis) */
		used |= T;
	}
	double dlo[3] = {0}, dhi[3] = {0};
	for (int a = 0; a < st->dims; a++) {
		if (!((used >> a) & 1))
			continue;
		double N = (double)st->shape[a];
		if (st->periodic[a]) {
			any_per = true;
			dlo[a] = 0;
			dhi[a] = 4;
		} else {
			any_dir = true;
			double s1 = sin(M_PI / (2 * (N + 1))), s2 = sin(N * M_PI / (2 * (N + 1)));
			dlo[a] = 4 * s1 * s1;
			dhi[a] = 4 * s2 * s2;
		}
	}
	/* g[R] = (-1)^|R| sum_(T >= R) c_T 2^|T \ R| */
	double g[8] = {0};
	for (unsigned R = 0; R < (1u << st->dims); R++)
		for (unsigned T = 0; T < (1u << st->dims); T++)
			if ((T & R) == R && count[T])
				g[R] += cT[T] * (double)(1u << __builtin_popcount(T & ~R))
					* (__builtin_popcount(R) % 2 ? -1 : 1);
	double lmin = INFINITY, lmax = -INFINITY;
	for (unsigned corner = 0; corner < (1u << st->dims); corner++) {
		double f = 0;
		for (unsigned R = 1; R < (1u << st->dims); R++) {
			double m = g[R];
			for (int a = 0; a < st->dims; a++)
				if ((R >> a) & 1)
					m *= (corner >> a) & 1 ? dhi[a] : dlo[a];
			f += m;
		}
		f += g[0];
		lmin = fmin(lmin, f);
		lmax = fmax(lmax, f);
	}
	if (!(lmin > 0 || lmax < 0))
		return 0;      /* indefinite: the other methods */
	out->lmin = lmin;
	out->lmax = lmax;
	out->alpha = fmax(fabs(lmin), fabs(lmax));
	out->sigma_min = lmin > 0 ? lmin : -lmax;
	snprintf(out->source, sizeof out->source, "%s", any_dir && any_per
		? "closed-form-sine-fourier" : any_dir ? "closed-form-sine" : "closed-form-fourier");
	return 1;
}

/* ---- periodic grids of moderate size: every symbol value ---- */
static int analyse_fourier_all(const dw_stencil *st, const dw_stencil_class *cls,
	size_t ncls, bool herm, dw_stencil_spectrum *out, dw_error *e)
{
	double complex *tab[3] = {NULL, NULL, NULL};
	int rc = DW_OK;
	for (int a = 0; a < st->dims && !rc; a++) {
		int64_t N = st->shape[a];
		tab[a] = dw_alloc(e, (size_t)N * 9, sizeof *tab[a]);
		if (!tab[a]) {
			rc = e->status;
			break;
		}
		for (int64_t k = 0; k < N; k++)
			for (int o = -4; o <= 4; o++) {
				int64_t r = mulmod_small(k, o, N);
				tab[a][k * 9 + o + 4] = cexp(I * 2 * M_PI * (double)r / (double)N);
			}
	}
	if (!rc) {
		int64_t n0 = st->shape[0], n1 = st->dims > 1 ? st->shape[1] : 1,
			n2 = st->dims > 2 ? st->shape[2] : 1;
		double amax = 0, amin = INFINITY, lmin = INFINITY, lmax = -INFINITY;
		for (int64_t k2 = 0; k2 < n2; k2++)
			for (int64_t k1 = 0; k1 < n1; k1++)
				for (int64_t k0 = 0; k0 < n0; k0++) {
					double complex l = 0;
					int64_t kk[3] = {k0, k1, k2};
					for (size_t c = 0; c < ncls; c++) {
						double complex f = cls[c].coeff;
						for (int a = 0; a < st->dims; a++)
							if (cls[c].off[a])
								f *= tab[a][kk[a] * 9 + cls[c].off[a] + 4];
						l += f;
					}
					amax = fmax(amax, cabs(l));
					amin = fmin(amin, cabs(l));
					lmin = fmin(lmin, creal(l));
					lmax = fmax(lmax, creal(l));
				}
		out->alpha = amax;
		out->sigma_min = amin;
		out->lmin = herm ? lmin : -amax;
		out->lmax = herm ? lmax : amax;
		out->dilate = !herm;
		snprintf(out->source, sizeof out->source, "closed-form-fourier");
	}
	for (int a = 0; a < 3; a++)
		free(tab[a]);
	return rc;
}

/* ---- small grids: the dense matrix ---- */
static int analyse_dense(const dw_stencil *st, const dw_stencil_class *cls,
	size_t ncls, bool herm, dw_stencil_spectrum *out, dw_error *e)
{
	int64_t d = total_points(st);
	double complex *m = dw_alloc(e, (size_t)(d * d), sizeof *m);
	double *w = dw_alloc(e, (size_t)d, sizeof *w);
	if (!m || !w) {
		free(m);
		free(w);
		return e->status;
	}
	int64_t N[3] = {st->shape[0], st->dims > 1 ? st->shape[1] : 1,
		st->dims > 2 ? st->shape[2] : 1};
	for (int64_t j = 0; j < d; j++) {
		int64_t x[3] = {j % N[0], (j / N[0]) % N[1], j / (N[0] * N[1])};
		for (size_t c = 0; c < ncls; c++) {
			int64_t col = 0, stride = 1;
			bool inside = true;
			for (int a = 0; a < 3; a++) {
				int64_t y = x[a] + cls[c].off[a];
				if (y < 0 || y >= N[a]) {
					if (a < st->dims && st->periodic[a])
						y = ((y % N[a]) + N[a]) % N[a];
					else
						inside = false;
				}
				col += y * stride;
				stride *= N[a];
			}
			if (inside)
				m[j + col * d] += cls[c].coeff;
		}
	}
	lapack_int info;
	if (herm) {
		info = LAPACKE_zheevd(LAPACK_COL_MAJOR, 'N', 'U', (lapack_int)d, m,
			(lapack_int)d, w);
	} else {
		info = LAPACKE_zgesdd(LAPACK_COL_MAJOR, 'N', (lapack_int)d, (lapack_int)d,
			m, (lapack_int)d, w, NULL, 1, NULL, 1);
	}
	int rc = DW_OK;
	if (info != 0) {
		rc = dw_fail(e, DW_EINTERNAL, "LAPACKE %s failed (info %d)",
			herm ? "zheevd" : "zgesdd", (int)info);
	} else if (herm) {
		out->lmin = w[0];
		out->lmax = w[d - 1];
		out->alpha = fmax(fabs(w[0]), fabs(w[d - 1]));
		out->sigma_min = INFINITY;
		for (int64_t i = 0; i < d; i++)
			out->sigma_min = fmin(out->sigma_min, fabs(w[i]));
		snprintf(out->source, sizeof out->source, "lapacke-zheevd");
	} else {
		out->alpha = w[0];
		out->sigma_min = w[d - 1];
		out->lmin = -w[0];
		out->lmax = w[0];
		out->dilate = true;
		snprintf(out->source, sizeof out->source, "lapacke-zgesdd");
	}
	free(m);
	free(w);
	return rc;
}

int dw_stencil_analyse(const dw_problem *p, dw_stencil_spectrum *out, dw_error *e)
{
	const dw_stencil *st = &p->stencil;
	memset(out, 0, sizeof *out);
	if (st->dims < 1 || st->dims > 3 || st->npoints == 0)
		return dw_fail(e, DW_EINTERNAL, "internal: stencil not loaded");
	dw_stencil_class *cls = dw_alloc(e, st->npoints, sizeof *cls);
	if (!cls)
		return e->status;
	size_t ncls = dw_stencil_classes(st, cls);
	if (ncls == 0) {
		free(cls);
		return dw_fail_at(e, DW_EINPUT, p->path, 0, "matrix.stencil: every "
			"coefficient is zero (after merging offsets that coincide on "
			"periodic axes), so the matrix is zero");
	}
	bool herm = symmetric(st, cls, ncls);
	int64_t nnz = 0;
	for (size_t c = 0; c < ncls; c++) {
		uint64_t cnt = 1;
		for (int a = 0; a < st->dims; a++)
			cnt *= (uint64_t)(st->periodic[a] ? st->shape[a]
				: st->shape[a] - abs(cls[c].off[a]));   /* at most 2^62 in all */
		nnz = (int64_t)dw_add_sat((uint64_t)nnz, cnt, NULL);
		if (nnz < 0)
			nnz = INT64_MAX;        /* saturate */
	}
	out->nnz = nnz;
	int rc = analyse_separable(st, cls, ncls, herm, out, e);
	if (rc < 0) {
		free(cls);
		return -rc;
	}
	if (rc == 0)
		rc = analyse_tensor3(st, cls, ncls, herm, out);
	if (rc == 0) {
		bool all_periodic = true;
		for (int a = 0; a < st->dims; a++)
			all_periodic = all_periodic && st->periodic[a];
		int64_t tot = total_points(st);
		if (all_periodic && tot <= ENUM_MAX_POINTS)
			rc = analyse_fourier_all(st, cls, ncls, herm, out, e);
		else if (tot <= DENSE_MAX_POINTS)
			rc = analyse_dense(st, cls, ncls, herm, out, e);
		else
			rc = dw_fail_at(e, DW_EINPUT, p->path, 0, "matrix.stencil: no closed "
				"form for this stencil on this grid (closed forms cover periodic "
				"grids of up to %d points, separable stencils with periodic axes "
				"or symmetric 3-point Dirichlet axes, and definite compact stencils "
				"whose corner points share one coefficient), and its %lld points "
				"exceed the %d that the dense analysis handles", ENUM_MAX_POINTS,
				(long long)tot, DENSE_MAX_POINTS);
	} else {
		rc = DW_OK;
	}
	free(cls);
	return rc;
}

int dw_stencil_finish(dw_problem *p, const dw_stencil_spectrum *s, dw_error *e)
{
	p->nnz = s->dilate && s->nnz <= INT64_MAX / 2 ? 2 * s->nnz
		: s->dilate ? INT64_MAX : s->nnz;
	if (!s->dilate)
		return DW_OK;
	int n = p->n;
	if (n + 1 > 61)
		return dw_fail_at(e, DW_EINPUT, p->path, 0, "matrix.stencil: the stencil is "
			"not symmetric, and its dilation needs %d system qubits", n + 1);
	if (p->amps) {
		size_t dim = (size_t)1 << n;
		double complex *a = realloc(p->amps, 2 * dim * sizeof *a);
		if (!a)
			return dw_fail(e, DW_EINTERNAL, "out of memory extending the rhs");
		memset(a + dim, 0, dim * sizeof *a);
		p->amps = a;
	} else if (p->rhs_kind == DW_RHS_UNIFORM || p->rhs_kind == DW_RHS_PRODUCT) {
		double (*prod)[2] = dw_alloc(e, (size_t)n + 1, sizeof *prod);
		if (!prod)
			return e->status;
		for (int k = 0; k < n; k++) {
			prod[k][0] = p->product ? p->product[k][0] : M_PI / 2;
			prod[k][1] = p->product ? p->product[k][1] : 0;
		}
		free(p->product);
		p->product = prod;
		p->nproduct = (size_t)n + 1;
		p->rhs_kind = DW_RHS_PRODUCT;
	}
	/* basis k stays k (top bit 0); a circuit acts on the low n qubits */
	p->dilated = true;
	p->n = n + 1;
	return DW_OK;
}
