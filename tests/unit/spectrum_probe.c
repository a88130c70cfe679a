/* spectrum_probe.c - test helper for tests/external/check_spectrum.py.
 * Takes: PROBLEM.yaml [key.path=value ...].  Gives: the classical analysis
 * (dw_problem_load + dw_problem_analyse) as one JSON object on stdout, all
 * reals with 17 significant digits; on error "dwell: message" on stderr and
 * the error status. */
#include <stdio.h>

#include "dwell/dwell.h"

int main(int argc, char **argv)
{
	if (argc < 2) {
		fprintf(stderr, "usage: spectrum_probe PROBLEM.yaml [key.path=value ...]\n");
		return DW_EUSAGE;
	}
	dw_problem p;
	dw_error e = {0};
	int rc = dw_problem_load(argv[1], (const char *const *)argv + 2,
		(size_t)argc - 2, &p, &e);
	if (!rc)
		rc = dw_problem_analyse(&p, &e);
	if (rc) {
		fprintf(stderr, "dwell: %s\n", e.msg);
		dw_problem_free(&p);
		return rc;
	}
	printf("{\"n\": %d, \"alpha\": %.17g, \"sigma_min\": %.17g, "
		"\"lambda_min\": %.17g, \"lambda_max\": %.17g, \"kappa\": %.17g, "
		"\"kappa_source\": \"%s\", \"variant\": \"%c\", \"dilated\": %s}\n",
		p.n, p.alpha, p.sigma_min, p.lambda_min, p.lambda_max, p.kappa,
		p.kappa_source, p.variant, p.dilated ? "true" : "false");
	dw_problem_free(&p);
	return DW_OK;
}
