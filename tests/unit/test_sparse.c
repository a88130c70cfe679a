/* test_sparse.c - explicit sparse matrices as circuits.
 *  - the temporary AND: |a,b,0> -> |a,b,ab> exactly (amplitude 1, no
 *    phase), 4 T ("Halving the cost of quantum addition", Quantum 2, 74
 *    (2018): "computing a logical-AND ... uses 4 T gates");
 *  - unary-iteration and select-swap lookups: every index gives its word,
 *    index unchanged, ancillas back to |0>; the controlled unary lookup
 *    computes L - 1 ANDs, i.e. 4L - 4 T ("Encoding electronic spectra in
 *    quantum circuits with linear T complexity", Phys. Rev. X 8, 041015
 *    (2018), section III: unary iteration over L items costs 4L - 4 T),
 *    plus the same again for the unitary uncomputation;
 *  - the bipartite edge colouring: d colours for maximum degree d (König's
 *    edge-colouring theorem, common practice), each colour a matching, every
 *    nonzero covered exactly once;
 *  - every 1-sparse exponential exp(-i theta/2 X_anc (x) [X_sgn (x)] A_c)
 *    against the exact matrix exponential (LAPACKE_zheev eigendecomposition
 *    of the dense Hermitian T_c) on every basis state with scratch |0>,
 *    scratch returning to |0>: real symmetric indefinite with diagonal,
 *    complex Hermitian, with and without sgn, unary and select-swap, with
 *    ANDs uncomputed unitarily or by measurement (every measurement
 *    outcome branch simulated: tests/unit's projection below). */
#include <complex.h>
#include <lapacke.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"
#include "check.h"
#include "irsim.h"

typedef double complex cplx;

static uint64_t rng_state = 0x1234567;
static uint64_t rnd(void)
{
	dw_rng r = {rng_state};
	uint64_t v = dw_rng_next(&r);
	rng_state = r.state;
	return v;
}

/* ---- AND ---- */
static void test_and(void)
{
	dw_circuit *c = dw_circuit_new();
	dw_error e = {0};
	uint32_t a = dw_and_compute_def(c, &e);
	CHECK(a != DW_NO_DEF, "and: %s", e.msg);
	dw_figures f;
	dw_cost_figures(c, a, &f, &e);
	CHECK(f.t_count_exact == 4, "and: T-count %llu, published 4",
		(unsigned long long)f.t_count_exact);
	uint32_t map[3] = {0, 1, 2};
	for (int in = 0; in < 4; in++) {
		irsim s;
		irsim_init(&s, 3);
		s.psi[0] = 0;
		s.psi[in] = 1;
		irsim_apply(&s, c, a, map, NULL);
		size_t want = (size_t)in | (in == 3 ? 4u : 0u);
		CHECK(cabs(s.psi[want] - 1) < 1e-12, "and(%d): amplitude %g%+gi", in,
			creal(s.psi[want]), cimag(s.psi[want]));
		free(s.psi);
	}
	dw_circuit_free(c);
}

/* ---- lookups ---- */
/* Simulation with measurements (for target.uncompute: measure): a measured
 * qubit is projected on a chosen outcome (`prefer` when its probability is
 * not zero, else the other), renormalised, and remembered for the
 * classically controlled gates that test it. */
typedef struct msim {
	irsim s;
	int prefer;
	int outcome[64];
	int measured;
} msim;

static int msim_gate(const dw_walk_gate *g, void *ctx)
{
	msim *m = ctx;
	if (g->gate == DW_G_MEASURE) {
		uint32_t q = g->qubits[0];
		size_t bit = (size_t)1 << q;
		double p[2] = {0, 0};
		for (size_t i = 0; i < m->s.dim; i++)
			p[(i & bit) != 0] += creal(m->s.psi[i] * conj(m->s.psi[i]));
		int o = m->prefer;
		if (p[o] < 1e-12)
			o = 1 - o;
		double pn = p[o];
		for (size_t i = 0; i < m->s.dim; i++)
			m->s.psi[i] = (((i & bit) != 0) == o) ? m->s.psi[i] / sqrt(pn) : 0;
		m->outcome[q] = o;
		m->measured++;
		return 0;
	}
	if (g->cond && !m->outcome[g->cond_qubit])
		return 0;
	return irsim_gate(g, &m->s);
}

static int count_calls(const dw_circuit *c, uint32_t id, uint32_t callee)
{
	const dw_def *d = &c->defs[id];
	int n = 0;
	for (size_t i = 0; i < d->nops; i++)
		if (d->ops[i].kind == DW_OP_CALL && d->ops[i].callee == callee)
			n += (int)d->ops[i].reps;
	return n;
}

static void test_lookup(uint64_t L, uint32_t width, int mode, bool measure)
{
	/* mode 0: unary uncontrolled, 1: unary controlled, 2: select-swap;
	 * measure: ANDs erased by measurement, every outcome branch checked */
	uint32_t m = dw_lookup_index_bits(L);
	if (mode == 2 && m < 1)
		return;
	if (mode == 2)
		width = 2;
	uint32_t words = (width + 63) / 64;
	uint64_t *bits = calloc(L * words, sizeof *bits);
	for (uint64_t l = 0; l < L; l++)
		bits[l * words] = rnd() & ((1ULL << width) - 1);
	dw_table t = {L, width, words, bits};
	dw_circuit *c = dw_circuit_new();
	dw_error e = {0};
	uint32_t id;
	if (mode == 2) {
		/* keep the simulated qubits few: 2-bit words, blocks of 2 or 4 */
		uint32_t k = m == 3 ? 2 : 1;
		id = dw_lookup_select_swap_def(c, m, &t, k, measure, &e);
	} else {
		id = dw_lookup_unary_def(c, m, &t, mode == 1, measure, &e);
	}
	CHECK(id != DW_NO_DEF, "lookup L=%llu: %s", (unsigned long long)L, e.msg);
	if (id == DW_NO_DEF) {
		free(bits);
		dw_circuit_free(c);
		return;
	}
	uint32_t ctl = mode == 1 ? 1 : 0;
	uint32_t nq = dw_def_qubits(c, id);
	uint32_t *map = malloc(nq * sizeof *map);
	for (uint32_t q = 0; q < nq; q++)
		map[q] = q;
	for (uint64_t l = 0; l < L; l++)
		for (int on = 0; on <= (mode == 1); on++) {
		for (int prefer = 0; prefer <= (measure ? 1 : 0); prefer++) {
			msim ms;
			memset(&ms, 0, sizeof ms);
			irsim_init(&ms.s, (int)nq);
			ms.prefer = prefer;
			irsim s;
			size_t in = (size_t)(l << ctl) | (size_t)(mode == 1 ? on : 0);
			ms.s.psi[0] = 0;
			ms.s.psi[in] = 1;
			int wr = dw_walk(c, id, map, NULL, msim_gate, &ms);
			CHECK(wr == 0, "walk %d", wr);
			s = ms.s;
			uint64_t word = (mode != 1 || on) ? bits[l * words] : 0;
			size_t want = in | (size_t)(word << (ctl + m));
			CHECK(cabs(s.psi[want] - 1) < 1e-12, "lookup mode %d L=%llu l=%llu on=%d: "
				"amplitude %g at the expected state", mode, (unsigned long long)L,
				(unsigned long long)l, on, cabs(s.psi[want]));
			free(s.psi);
		}
		}
	if (mode <= 1) {
		dw_figures f;
		dw_cost_figures(c, id, &f, &e);
		uint32_t and_c = dw_and_compute_def(c, &e);
		uint32_t and_u = measure ? dw_and_erase_def(c, &e) : dw_inverse(c, and_c, &e);
		int nc = count_calls(c, id, and_c), nu = count_calls(c, id, and_u);
		/* published: 4L - 4 T for controlled unary iteration (one AND of 4 T
		 * per internal node); without a control the top split needs none */
		long long ands = mode == 1 ? (long long)L - 1 : (L >= 2 ? (long long)L - 2 : 0);
		CHECK(4LL * nc == 4 * ands && nu == nc, "lookup L=%llu: %d ANDs (%lld T), "
			"expected %lld T", (unsigned long long)L, nc, 4LL * nc, 4 * ands);
		if (mode == 1)
			CHECK(4LL * nc == 4LL * (long long)L - 4, "controlled lookup L=%llu: AND T "
				"%d vs the published 4L - 4 = %lld", (unsigned long long)L, 4 * nc,
				4LL * (long long)L - 4);
		if (measure) {
			CHECK(f.t_count_exact == (uint64_t)(4 * ands), "measured lookup L=%llu: "
				"T-count %llu, expected %lld", (unsigned long long)L,
				(unsigned long long)f.t_count_exact, 4 * ands);
			CHECK(f.measure_count == (uint64_t)ands, "measured lookup: %llu "
				"measurements", (unsigned long long)f.measure_count);
		} else {
			CHECK(f.t_count_exact == (uint64_t)(8 * ands), "lookup L=%llu: T-count %llu, "
				"expected %lld (4L-4 compute + 4L-4 unitary uncompute)",
				(unsigned long long)L, (unsigned long long)f.t_count_exact, 8 * ands);
		}
	}
	free(map);
	free(bits);
	dw_circuit_free(c);
}

/* ---- problems built by hand ---- */
typedef struct hand {
	dw_problem p;
	dw_csr m;
} hand;

static void hand_make(hand *h, int n, const cplx *dense, int value_bits, int lookup)
{
	memset(h, 0, sizeof *h);
	int64_t N = (int64_t)1 << n;
	h->m.rows = h->m.cols = N;
	h->m.rowptr = calloc((size_t)N + 1, sizeof *h->m.rowptr);
	h->m.col = calloc((size_t)(N * N), sizeof *h->m.col);
	h->m.val = calloc((size_t)(N * N), sizeof *h->m.val);
	for (int64_t r = 0; r < N; r++) {
		h->m.rowptr[r] = h->m.nnz;
		for (int64_t k = 0; k < N; k++)
			if (dense[r * N + k] != 0) {
				h->m.col[h->m.nnz] = k;
				h->m.val[h->m.nnz++] = dense[r * N + k];
				if (cimag(dense[r * N + k]) != 0)
					h->m.is_complex = true;
			}
	}
	h->m.rowptr[N] = h->m.nnz;
	h->p.path = "hand.yaml";
	h->p.matrix_kind = DW_MATRIX_FILE;
	h->p.matrix = &h->m;
	h->p.n = n;
	h->p.analysed = true;
	h->p.precision = 0.05;
	h->p.value_bits = value_bits;
	h->p.lookup = lookup ? DW_LOOKUP_SELECT_SWAP : DW_LOOKUP_UNARY;
	/* alpha, sigma_min: from zheev of the dense matrix */
	cplx *a = malloc((size_t)(N * N) * sizeof *a);
	memcpy(a, dense, (size_t)(N * N) * sizeof *a);
	double *w = malloc((size_t)N * sizeof *w);
	LAPACKE_zheev(LAPACK_ROW_MAJOR, 'N', 'U', (lapack_int)N, a, (lapack_int)N, w);
	h->p.alpha = fmax(fabs(w[0]), fabs(w[N - 1]));
	h->p.sigma_min = INFINITY;
	for (int64_t i = 0; i < N; i++)
		h->p.sigma_min = fmin(h->p.sigma_min, fabs(w[i]));
	free(a);
	free(w);
}

static void hand_free(hand *h)
{
	free(h->m.rowptr);
	free(h->m.col);
	free(h->m.val);
}

/* exp(-i theta/2 T) for Hermitian T (dim D, row-major) by zheev. */
static void expm_herm(const cplx *T, size_t D, double theta, cplx *U)
{
	cplx *v = malloc(D * D * sizeof *v);
	double *w = malloc(D * sizeof *w);
	memcpy(v, T, D * D * sizeof *v);
	int info = LAPACKE_zheev(LAPACK_ROW_MAJOR, 'V', 'U', (lapack_int)D, v, (lapack_int)D, w);
	CHECK(info == 0, "zheev");
	for (size_t i = 0; i < D; i++)
		for (size_t j = 0; j < D; j++) {
			cplx s = 0;
			for (size_t k = 0; k < D; k++)
				s += v[i * D + k] * cexp(-I * theta / 2 * w[k]) * conj(v[j * D + k]);
			U[i * D + j] = s;
		}
	free(v);
	free(w);
}

static void check_colouring(const dw_sparse_plan *pl, const dw_csr *m, const char *what)
{
	int64_t N = m->rows;
	uint32_t d = 0;
	int64_t *colcount = calloc((size_t)N, sizeof *colcount);
	for (int64_t r = 0; r < N; r++) {
		int64_t k = m->rowptr[r + 1] - m->rowptr[r];
		if (k > (int64_t)d)
			d = (uint32_t)k;
		for (int64_t t = m->rowptr[r]; t < m->rowptr[r + 1]; t++)
			colcount[m->col[t]]++;
	}
	for (int64_t k = 0; k < N; k++)
		if (colcount[k] > (int64_t)d)
			d = (uint32_t)colcount[k];
	free(colcount);
	CHECK(pl->ncolours == d, "%s: %u colours for maximum degree %u (König)", what,
		pl->ncolours, d);
	/* each colour a matching; every nonzero exactly once with its value */
	int *seen = calloc((size_t)(N * N), sizeof *seen);
	int64_t total = 0;
	for (uint32_t c = 0; c < pl->ncolours; c++) {
		int *rused = calloc((size_t)N, sizeof *rused);
		int *cused = calloc((size_t)N, sizeof *cused);
		const dw_sparse_colour *col = &pl->colour[c];
		for (int64_t k = 0; k < col->nedges; k++) {
			int64_t r = col->row[k], q = col->col[k];
			CHECK(!rused[r] && !cused[q], "%s: colour %u not a matching at (%lld,%lld)",
				what, c, (long long)r, (long long)q);
			rused[r] = cused[q] = 1;
			seen[r * N + q]++;
			total++;
			cplx want = 0;
			for (int64_t t = m->rowptr[r]; t < m->rowptr[r + 1]; t++)
				if (m->col[t] == q)
					want = m->val[t];
			CHECK(want != 0 && col->val[k] == want, "%s: colour %u edge value", what, c);
		}
		free(rused);
		free(cused);
	}
	CHECK(total == m->nnz, "%s: %lld edges coloured, %lld nonzeros", what,
		(long long)total, (long long)m->nnz);
	for (int64_t r = 0; r < N; r++)
		for (int64_t t = m->rowptr[r]; t < m->rowptr[r + 1]; t++)
			CHECK(seen[r * N + m->col[t]] == 1, "%s: nonzero (%lld,%lld) covered %d times",
				what, (long long)r, (long long)m->col[t], seen[r * N + m->col[t]]);
	free(seen);
}

/* Every colour's circuit against exp(-i theta/2 T_c) on all basis states. */
static void check_terms(hand *h, bool with_sgn, double theta, const char *what, bool exact)
{
	dw_sparse_plan pl;
	dw_error e = {0};
	if (dw_sparse_plan_make(&h->p, &pl, &e)) {
		CHECK(0, "%s: plan: %s", what, e.msg);
		return;
	}
	if (exact)
		CHECK(pl.data_error < 1e-12, "%s: values exactly representable (bound %g)",
			what, pl.data_error);
	check_colouring(&pl, &h->m, what);
	int n = h->p.n;
	int64_t N = (int64_t)1 << n;
	uint32_t top = (with_sgn ? 2u : 1u) + (uint32_t)n;
	size_t D = (size_t)1 << top;
	for (uint32_t c = 0; c < pl.ncolours; c++) {
		dw_circuit *circ = dw_circuit_new();
		uint32_t id = dw_sparse_term_def(circ, &h->p, &pl, c, with_sgn, &e);
		CHECK(id != DW_NO_DEF, "%s: term %u: %s", what, c, e.msg);
		if (id == DW_NO_DEF) {
			dw_circuit_free(circ);
			continue;
		}
		/* dense T_c on (anc, [sgn], sys): bit 0 anc, [bit 1 sgn], then sys */
		cplx *T = calloc(D * D, sizeof *T);
		const dw_sparse_colour *col = &pl.colour[c];
		uint32_t sh = with_sgn ? 2 : 1;
		for (int64_t k = 0; k < col->nedges; k++) {
			size_t j = (size_t)col->row[k], q = (size_t)col->col[k];
			cplx v = dw_sparse_loaded(&pl, c, k) / h->p.alpha;
			for (size_t sg = 0; sg < (with_sgn ? 2u : 1u); sg++) {
				size_t r0 = (j << sh) | (sg << 1) | 0;
				size_t c1 = (q << sh) | ((with_sgn ? sg ^ 1 : 0) << 1) | 1;
				T[r0 * D + c1] += v;
				T[c1 * D + r0] += conj(v);
			}
		}
		cplx *U = malloc(D * D * sizeof *U);
		expm_herm(T, D, theta, U);
		uint32_t nq = dw_def_qubits(circ, id);
		uint32_t *map = malloc(nq * sizeof *map);
		for (uint32_t q = 0; q < nq; q++)
			map[q] = q;
		double worst = 0, leak = 0;
		bool measure = h->p.uncompute == DW_UNCOMPUTE_MEASURE;
		for (size_t run = 0; run < D * (measure ? 2 : 1); run++) {
			size_t in = run % D;
			msim ms;
			memset(&ms, 0, sizeof ms);
			ms.prefer = (int)(run / D);
			irsim_init(&ms.s, (int)nq);
			irsim s = ms.s;
			s.psi[0] = 0;
			s.psi[in] = 1;
			double par = theta;
			CHECK(dw_walk(circ, id, map, &par, msim_gate, &ms) == 0, "walk");
			CHECK(measure ? ms.measured > 0 : ms.measured == 0, "%s: %d measurements",
				what, ms.measured);
			for (size_t i = 0; i < s.dim; i++) {
				if (i >= D) {
					leak += creal(s.psi[i] * conj(s.psi[i]));
					continue;
				}
				worst = fmax(worst, cabs(s.psi[i] - U[i * D + in]));
			}
			free(s.psi);
		}
		CHECK(worst < 1e-10, "%s: colour %u: max deviation %.3g from the exact "
			"exponential", what, c, worst);
		CHECK(leak < 1e-20, "%s: colour %u: scratch not returned to |0> (%.3g)", what,
			c, leak);
		CHECK(fabs(col->norm * h->p.alpha - 0) > 0, "%s: norm", what);
		free(map);
		free(T);
		free(U);
		dw_circuit_free(circ);
	}
	(void)N;
	dw_sparse_plan_free(&pl);
}

static void test_exponentials(void)
{
	/* real symmetric, indefinite, with diagonal; multiples of 1/2 */
	const cplx real4[16] = {
		2, -1, 0, 0.5,
		-1, -3, 1.5, 0,
		0, 1.5, 1, -2,
		0.5, 0, -2, -0.5};
	/* complex Hermitian: magnitudes 1..3, phases multiples of pi/4 */
	cplx z = 2 * cexp(I * M_PI / 4);
	const cplx cplx4[16] = {
		1, 2 * I, 0, -1,
		-2 * I, 0, z, 0,
		0, conj(z), -2, 3 * I,
		-1, 0, -3 * I, 3};
	const cplx tiny[4] = {0.5, -1, -1, 0};
	hand h;
	double thetas[3] = {0.7, -2.3, 5.1};
	for (int t = 0; t < 3; t++) {
		hand_make(&h, 2, real4, 5, 0);
		check_terms(&h, false, thetas[t], "real 4x4", true);
		check_terms(&h, true, thetas[t], "real 4x4 with sgn", true);
		hand_free(&h);
		hand_make(&h, 2, cplx4, 4, 0);
		check_terms(&h, false, thetas[t], "complex 4x4", true);
		hand_free(&h);
		hand_make(&h, 1, tiny, 3, 0);
		check_terms(&h, true, thetas[t], "real 2x2 with sgn", true);
		hand_free(&h);
	}
	hand_make(&h, 2, real4, 5, 0);
	h.p.uncompute = DW_UNCOMPUTE_MEASURE;   /* ANDs erased by measurement */
	check_terms(&h, true, 0.9, "real 4x4 with sgn, measured", true);
	hand_free(&h);
	hand_make(&h, 2, cplx4, 4, 0);
	h.p.uncompute = DW_UNCOMPUTE_MEASURE;
	check_terms(&h, false, -1.7, "complex 4x4, measured", true);
	hand_free(&h);
	hand_make(&h, 1, tiny, 3, 1);   /* 14 qubits with the block of 2 words */
	check_terms(&h, false, 1.3, "real 2x2 select-swap", true);
	check_terms(&h, true, -0.4, "real 2x2 select-swap with sgn", true);
	hand_free(&h);
	hand_make(&h, 1, tiny, 3, 0);
	h.p.value_bits = 0;     /* auto: the entries are exact at small b */
	dw_sparse_plan pl;
	dw_error e = {0};
	CHECK(dw_sparse_plan_make(&h.p, &pl, &e) == 0, "%s", e.msg);
	CHECK(pl.value_bits <= 3 && pl.data_error == 0, "auto bits %d (error %g) for "
		"entries {0.5, -1}", pl.value_bits, pl.data_error);
	dw_sparse_plan_free(&pl);
	hand_free(&h);
}

/* Rounded values: the circuit applies the loaded (rounded) matrix, and the
 * recorded bound covers the real change of the normalised solution
 * (LAPACKE_zgesv on A and on the loaded A'). */
static void test_rounding(void)
{
	cplx a[16];
	for (int i = 0; i < 4; i++)
		for (int j = 0; j <= i; j++) {
			double re = (double)(rnd() % 2000) / 1000.0 - 1.0;
			double im = i == j ? 0 : (double)(rnd() % 2000) / 1000.0 - 1.0;
			a[i * 4 + j] = re + I * im + (i == j ? 3.0 : 0.0);
			a[j * 4 + i] = conj(a[i * 4 + j]);
		}
	for (int bits = 3; bits <= 9; bits += 3) {
		hand h;
		hand_make(&h, 2, a, bits, 0);
		char what[64];
		snprintf(what, sizeof what, "rounded complex 4x4, %d bits", bits);
		if (bits == 3)
			check_terms(&h, false, 1.1, what, false);
		dw_sparse_plan pl;
		dw_error e = {0};
		if (dw_sparse_plan_make(&h.p, &pl, &e)) {
			CHECK(0, "%s", e.msg);
			hand_free(&h);
			continue;
		}
		cplx A[16], L[16], x[4], y[4];
		memset(L, 0, sizeof L);
		for (int i = 0; i < 16; i++)
			A[i] = a[(i % 4) * 4 + i / 4];          /* column-major */
		for (uint32_t c = 0; c < pl.ncolours; c++)
			for (int64_t k = 0; k < pl.colour[c].nedges; k++)
				L[pl.colour[c].row[k] + 4 * pl.colour[c].col[k]] =
					dw_sparse_loaded(&pl, c, k);
		lapack_int ipiv[4];
		for (int i = 0; i < 4; i++)
			x[i] = y[i] = 1.0 + 0.5 * i;
		LAPACKE_zgesv(LAPACK_COL_MAJOR, 4, 1, A, 4, ipiv, x, 4);
		LAPACKE_zgesv(LAPACK_COL_MAJOR, 4, 1, L, 4, ipiv, y, 4);
		double nx = 0, ny = 0;
		cplx ov = 0;
		for (int i = 0; i < 4; i++) {
			nx += creal(x[i] * conj(x[i]));
			ny += creal(y[i] * conj(y[i]));
			ov += conj(x[i]) * y[i];
		}
		double fid = creal(ov * conj(ov)) / (nx * ny);
		double td = sqrt(fmax(0, 1 - fid));    /* pure states */
		CHECK(pl.data_error > 0 && td <= pl.data_error, "%s: solution moved %.3g, bound "
			"%.3g", what, td, pl.data_error);
		dw_sparse_plan_free(&pl);
		hand_free(&h);
	}
}

int main(void)
{
	test_and();
	uint64_t Ls[] = {1, 2, 3, 4, 5, 7, 8, 13, 16, 21};
	for (size_t i = 0; i < sizeof Ls / sizeof *Ls; i++)
		for (int mode = 0; mode < 3; mode++) {
			test_lookup(Ls[i], 4, mode, false);
			test_lookup(Ls[i], 4, mode, true);
		}
	test_exponentials();
	test_rounding();
	return check_done();
}
