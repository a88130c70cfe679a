/* cmd_verify.c - `dwell verify PROBLEM.yaml [--instances K] [--json]
 * [--set k=v]...`.  Takes: argv.  Gives: the verification report on stdout;
 * exit 0 when the trace distance is within the precision target, 3 when
 * not, 2 on bad input (including a problem too large to simulate). */
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "dwell/dwell.h"
#include "dwell/verify.h"

static int usage(const char *msg)
{
	fprintf(stderr, "dwell verify: %s\nusage: dwell verify PROBLEM.yaml [--instances K] "
		"[--json] [--quiet] [--set key.path=value]...\n", msg);
	return DW_EUSAGE;
}

int dw_cmd_verify(int argc, char **argv)
{
	const char *path = NULL;
	const char **sets = calloc((size_t)argc + 1, sizeof *sets);
	size_t nsets = 0;
	long K = 16;
	bool json = false, quiet = false;
	int rc = DW_OK;
	if (!sets)
		return DW_EINTERNAL;
	for (int i = 1; i < argc && rc == DW_OK; i++) {
		const char *a = argv[i];
		if (!strcmp(a, "--set") && i + 1 < argc && strchr(argv[i + 1], '=')) {
			sets[nsets++] = argv[++i];
		} else if (!strcmp(a, "--instances") && i + 1 < argc) {
			char *end;
			K = strtol(argv[++i], &end, 10);
			if (*end || K < 1 || K > 10000)
				rc = usage("--instances must be an integer from 1 to 10000");
		} else if (!strcmp(a, "--json")) {
			json = true;
		} else if (!strcmp(a, "--quiet") || !strcmp(a, "-q")) {
			quiet = true;
		} else if (a[0] == '-') {
			rc = usage("unknown option or missing value");
		} else if (!path) {
			path = a;
		} else {
			rc = usage("only one problem file");
		}
	}
	if (rc == DW_OK && !path)
		rc = usage("missing PROBLEM.yaml");
	if (rc) {
		free(sets);
		return rc;
	}
	dw_problem p;
	dw_error e = {0};
	dw_verify_report r;
	if (dw_problem_load(path, sets, nsets, &p, &e) || dw_problem_analyse(&p, &e) ||
	    dw_verify(&p, (int)K, !quiet && isatty(2) ? stderr : NULL, &r, &e)) {
		free(sets);
		dw_problem_free(&p);
		return dw_report(&e);
	}
	if (json) {
		printf("{\"trace_distance\": %.17g, \"fidelity\": %.17g, \"fidelity_min\": %.17g, "
			"\"work_clean_probability\": %.17g, \"precision\": %.17g, \"instances\": %d, "
			"\"qubits\": %d, \"passed\": %s}\n", r.trace_distance, r.fidelity,
			r.fidelity_min, r.work_clean_probability, r.precision, r.instances, r.qubits,
			r.passed ? "true" : "false");
	} else {
		printf("verify %s: %d instances of %d qubits simulated\n", p.name, r.instances,
			r.qubits);
		printf("  trace distance to |0>%s|x>   %.6g (precision %.6g)\n",
			p.variant == 'I' ? "|+>" : "", r.trace_distance, r.precision);
		printf("  fidelity mean / min        %.6f / %.6f\n", r.fidelity, r.fidelity_min);
		printf("  work qubits back in |0>    %.12f\n", r.work_clean_probability);
		printf("  %s\n", r.passed ? "PASSED" : "FAILED: trace distance above the precision");
	}
	free(sets);
	dw_problem_free(&p);
	return r.passed ? DW_OK : DW_EBUDGET;
}
