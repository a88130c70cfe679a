/* qasm.c - OpenQASM 3 text of a compiled program (DESIGN 9).
 * Takes: a dw_program.  Gives: OPENQASM 3.0 text with stdgates.inc, the
 * registers anc, [sgn], sys, [work], one `gate` per definition (callees
 * first), `for` loops for repeated calls, and the main body at top level;
 * or (flat) every primitive gate expanded, standard gates only.  Angles are
 * printed with 17 significant digits.  Files are written to a temporary
 * name and renamed. */
#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "dwell/emit.h"

static void print_expr(FILE *f, const dw_expr *x)
{
	bool any = false;
	if (x->c0 != 0.0 || x->n == 0) {
		fprintf(f, "%.17g", x->c0);
		any = true;
	}
	for (int i = 0; i < x->n; i++) {
		double c = x->c[i];
		if (!any) {
			if (c == 1.0)
				fprintf(f, "p%d", x->p[i]);
			else if (c == -1.0)
				fprintf(f, "-p%d", x->p[i]);
			else
				fprintf(f, "%.17g*p%d", c, x->p[i]);
		} else {
			double a = c < 0 ? -c : c;
			const char *op = c < 0 ? " - " : " + ";
			if (a == 1.0)
				fprintf(f, "%sp%d", op, x->p[i]);
			else
				fprintf(f, "%s%.17g*p%d", op, a, x->p[i]);
		}
		any = true;
	}
}

/* name of qubit q of the top level */
static void top_qubit(FILE *f, const dw_program *pg, uint32_t q)
{
	for (int r = 0; r < pg->nreg; r++) {
		const dw_register *g = &pg->reg[r];
		if (q >= g->offset && q < g->offset + g->size) {
			fprintf(f, "%s[%u]", g->name, q - g->offset);
			return;
		}
	}
	fprintf(f, "?%u", q);
}

typedef struct qnames {
	const dw_program *pg;   /* top level: register names */
	bool top;
} qnames;

static void qname(FILE *f, const qnames *qn, uint32_t q)
{
	if (qn->top)
		top_qubit(f, qn->pg, q);
	else
		fprintf(f, "q%u", q);
}

static void emit_ops(FILE *f, const dw_circuit *c, const dw_def *d,
	const qnames *qn, const char *indent, const dw_program *pg)
{
	for (size_t i = 0; i < d->nops; i++) {
		const dw_op *o = &d->ops[i];
		if (qn->top && i >= pg->first_segment_op &&
		    (int64_t)(i - pg->first_segment_op) < pg->sched.q) {
			const dw_segment *sg = &pg->sched.seg[i - pg->first_segment_op];
			fprintf(f, "%s// segment %zu: s = %.17g, dwell time = %.17g, steps = %lld\n",
				indent, i - pg->first_segment_op + 1, sg->s, sg->dwell,
				(long long)sg->steps);
		}
		const char *in = indent;
		if (o->kind == DW_OP_CALL && o->reps > 1) {
			fprintf(f, "%sfor int i in [1:%llu] {\n", indent, (unsigned long long)o->reps);
			in = qn->top ? "    " : "        ";
		}
		if (o->kind == DW_OP_GATE && o->gate == DW_G_MEASURE) {
			fprintf(f, "%sm[%u] = measure ", in, o->bit);
			qname(f, qn, d->qs[o->q]);
			fputs(";\n", f);
			continue;
		}
		if (o->kind == DW_OP_GATE && o->cond)
			fprintf(f, "%sif (m[%u]) { ", in, o->bit);
		else
			fputs(in, f);
		const char *name = o->kind == DW_OP_GATE ? dw_gates[o->gate].name
			: c->defs[o->callee].name;
		bool subroutine = o->kind == DW_OP_CALL && !c->defs[o->callee].unitary;
		fputs(name, f);
		if (subroutine) {
			/* def call: name(params..., qubits...) */
			const dw_def *cd = &c->defs[o->callee];
			fputc('(', f);
			uint32_t k = 0;
			for (; k < o->na; k++) {
				if (k)
					fputs(", ", f);
				print_expr(f, &d->ex[o->a + k]);
			}
			for (uint32_t j = 0; j < o->nq; j++, k++) {
				if (k)
					fputs(", ", f);
				qname(f, qn, d->qs[o->q + j]);
			}
			for (uint32_t j = 0; j < cd->pool; j++, k++) {
				if (k)
					fputs(", ", f);
				qname(f, qn, d->nargs + d->nanc + j);
			}
			fputs(");\n", f);
		} else {
			if (o->na) {
				fputc('(', f);
				for (uint32_t k = 0; k < o->na; k++) {
					if (k)
						fputs(", ", f);
					print_expr(f, &d->ex[o->a + k]);
				}
				fputc(')', f);
			}
			uint32_t nq = o->nq;
			for (uint32_t k = 0; k < nq; k++) {
				fputs(k ? ", " : " ", f);
				qname(f, qn, d->qs[o->q + k]);
			}
			if (o->kind == DW_OP_CALL) {
				const dw_def *cd = &c->defs[o->callee];
				for (uint32_t k = 0; k < cd->pool; k++) {
					fputs(nq + k ? ", " : " ", f);
					qname(f, qn, d->nargs + d->nanc + k);
				}
			}
			fputs(o->kind == DW_OP_GATE && o->cond ? "; }\n" : ";\n", f);
		}
		if (o->kind == DW_OP_CALL && o->reps > 1)
			fprintf(f, "%s}\n", indent);
	}
}

static void emit_def(FILE *f, const dw_circuit *c, uint32_t id, const dw_program *pg)
{
	const dw_def *d = &c->defs[id];
	if (d->stage != DW_STAGE_NONE)
		fprintf(f, "// stage: %s\n", dw_stage_names[d->stage]);
	uint32_t nq = d->nargs + d->pool;
	if (!d->unitary) {
		/* measurement inside: a subroutine, qubits passed as arguments */
		fprintf(f, "def %s(", d->name);
		uint32_t k = 0;
		for (uint32_t i = 0; i < d->nparams; i++, k++)
			fprintf(f, "%sfloat[64] p%u", k ? ", " : "", i);
		for (uint32_t i = 0; i < nq; i++, k++)
			fprintf(f, "%squbit q%u", k ? ", " : "", i);
		fputs(") {\n", f);
		if (d->nbits)
			fprintf(f, "    bit[%u] m;\n", d->nbits);
	} else {
		fprintf(f, "gate %s", d->name);
		if (d->nparams) {
			fputc('(', f);
			for (uint32_t k = 0; k < d->nparams; k++)
				fprintf(f, "%sp%u", k ? ", " : "", k);
			fputc(')', f);
		}
		for (uint32_t k = 0; k < nq; k++)
			fprintf(f, "%sq%u", k ? ", " : " ", k);
		fputs(" {\n", f);
	}
	qnames qn = {pg, false};
	emit_ops(f, c, d, &qn, "    ", pg);
	fputs("}\n\n", f);
}

static int postorder(const dw_circuit *c, uint32_t id, unsigned char *seen,
	uint32_t *order, size_t *n)
{
	if (seen[id])
		return 0;
	seen[id] = 1;
	const dw_def *d = &c->defs[id];
	for (size_t i = 0; i < d->nops; i++)
		if (d->ops[i].kind == DW_OP_CALL)
			postorder(c, d->ops[i].callee, seen, order, n);
	order[(*n)++] = id;
	return 0;
}

static void header(FILE *f, const dw_program *pg, bool flat)
{
	const dw_problem *p = pg->problem;
	fprintf(f, "OPENQASM 3.0;\ninclude \"stdgates.inc\";\n\n");
	fprintf(f, "// generated by dwell %s from problem '%s' (instance %u, seed %llu)\n",
		DWELL_VERSION, p->name, pg->instance, (unsigned long long)pg->sched.seed);
	fprintf(f, "// variant %c, kappa %.6g, %lld segments, product formula of order %d,"
		" %llu steps in all\n", p->variant, p->kappa, (long long)pg->sched.q,
		pg->order, (unsigned long long)pg->steps_total);
	fprintf(f, "// registers: anc = pivot ancilla; %ssys = system, index little-endian"
		" (sys[k] holds bit k)%s\n", p->variant == 'I' ? "sgn = sign qubit; " : "",
		pg->nwork ? "; work = scratch, starts and ends in |0>" : "");
	fprintf(f, "// output: the average over instances of the state on anc%s, sys"
		" approximates |0>%s|x>\n\n", p->variant == 'I' ? ", sgn" : "",
		p->variant == 'I' ? "|+>" : "");
	for (int r = 0; r < pg->nreg; r++)
		fprintf(f, "qubit[%u] %s;\n", pg->reg[r].size, pg->reg[r].name);
	if (flat) {
		/* one bit register for the whole expanded program: a definition's
		 * measurement is read right after it, so local indices can share */
		uint32_t nb = 0;
		for (size_t i = 0; i < pg->circ->ndefs; i++)
			if (pg->circ->defs[i].nbits > nb)
				nb = pg->circ->defs[i].nbits;
		if (nb)
			fprintf(f, "bit[%u] m;\n", nb);
	} else if (pg->circ->defs[pg->top].nbits) {
		fprintf(f, "bit[%u] m;\n", pg->circ->defs[pg->top].nbits);
	}
	fputc('\n', f);
}

typedef struct flatctx {
	FILE *f;
	const dw_program *pg;
} flatctx;

static int flat_gate(const dw_walk_gate *g, void *ctx)
{
	flatctx *fc = ctx;
	const dw_gate_info *gi = &dw_gates[g->gate];
	if (g->gate == DW_G_MEASURE) {
		fprintf(fc->f, "m[%u] = measure ", g->bit);
		top_qubit(fc->f, fc->pg, g->qubits[0]);
		fputs(";\n", fc->f);
		return ferror(fc->f) ? DW_EINTERNAL : 0;
	}
	if (g->cond)
		fprintf(fc->f, "if (m[%u]) { ", g->bit);
	fputs(gi->name, fc->f);
	if (gi->nangles) {
		fputc('(', fc->f);
		for (int k = 0; k < gi->nangles; k++)
			fprintf(fc->f, "%s%.17g", k ? ", " : "", g->angles[k]);
		fputc(')', fc->f);
	}
	for (int k = 0; k < gi->nqubits; k++) {
		fputs(k ? ", " : " ", fc->f);
		top_qubit(fc->f, fc->pg, g->qubits[k]);
	}
	fputs(g->cond ? "; }\n" : ";\n", fc->f);
	return ferror(fc->f) ? DW_EINTERNAL : 0;
}

int dw_qasm_write(const dw_program *pg, FILE *f, bool flat, dw_error *e)
{
	const dw_circuit *c = pg->circ;
	header(f, pg, flat);
	if (flat) {
		uint32_t nq = pg->nqubits + pg->nwork;
		uint32_t *map = malloc((nq ? nq : 1) * sizeof *map);
		if (!map)
			return dw_fail(e, DW_EINTERNAL, "out of memory");
		for (uint32_t q = 0; q < nq; q++)
			map[q] = q;
		flatctx fc = {f, pg};
		int rc = dw_walk(c, pg->top, map, NULL, flat_gate, &fc);
		free(map);
		if (rc)
			return dw_fail(e, DW_EINTERNAL, "writing the flat program failed");
		return DW_OK;
	}
	unsigned char *seen = calloc(c->ndefs, 1);
	uint32_t *order = malloc(c->ndefs * sizeof *order);
	if (!seen || !order) {
		free(seen);
		free(order);
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	}
	size_t n = 0;
	postorder(c, pg->top, seen, order, &n);
	for (size_t i = 0; i + 1 < n; i++)
		emit_def(f, c, order[i], pg);
	free(seen);
	free(order);
	qnames qn = {pg, true};
	fputs("// main program\n", f);
	emit_ops(f, c, &c->defs[pg->top], &qn, "", pg);
	return DW_OK;
}

int dw_write_atomic(const char *path, dw_writer_fn fn, const void *ctx, dw_error *e)
{
	size_t len = strlen(path);
	char *tmp = malloc(len + 32);
	if (!tmp)
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	snprintf(tmp, len + 32, "%s.tmp.%ld", path, (long)getpid());
	FILE *f = fopen(tmp, "w");
	if (!f) {
		int rc = dw_fail(e, DW_EINPUT, "%s: cannot write: %s", path, strerror(errno));
		free(tmp);
		return rc;
	}
	int rc = fn(f, ctx, e);
	if (fflush(f) != 0 || ferror(f))
		rc = rc ? rc : dw_fail(e, DW_EINTERNAL, "%s: write failed: %s", path, strerror(errno));
	if (fclose(f) != 0 && !rc)
		rc = dw_fail(e, DW_EINTERNAL, "%s: write failed: %s", path, strerror(errno));
	if (!rc && rename(tmp, path) != 0)
		rc = dw_fail(e, DW_EINTERNAL, "%s: cannot rename into place: %s", path, strerror(errno));
	if (rc)
		remove(tmp);
	free(tmp);
	return rc;
}
