/* test_programs.c - whole compiled programs, simulated.
 * For each problem file given on the command line: compile K instances,
 * simulate each (tests/unit/irsim.h), average the reduced state on
 * (anc, [sgn], sys), and compare it with the target |0>[|+>]|x>, x solving
 * A x = b by LAPACKE_zgesv on the dense matrix: the trace distance must be
 * within the precision target, and every work qubit must return to |0>.
 * Also checks that the hierarchical ledger figures equal a brute-force
 * count of the flattened program. */
#include <complex.h>
#include <lapacke.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"
#include "dwell/verify.h"
#include "check.h"
#include "irsim.h"

typedef double complex cplx;

static void rhs_vector(const dw_problem *p, cplx *b)
{
	size_t N = (size_t)1 << p->n;
	if (p->rhs_kind == DW_RHS_CIRCUIT) {
		/* the user circuit run by the runtime simulator, on the low qubits */
		dw_qasm_program *prog = NULL;
		dw_state *st = NULL;
		dw_error e = {0};
		memset(b, 0, N * sizeof *b);
		CHECK(dw_qasm_parse_file(p->rhs_file, &prog, &e) == 0
			&& dw_sim_run(prog, NULL, 1, &st, &e) == 0, "%s", e.msg);
		for (uint64_t i = 0; st && i < st->dim && i < N; i++)
			b[i] = st->amp[i];
		dw_state_free(st);
		dw_qasm_free(prog);
		return;
	}
	for (size_t i = 0; i < N; i++) {
		switch (p->rhs_kind) {
		case DW_RHS_BASIS:
			b[i] = i == p->basis ? 1 : 0;
			break;
		case DW_RHS_UNIFORM:
			b[i] = 1 / sqrt((double)N);
			break;
		case DW_RHS_PRODUCT: {
			cplx a = 1;
			for (int k = 0; k < p->n; k++)
				a *= (i >> k) & 1 ? cexp(I * p->product[k][1]) * sin(p->product[k][0] / 2)
					: cos(p->product[k][0] / 2);
			b[i] = a;
			break;
		}
		default:
			b[i] = p->amps[i];
		}
	}
}

/* Dense column-major A of a stencil, built here from the DESIGN 3.3
 * convention: index j = x0 + N0 x1 + N0 N1 x2, A[j][j+o] += c, Dirichlet
 * drops neighbours outside the grid, periodic wraps them. */
static cplx *stencil_matrix(const dw_stencil *st, size_t *dout)
{
	int64_t n[3] = {st->shape[0], st->dims > 1 ? st->shape[1] : 1,
		st->dims > 2 ? st->shape[2] : 1};
	size_t d = (size_t)(n[0] * n[1] * n[2]);
	cplx *A = calloc(d * d, sizeof *A);
	for (int64_t j = 0; j < (int64_t)d; j++) {
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
				A[(size_t)j + (size_t)col * d] += st->coeff[k];
		}
	}
	*dout = d;
	return A;
}

/* The exact normalised solution in the analysed space (2^n entries), by
 * LAPACKE_zgesv on the dense unscaled matrix: the Pauli sum, or for a
 * matrix file the ORIGINAL file (read again, d rows): x is put in rows
 * 0..d-1, zero on the padding, and for a dilated problem in the upper
 * block (top sys qubit 1: the target |1>|x>, DESIGN 3.1). */
static int exact_solution(const dw_problem *p, cplx *xfull, dw_error *e)
{
	size_t N = (size_t)1 << p->n;
	cplx *bfull = malloc(N * sizeof *bfull);
	rhs_vector(p, bfull);
	size_t d = N, off = 0;
	cplx *A = NULL;
	if (p->matrix_kind == DW_MATRIX_FILE) {
		dw_csr *m = NULL;
		if (dw_mtx_read_matrix(p->matrix_file, NULL, &m, e)) {
			free(bfull);
			return e->status;
		}
		d = (size_t)m->rows;
		A = calloc(d * d, sizeof *A);
		for (int64_t r = 0; r < m->rows; r++)
			for (int64_t k = m->rowptr[r]; k < m->rowptr[r + 1]; k++)
				A[(size_t)r + (size_t)m->col[k] * d] += m->val[k];
		dw_csr_free(m);
		if (p->dilated)
			off = N / 2;
	} else if (p->matrix_kind == DW_MATRIX_STENCIL) {
		A = stencil_matrix(&p->stencil, &d);
		if (p->dilated)
			off = N / 2;
	} else {
		A = dw_pauli_dense(p, e);
		if (!A) {
			free(bfull);
			return e->status;
		}
	}
	/* the original b: the first d entries (padding and the dilation's
	 * lower block are zero by construction) */
	cplx *x = malloc(d * sizeof *x);
	for (size_t i = 0; i < d; i++)
		x[i] = bfull[i];
	for (size_t i = d; i < N; i++)
		CHECK(cabs(bfull[i]) < 1e-15, "rhs zero beyond the original rows");
	lapack_int *ipiv = malloc(d * sizeof *ipiv);
	int info = LAPACKE_zgesv(LAPACK_COL_MAJOR, (lapack_int)d, 1, A, (lapack_int)d, ipiv,
		x, (lapack_int)d);
	CHECK(info == 0, "zgesv info %d", info);
	double nx = 0;
	for (size_t i = 0; i < d; i++)
		nx += creal(x[i] * conj(x[i]));
	memset(xfull, 0, N * sizeof *xfull);
	for (size_t i = 0; i < d; i++)
		xfull[off + i] = x[i] / sqrt(nx);
	free(x);
	free(A);
	free(ipiv);
	free(bfull);
	return DW_OK;
}

typedef struct counter {
	uint64_t gates[DW_G_COUNT];
	int64_t *t;
	int64_t depth;
} counter;

static int count_gate(const dw_walk_gate *g, void *ctx)
{
	counter *c = ctx;
	c->gates[g->gate]++;
	int64_t m = 0;
	int nq = dw_gates[g->gate].nqubits;
	uint32_t w[4] = {0, 0, 0, 0};
	for (int i = 0; i < nq; i++)
		w[i] = g->qubits[i];
	if (g->cond && g->cond_qubit != w[0] && (nq < 2 || g->cond_qubit != w[1]))
		w[nq++] = g->cond_qubit;   /* waits for the measurement */
	for (int i = 0; i < nq; i++)
		if (c->t[w[i]] > m)
			m = c->t[w[i]];
	for (int i = 0; i < nq; i++)
		c->t[w[i]] = m + 1;
	if (m + 1 > c->depth)
		c->depth = m + 1;
	return 0;
}

static void run_problem(const char *path, const char *const *sets, size_t nsets, int K)
{
	dw_problem p;
	dw_error e = {0};
	if (dw_problem_load(path, sets, nsets, &p, &e) || dw_problem_analyse(&p, &e)) {
		CHECK(0, "%s: %s", path, e.msg);
		return;
	}
	size_t N = (size_t)1 << p.n;
	cplx *x = malloc(N * sizeof *x);
	if (exact_solution(&p, x, &e)) {
		CHECK(0, "%s: exact solution: %s", path, e.msg);
		free(x);
		dw_problem_free(&p);
		return;
	}
	bool ind = p.variant == 'I';
	size_t D = N << (ind ? 2 : 1);   /* anc, [sgn], sys */
	cplx *target = calloc(D, sizeof *target);
	for (size_t i = 0; i < N; i++) {
		if (ind) {
			target[(i << 2) | 0] = x[i] / sqrt(2.0);
			target[(i << 2) | 2] = x[i] / sqrt(2.0);
		} else {
			target[i << 1] = x[i];
		}
	}
	cplx *rho = calloc(D * D, sizeof *rho);
	double dirty = 0, fid_min = 1;
	for (int k = 1; k <= K; k++) {
		dw_program pg;
		if (dw_program_build(&p, (uint32_t)k, &pg, &e)) {
			CHECK(0, "%s: %s", path, e.msg);
			break;
		}
		uint32_t nq = pg.nqubits + pg.nwork;
		uint32_t *map = malloc(nq * sizeof *map);
		for (uint32_t q = 0; q < nq; q++)
			map[q] = q;
		irsim s;
		irsim_init(&s, (int)nq);
		CHECK(irsim_apply(&s, pg.circ, pg.top, map, NULL) == 0, "simulated");
		cplx ov = 0;
		for (size_t i = 0; i < s.dim; i++) {
			if (i >= D) {
				dirty += creal(s.psi[i] * conj(s.psi[i])) / K;
				continue;
			}
			ov += conj(target[i]) * s.psi[i];
			for (size_t j = 0; j < D; j++)
				rho[i * D + j] += s.psi[i] * conj(s.psi[j]) / K;
		}
		double fid = creal(ov * conj(ov));
		if (fid < fid_min)
			fid_min = fid;
		/* brute-force counts of the flattened program (first instance) */
		if (k == 1) {
			dw_ledger L;
			CHECK(dw_ledger_build(&pg, &L, &e) == 0, "%s", e.msg);
			counter cn;
			memset(&cn, 0, sizeof cn);
			cn.t = calloc(nq, sizeof *cn.t);
			dw_walk(pg.circ, pg.top, map, NULL, count_gate, &cn);
			for (int g = 0; g < DW_G_COUNT; g++)
				CHECK(cn.gates[g] == L.fig.gates[g], "%s: %s %llu (ledger) vs %llu (flat)",
					path, dw_gates[g].name, (unsigned long long)L.fig.gates[g],
					(unsigned long long)cn.gates[g]);
			CHECK(cn.depth == L.fig.depth, "%s: depth %lld (ledger) vs %lld (flat)", path,
				(long long)L.fig.depth, (long long)cn.depth);
			CHECK(L.qubits_total == nq, "%s: qubits", path);
			/* the front-vector evaluation (used for definitions on many
			 * qubits) gives the same depth on a fresh copy */
			dw_program pg2;
			dw_cost_set_matrix_limit(0);
			if (dw_program_build(&p, 1, &pg2, &e) == 0) {
				dw_figures f2;
				CHECK(dw_cost_figures(pg2.circ, pg2.top, &f2, &e) == 0, "%s", e.msg);
				CHECK(f2.depth == cn.depth, "%s: vector depth %lld vs %lld (flat)", path,
					(long long)f2.depth, (long long)cn.depth);
				dw_program_free(&pg2);
			}
			dw_cost_set_matrix_limit(24);
			free(cn.t);
		}
		free(map);
		free(s.psi);
		dw_program_free(&pg);
	}
	/* trace distance 1/2 || rho - |t><t| ||_1 via LAPACKE_zheev */
	for (size_t i = 0; i < D; i++)
		for (size_t j = 0; j < D; j++)
			rho[i * D + j] -= target[i] * conj(target[j]);
	double *w = malloc(D * sizeof *w);
	int info = LAPACKE_zheev(LAPACK_ROW_MAJOR, 'N', 'U', (lapack_int)D, rho, (lapack_int)D, w);
	CHECK(info == 0, "zheev");
	double td = 0;
	for (size_t i = 0; i < D; i++)
		td += fabs(w[i]) / 2;
	printf("%s%s: variant %c, kappa %.4g, %d instances: trace distance %.4g "
		"(precision %.3g), min fidelity %.4f, work leakage %.2g\n", path,
		p.gates == DW_GATES_CLIFFORD_T ? " (clifford+t)" : "", p.variant,
		p.kappa, K, td, p.precision, fid_min, dirty);
	CHECK(td <= p.precision, "%s: trace distance %.4g exceeds the precision %.3g", path,
		td, p.precision);
	CHECK(dirty < 1e-20, "%s: work qubits not returned to |0> (%.3g)", path, dirty);
	/* `dwell verify` (emitted text -> runtime reader -> dense simulator)
	 * must give the same figures as this independent simulation of the IR */
	dw_verify_report vr;
	CHECK(dw_verify(&p, K, NULL, &vr, &e) == 0, "%s: verify: %s", path, e.msg);
	CHECK(fabs(vr.trace_distance - td) < 1e-8, "%s: verify trace distance %.12g vs %.12g",
		path, vr.trace_distance, td);
	CHECK(fabs(vr.fidelity_min - fid_min) < 1e-8, "%s: verify min fidelity %.12g vs %.12g",
		path, vr.fidelity_min, fid_min);
	CHECK(vr.passed, "%s: verify passes", path);
	free(w);
	free(rho);
	free(target);
	free(x);
	dw_problem_free(&p);
}

/* Arguments: problem files; "--set k=v" applies to the problems after it,
 * "--clear" drops the overrides. */
int main(int argc, char **argv)
{
	int K = 16, nprob = 0;
	const char *sets[16];
	size_t nsets = 0;
	for (int i = 1; i < argc; i++) {
		if (!strcmp(argv[i], "--set") && i + 1 < argc && nsets < 16) {
			sets[nsets++] = argv[++i];
		} else if (!strcmp(argv[i], "--clear")) {
			nsets = 0;
		} else {
			run_problem(argv[i], sets, nsets, K);
			nprob++;
		}
	}
	CHECK(nprob > 0, "at least one problem");
	return check_done();
}
