/* commands.c - the `compile`, `cost` and `inspect` subcommands.
 * Takes: argv.  Gives: the circuit and ledger files (compile), the ledger
 * on stdout (cost), the analysis and schedule preview (inspect); exit
 * status per DESIGN 10.  Input errors are found before any file is
 * written. */
#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "dwell/audit.h"
#include "dwell/emit.h"

#define FLAT_LIMIT 20000000ULL   /* gates a --flat file may hold */

typedef struct opts {
	const char *problem;
	const char *outdir;
	const char **sets;
	size_t nsets;
	long instances;
	bool flat, json, quiet;
} opts;

static int usage_error(const char *cmd, const char *msg)
{
	fprintf(stderr, "dwell %s: %s\n", cmd, msg);
	fprintf(stderr, "usage: dwell %s PROBLEM.yaml%s [--set key.path=value]...\n", cmd,
		!strcmp(cmd, "compile") ? " [-o DIR] [--instances K] [--flat] [--quiet]"
		: !strcmp(cmd, "cost") ? " [--json]" : "");
	return DW_EUSAGE;
}

static int parse_opts(int argc, char **argv, opts *o, bool allow_out, bool allow_json)
{
	const char *cmd = argv[0];
	memset(o, 0, sizeof *o);
	o->instances = 1;
	o->sets = calloc((size_t)argc + 1, sizeof *o->sets);
	if (!o->sets)
		return DW_EINTERNAL;
	for (int i = 1; i < argc; i++) {
		const char *a = argv[i];
		if (!strcmp(a, "--set") || !strncmp(a, "--set=", 6)) {
			const char *v = a[5] == '=' ? a + 6 : (i + 1 < argc ? argv[++i] : NULL);
			if (!v || !strchr(v, '='))
				return usage_error(cmd, "--set needs key.path=value");
			o->sets[o->nsets++] = v;
		} else if (allow_out && (!strcmp(a, "-o") || !strcmp(a, "--output"))) {
			if (i + 1 >= argc)
				return usage_error(cmd, "-o needs a directory");
			o->outdir = argv[++i];
		} else if (allow_out && !strcmp(a, "--instances")) {
			char *end;
			if (i + 1 >= argc)
				return usage_error(cmd, "--instances needs a count");
			errno = 0;
			o->instances = strtol(argv[++i], &end, 10);
			if (errno || *end || o->instances < 1 || o->instances > 999)
				return usage_error(cmd, "--instances must be an integer from 1 to 999");
		} else if (allow_out && !strcmp(a, "--flat")) {
			o->flat = true;
		} else if (allow_json && !strcmp(a, "--json")) {
			o->json = true;
		} else if (!strcmp(a, "--quiet") || !strcmp(a, "-q")) {
			o->quiet = true;
		} else if (a[0] == '-' && a[1]) {
			char msg[160];
			snprintf(msg, sizeof msg, "unknown option '%s'", a);
			return usage_error(cmd, msg);
		} else if (!o->problem) {
			o->problem = a;
		} else {
			return usage_error(cmd, "only one problem file");
		}
	}
	if (!o->problem)
		return usage_error(cmd, "missing PROBLEM.yaml");
	return DW_OK;
}

static int load(const opts *o, dw_problem *p, dw_error *e)
{
	if (dw_problem_load(o->problem, o->sets, o->nsets, p, e))
		return e->status;
	if (dw_problem_analyse(p, e))
		return e->status;
	if (p->dilated && !o->quiet)
		fprintf(stderr, "dwell: note: %s: A is not Hermitian; solving with its Hermitian "
			"dilation [[0, A], [A^dagger, 0]] (one more system qubit; solution on "
			"the top half)\n", p->path);
	return DW_OK;
}

typedef struct qasm_job {
	const dw_program *pg;
	bool flat;
} qasm_job;

static int write_qasm(FILE *f, const void *ctx, dw_error *e)
{
	const qasm_job *j = ctx;
	return dw_qasm_write(j->pg, f, j->flat, e);
}

static int write_text(FILE *f, const void *ctx, dw_error *e)
{
	(void)e;
	fputs((const char *)ctx, f);
	return DW_OK;
}

/* Audit the ledger text against the problem's budget; prints the report. */
static int audit(const dw_problem *p, const char *json, dw_error *e)
{
	if (p->budget.n == 0)
		return DW_OK;
	dw_json *doc = NULL;
	if (dw_json_parse_string(json, strlen(json), "ledger", &doc, e))
		return e->status;
	int rc = dw_budget_audit(doc, &p->budget, p->path, stderr, e);
	dw_json_free(doc);
	return rc;
}

static int make_dir(const char *dir, dw_error *e)
{
	struct stat st;
	if (stat(dir, &st) == 0) {
		if (!S_ISDIR(st.st_mode))
			return dw_fail(e, DW_EINPUT, "%s: not a directory", dir);
		return DW_OK;
	}
	if (mkdir(dir, 0777) != 0)
		return dw_fail(e, DW_EINPUT, "%s: cannot create: %s", dir, strerror(errno));
	return DW_OK;
}

int dw_cmd_compile(int argc, char **argv)
{
	opts o;
	dw_error e = {0};
	int rc = parse_opts(argc, argv, &o, true, false);
	if (rc) {
		free(o.sets);
		return rc;
	}
	dw_problem p;
	if (load(&o, &p, &e)) {
		free(o.sets);
		dw_problem_free(&p);
		return dw_report(&e);
	}
	const char *dir = o.outdir ? o.outdir : ".";
	int status = DW_OK;
	for (long k = 1; k <= o.instances && status == DW_OK; k++) {
		dw_program pg;
		dw_ledger L;
		char *json = NULL;
		if (dw_program_build(&p, (uint32_t)k, &pg, &e) || dw_ledger_build(&pg, &L, &e)) {
			dw_program_free(&pg);
			status = e.status;
			break;
		}
		if (o.flat && L.fig.gate_count > FLAT_LIMIT) {
			status = dw_fail(&e, DW_EINPUT, "%s: --flat would write %llu gates, more than "
				"the limit of %llu; drop --flat to keep definitions and loops", p.path,
				(unsigned long long)L.fig.gate_count, FLAT_LIMIT);
			dw_program_free(&pg);
			break;
		}
		json = dw_ledger_json(&L, &e);
		if (!json || make_dir(dir, &e)) {
			free(json);
			dw_program_free(&pg);
			status = e.status;
			break;
		}
		char qpath[4096], lpath[4096];
		if (o.instances > 1) {
			snprintf(qpath, sizeof qpath, "%s/circuit-%03ld.qasm", dir, k);
			snprintf(lpath, sizeof lpath, "%s/ledger-%03ld.json", dir, k);
		} else {
			snprintf(qpath, sizeof qpath, "%s/circuit.qasm", dir);
			snprintf(lpath, sizeof lpath, "%s/ledger.json", dir);
		}
		qasm_job job = {&pg, o.flat};
		if (dw_write_atomic(qpath, write_qasm, &job, &e) ||
		    dw_write_atomic(lpath, write_text, json, &e)) {
			status = e.status;
		} else {
			if (!o.quiet) {
				if (k == 1)
					dw_ledger_table(&L, stdout);
				printf("wrote %s and %s\n", qpath, lpath);
			}
			if (k == 1)
				status = audit(&p, json, &e);
		}
		free(json);
		dw_program_free(&pg);
	}
	free(o.sets);
	dw_problem_free(&p);
	if (status == DW_EBUDGET)
		return status;       /* the audit printed its lines */
	return status ? dw_report(&e) : DW_OK;
}

int dw_cmd_cost(int argc, char **argv)
{
	opts o;
	dw_error e = {0};
	int rc = parse_opts(argc, argv, &o, false, true);
	if (rc) {
		free(o.sets);
		return rc;
	}
	dw_problem p;
	dw_program pg;
	dw_ledger L;
	memset(&pg, 0, sizeof pg);
	int status = DW_OK;
	if (load(&o, &p, &e) || dw_program_build(&p, 1, &pg, &e) ||
	    dw_ledger_build(&pg, &L, &e)) {
		status = dw_report(&e);
	} else {
		char *json = dw_ledger_json(&L, &e);
		if (!json) {
			status = dw_report(&e);
		} else {
			if (o.json)
				fputs(json, stdout);
			else if (!o.quiet)
				dw_ledger_table(&L, stdout);
			status = audit(&p, json, &e);
			if (status && status != DW_EBUDGET)
				dw_report(&e);
			free(json);
		}
	}
	dw_program_free(&pg);
	dw_problem_free(&p);
	free(o.sets);
	return status;
}

int dw_cmd_inspect(int argc, char **argv)
{
	opts o;
	dw_error e = {0};
	int rc = parse_opts(argc, argv, &o, false, false);
	if (rc) {
		free(o.sets);
		return rc;
	}
	dw_problem p;
	dw_program pg;
	memset(&pg, 0, sizeof pg);
	int status = DW_OK;
	if (load(&o, &p, &e) || dw_program_build(&p, 1, &pg, &e)) {
		status = dw_report(&e);
	} else {
		const dw_schedule *s = &pg.sched;
		printf("problem %s (%s)\n", p.name, p.path);
		printf("  matrix: %s, n = %d system qubits, dimension %llu%s\n",
			p.matrix_kind == DW_MATRIX_PAULI ? "Pauli sum"
			: p.matrix_kind == DW_MATRIX_FILE ? "explicit (Matrix Market)" : "stencil",
			p.n, (unsigned long long)1 << p.n, p.dilated ? " (dilated)" : "");
		if (p.matrix_kind == DW_MATRIX_PAULI)
			printf("  %zu Pauli terms\n", p.npauli);
		else if (p.matrix_kind == DW_MATRIX_FILE && p.matrix)
			printf("  %lld nonzeros\n", (long long)p.matrix->nnz);
		else if (p.matrix_kind == DW_MATRIX_STENCIL)
			printf("  %d-D grid, %zu stencil points\n", p.stencil.dims, p.stencil.npoints);
		printf("  eigenvalues in [%.10g, %.10g], alpha = %.10g, sigma_min = %.10g\n",
			p.lambda_min, p.lambda_max, p.alpha, p.sigma_min);
		printf("  kappa = %.10g (%s), variant %c%s\n", p.kappa, p.kappa_source, p.variant,
			p.variant == 'P' ? " (positive definite)" : " (indefinite: one more qubit sgn)");
		size_t npt = 0;
		for (size_t i = 0; i < pg.nterms; i++)
			npt += pg.terms[i].pauli;
		printf("terms of K(s): %zu per group (%zu Pauli rotations, %zu lowered "
			"1-sparse terms), order-%d formula\n", pg.nterms, npt, pg.nterms - npt,
			pg.order);
		printf("error budget: path %.4g, split %.4g, synth %.4g, data %.4g (total %.4g)\n",
			pg.budget.path, pg.budget.split, pg.budget.synth, pg.budget.data,
			pg.budget.total);
		printf("schedule (seed %llu): %lld segments%s, path length %.6g, estimated path "
			"error %.4g\n", (unsigned long long)s->seed, (long long)s->q,
			s->q_auto ? " (auto)" : "", s->length, s->path_error);
		printf("  total dwell time %.6g drawn, %.6g expected; %llu product-formula "
			"steps (%s)\n", s->time_drawn, s->time_expected, (unsigned long long)pg.steps_total,
			pg.bound_used);
		printf("  %8s %12s %12s %12s %8s\n", "segment", "s", "gap bound", "dwell", "steps");
		for (int64_t j = 0; j < s->q; j++) {
			if (s->q > 12 && j == 6) {
				printf("  %8s\n", "...");
				j = s->q - 6;
			}
			const dw_segment *sg = &s->seg[j];
			printf("  %8lld %12.6g %12.6g %12.6g %8lld\n", (long long)j + 1, sg->s,
				sg->gap, sg->dwell, (long long)sg->steps);
		}
	}
	dw_program_free(&pg);
	dw_problem_free(&p);
	free(o.sets);
	return status;
}
