/* cmd_run.c - `dwell run CIRCUIT.qasm [--param name=value]... [--json] [--seed S]`.
 * Takes: an OpenQASM 3 file in the subset the reader takes, values for
 * its inputs (constant expressions such as pi/4), a measurement seed.
 * Gives on stdout: the final state -- every amplitude as [re, im] for up
 * to 20 qubits, index little-endian by declaration order (the first
 * declared qubit is bit 0) -- or, above 20 qubits, the 32 most probable
 * basis states; the classical bits; as a table or JSON (docs/runtime.md).
 * Numbers are printed with 17 significant digits. */
#include <errno.h>
#include <inttypes.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"
#include "dwell/sim.h"

#define FULL_STATE_MAX 20
#define TOP_OUTCOMES 32

static double clean(double v)
{
	return v == 0 ? 0.0 : v;     /* no "-0" in the output */
}

static void usage(void)
{
	fprintf(stderr, "usage: dwell run CIRCUIT.qasm [--param name=value]... [--json] [--seed S]\n");
}

typedef struct outcome {
	uint64_t index;
	double prob;
} outcome;

/* Better first: higher probability, then lower index. */
static int better(const outcome *a, const outcome *b)
{
	return a->prob > b->prob || (a->prob == b->prob && a->index < b->index);
}

/* The k most probable basis states, best first; gives how many. */
static size_t top_outcomes(const dw_state *st, outcome *top, size_t k)
{
	size_t n = 0;
	for (uint64_t i = 0; i < st->dim; i++) {
		double complex a = st->amp[i];
		outcome o = {i, creal(a) * creal(a) + cimag(a) * cimag(a)};
		if (o.prob == 0 || (n == k && !better(&o, &top[n - 1])))
			continue;
		size_t j = n < k ? n++ : k - 1;
		while (j > 0 && better(&o, &top[j - 1])) {
			top[j] = top[j - 1];
			j--;
		}
		top[j] = o;
	}
	return n;
}

static uint64_t reg_value(uint64_t index, const dw_qasm_reg *r)
{
	uint64_t mask = r->size >= 64 ? UINT64_MAX : (((uint64_t)1 << r->size) - 1);
	return (index >> r->offset) & mask;
}

static void print_json(FILE *f, const dw_qasm_program *prog, const dw_state *st, uint64_t seed)
{
	fprintf(f, "{\"qubits\": %d, \"seed\": %" PRIu64 ", \"registers\": [", st->nqubits, seed);
	for (size_t i = 0; i < dw_qasm_num_qregs(prog); i++) {
		const dw_qasm_reg *r = dw_qasm_qreg(prog, i);
		fprintf(f, "%s{\"name\": \"%s\", \"offset\": %d, \"size\": %d}", i ? ", " : "",
			r->name, r->offset, r->size);
	}
	fprintf(f, "], \"bits\": {");
	for (size_t i = 0; i < dw_qasm_num_cregs(prog); i++) {
		const dw_qasm_reg *r = dw_qasm_creg(prog, i);
		fprintf(f, "%s\"%s\": [", i ? ", " : "", r->name);
		for (int j = 0; j < r->size; j++)
			fprintf(f, "%s%d", j ? ", " : "", st->bits[r->offset + j]);
		fprintf(f, "]");
	}
	fprintf(f, "}, ");
	if (st->nqubits <= FULL_STATE_MAX) {
		fprintf(f, "\"amplitudes\": [");
		for (uint64_t i = 0; i < st->dim; i++)
			fprintf(f, "%s[%.17g, %.17g]", i ? ", " : "", clean(creal(st->amp[i])),
				clean(cimag(st->amp[i])));
		fprintf(f, "]}\n");
		return;
	}
	outcome top[TOP_OUTCOMES];
	size_t n = top_outcomes(st, top, TOP_OUTCOMES);
	fprintf(f, "\"outcomes\": [");
	for (size_t i = 0; i < n; i++)
		fprintf(f, "%s{\"index\": %" PRIu64 ", \"probability\": %.17g}", i ? ", " : "",
			top[i].index, top[i].prob);
	fprintf(f, "]}\n");
}

static void print_index(FILE *f, const dw_qasm_program *prog, uint64_t i)
{
	fprintf(f, "%10" PRIu64, i);
	for (size_t r = 0; r < dw_qasm_num_qregs(prog); r++)
		fprintf(f, "  %s=%" PRIu64, dw_qasm_qreg(prog, r)->name,
			reg_value(i, dw_qasm_qreg(prog, r)));
}

static void print_table(FILE *f, const char *path, const dw_qasm_program *prog,
	const dw_state *st, uint64_t seed)
{
	fprintf(f, "# %s: %d qubit%s, seed %" PRIu64 ", %" PRIu64 " operations applied\n", path,
		st->nqubits, st->nqubits == 1 ? "" : "s", seed, st->gates_applied);
	for (size_t r = 0; r < dw_qasm_num_qregs(prog); r++) {
		const dw_qasm_reg *q = dw_qasm_qreg(prog, r);
		if (q->size == 1)
			fprintf(f, "# register %s: qubit %d\n", q->name, q->offset);
		else
			fprintf(f, "# register %s: qubits %d-%d\n", q->name, q->offset,
				q->offset + q->size - 1);
	}
	for (size_t r = 0; r < dw_qasm_num_cregs(prog); r++) {
		const dw_qasm_reg *c = dw_qasm_creg(prog, r);
		fprintf(f, "# bits %s:", c->name);
		for (int j = 0; j < c->size; j++)
			fprintf(f, " %s[%d]=%d", c->name, j, st->bits[c->offset + j]);
		fputc('\n', f);
	}
	if (st->nqubits <= FULL_STATE_MAX) {
		fprintf(f, "# index (bit k = qubit k) and register values, amplitude [re, im], "
			"probability\n");
		uint64_t zeros = 0;
		for (uint64_t i = 0; i < st->dim; i++) {
			double re = clean(creal(st->amp[i])), im = clean(cimag(st->amp[i]));
			if (re == 0 && im == 0) {
				zeros++;
				continue;
			}
			print_index(f, prog, i);
			fprintf(f, "  [%.17g, %.17g]  %.17g\n", re, im, re * re + im * im);
		}
		if (zeros)
			fprintf(f, "# %" PRIu64 " of %" PRIu64 " amplitudes are exactly 0 and not listed\n",
				zeros, st->dim);
		return;
	}
	outcome top[TOP_OUTCOMES];
	size_t n = top_outcomes(st, top, TOP_OUTCOMES);
	fprintf(f, "# more than %d qubits: the %zu most probable basis states\n"
		"# index (bit k = qubit k) and register values, probability\n", FULL_STATE_MAX, n);
	for (size_t i = 0; i < n; i++) {
		print_index(f, prog, top[i].index);
		fprintf(f, "  %.17g\n", top[i].prob);
	}
}

static void free_params(dw_qasm_param *params, size_t n)
{
	for (size_t i = 0; i < n; i++)
		free((char *)params[i].name);
	free(params);
}

int dw_cmd_run(int argc, char **argv)
{
	const char *path = NULL;
	int json = 0;
	uint64_t seed = 1;
	dw_qasm_param *params = calloc((size_t)argc + 1, sizeof *params);
	size_t nparams = 0;
	dw_error err = {0};
	int rc = DW_OK;
	if (!params)
		return dw_report(&(dw_error){DW_EINTERNAL, "out of memory"});
	for (int i = 1; i < argc && rc == DW_OK; i++) {
		const char *a = argv[i];
		if (!strcmp(a, "--json")) {
			json = 1;
		} else if (!strcmp(a, "--seed") || !strncmp(a, "--seed=", 7)) {
			const char *v = a[6] == '=' ? a + 7 : (i + 1 < argc ? argv[++i] : NULL);
			char *end;
			errno = 0;
			unsigned long long s = v ? strtoull(v, &end, 10) : 0;
			if (!v || !*v || *end || errno || *v == '-')
				rc = dw_fail(&err, DW_EUSAGE, "--seed: expected an unsigned integer");
			seed = s;
		} else if (!strcmp(a, "--param") || !strncmp(a, "--param=", 8)) {
			const char *v = a[7] == '=' ? a + 8 : (i + 1 < argc ? argv[++i] : NULL);
			const char *eq = v ? strchr(v, '=') : NULL;
			if (!eq || eq == v) {
				rc = dw_fail(&err, DW_EUSAGE, "--param: expected name=value");
				break;
			}
			char *name = strndup(v, (size_t)(eq - v));
			if (!name) {
				rc = dw_fail(&err, DW_EINTERNAL, "out of memory");
				break;
			}
			for (size_t k = 0; k < nparams; k++)
				if (!strcmp(params[k].name, name))
					rc = dw_fail(&err, DW_EUSAGE, "--param %s given twice", name);
			double x = 0;
			dw_error bad = {0};
			if (rc == DW_OK && dw_angle_expr_eval(eq + 1, &x, &bad))
				rc = dw_fail(&err, DW_EUSAGE, "--param %s: %s", name, bad.msg);
			params[nparams].name = name;
			params[nparams++].value = x;
		} else if (!strcmp(a, "-h") || !strcmp(a, "--help")) {
			usage();
			free_params(params, nparams);
			return DW_OK;
		} else if (a[0] == '-' && a[1]) {
			rc = dw_fail(&err, DW_EUSAGE, "run: unknown option '%s'", a);
		} else if (path) {
			rc = dw_fail(&err, DW_EUSAGE, "run: expected one circuit file, got '%s' and '%s'",
				path, a);
		} else {
			path = a;
		}
	}
	if (rc == DW_OK && !path)
		rc = dw_fail(&err, DW_EUSAGE, "run: expected a circuit file");
	if (rc == DW_EUSAGE) {
		dw_report(&err);
		usage();
		free_params(params, nparams);
		return rc;
	}
	dw_qasm_program *prog = NULL;
	dw_state *st = NULL;
	dw_qasm_params ps = {nparams, params};
	if (rc == DW_OK)
		rc = dw_qasm_parse_file(path, &prog, &err);
	if (rc == DW_OK)
		rc = dw_sim_run(prog, &ps, seed, &st, &err);
	if (rc == DW_OK) {
		if (json)
			print_json(stdout, prog, st, seed);
		else
			print_table(stdout, path, prog, st, seed);
		if (fflush(stdout) != 0 || ferror(stdout))
			rc = dw_fail(&err, DW_EINTERNAL, "error writing the output");
	}
	dw_state_free(st);
	dw_qasm_free(prog);
	free_params(params, nparams);
	return rc ? dw_report(&err) : DW_OK;
}
