/* yaml_doc.c - build a YAML document tree from libyaml events, apply
 * "key.path=value" overrides to it, and read typed values from it (see
 * yaml_doc.h).
 * Takes: YAML text (file or string).  Gives: dw_ynode trees; typed values or
 * DW_EINPUT errors "ORIGIN:LINE: key.path: message". */
#include "front/yaml_doc.h"

#include <errno.h>
#include <inttypes.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <yaml.h>

/* Deeper nesting than this is refused (keeps freeing recursion bounded). */
#define YDOC_MAX_DEPTH 64

static dw_ynode *node_new(dw_ykind kind, long line, const char *origin, dw_error *err)
{
	dw_ynode *n = dw_alloc(err, 1, sizeof *n);
	if (!n)
		return NULL;
	n->kind = kind;
	n->line = line;
	n->origin = origin;
	return n;
}

dw_ynode *dw_ynode_new_map(long line, const char *origin, dw_error *err)
{
	return node_new(DW_Y_MAP, line, origin, err);
}

dw_ynode *dw_ynode_new_scalar(const char *text, long line, const char *origin,
	dw_error *err)
{
	dw_ynode *n = node_new(DW_Y_SCALAR, line, origin, err);
	if (!n)
		return NULL;
	size_t len = strlen(text);
	n->text = dw_alloc(err, len + 1, 1);
	if (!n->text) {
		free(n);
		return NULL;
	}
	memcpy(n->text, text, len);
	n->plain = true;
	return n;
}

void dw_ynode_free(dw_ynode *n)
{
	if (!n)
		return;
	for (size_t i = 0; i < n->len; i++) {
		if (n->item)
			dw_ynode_free(n->item[i]);
		if (n->key)
			dw_ynode_free(n->key[i]);
	}
	free(n->item);
	free(n->key);
	free(n->text);
	free(n);
}

/* Make room for one more child (and key, for mappings). */
static int node_grow(dw_ynode *n, dw_error *err)
{
	if (n->len < n->cap)
		return DW_OK;
	size_t cap = n->cap ? n->cap * 2 : 4;
	if (cap > SIZE_MAX / sizeof(dw_ynode *) / 2)
		return dw_fail(err, DW_EINTERNAL, "YAML node too large");
	dw_ynode **item = realloc(n->item, cap * sizeof *item);
	if (!item)
		return dw_fail(err, DW_EINTERNAL, "out of memory reading YAML");
	n->item = item;
	if (n->kind == DW_Y_MAP) {
		dw_ynode **key = realloc(n->key, cap * sizeof *key);
		if (!key)
			return dw_fail(err, DW_EINTERNAL, "out of memory reading YAML");
		n->key = key;
	}
	n->cap = cap;
	return DW_OK;
}

dw_ynode *dw_ymap_get(const dw_ynode *map, const char *key, size_t *index)
{
	if (!map || map->kind != DW_Y_MAP)
		return NULL;
	for (size_t i = 0; i < map->len; i++)
		if (map->key[i] && !strcmp(map->key[i]->text, key)) {
			if (index)
				*index = i;
			return map->item[i];
		}
	return NULL;
}

int dw_ymap_put(dw_ynode *map, dw_ynode *key, dw_ynode *value, dw_error *err)
{
	size_t i;
	if (dw_ymap_get(map, key->text, &i)) {
		dw_ynode_free(map->item[i]);
		map->item[i] = value;
		dw_ynode_free(key);
		return DW_OK;
	}
	if (node_grow(map, err)) {
		dw_ynode_free(key);
		dw_ynode_free(value);
		return err->status;
	}
	map->key[map->len] = key;
	map->item[map->len] = value;
	map->len++;
	return DW_OK;
}

void dw_ymap_remove(dw_ynode *map, const char *key)
{
	if (!map || map->kind != DW_Y_MAP)
		return;
	for (size_t i = 0; i < map->len; i++) {
		if (strcmp(map->key[i]->text, key))
			continue;
		dw_ynode_free(map->key[i]);
		dw_ynode_free(map->item[i]);
		size_t rest = map->len - i - 1;
		memmove(map->key + i, map->key + i + 1, rest * sizeof *map->key);
		memmove(map->item + i, map->item + i + 1, rest * sizeof *map->item);
		map->len--;
		return;
	}
}

bool dw_ynode_is_null(const dw_ynode *n)
{
	if (!n)
		return true;
	if (n->kind != DW_Y_SCALAR || !n->plain)
		return false;
	const char *t = n->text;
	return !*t || !strcmp(t, "~") || !strcmp(t, "null") || !strcmp(t, "Null")
		|| !strcmp(t, "NULL");
}

/* ---- building from libyaml events ---- */

typedef struct builder {
	const char *origin;
	bool zero_lines;          /* override text: every node gets line 0 */
	dw_ynode *root;
	dw_ynode *stack[YDOC_MAX_DEPTH];
	int depth;
	int documents;
	dw_error *err;
} builder;

static long event_line(const builder *b, const yaml_event_t *ev)
{
	return b->zero_lines ? 0 : (long)ev->start_mark.line + 1;
}

/* Key path of the open collections plus `last`, e.g. "schedule.seed". */
static void open_path(const builder *b, char *buf, size_t size, const char *last)
{
	buf[0] = '\0';
	for (int d = 0; d + 1 < b->depth; d++) {
		const dw_ynode *c = b->stack[d];
		char part[300];
		if (c->kind == DW_Y_MAP && c->len)
			dw_ypath_key(part, sizeof part, buf, c->key[c->len - 1]->text);
		else if (c->kind == DW_Y_SEQ && c->len)
			dw_ypath_index(part, sizeof part, buf, c->len - 1);
		else
			continue;
		snprintf(buf, size, "%s", part);
	}
	char part[300];
	dw_ypath_key(part, sizeof part, buf, last);
	snprintf(buf, size, "%s", part);
}

/* Attach a new node to the open collection (or make it the root). */
static int attach(builder *b, dw_ynode *n)
{
	if (b->depth == 0) {
		b->root = n;
		return DW_OK;
	}
	dw_ynode *top = b->stack[b->depth - 1];
	if (top->kind == DW_Y_SEQ) {
		if (node_grow(top, b->err)) {
			dw_ynode_free(n);
			return b->err->status;
		}
		top->item[top->len++] = n;
		return DW_OK;
	}
	/* mapping: a key when the last pair is complete, else the value */
	if (top->len == 0 || top->item[top->len - 1]) {
		if (n->kind != DW_Y_SCALAR) {
			dw_yerr(b->err, n, NULL, "mapping keys must be scalars, got %s",
				n->kind == DW_Y_MAP ? "a mapping" : "a sequence");
			dw_ynode_free(n);
			return b->err->status;
		}
		for (size_t i = 0; i < top->len; i++)
			if (!strcmp(top->key[i]->text, n->text)) {
				char path[300];
				open_path(b, path, sizeof path, n->text);
				dw_yerr(b->err, n, path, "duplicate key (first at line %ld)",
					top->key[i]->line);
				dw_ynode_free(n);
				return b->err->status;
			}
		if (node_grow(top, b->err)) {
			dw_ynode_free(n);
			return b->err->status;
		}
		top->key[top->len] = n;
		top->item[top->len] = NULL;
		top->len++;
		return DW_OK;
	}
	top->item[top->len - 1] = n;
	return DW_OK;
}

static int on_event(builder *b, yaml_event_t *ev)
{
	dw_ynode *n;
	switch (ev->type) {
	case YAML_DOCUMENT_START_EVENT:
		if (++b->documents > 1) {
			long line = event_line(b, ev);
			return dw_fail_at(b->err, DW_EINPUT, b->origin, line,
				"only one YAML document is allowed");
		}
		return DW_OK;
	case YAML_ALIAS_EVENT:
		return dw_fail_at(b->err, DW_EINPUT, b->origin, event_line(b, ev),
			"YAML aliases (*%s) are not supported; write the value out",
			(const char *)ev->data.alias.anchor);
	case YAML_SCALAR_EVENT:
		if (strlen((const char *)ev->data.scalar.value) != ev->data.scalar.length)
			return dw_fail_at(b->err, DW_EINPUT, b->origin, event_line(b, ev),
				"scalar contains a NUL character");
		n = dw_ynode_new_scalar((const char *)ev->data.scalar.value,
			event_line(b, ev), b->origin, b->err);
		if (!n)
			return b->err->status;
		n->plain = ev->data.scalar.style == YAML_PLAIN_SCALAR_STYLE;
		return attach(b, n);
	case YAML_SEQUENCE_START_EVENT:
	case YAML_MAPPING_START_EVENT:
		if (b->depth >= YDOC_MAX_DEPTH)
			return dw_fail_at(b->err, DW_EINPUT, b->origin, event_line(b, ev),
				"YAML nested deeper than %d levels", YDOC_MAX_DEPTH);
		n = node_new(ev->type == YAML_MAPPING_START_EVENT ? DW_Y_MAP : DW_Y_SEQ,
			event_line(b, ev), b->origin, b->err);
		if (!n || attach(b, n))
			return b->err->status;
		b->stack[b->depth++] = n;
		return DW_OK;
	case YAML_SEQUENCE_END_EVENT:
	case YAML_MAPPING_END_EVENT:
		b->depth--;
		return DW_OK;
	default:
		return DW_OK;
	}
}

static dw_ynode *build(yaml_parser_t *parser, builder *b)
{
	bool done = false;
	while (!done) {
		yaml_event_t ev;
		if (!yaml_parser_parse(parser, &ev)) {
			long line = b->zero_lines ? 0 : (long)parser->problem_mark.line + 1;
			if (parser->context)
				dw_fail_at(b->err, DW_EINPUT, b->origin, line,
					"YAML syntax: %s %s", parser->problem, parser->context);
			else
				dw_fail_at(b->err, DW_EINPUT, b->origin, line, "YAML syntax: %s",
					parser->problem ? parser->problem : "unreadable input");
			break;
		}
		done = ev.type == YAML_STREAM_END_EVENT;
		int rc = on_event(b, &ev);
		yaml_event_delete(&ev);
		if (rc)
			break;
	}
	if (b->err->status != DW_OK) {
		dw_ynode_free(b->root);
		return NULL;
	}
	if (!b->root) {
		b->root = b->zero_lines
			? dw_ynode_new_scalar("", 0, b->origin, b->err)
			: dw_ynode_new_map(1, b->origin, b->err);
	}
	return b->root;
}

dw_ynode *dw_yaml_parse_file(const char *path, const char *origin, dw_error *err)
{
	FILE *f = fopen(path, "rb");
	if (!f) {
		dw_fail_at(err, DW_EINPUT, origin, 0, "cannot open: %s", strerror(errno));
		return NULL;
	}
	yaml_parser_t parser;
	if (!yaml_parser_initialize(&parser)) {
		fclose(f);
		dw_fail(err, DW_EINTERNAL, "cannot initialise the YAML parser");
		return NULL;
	}
	yaml_parser_set_input_file(&parser, f);
	builder b = {.origin = origin, .err = err};
	dw_ynode *root = build(&parser, &b);
	yaml_parser_delete(&parser);
	if (ferror(f) && root) {
		dw_ynode_free(root);
		root = NULL;
		dw_fail_at(err, DW_EINPUT, origin, 0, "read error");
	}
	fclose(f);
	return root;
}

dw_ynode *dw_yaml_parse_text(const char *text, const char *origin, dw_error *err)
{
	yaml_parser_t parser;
	if (!yaml_parser_initialize(&parser)) {
		dw_fail(err, DW_EINTERNAL, "cannot initialise the YAML parser");
		return NULL;
	}
	yaml_parser_set_input_string(&parser, (const unsigned char *)text, strlen(text));
	builder b = {.origin = origin, .zero_lines = true, .err = err};
	dw_ynode *root = build(&parser, &b);
	yaml_parser_delete(&parser);
	return root;
}

/* ---- typed readers ---- */

int dw_yerr(dw_error *err, const dw_ynode *n, const char *path, const char *fmt, ...)
{
	char msg[768];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(msg, sizeof msg, fmt, ap);
	va_end(ap);
	const char *origin = n && n->origin ? n->origin : "<input>";
	long line = n ? n->line : 0;
	if (path && *path)
		return dw_fail_at(err, DW_EINPUT, origin, line, "%s: %s", path, msg);
	return dw_fail_at(err, DW_EINPUT, origin, line, "%s", msg);
}

void dw_ydescribe(const dw_ynode *n, char *buf, size_t size)
{
	if (dw_ynode_is_null(n))
		snprintf(buf, size, "nothing");
	else if (n->kind == DW_Y_MAP)
		snprintf(buf, size, "a mapping");
	else if (n->kind == DW_Y_SEQ)
		snprintf(buf, size, "a sequence");
	else if (strlen(n->text) > 60)
		snprintf(buf, size, "'%.57s...'", n->text);
	else
		snprintf(buf, size, "'%s'", n->text);
}

void dw_ypath_key(char *buf, size_t size, const char *parent, const char *key)
{
	if (parent && *parent)
		snprintf(buf, size, "%s.%s", parent, key);
	else
		snprintf(buf, size, "%s", key);
}

void dw_ypath_index(char *buf, size_t size, const char *parent, size_t i)
{
	snprintf(buf, size, "%s[%zu]", parent ? parent : "", i);
}

int dw_yexpect_map(const dw_ynode *n, const char *path, dw_error *err)
{
	if (n && n->kind == DW_Y_MAP)
		return DW_OK;
	char got[80];
	dw_ydescribe(n, got, sizeof got);
	return dw_yerr(err, n, path, "expected a mapping of keys, got %s", got);
}

int dw_yexpect_seq(const dw_ynode *n, const char *path, dw_error *err)
{
	if (n && n->kind == DW_Y_SEQ)
		return DW_OK;
	char got[80];
	dw_ydescribe(n, got, sizeof got);
	return dw_yerr(err, n, path, "expected a list, got %s", got);
}

int dw_ycheck_keys(const dw_ynode *map, const char *path,
	const char *const *allowed, dw_error *err)
{
	for (size_t i = 0; i < map->len; i++) {
		const char *k = map->key[i]->text;
		bool ok = false;
		for (size_t a = 0; allowed[a] && !ok; a++)
			ok = !strcmp(k, allowed[a]);
		if (ok)
			continue;
		char known[400] = "";
		size_t used = 0;
		for (size_t a = 0; allowed[a]; a++) {
			int w = snprintf(known + used, sizeof known - used, "%s%s",
				a ? ", " : "", allowed[a]);
			if (w < 0 || (size_t)w >= sizeof known - used)
				break;
			used += (size_t)w;
		}
		char full[300];
		dw_ypath_key(full, sizeof full, path, k);
		return dw_yerr(err, map->key[i], full, "unknown key (known here: %s)", known);
	}
	return DW_OK;
}

/* Scalar text for a number: plain style required. */
static int number_text(const dw_ynode *n, const char *path, const char *what,
	const char **text, dw_error *err)
{
	char got[80];
	if (!n || n->kind != DW_Y_SCALAR || dw_ynode_is_null(n)) {
		dw_ydescribe(n, got, sizeof got);
		return dw_yerr(err, n, path, "expected %s, got %s", what, got);
	}
	if (!n->plain) {
		dw_ydescribe(n, got, sizeof got);
		return dw_yerr(err, n, path, "expected %s, got the quoted string %s",
			what, got);
	}
	*text = n->text;
	return DW_OK;
}

int dw_yget_real(const dw_ynode *n, const char *path, double *out, dw_error *err)
{
	const char *t;
	if (number_text(n, path, "a number", &t, err))
		return err->status;
	const char *s = t;
	if (*s == '+' || *s == '-')
		s++;
	if (!strcmp(s, ".nan") || !strcmp(s, ".NaN") || !strcmp(s, ".NAN")
			|| !strcmp(s, ".inf") || !strcmp(s, ".Inf") || !strcmp(s, ".INF"))
		return dw_yerr(err, n, path, "expected a finite number, got '%s'", t);
	/* digits, one point, an exponent: nothing strtod would read as hex,
	 * inf or nan */
	bool digit = false;
	for (const char *c = s; *c; c++) {
		if (*c >= '0' && *c <= '9')
			digit = true;
		else if (!strchr(".eE+-", *c))
			return dw_yerr(err, n, path, "expected a number, got '%s'", t);
	}
	if (!digit)
		return dw_yerr(err, n, path, "expected a number, got '%s'", t);
	char *end;
	errno = 0;
	double v = strtod(t, &end);
	if (*end || end == t)
		return dw_yerr(err, n, path, "expected a number, got '%s'", t);
	if (!isfinite(v) || (errno == ERANGE && fabs(v) > 1.0))
		return dw_yerr(err, n, path, "number '%s' is out of range", t);
	*out = v;
	return DW_OK;
}

/* Sign and decimal digits only. */
static bool is_decimal(const char *t, bool allow_minus)
{
	if (*t == '+' || (allow_minus && *t == '-'))
		t++;
	if (!*t)
		return false;
	for (; *t; t++)
		if (*t < '0' || *t > '9')
			return false;
	return true;
}

int dw_yget_int(const dw_ynode *n, const char *path, int64_t lo, int64_t hi,
	const char *what, int64_t *out, dw_error *err)
{
	const char *t;
	if (number_text(n, path, what, &t, err))
		return err->status;
	if (!is_decimal(t, true))
		return dw_yerr(err, n, path, "expected %s, got '%s'", what, t);
	char *end;
	errno = 0;
	long long v = strtoll(t, &end, 10);
	if (*end || errno == ERANGE || v < lo || v > hi)
		return dw_yerr(err, n, path, "expected %s (%" PRId64 "..%" PRId64
			"), got '%s'", what, lo, hi, t);
	*out = (int64_t)v;
	return DW_OK;
}

int dw_yget_uint64(const dw_ynode *n, const char *path, uint64_t *out, dw_error *err)
{
	const char *what = "a non-negative integer";
	const char *t;
	if (number_text(n, path, what, &t, err))
		return err->status;
	if (!is_decimal(t, false))
		return dw_yerr(err, n, path, "expected %s, got '%s'", what, t);
	char *end;
	errno = 0;
	unsigned long long v = strtoull(t, &end, 10);
	if (*end || errno == ERANGE || v > UINT64_MAX)
		return dw_yerr(err, n, path, "expected %s below 2^64, got '%s'", what, t);
	*out = (uint64_t)v;
	return DW_OK;
}

int dw_yget_bool(const dw_ynode *n, const char *path, bool *out, dw_error *err)
{
	const char *t;
	if (number_text(n, path, "true or false", &t, err))
		return err->status;
	if (!strcmp(t, "true") || !strcmp(t, "True") || !strcmp(t, "TRUE"))
		*out = true;
	else if (!strcmp(t, "false") || !strcmp(t, "False") || !strcmp(t, "FALSE"))
		*out = false;
	else
		return dw_yerr(err, n, path, "expected true or false, got '%s'", t);
	return DW_OK;
}

int dw_yget_string(const dw_ynode *n, const char *path, char **out, dw_error *err)
{
	if (!n || n->kind != DW_Y_SCALAR || dw_ynode_is_null(n)) {
		char got[80];
		dw_ydescribe(n, got, sizeof got);
		return dw_yerr(err, n, path, "expected a text value, got %s", got);
	}
	size_t len = strlen(n->text);
	char *s = dw_alloc(err, len + 1, 1);
	if (!s)
		return err->status;
	memcpy(s, n->text, len + 1);
	*out = s;
	return DW_OK;
}

int dw_yget_enum(const dw_ynode *n, const char *path, const char *const *names,
	int *out, dw_error *err)
{
	if (n && n->kind == DW_Y_SCALAR)
		for (int i = 0; names[i]; i++)
			if (!strcmp(n->text, names[i])) {
				*out = i;
				return DW_OK;
			}
	char list[300] = "";
	size_t used = 0;
	for (int i = 0; names[i]; i++) {
		int w = snprintf(list + used, sizeof list - used, "%s%s",
			!names[i + 1] && i ? " or " : i ? ", " : "", names[i]);
		if (w < 0 || (size_t)w >= sizeof list - used)
			break;
		used += (size_t)w;
	}
	char got[80];
	dw_ydescribe(n, got, sizeof got);
	return dw_yerr(err, n, path, "expected %s, got %s", list, got);
}

bool dw_yis_auto(const dw_ynode *n)
{
	return n && n->kind == DW_Y_SCALAR && !strcmp(n->text, "auto");
}

/* ---- overrides ---- */

/* Setting one key of an exclusive group removes the others. */
static void drop_other_alternatives(dw_ynode *map, const dw_ygroup *groups,
	const char *section, const char *chosen)
{
	const char *const *alts = NULL;
	for (size_t g = 0; groups && groups[g].section; g++)
		if (!strcmp(groups[g].section, section))
			alts = groups[g].keys;
	bool member = false;
	for (int a = 0; alts && alts[a]; a++)
		member = member || !strcmp(alts[a], chosen);
	for (int a = 0; member && alts[a]; a++)
		if (strcmp(alts[a], chosen))
			dw_ymap_remove(map, alts[a]);
}

int dw_yaml_override(dw_ynode *root, const char *set, const char *label,
	const dw_ygroup *groups, dw_error *err)
{
	const char *eq = strchr(set, '=');
	if (!eq || eq == set)
		return dw_fail_at(err, DW_EINPUT, label, 0, "expected key.path=value");
	if (root->kind != DW_Y_MAP)
		return DW_OK;   /* the caller reports the document's own shape */
	char *keys = dw_alloc(err, (size_t)(eq - set) + 1, 1);
	if (!keys)
		return err->status;
	memcpy(keys, set, (size_t)(eq - set));
	dw_ynode *value = dw_yaml_parse_text(eq + 1, label, err);
	if (!value) {
		free(keys);
		return err->status;
	}
	dw_ynode *cur = root;
	const char *section = NULL;
	char *comp = keys;
	for (int depth = 0; ; depth++) {
		char *dot = strchr(comp, '.');
		if (dot)
			*dot = '\0';
		if (!*comp) {
			dw_fail_at(err, DW_EINPUT, label, 0, "empty key in the path");
			break;
		}
		if (cur->kind == DW_Y_SEQ) {
			char *end;
			unsigned long long i = strtoull(comp, &end, 10);
			if (*end || comp[0] < '0' || comp[0] > '9' || i >= cur->len) {
				dw_fail_at(err, DW_EINPUT, label, 0, "'%s' is not an index of a "
					"list of %zu", comp, cur->len);
				break;
			}
			if (!dot) {
				dw_ynode_free(cur->item[i]);
				cur->item[i] = value;
				value = NULL;
				break;
			}
			cur = cur->item[i];
		} else if (cur->kind == DW_Y_MAP) {
			if (depth == 1 && section)
				drop_other_alternatives(cur, groups, section, comp);
			if (!dot) {
				dw_ynode *key = dw_ynode_new_scalar(comp, 0, label, err);
				if (key)
					dw_ymap_put(cur, key, value, err);
				value = NULL;
				break;
			}
			if (depth == 0)
				section = comp;
			dw_ynode *child = dw_ymap_get(cur, comp, NULL);
			if (!child || dw_ynode_is_null(child)) {
				dw_ynode *key = dw_ynode_new_scalar(comp, 0, label, err);
				child = dw_ynode_new_map(0, label, err);
				if (!key || !child) {
					dw_ynode_free(key);
					dw_ynode_free(child);
					break;
				}
				if (dw_ymap_put(cur, key, child, err))
					break;
			}
			cur = child;
		} else {
			dw_fail_at(err, DW_EINPUT, label, 0, "'%s' is inside a value (%s:%ld), "
				"not a section", comp, cur->origin, cur->line);
			break;
		}
		comp = dot + 1;
	}
	dw_ynode_free(value);
	free(keys);
	return err->status;
}
