/* qasm_read.c - read an OpenQASM 3 program (the subset in docs/runtime.md).
 * Takes: program text or a file.  Gives: a dw_qasm_program (qasm_prog.h):
 * registers laid out in declaration order, inputs, gate definitions and
 * the statement tree, ready for sim_exec.c.  Anything outside the subset
 * is DW_EINPUT "FILE:LINE:COL: expected ...".
 *
 *   program   := ['OPENQASM' version ';'] statement*
 *   statement := 'include' "stdgates.inc" ';' | declaration | gatedef
 *              | for | if | measure | reset | barrier | gatecall
 *   gatecall  := modifier* name ['(' exprs ')'] operands ';'
 *   modifier  := ('inv' | 'pow' '(' expr ')' | ('ctrl'|'negctrl') ['(' const ')']) '@'
 *   for       := 'for' [type] name 'in' '[' expr ':' [expr ':'] expr ']' body
 *   if        := 'if' '(' bits ['==' | '!=' expr] ')' body ['else' body]   */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "qasm_prog.h"

const qx_builtin qx_builtins[QB_COUNT] = {
	[QB_U] = {"U", 3, 1}, [QB_GPHASE] = {"gphase", 1, 0},
	[QB_P] = {"p", 1, 1}, [QB_X] = {"x", 0, 1}, [QB_Y] = {"y", 0, 1},
	[QB_Z] = {"z", 0, 1}, [QB_H] = {"h", 0, 1}, [QB_S] = {"s", 0, 1},
	[QB_SDG] = {"sdg", 0, 1}, [QB_T] = {"t", 0, 1}, [QB_TDG] = {"tdg", 0, 1},
	[QB_SX] = {"sx", 0, 1}, [QB_RX] = {"rx", 1, 1}, [QB_RY] = {"ry", 1, 1},
	[QB_RZ] = {"rz", 1, 1}, [QB_CX] = {"cx", 0, 2}, [QB_CY] = {"cy", 0, 2},
	[QB_CZ] = {"cz", 0, 2}, [QB_CP] = {"cp", 1, 2}, [QB_CRX] = {"crx", 1, 2},
	[QB_CRY] = {"cry", 1, 2}, [QB_CRZ] = {"crz", 1, 2}, [QB_CH] = {"ch", 0, 2},
	[QB_SWAP] = {"swap", 0, 2}, [QB_CCX] = {"ccx", 0, 3},
	[QB_CSWAP] = {"cswap", 0, 3}, [QB_CU] = {"cu", 4, 2},
	[QB_CX_OLD] = {"CX", 0, 2}, [QB_PHASE] = {"phase", 1, 1},
	[QB_CPHASE] = {"cphase", 1, 2}, [QB_ID] = {"id", 0, 1},
	[QB_U1] = {"u1", 1, 1}, [QB_U2] = {"u2", 2, 1}, [QB_U3] = {"u3", 3, 1},
};

#define MAX_QUBITS 62         /* amplitude indices and masks are uint64 */
#define MAX_BITS (1 << 20)
#define MAX_DEPTH 200         /* nesting of bodies */

static const char *const reserved[] = {
	"OPENQASM", "include", "qubit", "qreg", "bit", "creg", "input", "output",
	"const", "gate", "def", "for", "in", "if", "else", "measure", "reset",
	"barrier", "ctrl", "negctrl", "inv", "pow", "int", "uint", "float",
	"angle", "bool", "while", "break", "continue", "return", "let", "box",
	"delay", "duration", "stretch", "complex", "array", "extern", "cal",
	"defcal", "opaque", "true", "false", "pi", "tau", "euler", "\xCF\x80",
	"\xCF\x84", "\xE2\x84\x87", "sin", "cos", "tan", "arcsin", "arccos",
	"arctan", "exp", "ln", "sqrt",
};

static const qx_token *cur(qx_parser *p)
{
	return qx_cur(p);
}

/* Append one token from the lexer to the window. */
static int lex_more(qx_parser *p)
{
	if (p->ntok && p->tok[p->ntok - 1].kind == QT_EOF)
		return DW_OK;
	if (p->ntok == p->captok) {
		size_t cap = p->captok ? 2 * p->captok : 256;
		qx_token *t = realloc(p->tok, cap * sizeof *t);
		if (!t)
			return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
		p->tok = t;
		p->captok = cap;
	}
	int st = qx_lex_next(&p->lex, &p->tok[p->ntok]);
	if (st == DW_OK)
		p->ntok++;
	return st;
}

/* Before a top-level statement: drop the tokens read so far and lex up to
 * the statement's end -- a ';' or '}' outside braces not followed by
 * 'else' -- plus two tokens of lookahead.  Token pointers stay valid for
 * the whole statement, since the window only moves here. */
static int refill(qx_parser *p)
{
	if (p->pos)
		memmove(p->tok, p->tok + p->pos, (p->ntok - p->pos) * sizeof *p->tok);
	p->ntok -= p->pos;
	p->pos = 0;
	size_t k = 0;
	long depth = 0;
	int st = DW_OK;
	for (;;) {
		while (st == DW_OK && k + 1 >= p->ntok && !(p->ntok && p->tok[p->ntok - 1].kind == QT_EOF))
			st = lex_more(p);
		if (st || k >= p->ntok || p->tok[k].kind == QT_EOF)
			break;
		const qx_token *t = &p->tok[k];
		if (qx_is(t, "{"))
			depth++;
		else if (qx_is(t, "}"))
			depth--;
		int end = depth <= 0 && (qx_is(t, ";") || qx_is(t, "}"));
		k++;
		if (end && !(k < p->ntok && qx_is(&p->tok[k], "else")))
			break;
	}
	while (st == DW_OK && p->ntok < k + 3 && !(p->ntok && p->tok[p->ntok - 1].kind == QT_EOF))
		st = lex_more(p);
	return st;
}

static int expect(qx_parser *p, const char *s)
{
	if (!qx_is(cur(p), s))
		return qx_error_at(p, cur(p), "expected '%s'", s);
	p->pos++;
	return DW_OK;
}

static char *dup_tok(qx_parser *p, const qx_token *t)
{
	char *s = malloc(t->len + 1);
	if (!s) {
		dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
		return NULL;
	}
	memcpy(s, t->text, t->len);
	s[t->len] = '\0';
	return s;
}

/* Grow *arr (of *cap elements of size sz) so that index n fits. */
static int grow(qx_parser *p, void **arr, size_t *cap, size_t n, size_t sz)
{
	if (n < *cap)
		return DW_OK;
	size_t c = *cap ? 2 * *cap : 8;
	void *a = realloc(*arr, c * sz);
	if (!a)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	*arr = a;
	*cap = c;
	return DW_OK;
}

static int builtin_id(qx_parser *p, const qx_token *t)
{
	for (int i = 0; i < QB_COUNT; i++)
		if (qx_is(t, qx_builtins[i].name) && (i <= QB_GPHASE || p->have_stdgates))
			return i;
	return -1;
}

/* Declare name t as a new symbol; refuses reserved words and names that
 * are already declared in this scope. */
static int declare(qx_parser *p, const qx_token *t, int kind, int index, double value)
{
	if (t->kind != QT_IDENT)
		return qx_error_at(p, t, "expected a name");
	for (size_t i = 0; i < sizeof reserved / sizeof reserved[0]; i++)
		if (qx_is(t, reserved[i]))
			return qx_error_at(p, t, "expected a name that is not a reserved word");
	/* Parameters, qubit arguments and loop variables may reuse a gate's
	 * name (stdgates.inc itself names a qubit argument t). */
	if (kind != SY_SLOT && kind != SY_QARG && builtin_id(p, t) >= 0)
		return qx_error_at(p, t, "expected a name that is not a built-in or standard gate");
	const qx_sym *old = qx_lookup(p, t->text, t->len);
	if (old && ((size_t)(old - p->sym) >= p->barrier || old->kind == SY_CONST
		|| old->kind == SY_GATE))
		return qx_error_at(p, t, "expected a new name ('%.*s' is already declared)",
			(int)t->len, t->text);
	int st = grow(p, (void **)&p->sym, &p->capsym, p->nsym, sizeof *p->sym);
	if (st)
		return st;
	p->sym[p->nsym++] = (qx_sym){t->text, t->len, kind, index, value};
	return DW_OK;
}

/* A constant non-negative integer in [lo, hi]. */
static int const_int(qx_parser *p, long lo, long hi, const char *what, long *out)
{
	const qx_token *t = cur(p);
	double v;
	int st = qx_parse_const(p, &v);
	if (st)
		return st;
	if (v != floor(v) || v < (double)lo || v > (double)hi)
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected %s, an integer from %ld to %ld "
			"(got %.17g)", p->file, t->line, t->col, what, lo, hi, v);
	*out = (long)v;
	return DW_OK;
}

static void free_block(qx_block *b);

static void free_stmt(qx_stmt *s)
{
	free(s->mods);
	free(s->params);
	free(s->ops);
	if (s->body) {
		free_block(s->body);
		free(s->body);
	}
	if (s->orelse) {
		free_block(s->orelse);
		free(s->orelse);
	}
}

static void free_block(qx_block *b)
{
	for (size_t i = 0; i < b->n; i++)
		free_stmt(&b->s[i]);
	free(b->s);
	b->s = NULL;
	b->n = b->cap = 0;
}

/* Give back the unused tail of an array grown by doubling. */
static void *shrink(void *a, size_t n, size_t sz)
{
	if (!a || n == 0)
		return a;
	void *r = realloc(a, n * sz);
	return r ? r : a;
}

static int append(qx_parser *p, qx_block *b, qx_stmt *s)
{
	s->mods = shrink(s->mods, (size_t)s->nmods, sizeof *s->mods);
	s->params = shrink(s->params, (size_t)s->nparams, sizeof *s->params);
	s->ops = shrink(s->ops, (size_t)s->nops, sizeof *s->ops);
	int st = grow(p, (void **)&b->s, &b->cap, b->n, sizeof *b->s);
	if (st) {
		free_stmt(s);
		return st;
	}
	b->s[b->n++] = *s;
	return DW_OK;
}

/* ---- operands ---- */

/* A qubit operand: name | name '[' expr ']' at the top level, an argument
 * name inside a gate body. */
static int parse_qubit(qx_parser *p, qx_operand *o)
{
	const qx_token *t = cur(p);
	o->line = t->line;
	o->col = t->col;
	o->index = -1;
	const qx_sym *s = t->kind == QT_IDENT ? qx_lookup(p, t->text, t->len) : NULL;
	if (p->in_gate) {
		if (!s || s->kind != SY_QARG)
			return qx_error_at(p, t, "expected a qubit argument of the gate");
		p->pos++;
		if (qx_is(cur(p), "["))
			return qx_error_at(p, cur(p), "expected ',' or ';' (gate arguments are single "
				"qubits and cannot be indexed)");
		o->kind = QO_ARG;
		o->reg = s->index;
		return DW_OK;
	}
	if (!s || s->kind != SY_QREG)
		return qx_error_at(p, t, "expected a qubit register");
	p->pos++;
	o->reg = s->index;
	if (!qx_is(cur(p), "[")) {
		o->kind = QO_REG;
		return DW_OK;
	}
	p->pos++;
	const qx_token *it = cur(p);
	int st = qx_parse_expr(p, &o->index);
	if (st)
		return st;
	const qx_expr *e = &p->prog->ex[o->index];
	int size = p->prog->qregs[o->reg].size;
	if (e->op == QE_NUM && (e->num != floor(e->num) || e->num < 0 || e->num >= size))
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected an index from 0 to %d "
			"into '%s' (got %.17g)", p->file, it->line, it->col, size - 1,
			p->prog->qregs[o->reg].name, e->num);
	if (e->op == QE_NUM && (size_t)o->index + 1 == p->prog->nex) {
		/* a constant index needs no expression node */
		o->fixed = (int)e->num;
		o->index = -1;
		p->prog->nex--;
	}
	if (qx_is(cur(p), ":"))
		return qx_error_at(p, cur(p), "expected ']' (register slices are not read)");
	o->kind = QO_ELEM;
	return expect(p, "]");
}

/* A bit operand: name | name '[' expr ']'. */
static int parse_bit(qx_parser *p, qx_operand *o)
{
	const qx_token *t = cur(p);
	o->line = t->line;
	o->col = t->col;
	o->index = -1;
	const qx_sym *s = t->kind == QT_IDENT ? qx_lookup(p, t->text, t->len) : NULL;
	if (!s || s->kind != SY_CREG)
		return qx_error_at(p, t, "expected a bit register");
	p->pos++;
	o->reg = s->index;
	if (!qx_is(cur(p), "[")) {
		o->kind = QO_REG;
		return DW_OK;
	}
	p->pos++;
	const qx_token *it = cur(p);
	int st = qx_parse_expr(p, &o->index);
	if (st)
		return st;
	const qx_expr *e = &p->prog->ex[o->index];
	int size = p->prog->cregs[o->reg].size;
	if (e->op == QE_NUM && (e->num != floor(e->num) || e->num < 0 || e->num >= size))
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected an index from 0 to %d "
			"into '%s' (got %.17g)", p->file, it->line, it->col, size - 1,
			p->prog->cregs[o->reg].name, e->num);
	if (e->op == QE_NUM && (size_t)o->index + 1 == p->prog->nex) {
		/* a constant index needs no expression node */
		o->fixed = (int)e->num;
		o->index = -1;
		p->prog->nex--;
	}
	o->kind = QO_ELEM;
	return expect(p, "]");
}

static int push_operand(qx_parser *p, qx_stmt *s, size_t *cap, const qx_operand *o)
{
	int st = grow(p, (void **)&s->ops, cap, (size_t)s->nops, sizeof *s->ops);
	if (st)
		return st;
	s->ops[s->nops++] = *o;
	return DW_OK;
}

/* ---- statements ---- */

static int parse_statement(qx_parser *p, qx_block *b, int depth);

/* body := '{' statement* '}' | statement */
static int parse_body(qx_parser *p, qx_block **out, int depth)
{
	if (depth > MAX_DEPTH)
		return qx_error_at(p, cur(p), "expected at most %d nested blocks", MAX_DEPTH);
	qx_block *b = calloc(1, sizeof *b);
	if (!b)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	*out = b;
	size_t mark = p->nsym;
	int st = DW_OK;
	if (qx_is(cur(p), "{")) {
		p->pos++;
		while (st == DW_OK && !qx_is(cur(p), "}")) {
			if (cur(p)->kind == QT_EOF)
				st = qx_error_at(p, cur(p), "expected '}'");
			else
				st = parse_statement(p, b, depth + 1);
		}
		if (st == DW_OK)
			p->pos++;
	} else {
		st = parse_statement(p, b, depth + 1);
	}
	p->nsym = mark;
	return st;
}

static int parse_gatecall(qx_parser *p, qx_block *b)
{
	const qx_token *start = cur(p);
	qx_stmt s = {0};
	s.kind = QS_GATE;
	s.line = start->line;
	s.col = start->col;
	s.builtin = s.user = -1;
	size_t capmods = 0, capops = 0, cappar = 0;
	int ncontrols = 0, st = DW_OK;
	/* modifiers */
	for (;;) {
		const qx_token *t = cur(p);
		qx_mod m = {0};
		m.expr = -1;
		m.count = 0;
		if (qx_is(t, "inv")) {
			m.kind = QM_INV;
			p->pos++;
		} else if (qx_is(t, "pow")) {
			m.kind = QM_POW;
			p->pos++;
			if ((st = expect(p, "(")) || (st = qx_parse_expr(p, &m.expr)) || (st = expect(p, ")")))
				goto fail;
		} else if (qx_is(t, "ctrl") || qx_is(t, "negctrl")) {
			m.kind = qx_is(t, "ctrl") ? QM_CTRL : QM_NEGCTRL;
			m.count = 1;
			p->pos++;
			if (qx_is(cur(p), "(")) {
				long n;
				p->pos++;
				if ((st = const_int(p, 1, MAX_QUBITS, "a number of controls", &n))
					|| (st = expect(p, ")")))
					goto fail;
				m.count = (int)n;
			}
			ncontrols += m.count;
		} else {
			break;
		}
		if ((st = expect(p, "@")))
			goto fail;
		if ((st = grow(p, (void **)&s.mods, &capmods, (size_t)s.nmods, sizeof *s.mods)))
			goto fail;
		s.mods[s.nmods++] = m;
	}
	/* gate name */
	const qx_token *name = cur(p);
	int nparams, nqubits;
	if (name->kind != QT_IDENT) {
		st = qx_error_at(p, name, "expected a gate name");
		goto fail;
	}
	const qx_sym *sym = qx_lookup(p, name->text, name->len);
	if (sym && sym->kind == SY_GATE) {
		s.user = sym->index;
		nparams = p->prog->gates[s.user].nparams;
		nqubits = p->prog->gates[s.user].nqubits;
	} else if ((s.builtin = builtin_id(p, name)) >= 0) {
		nparams = qx_builtins[s.builtin].nparams;
		nqubits = qx_builtins[s.builtin].nqubits;
		if (s.builtin == QB_GPHASE)
			s.kind = QS_GPHASE;
	} else {
		for (int i = 0; i < QB_COUNT; i++)
			if (qx_is(name, qx_builtins[i].name)) {
				st = qx_error_at(p, name, "expected a declared gate (include \"stdgates.inc\" "
					"to use the standard gates)");
				goto fail;
			}
		st = qx_error_at(p, name, s.nmods ? "expected a gate name"
			: "expected a statement (a declaration, gate call, for, if, measure or reset)");
		goto fail;
	}
	p->pos++;
	/* parameters */
	if (qx_is(cur(p), "(")) {
		p->pos++;
		while (!qx_is(cur(p), ")")) {
			int e;
			if (s.nparams && (st = expect(p, ",")))
				goto fail;
			if ((st = qx_parse_expr(p, &e)))
				goto fail;
			if ((st = grow(p, (void **)&s.params, &cappar, (size_t)s.nparams, sizeof *s.params)))
				goto fail;
			s.params[s.nparams++] = e;
		}
		p->pos++;
	}
	if (s.nparams != nparams) {
		st = dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected %d parameter%s for '%.*s', "
			"found %d", p->file, name->line, name->col, nparams, nparams == 1 ? "" : "s",
			(int)name->len, name->text, s.nparams);
		goto fail;
	}
	/* operands */
	while (!qx_is(cur(p), ";")) {
		qx_operand o;
		if (s.nops && (st = expect(p, ",")))
			goto fail;
		if ((st = parse_qubit(p, &o)) || (st = push_operand(p, &s, &capops, &o)))
			goto fail;
	}
	p->pos++;
	if (s.nops != nqubits + ncontrols) {
		st = dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected %d qubit operand%s for '%.*s'"
			"%s, found %d", p->file, name->line, name->col, nqubits + ncontrols,
			nqubits + ncontrols == 1 ? "" : "s", (int)name->len, name->text,
			ncontrols ? " with its controls" : "", s.nops);
		goto fail;
	}
	return append(p, b, &s);
fail:
	free_stmt(&s);
	return st;
}

/* for [int|uint [ '[' n ']' ]] name in '[' a ':' [step ':'] b ']' body */
static int parse_for(qx_parser *p, qx_block *b, int depth)
{
	qx_stmt s = {0};
	const qx_token *t = cur(p);
	s.kind = QS_FOR;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	p->pos++;
	int st = DW_OK;
	if (qx_is(cur(p), "int") || qx_is(cur(p), "uint")) {
		p->pos++;
		if (qx_is(cur(p), "[")) {
			long w;
			p->pos++;
			if ((st = const_int(p, 1, 64, "an integer width", &w)) || (st = expect(p, "]")))
				return st;
		}
	}
	const qx_token *var = cur(p);
	if (var->kind != QT_IDENT)
		return qx_error_at(p, var, "expected a loop variable name");
	p->pos++;
	if ((st = expect(p, "in")))
		return st;
	if (qx_is(cur(p), "{"))
		return qx_error_at(p, cur(p), "expected '[' (loops over sets are not read; use a range "
			"[a:b] or [a:step:b])");
	if ((st = expect(p, "[")) || (st = qx_parse_expr(p, &s.start)) || (st = expect(p, ":"))
		|| (st = qx_parse_expr(p, &s.stop)))
		return st;
	s.step = -1;
	if (qx_is(cur(p), ":")) {
		p->pos++;
		s.step = s.stop;
		if ((st = qx_parse_expr(p, &s.stop)))
			return st;
	}
	if ((st = expect(p, "]")))
		return st;
	size_t mark = p->nsym;
	s.slot = (*p->nslots)++;
	if ((st = declare(p, var, SY_SLOT, s.slot, 0)))
		return st;
	st = parse_body(p, &s.body, depth);
	p->nsym = mark;
	if (st) {
		free_stmt(&s);
		return st;
	}
	return append(p, b, &s);
}

/* if '(' bit-operand [('==' | '!=') expr] ')' body ['else' body] ; also '!' bits */
static int parse_if(qx_parser *p, qx_block *b, int depth)
{
	qx_stmt s = {0};
	const qx_token *t = cur(p);
	s.kind = QS_IF;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	size_t capops = 0;
	p->pos++;
	int st = expect(p, "(");
	if (st)
		return st;
	int negate = 0;
	if (qx_is(cur(p), "!")) {
		negate = 1;
		p->pos++;
	}
	qx_operand o;
	if ((st = parse_bit(p, &o)) || (st = push_operand(p, &s, &capops, &o)))
		goto fail;
	if (!negate && (qx_is(cur(p), "==") || qx_is(cur(p), "!="))) {
		s.cond_not = qx_is(cur(p), "!=");
		p->pos++;
		if ((st = qx_parse_expr(p, &s.cond_value)))
			goto fail;
	} else {
		/* `if (c)` means c != 0, `if (!c)` means c == 0 */
		qx_expr zero = {QE_NUM, 0, -1, -1, -1, 0, t->line, t->col, 0};
		s.cond_value = qx_new_expr(p, &zero);
		if (s.cond_value < 0) {
			st = p->err->status;
			goto fail;
		}
		s.cond_not = !negate;
	}
	if ((st = expect(p, ")")) || (st = parse_body(p, &s.body, depth)))
		goto fail;
	if (qx_is(cur(p), "else")) {
		p->pos++;
		if ((st = parse_body(p, &s.orelse, depth)))
			goto fail;
	}
	return append(p, b, &s);
fail:
	free_stmt(&s);
	return st;
}

/* measure q -> c ;  c = measure q ;  measure q ; */
static int parse_measure(qx_parser *p, qx_block *b, int assign)
{
	qx_stmt s = {0};
	const qx_token *t = cur(p);
	s.kind = QS_MEASURE;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	size_t capops = 0;
	qx_operand q, c;
	int st, have_bit = 0;
	if (assign) {
		if ((st = parse_bit(p, &c)) || (st = expect(p, "=")) || (st = expect(p, "measure")))
			return st;
		have_bit = 1;
	} else {
		p->pos++;
	}
	if ((st = parse_qubit(p, &q)))
		return st;
	if (!assign && qx_is(cur(p), "->")) {
		p->pos++;
		if ((st = parse_bit(p, &c)))
			return st;
		have_bit = 1;
	}
	if ((st = expect(p, ";")))
		return st;
	if (have_bit && (q.kind == QO_REG) != (c.kind == QO_REG))
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected a single qubit with a single "
			"bit, or a register with a bit register", p->file, t->line, t->col);
	if (have_bit && q.kind == QO_REG
		&& p->prog->qregs[q.reg].size != p->prog->cregs[c.reg].size)
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected registers of equal size "
			"('%s' has %d qubits, '%s' %d bits)", p->file, t->line, t->col,
			p->prog->qregs[q.reg].name, p->prog->qregs[q.reg].size,
			p->prog->cregs[c.reg].name, p->prog->cregs[c.reg].size);
	if ((st = push_operand(p, &s, &capops, &q)) || (have_bit && (st = push_operand(p, &s, &capops, &c)))) {
		free_stmt(&s);
		return st;
	}
	return append(p, b, &s);
}

static int parse_reset(qx_parser *p, qx_block *b)
{
	qx_stmt s = {0};
	const qx_token *t = cur(p);
	s.kind = QS_RESET;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	size_t capops = 0;
	qx_operand q;
	p->pos++;
	int st = parse_qubit(p, &q);
	if (st == DW_OK)
		st = expect(p, ";");
	if (st == DW_OK)
		st = push_operand(p, &s, &capops, &q);
	if (st) {
		free_stmt(&s);
		return st;
	}
	return append(p, b, &s);
}

/* barrier [operands] ;  -- no effect on a simulation, read and dropped */
static int parse_barrier(qx_parser *p)
{
	p->pos++;
	int n = 0;
	while (!qx_is(cur(p), ";")) {
		qx_operand o;
		int st;
		if (n++ && (st = expect(p, ",")))
			return st;
		if ((st = parse_qubit(p, &o)))
			return st;
	}
	p->pos++;
	return DW_OK;
}

/* ---- declarations (top level only) ---- */

/* Optional '[' const ']' designator; gives def when absent. */
static int designator(qx_parser *p, long lo, long hi, const char *what, long def, long *out)
{
	*out = def;
	if (!qx_is(cur(p), "["))
		return DW_OK;
	p->pos++;
	int st = const_int(p, lo, hi, what, out);
	return st ? st : expect(p, "]");
}

static int add_reg(qx_parser *p, const qx_token *name, int quantum, long size)
{
	dw_qasm_program *g = p->prog;
	long total = quantum ? g->nqubits : g->nbits;
	long limit = quantum ? MAX_QUBITS : MAX_BITS;
	if (total + size > limit)
		return qx_error_at(p, name, "expected at most %ld %s in all", limit,
			quantum ? "qubits" : "bits");
	size_t *n = quantum ? &g->nqregs : &g->ncregs;
	dw_qasm_reg **regs = quantum ? &g->qregs : &g->cregs;
	dw_qasm_reg *r = realloc(*regs, (*n + 1) * sizeof *r);
	if (!r)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	*regs = r;
	int st = declare(p, name, quantum ? SY_QREG : SY_CREG, (int)*n, 0);
	if (st)
		return st;
	char *s = dup_tok(p, name);
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
static int parse_register(qx_parser *p, int quantum, int old_style)
{
	long size = 1;
	int st;
	p->pos++;
	const qx_token *name;
	long hi = quantum ? MAX_QUBITS : MAX_BITS;
	if (old_style) {
		name = cur(p);
		if (name->kind != QT_IDENT)
			return qx_error_at(p, name, "expected a register name");
		p->pos++;
		if ((st = designator(p, 1, hi, "a register size", 1, &size)))
			return st;
	} else {
		if ((st = designator(p, 1, hi, "a register size", 1, &size)))
			return st;
		name = cur(p);
		p->pos++;
	}
	if ((st = add_reg(p, name, quantum, size)))
		return st;
	if (qx_is(cur(p), "="))
		return qx_error_at(p, cur(p), "expected ';' (initialisers are not read)");
	return expect(p, ";");
}

/* input float[64] x;  input angle[32] x;  input float x; */
static int parse_input(qx_parser *p)
{
	p->pos++;
	const qx_token *type = cur(p);
	int is_angle = qx_is(type, "angle");
	if (!is_angle && !qx_is(type, "float"))
		return qx_error_at(p, type, "expected 'float' or 'angle' (the only input types read)");
	p->pos++;
	long width;
	int st = designator(p, 1, 128, "a type width", 64, &width);
	if (st)
		return st;
	const qx_token *name = cur(p);
	dw_qasm_program *g = p->prog;
	dw_qasm_input *in = realloc(g->inputs, (g->ninputs + 1) * sizeof *in);
	if (!in)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	g->inputs = in;
	int slot = (*p->nslots)++;
	if ((st = declare(p, name, SY_SLOT, slot, 0)))
		return st;
	char *s = dup_tok(p, name);
	if (!s)
		return p->err->status;
	in[g->ninputs++] = (dw_qasm_input){s, is_angle, slot};
	p->pos++;
	return expect(p, ";");
}

/* const (int|uint|float|angle)['[' n ']'] name = const-expr ; */
static int parse_const_decl(qx_parser *p)
{
	p->pos++;
	const qx_token *type = cur(p);
	int integral = qx_is(type, "int") || qx_is(type, "uint");
	long width;
	int st;
	if (type->kind == QT_IDENT && qx_is(&p->tok[p->pos + 1 < p->ntok ? p->pos + 1 : p->pos], "=")) {
		integral = 0;   /* `const name = value;` without a type (early drafts) */
	} else {
		if (!integral && !qx_is(type, "float") && !qx_is(type, "angle"))
			return qx_error_at(p, type, "expected 'int', 'uint', 'float' or 'angle'");
		p->pos++;
		if ((st = designator(p, 1, 128, "a type width", 64, &width)))
			return st;
	}
	const qx_token *name = cur(p);
	p->pos++;
	if ((st = expect(p, "=")))
		return st;
	const qx_token *vt = cur(p);
	double v;
	if ((st = qx_parse_const(p, &v)))
		return st;
	if (integral && (v != floor(v) || (qx_is(type, "uint") && v < 0)))
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected an integer value for '%.*s' "
			"(got %.17g)", p->file, vt->line, vt->col, (int)name->len, name->text, v);
	if ((st = declare(p, name, SY_CONST, 0, v)))
		return st;
	return expect(p, ";");
}

/* gate name ['(' params ')'] qargs '{' body '}' */
static int parse_gatedef(qx_parser *p)
{
	p->pos++;
	const qx_token *name = cur(p);
	if (name->kind != QT_IDENT)
		return qx_error_at(p, name, "expected a gate name");
	const qx_sym *old = qx_lookup(p, name->text, name->len);
	if (old)
		return qx_error_at(p, name, "expected a new gate name ('%.*s' is already declared)",
			(int)name->len, name->text);
	if (builtin_id(p, name) >= 0)
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
	if (qx_is(cur(p), "(")) {
		p->pos++;
		while (st == DW_OK && !qx_is(cur(p), ")")) {
			if (d.nparams && (st = expect(p, ",")))
				break;
			const qx_token *pn = cur(p);
			if ((st = declare(p, pn, SY_SLOT, d.nparams, 0)))
				break;
			p->pos++;
			d.nparams++;
			d.nslots++;
		}
		if (st == DW_OK)
			p->pos++;
	}
	while (st == DW_OK && !qx_is(cur(p), "{")) {
		if (d.nqubits && (st = expect(p, ",")))
			break;
		const qx_token *qn = cur(p);
		if ((st = declare(p, qn, SY_QARG, d.nqubits, 0)))
			break;
		p->pos++;
		if (++d.nqubits > MAX_QUBITS)
			st = qx_error_at(p, qn, "expected at most %d qubit arguments", MAX_QUBITS);
	}
	if (st == DW_OK && d.nqubits == 0)
		st = qx_error_at(p, cur(p), "expected at least one qubit argument");
	if (st == DW_OK) {
		p->pos++;
		while (st == DW_OK && !qx_is(cur(p), "}")) {
			if (cur(p)->kind == QT_EOF)
				st = qx_error_at(p, cur(p), "expected '}'");
			else
				st = parse_statement(p, &d.body, 1);
		}
		if (st == DW_OK)
			p->pos++;
	}
	p->nsym = mark;
	p->barrier = barrier;
	p->in_gate = 0;
	p->nslots = nslots;
	dw_qasm_program *g = p->prog;
	qx_gatedef *gs = NULL;
	if (st == DW_OK) {
		gs = realloc(g->gates, (g->ngates + 1) * sizeof *gs);
		if (!gs)
			st = dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	}
	if (st == DW_OK) {
		g->gates = gs;
		d.name = dup_tok(p, name);
		if (!d.name)
			st = p->err->status;
	}
	if (st == DW_OK)
		st = declare(p, name, SY_GATE, (int)g->ngates, 0);
	if (st) {
		free(d.name);
		free_block(&d.body);
		return st;
	}
	g->gates[g->ngates++] = d;
	return DW_OK;
}

static int top_level_only(qx_parser *p, int depth)
{
	if (depth > 0 || p->in_gate)
		return qx_error_at(p, cur(p), "expected a gate call, for, if, measure or reset "
			"(declarations are read only at the top level)");
	return DW_OK;
}

static int parse_statement(qx_parser *p, qx_block *b, int depth)
{
	const qx_token *t = cur(p);
	int st;
	if (p->in_gate) {
		if (qx_is(t, "for"))
			return parse_for(p, b, depth);
		if (qx_is(t, "barrier"))
			return parse_barrier(p);
		if (qx_is(t, "measure") || qx_is(t, "reset") || qx_is(t, "if"))
			return qx_error_at(p, t, "expected a gate call, gphase or for loop (a gate body "
				"is unitary)");
		return parse_gatecall(p, b);
	}
	if (qx_is(t, "OPENQASM"))
		return qx_error_at(p, t, "expected the version line only as the first statement");
	if (qx_is(t, "include")) {
		if ((st = top_level_only(p, depth)))
			return st;
		p->pos++;
		const qx_token *f = cur(p);
		if (f->kind != QT_STRING || f->len != 14 || memcmp(f->text, "\"stdgates.inc\"", 14))
			return qx_error_at(p, f, "expected \"stdgates.inc\" (the only include file read)");
		p->pos++;
		p->have_stdgates = 1;
		return expect(p, ";");
	}
	if (qx_is(t, "qubit") || qx_is(t, "qreg") || qx_is(t, "bit") || qx_is(t, "creg")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return parse_register(p, qx_is(t, "qubit") || qx_is(t, "qreg"),
			qx_is(t, "qreg") || qx_is(t, "creg"));
	}
	if (qx_is(t, "output")) {
		if ((st = top_level_only(p, depth)))
			return st;
		p->pos++;
		if (!qx_is(cur(p), "bit"))
			return qx_error_at(p, cur(p), "expected 'bit' after 'output'");
		return parse_register(p, 0, 0);
	}
	if (qx_is(t, "input")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return parse_input(p);
	}
	if (qx_is(t, "const")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return parse_const_decl(p);
	}
	if (qx_is(t, "gate")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return parse_gatedef(p);
	}
	if (qx_is(t, "for"))
		return parse_for(p, b, depth);
	if (qx_is(t, "if"))
		return parse_if(p, b, depth);
	if (qx_is(t, "measure"))
		return parse_measure(p, b, 0);
	if (qx_is(t, "reset"))
		return parse_reset(p, b);
	if (qx_is(t, "barrier"))
		return parse_barrier(p);
	if (t->kind == QT_IDENT) {
		const qx_sym *s = qx_lookup(p, t->text, t->len);
		if (s && s->kind == SY_CREG)
			return parse_measure(p, b, 1);
	}
	return parse_gatecall(p, b);
}

void dw_qasm_free(dw_qasm_program *g)
{
	if (!g)
		return;
	free(g->name);
	for (size_t i = 0; i < g->nqregs; i++)
		free(g->qregs[i].name);
	for (size_t i = 0; i < g->ncregs; i++)
		free(g->cregs[i].name);
	for (size_t i = 0; i < g->ninputs; i++)
		free(g->inputs[i].name);
	for (size_t i = 0; i < g->ngates; i++) {
		free(g->gates[i].name);
		free_block(&g->gates[i].body);
	}
	free(g->qregs);
	free(g->cregs);
	free(g->inputs);
	free(g->gates);
	free_block(&g->main);
	free(g->ex);
	free(g);
}

int dw_qasm_parse_string(const char *text, const char *name, dw_qasm_program **out,
	dw_error *err)
{
	*out = NULL;
	dw_qasm_program *g = calloc(1, sizeof *g);
	if (!g)
		return dw_fail(err, DW_EINTERNAL, "out of memory reading %s", name);
	g->name = strdup(name);
	if (!g->name) {
		free(g);
		return dw_fail(err, DW_EINTERNAL, "out of memory reading %s", name);
	}
	qx_parser p = {0};
	p.file = name;
	p.prog = g;
	p.err = err;
	p.nslots = &g->nslots;
	qx_lexer_init(&p.lex, text, name, err);
	int st = refill(&p);
	if (st == DW_OK && qx_is(cur(&p), "OPENQASM")) {
		const qx_token *v = &p.tok[++p.pos];
		if ((v->kind != QT_INT && v->kind != QT_FLOAT) || v->num < 3 || v->num >= 4)
			st = qx_error_at(&p, v, "expected version 3 or 3.x (OpenQASM 2 programs are not "
				"read: their U and gate library differ)");
		else {
			p.pos++;
			st = expect(&p, ";");
		}
	}
	while (st == DW_OK && (st = refill(&p)) == DW_OK && cur(&p)->kind != QT_EOF)
		st = parse_statement(&p, &g->main, 0);
	free(p.tok);
	free(p.sym);
	if (st) {
		dw_qasm_free(g);
		return st;
	}
	*out = g;
	return DW_OK;
}

int dw_qasm_parse_file(const char *path, dw_qasm_program **out, dw_error *err)
{
	*out = NULL;
	FILE *f = fopen(path, "rb");
	if (!f)
		return dw_fail(err, DW_EINPUT, "%s: cannot open: %s", path, strerror(errno));
	size_t cap = 1 << 16, n = 0;
	char *buf = malloc(cap);
	int st = DW_OK;
	while (buf) {
		n += fread(buf + n, 1, cap - n - 1, f);
		if (n < cap - 1)
			break;
		if (cap > ((size_t)1 << 31)) {
			st = dw_fail(err, DW_EINPUT, "%s: larger than 2 GiB", path);
			break;
		}
		char *b2 = realloc(buf, cap * 2);
		if (!b2) {
			free(buf);
			buf = NULL;
			break;
		}
		buf = b2;
		cap *= 2;
	}
	if (!buf)
		st = dw_fail(err, DW_EINTERNAL, "out of memory reading %s", path);
	else if (st == DW_OK && ferror(f))
		st = dw_fail(err, DW_EINPUT, "%s: read error", path);
	fclose(f);
	if (st == DW_OK && memchr(buf, '\0', n))
		st = dw_fail(err, DW_EINPUT, "%s: contains a NUL byte (not a text file)", path);
	if (st == DW_OK) {
		buf[n] = '\0';
		st = dw_qasm_parse_string(buf, path, out, err);
	}
	free(buf);
	return st;
}

int dw_qasm_num_qubits(const dw_qasm_program *g) { return g->nqubits; }
int dw_qasm_num_bits(const dw_qasm_program *g) { return g->nbits; }
size_t dw_qasm_num_qregs(const dw_qasm_program *g) { return g->nqregs; }
const dw_qasm_reg *dw_qasm_qreg(const dw_qasm_program *g, size_t i) { return &g->qregs[i]; }
size_t dw_qasm_num_cregs(const dw_qasm_program *g) { return g->ncregs; }
const dw_qasm_reg *dw_qasm_creg(const dw_qasm_program *g, size_t i) { return &g->cregs[i]; }
size_t dw_qasm_num_inputs(const dw_qasm_program *g) { return g->ninputs; }
const dw_qasm_input *dw_qasm_input_at(const dw_qasm_program *g, size_t i) { return &g->inputs[i]; }
