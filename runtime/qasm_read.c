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

int qx_expect(qx_parser *p, const char *s)
{
	if (!qx_is(qx_cur(p), s))
		return qx_error_at(p, qx_cur(p), "expected '%s'", s);
	p->pos++;
	return DW_OK;
}

char *qx_dup_tok(qx_parser *p, const qx_token *t)
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
int qx_grow(qx_parser *p, void **arr, size_t *cap, size_t n, size_t sz)
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

int qx_builtin_id(qx_parser *p, const qx_token *t)
{
	for (int i = 0; i < QB_COUNT; i++)
		if (qx_is(t, qx_builtins[i].name) && (i <= QB_GPHASE || p->have_stdgates))
			return i;
	return -1;
}

/* Declare name t as a new symbol; refuses reserved words and names that
 * are already declared in this scope. */
int qx_declare(qx_parser *p, const qx_token *t, int kind, int index, double value)
{
	if (t->kind != QT_IDENT)
		return qx_error_at(p, t, "expected a name");
	for (size_t i = 0; i < sizeof reserved / sizeof reserved[0]; i++)
		if (qx_is(t, reserved[i]))
			return qx_error_at(p, t, "expected a name that is not a reserved word");
	/* Parameters, qubit arguments and loop variables may reuse a gate's
	 * name (stdgates.inc itself names a qubit argument t). */
	if (kind != SY_SLOT && kind != SY_QARG && qx_builtin_id(p, t) >= 0)
		return qx_error_at(p, t, "expected a name that is not a built-in or standard gate");
	const qx_sym *old = qx_lookup(p, t->text, t->len);
	if (old && ((size_t)(old - p->sym) >= p->barrier || old->kind == SY_CONST
		|| old->kind == SY_GATE || old->kind == SY_DEF))
		return qx_error_at(p, t, "expected a new name ('%.*s' is already declared)",
			(int)t->len, t->text);
	int st = qx_grow(p, (void **)&p->sym, &p->capsym, p->nsym, sizeof *p->sym);
	if (st)
		return st;
	p->sym[p->nsym++] = (qx_sym){t->text, t->len, kind, index, value};
	return DW_OK;
}

/* A constant non-negative integer in [lo, hi]. */
int qx_const_int(qx_parser *p, long lo, long hi, const char *what, long *out)
{
	const qx_token *t = qx_cur(p);
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

void qx_free_block(qx_block *b);

void qx_free_stmt(qx_stmt *s)
{
	free(s->mods);
	free(s->params);
	free(s->ops);
	if (s->body) {
		qx_free_block(s->body);
		free(s->body);
	}
	if (s->orelse) {
		qx_free_block(s->orelse);
		free(s->orelse);
	}
}

void qx_free_block(qx_block *b)
{
	for (size_t i = 0; i < b->n; i++)
		qx_free_stmt(&b->s[i]);
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

int qx_append(qx_parser *p, qx_block *b, qx_stmt *s)
{
	s->mods = shrink(s->mods, (size_t)s->nmods, sizeof *s->mods);
	s->params = shrink(s->params, (size_t)s->nparams, sizeof *s->params);
	s->ops = shrink(s->ops, (size_t)s->nops, sizeof *s->ops);
	int st = qx_grow(p, (void **)&b->s, &b->cap, b->n, sizeof *b->s);
	if (st) {
		qx_free_stmt(s);
		return st;
	}
	b->s[b->n++] = *s;
	return DW_OK;
}

/* ---- statements ---- */

int qx_parse_statement(qx_parser *p, qx_block *b, int depth);

/* body := '{' statement* '}' | statement */
int qx_parse_body(qx_parser *p, qx_block **out, int depth)
{
	if (depth > QX_MAX_DEPTH)
		return qx_error_at(p, qx_cur(p), "expected at most %d nested blocks", QX_MAX_DEPTH);
	qx_block *b = calloc(1, sizeof *b);
	if (!b)
		return dw_fail(p->err, DW_EINTERNAL, "out of memory reading %s", p->file);
	*out = b;
	size_t mark = p->nsym;
	int st = DW_OK;
	if (qx_is(qx_cur(p), "{")) {
		p->pos++;
		while (st == DW_OK && !qx_is(qx_cur(p), "}")) {
			if (qx_cur(p)->kind == QT_EOF)
				st = qx_error_at(p, qx_cur(p), "expected '}'");
			else
				st = qx_parse_statement(p, b, depth + 1);
		}
		if (st == DW_OK)
			p->pos++;
	} else {
		st = qx_parse_statement(p, b, depth + 1);
	}
	p->nsym = mark;
	return st;
}

static int parse_gatecall(qx_parser *p, qx_block *b)
{
	const qx_token *start = qx_cur(p);
	qx_stmt s = {0};
	s.kind = QS_GATE;
	s.line = start->line;
	s.col = start->col;
	s.builtin = s.user = -1;
	size_t capmods = 0, capops = 0, cappar = 0;
	int ncontrols = 0, st = DW_OK;
	/* modifiers */
	for (;;) {
		const qx_token *t = qx_cur(p);
		qx_mod m = {0};
		m.expr = -1;
		m.count = 0;
		if (qx_is(t, "inv")) {
			m.kind = QM_INV;
			p->pos++;
		} else if (qx_is(t, "pow")) {
			m.kind = QM_POW;
			p->pos++;
			if ((st = qx_expect(p, "(")) || (st = qx_parse_expr(p, &m.expr)) || (st = qx_expect(p, ")")))
				goto fail;
		} else if (qx_is(t, "ctrl") || qx_is(t, "negctrl")) {
			m.kind = qx_is(t, "ctrl") ? QM_CTRL : QM_NEGCTRL;
			m.count = 1;
			p->pos++;
			if (qx_is(qx_cur(p), "(")) {
				long n;
				p->pos++;
				if ((st = qx_const_int(p, 1, QX_MAX_QUBITS, "a number of controls", &n))
					|| (st = qx_expect(p, ")")))
					goto fail;
				m.count = (int)n;
			}
			ncontrols += m.count;
		} else {
			break;
		}
		if ((st = qx_expect(p, "@")))
			goto fail;
		if ((st = qx_grow(p, (void **)&s.mods, &capmods, (size_t)s.nmods, sizeof *s.mods)))
			goto fail;
		s.mods[s.nmods++] = m;
	}
	/* gate name */
	const qx_token *name = qx_cur(p);
	int nparams, nqubits;
	if (name->kind != QT_IDENT) {
		st = qx_error_at(p, name, "expected a gate name");
		goto fail;
	}
	const qx_sym *sym = qx_lookup(p, name->text, name->len);
	if (p->def_name && name->len == p->def_name->len
		&& !memcmp(name->text, p->def_name->text, name->len)) {
		st = qx_error_at(p, name, "expected a call of a gate or def declared earlier ('%.*s' "
			"calls itself; recursion is not read)", (int)name->len, name->text);
		goto fail;
	}
	if (sym && sym->kind == SY_DEF) {
		st = s.nmods ? qx_error_at(p, name, "expected a gate after the modifiers ('%.*s' is a "
				"def; ctrl, negctrl, inv and pow apply to gates only)", (int)name->len, name->text)
			: qx_error_at(p, name, "expected a gate ('%.*s' is a def, and a gate body, being "
				"unitary, cannot call one)", (int)name->len, name->text);
		goto fail;
	}
	if (sym && sym->kind == SY_GATE) {
		s.user = sym->index;
		nparams = p->prog->gates[s.user].nparams;
		nqubits = p->prog->gates[s.user].nqubits;
	} else if ((s.builtin = qx_builtin_id(p, name)) >= 0) {
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
			: "expected a statement (a declaration, gate or def call, for, if, measure or reset)");
		goto fail;
	}
	p->pos++;
	/* parameters */
	if (qx_is(qx_cur(p), "(")) {
		p->pos++;
		while (!qx_is(qx_cur(p), ")")) {
			int e;
			if (s.nparams && (st = qx_expect(p, ",")))
				goto fail;
			if ((st = qx_parse_expr(p, &e)))
				goto fail;
			if ((st = qx_grow(p, (void **)&s.params, &cappar, (size_t)s.nparams, sizeof *s.params)))
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
	while (!qx_is(qx_cur(p), ";")) {
		qx_operand o;
		if (s.nops && (st = qx_expect(p, ",")))
			goto fail;
		if ((st = qx_parse_qubit(p, &o)) || (st = qx_push_operand(p, &s, &capops, &o)))
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
	return qx_append(p, b, &s);
fail:
	qx_free_stmt(&s);
	return st;
}

/* for [int|uint [ '[' n ']' ]] name in '[' a ':' [step ':'] b ']' body */
static int parse_for(qx_parser *p, qx_block *b, int depth)
{
	qx_stmt s = {0};
	const qx_token *t = qx_cur(p);
	s.kind = QS_FOR;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	p->pos++;
	int st = DW_OK;
	if (qx_is(qx_cur(p), "int") || qx_is(qx_cur(p), "uint")) {
		p->pos++;
		if (qx_is(qx_cur(p), "[")) {
			long w;
			p->pos++;
			if ((st = qx_const_int(p, 1, 64, "an integer width", &w)) || (st = qx_expect(p, "]")))
				return st;
		}
	}
	const qx_token *var = qx_cur(p);
	if (var->kind != QT_IDENT)
		return qx_error_at(p, var, "expected a loop variable name");
	p->pos++;
	if ((st = qx_expect(p, "in")))
		return st;
	if (qx_is(qx_cur(p), "{"))
		return qx_error_at(p, qx_cur(p), "expected '[' (loops over sets are not read; use a range "
			"[a:b] or [a:step:b])");
	if ((st = qx_expect(p, "[")) || (st = qx_parse_expr(p, &s.start)) || (st = qx_expect(p, ":"))
		|| (st = qx_parse_expr(p, &s.stop)))
		return st;
	s.step = -1;
	if (qx_is(qx_cur(p), ":")) {
		p->pos++;
		s.step = s.stop;
		if ((st = qx_parse_expr(p, &s.stop)))
			return st;
	}
	if ((st = qx_expect(p, "]")))
		return st;
	size_t mark = p->nsym;
	s.slot = (*p->nslots)++;
	if ((st = qx_declare(p, var, SY_SLOT, s.slot, 0)))
		return st;
	st = qx_parse_body(p, &s.body, depth);
	p->nsym = mark;
	if (st) {
		qx_free_stmt(&s);
		return st;
	}
	return qx_append(p, b, &s);
}

/* if '(' bit-operand [('==' | '!=') expr] ')' body ['else' body] ; also '!' bits */
static int parse_if(qx_parser *p, qx_block *b, int depth)
{
	qx_stmt s = {0};
	const qx_token *t = qx_cur(p);
	s.kind = QS_IF;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	size_t capops = 0;
	p->pos++;
	int st = qx_expect(p, "(");
	if (st)
		return st;
	int negate = 0;
	if (qx_is(qx_cur(p), "!")) {
		negate = 1;
		p->pos++;
	}
	qx_operand o;
	if ((st = qx_parse_bit(p, &o)) || (st = qx_push_operand(p, &s, &capops, &o)))
		goto fail;
	if (!negate && (qx_is(qx_cur(p), "==") || qx_is(qx_cur(p), "!="))) {
		s.cond_not = qx_is(qx_cur(p), "!=");
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
	if ((st = qx_expect(p, ")")) || (st = qx_parse_body(p, &s.body, depth)))
		goto fail;
	if (qx_is(qx_cur(p), "else")) {
		p->pos++;
		if ((st = qx_parse_body(p, &s.orelse, depth)))
			goto fail;
	}
	return qx_append(p, b, &s);
fail:
	qx_free_stmt(&s);
	return st;
}

/* measure q -> c ;  c = measure q ;  measure q ; */
static int parse_measure(qx_parser *p, qx_block *b, int assign)
{
	qx_stmt s = {0};
	const qx_token *t = qx_cur(p);
	s.kind = QS_MEASURE;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	size_t capops = 0;
	qx_operand q, c;
	int st, have_bit = 0;
	if (assign) {
		if ((st = qx_parse_bit(p, &c)) || (st = qx_expect(p, "=")) || (st = qx_expect(p, "measure")))
			return st;
		have_bit = 1;
	} else {
		p->pos++;
	}
	if ((st = qx_parse_qubit(p, &q)))
		return st;
	if (!assign && qx_is(qx_cur(p), "->")) {
		p->pos++;
		if ((st = qx_parse_bit(p, &c)))
			return st;
		have_bit = 1;
	}
	if ((st = qx_expect(p, ";")))
		return st;
	/* a register of one (`bit m;`, `qubit a;`) pairs with a single qubit or bit */
	const dw_qasm_reg *qr = q.kind == QO_REG ? qx_operand_reg(p, &q, 1) : NULL;
	const dw_qasm_reg *cr = have_bit && c.kind == QO_REG ? qx_operand_reg(p, &c, 0) : NULL;
	if (have_bit && (((qr ? qr->size : 1) != 1 && !cr) || ((cr ? cr->size : 1) != 1 && !qr)))
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected a single qubit with a single "
			"bit, or a register with a bit register", p->file, t->line, t->col);
	if (qr && cr && qr->size != cr->size)
		return dw_fail(p->err, DW_EINPUT, "%s:%ld:%ld: expected registers of equal size "
			"('%s' has %d qubits, '%s' %d bits)", p->file, t->line, t->col,
			qr->name, qr->size, cr->name, cr->size);
	if ((st = qx_push_operand(p, &s, &capops, &q)) || (have_bit && (st = qx_push_operand(p, &s, &capops, &c)))) {
		qx_free_stmt(&s);
		return st;
	}
	return qx_append(p, b, &s);
}

static int parse_reset(qx_parser *p, qx_block *b)
{
	qx_stmt s = {0};
	const qx_token *t = qx_cur(p);
	s.kind = QS_RESET;
	s.line = t->line;
	s.col = t->col;
	s.builtin = s.user = -1;
	size_t capops = 0;
	qx_operand q;
	p->pos++;
	int st = qx_parse_qubit(p, &q);
	if (st == DW_OK)
		st = qx_expect(p, ";");
	if (st == DW_OK)
		st = qx_push_operand(p, &s, &capops, &q);
	if (st) {
		qx_free_stmt(&s);
		return st;
	}
	return qx_append(p, b, &s);
}

/* barrier [operands] ;  -- no effect on a simulation, read and dropped */
static int parse_barrier(qx_parser *p)
{
	p->pos++;
	int n = 0;
	while (!qx_is(qx_cur(p), ";")) {
		qx_operand o;
		int st;
		if (n++ && (st = qx_expect(p, ",")))
			return st;
		if ((st = qx_parse_qubit(p, &o)))
			return st;
	}
	p->pos++;
	return DW_OK;
}


static int top_level_only(qx_parser *p, int depth)
{
	if (depth > 0 || p->in_gate || p->in_def)
		return qx_error_at(p, qx_cur(p), "expected a gate or def call, for, if, measure or "
			"reset (declarations other than a def's local bits are read only at the top "
			"level)");
	return DW_OK;
}

int qx_parse_statement(qx_parser *p, qx_block *b, int depth)
{
	const qx_token *t = qx_cur(p);
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
		const qx_token *f = qx_cur(p);
		if (f->kind != QT_STRING || f->len != 14 || memcmp(f->text, "\"stdgates.inc\"", 14))
			return qx_error_at(p, f, "expected \"stdgates.inc\" (the only include file read)");
		p->pos++;
		p->have_stdgates = 1;
		return qx_expect(p, ";");
	}
	if (p->in_def && (qx_is(t, "qubit") || qx_is(t, "qreg")))
		return qx_error_at(p, t, "expected a statement of the def body (qubits are global "
			"and cannot be declared in a def; pass them as arguments)");
	if (p->in_def && (qx_is(t, "bit") || qx_is(t, "creg")))
		return qx_parse_local_bits(p, b, qx_is(t, "creg"));
	if (qx_is(t, "qubit") || qx_is(t, "qreg") || qx_is(t, "bit") || qx_is(t, "creg")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return qx_parse_register(p, qx_is(t, "qubit") || qx_is(t, "qreg"),
			qx_is(t, "qreg") || qx_is(t, "creg"));
	}
	if (qx_is(t, "output")) {
		if ((st = top_level_only(p, depth)))
			return st;
		p->pos++;
		if (!qx_is(qx_cur(p), "bit"))
			return qx_error_at(p, qx_cur(p), "expected 'bit' after 'output'");
		return qx_parse_register(p, 0, 0);
	}
	if (qx_is(t, "input")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return qx_parse_input(p);
	}
	if (qx_is(t, "const")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return qx_parse_const_decl(p);
	}
	if (qx_is(t, "gate")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return qx_parse_gatedef(p);
	}
	if (qx_is(t, "def")) {
		if ((st = top_level_only(p, depth)))
			return st;
		return qx_parse_def(p);
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
		if (s && (s->kind == SY_CREG || s->kind == SY_LCREG))
			return parse_measure(p, b, 1);
		if (s && s->kind == SY_DEF)
			return qx_parse_defcall(p, b);
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
	for (size_t i = 0; i < g->ngates; i++)
		qx_free_gatedef(&g->gates[i]);
	free(g->qregs);
	free(g->cregs);
	free(g->inputs);
	free(g->gates);
	qx_free_block(&g->main);
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
	if (st == DW_OK && qx_is(qx_cur(&p), "OPENQASM")) {
		const qx_token *v = &p.tok[++p.pos];
		if ((v->kind != QT_INT && v->kind != QT_FLOAT) || v->num < 3 || v->num >= 4)
			st = qx_error_at(&p, v, "expected version 3 or 3.x (OpenQASM 2 programs are not "
				"read: their U and gate library differ)");
		else {
			p.pos++;
			st = qx_expect(&p, ";");
		}
	}
	while (st == DW_OK && (st = refill(&p)) == DW_OK && qx_cur(&p)->kind != QT_EOF)
		st = qx_parse_statement(&p, &g->main, 0);
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
