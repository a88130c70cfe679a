/* bench_mtx.c - how fast and how lean the Matrix Market reader is.
 *
 * Takes: [--keep] [--digits D] [NNZ [ROWS [PATH]]] (defaults 10,000,000
 * nonzeros, 1,000,000 rows, 17 significant digits per value,
 * /tmp/dwell-bench-mtx.mtx); --keep leaves the file behind.
 * Gives: on stdout the file size, the wall and CPU seconds dw_mtx_read_matrix
 * takes, the
 * peak resident memory (getrusage) before and after, and bytes per nonzero.
 *
 * The matrix is an invented random banded one: each row gets NNZ/ROWS
 * distinct columns within 64 of the diagonal, written row by row with the
 * columns of a row in random order (so the reader's row sort is exercised),
 * values random in (-1, 1) printed with D significant digits (17 by
 * default: the slow path of the reader's number parsing; 6 or fewer take
 * its fast path).  Run on demand, not under
 * `meson test`; the figures go in docs/matrix-market.md. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <time.h>

#include "dwell/mtx.h"

#define BAND 64

static uint64_t rng_state = 88172645463325252ULL;

/* xorshift64 (Marsaglia, "Xorshift RNGs", J. Stat. Software 2003). */
static uint64_t rng_next(void)
{
	rng_state ^= rng_state << 13;
	rng_state ^= rng_state >> 7;
	rng_state ^= rng_state << 17;
	return rng_state;
}

static double seconds_now(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* CPU seconds (user + system) of this process so far: less sensitive than
 * wall time to other jobs on a shared machine. */
static double cpu_seconds(void)
{
	struct rusage use;
	getrusage(RUSAGE_SELF, &use);
	return (double)(use.ru_utime.tv_sec + use.ru_stime.tv_sec)
		+ 1e-6 * (double)(use.ru_utime.tv_usec + use.ru_stime.tv_usec);
}

static long peak_rss_kib(void)
{
	struct rusage use;
	getrusage(RUSAGE_SELF, &use);
	return use.ru_maxrss;   /* KiB on Linux */
}

static int write_banded(const char *path, int64_t nnz, int64_t rows, int digits)
{
	FILE *f = fopen(path, "w");
	if (!f) {
		perror(path);
		return 1;
	}
	static char buf[1 << 20];
	setvbuf(f, buf, _IOFBF, sizeof buf);
	int64_t per_row = nnz / rows, extra = nnz % rows;
	if (per_row + 1 > 2 * BAND + 1 || per_row + 1 > rows) {
		fprintf(stderr, "too many nonzeros per row for the band\n");
		fclose(f);
		return 1;
	}
	fprintf(f, "%%%%MatrixMarket matrix coordinate real general\n"
		"%% invented random banded matrix for bench_mtx\n%lld %lld %lld\n",
		(long long)rows, (long long)rows, (long long)nnz);
	int64_t cols[2 * BAND + 1];
	for (int64_t i = 0; i < rows; i++) {
		int64_t want = per_row + (i < extra);
		int64_t lo = i - BAND < 0 ? 0 : i - BAND;
		int64_t hi = i + BAND >= rows ? rows - 1 : i + BAND;
		int64_t span = hi - lo + 1;
		/* partial Fisher-Yates over the band */
		for (int64_t k = 0; k < span; k++)
			cols[k] = lo + k;
		for (int64_t k = 0; k < want; k++) {
			int64_t s = k + (int64_t)(rng_next() % (uint64_t)(span - k));
			int64_t t = cols[k];
			cols[k] = cols[s];
			cols[s] = t;
			double v = (double)(int64_t)(rng_next() >> 11) / 9007199254740992.0 * 2.0 - 1.0;
			fprintf(f, "%lld %lld %.*g\n", (long long)i + 1, (long long)cols[k] + 1,
				digits, v);
		}
	}
	if (fclose(f) != 0) {
		perror(path);
		return 1;
	}
	return 0;
}

int main(int argc, char **argv)
{
	int64_t nnz = 10000000, rows = 1000000;
	const char *path = "/tmp/dwell-bench-mtx.mtx";
	int keep = 0, pos = 0, digits = 17;
	for (int a = 1; a < argc; a++) {
		if (!strcmp(argv[a], "--keep"))
			keep = 1;
		else if (!strcmp(argv[a], "--digits") && a + 1 < argc)
			digits = atoi(argv[++a]);
		else if (pos == 0 && ++pos)
			nnz = atoll(argv[a]);
		else if (pos == 1 && ++pos)
			rows = atoll(argv[a]);
		else
			path = argv[a];
	}
	if (nnz < 1 || rows < 1 || digits < 1 || digits > 17) {
		fprintf(stderr, "usage: bench_mtx [--keep] [--digits 1..17] [NNZ [ROWS [PATH]]]\n");
		return 1;
	}
	double t0 = seconds_now();
	if (write_banded(path, nnz, rows, digits))
		return 1;
	double t1 = seconds_now();
	struct stat info;
	stat(path, &info);
	long rss_before = peak_rss_kib();

	dw_csr *m = NULL;
	dw_error err = {0};
	double c2 = cpu_seconds(), t2 = seconds_now();
	int st = dw_mtx_read_matrix(path, stderr, &m, &err);
	double t3 = seconds_now(), c3 = cpu_seconds();
	long rss_after = peak_rss_kib();
	if (st) {
		fprintf(stderr, "dwell: %s\n", err.msg);
		return st;
	}
	printf("file:            %s, %.1f MB (%d-digit values), written in %.2f s\n",
		path, (double)info.st_size / 1e6, digits, t1 - t0);
	printf("matrix:          %lld x %lld, %lld nonzeros\n", (long long)m->rows,
		(long long)m->cols, (long long)m->nnz);
	printf("read:            %.2f s wall, %.2f s CPU (%.0f ns CPU per nonzero, %.0f MB/s)\n",
		t3 - t2, c3 - c2, 1e9 * (c3 - c2) / (double)m->nnz,
		(double)info.st_size / 1e6 / (t3 - t2));
	printf("peak RSS:        %.1f MB before reading, %.1f MB after\n",
		rss_before / 1024.0, rss_after / 1024.0);
	printf("bytes/nonzero:   %.1f at peak (growth of peak RSS / nnz); "
		"%.1f held by the CSR result\n",
		(double)(rss_after - rss_before) * 1024.0 / (double)m->nnz,
		(double)((size_t)(m->rows + 1) * 8 + (size_t)m->nnz * 24) / (double)m->nnz);
	dw_csr_free(m);
	if (!keep)
		remove(path);
	return 0;
}
