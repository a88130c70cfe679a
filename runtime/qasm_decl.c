/* qasm_decl.c - declarations of an OpenQASM 3 program: registers, inputs,
 * constants, gate definitions, and `def` subroutines with their local bit
 * registers and calls.
 * Takes: the parser positioned at a declaration's first keyword (or, for
 * a call, at the def's name).  Gives: the declaration added to the
 * program (qasm_prog.h) and its name to the symbol table, or DW_EINPUT
 * "FILE:LINE:COL: expected ...".
 *
 *   def      := 'def' name '(' [arg {',' arg}] ')' '{' statement* '}'
 *   arg      := ('float' | 'angle') ['[' w ']'] name | 'qubit' ['[' n ']'] name
 *   defcall  := name '(' [value-or-qubit {',' value-or-qubit}] ')' ';'
 *
 * Scoping follows the OpenQASM 3 specification (scope.rst, subroutines.rst):
 * a def body sees its arguments, its own declarations, global constants,
 * gates and earlier defs, but not global registers or inputs; qubits
 * cannot be declared in it; a `-> type` result is refused here. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "qasm_prog.h"

/* ---- declarations (top level only) ---- */

/* Optional '[' const ']' designator; gives def when absent. */
int qx_designator(qx_parser *p, long lo, long hi, const char *what, long def, long *out)
{
	*out = def;
	if (!qx_is(qx_cur(p), "["))
		return DW_OK;
	p->pos++;
	int st = qx_const_int(p, lo, hi, what, out);
	return st ? st : qx_expect(p, "]");
}

static int add_reg(qx_parser *p, const qx_token *name, int quantum, long size)
{
	dw_qasm_program *g = p->prog;
	long total = quantum ? g->nqubits : g->nbits;
	long limit = quantum ? QX_MAX_QUBITS : QX_MAX_BITS;
	if (total + size > limit)
		return qx_error_at(p, name, "expected at most %ld %s in all", limit,
			quantum ? "qubits" : "bits");
	size_t *n = quantum ? &g->nqregs : &g->ncregs;
	dw_qasm_reg **regs = quantum ? &g->qregs : &g->cregs;
	dw_qasm_reg *r = realloc(*regs, (*n + 1) * sizeof *r);
	if (!r)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	*regs = r;
	int st = qx_declare(p, name, quantum ? SY_QREG : SY_CREG, (int)*n, 0);
	if (st)
		return st;
	char *s = qx_dup_tok(p, name);
	if (!s)
		return p->err->status;
	r[*n] = (dw_qasm_reg){s, (int)total, (int)size};
	(*n)++;
	if (quantum)
		g->nqubits += (int)size;
	else
		g->nbits += (int)size;
	return DW_OK;
}

/* qubit[n] name;  qubit name;  qreg name[n];  bit[n] name;  creg name[n]; */
int qx_parse_register(qx_parser *p, int quantum, int old_style)
{
	long size = 1;
	int st;
	p->pos++;
	const qx_token *name;
	long hi = quantum ? QX_MAX_QUBITS : QX_MAX_BITS;
	if (old_style) {
		name = qx_cur(p);
		if (name->kind != QT_IDENT)
			return qx_error_at(p, name, "expected a register name");
		p->pos++;
		if ((st = qx_designator(p, 1, hi, "a register size", 1, &size)))
			return st;
	} else {
		if ((st = qx_designator(p, 1, hi, "a register size", 1, &size)))
			return st;
		name = qx_cur(p);
		p->pos++;
	}
	if ((st = add_reg(p, name, quantum, size)))
		return st;
	if (qx_is(qx_cur(p), "="))
		return qx_error_at(p, qx_cur(p), "expected ';' (initialisers are not read)");
	return qx_expect(p, ";");
}

/* input float[64] x;  input angle[32] x;  input float x; */
int qx_parse_input(qx_parser *p)
{
	p->pos++;
	const qx_token *type = qx_cur(p);
	int is_angle = qx_is(type, "angle");
	if (!is_angle && !qx_is(type, "float"))
		return qx_error_at(p, type, "expected 'float' or 'angle' (the only input types read)");
	p->pos++;
	long width;
	int st = qx_designator(p, 1, 128, "a type width", 64, &width);
	if (st)
		return st;
	const qx_token *name = qx_cur(p);
	dw_qasm_program *g = p->prog;
	dw_qasm_input *in = realloc(g->inputs, (g->ninputs + 1) * sizeof *in);
	if (!in)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	g->inputs = in;
	int slot = (*p->nslots)++;
	if ((st = qx_declare(p, name, SY_SLOT, slot, 0)))
		return st;
	char *s = qx_dup_tok(p, name);
	if (!s)
		return p->err->status;
	in[g->ninputs++] = (dw_qasm_input){s, is_angle, slot};
	p->pos++;
	return qx_expect(p, ";");
}

/* const (int|uint|float|angle)['[' n ']'] name = const-expr ; */
int qx_parse_const_decl(qx_parser *p)
{
	p->pos++;
	const qx_token *type = qx_cur(p);
	int integral = qx_is(type, "int") || qx_is(type, "uint");
	long width;
	int st;
	if (type->kind == QT_IDENT && qx_is(&p->tok[p->pos + 1 < p->ntok ? p->pos + 1 : p->pos], "=")) {
		integral = 0;   /* `const name = value;` without a type (early drafts) */
	} else {
		if (!integral && !qx_is(type, "float") && !qx_is(type, "angle"))
			return qx_error_at(p, type, "expected 'int', 'uint', 'float' or 'angle'");
		p->pos++;
		if ((st = qx_designator(p, 1, 128, "a type width", 64, &width)))
			return st;
	}
	const qx_token *name = qx_cur(p);
	p->pos++;
	if ((st = qx_expect(p, "=")))
		return st;
	const qx_token *vt = qx_cur(p);
	double v;
	if ((st = qx_parse_const(p, &v)))
		return st;
	if (integral && (v != floor(v) || (qx_is(type, "uint") && v < 0)))
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected an integer value for '%.*s' "
			"(got %.17g)", p->file, vt->line, vt->col, (int)name->len, name->text, v);
	if ((st = qx_declare(p, name, SY_CONST, 0, v)))
		return st;
	return qx_expect(p, ";");
}

/* gate name ['(' params ')'] qargs '{' body '}' */
/* Append a parsed gate or def (kind SY_GATE or SY_DEF) to the program's
 * routine table under its name.  On failure nothing is appended and the
 * caller still owns d (d->name may have been set). */
static int register_routine(qx_parser *p, const qx_token *name, qx_gatedef *d, int kind)
{
	dw_qasm_program *g = p->prog;
	qx_gatedef *gs = realloc(g->gates, (g->ngates + 1) * sizeof *gs);
	if (!gs)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	g->gates = gs;
	d->name = qx_dup_tok(p, name);
	if (!d->name)
		return p->err->status;
	int st = qx_declare(p, name, kind, (int)g->ngates, 0);
	if (st)
		return st;
	g->gates[g->ngates++] = *d;
	return DW_OK;
}

int qx_parse_gatedef(qx_parser *p)
{
	p->pos++;
	const qx_token *name = qx_cur(p);
	if (name->kind != QT_IDENT)
		return qx_error_at(p, name, "expected a gate name");
	const qx_sym *old = qx_lookup(p, name->text, name->len);
	if (old)
		return qx_error_at(p, name, "expected a new gate name ('%.*s' is already declared)",
			(int)name->len, name->text);
	if (qx_builtin_id(p, name) >= 0)
		return qx_error_at(p, name, "expected a new gate name (this one is built in or "
			"in stdgates.inc)");
	p->pos++;
	qx_gatedef d = {0};
	size_t barrier = p->barrier, mark = p->nsym;
	int *nslots = p->nslots;
	p->barrier = p->nsym;
	p->in_gate = 1;
	p->nslots = &d.nslots;
	int st = DW_OK;
	if (qx_is(qx_cur(p), "(")) {
		p->pos++;
		while (st == DW_OK && !qx_is(qx_cur(p), ")")) {
			if (d.nparams && (st = qx_expect(p, ",")))
				break;
			const qx_token *pn = qx_cur(p);
			if ((st = qx_declare(p, pn, SY_SLOT, d.nparams, 0)))
				break;
			p->pos++;
			d.nparams++;
			d.nslots++;
		}
		if (st == DW_OK)
			p->pos++;
	}
	while (st == DW_OK && !qx_is(qx_cur(p), "{")) {
		if (d.nqubits && (st = qx_expect(p, ",")))
			break;
		const qx_token *qn = qx_cur(p);
		if ((st = qx_declare(p, qn, SY_QARG, d.nqubits, 0)))
			break;
		p->pos++;
		if (++d.nqubits > QX_MAX_QUBITS)
			st = qx_error_at(p, qn, "expected at most %d qubit arguments", QX_MAX_QUBITS);
	}
	if (st == DW_OK && d.nqubits == 0)
		st = qx_error_at(p, qx_cur(p), "expected at least one qubit argument");
	if (st == DW_OK) {
		p->pos++;
		while (st == DW_OK && !qx_is(qx_cur(p), "}")) {
			if (qx_cur(p)->kind == QT_EOF)
				st = qx_error_at(p, qx_cur(p), "expected '}'");
			else
				st = qx_parse_statement(p, &d.body, 1);
		}
		if (st == DW_OK)
			p->pos++;
	}
	p->nsym = mark;
	p->barrier = barrier;
	p->in_gate = 0;
	p->nslots = nslots;
	if (st == DW_OK)
		st = register_routine(p, name, &d, SY_GATE);
	if (st) {
		free(d.name);
		qx_free_block(&d.body);
		return st;
	}
	return DW_OK;
}
void qx_free_gatedef(qx_gatedef *d)
{
	free(d->name);
	qx_free_block(&d->body);
	free(d->args);
	for (size_t i = 0; i < d->nlq; i++)
		free(d->lq[i].name);
	free(d->lq);
	for (size_t i = 0; i < d->nlbits; i++)
		free(d->lbits[i].name);
	free(d->lbits);
}

/* One declared argument of a def: a value (float/angle) or qubit(s). */
static int parse_defarg(qx_parser *p, qx_gatedef *d, size_t *capargs, size_t *caplq)
{
	const qx_token *ty = qx_cur(p);
	qx_defarg a = {0};
	long n = 0;
	int st;
	if (qx_is(ty, "float") || qx_is(ty, "angle")) {
		p->pos++;
		if ((st = qx_designator(p, 1, 128, "a type width", 64, &n)))
			return st;
		a.kind = QA_VALUE;
		a.index = d->nslots;
		if ((st = qx_declare(p, qx_cur(p), SY_SLOT, a.index, 0)))
			return st;
		d->nslots++;
		d->nparams++;
	} else if (qx_is(ty, "qubit")) {
		p->pos++;
		if (qx_is(qx_cur(p), "[")) {
			p->pos++;
			if ((st = qx_const_int(p, 1, QX_MAX_QUBITS, "a register size", &n))
				|| (st = qx_expect(p, "]")))
				return st;
		}
		if (d->nqubits + (n ? n : 1) > QX_MAX_QUBITS)
			return qx_error_at(p, ty, "expected at most %d qubits in a def's arguments",
				QX_MAX_QUBITS);
		const qx_token *name = qx_cur(p);
		if (n == 0) {
			a.kind = QA_QUBIT;
			a.index = d->nqubits;
			if ((st = qx_declare(p, name, SY_QARG, a.index, 0)))
				return st;
			d->nqubits++;
		} else {
			a.kind = QA_QREG;
			a.index = (int)d->nlq;
			if ((st = qx_grow(p, (void **)&d->lq, caplq, d->nlq, sizeof *d->lq))
				|| (st = qx_declare(p, name, SY_LQREG, a.index, 0)))
				return st;
			char *s = qx_dup_tok(p, name);
			if (!s)
				return p->err->status;
			d->lq[d->nlq++] = (dw_qasm_reg){s, d->nqubits, (int)n};
			d->nqubits += (int)n;
		}
	} else {
		return qx_error_at(p, ty, "expected an argument type: 'float', 'angle', 'qubit' or "
			"'qubit[n]' (other argument types are not read)");
	}
	p->pos++;
	if ((st = qx_grow(p, (void **)&d->args, capargs, (size_t)d->nargs, sizeof *d->args)))
		return st;
	d->args[d->nargs++] = a;
	return DW_OK;
}

/* def name '(' args ')' '{' body '}' */
int qx_parse_def(qx_parser *p)
{
	p->pos++;
	const qx_token *name = qx_cur(p);
	if (name->kind != QT_IDENT)
		return qx_error_at(p, name, "expected a def name");
	if (qx_lookup(p, name->text, name->len))
		return qx_error_at(p, name, "expected a new def name ('%.*s' is already declared)",
			(int)name->len, name->text);
	if (qx_builtin_id(p, name) >= 0)
		return qx_error_at(p, name, "expected a new def name (this one is built in or in "
			"stdgates.inc)");
	p->pos++;
	qx_gatedef d = {0};
	d.is_def = 1;
	size_t barrier = p->barrier, mark = p->nsym, capargs = 0, caplq = 0;
	int *nslots = p->nslots;
	p->barrier = p->nsym;
	p->in_def = &d;
	p->def_name = name;
	p->nslots = &d.nslots;
	int st = qx_expect(p, "(");
	while (st == DW_OK && !qx_is(qx_cur(p), ")")) {
		if (d.nargs && (st = qx_expect(p, ",")))
			break;
		st = parse_defarg(p, &d, &capargs, &caplq);
	}
	if (st == DW_OK) {
		p->pos++;
		if (qx_is(qx_cur(p), "->"))
			st = qx_error_at(p, qx_cur(p), "expected '{' (a def returning a value is not read; "
				"only defs used as statements are)");
		else
			st = qx_expect(p, "{");
	}
	while (st == DW_OK && !qx_is(qx_cur(p), "}")) {
		if (qx_cur(p)->kind == QT_EOF)
			st = qx_error_at(p, qx_cur(p), "expected '}'");
		else
			st = qx_parse_statement(p, &d.body, 1);
	}
	if (st == DW_OK)
		p->pos++;
	p->nsym = mark;
	p->barrier = barrier;
	p->in_def = NULL;
	p->def_name = NULL;
	p->nslots = nslots;
	if (st == DW_OK)
		st = register_routine(p, name, &d, SY_DEF);
	if (st) {
		qx_free_gatedef(&d);
		return st;
	}
	return DW_OK;
}

/* Inside a def body: bit name; | bit[n] name; | creg name[n];  -- a local
 * register, set to zeros where it is declared (so fresh on every call). */
int qx_parse_local_bits(qx_parser *p, qx_block *b, int old_style)
{
	qx_gatedef *d = p->in_def;
	const qx_token *kw = qx_cur(p), *name;
	long size = 1;
	int st;
	p->pos++;
	if (old_style) {
		name = qx_cur(p);
		p->pos++;
		st = qx_designator(p, 1, QX_MAX_BITS, "a register size", 1, &size);
	} else {
		st = qx_designator(p, 1, QX_MAX_BITS, "a register size", 1, &size);
		name = qx_cur(p);
		p->pos++;
	}
	if (st)
		return st;
	if (d->nbits + size > QX_MAX_BITS)
		return qx_error_at(p, name, "expected at most %d local bits in a def", QX_MAX_BITS);
	size_t cap = d->nlbits;   /* no spare capacity is kept: reallocated on each declaration */
	if ((st = qx_grow(p, (void **)&d->lbits, &cap, d->nlbits, sizeof *d->lbits))
		|| (st = qx_declare(p, name, SY_LCREG, (int)d->nlbits, 0)))
		return st;
	char *s = qx_dup_tok(p, name);
	if (!s)
		return p->err->status;
	d->lbits[d->nlbits] = (dw_qasm_reg){s, d->nbits, (int)size};
	d->nbits += (int)size;
	qx_stmt decl = {0};
	decl.kind = QS_BITDECL;
	decl.line = kw->line;
	decl.col = kw->col;
	decl.builtin = decl.user = -1;
	decl.slot = (int)d->nlbits++;
	if (qx_is(qx_cur(p), "="))
		return qx_error_at(p, qx_cur(p), "expected ';' (initialisers are not read)");
	if ((st = qx_expect(p, ";")))
		return st;
	return qx_append(p, b, &decl);
}

/* Is t the name of a qubit (register or argument) in scope? */
static int names_qubits(qx_parser *p, const qx_token *t)
{
	const qx_sym *s = t->kind == QT_IDENT ? qx_lookup(p, t->text, t->len) : NULL;
	return s && (s->kind == SY_QREG || s->kind == SY_QARG || s->kind == SY_LQREG);
}

/* name '(' arguments ')' ';' -- each argument read as its declared kind */
int qx_parse_defcall(qx_parser *p, qx_block *b)
{
	const qx_token *name = qx_cur(p);
	const qx_sym *sym = qx_lookup(p, name->text, name->len);
	const qx_gatedef *d = &p->prog->gates[sym->index];
	qx_stmt s = {0};
	s.kind = QS_CALL;
	s.line = name->line;
	s.col = name->col;
	s.builtin = -1;
	s.user = sym->index;
	size_t cappar = 0, capops = 0;
	int k = 0, st;
	p->pos++;
	if (!qx_is(qx_cur(p), "("))
		return qx_error_at(p, qx_cur(p), "expected '(' ('%s' is a def, called as %s(arguments);)",
			d->name, d->name);
	p->pos++;
	for (; !qx_is(qx_cur(p), ")"); k++) {
		if (k && (st = qx_expect(p, ",")))
			goto fail;
		const qx_token *at = qx_cur(p);
		if (k >= d->nargs) {
			st = qx_error_at(p, at, "expected ')' ('%s' takes %d argument%s)", d->name,
				d->nargs, d->nargs == 1 ? "" : "s");
			goto fail;
		}
		const qx_defarg *a = &d->args[k];
		if (a->kind == QA_VALUE) {
			int e;
			if (names_qubits(p, at)) {
				st = qx_error_at(p, at, "expected a value for argument %d of '%s' (declared "
					"float or angle), not qubits", k + 1, d->name);
				goto fail;
			}
			if ((st = qx_parse_expr(p, &e))
				|| (st = qx_grow(p, (void **)&s.params, &cappar, (size_t)s.nparams,
					sizeof *s.params)))
				goto fail;
			s.params[s.nparams++] = e;
			continue;
		}
		int want = a->kind == QA_QREG ? d->lq[a->index].size : 1;
		if (!names_qubits(p, at)) {
			st = qx_error_at(p, at, "expected %s for argument %d of '%s' (declared %s)",
				a->kind == QA_QREG ? "a qubit register" : "a qubit", k + 1, d->name,
				a->kind == QA_QREG ? "qubit[n]" : "qubit");
			goto fail;
		}
		qx_operand o;
		if ((st = qx_parse_qubit(p, &o)))
			goto fail;
		int have = o.kind == QO_REG ? qx_operand_reg(p, &o, 1)->size : 1;
		if (have != want || (a->kind == QA_QREG && o.kind != QO_REG)) {
			st = dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected %d qubit%s for argument %d "
				"of '%s', found %d", p->file, at->line, at->col, want, want == 1 ? "" : "s",
				k + 1, d->name, have);
			goto fail;
		}
		if ((st = qx_push_operand(p, &s, &capops, &o)))
			goto fail;
	}
	p->pos++;
	if (k != d->nargs) {
		st = dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected %d argument%s for '%s', found %d",
			p->file, name->line, name->col, d->nargs, d->nargs == 1 ? "" : "s", d->name, k);
		goto fail;
	}
	if ((st = qx_expect(p, ";")))
		goto fail;
	return qx_append(p, b, &s);
fail:
	qx_free_stmt(&s);
	return st;
}
