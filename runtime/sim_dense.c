/* sim_dense.c - dense state-vector kernels (include/dwell/sim.h).
 * Takes: a state of n qubits and gate data (2x2 matrices, control masks,
 * phases, qubit pairs).  Gives: the state updated in place; measurement
 * outcomes drawn from a seeded xoshiro256** generator.
 *
 * Layout: for n >= 1 the vector is two halves of M = 2^(n-1) amplitudes,
 * lo_ (top qubit 0) and hi_ (top qubit 1), with hi_ = lo_ + M + GAP while
 * simulating.  Every kernel walks "pairs": for k in [0, nk) it forms an
 * index i by inserting zero bits at the target's and the controls'
 * positions and setting the control bits, and updates p0[i], p1[i]; so a
 * gate with c controls touches 2^-c of the state.  A gate on qubit t
 * below the top uses p0 = half, p1 = half + 2^t within each half; a gate
 * on the top qubit uses p0 = lo_, p1 = hi_.  A control on the top qubit
 * selects halves.  Complex products keep (re, im) in one SSE2 register
 * and never call the C library's NaN-checking complex multiply. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#ifdef _OPENMP
#include <omp.h>
#endif

#include "dwell/sim.h"

/* Gap between the halves, in amplitudes (2.5 KiB): breaks the power-of-two
 * distance between lo_[i] and hi_[i]. */
#define GAP 160

#ifdef _OPENMP
static const int64_t omp_min = DW_SIM_OMP_MIN;
#endif

static inline double complex cmul(double complex a, double complex b)
{
	double ar = creal(a), ai = cimag(a), br = creal(b), bi = cimag(b);
	return CMPLX(ar * br - ai * bi, ar * bi + ai * br);
}

static inline double norm2(double complex a)
{
	return creal(a) * creal(a) + cimag(a) * cimag(a);
}

/* k with a zero bit inserted at position t. */
static inline uint64_t ins0(uint64_t k, int t)
{
	uint64_t low = ((uint64_t)1 << t) - 1;
	return ((k & ~low) << 1) | (k & low);
}

/* ---- kernels over a range [k0, k1) of their loop ----
 *
 * A kernel walks the indices i that have zeros at the bit positions pos[]
 * (the target's bit, a swap's two bits, the control bits) and the control
 * values `set`: i = k with zeros inserted at pos[0] < pos[1] < ..., OR set,
 * for k in [0, M >> npos).  So a gate with c controls touches only the
 * 2^-c of the state it acts on. */

typedef struct kargs {
	double complex *p0, *p1;
	int npos;
	int pos[64];              /* ascending */
	uint64_t set;             /* control bits that must be 1 */
	double complex m[4];      /* matrix, or phase in m[0] */
	uint64_t zmask;           /* the bits at pos[] */
} kargs;

/* Loop i over the indices of a's pattern for k in [k0, k1); BODY uses i.
 * After the first index, the next one with zeros at zmask is
 * ((j | zmask) + 1) & ~zmask: three operations, whatever the count. */
#define FOR_INDICES(a, k0, k1, ...) do { \
	const uint64_t set_ = (a)->set, z_ = (a)->zmask; \
	if ((a)->npos == 0) { \
		for (int64_t k_ = (k0); k_ < (k1); k_++) { \
			const uint64_t i = (uint64_t)k_ | set_; \
			__VA_ARGS__ \
		} \
	} else { \
		uint64_t j_ = (uint64_t)(k0); \
		for (int b_ = 0; b_ < (a)->npos; b_++) \
			j_ = ins0(j_, (a)->pos[b_]); \
		for (int64_t k_ = (k0); k_ < (k1); k_++) { \
			const uint64_t i = j_ | set_; \
			__VA_ARGS__ \
			j_ = ((j_ | z_) + 1) & ~z_; \
		} \
	} \
} while (0)

/* Fill a's positions from the bits of zmask; gives M >> npos. */
static int64_t pattern(kargs *a, uint64_t zmask, uint64_t set, uint64_t m)
{
	a->npos = 0;
	for (int b = 0; b < 64; b++)
		if ((zmask >> b) & 1)
			a->pos[a->npos++] = b;
	a->set = set;
	a->zmask = zmask;
	return (int64_t)(m >> a->npos);
}

typedef double (*range_fn)(const kargs *a, int64_t k0, int64_t k1);

/* Run fn over [0, n): in one call, or split in contiguous chunks over the
 * OpenMP threads when the call touches at least omp_min amplitudes.  The
 * chunks' return values are added in chunk order. */
static double run_range(range_fn fn, const kargs *a, int64_t n, int64_t work)
{
#ifdef _OPENMP
	enum { MAXCHUNK = 256 };
	if (work >= omp_min && n > 1 && omp_get_max_threads() > 1) {
		double part[MAXCHUNK] = {0};
		int chunks = 1;
#pragma omp parallel
		{
			int nt = omp_get_num_threads(), i = omp_get_thread_num();
			int c = nt < MAXCHUNK ? nt : MAXCHUNK;
			if (i < c)
				part[i] = fn(a, n * i / c, n * (i + 1) / c);
			if (i == 0)
				chunks = c;
		}
		double s = 0;
		for (int i = 0; i < chunks; i++)
			s += part[i];
		return s;
	}
#else
	(void)work;
#endif
	return fn(a, 0, n);
}

/* Two doubles (re, im) in one SSE2 register: a product a m is
 * (m_re, m_re) a + (-m_im, m_im) (a_im, a_re), two multiplies and an add. */
typedef double v2d __attribute__((vector_size(16)));
typedef long long v2i __attribute__((vector_size(16)));

static inline v2d vload(const double complex *p)
{
	v2d v;
	memcpy(&v, p, sizeof v);
	return v;
}

static inline void vstore(double complex *p, v2d v)
{
	memcpy(p, &v, sizeof v);
}

static inline v2d vswap(v2d v)
{
	return __builtin_shuffle(v, (v2i){1, 0});
}

/* m x for m given as (m_re, m_re), (-m_im, m_im) */
static inline v2d vmul(v2d re, v2d im, v2d x)
{
	return re * x + im * vswap(x);
}

static inline void vsplit(double complex m, v2d *re, v2d *im)
{
	*re = (v2d){creal(m), creal(m)};
	*im = (v2d){-cimag(m), cimag(m)};
}

static double r_dense(const kargs *a, int64_t k0, int64_t k1)
{
	v2d re[4], im[4];
	for (int j = 0; j < 4; j++)
		vsplit(a->m[j], &re[j], &im[j]);
	double complex *p0 = a->p0, *p1 = a->p1;
	FOR_INDICES(a, k0, k1, {
		v2d x = vload(p0 + i), y = vload(p1 + i), sx = vswap(x), sy = vswap(y);
		vstore(p0 + i, re[0] * x + im[0] * sx + re[1] * y + im[1] * sy);
		vstore(p1 + i, re[2] * x + im[2] * sx + re[3] * y + im[3] * sy);
	});
	return 0;
}

static double r_diag(const kargs *a, int64_t k0, int64_t k1)
{
	v2d r0, i0, r1, i1;
	vsplit(a->m[0], &r0, &i0);
	vsplit(a->m[3], &r1, &i1);
	double complex *p0 = a->p0, *p1 = a->p1;
	FOR_INDICES(a, k0, k1, {
		vstore(p0 + i, vmul(r0, i0, vload(p0 + i)));
		vstore(p1 + i, vmul(r1, i1, vload(p1 + i)));
	});
	return 0;
}

/* Anti-diagonal: p0 <- m01 p1, p1 <- m10 p0. */
static double r_anti(const kargs *a, int64_t k0, int64_t k1)
{
	v2d r1, i1, r2, i2;
	vsplit(a->m[1], &r1, &i1);
	vsplit(a->m[2], &r2, &i2);
	double complex *p0 = a->p0, *p1 = a->p1;
	FOR_INDICES(a, k0, k1, {
		v2d x = vload(p0 + i), y = vload(p1 + i);
		vstore(p0 + i, vmul(r1, i1, y));
		vstore(p1 + i, vmul(r2, i2, x));
	});
	return 0;
}

/* Exchange p0[i] and p1[i] (X, swap). */
static double r_swap(const kargs *a, int64_t k0, int64_t k1)
{
	double complex *p0 = a->p0, *p1 = a->p1;
	FOR_INDICES(a, k0, k1, {
		double complex x = p0[i];
		p0[i] = p1[i];
		p1[i] = x;
	});
	return 0;
}

/* p0[i] *= m[0] */
static double r_phase(const kargs *a, int64_t k0, int64_t k1)
{
	v2d re, im;
	vsplit(a->m[0], &re, &im);
	double complex *p = a->p0;
	FOR_INDICES(a, k0, k1, {
		vstore(p + i, vmul(re, im, vload(p + i)));
	});
	return 0;
}

static double r_sum1(const kargs *a, int64_t k0, int64_t k1)
{
	double s = 0;
	const double complex *p1 = a->p1;
	FOR_INDICES(a, k0, k1, {
		s += norm2(p1[i]);
	});
	return s;
}

static double r_norm(const kargs *a, int64_t k0, int64_t k1)
{
	double s = 0;
	for (int64_t k = k0; k < k1; k++)
		s += norm2(a->p0[k]) + norm2(a->p1[k]);
	return s;
}

/* ---- pair kernels: pairs (p0[i], p1[i]) over the pattern (zmask, set)
 * of an index space of m amplitudes ---- */

static void k_dense(double complex *p0, double complex *p1, uint64_t m, uint64_t zmask,
	uint64_t set, const double complex mat[4])
{
	kargs a = {p0, p1, 0, {0}, 0, {mat[0], mat[1], mat[2], mat[3]}, 0};
	int64_t n = pattern(&a, zmask, set, m);
	run_range(r_dense, &a, n, 2 * n);
}

static void k_diag(double complex *p0, double complex *p1, uint64_t m, uint64_t zmask,
	uint64_t set, double complex d0, double complex d1)
{
	kargs a = {p0, p1, 0, {0}, 0, {d0, 0, 0, d1}, 0};
	int64_t n = pattern(&a, zmask, set, m);
	run_range(r_diag, &a, n, 2 * n);
}

/* Anti-diagonal; a plain exchange for X. */
static void k_anti(double complex *p0, double complex *p1, uint64_t m, uint64_t zmask,
	uint64_t set, double complex m01, double complex m10)
{
	kargs a = {p0, p1, 0, {0}, 0, {0, m01, m10, 0}, 0};
	int64_t n = pattern(&a, zmask, set, m);
	run_range(m01 == 1 && m10 == 1 ? r_swap : r_anti, &a, n, 2 * n);
}

static void k_swap(double complex *p0, double complex *p1, uint64_t m, uint64_t zmask,
	uint64_t set)
{
	kargs a = {p0, p1, 0, {0}, 0, {0, 0, 0, 0}, 0};
	int64_t n = pattern(&a, zmask, set, m);
	run_range(r_swap, &a, n, 2 * n);
}

/* p[i] *= ph where (i & mask) == val, i < m. */
static void k_phase(double complex *p, uint64_t m, uint64_t mask, uint64_t val, double complex ph)
{
	kargs a = {p, NULL, 0, {0}, 0, {ph, 0, 0, 0}, 0};
	int64_t n = pattern(&a, mask, val, m);
	run_range(r_phase, &a, n, n);
}

/* Sum of |p1[i]|^2 over the pattern. */
static double k_sum1(const double complex *p1, uint64_t m, uint64_t zmask)
{
	kargs a = {NULL, (double complex *)p1, 0, {0}, 0, {0, 0, 0, 0}, 0};
	int64_t n = pattern(&a, zmask, 0, m);
	return run_range(r_sum1, &a, n, 2 * n);
}

/* ---- state ---- */

uint64_t dw_state_bytes(int nqubits)
{
	if (nqubits < 0 || nqubits > 59)
		return UINT64_MAX;
	return (((uint64_t)1 << nqubits) + (nqubits ? GAP : 0)) * sizeof(double complex);
}

/* MemAvailable from /proc/meminfo, else physical memory; 0 if unknown. */
static uint64_t available_bytes(void)
{
	FILE *f = fopen("/proc/meminfo", "r");
	if (f) {
		char line[256];
		unsigned long long kb;
		while (fgets(line, sizeof line, f))
			if (sscanf(line, "MemAvailable: %llu kB", &kb) == 1) {
				fclose(f);
				return (uint64_t)kb * 1024;
			}
		fclose(f);
	}
	long pages = sysconf(_SC_PHYS_PAGES), size = sysconf(_SC_PAGESIZE);
	if (pages > 0 && size > 0)
		return (uint64_t)pages * (uint64_t)size;
	return 0;
}

static void split_halves(dw_state *st, int gap)
{
	if (st->nqubits == 0) {
		st->hi_ = st->lo_;
		return;
	}
	st->hi_ = st->lo_ + (st->dim >> 1) + (gap ? GAP : 0);
}

int dw_state_new(int nqubits, dw_state **out, dw_error *err)
{
	*out = NULL;
	uint64_t bytes = dw_state_bytes(nqubits);
	if (nqubits < 0 || nqubits > DW_SIM_MAX_QUBITS)
		return dw_fail(err, DW_EINPUT, "%d qubits: a dense state vector of that size needs "
			"%llu bytes; the simulator takes at most %d qubits (%llu bytes)", nqubits,
			(unsigned long long)bytes, DW_SIM_MAX_QUBITS,
			(unsigned long long)dw_state_bytes(DW_SIM_MAX_QUBITS));
	uint64_t avail = available_bytes();
	if (avail && bytes > avail)
		return dw_fail(err, DW_EINPUT, "%d qubits: the state vector needs %llu bytes "
			"(%.2f GiB) but only %llu bytes are available", nqubits,
			(unsigned long long)bytes, (double)bytes / 1073741824.0,
			(unsigned long long)avail);
	dw_state *st = calloc(1, sizeof *st);
	if (!st)
		return dw_fail(err, DW_EINTERNAL, "out of memory allocating a state");
	st->nqubits = nqubits;
	st->dim = (uint64_t)1 << nqubits;
	st->lo_ = calloc(bytes / sizeof(double complex), sizeof(double complex));
	if (!st->lo_) {
		free(st);
		return dw_fail(err, DW_EINTERNAL, "%d qubits: cannot allocate the %llu bytes the "
			"state vector needs", nqubits, (unsigned long long)bytes);
	}
	st->lo_[0] = 1;
	split_halves(st, 1);
	st->amp = nqubits == 0 ? st->lo_ : NULL;
	dw_state_seed(st, 1);
	*out = st;
	return DW_OK;
}

void dw_state_free(dw_state *st)
{
	if (!st)
		return;
	free(st->lo_);
	free(st->bits);
	free(st);
}

static uint64_t splitmix64(uint64_t *x)
{
	uint64_t z = (*x += 0x9E3779B97F4A7C15ull);
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
	z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
	return z ^ (z >> 31);
}

void dw_state_seed(dw_state *st, uint64_t seed)
{
	uint64_t x = seed;
	for (int i = 0; i < 4; i++)
		st->rng_[i] = splitmix64(&x);
}

static inline uint64_t rotl(uint64_t x, int k)
{
	return (x << k) | (x >> (64 - k));
}

/* xoshiro256**: next 64 bits. */
static uint64_t next64(uint64_t s[4])
{
	uint64_t r = rotl(s[1] * 5, 7) * 9, t = s[1] << 17;
	s[2] ^= s[0];
	s[3] ^= s[1];
	s[1] ^= s[2];
	s[0] ^= s[3];
	s[2] ^= t;
	s[3] = rotl(s[3], 45);
	return r;
}

double complex dw_state_get(const dw_state *st, uint64_t i)
{
	uint64_t m = st->dim >> 1;
	if (st->nqubits == 0 || i < m)
		return st->lo_[i];
	return st->hi_[i - m];
}

void dw_state_set(dw_state *st, uint64_t i, double complex v)
{
	uint64_t m = st->dim >> 1;
	if (st->nqubits == 0 || i < m)
		st->lo_[i] = v;
	else
		st->hi_[i - m] = v;
}

double complex *dw_state_compact(dw_state *st)
{
	uint64_t m = st->dim >> 1;
	if (st->nqubits > 0 && st->hi_ != st->lo_ + m) {
		memmove(st->lo_ + m, st->hi_, m * sizeof *st->lo_);
		split_halves(st, 0);
	}
	st->amp = st->lo_;
	return st->amp;
}

double dw_state_norm2(const dw_state *st)
{
	if (st->nqubits == 0)
		return norm2(st->lo_[0]);
	uint64_t m = st->dim >> 1;
	kargs a = {st->lo_, st->hi_, 0, {0}, 0, {0, 0, 0, 0}, 0};
	return run_range(r_norm, &a, (int64_t)m, 2 * (int64_t)m);
}

/* The halves that satisfy the top-qubit part of a condition: calls back
 * with the half, its top bit and the condition with the top bit removed. */
#define FOR_HALVES(st, cmask, cval, half, lmask, lval, body) do { \
	int top_ = (st)->nqubits - 1; \
	uint64_t tb_ = (uint64_t)1 << top_; \
	for (int h_ = 0; h_ < 2; h_++) { \
		if (((cmask) & tb_) && (uint64_t)(((cval) >> top_) & 1) != (uint64_t)h_) \
			continue; \
		double complex *half = h_ ? (st)->hi_ : (st)->lo_; \
		uint64_t lmask = (cmask) & ~tb_, lval = (cval) & ~tb_; \
		(void)lval; \
		body; \
	} \
} while (0)

void dw_state_apply_1q(dw_state *st, int t, const double complex m[4],
	uint64_t cmask, uint64_t cval)
{
	st->gates_applied++;
	int top = st->nqubits - 1;
	uint64_t half_n = st->dim >> 1;
	int diag = m[1] == 0 && m[2] == 0, anti = m[0] == 0 && m[3] == 0;
	if (t == top) {
		if (diag) {
			if (m[0] != 1)
				k_phase(st->lo_, half_n, cmask, cval, m[0]);
			if (m[3] != 1)
				k_phase(st->hi_, half_n, cmask, cval, m[3]);
		} else if (anti) {
			k_anti(st->lo_, st->hi_, half_n, cmask, cval, m[1], m[2]);
		} else {
			k_dense(st->lo_, st->hi_, half_n, cmask, cval, m);
		}
		return;
	}
	uint64_t tb = (uint64_t)1 << t;
	FOR_HALVES(st, cmask, cval, a, lm, lv, {
		if (diag && m[0] == 1)
			k_phase(a, half_n, lm | tb, lv | tb, m[3]);
		else if (diag)
			k_diag(a, a + tb, half_n, lm | tb, lv, m[0], m[3]);
		else if (anti)
			k_anti(a, a + tb, half_n, lm | tb, lv, m[1], m[2]);
		else
			k_dense(a, a + tb, half_n, lm | tb, lv, m);
	});
}

void dw_state_apply_phase(dw_state *st, double complex ph, uint64_t mask, uint64_t val)
{
	st->gates_applied++;
	if (ph == 1)
		return;
	if (st->nqubits == 0) {
		st->lo_[0] = cmul(ph, st->lo_[0]);
		return;
	}
	uint64_t half_n = st->dim >> 1;
	FOR_HALVES(st, mask, val, a, lm, lv, k_phase(a, half_n, lm, lv, ph));
}

void dw_state_apply_swap(dw_state *st, int a, int b, uint64_t cmask, uint64_t cval)
{
	st->gates_applied++;
	if (a > b) {
		int t = a;
		a = b;
		b = t;
	}
	int top = st->nqubits - 1;
	uint64_t half_n = st->dim >> 1, ab = (uint64_t)1 << a, bb = (uint64_t)1 << b;
	if (b == top) {
		/* |top=0, a=1> <-> |top=1, a=0> */
		k_swap(st->lo_ + ab, st->hi_, half_n, cmask | ab, cval);
		return;
	}
	FOR_HALVES(st, cmask, cval, h, lm, lv, k_swap(h + ab, h + bb, half_n, lm | ab | bb, lv));
}

double dw_state_prob1(const dw_state *st, int q)
{
	int top = st->nqubits - 1;
	uint64_t half_n = st->dim >> 1;
	if (q == top)
		return k_sum1(st->hi_, half_n, 0);
	uint64_t qb = (uint64_t)1 << q;
	return k_sum1(st->lo_ + qb, half_n, qb) + k_sum1(st->hi_ + qb, half_n, qb);
}

int dw_state_measure(dw_state *st, int q)
{
	double p1 = dw_state_prob1(st, q);
	double total = dw_state_norm2(st);
	/* uniform double in [0, 1) from the top 53 bits */
	double u = (double)(next64(st->rng_) >> 11) * 0x1.0p-53;
	int outcome = u * total < p1;
	double p = outcome ? p1 : total - p1;
	uint64_t qb = (uint64_t)1 << q;
	double scale = p > 0 ? 1.0 / sqrt(p) : 0;
	uint64_t before = st->gates_applied;
	dw_state_apply_phase(st, 0, qb, outcome ? 0 : qb);
	dw_state_apply_phase(st, scale, qb, outcome ? qb : 0);
	st->gates_applied = before + 1;
	return outcome;
}

void dw_state_reset(dw_state *st, int q)
{
	if (dw_state_measure(st, q)) {
		static const double complex x[4] = {0, 1, 1, 0};
		dw_state_apply_1q(st, q, x, 0, 0);
	}
}
