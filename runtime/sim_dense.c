/* sim_dense.c - dense state-vector kernels (include/dwell/sim.h).
 * Takes: a state of n qubits and gate data (2x2 matrices, control masks,
 * phases, qubit pairs).  Gives: the state updated in place; measurement
 * outcomes drawn from a seeded xoshiro256** generator.
 *
 * Layout: for n >= 1 the vector is two halves of M = 2^(n-1) amplitudes,
 * lo_ (top qubit 0) and hi_ (top qubit 1), with hi_ = lo_ + M + GAP while
 * simulating.  Every kernel walks "pairs": for k in [0, nk) it forms an
 * index i by inserting zero bits, and updates p0[i], p1[i].  A gate on
 * qubit t below the top uses p0 = half, p1 = half + 2^t within each half;
 * a gate on the top qubit uses p0 = lo_, p1 = hi_.  A control on the top
 * qubit selects halves.  Complex products are written out in real
 * arithmetic so that the loops do not call the C library's NaN-checking
 * complex multiply. */
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

/* ---- kernels over a range [k0, k1) of their loop ---- */

typedef struct kargs {
	double complex *p0, *p1;
	int t, t2;                /* bit positions where zeros are inserted */
	uint64_t cmask, cval;     /* condition on the index */
	double complex m[4];      /* matrix, or phase in m[0] */
	uint64_t run;             /* k_phase: length of a run */
} kargs;

typedef double (*range_fn)(const kargs *a, int64_t k0, int64_t k1);

/* Run fn over [0, n): in one call, or split in contiguous chunks over the
 * OpenMP threads when the call spans at least omp_min amplitudes.  The
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
	for (int j = 0; j < 4; j++) {
		re[j] = (v2d){creal(a->m[j]), creal(a->m[j])};
		im[j] = (v2d){-cimag(a->m[j]), cimag(a->m[j])};
	}
	double complex *p0 = a->p0, *p1 = a->p1;
	const uint64_t cmask = a->cmask, cval = a->cval;
	const int t = a->t;
	for (int64_t k = k0; k < k1; k++) {
		uint64_t i = ins0((uint64_t)k, t);
		if ((i & cmask) != cval)
			continue;
		v2d x = vload(p0 + i), y = vload(p1 + i), sx = vswap(x), sy = vswap(y);
		vstore(p0 + i, re[0] * x + im[0] * sx + re[1] * y + im[1] * sy);
		vstore(p1 + i, re[2] * x + im[2] * sx + re[3] * y + im[3] * sy);
	}
	return 0;
}

static double r_diag(const kargs *a, int64_t k0, int64_t k1)
{
	v2d r0, i0, r1, i1;
	vsplit(a->m[0], &r0, &i0);
	vsplit(a->m[3], &r1, &i1);
	double complex *p0 = a->p0, *p1 = a->p1;
	const uint64_t cmask = a->cmask, cval = a->cval;
	const int t = a->t;
	const int one0 = a->m[0] == 1;
	for (int64_t k = k0; k < k1; k++) {
		uint64_t i = ins0((uint64_t)k, t);
		if ((i & cmask) != cval)
			continue;
		if (!one0)
			vstore(p0 + i, vmul(r0, i0, vload(p0 + i)));
		vstore(p1 + i, vmul(r1, i1, vload(p1 + i)));
	}
	return 0;
}

/* Anti-diagonal: p0 <- m01 p1, p1 <- m10 p0; a plain exchange for X. */
static double r_anti(const kargs *a, int64_t k0, int64_t k1)
{
	const double complex m01 = a->m[1], m10 = a->m[2];
	double complex *p0 = a->p0, *p1 = a->p1;
	const uint64_t cmask = a->cmask, cval = a->cval;
	const int t = a->t;
	if (m01 == 1 && m10 == 1) {
		for (int64_t k = k0; k < k1; k++) {
			uint64_t i = ins0((uint64_t)k, t);
			if ((i & cmask) != cval)
				continue;
			double complex x = p0[i];
			p0[i] = p1[i];
			p1[i] = x;
		}
		return 0;
	}
	for (int64_t k = k0; k < k1; k++) {
		uint64_t i = ins0((uint64_t)k, t);
		if ((i & cmask) != cval)
			continue;
		double complex x = p0[i];
		p0[i] = cmul(m01, p1[i]);
		p1[i] = cmul(m10, x);
	}
	return 0;
}

/* Exchange p0[i] and p1[i], i = k with zeros inserted at t < t2. */
static double r_swap(const kargs *a, int64_t k0, int64_t k1)
{
	double complex *p0 = a->p0, *p1 = a->p1;
	const uint64_t cmask = a->cmask, cval = a->cval;
	for (int64_t k = k0; k < k1; k++) {
		uint64_t i = ins0(ins0((uint64_t)k, a->t), a->t2);
		if ((i & cmask) != cval)
			continue;
		double complex x = p0[i];
		p0[i] = p1[i];
		p1[i] = x;
	}
	return 0;
}

/* Multiply by m[0] the runs r (of a->run amplitudes) whose start b
 * satisfies (b & cmask) == cval. */
static double r_phase(const kargs *a, int64_t k0, int64_t k1)
{
	v2d re, im;
	vsplit(a->m[0], &re, &im);
	double complex *p = a->p0;
	const uint64_t run = a->run, cmask = a->cmask, cval = a->cval;
	for (int64_t r = k0; r < k1; r++) {
		uint64_t b = (uint64_t)r * run;
		if ((b & cmask) != cval)
			continue;
		for (uint64_t j = 0; j < run; j++)
			vstore(p + b + j, vmul(re, im, vload(p + b + j)));
	}
	return 0;
}

static double r_sum1(const kargs *a, int64_t k0, int64_t k1)
{
	double s = 0;
	for (int64_t k = k0; k < k1; k++)
		s += norm2(a->p1[ins0((uint64_t)k, a->t)]);
	return s;
}

static double r_norm(const kargs *a, int64_t k0, int64_t k1)
{
	double s = 0;
	for (int64_t k = k0; k < k1; k++)
		s += norm2(a->p0[k]) + norm2(a->p1[k]);
	return s;
}

/* ---- pair kernels: nk pairs (p0[i], p1[i]), i = k with a zero at t ---- */

static void k_dense(double complex *p0, double complex *p1, uint64_t nk, int t,
	uint64_t cmask, uint64_t cval, const double complex m[4])
{
	kargs a = {p0, p1, t, 0, cmask, cval, {m[0], m[1], m[2], m[3]}, 0};
	run_range(r_dense, &a, (int64_t)nk, 2 * (int64_t)nk);
}

static void k_diag(double complex *p0, double complex *p1, uint64_t nk, int t,
	uint64_t cmask, uint64_t cval, double complex d0, double complex d1)
{
	kargs a = {p0, p1, t, 0, cmask, cval, {d0, 0, 0, d1}, 0};
	run_range(r_diag, &a, (int64_t)nk, 2 * (int64_t)nk);
}

static void k_anti(double complex *p0, double complex *p1, uint64_t nk, int t,
	uint64_t cmask, uint64_t cval, double complex m01, double complex m10)
{
	kargs a = {p0, p1, t, 0, cmask, cval, {0, m01, m10, 0}, 0};
	run_range(r_anti, &a, (int64_t)nk, 2 * (int64_t)nk);
}

static void k_swap(double complex *p0, double complex *p1, uint64_t nk, int t1, int t2,
	uint64_t cmask, uint64_t cval)
{
	kargs a = {p0, p1, t1, t2, cmask, cval, {0, 0, 0, 0}, 0};
	run_range(r_swap, &a, (int64_t)nk, 4 * (int64_t)nk);
}

/* Multiply p[i] by ph where (i & mask) == val, i < m, over runs of
 * 2^ctz(mask) amplitudes. */
static void k_phase(double complex *p, uint64_t m, uint64_t mask, uint64_t val, double complex ph)
{
	uint64_t run = mask ? (uint64_t)1 << __builtin_ctzll(mask) : m;
	if (run > m)
		run = m;
	kargs a = {p, NULL, 0, 0, mask, val, {ph, 0, 0, 0}, run};
	run_range(r_phase, &a, (int64_t)(m / run), (int64_t)m);
}

static double k_sum1(const double complex *p1, uint64_t nk, int t)
{
	kargs a = {NULL, (double complex *)p1, t, 0, 0, 0, {0, 0, 0, 0}, 0};
	return run_range(r_sum1, &a, (int64_t)nk, 2 * (int64_t)nk);
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
	kargs a = {st->lo_, st->hi_, 0, 0, 0, 0, {0, 0, 0, 0}, 0};
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
			k_anti(st->lo_, st->hi_, half_n, top, cmask, cval, m[1], m[2]);
		} else {
			k_dense(st->lo_, st->hi_, half_n, top, cmask, cval, m);
		}
		return;
	}
	uint64_t tb = (uint64_t)1 << t;
	FOR_HALVES(st, cmask, cval, a, lm, lv, {
		if (diag)
			k_diag(a, a + tb, half_n >> 1, t, lm, lv, m[0], m[3]);
		else if (anti)
			k_anti(a, a + tb, half_n >> 1, t, lm, lv, m[1], m[2]);
		else
			k_dense(a, a + tb, half_n >> 1, t, lm, lv, m);
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
		k_swap(st->lo_ + ab, st->hi_, half_n >> 1, a, top, cmask, cval);
		return;
	}
	FOR_HALVES(st, cmask, cval, h, lm, lv, k_swap(h + ab, h + bb, half_n >> 2, a, b, lm, lv));
}

double dw_state_prob1(const dw_state *st, int q)
{
	int top = st->nqubits - 1;
	uint64_t half_n = st->dim >> 1;
	if (q == top)
		return k_sum1(st->hi_, half_n, top);
	uint64_t qb = (uint64_t)1 << q;
	return k_sum1(st->lo_ + qb, half_n >> 1, q) + k_sum1(st->hi_ + qb, half_n >> 1, q);
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
