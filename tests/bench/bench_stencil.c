/* bench_stencil.c - how `dwell cost` scales with the grid of a stencil.
 *
 * Takes: [MINLOG MAXLOG [STEP [ORDER]]] (default 6 40 2 4): grids of
 * 2^MINLOG, 2^(MINLOG+STEP), ..., 2^MAXLOG points (even powers), 1-D and
 * 2-D (square), of the screened Laplacian
 * (the 3- or 5-point Laplacian plus sigma = 0.5 on the diagonal, Dirichlet:
 * an invented steady heat problem with losses, kappa below 9 in 1-D and
 * 17 in 2-D at every size, so the schedule barely moves and the grid alone
 * does), and the 2-D Dirichlet Laplacian without screening on the largest
 * grid (2^20 x 2^20 when MAXLOG is 40).  Gives: on stdout, per grid, the
 * wall seconds of load + analysis, program build, ledger, and every ledger
 * figure; for the plain Laplacian also each term's figures and the size of
 * its OpenQASM file (environment: BENCH_NO_LEDGER skips that program's
 * ledger, whose depth matrices over its many segments take long;
 * BENCH_PLAIN_ONLY runs only that program).
 * Run on demand (not under `meson test`); the table goes in
 * docs/stencils.md. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "dwell/dwell.h"

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static int write_qasm(FILE *f, const void *ctx, dw_error *e)
{
	return dw_qasm_write(ctx, f, false, e);
}

/* One row; returns 0 when it ran. */
static int run(const char *dir, int dims, int logn, double diag, int order, bool emit)
{
	char path[256], yaml[600];
	snprintf(path, sizeof path, "%s/grid.yaml", dir);
	long long side = dims == 1 ? 1LL << logn : 1LL << (logn - logn / 2);
	long long side1 = 1LL << (logn / 2);
	if (dims == 1)
		snprintf(yaml, sizeof yaml, "matrix: {stencil: {shape: [%lld], points: "
			"{\"0\": %.17g, \"-1\": -1, \"+1\": -1}}}\nrhs: {uniform: true}\n"
			"formula: {order: %d}\n", side, diag, order);
	else
		snprintf(yaml, sizeof yaml, "matrix: {stencil: {shape: [%lld, %lld], points: "
			"{\"0,0\": %.17g, \"-1,0\": -1, \"+1,0\": -1, \"0,-1\": -1, \"0,+1\": -1}}}\n"
			"rhs: {uniform: true}\nformula: {order: %d}\n", side, side1, diag, order);
	FILE *f = fopen(path, "w");
	if (!f)
		return 1;
	fputs(yaml, f);
	fclose(f);
	dw_problem p;
	dw_error e = {0};
	double t0 = now();
	if (dw_problem_load(path, NULL, 0, &p, &e) || dw_problem_analyse(&p, &e)) {
		printf("%d-D 2^%d: %s\n", dims, logn, e.msg);
		dw_problem_free(&p);
		return 1;
	}
	double t1 = now();
	dw_program pg;
	if (dw_program_build(&p, 1, &pg, &e)) {
		printf("%d-D 2^%d: %s\n", dims, logn, e.msg);
		dw_problem_free(&p);
		return 1;
	}
	double t2 = now();
	if (emit && getenv("BENCH_NO_LEDGER")) {
		printf("plain Laplacian: kappa %.6g, q %lld, steps %lld, %zu definitions, analysis "
			"%.3f s, build %.3f s (ledger skipped: BENCH_NO_LEDGER)\n", p.kappa,
			(long long)pg.sched.q, (long long)pg.steps_total, pg.circ->ndefs, t1 - t0, t2 - t1);
		goto emit_only;
	}
	dw_ledger L;
	if (dw_ledger_build(&pg, &L, &e)) {
		printf("%d-D 2^%d: %s\n", dims, logn, e.msg);
		dw_program_free(&pg);
		dw_problem_free(&p);
		return 1;
	}
	double t3 = now();
	printf("| %d-D | 2^%d | %.4g | %s | %lld | %lld | %llu | %zu | %zu | %.3g | %.3g | %.3g | "
		"%.3g | %.3g | %.3g | %.3g | %.3f | %.3f | %.3f |\n",
		dims, logn, p.kappa, p.kappa_source, (long long)pg.sched.q,
		(long long)pg.steps_total, (unsigned long long)L.qubits_total,
		pg.circ->ndefs, pg.nterms,
		(double)L.fig.gate_count, (double)L.fig.toffoli_count,
		(double)L.fig.rotation_count, (double)L.t_count, (double)L.fig.two_qubit_count,
		(double)L.fig.depth, (double)L.fig.t_depth,
		t1 - t0, t2 - t1, t3 - t2);
emit_only:
	if (emit) {
		/* each term's exponential on its own */
		for (size_t k = 0; k < pg.nterms; k++) {
			const dw_term *t = &pg.terms[k];
			if (t->pauli) {
				printf("term %zu: Pauli rotation on %d qubits\n", k,
					__builtin_popcountll(t->p.x | t->p.z));
				continue;
			}
			dw_figures f;
			if (dw_cost_figures(pg.circ, t->def, &f, &e) == 0)
				printf("term %zu: %s: %u qubits (%u args), %llu gates, %llu Toffoli, "
					"%llu rotations, depth %lld\n", k, pg.circ->defs[t->def].name,
					dw_def_qubits(pg.circ, t->def), pg.circ->defs[t->def].nargs,
					(unsigned long long)f.gate_count, (unsigned long long)f.toffoli_count,
					(unsigned long long)f.rotation_count, (long long)f.depth);
		}
		char qpath[300];
		snprintf(qpath, sizeof qpath, "%s/grid.qasm", dir);
		double t4 = now();
		if (dw_write_atomic(qpath, write_qasm, &pg, &e) == 0) {
			FILE *q = fopen(qpath, "rb");
			long size = -1;
			if (q) {
				fseek(q, 0, SEEK_END);
				size = ftell(q);
				fclose(q);
			}
			printf("OpenQASM file of that program: %ld bytes, written in %.3f s\n", size,
				now() - t4);
			remove(qpath);
		} else {
			printf("OpenQASM: %s\n", e.msg);
		}
	}
	fflush(stdout);
	dw_program_free(&pg);
	dw_problem_free(&p);
	remove(path);
	return 0;
}

int main(int argc, char **argv)
{
	int minlog = argc > 2 ? atoi(argv[1]) : 6;
	int maxlog = argc > 2 ? atoi(argv[2]) : 40;
	int step = argc > 3 ? atoi(argv[3]) : 2;
	int order = argc > 4 ? atoi(argv[4]) : 4;
	if (minlog < 2 || maxlog > 40 || minlog > maxlog || step < 1
			|| (order != 1 && order != 2 && order != 4)) {
		fprintf(stderr, "usage: bench_stencil [MINLOG MAXLOG (2..40) [STEP [ORDER (1, 2, 4)]]]\n");
		return 1;
	}
	char dir[] = "/tmp/dwell-bench-stencil-XXXXXX";
	if (!mkdtemp(dir)) {
		perror("mkdtemp");
		return 1;
	}
	printf("| grid | points | kappa | kappa source | q | steps | qubits | definitions | "
		"terms | gates | toffoli | rotations | t_count (est.) | two-qubit | depth | t_depth | "
		"analysis s | build s | ledger s |\n");
	printf("|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|\n");
	for (int dims = 1; dims <= 2 && !getenv("BENCH_PLAIN_ONLY"); dims++)
		for (int logn = minlog; logn <= maxlog; logn += step)
			run(dir, dims, logn, dims * 2 + 0.5, order, false);
	printf("\nplain 2-D Dirichlet Laplacian on 2^%d x 2^%d points, order %d:\n",
		maxlog - maxlog / 2, maxlog / 2, order);
	run(dir, 2, maxlog, 4.0, order, true);
	rmdir(dir);
	return 0;
}
