/* ledger.c - the cost ledger of a compiled program (JSON and a table).
 * Takes: a dw_program.  Gives: exact figures from the IR's hierarchical
 * costs (never by expansion): gates by OpenQASM name, T-count (exact T
 * gates and Toffolis, plus the published synthesis estimate for every
 * arbitrary rotation in continuous mode), Toffoli, rotation, Clifford,
 * two-qubit and measurement counts, depth and T-depth, a breakdown by
 * stage and by segment, the schedule, the error budget, and the
 * assumptions behind the figures (docs/ledger.md documents every key). */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/emit.h"
#include "dwell/json.h"
#include "dwell/sparse.h"

#define T_FORMULA "ceil(3*log2(1/eps_rotation)): leading term of the typical T-count of " \
	"optimal ancilla-free Clifford+T z-rotation synthesis (Quantum Inf. Comput. 16, 2016); " \
	"the O(log log 1/eps) term is not included"

static uint64_t t_total(const dw_figures *f, uint64_t per_rot, int *sat)
{
	return dw_add_sat(f->t_count_exact, dw_mul_sat(f->rotation_count, per_rot, sat), sat);
}

int dw_ledger_build(dw_program *pg, dw_ledger *L, dw_error *e)
{
	memset(L, 0, sizeof *L);
	L->pg = pg;
	dw_circuit *c = pg->circ;
	/* rotation count first: it sets the synthesis share of each rotation */
	if (dw_cost_counts(c, pg->top, &L->fig, e))
		return e->status;
	uint64_t nrot = L->fig.rotation_count;
	bool ct = pg->problem->gates == DW_GATES_CLIFFORD_T;
	if (ct) {
		/* rotations were synthesised by the lowering; eps_rotation is its share */
	} else if (nrot > 0 && pg->budget.synth > 0) {
		pg->eps_rotation = pg->budget.synth / (double)nrot;
		pg->t_per_rotation = (uint64_t)ceil(3.0 * log2(1.0 / pg->eps_rotation));
	} else {
		pg->eps_rotation = 0;
		pg->t_per_rotation = 0;
	}
	c->t_weight_rotation = (double)pg->t_per_rotation;
	if (dw_cost_figures(c, pg->top, &L->fig, e))
		return e->status;
	int sat = 0;
	L->t_count = t_total(&L->fig, pg->t_per_rotation, &sat);
	L->t_count_estimated = nrot > 0;
	L->qubits_total = (uint64_t)pg->nqubits + pg->nwork;
	for (int s = 0; s < DW_STAGE_COUNT; s++) {
		dw_figures f;
		if (dw_cost_stage_figures(c, pg->top, (dw_stage)s, &f, e))
			return e->status;
		if (f.gate_count == 0)
			continue;
		dw_stage_row *r = &L->stage[L->nstage++];
		r->stage = (dw_stage)s;
		r->fig = f;
		r->t_count = t_total(&f, pg->t_per_rotation, &sat);
	}
	if (sat)
		L->fig.saturated = true;
	return DW_OK;
}

/* a JSON string literal (the reader's writer, json_read.c) */
static void jstr(FILE *f, const char *s)
{
	dw_json_write_string(f, s, strlen(s));
}

static void jnum(FILE *f, double v)
{
	if (isfinite(v))
		fprintf(f, "%.17g", v);
	else
		fputs("null", f);
}

static void ju(FILE *f, uint64_t v)
{
	fprintf(f, "%llu", (unsigned long long)v);
}

static const char *path_name(dw_path_kind k)
{
	switch (k) {
	case DW_PATH_GAP_ADAPTED: return "gap-adapted";
	case DW_PATH_LINEAR: return "linear";
	case DW_PATH_POWER: return "power";
	default: return "list";
	}
}

static void figures_json(FILE *f, const dw_figures *g, uint64_t tc, const char *ind)
{
	fprintf(f, "%s\"gates\": ", ind);
	ju(f, g->gate_count);
	fprintf(f, ",\n%s\"t_count\": ", ind);
	ju(f, tc);
	fprintf(f, ",\n%s\"toffoli_count\": ", ind);
	ju(f, g->toffoli_count);
	fprintf(f, ",\n%s\"rotation_count\": ", ind);
	ju(f, g->rotation_count);
	fprintf(f, ",\n%s\"two_qubit_count\": ", ind);
	ju(f, g->two_qubit_count);
	fprintf(f, ",\n%s\"depth\": %lld", ind, (long long)g->depth);
}

static void write_json(FILE *f, const dw_ledger *L)
{
	const dw_program *pg = L->pg;
	const dw_problem *p = pg->problem;
	const dw_figures *g = &L->fig;
	fprintf(f, "{\n  \"format\": \"dwell-ledger-1\",\n  \"dwell_version\": ");
	jstr(f, DWELL_VERSION);
	fprintf(f, ",\n  \"instance\": %u,\n", pg->instance);

	fprintf(f, "  \"problem\": {\n    \"name\": ");
	jstr(f, p->name);
	fprintf(f, ",\n    \"source\": ");
	jstr(f, p->path);
	fprintf(f, ",\n    \"matrix\": \"%s\"", p->matrix_kind == DW_MATRIX_PAULI ? "pauli"
		: p->matrix_kind == DW_MATRIX_FILE ? "file" : "stencil");
	fprintf(f, ",\n    \"n\": %d,\n    \"dimension\": ", p->n);
	ju(f, (uint64_t)1 << p->n);
	if (p->matrix_kind == DW_MATRIX_PAULI)
		fprintf(f, ",\n    \"pauli_terms\": %zu", p->npauli);
	fprintf(f, ",\n    \"alpha\": ");
	jnum(f, p->alpha);
	fprintf(f, ",\n    \"sigma_min\": ");
	jnum(f, p->sigma_min);
	fprintf(f, ",\n    \"kappa\": ");
	jnum(f, p->kappa);
	fprintf(f, ",\n    \"kappa_source\": ");
	jstr(f, p->kappa_source);
	fprintf(f, ",\n    \"variant\": \"%c\",\n    \"dilated\": %s\n  },\n", p->variant,
		p->dilated ? "true" : "false");

	const dw_schedule *s = &pg->sched;
	int64_t rmin = INT64_MAX, rmax = 0;
	for (int64_t j = 0; j < s->q; j++) {
		if (s->seg[j].steps < rmin) rmin = s->seg[j].steps;
		if (s->seg[j].steps > rmax) rmax = s->seg[j].steps;
	}
	fprintf(f, "  \"schedule\": {\n    \"kind\": \"randomized\",\n    \"path\": \"%s\",\n",
		path_name(s->path));
	fprintf(f, "    \"steps\": %lld,\n    \"steps_auto\": %s,\n", (long long)s->q,
		s->q_auto ? "true" : "false");
	fprintf(f, "    \"path_length\": ");
	jnum(f, s->length);
	fprintf(f, ",\n    \"path_speed_bound\": ");
	jnum(f, s->speed);
	fprintf(f, ",\n    \"path_error_estimate\": ");
	jnum(f, s->path_error);
	fprintf(f, ",\n    \"seed\": ");
	ju(f, s->seed);
	fprintf(f, ",\n    \"total_time\": ");
	jnum(f, s->time_drawn);
	fprintf(f, ",\n    \"total_time_expected\": ");
	jnum(f, s->time_expected);
	fprintf(f, "\n  },\n");

	fprintf(f, "  \"formula\": {\n    \"order\": %d,\n    \"steps_total\": %llu,\n"
		"    \"steps_min\": %lld,\n    \"steps_max\": %lld,\n    \"bound\": ",
		pg->order, (unsigned long long)pg->steps_total, (long long)(s->q ? rmin : 0),
		(long long)rmax);
	jstr(f, pg->bound_used);
	fprintf(f, ",\n    \"terms\": %zu,\n    \"reflections_per_step\": %d\n  },\n",
		pg->nterms, pg->order == 1 || pg->order == 2 ? 2 : 2 * (int)pow(5, pg->order / 2 - 1));

	if (p->matrix_kind == DW_MATRIX_FILE) {
		/* the sparse-access oracles: colours, fixed point, data error */
		dw_sparse_plan pl;
		dw_error ign = {0};
		if (dw_sparse_plan_make(p, &pl, &ign) == DW_OK) {
			fprintf(f, "  \"oracle\": {\n    \"colours\": %u,\n    \"lookup\": \"%s\",\n"
				"    \"select_swap_block\": %u,\n    \"value_bits\": %d,\n"
				"    \"value_bits_auto\": %s,\n    \"complex_values\": %s,\n"
				"    \"lookup_width\": %u,\n    \"delta_norm\": ", pl.ncolours,
				p->lookup == DW_LOOKUP_SELECT_SWAP ? "select-swap" : "unary",
				pl.block_log2 ? 1u << pl.block_log2 : 0u, pl.value_bits,
				pl.value_bits_auto ? "true" : "false",
				pl.complex_values ? "true" : "false", pl.lookup_width);
			jnum(f, pl.delta_norm);
			fprintf(f, ",\n    \"data_error_bound\": ");
			jnum(f, pl.data_error);
			fprintf(f, "\n  },\n");
			dw_sparse_plan_free(&pl);
		}
	}
	fprintf(f, "  \"error_budget\": {\n    \"path\": ");
	jnum(f, pg->budget.path);
	fprintf(f, ",\n    \"split\": ");
	jnum(f, pg->budget.split);
	fprintf(f, ",\n    \"synth\": ");
	jnum(f, pg->budget.synth);
	fprintf(f, ",\n    \"data\": ");
	jnum(f, pg->budget.data);
	fprintf(f, ",\n    \"total\": ");
	jnum(f, pg->budget.total);
	fprintf(f, ",\n    \"split_bound_achieved\": ");
	double achieved = 0;
	for (int64_t j = 0; j < s->q; j++)
		achieved += s->seg[j].bound;
	jnum(f, achieved);
	fprintf(f, "\n  },\n");

	fprintf(f, "  \"qubits\": {\n    \"total\": ");
	ju(f, L->qubits_total);
	fprintf(f, ",\n    \"registers\": {");
	for (int r = 0; r < pg->nreg; r++)
		fprintf(f, "%s\"%s\": %u", r ? ", " : "", pg->reg[r].name, pg->reg[r].size);
	fprintf(f, "}\n  },\n");

	fprintf(f, "  \"gates\": {");
	bool first = true;
	for (int k = 0; k < DW_G_COUNT; k++) {
		if (!g->gates[k])
			continue;
		fprintf(f, "%s\"%s\": ", first ? "" : ", ", dw_gates[k].name);
		ju(f, g->gates[k]);
		first = false;
	}
	fprintf(f, "},\n  \"gate_count\": ");
	ju(f, g->gate_count);
	fprintf(f, ",\n  \"t_count\": ");
	ju(f, L->t_count);
	fprintf(f, ",\n  \"t_count_estimated\": %s", L->t_count_estimated ? "true" : "false");
	fprintf(f, ",\n  \"t_count_exact_part\": ");
	ju(f, g->t_count_exact);
	if (pg->problem->gates == DW_GATES_CLIFFORD_T) {
		fprintf(f, ",\n  \"synthesis\": {\"method\": ");
		jstr(f, "optimal ancilla-free Clifford+T z-rotation approximation (QIC 16, 2016)");
		fprintf(f, ", \"rotations\": ");
		ju(f, pg->synth_rotations_planned);
		fprintf(f, ", \"distinct\": %zu, \"max_error\": ", pg->synth_distinct);
		jnum(f, pg->synth_max_error);
		fprintf(f, "}");
	} else {
		fprintf(f, ",\n  \"t_count_formula\": ");
		jstr(f, T_FORMULA);
	}
	fprintf(f, ",\n  \"t_per_rotation\": ");
	ju(f, pg->t_per_rotation);
	fprintf(f, ",\n  \"eps_rotation\": ");
	jnum(f, pg->eps_rotation);
	fprintf(f, ",\n  \"toffoli_count\": ");
	ju(f, g->toffoli_count);
	fprintf(f, ",\n  \"rotation_count\": ");
	ju(f, g->rotation_count);
	fprintf(f, ",\n  \"clifford_count\": ");
	ju(f, g->clifford_count);
	fprintf(f, ",\n  \"two_qubit_count\": ");
	ju(f, g->two_qubit_count);
	fprintf(f, ",\n  \"measure_count\": ");
	ju(f, g->measure_count);
	fprintf(f, ",\n  \"classically_controlled_count\": ");
	ju(f, g->cond_count);
	fprintf(f, ",\n  \"depth\": %lld,\n  \"t_depth\": %lld,\n", (long long)g->depth,
		(long long)g->t_depth);
	fprintf(f, "  \"counts_saturated\": %s,\n", g->saturated ? "true" : "false");

	fprintf(f, "  \"stages\": [");
	for (int i = 0; i < L->nstage; i++) {
		const dw_stage_row *r = &L->stage[i];
		fprintf(f, "%s\n    {\n      \"stage\": \"%s\",\n", i ? "," : "",
			dw_stage_names[r->stage]);
		figures_json(f, &r->fig, r->t_count, "      ");
		fprintf(f, "\n    }");
	}
	fprintf(f, "\n  ],\n");

	/* per segment: the figures of its definition (shared by equal r) */
	fprintf(f, "  \"segments\": [");
	const dw_def *top = &pg->circ->defs[pg->top];
	for (int64_t j = 0; j < s->q; j++) {
		const dw_segment *sg = &s->seg[j];
		dw_figures sf;
		dw_error ign = {0};
		uint32_t callee = top->ops[pg->first_segment_op + (size_t)j].callee;
		dw_cost_figures(pg->circ, callee, &sf, &ign);
		int sat = 0;
		fprintf(f, "%s\n    {\"index\": %lld, \"s\": ", j ? "," : "", (long long)j + 1);
		jnum(f, sg->s);
		fprintf(f, ", \"gap_bound\": ");
		jnum(f, sg->gap);
		fprintf(f, ", \"dwell_time\": ");
		jnum(f, sg->dwell);
		fprintf(f, ", \"steps\": %lld, \"split_error_bound\": ", (long long)sg->steps);
		jnum(f, sg->bound);
		fprintf(f, ", \"gates\": ");
		ju(f, sf.gate_count);
		fprintf(f, ", \"t_count\": ");
		ju(f, t_total(&sf, pg->t_per_rotation, &sat));
		fprintf(f, ", \"depth\": %lld}", (long long)sf.depth);
	}
	fprintf(f, "\n  ],\n");

	fprintf(f, "  \"assumptions\": [\n");
	if (pg->problem->gates == DW_GATES_CLIFFORD_T)
		fprintf(f, "    \"gate set: Clifford+T (h, s, sdg, t, tdg, x, y, z, cx, cz); every "
			"rotation synthesised within eps_rotation = synth share / rotations; every "
			"gate counts as one in gate_count and depth; t_count and t_depth are exact\",\n");
	else
		fprintf(f, "    \"gate set: OpenQASM 3 stdgates.inc gates with continuous rotation "
			"angles; every gate counts as one in gate_count and depth\",\n");
	fprintf(f, "    \"t_count: t and tdg gates, 7 per ccx (Clifford+T Toffoli), plus "
		"t_per_rotation for every rx/ry/rz/p rotation (estimate, see t_count_formula); "
		"t_depth weighs ccx 3 and each rotation t_per_rotation\",\n");
	fprintf(f, "    \"error model: precision is the trace distance of the instance-averaged "
		"output state to the target; it is split into path (eigenpath following, bound "
		"sum of squared path steps), split (product-formula error, commutator or norm "
		"bound), synth (rotation synthesis, reserved) and data shares that add up\",\n");
	if (pg->problem->uncompute == DW_UNCOMPUTE_MEASURE)
		fprintf(f, "    \"uncompute: measure: temporary logical-ANDs (4 T) are erased by "
			"X-basis measurement and classically controlled cz/x gates; those gates are "
			"counted in gates and depth as if always applied (they are applied with "
			"probability 1/2); depth counts a measurement and waits for it before the "
			"gates it controls\",\n");
	fprintf(f, "    \"the output is an average over instances (random dwell times): the "
		"figures are those of one instance\",\n");
	fprintf(f, "    \"not counted: state-preparation success, readout of x, classical "
		"processing, error correction and routing overheads, global phases\"\n  ]\n}\n");
}

char *dw_ledger_json(const dw_ledger *L, dw_error *e)
{
	char *buf = NULL;
	size_t len = 0;
	FILE *f = open_memstream(&buf, &len);
	if (!f) {
		dw_fail(e, DW_EINTERNAL, "out of memory (ledger)");
		return NULL;
	}
	write_json(f, L);
	if (fclose(f) != 0) {
		free(buf);
		dw_fail(e, DW_EINTERNAL, "out of memory (ledger)");
		return NULL;
	}
	return buf;
}

static void row_u(FILE *f, const char *k, uint64_t v)
{
	fprintf(f, "  %-22s %llu\n", k, (unsigned long long)v);
}

void dw_ledger_table(const dw_ledger *L, FILE *f)
{
	const dw_program *pg = L->pg;
	const dw_problem *p = pg->problem;
	const dw_figures *g = &L->fig;
	const dw_schedule *s = &pg->sched;
	fprintf(f, "dwell ledger: %s (instance %u)\n", p->name, pg->instance);
	fprintf(f, "problem\n  n = %d system qubits, dimension %llu, variant %c%s\n", p->n,
		(unsigned long long)1 << p->n, p->variant, p->dilated ? " (dilated)" : "");
	fprintf(f, "  alpha = %.6g, kappa = %.6g (%s)\n", p->alpha, p->kappa, p->kappa_source);
	fprintf(f, "schedule\n  %s path, q = %lld segments%s, L = %.6g, seed %llu\n",
		path_name(s->path), (long long)s->q, s->q_auto ? " (auto)" : "", s->length,
		(unsigned long long)s->seed);
	fprintf(f, "  total dwell time %.6g (expected %.6g)\n", s->time_drawn, s->time_expected);
	fprintf(f, "formula\n  order %d, %llu steps in all, r_j by %s\n", pg->order,
		(unsigned long long)pg->steps_total, pg->bound_used);
	fprintf(f, "error budget (trace distance)\n  path %.3g + split %.3g + synth %.3g + "
		"data %.3g = %.3g\n", pg->budget.path, pg->budget.split, pg->budget.synth,
		pg->budget.data, pg->budget.total);
	double achieved = 0;
	for (int64_t j = 0; j < s->q; j++)
		achieved += s->seg[j].bound;
	if (achieved > pg->budget.split * (1 + 1e-12))
		fprintf(f, "  note: the splitting-error bound of the chosen steps is %.3g, above "
			"its share %.3g (formula.steps given); the bound is conservative: run "
			"dwell verify\n", achieved, pg->budget.split);
	if (s->path_error > pg->budget.path * (1 + 1e-12))
		fprintf(f, "  note: the estimated path error %.3g is above its share %.3g "
			"(schedule.steps given)\n", s->path_error, pg->budget.path);
	fprintf(f, "qubits\n  %-22s %llu (", "total", (unsigned long long)L->qubits_total);
	for (int r = 0; r < pg->nreg; r++)
		fprintf(f, "%s%s %u", r ? ", " : "", pg->reg[r].name, pg->reg[r].size);
	fprintf(f, ")\ngates\n");
	for (int k = 0; k < DW_G_COUNT; k++)
		if (g->gates[k])
			row_u(f, dw_gates[k].name, g->gates[k]);
	fprintf(f, "figures\n");
	row_u(f, "gate_count", g->gate_count);
	fprintf(f, "  %-22s %llu%s\n", "t_count", (unsigned long long)L->t_count,
		L->t_count_estimated ? " (estimated: rotations not yet synthesised)" : "");
	row_u(f, "toffoli_count", g->toffoli_count);
	row_u(f, "rotation_count", g->rotation_count);
	row_u(f, "clifford_count", g->clifford_count);
	row_u(f, "two_qubit_count", g->two_qubit_count);
	row_u(f, "measure_count", g->measure_count);
	if (g->cond_count)
		row_u(f, "classically_controlled", g->cond_count);
	row_u(f, "depth", (uint64_t)g->depth);
	row_u(f, "t_depth", (uint64_t)g->t_depth);
	if (g->saturated)
		fprintf(f, "  WARNING: some counts reached 2^64-1 and are saturated\n");
	fprintf(f, "stages %18s %14s %14s %14s\n", "gates", "t_count", "depth", "share");
	for (int i = 0; i < L->nstage; i++) {
		const dw_stage_row *r = &L->stage[i];
		fprintf(f, "  %-14s %12llu %14llu %14lld %13.1f%%\n", dw_stage_names[r->stage],
			(unsigned long long)r->fig.gate_count, (unsigned long long)r->t_count,
			(long long)r->fig.depth,
			g->gate_count ? 100.0 * (double)r->fig.gate_count / (double)g->gate_count : 0.0);
	}
	if (p->gates == DW_GATES_CLIFFORD_T)
		fprintf(f, "assumptions: Clifford+T gate set, %llu rotations synthesised within "
			"%.3g each (%zu distinct, largest error %.3g); t_count is exact\n",
			(unsigned long long)pg->synth_rotations_planned, pg->eps_rotation,
			pg->synth_distinct, pg->synth_max_error);
	else
		fprintf(f, "assumptions: continuous gate set; t_count estimates %llu T per rotation "
			"(eps %.3g each); see the ledger JSON \"assumptions\"\n",
			(unsigned long long)pg->t_per_rotation, pg->eps_rotation);
}
