/* qasm_lex.c - split OpenQASM 3 text into tokens.
 * Takes: program text (UTF-8) and a name for messages.  Gives: tokens one
 * at a time (qx_lex_next) or all at once (qx_lex): identifiers, integer
 * and float literals, strings, punctuation, with 1-based line and column
 * (columns count characters, so "π" is one column), ending with QT_EOF.
 * Comments (// and block) are dropped.  Errors: DW_EINPUT
 * "FILE:LINE:COL: ...".  The reader pulls tokens a statement at a time,
 * so a large flat program never sits in memory as a token array. */
#include <ctype.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "qasm_prog.h"

static int ident_start(unsigned char c)
{
	return isalpha(c) || c == '_' || c >= 0x80;
}

static int ident_char(unsigned char c)
{
	return isalnum(c) || c == '_' || c >= 0x80;
}

void qx_lexer_init(qx_lexer *L, const char *text, const char *name, dw_error *err)
{
	*L = (qx_lexer){text, name, 0, 1, 1, err};
	/* A UTF-8 byte-order mark is skipped. */
	if (!strncmp(text, "\xEF\xBB\xBF", 3))
		L->i = 3;
}

/* Advance one byte, keeping line and column (continuation bytes of a UTF-8
 * character do not start a column). */
static void step(qx_lexer *L)
{
	unsigned char c = (unsigned char)L->s[L->i++];
	if (c == '\n') {
		L->line++;
		L->col = 1;
	} else if ((c & 0xC0) != 0x80) {
		L->col++;
	}
}

static void step_n(qx_lexer *L, size_t n)
{
	while (n--)
		step(L);
}

static int fail(qx_lexer *L, long line, long col, const char *what)
{
	return dw_fail(L->err, DW_EINPUT, "%s:%ld:%ld: %s", L->file, line, col, what);
}

/* number := digits ['.' digits] [exponent] | '.' digits [exponent] */
static int lex_number(qx_lexer *L, qx_token *out)
{
	size_t start = L->i;
	long line = L->line, col = L->col;
	const char *s = L->s;
	size_t j = L->i;
	int is_float = 0;
	while (isdigit((unsigned char)s[j]))
		j++;
	if (s[j] == '.') {
		is_float = 1;
		j++;
		while (isdigit((unsigned char)s[j]))
			j++;
	}
	if (s[j] == 'e' || s[j] == 'E') {
		size_t k = j + 1;
		if (s[k] == '+' || s[k] == '-')
			k++;
		if (!isdigit((unsigned char)s[k]))
			return fail(L, line, col, "expected digits after the exponent of a number");
		while (isdigit((unsigned char)s[k]))
			k++;
		j = k;
		is_float = 1;
	}
	if (ident_char((unsigned char)s[j]))
		return fail(L, line, col,
			"expected a number (suffixes such as units or '_' separators are not read)");
	char buf[128];
	size_t len = j - start;
	if (len >= sizeof buf)
		return fail(L, line, col, "expected a number of at most 127 characters");
	memcpy(buf, s + start, len);
	buf[len] = '\0';
	errno = 0;
	double v = strtod(buf, NULL);
	if (errno == ERANGE && (v > 1.0 || v < -1.0))
		return fail(L, line, col, "number out of range of a double");
	if (!is_float && v > 9007199254740992.0)
		return fail(L, line, col, "integer larger than 2^53");
	step_n(L, len);
	*out = (qx_token){is_float ? QT_FLOAT : QT_INT, s + start, len, line, col, v};
	return DW_OK;
}

/* Two-character punctuation, then one-character. */
static const char punct2[][3] = {"**", "==", "!=", "<=", ">=", "->", "&&", "||", "++", "+=", "-="};
static const char punct1[] = ";,()[]{}@:=+-*/<>!%&|^~.";

int qx_lex_next(qx_lexer *L, qx_token *out)
{
	const char *text = L->s;
	for (;;) {
		unsigned char c = (unsigned char)text[L->i];
		if (c == '\0') {
			*out = (qx_token){QT_EOF, text + L->i, 0, L->line, L->col, 0};
			return DW_OK;
		}
		if (c == ' ' || c == '\t' || c == '\r' || c == '\n' || c == '\f' || c == '\v') {
			step(L);
			continue;
		}
		if (c == '/' && text[L->i + 1] == '/') {
			while (text[L->i] && text[L->i] != '\n')
				step(L);
			continue;
		}
		if (c == '/' && text[L->i + 1] == '*') {
			long line = L->line, col = L->col;
			step_n(L, 2);
			while (text[L->i] && !(text[L->i] == '*' && text[L->i + 1] == '/'))
				step(L);
			if (!text[L->i])
				return fail(L, line, col, "unterminated comment (expected '*/')");
			step_n(L, 2);
			continue;
		}
		long line = L->line, col = L->col;
		size_t start = L->i;
		if (isdigit(c) || (c == '.' && isdigit((unsigned char)text[L->i + 1])))
			return lex_number(L, out);
		if (ident_start(c)) {
			while (ident_char((unsigned char)text[L->i]))
				step(L);
			*out = (qx_token){QT_IDENT, text + start, L->i - start, line, col, 0};
			return DW_OK;
		}
		if (c == '"') {
			step(L);
			while (text[L->i] && text[L->i] != '"' && text[L->i] != '\n')
				step(L);
			if (text[L->i] != '"')
				return fail(L, line, col, "unterminated string (expected '\"')");
			step(L);
			*out = (qx_token){QT_STRING, text + start, L->i - start, line, col, 0};
			return DW_OK;
		}
		size_t len = 0;
		for (size_t k = 0; k < sizeof punct2 / sizeof punct2[0] && !len; k++)
			if (text[L->i] == punct2[k][0] && text[L->i + 1] == punct2[k][1])
				len = 2;
		if (!len && strchr(punct1, c))
			len = 1;
		if (!len) {
			char what[64];
			snprintf(what, sizeof what, "unexpected character '%c' (byte 0x%02x)",
				isprint(c) ? c : '?', c);
			return fail(L, line, col, what);
		}
		step_n(L, len);
		*out = (qx_token){QT_PUNCT, text + start, len, line, col, 0};
		return DW_OK;
	}
}

int qx_lex(const char *text, const char *name, qx_token **tok, size_t *ntok,
	dw_error *err)
{
	qx_lexer L;
	qx_lexer_init(&L, text, name, err);
	qx_token *t = NULL;
	size_t n = 0, cap = 0;
	for (;;) {
		if (n == cap) {
			cap = cap ? 2 * cap : 64;
			qx_token *b = realloc(t, cap * sizeof *t);
			if (!b) {
				free(t);
				return dw_fail(err, DW_EINTERNAL, "out of memory reading %s", name);
			}
			t = b;
		}
		int st = qx_lex_next(&L, &t[n]);
		if (st) {
			free(t);
			return st;
		}
		if (t[n++].kind == QT_EOF)
			break;
	}
	*tok = t;
	*ntok = n;
	return DW_OK;
}
