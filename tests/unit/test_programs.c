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
#include "check.h"
#include "irsim.h"

typedef double complex cplx;

static void rhs_vector(const dw_problem *p, cplx *b)
{
	size_t N = (size_t)1 << p->n;
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
	for (int i = 0; i < nq; i++)
		if (c->t[g->qubits[i]] > m)
			m = c->t[g->qubits[i]];
	for (int i = 0; i < nq; i++)
		c->t[g->qubits[i]] = m + 1;
	if (m + 1 > c->depth)
		c->depth = m + 1;
	return 0;
}

static void run_problem(const char *path, int K)
{
	dw_problem p;
	dw_error e = {0};
	if (dw_problem_load(path, NULL, 0, &p, &e) || dw_problem_analyse(&p, &e)) {
		CHECK(0, "%s: %s", path, e.msg);
		return;
	}
	size_t N = (size_t)1 << p.n;
	/* exact solution by LAPACKE_zgesv on the dense (unscaled) matrix */
	cplx *A = dw_pauli_dense(&p, &e);
	cplx *x = malloc(N * sizeof *x);
	lapack_int *ipiv = malloc(N * sizeof *ipiv);
	rhs_vector(&p, x);
	int info = LAPACKE_zgesv(LAPACK_COL_MAJOR, (lapack_int)N, 1, A, (lapack_int)N, ipiv,
		x, (lapack_int)N);
	CHECK(info == 0, "%s: zgesv info %d", path, info);
	double nx = 0;
	for (size_t i = 0; i < N; i++)
		nx += creal(x[i] * conj(x[i]));
	for (size_t i = 0; i < N; i++)
		x[i] /= sqrt(nx);
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
	info = LAPACKE_zheev(LAPACK_ROW_MAJOR, 'N', 'U', (lapack_int)D, rho, (lapack_int)D, w);
	CHECK(info == 0, "zheev");
	double td = 0;
	for (size_t i = 0; i < D; i++)
		td += fabs(w[i]) / 2;
	printf("%s: variant %c, kappa %.4g, %d instances: trace distance %.4g "
		"(precision %.3g), min fidelity %.4f, work leakage %.2g\n", path, p.variant,
		p.kappa, K, td, p.precision, fid_min, dirty);
	CHECK(td <= p.precision, "%s: trace distance %.4g exceeds the precision %.3g", path,
		td, p.precision);
	CHECK(dirty < 1e-20, "%s: work qubits not returned to |0> (%.3g)", path, dirty);
	free(w);
	free(rho);
	free(target);
	free(A);
	free(x);
	free(ipiv);
	dw_problem_free(&p);
}

int main(int argc, char **argv)
{
	int K = 16;
	for (int i = 1; i < argc; i++)
		run_problem(argv[i], K);
	CHECK(argc > 1, "at least one problem");
	return check_done();
}
