/* qasm_lex.c - split OpenQASM 3 text into tokens.
 * Takes: program text (UTF-8) and a name for messages.  Gives: an array of
 * qx_token (identifiers, integer and float literals, strings, punctuation)
 * with 1-based line and column (columns count characters, so "π" is one
 * column), ending with QT_EOF.  Comments (// and block) are dropped.
 * Errors: DW_EINPUT "FILE:LINE:COL: ...". */
#include <ctype.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "qasm_prog.h"

/* Punctuation, longest first so that "==" wins over "=". */
static const char *const punct[] = {
	"**", "==", "!=", "<=", ">=", "->", "&&", "||", "++", "+=", "-=",
	";", ",", "(", ")", "[", "]", "{", "}", "@", ":", "=", "+", "-", "*",
	"/", "<", ">", "!", "%", "&", "|", "^", "~", ".",
};

static int ident_start(unsigned char c)
{
	return isalpha(c) || c == '_' || c >= 0x80;
}

static int ident_char(unsigned char c)
{
	return isalnum(c) || c == '_' || c >= 0x80;
}

typedef struct lexer {
	const char *s, *file;
	size_t i;
	long line, col;
	qx_token *tok;
	size_t n, cap;
	dw_error *err;
} lexer;

/* Advance one byte, keeping line and column. */
static void step(lexer *L)
{
	unsigned char c = (unsigned char)L->s[L->i++];
	if (c == '\n') {
		L->line++;
		L->col = 1;
	} else if ((c & 0xC0) != 0x80) {
		L->col++;
	}
}

static void step_n(lexer *L, size_t n)
{
	while (n--)
		step(L);
}

static int push(lexer *L, qx_tok_kind kind, size_t start, long line, long col, double num)
{
	if (L->n == L->cap) {
		size_t cap = L->cap ? 2 * L->cap : 256;
		qx_token *t = realloc(L->tok, cap * sizeof *t);
		if (!t)
			return dw_fail(L->err, DW_EINTERNAL, "out of memory reading %s", L->file);
		L->tok = t;
		L->cap = cap;
	}
	L->tok[L->n++] = (qx_token){kind, L->s + start, L->i - start, line, col, num};
	return DW_OK;
}

static int fail(lexer *L, long line, long col, const char *what)
{
	return dw_fail(L->err, DW_EINPUT, "%s:%ld:%ld: %s", L->file, line, col, what);
}

/* number := digits ['.' digits] [exponent] | '.' digits [exponent] */
static int lex_number(lexer *L)
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
	return push(L, is_float ? QT_FLOAT : QT_INT, start, line, col, v);
}

int qx_lex(const char *text, const char *name, qx_token **tok, size_t *ntok,
	dw_error *err)
{
	lexer L = {text, name, 0, 1, 1, NULL, 0, 0, err};
	int st = DW_OK;
	/* A UTF-8 byte-order mark is skipped. */
	if (!strncmp(text, "\xEF\xBB\xBF", 3))
		L.i = 3;
	while (st == DW_OK) {
		unsigned char c = (unsigned char)text[L.i];
		if (c == '\0')
			break;
		if (c == ' ' || c == '\t' || c == '\r' || c == '\n' || c == '\f' || c == '\v') {
			step(&L);
			continue;
		}
		if (c == '/' && text[L.i + 1] == '/') {
			while (text[L.i] && text[L.i] != '\n')
				step(&L);
			continue;
		}
		if (c == '/' && text[L.i + 1] == '*') {
			long line = L.line, col = L.col;
			step_n(&L, 2);
			while (text[L.i] && !(text[L.i] == '*' && text[L.i + 1] == '/'))
				step(&L);
			if (!text[L.i]) {
				st = fail(&L, line, col, "unterminated comment (expected '*/')");
				break;
			}
			step_n(&L, 2);
			continue;
		}
		long line = L.line, col = L.col;
		size_t start = L.i;
		if (isdigit(c) || (c == '.' && isdigit((unsigned char)text[L.i + 1]))) {
			st = lex_number(&L);
		} else if (ident_start(c)) {
			while (ident_char((unsigned char)text[L.i]))
				step(&L);
			st = push(&L, QT_IDENT, start, line, col, 0);
		} else if (c == '"') {
			step(&L);
			while (text[L.i] && text[L.i] != '"' && text[L.i] != '\n')
				step(&L);
			if (text[L.i] != '"') {
				st = fail(&L, line, col, "unterminated string (expected '\"')");
				break;
			}
			step(&L);
			st = push(&L, QT_STRING, start, line, col, 0);
		} else {
			size_t k;
			for (k = 0; k < sizeof punct / sizeof punct[0]; k++) {
				size_t len = strlen(punct[k]);
				if (!strncmp(text + L.i, punct[k], len)) {
					step_n(&L, len);
					st = push(&L, QT_PUNCT, start, line, col, 0);
					break;
				}
			}
			if (k == sizeof punct / sizeof punct[0]) {
				char what[64];
				snprintf(what, sizeof what, "unexpected character '%c' (byte 0x%02x)",
					isprint(c) ? c : '?', c);
				st = fail(&L, line, col, what);
			}
		}
	}
	if (st == DW_OK) {
		st = push(&L, QT_EOF, L.i, L.line, L.col, 0);
		L.tok[L.n - 1].len = 0;
	}
	if (st != DW_OK) {
		free(L.tok);
		return st;
	}
	*tok = L.tok;
	*ntok = L.n;
	return DW_OK;
}
