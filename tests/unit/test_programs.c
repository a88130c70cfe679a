/* test_programs.c - whole compiled programs, simulated.
 * For each problem file given on the command line: compile K instances,
 * simulate each (tests/unit/irsim.h), average the reduced state on
 * (anc, [sgn], sys), and compare it with the target |0>[|+>]|x>, x solving
 * the original A x = b by LAPACKE_zgesv (dw_verify_target): the trace
 * distance must be within the precision target, and every work qubit must
 * return to |0>.  `dwell verify` (emitted text, runtime reader and
 * simulator) must give the same figures as this simulation of the IR.
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
	/* the target |0>[|+>]|x>, x by LAPACKE_zgesv on the original matrix */
	cplx *target = NULL;
	size_t D = 0;
	if (dw_verify_target(&p, &target, &D, &e)) {
		CHECK(0, "%s: exact solution: %s", path, e.msg);
		dw_problem_free(&p);
		return;
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
			dw_cost_set_matrix_limit(40);
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
