/* qasm_expr.c - angle and index expressions, and qubit and bit operands,
 * of the OpenQASM 3 reader.
 * Takes: tokens at the parser's position and the symbols in scope.
 * Gives: expression nodes in the program's pool (constant sub-trees folded
 * at parse time), their evaluation against a frame of variable slots, the
 * standalone evaluator dw_angle_expr_eval, and operands (register,
 * register[index], gate or def argument) with constant indices checked.
 *
 *   expr    := term (('+' | '-') term)*
 *   term    := unary (('*' | '/') unary)*
 *   unary   := ('-' | '+') unary | power
 *   power   := primary ['**' unary]          (right associative)
 *   primary := number | constant | variable | fn '(' expr ')' | '(' expr ')'
 *
 * All arithmetic is IEEE double; integer literals are exact up to 2^53. */
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "qasm_prog.h"

int qx_is(const qx_token *t, const char *s)
{
	size_t n = strlen(s);
	return (t->kind == QT_PUNCT || t->kind == QT_IDENT) && t->len == n
		&& !memcmp(t->text, s, n);
}

int qx_error_at(qx_parser *p, const qx_token *t, const char *fmt, ...)
{
	char what[768];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(what, sizeof what, fmt, ap);
	va_end(ap);
	if (t->kind == QT_EOF)
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: %s, found the end of the input",
			p->file, t->line, t->col, what);
	int len = t->len > 40 ? 40 : (int)t->len;
	return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: %s, found '%.*s'",
		p->file, t->line, t->col, what, len, t->text);
}

const qx_sym *qx_lookup(qx_parser *p, const char *name, size_t len)
{
	for (size_t i = p->nsym; i-- > 0;) {
		const qx_sym *s = &p->sym[i];
		if (s->len == len && !memcmp(s->name, name, len))
			return s;
	}
	return NULL;
}

int qx_new_expr(qx_parser *p, const qx_expr *node)
{
	dw_qasm_program *g = p->prog;
	if (g->nex == g->capex) {
		size_t cap = g->capex ? 2 * g->capex : 64;
		if (cap > (size_t)INT32_MAX) {
			dw_fail(p->err, DW_EINPUT, "%s: too many expressions", p->file);
			return -1;
		}
		qx_expr *e = realloc(g->ex, cap * sizeof *e);
		if (!e) {
			dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
			return -1;
		}
		g->ex = e;
		g->capex = cap;
	}
	g->ex[g->nex] = *node;
	return (int)g->nex++;
}

static const struct { const char *name; int fn; } functions[] = {
	{"sin", QF_SIN}, {"cos", QF_COS}, {"tan", QF_TAN}, {"arcsin", QF_ASIN},
	{"arccos", QF_ACOS}, {"arctan", QF_ATAN}, {"exp", QF_EXP}, {"ln", QF_LN},
	{"sqrt", QF_SQRT},
};

static const struct { const char *name; double value; } constants[] = {
	{"pi", 3.14159265358979323846}, {"\xCF\x80", 3.14159265358979323846},
	{"tau", 6.28318530717958647692}, {"\xCF\x84", 6.28318530717958647692},
	{"euler", 2.71828182845904523536}, {"\xE2\x84\x87", 2.71828182845904523536},
};

static const char *fn_name(int fn)
{
	for (size_t i = 0; i < sizeof functions / sizeof functions[0]; i++)
		if (functions[i].fn == fn)
			return functions[i].name;
	return "?";
}

/* Apply one operation to numbers; 0 on success, else a reason. */
static const char *apply(int op, int fn, double a, double b, double *out)
{
	double v = 0;
	switch (op) {
	case QE_NEG: v = -a; break;
	case QE_ADD: v = a + b; break;
	case QE_SUB: v = a - b; break;
	case QE_MUL: v = a * b; break;
	case QE_DIV:
		if (b == 0)
			return "division by zero";
		v = a / b;
		break;
	case QE_POW: v = pow(a, b); break;
	case QE_FN:
		switch (fn) {
		case QF_SIN: v = sin(a); break;
		case QF_COS: v = cos(a); break;
		case QF_TAN: v = tan(a); break;
		case QF_ASIN: v = asin(a); break;
		case QF_ACOS: v = acos(a); break;
		case QF_ATAN: v = atan(a); break;
		case QF_EXP: v = exp(a); break;
		case QF_LN: v = log(a); break;
		case QF_SQRT: v = sqrt(a); break;
		default: return "unknown function";
		}
		break;
	default:
		return "unknown operation";
	}
	if (!isfinite(v))
		return "result is not a finite number";
	*out = v;
	return NULL;
}

/* Make a node from op and operands, folding constants. */
static int make(qx_parser *p, const qx_token *at, int op, int fn, int a, int b, int *out)
{
	const qx_expr *ea = &p->prog->ex[a];
	const qx_expr *eb = b >= 0 ? &p->prog->ex[b] : NULL;
	if (ea->op == QE_NUM && (!eb || eb->op == QE_NUM)) {
		double v;
		const char *why = apply(op, fn, ea->num, eb ? eb->num : 0, &v);
		if (why)
			return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: %s%s%s", p->file,
				at->line, at->col, why, op == QE_FN ? " in " : "",
				op == QE_FN ? fn_name(fn) : "");
		qx_expr n = {QE_NUM, 0, -1, -1, -1, v, at->line, at->col, 0};
		*out = qx_new_expr(p, &n);
		return *out < 0 ? p->err->status : DW_OK;
	}
	int depth = 1 + ea->depth;
	if (eb && eb->depth >= ea->depth)
		depth = 1 + eb->depth;
	if (depth > QX_MAX_NEST)
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected an expression nested at "
			"most %d levels deep", p->file, at->line, at->col, QX_MAX_NEST);
	qx_expr n = {(unsigned char)op, (unsigned char)fn, a, b, -1, 0, at->line, at->col, depth};
	*out = qx_new_expr(p, &n);
	return *out < 0 ? p->err->status : DW_OK;
}

static int parse_unary(qx_parser *p, int *out);

static int parse_primary(qx_parser *p, int *out)
{
	const qx_token *t = qx_cur(p);
	if (t->kind == QT_INT || t->kind == QT_FLOAT) {
		p->pos++;
		qx_expr n = {QE_NUM, 0, -1, -1, -1, t->num, t->line, t->col, 0};
		*out = qx_new_expr(p, &n);
		return *out < 0 ? p->err->status : DW_OK;
	}
	if (qx_is(t, "(")) {
		p->pos++;
		int st = qx_parse_expr(p, out);
		if (st)
			return st;
		if (!qx_is(qx_cur(p), ")"))
			return qx_error_at(p, qx_cur(p), "expected ')'");
		p->pos++;
		return DW_OK;
	}
	if (t->kind != QT_IDENT)
		return qx_error_at(p, t, "expected a number, a name or '('");
	p->pos++;
	for (size_t i = 0; i < sizeof constants / sizeof constants[0]; i++)
		if (qx_is(t, constants[i].name)) {
			qx_expr n = {QE_NUM, 0, -1, -1, -1, constants[i].value, t->line, t->col, 0};
			*out = qx_new_expr(p, &n);
			return *out < 0 ? p->err->status : DW_OK;
		}
	for (size_t i = 0; i < sizeof functions / sizeof functions[0]; i++)
		if (qx_is(t, functions[i].name)) {
			if (!qx_is(qx_cur(p), "("))
				return qx_error_at(p, qx_cur(p), "expected '(' after %s",
					functions[i].name);
			p->pos++;
			int a;
			int st = qx_parse_expr(p, &a);
			if (st)
				return st;
			if (!qx_is(qx_cur(p), ")"))
				return qx_error_at(p, qx_cur(p), "expected ')'");
			p->pos++;
			return make(p, t, QE_FN, functions[i].fn, a, -1, out);
		}
	const qx_sym *s = qx_lookup(p, t->text, t->len);
	if (!s)
		return qx_error_at(p, t, "expected a number, a constant (pi, tau, euler), a function "
			"or a declared variable");
	if (s->kind == SY_CONST) {
		qx_expr n = {QE_NUM, 0, -1, -1, -1, s->value, t->line, t->col, 0};
		*out = qx_new_expr(p, &n);
		return *out < 0 ? p->err->status : DW_OK;
	}
	if (s->kind != SY_SLOT)
		return qx_error_at(p, t, "expected a numeric value (a qubit, bit or gate name "
			"cannot be used in arithmetic)");
	if ((size_t)(s - p->sym) < p->barrier)
		return qx_error_at(p, t, "expected a %s parameter, loop variable or constant "
			"(a %s body cannot read outer variables)", p->in_def ? "def" : "gate",
			p->in_def ? "def" : "gate");
	qx_expr n = {QE_SLOT, 0, -1, -1, s->index, 0, t->line, t->col, 0};
	*out = qx_new_expr(p, &n);
	return *out < 0 ? p->err->status : DW_OK;
}

static int parse_power(qx_parser *p, int *out)
{
	int st = parse_primary(p, out);
	if (st)
		return st;
	const qx_token *t = qx_cur(p);
	if (!qx_is(t, "**"))
		return DW_OK;
	p->pos++;
	int b;
	st = parse_unary(p, &b);
	if (st)
		return st;
	return make(p, t, QE_POW, 0, *out, b, out);
}

static int parse_unary(qx_parser *p, int *out)
{
	const qx_token *t = qx_cur(p);
	if (qx_is(t, "-") || qx_is(t, "+")) {
		if (p->nest >= QX_MAX_NEST)
			return qx_error_at(p, t, "expected an expression nested at most %d levels deep",
				QX_MAX_NEST);
		p->pos++;
		int a;
		p->nest++;
		int st = parse_unary(p, &a);
		p->nest--;
		if (st)
			return st;
		if (qx_is(t, "+")) {
			*out = a;
			return DW_OK;
		}
		return make(p, t, QE_NEG, 0, a, -1, out);
	}
	return parse_power(p, out);
}

static int parse_term(qx_parser *p, int *out)
{
	int st = parse_unary(p, out);
	while (st == DW_OK) {
		const qx_token *t = qx_cur(p);
		int op = qx_is(t, "*") ? QE_MUL : qx_is(t, "/") ? QE_DIV : -1;
		if (op < 0)
			break;
		p->pos++;
		int b;
		st = parse_unary(p, &b);
		if (st == DW_OK)
			st = make(p, t, op, 0, *out, b, out);
	}
	return st;
}

int qx_parse_expr(qx_parser *p, int *out)
{
	if (p->nest >= QX_MAX_NEST)
		return qx_error_at(p, qx_cur(p), "expected an expression nested at most %d levels deep",
			QX_MAX_NEST);
	p->nest++;
	int st = parse_term(p, out);
	while (st == DW_OK) {
		const qx_token *t = qx_cur(p);
		int op = qx_is(t, "+") ? QE_ADD : qx_is(t, "-") ? QE_SUB : -1;
		if (op < 0)
			break;
		p->pos++;
		int b;
		st = parse_term(p, &b);
		if (st == DW_OK)
			st = make(p, t, op, 0, *out, b, out);
	}
	p->nest--;
	return st;
}

int qx_parse_const(qx_parser *p, double *out)
{
	const qx_token *t = qx_cur(p);
	int e;
	int st = qx_parse_expr(p, &e);
	if (st)
		return st;
	if (p->prog->ex[e].op != QE_NUM)
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected a constant expression "
			"(no inputs, parameters or loop variables)", p->file, t->line, t->col);
	*out = p->prog->ex[e].num;
	return DW_OK;
}

int qx_eval(const dw_qasm_program *prog, int e, const double *vars,
	double *out, dw_error *err)
{
	const qx_expr *x = &prog->ex[e];
	double a = 0, b = 0;
	switch (x->op) {
	case QE_NUM:
		*out = x->num;
		return DW_OK;
	case QE_SLOT:
		*out = vars[x->slot];
		return DW_OK;
	default:
		break;
	}
	int st = qx_eval(prog, x->a, vars, &a, err);
	if (st == DW_OK && x->b >= 0)
		st = qx_eval(prog, x->b, vars, &b, err);
	if (st)
		return st;
	const char *why = apply(x->op, x->fn, a, b, out);
	if (why)
		return dw_fail(err, DW_EINPUT, "%s:%ld:%ld: %s%s%s", prog->name, x->line, x->col,
			why, x->op == QE_FN ? " in " : "", x->op == QE_FN ? fn_name(x->fn) : "");
	return DW_OK;
}

int dw_angle_expr_eval(const char *text, double *out, dw_error *err)
{
	dw_error local = {0};
	qx_token *tok = NULL;
	size_t ntok = 0;
	dw_qasm_program prog = {0};
	prog.name = (char *)"angle";
	qx_parser p = {0};
	p.file = "angle";
	p.prog = &prog;
	p.err = &local;
	int st = qx_lex(text, "angle", &tok, &ntok, &local);
	double v = 0;
	if (st == DW_OK) {
		p.tok = tok;
		p.ntok = ntok;
		st = qx_parse_const(&p, &v);
		if (st == DW_OK && tok[p.pos].kind != QT_EOF)
			st = qx_error_at(&p, &tok[p.pos], "expected an operator or the end of the expression");
	}
	free(tok);
	free(prog.ex);
	if (st != DW_OK) {
		/* Reword "angle:1:COL: what" as "angle 'TEXT': column COL: what". */
		const char *m = local.msg;
		long line = 0, col = 0;
		int used = 0;
		if (sscanf(m, "angle:%ld:%ld: %n", &line, &col, &used) == 2 && used > 0)
			return dw_fail(err, st, "angle '%.200s': column %ld: %s", text, col, m + used);
		return dw_fail(err, st, "angle '%.200s': %s", text, m);
	}
	*out = v;
	return DW_OK;
}

/* ---- operands ---- */

/* The register operand o names (a global one, or a def's qubit[n]
 * argument or local bit register). */
const dw_qasm_reg *qx_operand_reg(const qx_parser *p, const qx_operand *o, int quantum)
{
	if (o->local)
		return quantum ? &p->in_def->lq[o->reg] : &p->in_def->lbits[o->reg];
	return quantum ? &p->prog->qregs[o->reg] : &p->prog->cregs[o->reg];
}

/* After a register name: ['[' expr ']'], a constant index checked against
 * the register's size (and kept without an expression node). */
static int parse_index(qx_parser *p, qx_operand *o, int quantum)
{
	if (!qx_is(qx_cur(p), "[")) {
		o->kind = QO_REG;
		return DW_OK;
	}
	p->pos++;
	const qx_token *it = qx_cur(p);
	int st = qx_parse_expr(p, &o->index);
	if (st)
		return st;
	const qx_expr *e = &p->prog->ex[o->index];
	const dw_qasm_reg *r = qx_operand_reg(p, o, quantum);
	if (e->op == QE_NUM && (e->num != floor(e->num) || e->num < 0 || e->num >= r->size))
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected an index from 0 to %d "
			"into '%s' (got %.17g)", p->file, it->line, it->col, r->size - 1,
			r->name, e->num);
	if (e->op == QE_NUM && (size_t)o->index + 1 == p->prog->nex) {
		/* a constant index needs no expression node */
		o->fixed = (int)e->num;
		o->index = -1;
		p->prog->nex--;
	}
	if (qx_is(qx_cur(p), ":"))
		return qx_error_at(p, qx_cur(p), "expected ']' (register slices are not read)");
	o->kind = QO_ELEM;
	return qx_expect(p, "]");
}

/* A qubit operand: name | name '[' expr ']' at the top level, an argument
 * name inside a gate body, an argument or argument[expr] inside a def
 * body (which does not see global registers). */
int qx_parse_qubit(qx_parser *p, qx_operand *o)
{
	const qx_token *t = qx_cur(p);
	o->line = t->line;
	o->col = t->col;
	o->index = -1;
	o->local = 0;
	const qx_sym *s = t->kind == QT_IDENT ? qx_lookup(p, t->text, t->len) : NULL;
	if (p->in_gate || (p->in_def && s && s->kind == SY_QARG)) {
		if (!s || s->kind != SY_QARG)
			return qx_error_at(p, t, "expected a qubit argument of the gate");
		p->pos++;
		if (qx_is(qx_cur(p), "["))
			return qx_error_at(p, qx_cur(p), "expected ',' or ';' (%s arguments declared "
				"'qubit' are single qubits and cannot be indexed)", p->in_gate ? "gate" : "def");
		o->kind = QO_ARG;
		o->reg = s->index;
		return DW_OK;
	}
	if (p->in_def) {
		if (s && s->kind == SY_QREG)
			return qx_error_at(p, t, "expected a qubit argument of the def (global qubit "
				"registers are not visible inside a def body; pass them as arguments)");
		if (!s || s->kind != SY_LQREG)
			return qx_error_at(p, t, "expected a qubit argument of the def");
		o->local = 1;
	} else if (!s || s->kind != SY_QREG) {
		return qx_error_at(p, t, "expected a qubit register");
	}
	p->pos++;
	o->reg = s->index;
	return parse_index(p, o, 1);
}

/* A bit operand: name | name '[' expr ']' (inside a def: its local bit
 * registers only). */
int qx_parse_bit(qx_parser *p, qx_operand *o)
{
	const qx_token *t = qx_cur(p);
	o->line = t->line;
	o->col = t->col;
	o->index = -1;
	o->local = 0;
	const qx_sym *s = t->kind == QT_IDENT ? qx_lookup(p, t->text, t->len) : NULL;
	if (p->in_def && s && s->kind == SY_CREG)
		return qx_error_at(p, t, "expected a bit register declared in the def (global bit "
			"registers are not visible inside a def body)");
	if (!s || (s->kind != SY_CREG && s->kind != SY_LCREG))
		return qx_error_at(p, t, "expected a bit register");
	p->pos++;
	o->reg = s->index;
	o->local = s->kind == SY_LCREG;
	return parse_index(p, o, 0);
}

int qx_push_operand(qx_parser *p, qx_stmt *s, size_t *cap, const qx_operand *o)
{
	int st = qx_grow(p, (void **)&s->ops, cap, (size_t)s->nops, sizeof *s->ops);
	if (st)
		return st;
	s->ops[s->nops++] = *o;
	return DW_OK;
}
