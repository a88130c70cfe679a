/* json_read.c - strict JSON reader (RFC 8259 grammar), see dwell/json.h.
 * Takes: JSON text.  Gives: a dw_json tree, or DW_EINPUT with
 * "FILE:LINE:COL: message" at the first offending byte.
 *
 * One recursive-descent pass over the bytes; the recursion depth is bounded
 * by DW_JSON_MAX_DEPTH, so hostile nesting cannot exhaust the stack. */
#include "dwell/json.h"

#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

typedef struct reader {
	const unsigned char *p, *end;
	const unsigned char *line_start;
	long line;
	const char *origin;
	int depth;
	dw_error *err;
} reader;

static long col_of(const reader *r, const unsigned char *at)
{
	return (long)(at - r->line_start) + 1;
}

__attribute__((format(printf, 3, 4)))
static int fail_at(reader *r, const unsigned char *at, const char *fmt, ...)
{
	char msg[700];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(msg, sizeof msg, fmt, ap);
	va_end(ap);
	return dw_fail(r->err, DW_EINPUT, "%s:%ld:%ld: %s", r->origin, r->line,
		col_of(r, at), msg);
}

/* Describe the byte at p for messages. */
static const char *what_is(const reader *r, const unsigned char *p, char buf[16])
{
	if (p >= r->end)
		return "end of input";
	if (*p >= 0x21 && *p < 0x7f)
		snprintf(buf, 16, "'%c'", *p);
	else
		snprintf(buf, 16, "byte 0x%02x", *p);
	return buf;
}

/* RFC 8259 section 2: ws = space, horizontal tab, line feed, carriage return. */
static void skip_ws(reader *r)
{
	while (r->p < r->end) {
		unsigned char c = *r->p;
		if (c == '\n') {
			r->line++;
			r->p++;
			r->line_start = r->p;
		} else if (c == ' ' || c == '\t' || c == '\r') {
			r->p++;
		} else {
			break;
		}
	}
}

/* Length of a valid UTF-8 sequence starting at p (RFC 3629: no overlong
 * forms, no surrogates, at most U+10FFFF), or 0 when invalid. */
static int utf8_len(const unsigned char *p, const unsigned char *end)
{
	unsigned char c = p[0];
	int n;
	unsigned long cp;
	if (c < 0x80)
		return 1;
	if (c >= 0xc2 && c <= 0xdf) {
		n = 2;
		cp = c & 0x1f;
	} else if (c >= 0xe0 && c <= 0xef) {
		n = 3;
		cp = c & 0x0f;
	} else if (c >= 0xf0 && c <= 0xf4) {
		n = 4;
		cp = c & 0x07;
	} else {
		return 0;
	}
	if (end - p < n)
		return 0;
	for (int i = 1; i < n; i++) {
		if ((p[i] & 0xc0) != 0x80)
			return 0;
		cp = (cp << 6) | (p[i] & 0x3f);
	}
	if ((n == 3 && cp < 0x800) || (n == 4 && cp < 0x10000) || cp > 0x10ffff
		|| (cp >= 0xd800 && cp <= 0xdfff))
		return 0;
	return n;
}

/* A growable byte buffer for decoded strings. */
typedef struct buf {
	char *data;
	size_t len, cap;
} buf;

static int buf_put(reader *r, buf *b, const void *bytes, size_t n)
{
	if (b->len + n + 1 > b->cap) {
		size_t cap = b->cap ? b->cap : 32;
		while (cap < b->len + n + 1)
			cap *= 2;
		char *d = realloc(b->data, cap);
		if (!d)
			return dw_fail(r->err, DW_EINTERNAL, "out of memory reading %s", r->origin);
		b->data = d;
		b->cap = cap;
	}
	memcpy(b->data + b->len, bytes, n);
	b->len += n;
	b->data[b->len] = '\0';
	return DW_OK;
}

static int put_code_point(reader *r, buf *b, unsigned long cp)
{
	unsigned char u[4];
	size_t n;
	if (cp < 0x80) {
		u[0] = (unsigned char)cp;
		n = 1;
	} else if (cp < 0x800) {
		u[0] = (unsigned char)(0xc0 | (cp >> 6));
		u[1] = (unsigned char)(0x80 | (cp & 0x3f));
		n = 2;
	} else if (cp < 0x10000) {
		u[0] = (unsigned char)(0xe0 | (cp >> 12));
		u[1] = (unsigned char)(0x80 | ((cp >> 6) & 0x3f));
		u[2] = (unsigned char)(0x80 | (cp & 0x3f));
		n = 3;
	} else {
		u[0] = (unsigned char)(0xf0 | (cp >> 18));
		u[1] = (unsigned char)(0x80 | ((cp >> 12) & 0x3f));
		u[2] = (unsigned char)(0x80 | ((cp >> 6) & 0x3f));
		u[3] = (unsigned char)(0x80 | (cp & 0x3f));
		n = 4;
	}
	return buf_put(r, b, u, n);
}

/* Four hex digits after "\u" at p; -1 when malformed. */
static long hex4(const reader *r, const unsigned char *p)
{
	long v = 0;
	if (r->end - p < 4)
		return -1;
	for (int i = 0; i < 4; i++) {
		int c = p[i], d;
		if (c >= '0' && c <= '9')
			d = c - '0';
		else if (c >= 'a' && c <= 'f')
			d = c - 'a' + 10;
		else if (c >= 'A' && c <= 'F')
			d = c - 'A' + 10;
		else
			return -1;
		v = v * 16 + d;
	}
	return v;
}

/* string = quotation-mark *char quotation-mark (RFC 8259 section 7).
 * r->p is at the opening quote.  Fills *out (malloc'd) and *out_len. */
static int read_string(reader *r, char **out, size_t *out_len)
{
	buf b = {0};
	const unsigned char *open = r->p++;
	for (;;) {
		if (r->p >= r->end) {
			free(b.data);
			return fail_at(r, open, "string not closed before the end of input");
		}
		const unsigned char *at = r->p;
		unsigned char c = *at;
		if (c == '"') {
			r->p++;
			break;
		}
		if (c < 0x20) {
			free(b.data);
			return fail_at(r, at, "control character 0x%02x in a string (write it as an escape)", c);
		}
		if (c == '\\') {
			if (r->end - at < 2) {
				free(b.data);
				return fail_at(r, at, "string not closed before the end of input");
			}
			unsigned char e = at[1];
			const char *simple = NULL;
			switch (e) {
			case '"': simple = "\""; break;
			case '\\': simple = "\\"; break;
			case '/': simple = "/"; break;
			case 'b': simple = "\b"; break;
			case 'f': simple = "\f"; break;
			case 'n': simple = "\n"; break;
			case 'r': simple = "\r"; break;
			case 't': simple = "\t"; break;
			case 'u': break;
			default: {
				char wb[16];
				free(b.data);
				return fail_at(r, at, "unknown escape '\\' followed by %s", what_is(r, at + 1, wb));
			}
			}
			if (simple) {
				if (buf_put(r, &b, simple, 1)) {
					free(b.data);
					return r->err->status;
				}
				r->p += 2;
				continue;
			}
			long cp = hex4(r, at + 2);
			if (cp < 0) {
				free(b.data);
				return fail_at(r, at, "\\u must be followed by four hex digits");
			}
			r->p = at + 6;
			if (cp >= 0xdc00 && cp <= 0xdfff) {
				free(b.data);
				return fail_at(r, at, "low surrogate \\u%04lX without a high surrogate before it", (unsigned long)cp);
			}
			if (cp >= 0xd800 && cp <= 0xdbff) {
				long lo = (r->end - r->p >= 2 && r->p[0] == '\\' && r->p[1] == 'u')
					? hex4(r, r->p + 2) : -1;
				if (lo < 0xdc00 || lo > 0xdfff) {
					free(b.data);
					return fail_at(r, at, "high surrogate \\u%04lX not followed by a low surrogate escape", (unsigned long)cp);
				}
				cp = 0x10000 + ((cp - 0xd800) << 10) + (lo - 0xdc00);
				r->p += 6;
			}
			if (put_code_point(r, &b, (unsigned long)cp)) {
				free(b.data);
				return r->err->status;
			}
			continue;
		}
		int n = utf8_len(at, r->end);
		if (n == 0) {
			free(b.data);
			return fail_at(r, at, "invalid UTF-8 byte 0x%02x in a string", c);
		}
		if (buf_put(r, &b, at, (size_t)n)) {
			free(b.data);
			return r->err->status;
		}
		r->p += n;
	}
	if (!b.data && buf_put(r, &b, "", 0))
		return r->err->status;
	*out = b.data;
	*out_len = b.len;
	return DW_OK;
}

static int is_digit(const reader *r, const unsigned char *p)
{
	return p < r->end && *p >= '0' && *p <= '9';
}

/* number = [ minus ] int [ frac ] [ exp ] (RFC 8259 section 6). */
static int read_number(reader *r, dw_json *v)
{
	const unsigned char *start = r->p, *p = r->p;
	int integral = 1, negative = 0;
	if (*p == '-') {
		negative = 1;
		p++;
	}
	if (!is_digit(r, p)) {
		char wb[16];
		return fail_at(r, p, "digit expected in a number, found %s", what_is(r, p, wb));
	}
	if (*p == '0' && is_digit(r, p + 1))
		return fail_at(r, p, "leading zeros are not allowed in a number");
	uint64_t mag = 0;
	int fits = 1;
	while (is_digit(r, p)) {
		unsigned d = (unsigned)(*p - '0');
		if (mag > (UINT64_MAX - d) / 10)
			fits = 0;
		else
			mag = mag * 10 + d;
		p++;
	}
	if (p < r->end && *p == '.') {
		integral = 0;
		p++;
		if (!is_digit(r, p))
			return fail_at(r, p, "digit expected after the decimal point");
		while (is_digit(r, p))
			p++;
	}
	if (p < r->end && (*p == 'e' || *p == 'E')) {
		integral = 0;
		p++;
		if (p < r->end && (*p == '+' || *p == '-'))
			p++;
		if (!is_digit(r, p))
			return fail_at(r, p, "digit expected in the exponent");
		while (is_digit(r, p))
			p++;
	}
	size_t len = (size_t)(p - start);
	v->str = malloc(len + 1);
	if (!v->str)
		return dw_fail(r->err, DW_EINTERNAL, "out of memory reading %s", r->origin);
	memcpy(v->str, start, len);
	v->str[len] = '\0';
	v->len = len;
	errno = 0;
	v->num = strtod(v->str, NULL);
	if (!isfinite(v->num))
		return fail_at(r, start, "number %s is beyond the range of a double", v->str);
	v->is_int = integral && fits;
	v->mag = v->is_int ? mag : 0;
	v->negative = v->is_int && negative && mag != 0;
	r->p = p;
	return DW_OK;
}

/* Match a literal name (true, false, null) at r->p. */
static int literal(reader *r, const char *word)
{
	size_t n = strlen(word);
	if ((size_t)(r->end - r->p) < n || memcmp(r->p, word, n) != 0)
		return 0;
	r->p += n;
	return 1;
}

static int read_value(reader *r, dw_json *v);

/* Append a zeroed child to v; returns it or NULL (error recorded). */
static dw_json *add_child(reader *r, dw_json *v, size_t *cap)
{
	if (v->n == *cap) {
		size_t ncap = *cap ? *cap * 2 : 4;
		if (ncap > SIZE_MAX / sizeof *v->item) {
			dw_fail(r->err, DW_EINTERNAL, "%s: too many members", r->origin);
			return NULL;
		}
		dw_json *items = realloc(v->item, ncap * sizeof *items);
		if (!items) {
			dw_fail(r->err, DW_EINTERNAL, "out of memory reading %s", r->origin);
			return NULL;
		}
		v->item = items;
		*cap = ncap;
	}
	dw_json *c = &v->item[v->n++];
	memset(c, 0, sizeof *c);
	return c;
}

static int key_order(const void *pa, const void *pb)
{
	const dw_json *a = *(const dw_json *const *)pa, *b = *(const dw_json *const *)pb;
	size_t n = a->key_len < b->key_len ? a->key_len : b->key_len;
	int c = memcmp(a->key, b->key, n);
	if (c)
		return c;
	if (a->key_len != b->key_len)
		return a->key_len < b->key_len ? -1 : 1;
	return a < b ? -1 : a > b; /* document order: later one second */
}

/* RFC 8259 section 4 says names SHOULD be unique; a ledger with two
 * values for one figure is ambiguous, so we refuse it. */
static int check_unique_keys(reader *r, const dw_json *obj)
{
	if (obj->n < 2)
		return DW_OK;
	const dw_json **sorted = malloc(obj->n * sizeof *sorted);
	if (!sorted)
		return dw_fail(r->err, DW_EINTERNAL, "out of memory reading %s", r->origin);
	for (size_t i = 0; i < obj->n; i++)
		sorted[i] = &obj->item[i];
	qsort(sorted, obj->n, sizeof *sorted, key_order);
	for (size_t i = 1; i < obj->n; i++) {
		const dw_json *a = sorted[i - 1], *b = sorted[i];
		if (a->key_len == b->key_len && !memcmp(a->key, b->key, a->key_len)) {
			dw_fail(r->err, DW_EINPUT, "%s:%ld:%ld: member \"%s\" appears twice "
				"(first at line %ld)", r->origin, b->line, b->col, b->key, a->line);
			break;
		}
	}
	free(sorted);
	return r->err->status;
}

/* object = begin-object [ member *( value-separator member ) ] end-object
 * array = begin-array [ value *( value-separator value ) ] end-array */
static int read_container(reader *r, dw_json *v, int is_object)
{
	const unsigned char close = is_object ? '}' : ']';
	size_t cap = 0;
	if (++r->depth > DW_JSON_MAX_DEPTH)
		return fail_at(r, r->p, "nesting deeper than %d levels", DW_JSON_MAX_DEPTH);
	r->p++;
	skip_ws(r);
	if (r->p < r->end && *r->p == close) {
		r->p++;
		r->depth--;
		return DW_OK;
	}
	for (;;) {
		char wb[16];
		dw_json *c = add_child(r, v, &cap);
		if (!c)
			return r->err->status;
		if (is_object) {
			if (r->p >= r->end || *r->p != '"')
				return fail_at(r, r->p, "member name (a string) expected, found %s",
					what_is(r, r->p, wb));
			long kline = r->line, kcol = col_of(r, r->p);
			if (read_string(r, &c->key, &c->key_len))
				return r->err->status;
			skip_ws(r);
			if (r->p >= r->end || *r->p != ':')
				return fail_at(r, r->p, "':' expected after the member name, found %s",
					what_is(r, r->p, wb));
			r->p++;
			skip_ws(r);
			if (read_value(r, c))
				return r->err->status;
			c->line = kline; /* a member is located at its name */
			c->col = kcol;
		} else if (read_value(r, c)) {
			return r->err->status;
		}
		skip_ws(r);
		if (r->p < r->end && *r->p == ',') {
			r->p++;
			skip_ws(r);
			if (r->p < r->end && *r->p == close)
				return fail_at(r, r->p, "trailing comma before '%c'", close);
			continue;
		}
		if (r->p < r->end && *r->p == close) {
			r->p++;
			break;
		}
		return fail_at(r, r->p, "',' or '%c' expected, found %s", close, what_is(r, r->p, wb));
	}
	r->depth--;
	return is_object ? check_unique_keys(r, v) : DW_OK;
}

/* value = false / null / true / object / array / number / string */
static int read_value(reader *r, dw_json *v)
{
	char wb[16];
	v->line = r->line;
	v->col = col_of(r, r->p);
	if (r->p >= r->end)
		return fail_at(r, r->p, "a value expected, found end of input");
	switch (*r->p) {
	case '{':
		v->kind = DW_JSON_OBJECT;
		return read_container(r, v, 1);
	case '[':
		v->kind = DW_JSON_ARRAY;
		return read_container(r, v, 0);
	case '"':
		v->kind = DW_JSON_STRING;
		return read_string(r, &v->str, &v->len);
	case 't': case 'f': case 'n':
		if (literal(r, "true")) {
			v->kind = DW_JSON_BOOL;
			v->boolean = 1;
			return DW_OK;
		}
		if (literal(r, "false")) {
			v->kind = DW_JSON_BOOL;
			return DW_OK;
		}
		if (literal(r, "null")) {
			v->kind = DW_JSON_NULL;
			return DW_OK;
		}
		break;
	default:
		if (*r->p == '-' || (*r->p >= '0' && *r->p <= '9')) {
			v->kind = DW_JSON_NUMBER;
			return read_number(r, v);
		}
	}
	return fail_at(r, r->p, "a value expected, found %s", what_is(r, r->p, wb));
}

static void free_children(dw_json *v)
{
	for (size_t i = 0; i < v->n; i++)
		free_children(&v->item[i]);
	free(v->item);
	free(v->key);
	free(v->str);
}

void dw_json_free(dw_json *v)
{
	if (!v)
		return;
	free_children(v);
	free(v);
}

int dw_json_parse_string(const char *text, size_t len, const char *origin,
	dw_json **out, dw_error *err)
{
	*out = NULL;
	reader r = {
		.p = (const unsigned char *)text, .end = (const unsigned char *)text + len,
		.line_start = (const unsigned char *)text, .line = 1,
		.origin = origin ? origin : "<json>", .err = err,
	};
	if (len >= 3 && !memcmp(text, "\xef\xbb\xbf", 3))
		r.p += 3; /* RFC 8259 section 8.1: a parser MAY ignore a BOM */
	dw_json *root = dw_alloc(err, 1, sizeof *root);
	if (!root)
		return err->status;
	skip_ws(&r);
	if (read_value(&r, root) == DW_OK) {
		skip_ws(&r);
		if (r.p < r.end) {
			char wb[16];
			fail_at(&r, r.p, "text after the end of the document (%s)", what_is(&r, r.p, wb));
		}
	}
	if (err->status != DW_OK) {
		dw_json_free(root);
		return err->status;
	}
	*out = root;
	return DW_OK;
}

int dw_json_parse_file(const char *path, dw_json **out, dw_error *err)
{
	*out = NULL;
	FILE *f = fopen(path, "rb");
	if (!f)
		return dw_fail(err, DW_EINPUT, "%s: cannot open: %s", path, strerror(errno));
	buf b = {0};
	size_t cap = 0;
	for (;;) {
		if (b.len == cap) {
			size_t ncap = cap ? cap * 2 : 65536;
			if (ncap > DW_JSON_MAX_BYTES + 1)
				ncap = DW_JSON_MAX_BYTES + 1;
			if (ncap == cap) {
				free(b.data);
				fclose(f);
				return dw_fail(err, DW_EINPUT, "%s: larger than %zu bytes", path,
					(size_t)DW_JSON_MAX_BYTES);
			}
			char *d = realloc(b.data, ncap);
			if (!d) {
				free(b.data);
				fclose(f);
				return dw_fail(err, DW_EINTERNAL, "out of memory reading %s", path);
			}
			b.data = d;
			cap = ncap;
		}
		size_t got = fread(b.data + b.len, 1, cap - b.len, f);
		b.len += got;
		if (got == 0)
			break;
	}
	int bad = ferror(f);
	fclose(f);
	if (bad) {
		free(b.data);
		return dw_fail(err, DW_EINPUT, "%s: read error", path);
	}
	int st = dw_json_parse_string(b.data ? b.data : "", b.len, path, out, err);
	free(b.data);
	return st;
}

const dw_json *dw_json_member(const dw_json *obj, const char *key)
{
	if (!obj || obj->kind != DW_JSON_OBJECT)
		return NULL;
	size_t n = strlen(key);
	for (size_t i = 0; i < obj->n; i++)
		if (obj->item[i].key_len == n && !memcmp(obj->item[i].key, key, n))
			return &obj->item[i];
	return NULL;
}

const dw_json *dw_json_path(const dw_json *root, const char *path)
{
	const dw_json *v = root;
	const char *seg = path;
	char name[256];
	while (v) {
		const char *dot = strchr(seg, '.');
		size_t n = dot ? (size_t)(dot - seg) : strlen(seg);
		if (n == 0 || n >= sizeof name)
			return NULL;
		memcpy(name, seg, n);
		name[n] = '\0';
		if (v->kind == DW_JSON_ARRAY) {
			char *endp;
			if (name[0] < '0' || name[0] > '9')
				return NULL;
			errno = 0;
			unsigned long long k = strtoull(name, &endp, 10);
			if (*endp || errno || k >= v->n)
				return NULL;
			v = &v->item[k];
		} else {
			v = dw_json_member(v, name);
		}
		if (!dot)
			return v;
		seg = dot + 1;
	}
	return NULL;
}

int dw_json_get_u64(const dw_json *v, uint64_t *out)
{
	if (!v || v->kind != DW_JSON_NUMBER || !v->is_int || v->negative)
		return DW_EINPUT;
	*out = v->mag;
	return DW_OK;
}

void dw_json_write_string(FILE *f, const char *s, size_t len)
{
	fputc('"', f);
	for (size_t i = 0; i < len; i++) {
		unsigned char c = (unsigned char)s[i];
		switch (c) {
		case '"': fputs("\\\"", f); break;
		case '\\': fputs("\\\\", f); break;
		case '\n': fputs("\\n", f); break;
		case '\r': fputs("\\r", f); break;
		case '\t': fputs("\\t", f); break;
		default:
			if (c < 0x20 || c == 0x7f)
				fprintf(f, "\\u%04x", c);
			else
				fputc(c, f);
		}
	}
	fputc('"', f);
}
