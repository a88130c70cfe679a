/* cmd_synth.c - `dwell synth ANGLE --precision EPS [--json]`.
 *
 * Takes: an angle (a constant expression: 0.3, pi/8, -3*pi/4 ...; see
 * dw_angle_expr_eval in qasm.h) and a precision.  Gives: on stdout the
 * Clifford+T sequence for rz(ANGLE) in circuit order (first gate applied
 * first), its T-count and its error (operator norm, up to global phase);
 * with --json one object {"angle", "precision", "sequence", "t_count",
 * "error"}.  Exit status 1 for a bad command line, 2 for a bad angle or
 * precision, 4 if the search gives up. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/cli.h"
#include "dwell/qasm.h"
#include "dwell/synth.h"

static void synth_usage(FILE *f)
{
	fprintf(f, "usage: dwell synth ANGLE --precision EPS [--json]\n"
		"  ANGLE  radians, a constant expression (0.3, pi/8, -3*pi/4, ...)\n"
		"  EPS    operator-norm error bound, 1e-30 <= EPS < 1\n"
		"prints a Clifford+T sequence (circuit order) for\n"
		"rz(ANGLE) = diag(e^{-i ANGLE/2}, e^{i ANGLE/2}) up to global phase\n");
}

int dw_cmd_synth(int argc, char **argv)
{
	const char *angle_text = NULL, *eps_text = NULL;
	int json = 0;
	for (int i = 1; i < argc; i++) {
		const char *a = argv[i];
		if (!strcmp(a, "--json")) {
			json = 1;
		} else if (!strcmp(a, "--precision")) {
			if (i + 1 >= argc) {
				fprintf(stderr, "dwell: synth: --precision needs a value\n");
				return DW_EUSAGE;
			}
			eps_text = argv[++i];
		} else if (!strncmp(a, "--precision=", 12)) {
			eps_text = a + 12;
		} else if (!strcmp(a, "-h") || !strcmp(a, "--help")) {
			synth_usage(stdout);
			return DW_OK;
		} else if (!strncmp(a, "--", 2)) {
			fprintf(stderr, "dwell: synth: unknown option '%s'\n", a);
			synth_usage(stderr);
			return DW_EUSAGE;
		} else if (!angle_text) {
			angle_text = a;          /* may start with '-': -pi/4 */
		} else {
			fprintf(stderr, "dwell: synth: unexpected argument '%s'\n", a);
			synth_usage(stderr);
			return DW_EUSAGE;
		}
	}
	if (!angle_text || !eps_text) {
		fprintf(stderr, "dwell: synth: %s\n",
			!angle_text ? "missing ANGLE" : "missing --precision EPS");
		synth_usage(stderr);
		return DW_EUSAGE;
	}
	dw_error err = {0};
	double theta = 0;
	if (dw_angle_expr_eval(angle_text, &theta, &err) != DW_OK)
		return dw_report(&err);
	if (!isfinite(theta)) {
		dw_fail(&err, DW_EINPUT, "synth: angle '%s' is not finite", angle_text);
		return dw_report(&err);
	}
	char *end = NULL;
	errno = 0;
	double eps = strtod(eps_text, &end);
	if (end == eps_text || *end != '\0' || errno == ERANGE || !(eps >= 1e-30) || !(eps < 1)) {
		dw_fail(&err, DW_EINPUT,
			"synth: precision '%s': expected a number with 1e-30 <= EPS < 1",
			eps_text);
		return dw_report(&err);
	}
	dw_synth_result res;
	if (dw_synth_rz(theta, eps, &res, &err) != DW_OK)
		return dw_report(&err);
	if (json) {
		printf("{\"angle\": %.17g, \"precision\": %.17g, \"sequence\": [", theta, eps);
		for (size_t i = 0; i < res.count; i++)
			printf("%s\"%s\"", i ? ", " : "", dw_sq_gate_name(res.gates[i]));
		printf("], \"t_count\": %u, \"error\": %.17g}\n", res.t_count, res.error);
	} else {
		printf("rz(%.17g) within %.3g\n", theta, eps);
		printf("t-count   %u\n", res.t_count);
		printf("gates     %zu\n", res.count);
		printf("error     %.6g\n", res.error);
		printf("phase     %.17g  (rz = e^{i phase} * product)\n", res.global_phase);
		printf("sequence  ");
		for (size_t i = 0; i < res.count; i++)
			printf("%s%s", i ? " " : "", dw_sq_gate_name(res.gates[i]));
		printf("%s\n", res.count ? "" : "(identity)");
	}
	dw_synth_result_free(&res);
	if (fflush(stdout) != 0) {
		fprintf(stderr, "dwell: synth: cannot write output\n");
		return DW_EINTERNAL;
	}
	return DW_OK;
}
