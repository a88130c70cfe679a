/* bench_sim.c - speed of the dense simulator's kernels against the memory
 * bandwidth of the same machine, measured in the same run, and against
 * libquantum (Debian's libquantum-dev) on the same gates.
 *
 * Takes: [--qubits 20,24,26] [--reps R] [--no-libquantum].  Gives: a
 * table, per state size: milliseconds per gate for a dense one-qubit gate
 * on a low, a middle and the top qubit (and on the top qubit again after
 * the halves are made contiguous, to show the aliasing the gap avoids), a
 * diagonal gate, a CNOT; the bytes a gate must move (read and write the
 * whole state) divided by its time; that figure as a fraction of a plain
 * copy of the state vector (memcpy, and an OpenMP copy over all threads;
 * the better one is the reference); libquantum's time for the same gate
 * and the ratio libquantum / dwell.  Each figure is the median of R runs.
 * Run on demand (not by meson test): build/tests/bench/bench_sim. */
#include <complex.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#ifdef _OPENMP
#include <omp.h>
#endif
#ifdef HAVE_LIBQUANTUM
#include <quantum.h>
#endif

#include "dwell/sim.h"

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static int cmp_double(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return (x > y) - (x < y);
}

static double median(double *v, int n)
{
	qsort(v, (size_t)n, sizeof *v, cmp_double);
	return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

typedef struct gate {
	const char *name;
	int kind;         /* 0 dense, 1 diagonal, 2 cnot */
	int q;            /* target: 0 low, 1 middle, 2 top */
	int compact;      /* run after dw_state_compact */
} gate;

static const gate gates[] = {
	{"dense 1q, qubit 0", 0, 0, 0},
	{"dense 1q, middle", 0, 1, 0},
	{"dense 1q, top", 0, 2, 0},
	{"diagonal (rz), middle", 1, 1, 0},
	{"cnot 1 -> middle", 2, 1, 0},
	{"dense 1q, top, no gap", 0, 2, 1},
};
#define NGATES (sizeof gates / sizeof gates[0])

static int qubit_of(const gate *g, int n)
{
	return g->q == 0 ? 0 : g->q == 1 ? n / 2 : n - 1;
}

static void apply(dw_state *st, const gate *g, int n)
{
	/* a unitary (ry(0.5) times phases), so that repeated application keeps
	 * the amplitudes' size (no underflow to slow subnormal numbers) */
	const double c = 0.96891242171064473, s = 0.24740395925452294;
	const double complex dense[4] = {c * I, -s * I, s, c};
	const double complex diag[4] = {cexp(-0.15 * I), 0, 0, cexp(0.15 * I)};
	static const double complex x[4] = {0, 1, 1, 0};
	int t = qubit_of(g, n);
	if (g->kind == 0)
		dw_state_apply_1q(st, t, dense, 0, 0);
	else if (g->kind == 1)
		dw_state_apply_1q(st, t, diag, 0, 0);
	else
		dw_state_apply_1q(st, t, x, 2, 2);
}

#ifdef HAVE_LIBQUANTUM
static double lq_time(quantum_reg *r, const gate *g, int n, int reps)
{
	double *t = malloc((size_t)reps * sizeof *t);
	quantum_matrix m = quantum_new_matrix(2, 2);
	m.t[0] = 0.96891242f * I;
	m.t[1] = -0.24740396f * I;
	m.t[2] = 0.24740396f;
	m.t[3] = 0.96891242f;
	for (int k = 0; k < reps; k++) {
		int q = qubit_of(g, n);
		double t0 = now();
		if (g->kind == 0)
			quantum_gate1(q, m, r);
		else if (g->kind == 1)
			quantum_r_z(q, 0.3f, r);
		else
			quantum_cnot(1, q, r);
		t[k] = now() - t0;
	}
	quantum_delete_matrix(&m);
	double med = median(t, reps);
	free(t);
	return med;
}
#endif

int main(int argc, char **argv)
{
	int sizes[8] = {20, 24, 26}, nsizes = 3, reps = 5, peer = 1;
	for (int i = 1; i < argc; i++) {
		if (!strcmp(argv[i], "--qubits") && i + 1 < argc) {
			nsizes = 0;
			for (char *s = strtok(argv[++i], ","); s && nsizes < 8; s = strtok(NULL, ","))
				sizes[nsizes++] = atoi(s);
		} else if (!strcmp(argv[i], "--reps") && i + 1 < argc) {
			reps = atoi(argv[++i]);
		} else if (!strcmp(argv[i], "--no-libquantum")) {
			peer = 0;
		} else {
			fprintf(stderr, "usage: bench_sim [--qubits 20,24,26] [--reps R] [--no-libquantum]\n");
			return 1;
		}
	}
	if (reps < 1)
		reps = 1;
	int threads = 1;
#ifdef _OPENMP
	threads = omp_get_max_threads();
#endif
#ifndef HAVE_LIBQUANTUM
	peer = 0;
#endif
	char load[64] = "?";
	FILE *lf = fopen("/proc/loadavg", "r");
	if (lf) {
		if (!fgets(load, sizeof load, lf))
			snprintf(load, sizeof load, "?");
		load[strcspn(load, "\n")] = '\0';
		fclose(lf);
	}
	printf("dense simulator kernels: %d thread%s, median of %d runs, load average %s\n",
		threads, threads == 1 ? "" : "s", reps, load);
	printf("%-6s %-24s %10s %9s %9s %12s %8s\n", "qubits", "gate", "ms/gate", "GB/s",
		"of copy", peer ? "libquantum" : "", peer ? "ratio" : "");
	double *t = malloc((size_t)reps * sizeof *t);
	for (int s = 0; s < nsizes; s++) {
		int n = sizes[s];
		dw_state *st = NULL;
		dw_error err = {0};
		if (dw_state_new(n, &st, &err)) {
			fprintf(stderr, "bench_sim: %s\n", err.msg);
			continue;
		}
		static const double complex h[4] = {0.70710678118654752, 0.70710678118654752,
			0.70710678118654752, -0.70710678118654752};
		for (int q = 0; q < n; q++)
			dw_state_apply_1q(st, q, h, 0, 0);
		uint64_t bytes = st->dim * sizeof(double complex);
		/* reference: copies of the state vector (read + write counted) */
		double complex *a = malloc(bytes), *b = malloc(bytes);
		memset(a, 1, bytes);
		memset(b, 0, bytes);
		for (int k = 0; k < reps; k++) {
			double t0 = now();
			memcpy(b, a, bytes);
			t[k] = now() - t0;
		}
		double copy1 = median(t, reps);
		const int64_t len = (int64_t)st->dim;
		for (int k = 0; k < reps; k++) {
			double t0 = now();
#ifdef _OPENMP
#pragma omp parallel for schedule(static)
#endif
			for (int64_t i = 0; i < len; i++)
				b[i] = a[i];
			t[k] = now() - t0;
		}
		double copyp = median(t, reps);
		double copy = copy1 < copyp ? copy1 : copyp;
		double copy_bw = 2.0 * (double)bytes / copy / 1e9;
		printf("%-6d %-24s %10.3f %9.2f %9s   (memcpy %.2f, OpenMP copy %.2f GB/s)\n", n,
			"copy of the state", 1e3 * copy, copy_bw, "1.00",
			2.0 * (double)bytes / copy1 / 1e9, 2.0 * (double)bytes / copyp / 1e9);
		free(a);
		free(b);
#ifdef HAVE_LIBQUANTUM
		quantum_reg r;
		if (peer) {
			r = quantum_new_qureg(0, n);
			quantum_walsh(n, &r);
		}
#endif
		for (size_t g = 0; g < NGATES; g++) {
			if (gates[g].compact)
				dw_state_compact(st);
			apply(st, &gates[g], n);     /* warm-up */
			for (int k = 0; k < reps; k++) {
				double t0 = now();
				apply(st, &gates[g], n);
				t[k] = now() - t0;
			}
			double med = median(t, reps);
			double bw = 2.0 * (double)bytes / med / 1e9;
			printf("%-6d %-24s %10.3f %9.2f %9.2f", n, gates[g].name, 1e3 * med, bw, bw / copy_bw);
#ifdef HAVE_LIBQUANTUM
			if (peer && !gates[g].compact) {
				double lq = lq_time(&r, &gates[g], n, reps);
				printf(" %10.3f ms %7.1fx", 1e3 * lq, lq / med);
			}
#endif
			printf("\n");
			fflush(stdout);
		}
#ifdef HAVE_LIBQUANTUM
		if (peer)
			quantum_delete_qureg(&r);
#endif
		dw_state_free(st);
	}
	free(t);
	return 0;
}
