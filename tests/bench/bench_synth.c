/* bench_synth.c - T-count and time of rz(theta) synthesis against eps.
 *
 * Run by hand (not under meson test): build-dir/tests/bench/bench_synth [N]
 * For eps = 1e-2 ... 1e-15 and N angles each (default 100, uniform in
 * [0, 2 pi), fixed seed), prints mean and max T-count beside
 * 3 log2(1/eps) (the typical count of the optimal ancilla-free method,
 * "Optimal ancilla-free Clifford+T approximation of z-rotations", QIC
 * 16(11&12), 2016), mean and max wall time per rotation, and checks each
 * result's error against eps in long double (independent of the MPFR
 * arithmetic of the synthesis). */
#include <complex.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "dwell/synth.h"

typedef long double complex cld;

static uint64_t rng_state = 0x5851f42d4c957f2dULL;

static double rng_unit(void)
{
	rng_state ^= rng_state << 13;
	rng_state ^= rng_state >> 7;
	rng_state ^= rng_state << 17;
	return (double)(rng_state >> 11) / 9007199254740992.0;
}

static double now_ms(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec * 1e3 + t.tv_nsec / 1e6;
}

/* distance up to global phase between the sequence and rz(theta), long
 * double, gate matrices as in the OpenQASM 3 standard library */
static long double check_error(const dw_synth_result *r, double theta)
{
	const long double s = sqrtl(0.5L);
	cld p[2][2] = {{1, 0}, {0, 1}};
	for (size_t i = 0; i < r->count; i++) {
		cld m[2][2] = {{1, 0}, {0, 1}}, q[2][2];
		switch (r->gates[i]) {
		case DW_SQ_H: m[0][0] = s; m[0][1] = s; m[1][0] = s; m[1][1] = -s; break;
		case DW_SQ_S: m[1][1] = I; break;
		case DW_SQ_SDG: m[1][1] = -I; break;
		case DW_SQ_T: m[1][1] = s + I * s; break;
		case DW_SQ_TDG: m[1][1] = s - I * s; break;
		case DW_SQ_X: m[0][0] = 0; m[0][1] = 1; m[1][0] = 1; m[1][1] = 0; break;
		case DW_SQ_Y: m[0][0] = 0; m[0][1] = -I; m[1][0] = I; m[1][1] = 0; break;
		case DW_SQ_Z: m[1][1] = -1; break;
		}
		for (int a = 0; a < 2; a++)
			for (int b = 0; b < 2; b++)
				q[a][b] = m[a][0] * p[0][b] + m[a][1] * p[1][b];
		memcpy(p, q, sizeof q);
	}
	cld z0 = cexpl(-I * (long double)theta / 2), z1 = conjl(z0);
	cld tr = conjl(z0) * p[0][0] + conjl(z1) * p[1][1];
	cld ph = conjl(tr) / cabsl(tr);
	cld d00 = ph * p[0][0] - z0, d01 = ph * p[0][1], d10 = ph * p[1][0], d11 = ph * p[1][1] - z1;
	long double a = creall(conjl(d00) * d00 + conjl(d10) * d10);
	long double dd = creall(conjl(d01) * d01 + conjl(d11) * d11);
	cld b = conjl(d00) * d01 + conjl(d10) * d11;
	long double disc = (a - dd) * (a - dd) / 4 + creall(b * conjl(b));
	return sqrtl((a + dd) / 2 + sqrtl(disc));
}

int main(int argc, char **argv)
{
	int n = argc > 1 ? atoi(argv[1]) : 100;
	if (n <= 0)
		n = 100;
	printf("| eps | 3 log2(1/eps) | mean T | max T | mean T - 3 log2(1/eps) | mean ms | max ms | errors > eps |\n");
	printf("|---|---|---|---|---|---|---|---|\n");
	int bad_total = 0;
	for (int e = 2; e <= 15; e++) {
		double eps = pow(10.0, -e);
		double bound = 3 * log2(1 / eps);
		double tsum = 0, msum = 0, mmax = 0;
		unsigned tmax = 0;
		int bad = 0, ok = 0;
		for (int i = 0; i < n; i++) {
			double theta = 2 * acos(-1.0) * rng_unit();
			dw_synth_result r;
			dw_error err = {0};
			double t0 = now_ms();
			int st = dw_synth_rz(theta, eps, &r, &err);
			double dt = now_ms() - t0;
			if (st != DW_OK) {
				fprintf(stderr, "eps %g theta %.17g: %s\n", eps, theta, err.msg);
				bad++;
				continue;
			}
			if (check_error(&r, theta) > (long double)eps + 1e-15L)
				bad++;
			tsum += r.t_count;
			if (r.t_count > tmax)
				tmax = r.t_count;
			msum += dt;
			if (dt > mmax)
				mmax = dt;
			ok++;
			dw_synth_result_free(&r);
		}
		bad_total += bad;
		printf("| 1e-%d | %.1f | %.1f | %u | %+.1f | %.1f | %.1f | %d |\n", e, bound,
			ok ? tsum / ok : 0, tmax, ok ? tsum / ok - bound : 0,
			ok ? msum / ok : 0, mmax, bad);
		fflush(stdout);
	}
	return bad_total ? 1 : 0;
}
