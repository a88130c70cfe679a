/* mtx.c - Matrix Market (NIST exchange format) parser.
 *
 * Takes: a .mtx path.  Gives: the stored entries as a triplet list
 * (mtx_triplets.h), which mtx_compress.c turns into a dw_csr or a dense
 * vector; also the public entry points of include/dwell/mtx.h.
 *
 * Accepted: line 1 "%%MatrixMarket matrix FORMAT FIELD SYMMETRY" (tokens
 * case-insensitive), then comment lines (first non-blank character '%') and
 * blank lines anywhere, one size line ("ROWS COLS ENTRIES" for coordinate,
 * "ROWS COLS" for array), then one entry per line: "i j [re [im]]" with
 * 1-based indices, or "re [im]" in column-major order for array files (the
 * symmetric kinds store the lower triangle column by column, skew-symmetric
 * without the diagonal).  Every departure is a DW_EINPUT "FILE:LINE:
 * message" saying what was expected and what was found.
 *
 * Speed: the file is read in large blocks and split into lines in place;
 * numbers go through strtoll/strtod directly on the block, so memory is the
 * block plus the entries (no copy of the text). */
#include "dwell/mtx.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

#include "front/mtx_triplets.h"

#define MTX_HEADER_FORM "%%MatrixMarket matrix FORMAT FIELD SYMMETRY"
#define MTX_BLOCK_BYTES ((size_t)1 << 20)
#define MTX_MAX_LINE_BYTES ((size_t)1 << 30)
/* Dimensions above this are refused: rows + 1 and 2 * entries must fit. */
#define MTX_MAX_DIMENSION ((int64_t)1 << 62)
#define MTX_QUOTE_CHARS 40

/* ---- block line reader ---------------------------------------------- */

typedef struct line_reader {
	FILE *file;
	const char *path;
	char *buf;
	size_t capacity;          /* bytes allocated */
	size_t start, end;        /* unread bytes are buf[start, end) */
	bool at_eof;
	long line;                /* number of the line last returned */
	int64_t file_bytes;       /* size of a regular file, else -1 */
	bool saw_nul;             /* a NUL byte was read: check each line */
} line_reader;

/* Next line, NUL-terminated, newline (and a trailing '\r') removed.
 * Returns 1 with *text set, 0 at end of file, or an error status. */
static int next_line(line_reader *r, char **text, dw_error *err)
{
	for (;;) {
		char *begin = r->buf + r->start;
		char *newline = memchr(begin, '\n', r->end - r->start);
		size_t len;
		if (newline) {
			*newline = '\0';
			len = (size_t)(newline - begin);
			r->start = (size_t)(newline - r->buf) + 1;
		} else if (r->at_eof) {
			if (r->start == r->end)
				return 0;
			len = r->end - r->start;
			r->buf[r->end] = '\0';   /* capacity keeps one spare byte */
			r->start = r->end;
		} else {
			/* Move the partial line to the front and read another block. */
			size_t keep = r->end - r->start;
			if (r->start > 0)
				memmove(r->buf, begin, keep);
			r->start = 0;
			r->end = keep;
			if (r->end + 1 >= r->capacity) {
				if (r->capacity >= MTX_MAX_LINE_BYTES)
					return dw_fail_at(err, DW_EINPUT, r->path, r->line + 1,
						"line is longer than %zu bytes; expected one entry per line",
						MTX_MAX_LINE_BYTES);
				char *grown = realloc(r->buf, r->capacity * 2);
				if (!grown)
					return dw_fail(err, DW_EINTERNAL,
						"out of memory reading %s", r->path);
				r->buf = grown;
				r->capacity *= 2;
			}
			size_t got = fread(r->buf + r->end, 1, r->capacity - 1 - r->end, r->file);
			if (memchr(r->buf + r->end, '\0', got))
				r->saw_nul = true;
			r->end += got;
			if (got == 0) {
				if (ferror(r->file))
					return dw_fail_at(err, DW_EINPUT, r->path, r->line + 1,
						"read error: %s", strerror(errno));
				r->at_eof = true;
			}
			continue;
		}
		r->line++;
		if (len > 0 && begin[len - 1] == '\r')
			begin[--len] = '\0';
		if (r->saw_nul && strlen(begin) != len)
			return dw_fail_at(err, DW_EINPUT, r->path, r->line,
				"expected text, found a NUL byte (binary file?)");
		*text = begin;
		return 1;
	}
}

/* ---- tokens ----------------------------------------------------------- */

static bool is_blank_char(char c)
{
	return c == ' ' || c == '\t' || c == '\r' || c == '\v' || c == '\f';
}

static char *skip_blanks(char *s)
{
	while (is_blank_char(*s))
		s++;
	return s;
}

static char *token_end(char *s)
{
	while (*s && !is_blank_char(*s))
		s++;
	return s;
}

/* Copy the token at s into out for a message ("end of line" when none),
 * shortened to MTX_QUOTE_CHARS, non-printing bytes shown as '?'. */
static const char *quote_token(const char *s, char *out, size_t size)
{
	while (is_blank_char(*s))
		s++;
	if (!*s) {
		snprintf(out, size, "end of line");
		return out;
	}
	size_t n = 0;
	out[n++] = '\'';
	size_t taken = 0;
	while (s[taken] && !is_blank_char(s[taken]) && taken < MTX_QUOTE_CHARS && n + 5 < size) {
		unsigned char c = (unsigned char)s[taken++];
		out[n++] = isprint(c) ? (char)c : '?';
	}
	if (s[taken] && !is_blank_char(s[taken]) && n + 4 < size) {
		memcpy(out + n, "...", 3);
		n += 3;
	}
	out[n++] = '\'';
	out[n] = '\0';
	return out;
}

/* A comment or blank line: skipped everywhere after the header. */
static bool is_skippable(const char *text)
{
	while (is_blank_char(*text))
		text++;
	return *text == '\0' || *text == '%';
}

/* ---- header ------------------------------------------------------------ */

typedef struct keyword {
	const char *name;
	int value;
} keyword;

static const keyword format_words[] = {
	{"coordinate", MTX_COORDINATE}, {"array", MTX_ARRAY}, {NULL, 0}};
static const keyword field_words[] = {
	{"real", MTX_REAL}, {"integer", MTX_INTEGER}, {"complex", MTX_COMPLEX},
	{"pattern", MTX_PATTERN}, {NULL, 0}};
static const keyword symmetry_words[] = {
	{"general", MTX_GENERAL}, {"symmetric", MTX_SYMMETRIC},
	{"skew-symmetric", MTX_SKEW}, {"hermitian", MTX_HERMITIAN}, {NULL, 0}};

static const char *field_name(int v) { return field_words[v].name; }
static const char *symmetry_name(int v) { return symmetry_words[v].name; }

/* Match the token [s, end) against words; -1 when none. */
static int match_keyword(const keyword *words, const char *s, const char *end)
{
	size_t len = (size_t)(end - s);
	for (int i = 0; words[i].name; i++)
		if (strlen(words[i].name) == len && !strncasecmp(words[i].name, s, len))
			return words[i].value;
	return -1;
}

static int parse_header(line_reader *r, char *text, mtx_want want,
	mtx_triplets *t, dw_error *err)
{
	static const char *const what[] = {
		"'%%MatrixMarket'", "object 'matrix'",
		"format 'coordinate' or 'array'",
		"field 'real', 'integer', 'complex' or 'pattern'",
		"symmetry 'general', 'symmetric', 'skew-symmetric' or 'hermitian'"};
	char shown[64];
	char *s = text;
	int values[5] = {0, 0, 0, 0, 0};
	for (int k = 0; k < 5; k++) {
		s = skip_blanks(s);
		char *end = token_end(s);
		int v = 0;
		if (k == 0) {
			static const char banner[] = "%%MatrixMarket";
			v = (size_t)(end - s) == strlen(banner) && !strncasecmp(s, banner, strlen(banner)) ? 0 : -1;
			if (v < 0)
				return dw_fail_at(err, DW_EINPUT, r->path, r->line,
					"expected the header line '%s', found %s",
					MTX_HEADER_FORM, quote_token(s, shown, sizeof shown));
		} else if (k == 1) {
			v = (size_t)(end - s) == 6 && !strncasecmp(s, "matrix", 6) ? 0 : -1;
		} else {
			v = match_keyword(k == 2 ? format_words : k == 3 ? field_words
				: symmetry_words, s, end);
		}
		if (v < 0)
			return dw_fail_at(err, DW_EINPUT, r->path, r->line,
				"header: expected %s, found %s", what[k],
				quote_token(s, shown, sizeof shown));
		values[k] = v;
		s = end;
	}
	s = skip_blanks(s);
	if (*s)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"header: expected end of line after the symmetry, found %s",
			quote_token(s, shown, sizeof shown));
	t->format = (mtx_format)values[2];
	t->field = (mtx_field)values[3];
	t->symmetry = (mtx_symmetry)values[4];

	/* Combinations that make no sense (NIST report; mmio validity check). */
	if (t->format == MTX_ARRAY && t->field == MTX_PATTERN)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"header: field 'pattern' needs format 'coordinate', found 'array'");
	if (t->symmetry == MTX_HERMITIAN && t->field != MTX_COMPLEX)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"header: symmetry 'hermitian' needs field 'complex', found '%s'",
			field_name(t->field));
	if (t->symmetry == MTX_SKEW && t->field == MTX_PATTERN)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"header: symmetry 'skew-symmetric' needs values, found field 'pattern'");
	if (want == MTX_WANT_VECTOR && t->field == MTX_PATTERN)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"header: a vector needs field 'real', 'integer' or 'complex', found 'pattern'");
	return DW_OK;
}

/* ---- numbers -------------------------------------------------------------- */

/* A decimal integer token ([+-]digits, then a blank or the end): returns 1
 * and *out, 0 when the token is not an integer, -1 when it overflows 64
 * bits.  *end is left after the digits. */
static int scan_int64(char *s, int64_t *out, char **end)
{
	char *p = s;
	bool negative = false;
	if (*p == '+' || *p == '-')
		negative = *p++ == '-';
	char *digits = p;
	uint64_t v = 0;
	bool overflow = false;
	while (*p >= '0' && *p <= '9') {
		unsigned d = (unsigned)(*p++ - '0');
		if (v > (UINT64_MAX - d) / 10)
			overflow = true;
		else
			v = v * 10 + d;
	}
	*end = p;
	if (p == digits || (*p && !is_blank_char(*p)))
		return 0;
	if (overflow || v > (negative ? (uint64_t)INT64_MAX + 1 : (uint64_t)INT64_MAX))
		return -1;
	*out = negative ? -(int64_t)(v - 1) - 1 : (int64_t)v;
	return 1;
}

/* One integer token in [low, high]; `what` names it in messages. */
static int parse_count(line_reader *r, char **cursor, const char *what,
	int64_t low, int64_t high, int64_t *out, dw_error *err)
{
	char shown[64];
	char *s = skip_blanks(*cursor);
	char *end;
	int64_t v = 0;
	int scanned = scan_int64(s, &v, &end);
	if (scanned == 0)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected %s (an integer from %lld to %lld), found %s", what,
			(long long)low, (long long)high, quote_token(s, shown, sizeof shown));
	if (scanned < 0 || v < low || v > high)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"%s %s is out of range (expected %lld to %lld)", what,
			quote_token(s, shown, sizeof shown), (long long)low, (long long)high);
	*out = v;
	*cursor = end;
	return DW_OK;
}

/* Clinger's fast path ("How to Read Floating Point Numbers Accurately",
 * PLDI 1990): a decimal whose significant digits form an integer m <= 2^53
 * and whose power of ten e has |e| <= 22 is m * 10^e (or m / 10^-e) in one
 * correctly rounded IEEE operation, which is the value strtod returns.
 * Returns false, leaving the token to strtod, in every other case
 * (more digits, large exponents, "nan", "inf", junk after the number). */
static bool fast_decimal(const char *s, double *out, char **end)
{
	static const double power_of_ten[23] = {
		1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
		1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
	const char *p = s;
	bool negative = false;
	if (*p == '+' || *p == '-')
		negative = *p++ == '-';
	uint64_t m = 0;
	int significant = 0, exp10 = 0;
	bool any_digit = false, after_point = false;
	for (;; p++) {
		if (*p == '.' && !after_point) {
			after_point = true;
			continue;
		}
		if (*p < '0' || *p > '9')
			break;
		any_digit = true;
		unsigned d = (unsigned)(*p - '0');
		if (m == 0 && d == 0) {          /* leading zero */
			exp10 -= after_point;
			continue;
		}
		if (++significant > 19)
			return false;
		m = m * 10 + d;
		exp10 -= after_point;
	}
	if (!any_digit)
		return false;
	if (*p == 'e' || *p == 'E') {
		p++;
		bool exp_negative = false;
		if (*p == '+' || *p == '-')
			exp_negative = *p++ == '-';
		if (*p < '0' || *p > '9')
			return false;
		int e = 0;
		for (; *p >= '0' && *p <= '9'; p++) {
			if (e > 10000)
				return false;
			e = e * 10 + (*p - '0');
		}
		exp10 += exp_negative ? -e : e;
	}
	if (*p && !is_blank_char(*p))
		return false;
	double v;
	if (m == 0)
		v = 0.0;
	else if (m > ((uint64_t)1 << 53) || exp10 < -22 || exp10 > 22)
		return false;
	else if (exp10 >= 0)
		v = (double)m * power_of_ten[exp10];
	else
		v = (double)m / power_of_ten[-exp10];
	*out = negative ? -v : v;
	*end = (char *)p;
	return true;
}

static bool is_hex_float(const char *s)
{
	if (*s == '+' || *s == '-')
		s++;
	return s[0] == '0' && (s[1] == 'x' || s[1] == 'X');
}

/* One finite decimal value; integer fields take whole numbers only. */
static int parse_value(line_reader *r, char **cursor, const char *what,
	bool integer, double *out, dw_error *err)
{
	char shown[64];
	char *s = skip_blanks(*cursor);
	char *end;
	double v;
	if (integer) {
		int64_t i = 0;
		int scanned = scan_int64(s, &i, &end);
		if (scanned < 0)
			return dw_fail_at(err, DW_EINPUT, r->path, r->line,
				"%s %s does not fit in a 64-bit integer", what,
				quote_token(s, shown, sizeof shown));
		if (scanned == 0)
			end = s;
		v = (double)i;
	} else {
		if (!fast_decimal(s, &v, &end))
			v = is_hex_float(s) ? (end = s, 0.0) : strtod(s, &end);
	}
	if (end == s || (*end && !is_blank_char(*end)))
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected %s (%s), found %s", what,
			integer ? "an integer" : "a decimal number",
			quote_token(s, shown, sizeof shown));
	if (!isfinite(v))
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected a finite %s, found %s", what,
			quote_token(s, shown, sizeof shown));
	*out = v;
	*cursor = end;
	return DW_OK;
}

static int expect_line_end(line_reader *r, char *s, const char *layout,
	dw_error *err)
{
	char shown[64];
	s = skip_blanks(s);
	if (*s)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected end of line after '%s', found %s", layout,
			quote_token(s, shown, sizeof shown));
	return DW_OK;
}

/* ---- triplet storage -------------------------------------------------------- */

void mtx_triplets_free(mtx_triplets *t)
{
	free(t->row);
	free(t->col);
	free(t->re);
	free(t->im);
	t->row = t->col = NULL;
	t->re = t->im = NULL;
	t->count = t->capacity = 0;
}

/* Room for one more entry.  The first allocation is `first` entries (what
 * the file's size can hold at most); capacity then doubles up to
 * `limit` (the declared count), so a lying size line cannot make us
 * allocate ahead of the text. */
static int reserve_entry(mtx_triplets *t, int64_t limit, int64_t first,
	dw_error *err)
{
	if (t->count < t->capacity)
		return DW_OK;
	int64_t grown = t->capacity == 0 ? first
		: t->capacity > limit / 2 ? limit : t->capacity * 2;
	if (grown > limit)
		grown = limit;
	if (grown <= t->count)
		return dw_fail(err, DW_EINTERNAL, "internal: entry storage full");
	size_t n = (size_t)grown;
	if (n > SIZE_MAX / sizeof(int64_t))
		return dw_fail(err, DW_EINTERNAL, "out of memory for %lld entries",
			(long long)grown);
	int64_t *row = realloc(t->row, n * sizeof *row);
	if (row)
		t->row = row;
	int64_t *col = realloc(t->col, n * sizeof *col);
	if (col)
		t->col = col;
	double *re = realloc(t->re, n * sizeof *re);
	if (re)
		t->re = re;
	double *im = NULL;
	if (t->field == MTX_COMPLEX) {
		im = realloc(t->im, n * sizeof *im);
		if (im)
			t->im = im;
	}
	if (!row || !col || !re || (t->field == MTX_COMPLEX && !im))
		return dw_fail(err, DW_EINTERNAL, "out of memory for %lld entries of %s",
			(long long)grown, t->path);
	t->capacity = grown;
	return DW_OK;
}

/* ---- body ----------------------------------------------------------------- */

static int parse_size_line(line_reader *r, char *text, mtx_want want,
	mtx_triplets *t, int64_t *entries, dw_error *err)
{
	char *s = text;
	int64_t rows, cols;
	int st;
	if ((st = parse_count(r, &s, "row count", 1, MTX_MAX_DIMENSION, &rows, err)) ||
	    (st = parse_count(r, &s, "column count", 1, MTX_MAX_DIMENSION, &cols, err)))
		return st;
	if (t->format == MTX_COORDINATE) {
		if ((st = parse_count(r, &s, "entry count", 0, MTX_MAX_DIMENSION, entries, err)) ||
		    (st = expect_line_end(r, s, "ROWS COLUMNS ENTRIES", err)))
			return st;
	} else if ((st = expect_line_end(r, s, "ROWS COLUMNS", err))) {
		return st;
	}
	t->rows = rows;
	t->cols = cols;
	if (t->symmetry != MTX_GENERAL && rows != cols)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"symmetry '%s' needs a square matrix, found %lld x %lld",
			symmetry_name(t->symmetry), (long long)rows, (long long)cols);
	if (want == MTX_WANT_MATRIX && rows != cols)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected a square matrix, found %lld x %lld",
			(long long)rows, (long long)cols);
	if (want == MTX_WANT_VECTOR && cols != 1)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected a vector (one column), found %lld x %lld",
			(long long)rows, (long long)cols);
	if (t->format == MTX_ARRAY) {
		/* Stored values: all, the lower triangle, or below the diagonal. */
		int overflow = 0;
		uint64_t n = (uint64_t)rows;
		uint64_t stored;
		if (t->symmetry == MTX_GENERAL)
			stored = dw_mul_sat(n, (uint64_t)cols, &overflow);
		else if (t->symmetry == MTX_SKEW)
			stored = n % 2 ? dw_mul_sat(n, (n - 1) / 2, &overflow)
				: dw_mul_sat(n / 2, n - 1, &overflow);
		else
			stored = n % 2 ? dw_mul_sat(n, (n + 1) / 2, &overflow)
				: dw_mul_sat(n / 2, n + 1, &overflow);
		if (overflow || stored > (uint64_t)MTX_MAX_DIMENSION)
			return dw_fail_at(err, DW_EINPUT, r->path, r->line,
				"array of %lld x %lld has too many values to store",
				(long long)rows, (long long)cols);
		*entries = (int64_t)stored;
	}
	return DW_OK;
}

/* Position of the next array value, column-major over the stored part. */
typedef struct array_cursor {
	int64_t row, col;
} array_cursor;

static void array_cursor_start(const mtx_triplets *t, array_cursor *c)
{
	c->col = 0;
	c->row = t->symmetry == MTX_SKEW ? 1 : 0;
}

static void array_cursor_advance(const mtx_triplets *t, array_cursor *c)
{
	if (++c->row < t->rows)
		return;
	c->col++;
	c->row = t->symmetry == MTX_GENERAL ? 0
		: t->symmetry == MTX_SKEW ? c->col + 1 : c->col;
}

static int parse_entry(line_reader *r, char *text, mtx_triplets *t,
	array_cursor *pos, int64_t declared, int64_t first, dw_error *err)
{
	static const char *const layouts[2][4] = {
		{"i j value", "i j value", "i j real imaginary", "i j"},
		{"value", "value", "real imaginary", "value"}};
	const char *layout = layouts[t->format][t->field];
	char *s = text;
	int64_t i, j;
	int st;
	if (t->format == MTX_COORDINATE) {
		if ((st = parse_count(r, &s, "row index", 1, t->rows, &i, err)) ||
		    (st = parse_count(r, &s, "column index", 1, t->cols, &j, err)))
			return st;
		i--;
		j--;
	} else {
		i = pos->row;
		j = pos->col;
		array_cursor_advance(t, pos);
	}
	double re = 1.0, im = 0.0;
	bool integer = t->field == MTX_INTEGER;
	if (t->field == MTX_COMPLEX) {
		if ((st = parse_value(r, &s, "real part", false, &re, err)) ||
		    (st = parse_value(r, &s, "imaginary part", false, &im, err)))
			return st;
	} else if (t->field != MTX_PATTERN) {
		if ((st = parse_value(r, &s, "value", integer, &re, err)))
			return st;
	}
	if ((st = expect_line_end(r, s, layout, err)))
		return st;

	if (t->format == MTX_COORDINATE && t->symmetry != MTX_GENERAL) {
		if (i < j)
			return dw_fail_at(err, DW_EINPUT, r->path, r->line,
				"expected an entry on or below the diagonal (row >= column) "
				"in a '%s' file, found (%lld, %lld)", symmetry_name(t->symmetry),
				(long long)i + 1, (long long)j + 1);
		if (t->symmetry == MTX_SKEW && i == j)
			return dw_fail_at(err, DW_EINPUT, r->path, r->line,
				"expected an entry below the diagonal in a 'skew-symmetric' "
				"file (its diagonal is zero), found (%lld, %lld)",
				(long long)i + 1, (long long)j + 1);
	}
	if (t->symmetry == MTX_HERMITIAN && i == j && im != 0.0)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected a real diagonal entry in a 'hermitian' file, found "
			"imaginary part %.17g at (%lld, %lld)", im,
			(long long)i + 1, (long long)j + 1);
	/* Array storage is dense: its zeros are not entries. */
	if (t->format == MTX_ARRAY && re == 0.0 && im == 0.0)
		return DW_OK;
	if ((st = reserve_entry(t, declared, first, err)))
		return st;
	t->row[t->count] = i;
	t->col[t->count] = j;
	t->re[t->count] = re;
	if (t->im)
		t->im[t->count] = im;
	t->count++;
	return DW_OK;
}

static int read_all(line_reader *r, mtx_want want, mtx_triplets *t, dw_error *err)
{
	char *text;
	int got = next_line(r, &text, err);
	if (got < 0 || got > 1)
		return got;
	if (got == 0)
		return dw_fail_at(err, DW_EINPUT, r->path, 1,
			"expected the header line '%s', found an empty file", MTX_HEADER_FORM);
	int st = parse_header(r, text, want, t, err);
	if (st)
		return st;

	/* Size line: the first line that is neither comment nor blank. */
	while ((got = next_line(r, &text, err)) == 1 && is_skippable(text))
		;
	if (got != 1 && got != 0)
		return got;
	if (got == 0)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line,
			"expected the size line '%s', found end of file",
			t->format == MTX_COORDINATE ? "ROWS COLUMNS ENTRIES" : "ROWS COLUMNS");
	int64_t declared = 0;
	long size_line = r->line;
	if ((st = parse_size_line(r, text, want, t, &declared, err)))
		return st;

	/* The shortest entry line is "1\n" (array) or "1 1\n" (pattern), plus
	 * two bytes per value field: so the text bounds the entry count. */
	int64_t first = 4096;
	if (r->file_bytes > 0) {
		int64_t shortest = (t->format == MTX_COORDINATE ? 4 : 0)
			+ (t->field == MTX_PATTERN ? 0 : t->field == MTX_COMPLEX ? 4 : 2);
		first = r->file_bytes / shortest + 1;
	}
	if (first > declared)
		first = declared;
	array_cursor pos;
	array_cursor_start(t, &pos);
	int64_t seen = 0;
	while ((got = next_line(r, &text, err)) == 1) {
		if (is_skippable(text))
			continue;
		if (seen == declared) {
			char shown[64];
			return dw_fail_at(err, DW_EINPUT, r->path, r->line,
				"expected %lld entries (size line %ld), found one more: %s",
				(long long)declared, size_line,
				quote_token(text, shown, sizeof shown));
		}
		if ((st = parse_entry(r, text, t, &pos, declared, first, err)))
			return st;
		seen++;
	}
	if (got != 0)
		return got;
	if (seen < declared)
		return dw_fail_at(err, DW_EINPUT, r->path, r->line > 0 ? r->line : 1,
			"expected %lld entries (size line %ld), found %lld before end of file",
			(long long)declared, size_line, (long long)seen);
	return DW_OK;
}

int mtx_read_triplets(const char *path, mtx_want want, mtx_triplets *t,
	dw_error *err)
{
	memset(t, 0, sizeof *t);
	t->path = path;
	FILE *f = fopen(path, "rb");
	if (!f)
		return dw_fail_at(err, DW_EINPUT, path, 0, "cannot open: %s",
			strerror(errno));
	line_reader r = {.file = f, .path = path, .capacity = MTX_BLOCK_BYTES,
		.file_bytes = -1};
	struct stat info;
	if (fstat(fileno(f), &info) == 0 && S_ISREG(info.st_mode))
		r.file_bytes = (int64_t)info.st_size;
	r.buf = malloc(r.capacity);
	int st;
	if (!r.buf)
		st = dw_fail(err, DW_EINTERNAL, "out of memory reading %s", path);
	else
		st = read_all(&r, want, t, err);
	free(r.buf);
	fclose(f);
	if (st)
		mtx_triplets_free(t);
	return st;
}

/* ---- public entry points --------------------------------------------------- */

int dw_mtx_read_matrix(const char *path, FILE *notices, dw_csr **out, dw_error *err)
{
	*out = NULL;
	mtx_triplets t;
	int st = mtx_read_triplets(path, MTX_WANT_MATRIX, &t, err);
	if (st)
		return st;
	return mtx_compress(&t, notices, out, err);
}

int dw_mtx_read_vector_noting(const char *path, FILE *notices,
	double complex **out, int64_t *len, dw_error *err)
{
	*out = NULL;
	*len = 0;
	mtx_triplets t;
	int st = mtx_read_triplets(path, MTX_WANT_VECTOR, &t, err);
	if (st)
		return st;
	return mtx_densify_vector(&t, notices, out, len, err);
}

int dw_mtx_read_vector(const char *path, double complex **out, int64_t *len,
	dw_error *err)
{
	return dw_mtx_read_vector_noting(path, NULL, out, len, err);
}
