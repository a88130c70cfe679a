/* test_stencil.c - stencils: arithmetic, closed-form spectra, lowering.
 *  - increments (plain and controlled, and their inverses) and comparators
 *    with a constant against integer arithmetic on every input, widths up
 *    to 6, ancillas back to |0>;
 *  - kappa and the extreme eigenvalues against the closed forms of
 *    "Iterative methods for sparse linear systems" (SIAM 2003) as listed in
 *    METHODS 11.1 (1-D N = 4 eigenvalues and kappa; cot^2(pi/(2(N+1))) at
 *    N = 8 and 2^20; the 2-D formula for Nx != Ny), the periodic circulant
 *    eigenvalues 2 - 2 cos(2 pi k / N) (common practice), and dense
 *    LAPACKE (zheevd / zgesvd) on matrices this test builds itself from the
 *    DESIGN 3.3 convention;
 *  - every term of X_anc (x) [X_sgn (x)] A/alpha: the definition's unitary
 *    U(theta) on the subspace where scratch qubits are |0> (they must come
 *    back to |0>), T = 2i dU/dtheta at 0 Hermitian with ||T|| <= norm,
 *    U(1.3) = exp(-i 1.3/2 T) by an eigendecomposition, and sum_k cb_k T_k
 *    equal to X_anc (x) [X_sgn (x)] A/alpha with A built here: 1-D, 2-D and
 *    3-D grids, both boundaries and mixed, 3-, 5-, 9-point stencils,
 *    offsets 1 to 4, non-symmetric stencils (dilation) and variant I. */
#include <complex.h>
#include <lapacke.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "dwell/dwell.h"
#include "check.h"
#include "irsim.h"

typedef double complex cplx;

static char tmpdir[64];

/* ---- arithmetic ---- */

/* Run definition id (nargs args + pool) on basis input `in`; returns the
 * output basis index of the args, or -1 when the result is not a basis
 * state with the ancillas at |0>. */
static int64_t run_basis(dw_circuit *c, uint32_t id, uint64_t in)
{
	uint32_t nq = dw_def_qubits(c, id);
	uint32_t map[64];
	for (uint32_t q = 0; q < nq; q++)
		map[q] = q;
	irsim s;
	irsim_init(&s, (int)nq);
	s.psi[0] = 0;
	s.psi[in] = 1;
	irsim_apply(&s, c, id, map, NULL);
	int64_t out = -1;
	for (size_t i = 0; i < s.dim; i++)
		if (cabs(s.psi[i]) > 1e-9) {
			if (out >= 0 || cabs(s.psi[i]) < 1 - 1e-9 || (i >> c->defs[id].nargs))
				out = -2;
			else
				out = (int64_t)i;
		}
	free(s.psi);
	return out < 0 ? -1 : out;
}

/* Measure mode: a walker that forces the outcome of the k-th measurement
 * to bit k of `pattern`, applies classically controlled gates when the
 * measured qubit read 1, and reports a forced outcome of probability 0
 * (the pattern cannot happen). */
typedef struct msim {
	irsim s;
	uint64_t pattern;
	int nmeas;
	uint64_t outcome;     /* by absolute qubit */
	bool impossible;
} msim;

static int msim_gate(const dw_walk_gate *g, void *ctx)
{
	msim *m = ctx;
	if (g->cond && !((m->outcome >> g->cond_qubit) & 1))
		return 0;
	if (g->gate == DW_G_MEASURE) {
		uint32_t q = g->qubits[0];
		int want = (int)((m->pattern >> m->nmeas++) & 1);
		double p = 0;
		for (size_t i = 0; i < m->s.dim; i++)
			if ((int)((i >> q) & 1) == want)
				p += creal(m->s.psi[i] * conj(m->s.psi[i]));
			else
				m->s.psi[i] = 0;
		if (p < 1e-20) {
			m->impossible = true;
			return 1;
		}
		for (size_t i = 0; i < m->s.dim; i++)
			m->s.psi[i] /= sqrt(p);
		m->outcome = (m->outcome & ~(UINT64_C(1) << q)) | ((uint64_t)want << q);
		return 0;
	}
	dw_walk_gate h = *g;
	h.cond = false;
	return irsim_gate(&h, &m->s);
}

/* Every outcome pattern of the measurement-erased definition id on basis
 * input `in` must give the basis output `want` (args), ancillas at |0>,
 * up to a global phase.  Returns the number of failing patterns. */
static int run_measured(dw_circuit *c, uint32_t id, uint64_t in, uint64_t want)
{
	uint32_t nq = dw_def_qubits(c, id), map[64];
	for (uint32_t q = 0; q < nq; q++)
		map[q] = q;
	int bad = 0, possible = 0;
	for (uint64_t pat = 0; pat < 256; pat++) {
		msim m;
		memset(&m, 0, sizeof m);
		irsim_init(&m.s, (int)nq);
		m.s.psi[0] = 0;
		m.s.psi[in] = 1;
		m.pattern = pat;
		dw_walk(c, id, map, NULL, msim_gate, &m);
		if (!m.impossible) {
			possible++;
			bad += !(cabs(m.s.psi[want]) > 1 - 1e-9);
		}
		free(m.s.psi);
		if (m.nmeas < 8 && pat + 1 >= (UINT64_C(1) << m.nmeas) && !m.impossible)
			break;    /* every pattern of the measurements made was tried */
	}
	return bad + (possible == 0);
}

static void test_arith_measured(void)
{
	dw_error e = {0};
	for (uint32_t w = 1; w <= 5; w++) {
		dw_circuit *c = dw_circuit_new();
		uint32_t inc = dw_increment_def(c, w, false, true, &e);
		uint32_t cinc = dw_increment_def(c, w, true, true, &e);
		uint32_t dec = dw_decrement_def(c, w, false, true, &e);
		uint32_t cdec = dw_decrement_def(c, w, true, true, &e);
		CHECK(inc != DW_NO_DEF && cinc != DW_NO_DEF && dec != DW_NO_DEF && cdec != DW_NO_DEF,
			"%s", e.msg);
		uint64_t N = 1u << w;
		int bad = 0;
		for (uint64_t x = 0; x < N; x++) {
			bad += run_measured(c, inc, x, (x + 1) % N);
			bad += run_measured(c, dec, x, (x + N - 1) % N);
			for (uint64_t ctl = 0; ctl < 2; ctl++) {
				uint64_t up = ctl ? (x + 1) % N : x, dn = ctl ? (x + N - 1) % N : x;
				bad += run_measured(c, cinc, ctl | x << 1, ctl | up << 1);
				bad += run_measured(c, cdec, ctl | x << 1, ctl | dn << 1);
			}
		}
		CHECK(bad == 0, "measured increments of width %u: %d wrong outcomes", w, bad);
		dw_figures f;
		dw_cost_figures(c, cinc, &f, &e);
		CHECK(f.toffoli_count == 0 && f.measure_count == (w >= 2 ? w - 1 : 0),
			"measured controlled increment: %llu Toffolis, %llu measurements (w %u)",
			(unsigned long long)f.toffoli_count, (unsigned long long)f.measure_count, w);
		bad = 0;
		for (uint64_t bound = 1; bound < N; bound++) {
			uint32_t lt = dw_less_const_def(c, w, bound, true, &e);
			CHECK(lt != DW_NO_DEF, "%s", e.msg);
			for (uint64_t z = 0; z < N; z++)
				for (uint64_t t = 0; t < 2; t++)
					bad += run_measured(c, lt, z | t << w, z | (t ^ (z < bound)) << w);
		}
		CHECK(bad == 0, "measured comparators of width %u: %d wrong outcomes", w, bad);
		dw_circuit_free(c);
	}
}

static void test_arith(void)
{
	dw_error e = {0};
	for (uint32_t w = 1; w <= 6; w++) {
		dw_circuit *c = dw_circuit_new();
		uint32_t inc = dw_increment_def(c, w, false, false, &e);
		uint32_t cinc = dw_increment_def(c, w, true, false, &e);
		uint32_t dec = dw_decrement_def(c, w, false, false, &e);
		uint32_t cdec = dw_decrement_def(c, w, true, false, &e);
		CHECK(inc != DW_NO_DEF && cinc != DW_NO_DEF && dec != DW_NO_DEF && cdec != DW_NO_DEF,
			"%s", e.msg);
		uint64_t N = 1u << w;
		int bad = 0;
		for (uint64_t x = 0; x < N; x++) {
			bad += run_basis(c, inc, x) != (int64_t)((x + 1) % N);
			bad += run_basis(c, dec, x) != (int64_t)((x + N - 1) % N);
			for (uint64_t ctl = 0; ctl < 2; ctl++) {
				uint64_t in = ctl | x << 1;
				uint64_t up = ctl ? (x + 1) % N : x, dn = ctl ? (x + N - 1) % N : x;
				bad += run_basis(c, cinc, in) != (int64_t)(ctl | up << 1);
				bad += run_basis(c, cdec, in) != (int64_t)(ctl | dn << 1);
			}
		}
		CHECK(bad == 0, "increments of width %u: %d wrong outputs", w, bad);
		/* Toffoli counts as documented: 2(w-2) plain (w >= 3), 2(w-1) controlled */
		dw_figures f;
		dw_cost_figures(c, inc, &f, &e);
		CHECK(f.toffoli_count == (w >= 3 ? 2 * (w - 2) : 0), "toffolis %llu (w %u)",
			(unsigned long long)f.toffoli_count, w);
		dw_cost_figures(c, cinc, &f, &e);
		CHECK(f.toffoli_count == 2 * (w - 1), "controlled toffolis %llu (w %u)",
			(unsigned long long)f.toffoli_count, w);
		bad = 0;
		for (uint64_t bound = 1; bound < N; bound++) {
			uint32_t lt = dw_less_const_def(c, w, bound, false, &e);
			CHECK(lt != DW_NO_DEF, "%s", e.msg);
			for (uint64_t z = 0; z < N; z++)
				for (uint64_t t = 0; t < 2; t++) {
					uint64_t want = z | (t ^ (z < bound)) << w;
					bad += run_basis(c, lt, z | t << w) != (int64_t)want;
				}
		}
		CHECK(bad == 0, "comparators of width %u: %d wrong outputs", w, bad);
		dw_circuit_free(c);
	}
}

/* ---- problems ---- */

static int load(const char *yaml, dw_problem *p, dw_error *e)
{
	static int serial;
	char path[128];
	snprintf(path, sizeof path, "%s/p%d.yaml", tmpdir, serial++);
	FILE *f = fopen(path, "w");
	fputs(yaml, f);
	fclose(f);
	int rc = dw_problem_load(path, NULL, 0, p, e);
	if (!rc)
		rc = dw_problem_analyse(p, e);
	remove(path);
	return rc;
}

/* Dense A (row-major, N x N) from the raw points by the DESIGN 3.3
 * convention: A[j][j+o] += c, Dirichlet drops, periodic wraps. */
static cplx *stencil_dense(const dw_stencil *st, int64_t *Nout)
{
	int64_t n[3] = {st->shape[0], st->dims > 1 ? st->shape[1] : 1,
		st->dims > 2 ? st->shape[2] : 1};
	int64_t N = n[0] * n[1] * n[2];
	cplx *A = calloc((size_t)(N * N), sizeof *A);
	for (int64_t j = 0; j < N; j++) {
		int64_t x[3] = {j % n[0], (j / n[0]) % n[1], j / (n[0] * n[1])};
		for (size_t k = 0; k < st->npoints; k++) {
			int64_t col = 0, stride = 1;
			bool in = true;
			for (int a = 0; a < 3; a++) {
				int64_t y = x[a] + (a < st->dims ? st->offset[k][a] : 0);
				if (y < 0 || y >= n[a]) {
					if (st->periodic[a])
						y = (y % n[a] + n[a]) % n[a];
					else
						in = false;
				}
				col += y * stride;
				stride *= n[a];
			}
			if (in)
				A[j * N + col] += st->coeff[k];
		}
	}
	*Nout = N;
	return A;
}

static void test_spectra(void)
{
	dw_problem p;
	dw_error e = {0};
	/* METHODS 11.1: 1-D Dirichlet N = 4: {0.38196601, ..., 3.61803399}, kappa 9.47213595 */
	CHECK(load("matrix: {stencil: {shape: [4], points: {\"0\": 2, \"-1\": -1, \"+1\": -1}}}\n"
		"rhs: {uniform: true}\n", &p, &e) == 0, "%s", e.msg);
	CHECK_NEAR(p.lambda_min, 0.38196601, 1e-8, "N=4 lambda_min");
	CHECK_NEAR(p.lambda_max, 3.61803399, 1e-8, "N=4 lambda_max");
	CHECK_NEAR(p.kappa, 9.47213595, 1e-7, "N=4 kappa");
	CHECK(!strcmp(p.kappa_source, "closed-form-sine"), "source %s", p.kappa_source);
	CHECK(p.variant == 'P' && p.n == 2, "variant %c n %d", p.variant, p.n);
	dw_problem_free(&p);
	/* kappa = cot^2(pi / (2 (N + 1))) (METHODS 11.1) at N = 8 and 2^20 */
	int64_t sizes[2] = {8, 1 << 20};
	for (int i = 0; i < 2; i++) {
		char y[256];
		snprintf(y, sizeof y, "matrix: {stencil: {shape: [%lld], points: {\"0\": 2, "
			"\"-1\": -1, \"+1\": -1}}}\nrhs: {uniform: true}\n", (long long)sizes[i]);
		CHECK(load(y, &p, &e) == 0, "%s", e.msg);
		double t = 1 / tan(M_PI / (2.0 * (double)(sizes[i] + 1)));
		CHECK(fabs(p.kappa / (t * t) - 1) < 1e-9, "N=%lld kappa %.12g vs %.12g",
			(long long)sizes[i], p.kappa, t * t);
		dw_problem_free(&p);
	}
	/* 2-D, Nx != Ny (METHODS 11.1):
	 * kappa = [sin^2(Nx pi/(2(Nx+1))) + sin^2(Ny pi/(2(Ny+1)))] /
	 *         [sin^2(pi/(2(Nx+1))) + sin^2(pi/(2(Ny+1)))] */
	int64_t nx[2] = {8, 1 << 20}, ny[2] = {4, 1 << 10};
	for (int i = 0; i < 2; i++) {
		char y[320];
		snprintf(y, sizeof y, "matrix: {stencil: {shape: [%lld, %lld], points: {\"0,0\": 4, "
			"\"-1,0\": -1, \"+1,0\": -1, \"0,-1\": -1, \"0,+1\": -1}}}\nrhs: {uniform: true}\n",
			(long long)nx[i], (long long)ny[i]);
		CHECK(load(y, &p, &e) == 0, "%s", e.msg);
		double X = (double)nx[i], Y = (double)ny[i];
		double s1 = sin(X * M_PI / (2 * (X + 1))), s2 = sin(Y * M_PI / (2 * (Y + 1)));
		double s3 = sin(M_PI / (2 * (X + 1))), s4 = sin(M_PI / (2 * (Y + 1)));
		double k = (s1 * s1 + s2 * s2) / (s3 * s3 + s4 * s4);
		CHECK(fabs(p.kappa / k - 1) < 1e-9, "2-D %lldx%lld kappa %.12g vs %.12g",
			(long long)nx[i], (long long)ny[i], p.kappa, k);
		CHECK(p.n == (i ? 30 : 5), "n %d", p.n);
		dw_problem_free(&p);
	}
	/* indefinite 1-D beyond the per-axis lists (2^25 points: nearest-root
	 * search) against a brute-force scan of the sine-mode eigenvalues
	 * 0.7 - 2 cos(k pi/(N+1)), k = 1..N (METHODS 11.1) */
	CHECK(load("matrix: {stencil: {shape: [33554432], points: {\"0\": 0.7, \"-1\": -1, "
		"\"+1\": -1}}}\nrhs: {uniform: true}\n", &p, &e) == 0, "%s", e.msg);
	{
		double N = 33554432.0, smin = INFINITY;
		for (long k = 1; k <= 33554432L; k++)
			smin = fmin(smin, fabs(0.7 - 2 * cos((double)k * M_PI / (N + 1))));
		CHECK(fabs(p.sigma_min / smin - 1) < 1e-6, "2^25 indefinite sigma_min %.12g vs "
			"scan %.12g", p.sigma_min, smin);
		CHECK(p.variant == 'I' && fabs(p.lambda_min - (0.7 - 2 * cos(M_PI / (N + 1)))) < 1e-12,
			"2^25 indefinite lambda_min %.15g", p.lambda_min);
	}
	dw_problem_free(&p);
	/* the compact 9-point operator 20 - 4(u + v) - u v, u = 2 cos(j pi/(N+1)),
	 * v likewise, on 2^20 x 2^20 points: smallest eigenvalue at u = v =
	 * 2 - delta, delta = 4 sin^2(pi/(2(N+1))): 12 delta - delta^2 (derived
	 * here from the sine modes, METHODS 11.1), largest at u = v = -(2 - delta):
	 * 20 + 8(2 - delta) - (2 - delta)^2 = 32 - 4 delta - delta^2 */
	CHECK(load("matrix: {stencil: {shape: [1048576, 1048576], points: {\"0,0\": 20, "
		"\"-1,0\": -4, \"+1,0\": -4, \"0,-1\": -4, \"0,+1\": -4, \"1,1\": -1, "
		"\"-1,-1\": -1, \"1,-1\": -1, \"-1,1\": -1}}}\nrhs: {uniform: true}\n", &p, &e) == 0,
		"%s", e.msg);
	{
		double sn = sin(M_PI / (2.0 * (1048576.0 + 1))), dl = 4 * sn * sn;
		CHECK(fabs(p.lambda_min / (12 * dl - dl * dl) - 1) < 1e-9, "9-point lambda_min %.15g "
			"vs %.15g", p.lambda_min, 12 * dl - dl * dl);
		CHECK(fabs(p.lambda_max - (32 - 4 * dl - dl * dl)) < 1e-12, "9-point lambda_max %.15g",
			p.lambda_max);
		CHECK(!strcmp(p.kappa_source, "closed-form-sine"), "source %s", p.kappa_source);
	}
	dw_problem_free(&p);
	/* periodic circulant: 2.5 - 2 cos(2 pi k/N) in [0.5, 4.5] (common practice) */
	CHECK(load("matrix: {stencil: {shape: [16], boundary: periodic, points: {\"0\": 2.5, "
		"\"-1\": -1, \"+1\": -1}}}\nrhs: {uniform: true}\n", &p, &e) == 0, "%s", e.msg);
	CHECK_NEAR(p.kappa, 9.0, 1e-12, "shifted periodic kappa");
	CHECK(!strcmp(p.kappa_source, "closed-form-fourier"), "source %s", p.kappa_source);
	dw_problem_free(&p);
	/* the pure periodic Laplacian is singular (k = 0): refused with figures */
	e.status = 0;
	CHECK(load("matrix: {stencil: {shape: [16], boundary: periodic, points: {\"0\": 2, "
		"\"-1\": -1, \"+1\": -1}}}\nrhs: {uniform: true}\n", &p, &e) == DW_EINPUT
		&& strstr(e.msg, "singular") && strstr(e.msg, "largest 4"), "%s", e.msg);
	dw_problem_free(&p);
	e = (dw_error){0};

	/* against dense LAPACKE on matrices built here */
	static const char *const cases[] = {
		/* indefinite shifted Laplacian, Dirichlet (sine modes, nearest root) */
		"{shape: [32], points: {\"0\": 0.9, \"-1\": -1, \"+1\": -1}}",
		/* 2-D indefinite, mixed boundaries (sorted search) */
		"{shape: [8, 16], boundary: [dirichlet, periodic], points: {\"0,0\": 1.3, "
		"\"-1,0\": -1, \"+1,0\": -1, \"0,-1\": -1, \"0,+1\": -1}}",
		/* 9-point, Dirichlet (dense fallback) */
		"{shape: [8, 4], points: {\"0,0\": 5, \"-1,0\": -1, \"+1,0\": -1, \"0,-1\": -1, "
		"\"0,+1\": -1, \"1,1\": -0.25, \"-1,-1\": -0.25, \"1,-1\": -0.5, \"-1,1\": -0.5}}",
		/* 9-point periodic (every symbol value) */
		"{shape: [8, 8], boundary: periodic, points: {\"0,0\": 5, \"-1,0\": -1, "
		"\"+1,0\": -1, \"0,-1\": -1, \"0,+1\": -1, \"1,1\": -0.25, \"-1,-1\": -0.25}}",
		/* wide 1-D stencil, offsets to 4, periodic (symbol list) and Dirichlet (dense) */
		"{shape: [64], boundary: periodic, points: {\"0\": 3, \"1\": -1, \"-1\": -1, "
		"\"2\": 0.4, \"-2\": 0.4, \"3\": -0.2, \"-3\": -0.2, \"4\": 0.1, \"-4\": 0.1}}",
		"{shape: [64], points: {\"0\": 3, \"1\": -1, \"-1\": -1, \"2\": 0.4, \"-2\": 0.4, "
		"\"3\": -0.2, \"-3\": -0.2, \"4\": 0.1, \"-4\": 0.1}}",
		/* non-symmetric (upwind advection-diffusion), both boundaries: dilation */
		"{shape: [16], points: {\"0\": 2.2, \"-1\": -1.5, \"+1\": -0.5}}",
		"{shape: [16], boundary: periodic, points: {\"0\": 2.2, \"-1\": -1.5, \"+1\": -0.5}}",
		/* compact 9-point (corners share one coefficient), Dirichlet and
		 * mixed: tensor products of 3-point operators */
		"{shape: [8, 16], points: {\"0,0\": 20, \"-1,0\": -4, \"+1,0\": -4, \"0,-1\": -4, "
		"\"0,+1\": -4, \"1,1\": -1, \"-1,-1\": -1, \"1,-1\": -1, \"-1,1\": -1}}",
		"{shape: [16, 8], boundary: [periodic, dirichlet], points: {\"0,0\": 21, \"-1,0\": -4, "
		"\"+1,0\": -4, \"0,-1\": -3, \"0,+1\": -3, \"1,1\": 0.5, \"-1,-1\": 0.5, "
		"\"1,-1\": 0.5, \"-1,1\": 0.5}}",
		/* 3-D with edge and corner points, one coefficient per support */
		"{shape: [4, 8, 4], boundary: [dirichlet, periodic, dirichlet], points: {\"0,0,0\": 12, "
		"\"1,0,0\": -1, \"-1,0,0\": -1, \"0,1,0\": -1, \"0,-1,0\": -1, \"0,0,1\": -1, "
		"\"0,0,-1\": -1, \"1,1,1\": -0.2, \"1,1,-1\": -0.2, \"1,-1,1\": -0.2, "
		"\"1,-1,-1\": -0.2, \"-1,1,1\": -0.2, \"-1,1,-1\": -0.2, \"-1,-1,1\": -0.2, "
		"\"-1,-1,-1\": -0.2}}",
		/* 3-D 7-point, periodic on axis 1 */
		"{shape: [4, 4, 2], boundary: [dirichlet, periodic, dirichlet], points: {\"0,0,0\": 6.5, "
		"\"1,0,0\": -1, \"-1,0,0\": -1, \"0,1,0\": -1, \"0,-1,0\": -1, \"0,0,1\": -1, "
		"\"0,0,-1\": -1}}",
	};
	for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
		char y[1200];
		snprintf(y, sizeof y, "matrix: {stencil: %s}\nrhs: {basis: 1}\n", cases[i]);
		if (load(y, &p, &e)) {
			CHECK(0, "case %zu: %s", i, e.msg);
			e = (dw_error){0};
			dw_problem_free(&p);
			continue;
		}
		int64_t N;
		cplx *A = stencil_dense(&p.stencil, &N);
		double *sv = malloc((size_t)N * sizeof *sv);
		/* singular values by zgesvd (LAPACKE), row-major */
		cplx *cp = malloc((size_t)(N * N) * sizeof *cp);
		memcpy(cp, A, (size_t)(N * N) * sizeof *cp);
		double *superb = malloc((size_t)N * sizeof *superb);
		int info = LAPACKE_zgesvd(LAPACK_ROW_MAJOR, 'N', 'N', (lapack_int)N, (lapack_int)N,
			cp, (lapack_int)N, sv, NULL, 1, NULL, 1, superb);
		CHECK(info == 0, "zgesvd");
		bool sym = true;
		for (int64_t r = 0; r < N; r++)
			for (int64_t c = 0; c < N; c++)
				sym = sym && A[r * N + c] == A[c * N + r];
		CHECK(p.dilated == !sym, "case %zu: dilated %d, symmetric %d", i, p.dilated, sym);
		CHECK_NEAR(p.alpha, sv[0], 1e-9 * sv[0], "alpha");
		CHECK_NEAR(p.sigma_min, sv[N - 1], 1e-9 * sv[0], "sigma_min");
		if (sym) {
			double *w = malloc((size_t)N * sizeof *w);
			memcpy(cp, A, (size_t)(N * N) * sizeof *cp);
			info = LAPACKE_zheev(LAPACK_ROW_MAJOR, 'N', 'U', (lapack_int)N, cp,
				(lapack_int)N, w);
			CHECK(info == 0, "zheev");
			CHECK_NEAR(p.lambda_min, w[0], 1e-9 * sv[0], "lambda_min");
			CHECK_NEAR(p.lambda_max, w[N - 1], 1e-9 * sv[0], "lambda_max");
			CHECK(p.variant == (w[0] > 0 ? 'P' : 'I'), "variant");
			free(w);
		}
		printf("spectrum case %zu: %s, kappa %.10g, %s%s\n", i, p.kappa_source, p.kappa,
			sym ? "symmetric" : "non-symmetric (dilated)", p.variant == 'I' ? ", indefinite" : "");
		free(A);
		free(cp);
		free(sv);
		free(superb);
		dw_problem_free(&p);
	}
}

/* ---- lowering ---- */

/* U (D x D, row-major, D = 2^nargs) of definition id with parameter th on
 * the clean subspace; *leak = largest scratch weight left. */
static void def_unitary(dw_circuit *c, uint32_t id, double th, cplx *U, double *leak)
{
	uint32_t na = c->defs[id].nargs, nq = dw_def_qubits(c, id);
	size_t D = (size_t)1 << na;
	uint32_t map[64];
	for (uint32_t q = 0; q < nq; q++)
		map[q] = q;
	for (size_t in = 0; in < D; in++) {
		irsim s;
		irsim_init(&s, (int)nq);
		s.psi[0] = 0;
		s.psi[in] = 1;
		irsim_apply(&s, c, id, map, &th);
		for (size_t i = 0; i < s.dim; i++) {
			if (i < D)
				U[i * D + in] = s.psi[i];
			else if (cabs(s.psi[i]) > *leak)
				*leak = cabs(s.psi[i]);
		}
		free(s.psi);
	}
}

/* Embed the D_loc x D_loc operator on top-level qubits q[0..k) into the
 * full D x D (n top-level qubits) by acting as identity elsewhere. */
static void embed_add(cplx *full, int n, const cplx *loc, const uint32_t *q, uint32_t k,
	double scale)
{
	size_t D = (size_t)1 << n, Dl = (size_t)1 << k;
	uint64_t mask = 0;
	for (uint32_t i = 0; i < k; i++)
		mask |= UINT64_C(1) << q[i];
	for (size_t r = 0; r < D; r++) {
		size_t lr = 0;
		for (uint32_t i = 0; i < k; i++)
			lr |= ((r >> q[i]) & 1) << i;
		for (size_t lc = 0; lc < Dl; lc++) {
			size_t c = r & ~mask;
			for (uint32_t i = 0; i < k; i++)
				c |= ((lc >> i) & 1) << q[i];
			full[r * D + c] += scale * loc[lr * Dl + lc];
		}
	}
}

static void pauli_matrix(dw_pauli pp, int n, cplx *M, double scale)
{
	size_t D = (size_t)1 << n;
	static const cplx ipow[4] = {1, I, -1, -I};
	int ny = __builtin_popcountll(pp.x & pp.z);
	for (size_t c = 0; c < D; c++) {
		size_t r = c ^ pp.x;
		double sg = __builtin_parityll(c & pp.z) ? -1 : 1;
		M[r * D + c] += scale * sg * ipow[ny % 4];
	}
}

static void check_lowering(const char *what, const char *yaml)
{
	dw_problem p;
	dw_error e = {0};
	if (load(yaml, &p, &e)) {
		CHECK(0, "%s: %s", what, e.msg);
		dw_problem_free(&p);
		return;
	}
	bool ind = p.variant == 'I';
	uint32_t sys0 = ind ? 2 : 1;
	int ntop = (int)sys0 + p.n;
	dw_layout lay = {p.variant, 0, ind ? 1 : 0, sys0, (uint32_t)p.n, (uint32_t)ntop};
	dw_circuit *c = dw_circuit_new();
	dw_term *terms = NULL;
	size_t nt = 0;
	if (dw_stencil_terms(&p, &lay, c, &terms, &nt, &e)) {
		CHECK(0, "%s: %s", what, e.msg);
		goto out;
	}
	size_t D = (size_t)1 << ntop;
	cplx *sum = calloc(D * D, sizeof *sum), *want = calloc(D * D, sizeof *want);
	int ndef = 0, npauli = 0;
	double worst_exp = 0, worst_leak = 0, worst_herm = 0;
	for (size_t k = 0; k < nt; k++) {
		CHECK(terms[k].ca == 0, "%s: ca", what);
		if (terms[k].pauli) {
			npauli++;
			pauli_matrix(terms[k].p, ntop, sum, terms[k].cb);
			continue;
		}
		ndef++;
		uint32_t id = terms[k].def, na = c->defs[id].nargs;
		CHECK(na == terms[k].nq && c->defs[id].nparams == 1, "%s: def shape", what);
		size_t Dl = (size_t)1 << na;
		cplx *Up = malloc(Dl * Dl * sizeof *Up), *Um = malloc(Dl * Dl * sizeof *Um);
		cplx *T = malloc(Dl * Dl * sizeof *T), *U1 = malloc(Dl * Dl * sizeof *U1);
		double h = 1e-5, leak = 0;
		def_unitary(c, id, h, Up, &leak);
		def_unitary(c, id, -h, Um, &leak);
		def_unitary(c, id, 1.3, U1, &leak);
		for (size_t i = 0; i < Dl * Dl; i++)
			T[i] = 2 * I * (Up[i] - Um[i]) / (2 * h);
		for (size_t i = 0; i < Dl; i++)
			for (size_t j = 0; j < Dl; j++)
				worst_herm = fmax(worst_herm, cabs(T[i * Dl + j] - conj(T[j * Dl + i])));
		/* exp(-i 1.3/2 T) from the eigendecomposition of T */
		cplx *V = malloc(Dl * Dl * sizeof *V);
		double *w = malloc(Dl * sizeof *w);
		memcpy(V, T, Dl * Dl * sizeof *V);
		int info = LAPACKE_zheev(LAPACK_ROW_MAJOR, 'V', 'U', (lapack_int)Dl, V,
			(lapack_int)Dl, w);
		CHECK(info == 0, "zheev");
		double tmax = 0;
		for (size_t i = 0; i < Dl; i++)
			tmax = fmax(tmax, fabs(w[i]));
		CHECK(tmax <= terms[k].norm * (1 + 1e-6) + 1e-9, "%s: ||T|| %.9g > norm %.9g", what,
			tmax, terms[k].norm);
		for (size_t i = 0; i < Dl; i++)
			for (size_t j = 0; j < Dl; j++) {
				cplx s = 0;
				for (size_t l = 0; l < Dl; l++)
					s += V[i * Dl + l] * cexp(-I * 1.3 / 2 * w[l]) * conj(V[j * Dl + l]);
				worst_exp = fmax(worst_exp, cabs(s - U1[i * Dl + j]));
			}
		worst_leak = fmax(worst_leak, leak);
		embed_add(sum, ntop, T, terms[k].q, terms[k].nq, terms[k].cb);
		free(Up); free(Um); free(T); free(U1); free(V); free(w);
	}
	/* X_anc (x) [X_sgn (x)] A/alpha; the dilation is [[0, A], [A^T, 0]]
	 * with the block index on the top sys qubit */
	int64_t N;
	cplx *A = stencil_dense(&p.stencil, &N);
	size_t Ns = (size_t)1 << p.n;
	cplx *As = calloc(Ns * Ns, sizeof *As);
	for (int64_t r = 0; r < N; r++)
		for (int64_t cc = 0; cc < N; cc++) {
			if (p.dilated) {
				As[(size_t)r * Ns + (size_t)(N + cc)] = A[r * N + cc] / p.alpha;
				As[(size_t)(N + cc) * Ns + (size_t)r] = conj(A[r * N + cc]) / p.alpha;
			} else {
				As[(size_t)r * Ns + (size_t)cc] = A[r * N + cc] / p.alpha;
			}
		}
	for (size_t r = 0; r < D; r++)
		for (size_t cc = 0; cc < D; cc++) {
			size_t flip = ind ? 3 : 1;      /* X_anc [X_sgn] */
			if ((r ^ cc) & ((size_t)(1u << sys0) - 1)) {
				if (((r ^ cc) & ((1u << sys0) - 1)) == flip)
					want[r * D + cc] = As[(r >> sys0) * Ns + (cc >> sys0)];
			}
		}
	double err = 0;
	for (size_t i = 0; i < D * D; i++)
		err = fmax(err, cabs(sum[i] - want[i]));
	printf("%s: n %d, variant %c%s, %zu terms (%d Pauli, %d definitions): |sum T - XA/alpha| "
		"%.2g, |U - exp| %.2g, scratch %.2g\n", what, p.n, p.variant,
		p.dilated ? ", dilated" : "", nt, npauli, ndef, err, worst_exp, worst_leak);
	CHECK(err < 1e-7, "%s: sum of terms differs from X (x) A/alpha by %.3g", what, err);
	CHECK(worst_exp < 1e-7, "%s: U(theta) is not exp(-i theta/2 T) (%.3g)", what, worst_exp);
	CHECK(worst_herm < 1e-7, "%s: T not Hermitian (%.3g)", what, worst_herm);
	CHECK(worst_leak < 1e-9, "%s: scratch qubits not back to |0> (%.3g)", what, worst_leak);
	free(A);
	free(As);
	free(sum);
	free(want);
out:
	free(terms);
	dw_circuit_free(c);
	dw_problem_free(&p);
}

static void test_lowering(void)
{
	check_lowering("1-D Dirichlet 3-point N=8",
		"matrix: {stencil: {shape: [8], points: {\"0\": 2, \"-1\": -1, \"+1\": -1}}}\n"
		"rhs: {uniform: true}\n");
	check_lowering("1-D periodic 3-point N=8",
		"matrix: {stencil: {shape: [8], boundary: periodic, points: {\"0\": 2.3, \"-1\": -1, "
		"\"+1\": -1}}}\nrhs: {uniform: true}\n");
	check_lowering("1-D Dirichlet offsets 1..4 N=16",
		"matrix: {stencil: {shape: [16], points: {\"0\": 3, \"1\": -1, \"-1\": -1, "
		"\"2\": 0.4, \"-2\": 0.4, \"3\": -0.2, \"-3\": -0.2, \"4\": 0.1, \"-4\": 0.1}}}\n"
		"rhs: {basis: 3}\n");
	check_lowering("1-D periodic offsets 1..4 N=16",
		"matrix: {stencil: {shape: [16], boundary: periodic, points: {\"0\": 3, \"1\": -1, "
		"\"-1\": -1, \"2\": 0.4, \"-2\": 0.4, \"3\": -0.2, \"-3\": -0.2, \"4\": 0.1, "
		"\"-4\": 0.1}}}\nrhs: {basis: 3}\n");
	check_lowering("1-D periodic N=4 offsets +-2 (one shift)",
		"matrix: {stencil: {shape: [4], boundary: periodic, points: {\"0\": 3, \"2\": 0.5, "
		"\"-2\": 0.5, \"1\": -1, \"-1\": -1}}}\nrhs: {basis: 1}\n");
	check_lowering("2-D Dirichlet 5-point 4x4",
		"matrix: {stencil: {shape: [4, 4], points: {\"0,0\": 4, \"-1,0\": -1, \"+1,0\": -1, "
		"\"0,-1\": -1, \"0,+1\": -1}}}\nrhs: {uniform: true}\n");
	check_lowering("2-D 9-point 4x4 Dirichlet",
		"matrix: {stencil: {shape: [4, 4], points: {\"0,0\": 5, \"-1,0\": -1, \"+1,0\": -1, "
		"\"0,-1\": -1, \"0,+1\": -1, \"1,1\": -0.25, \"-1,-1\": -0.25, \"1,-1\": -0.5, "
		"\"-1,1\": -0.5}}}\nrhs: {uniform: true}\n");
	check_lowering("2-D 9-point 4x8 periodic x, Dirichlet y",
		"matrix: {stencil: {shape: [4, 8], boundary: [periodic, dirichlet], points: {\"0,0\": 5, "
		"\"-1,0\": -1, \"+1,0\": -1, \"0,-1\": -1, \"0,+1\": -1, \"1,1\": -0.25, "
		"\"-1,-1\": -0.25, \"1,-1\": -0.5, \"-1,1\": -0.5}}}\nrhs: {uniform: true}\n");
	check_lowering("2-D offsets (3,2) and (-1,4) 8x8 Dirichlet",
		"matrix: {stencil: {shape: [8, 8], points: {\"0,0\": 5, \"3,2\": -0.3, \"-3,-2\": -0.3, "
		"\"-1,4\": 0.2, \"1,-4\": 0.2}}}\nrhs: {uniform: true}\n");
	check_lowering("3-D 7-point 2x4x2 mixed",
		"matrix: {stencil: {shape: [2, 4, 2], boundary: [dirichlet, periodic, dirichlet], "
		"points: {\"0,0,0\": 6.5, \"1,0,0\": -1, \"-1,0,0\": -1, \"0,1,0\": -1, \"0,-1,0\": -1, "
		"\"0,0,1\": -1, \"0,0,-1\": -1}}}\nrhs: {uniform: true}\n");
	check_lowering("3-D corner offsets 2x2x4 Dirichlet",
		"matrix: {stencil: {shape: [2, 2, 4], points: {\"0,0,0\": 4, \"1,1,1\": -0.5, "
		"\"-1,-1,-1\": -0.5, \"1,-1,2\": 0.3, \"-1,1,-2\": 0.3}}}\nrhs: {uniform: true}\n");
	check_lowering("1-D non-symmetric Dirichlet (dilated)",
		"matrix: {stencil: {shape: [8], points: {\"0\": 2.2, \"-1\": -1.5, \"+1\": -0.5, "
		"\"+3\": 0.2}}}\nrhs: {basis: 2}\n");
	check_lowering("2-D non-symmetric periodic 4x2 (dilated)",
		"matrix: {stencil: {shape: [4, 2], boundary: periodic, points: {\"0,0\": 3, "
		"\"-1,0\": -1.5, \"1,1\": -0.5}}}\nrhs: {uniform: true}\n");
	check_lowering("2-D Dirichlet 5-point 8x4, Clifford+T gate set (no crz)",
		"matrix: {stencil: {shape: [8, 4], points: {\"0,0\": 4, \"-1,0\": -1, \"+1,0\": -1, "
		"\"0,-1\": -1, \"0,+1\": -1}}}\nrhs: {uniform: true}\ntarget: {gates: clifford+t}\n");
	check_lowering("1-D indefinite Dirichlet N=8 (variant I)",
		"matrix: {stencil: {shape: [8], points: {\"0\": 0.5, \"-1\": -1, \"+1\": -1}}}\n"
		"rhs: {uniform: true}\n");
}

/* rhs.circuit: U_b |00> against the state worked out by hand for
 * ry(2 pi/3) q0; cx q0, q1; h q1 (gate matrices of the OpenQASM 3
 * stdgates.inc, common practice): (0.5/sqrt2)(|0> + |2>) +
 * (sin(pi/3)/sqrt2)(|1> - |3>), index = q0 + 2 q1. */
static void test_prep_circuit(void)
{
	char qasm[128], yaml[128];
	snprintf(qasm, sizeof qasm, "%s/b.qasm", tmpdir);
	snprintf(yaml, sizeof yaml, "%s/c.yaml", tmpdir);
	FILE *f = fopen(qasm, "w");
	fputs("OPENQASM 3.0;\ninclude \"stdgates.inc\";\nqubit[2] q;\n"
		"ry(2*pi/3) q[0];\ncx q[0], q[1];\nh q[1];\n", f);
	fclose(f);
	static const char *const stencils[2] = {
		"{shape: [4], boundary: periodic, points: {\"0\": 4, \"-1\": -1, \"+1\": -1}}",
		"{shape: [4], points: {\"0\": 3, \"-1\": -1, \"+1\": -0.5}}",   /* dilated */
	};
	double r2 = sqrt(2.0), s3 = sin(M_PI / 3);
	cplx want[4] = {0.5 / r2, s3 / r2, 0.5 / r2, -s3 / r2};
	for (int i = 0; i < 2; i++) {
		f = fopen(yaml, "w");
		fprintf(f, "matrix: {stencil: %s}\nrhs: {circuit: b.qasm}\n", stencils[i]);
		fclose(f);
		dw_problem p;
		dw_error e = {0};
		if (dw_problem_load(yaml, NULL, 0, &p, &e) || dw_problem_analyse(&p, &e)) {
			CHECK(0, "%s", e.msg);
			dw_problem_free(&p);
			continue;
		}
		dw_circuit *c = dw_circuit_new();
		uint32_t id = dw_stateprep_def(c, &p, &e);
		CHECK(id != DW_NO_DEF, "%s", e.msg);
		if (id != DW_NO_DEF) {
			uint32_t nq = dw_def_qubits(c, id), map[64];
			for (uint32_t q = 0; q < nq; q++)
				map[q] = q;
			irsim s;
			irsim_init(&s, (int)nq);
			irsim_apply(&s, c, id, map, NULL);
			/* up to a global phase: overlap modulus 1 */
			cplx ov = 0;
			double rest = 0;
			for (size_t k = 0; k < s.dim; k++) {
				if (k < 4)
					ov += conj(want[k]) * s.psi[k];
				else
					rest += creal(s.psi[k] * conj(s.psi[k]));
			}
			CHECK(fabs(cabs(ov) - 1) < 1e-12 && rest < 1e-24, "rhs.circuit state: overlap "
				"%.15g, weight outside %.3g (dilated %d)", cabs(ov), rest, p.dilated);
			free(s.psi);
		}
		dw_circuit_free(c);
		dw_problem_free(&p);
	}
	/* the gate-level translation against the runtime's simulator (exact
	 * OpenQASM 3 phases; equal up to a global phase): gate definitions with
	 * parameters, inv, pow, ctrl, negctrl, ctrl(2), for loops, U, sx, gphase */
	static const char *const prog3 =
		"OPENQASM 3.0;\ninclude \"stdgates.inc\";\n"
		"gate spin(a, b) u, v { ry(a) u; ctrl @ rz(b) u, v; inv @ s v; }\n"
		"qubit[3] q;\nh q;\nspin(0.3, -1.1) q[0], q[2];\n"
		"for int i in [0:1] { cx q[i], q[i+1]; }\n"
		"negctrl @ ry(0.7) q[1], q[0];\ninv @ spin(0.5, 0.2) q[1], q[0];\n"
		"pow(2) @ t q[2];\nU(0.4, 0.9, -0.3) q[1];\nctrl(2) @ x q[0], q[1], q[2];\n"
		"sx q[0];\ngphase(0.3);\ninv @ U(1.2, 0.1, 0.5) q[2];\nctrl @ gphase(0.4) q[1];\n"
		"cp(0.25) q[2], q[0];\nnegctrl @ cx q[2], q[0], q[1];\ncswap q[0], q[1], q[2];\n";
	char qasm3[128];
	snprintf(qasm3, sizeof qasm3, "%s/b3.qasm", tmpdir);
	f = fopen(qasm3, "w");
	fputs(prog3, f);
	fclose(f);
	f = fopen(yaml, "w");
	fputs("matrix: {stencil: {shape: [8], points: {\"0\": 3, \"-1\": -1, \"+1\": -1}}}\n"
		"rhs: {circuit: b3.qasm}\n", f);
	fclose(f);
	{
		dw_problem p;
		dw_error e = {0};
		dw_qasm_program *qp = NULL;
		dw_state *st = NULL;
		CHECK(dw_problem_load(yaml, NULL, 0, &p, &e) == 0 && dw_problem_analyse(&p, &e) == 0
			&& dw_qasm_parse_file(qasm3, &qp, &e) == 0 && dw_sim_run(qp, NULL, 1, &st, &e) == 0,
			"%s", e.msg);
		dw_circuit *c = dw_circuit_new();
		uint32_t id = dw_stateprep_def(c, &p, &e);
		CHECK(id != DW_NO_DEF && !strncmp(c->defs[id].name, "prep_circuit", 12),
			"translated, not loaded by amplitudes: %s", id == DW_NO_DEF ? e.msg : c->defs[id].name);
		if (id != DW_NO_DEF && st) {
			uint32_t nq = dw_def_qubits(c, id), map[64];
			for (uint32_t q = 0; q < nq; q++)
				map[q] = q;
			irsim s;
			irsim_init(&s, (int)nq);
			irsim_apply(&s, c, id, map, NULL);
			cplx ov = 0;
			for (size_t k = 0; k < 8; k++)
				ov += conj(st->amp[k]) * s.psi[k];
			CHECK(fabs(cabs(ov) - 1) < 1e-12, "translated circuit: overlap with the runtime "
				"state %.15g", cabs(ov));
			free(s.psi);
		}
		dw_state_free(st);
		dw_qasm_free(qp);
		dw_circuit_free(c);
		dw_problem_free(&p);
	}
	remove(qasm3);
	/* wrong qubit count: a located refusal */
	f = fopen(yaml, "w");
	fputs("matrix: {stencil: {shape: [8], points: {\"0\": 3, \"-1\": -1, \"+1\": -1}}}\n"
		"rhs: {circuit: b.qasm}\n", f);
	fclose(f);
	dw_problem p;
	dw_error e = {0};
	CHECK(dw_problem_load(yaml, NULL, 0, &p, &e) == 0 && dw_problem_analyse(&p, &e) == 0,
		"%s", e.msg);
	dw_circuit *c = dw_circuit_new();
	CHECK(dw_stateprep_def(c, &p, &e) == DW_NO_DEF && e.status == DW_EINPUT
		&& strstr(e.msg, "declares 2 qubits; the system register has 3"), "%s", e.msg);
	dw_circuit_free(c);
	dw_problem_free(&p);
	remove(qasm);
	remove(yaml);
}

int main(void)
{
	snprintf(tmpdir, sizeof tmpdir, "/tmp/dwell-stencil-XXXXXX");
	if (!mkdtemp(tmpdir)) {
		perror("mkdtemp");
		return 1;
	}
	test_arith();
	test_arith_measured();
	test_spectra();
	test_lowering();
	test_prep_circuit();
	rmdir(tmpdir);
	return check_done();
}
