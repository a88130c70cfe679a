/* ledger_diff.c - the delta between two cost ledgers (dwell diff).
 * Takes: two parsed ledgers (dwell/json.h).  Gives: a dw_ledger_diff with
 * every numeric leaf of either ledger (A's order, then B-only ones), the
 * stages matched by name with their numeric fields, and the non-numeric
 * fields that differ; writers for a readable report and for JSON.
 * Integers are compared and subtracted exactly (64-bit magnitudes), so
 * counts above 2^53 give exact deltas. */
#include "dwell/audit.h"

#include <inttypes.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* ---- collecting leaves ---- */

typedef struct leaf {
	char *path;
	const dw_json *v;
	size_t order;     /* position in document order */
	int used;         /* matched with the other side */
} leaf;

typedef struct leaf_list {
	leaf *v;
	size_t n, cap;
} leaf_list;

static void leaves_free(leaf_list *l)
{
	for (size_t i = 0; i < l->n; i++)
		free(l->v[i].path);
	free(l->v);
	memset(l, 0, sizeof *l);
}

static char *join_path(const char *prefix, const char *seg, dw_error *err)
{
	size_t np = strlen(prefix), ns = strlen(seg);
	char *s = dw_alloc(err, np + ns + 2, 1);
	if (!s)
		return NULL;
	if (np) {
		memcpy(s, prefix, np);
		s[np++] = '.';
	}
	memcpy(s + np, seg, ns + 1);
	return s;
}

/* Every scalar leaf below v, with dotted paths.  skip names a member of v
 * itself to leave out ("stages" at the top, "stage" inside a stage). */
static int collect(const dw_json *v, const char *prefix, const char *skip,
	leaf_list *out, dw_error *err)
{
	for (size_t i = 0; i < v->n; i++) {
		const dw_json *c = &v->item[i];
		char idx[32];
		const char *seg = c->key;
		if (v->kind == DW_JSON_ARRAY) {
			snprintf(idx, sizeof idx, "%zu", i);
			seg = idx;
		} else if (skip && !strcmp(c->key, skip)) {
			continue;
		}
		char *path = join_path(prefix, seg, err);
		if (!path)
			return err->status;
		if (c->kind == DW_JSON_OBJECT || c->kind == DW_JSON_ARRAY) {
			int st = collect(c, path, NULL, out, err);
			free(path);
			if (st)
				return st;
			continue;
		}
		if (out->n == out->cap) {
			size_t ncap = out->cap ? 2 * out->cap : 32;
			leaf *nv = ncap <= SIZE_MAX / sizeof *nv ? realloc(out->v, ncap * sizeof *nv) : NULL;
			if (!nv) {
				free(path);
				return dw_fail(err, DW_EINTERNAL, "out of memory comparing ledgers");
			}
			out->v = nv;
			out->cap = ncap;
		}
		out->v[out->n] = (leaf){ .path = path, .v = c, .order = out->n };
		out->n++;
	}
	return DW_OK;
}

static int leaf_by_path(const void *pa, const void *pb)
{
	const leaf *a = *(const leaf *const *)pa, *b = *(const leaf *const *)pb;
	int c = strcmp(a->path, b->path);
	return c ? c : (a->order > b->order) - (a->order < b->order);
}

static leaf *find_leaf(leaf **sorted, size_t n, const char *path)
{
	size_t lo = 0, hi = n;
	while (lo < hi) {
		size_t mid = lo + (hi - lo) / 2;
		if (strcmp(sorted[mid]->path, path) < 0)
			lo = mid + 1;
		else
			hi = mid;
	}
	for (; lo < n && !strcmp(sorted[lo]->path, path); lo++)
		if (!sorted[lo]->used)
			return sorted[lo];
	return NULL;
}

/* ---- exact arithmetic on sign + magnitude integers ---- */

/* (s1, m1) + (s2, m2); returns 0 when the magnitude overflows. */
static int signed_add(int s1, uint64_t m1, int s2, uint64_t m2, int *s, uint64_t *m)
{
	if (s1 == s2) {
		if (m1 > UINT64_MAX - m2)
			return 0;
		*m = m1 + m2;
		*s = s1;
	} else if (m1 >= m2) {
		*m = m1 - m2;
		*s = s1;
	} else {
		*m = m2 - m1;
		*s = s2;
	}
	if (*m == 0)
		*s = 0;
	return 1;
}

static int is_number(const dw_json *v)
{
	return v && v->kind == DW_JSON_NUMBER;
}

static void fill_delta(dw_delta *d)
{
	const dw_json *a = d->a, *b = d->b;
	int ai = !a || a->is_int, bi = !b || b->is_int;
	d->kind = !a ? DW_DELTA_NEW : !b ? DW_DELTA_GONE : DW_DELTA_CHANGED;
	if (ai && bi) {
		int sa = a ? a->negative : 0, sb = b ? b->negative : 0;
		uint64_t ma = a ? a->mag : 0, mb = b ? b->mag : 0;
		d->exact = signed_add(sb, mb, !sa && ma ? 1 : 0, ma, &d->delta_neg, &d->delta_mag);
	}
	if (d->exact) {
		d->delta = d->delta_neg ? -(double)d->delta_mag : (double)d->delta_mag;
		if (a && b && d->delta_mag == 0)
			d->kind = DW_DELTA_SAME;
	} else {
		d->delta = (b ? b->num : 0.0) - (a ? a->num : 0.0);
		if (a && b && a->num == b->num)
			d->kind = DW_DELTA_SAME;
	}
	if (a && b && a->num != 0.0) {
		d->has_pct = 1;
		if (d->exact && a->is_int)
			d->pct = (double)((long double)d->delta_mag / (long double)a->mag * 100.0L)
				* (d->delta_neg ? -1.0 : 1.0);
		else
			d->pct = d->delta / fabs(a->num) * 100.0;
	}
}

static int same_scalar(const dw_json *a, const dw_json *b)
{
	if (!a || !b || a->kind != b->kind)
		return 0;
	switch (a->kind) {
	case DW_JSON_BOOL: return a->boolean == b->boolean;
	case DW_JSON_STRING: return a->len == b->len && !memcmp(a->str, b->str, a->len);
	case DW_JSON_NULL: return 1;
	default: return 0;
	}
}

/* Growable arrays of deltas and setting changes. */
typedef struct delta_list {
	dw_delta *v;
	size_t n, cap;
} delta_list;

typedef struct setting_list {
	dw_setting_change *v;
	size_t n, cap;
} setting_list;

static int grow(void **v, size_t *cap, size_t n, size_t size, dw_error *err)
{
	if (n < *cap)
		return DW_OK;
	size_t ncap = *cap ? 2 * *cap : 16;
	void *nv = ncap <= SIZE_MAX / size ? realloc(*v, ncap * size) : NULL;
	if (!nv)
		return dw_fail(err, DW_EINTERNAL, "out of memory comparing ledgers");
	*v = nv;
	*cap = ncap;
	return DW_OK;
}

/* One pair (either may be NULL): a numeric row, a setting change, or
 * nothing (equal non-numeric values).  The path is copied. */
static int add_pair(const char *path, const dw_json *a, const dw_json *b,
	delta_list *dl, setting_list *sl, dw_error *err)
{
	int numeric = (is_number(a) || !a) && (is_number(b) || !b);
	if (numeric) {
		if (grow((void **)&dl->v, &dl->cap, dl->n, sizeof *dl->v, err))
			return err->status;
		dw_delta *d = &dl->v[dl->n];
		memset(d, 0, sizeof *d);
		d->a = a;
		d->b = b;
		fill_delta(d);
		if (!(d->name = join_path("", path, err)))
			return err->status;
		dl->n++;
		return DW_OK;
	}
	if (same_scalar(a, b) || !sl)
		return DW_OK;
	if (grow((void **)&sl->v, &sl->cap, sl->n, sizeof *sl->v, err))
		return err->status;
	dw_setting_change *s = &sl->v[sl->n];
	s->a = a;
	s->b = b;
	if (!(s->name = join_path("", path, err)))
		return err->status;
	sl->n++;
	return DW_OK;
}

/* Compare two objects' leaves (A's order, then B-only in B's order). */
static int compare_objects(const dw_json *a, const dw_json *b, const char *skip,
	delta_list *dl, setting_list *sl, dw_error *err)
{
	leaf_list la = {0}, lb = {0};
	leaf **sorted = NULL;
	int st = DW_OK;
	if ((a && collect(a, "", skip, &la, err)) || (b && collect(b, "", skip, &lb, err)))
		goto done;
	sorted = dw_alloc(err, lb.n, sizeof *sorted);
	if (!sorted)
		goto done;
	for (size_t i = 0; i < lb.n; i++)
		sorted[i] = &lb.v[i];
	qsort(sorted, lb.n, sizeof *sorted, leaf_by_path);
	for (size_t i = 0; i < la.n; i++) {
		leaf *m = find_leaf(sorted, lb.n, la.v[i].path);
		if (m)
			m->used = 1;
		if (add_pair(la.v[i].path, la.v[i].v, m ? m->v : NULL, dl, sl, err))
			goto done;
	}
	for (size_t i = 0; i < lb.n; i++)
		if (!lb.v[i].used && add_pair(lb.v[i].path, NULL, lb.v[i].v, dl, sl, err))
			goto done;
done:
	st = err->status;
	free(sorted);
	leaves_free(&la);
	leaves_free(&lb);
	return st;
}

/* ---- stages ---- */

static int check_stages(const dw_json *ledger, const char *name, const dw_json **out, dw_error *err)
{
	const dw_json *s = dw_json_member(ledger, "stages");
	*out = s;
	if (!s)
		return DW_OK;
	if (s->kind != DW_JSON_ARRAY)
		return dw_fail(err, DW_EINPUT, "%s:%ld:%ld: \"stages\" must be an array",
			name, s->line, s->col);
	for (size_t i = 0; i < s->n; i++) {
		const dw_json *st = &s->item[i], *nm = dw_json_member(st, "stage");
		if (st->kind != DW_JSON_OBJECT || !nm || nm->kind != DW_JSON_STRING)
			return dw_fail(err, DW_EINPUT, "%s:%ld:%ld: stage entry %zu is not an "
				"object with a string \"stage\" name", name, st->line, st->col, i + 1);
	}
	return DW_OK;
}

static const char *stage_name(const dw_json *st)
{
	return dw_json_member(st, "stage")->str;
}

typedef struct stage_ref {
	const dw_json *st;
	size_t order;
	int used;
} stage_ref;

static int stage_by_name(const void *pa, const void *pb)
{
	const stage_ref *a = pa, *b = pb;
	int c = strcmp(stage_name(a->st), stage_name(b->st));
	return c ? c : (a->order > b->order) - (a->order < b->order);
}

static int add_stage(dw_ledger_diff *d, size_t *cap, const dw_json *sa,
	const dw_json *sb, dw_error *err)
{
	if (grow((void **)&d->stage, cap, d->nstage, sizeof *d->stage, err))
		return err->status;
	dw_stage_delta *s = &d->stage[d->nstage++];
	memset(s, 0, sizeof *s);
	s->stage = stage_name(sa ? sa : sb);
	s->in_a = sa != NULL;
	s->in_b = sb != NULL;
	delta_list dl = {0};
	int st = compare_objects(sa, sb, "stage", &dl, NULL, err);
	s->field = dl.v;
	s->nfield = dl.n;
	return st;
}

static int diff_stages(const dw_json *a, const dw_json *b, dw_ledger_diff *d, dw_error *err)
{
	size_t na = a ? a->n : 0, nb = b ? b->n : 0, cap = 0;
	stage_ref *sorted = dw_alloc(err, nb, sizeof *sorted);
	if (!sorted)
		return err->status;
	for (size_t i = 0; i < nb; i++)
		sorted[i] = (stage_ref){ &b->item[i], i, 0 };
	qsort(sorted, nb, sizeof *sorted, stage_by_name);
	/* B's stages in order, with their positions in `sorted`. */
	size_t *pos = dw_alloc(err, nb, sizeof *pos);
	if (!pos) {
		free(sorted);
		return err->status;
	}
	for (size_t i = 0; i < nb; i++)
		pos[sorted[i].order] = i;
	for (size_t i = 0; i < na && !err->status; i++) {
		const dw_json *sa = &a->item[i];
		const char *name = stage_name(sa);
		size_t lo = 0, hi = nb;
		while (lo < hi) {
			size_t mid = lo + (hi - lo) / 2;
			if (strcmp(stage_name(sorted[mid].st), name) < 0)
				lo = mid + 1;
			else
				hi = mid;
		}
		/* Skip the ones already matched: the k-th stage of a name in A
		 * pairs with the k-th of that name in B. */
		while (lo < nb && sorted[lo].used && !strcmp(stage_name(sorted[lo].st), name))
			lo++;
		const dw_json *sb = NULL;
		if (lo < nb && !strcmp(stage_name(sorted[lo].st), name)) {
			sorted[lo].used = 1;
			sb = sorted[lo].st;
		}
		add_stage(d, &cap, sa, sb, err);
	}
	for (size_t i = 0; i < nb && !err->status; i++)
		if (!sorted[pos[i]].used)
			add_stage(d, &cap, NULL, sorted[pos[i]].st, err);
	free(pos);
	free(sorted);
	return err->status;
}

int dw_ledger_diff_build(const dw_json *a, const char *a_name,
	const dw_json *b, const char *b_name, dw_ledger_diff *out, dw_error *err)
{
	memset(out, 0, sizeof *out);
	if (a->kind != DW_JSON_OBJECT)
		return dw_fail(err, DW_EINPUT, "%s:%ld:%ld: a ledger is a JSON object", a_name, a->line, a->col);
	if (b->kind != DW_JSON_OBJECT)
		return dw_fail(err, DW_EINPUT, "%s:%ld:%ld: a ledger is a JSON object", b_name, b->line, b->col);
	const dw_json *sa, *sb;
	if (check_stages(a, a_name, &sa, err) || check_stages(b, b_name, &sb, err))
		return err->status;
	const dw_json *pa = dw_json_path(a, "problem.name"), *pb = dw_json_path(b, "problem.name");
	out->problem_a = pa && pa->kind == DW_JSON_STRING ? pa : NULL;
	out->problem_b = pb && pb->kind == DW_JSON_STRING ? pb : NULL;
	out->problem_differs = pa && pb && !same_scalar(pa, pb);
	delta_list dl = {0};
	setting_list sl = {0};
	compare_objects(a, b, "stages", &dl, &sl, err);
	out->figure = dl.v;
	out->nfigure = dl.n;
	out->setting = sl.v;
	out->nsetting = sl.n;
	if (!err->status)
		diff_stages(sa, sb, out, err);
	if (err->status)
		dw_ledger_diff_free(out);
	return err->status;
}

void dw_ledger_diff_free(dw_ledger_diff *d)
{
	for (size_t i = 0; i < d->nfigure; i++)
		free(d->figure[i].name);
	for (size_t i = 0; i < d->nstage; i++) {
		for (size_t j = 0; j < d->stage[i].nfield; j++)
			free(d->stage[i].field[j].name);
		free(d->stage[i].field);
	}
	for (size_t i = 0; i < d->nsetting; i++)
		free(d->setting[i].name);
	free(d->figure);
	free(d->stage);
	free(d->setting);
	memset(d, 0, sizeof *d);
}

/* ---- writers ---- */

static void format_delta(const dw_delta *d, char *buf, size_t size)
{
	if (d->exact)
		snprintf(buf, size, "%s%" PRIu64, d->delta_mag == 0 ? "" : d->delta_neg ? "-" : "+",
			d->delta_mag);
	else
		snprintf(buf, size, "%+.6g", d->delta);
}

static void format_change(const dw_delta *d, char *buf, size_t size)
{
	if (d->kind == DW_DELTA_NEW)
		snprintf(buf, size, "new");
	else if (d->kind == DW_DELTA_GONE)
		snprintf(buf, size, "gone");
	else if (!d->has_pct)
		snprintf(buf, size, "n/a");
	else if (d->pct != 0.0 && fabs(d->pct) < 0.005)
		snprintf(buf, size, "%s<0.01%%", d->pct < 0 ? "-" : "+");
	else
		snprintf(buf, size, "%+.2f%%", d->pct);
}

/* Column widths of the text report, from every row printed. */
typedef struct widths {
	int name, a, b, delta, change;
} widths;

static void widen(int *w, size_t len)
{
	if ((int)len > *w)
		*w = len > 60 ? 60 : (int)len;
}

static void measure(widths *w, const dw_delta *row, size_t n, int indent)
{
	char buf[48];
	for (size_t i = 0; i < n; i++) {
		const dw_delta *d = &row[i];
		if (d->kind == DW_DELTA_SAME)
			continue;
		widen(&w->name, strlen(d->name) + (size_t)indent);
		widen(&w->a, d->a ? d->a->len : 1);
		widen(&w->b, d->b ? d->b->len : 1);
		format_delta(d, buf, sizeof buf);
		widen(&w->delta, strlen(buf));
		format_change(d, buf, sizeof buf);
		widen(&w->change, strlen(buf));
	}
}

static void write_header(FILE *f, const char *title, const widths *w)
{
	fprintf(f, "\n%-*s  %*s  %*s  %*s  %*s\n", w->name, title, w->a, "A", w->b, "B",
		w->delta, "B - A", w->change, "change");
}

/* Changed rows one per line, then the unchanged ones wrapped together. */
static void write_rows(FILE *f, const dw_delta *row, size_t n, int indent, const widths *w)
{
	char delta[48], change[48];
	size_t same = 0;
	for (size_t i = 0; i < n; i++) {
		const dw_delta *d = &row[i];
		if (d->kind == DW_DELTA_SAME) {
			same++;
			continue;
		}
		format_delta(d, delta, sizeof delta);
		format_change(d, change, sizeof change);
		fprintf(f, "%*s%-*s  %*s  %*s  %*s  %*s\n", indent, "", w->name - indent, d->name,
			w->a, d->a ? d->a->str : "-", w->b, d->b ? d->b->str : "-",
			w->delta, delta, w->change, change);
	}
	if (!same)
		return;
	int col = fprintf(f, "%*s(unchanged)", indent, "");
	for (size_t i = 0; i < n; i++) {
		const dw_delta *d = &row[i];
		if (d->kind != DW_DELTA_SAME)
			continue;
		int len = (int)(strlen(d->name) + 1 + strlen(d->a->str));
		if (col + 1 + len > 78) {
			fprintf(f, "\n%*s", indent + 11, "");
			col = indent + 11;
		}
		col += fprintf(f, " %s=%s", d->name, d->a->str);
	}
	fputc('\n', f);
}

static void write_scalar_text(FILE *f, const dw_json *v)
{
	if (!v)
		fputs("(absent)", f);
	else if (v->kind == DW_JSON_STRING)
		dw_json_write_string(f, v->str, v->len);
	else if (v->kind == DW_JSON_BOOL)
		fputs(v->boolean ? "true" : "false", f);
	else if (v->kind == DW_JSON_NUMBER)
		fputs(v->str, f);
	else if (v->kind == DW_JSON_NULL)
		fputs("null", f);
}

static void write_side(FILE *f, const char *tag, const char *file, const dw_json *problem)
{
	fprintf(f, "  %s  %s", tag, file);
	if (problem) {
		fputs("  (problem ", f);
		dw_json_write_string(f, problem->str, problem->len);
		fputc(')', f);
	}
	fputc('\n', f);
}

void dw_ledger_diff_write_text(FILE *f, const dw_ledger_diff *d,
	const char *a_name, const char *b_name)
{
	widths w = {20, 1, 1, 5, 6};
	measure(&w, d->figure, d->nfigure, 2);
	for (size_t i = 0; i < d->nstage; i++)
		measure(&w, d->stage[i].field, d->stage[i].nfield, 4);
	fprintf(f, "Ledger comparison (B relative to A)\n");
	write_side(f, "A", a_name, d->problem_a);
	write_side(f, "B", b_name, d->problem_b);
	write_header(f, "Figures", &w);
	if (d->nfigure)
		write_rows(f, d->figure, d->nfigure, 2, &w);
	else
		fprintf(f, "  (no numeric figures)\n");
	if (d->nstage) {
		write_header(f, "Stages", &w);
		for (size_t i = 0; i < d->nstage; i++) {
			const dw_stage_delta *s = &d->stage[i];
			fprintf(f, "  [");
			fputs(s->stage, f);
			fprintf(f, "]%s\n", s->in_a && s->in_b ? "" : s->in_a ? "  only in A" : "  only in B");
			write_rows(f, s->field, s->nfield, 4, &w);
		}
	}
	if (d->nsetting) {
		fprintf(f, "\nOther fields that differ (A -> B)\n");
		for (size_t i = 0; i < d->nsetting; i++) {
			fprintf(f, "  %-*s  ", w.name - 2, d->setting[i].name);
			write_scalar_text(f, d->setting[i].a);
			fputs(" -> ", f);
			write_scalar_text(f, d->setting[i].b);
			fputc('\n', f);
		}
	}
}

static void write_json_double(FILE *f, double x)
{
	if (isfinite(x))
		fprintf(f, "%.17g", x);
	else
		fputs("null", f);
}

static const char *kind_word(dw_delta_kind k)
{
	switch (k) {
	case DW_DELTA_SAME: return "same";
	case DW_DELTA_CHANGED: return "changed";
	case DW_DELTA_NEW: return "new";
	default: return "gone";
	}
}

static void write_json_rows(FILE *f, const char *label, const dw_delta *row, size_t n, const char *ind)
{
	for (size_t i = 0; i < n; i++) {
		const dw_delta *d = &row[i];
		fprintf(f, "%s{\"%s\": ", ind, label);
		dw_json_write_string(f, d->name, strlen(d->name));
		fprintf(f, ", \"status\": \"%s\", \"a\": %s, \"b\": %s, \"delta\": ", kind_word(d->kind),
			d->a ? d->a->str : "null", d->b ? d->b->str : "null");
		if (d->exact)
			fprintf(f, "%s%" PRIu64, d->delta_neg ? "-" : "", d->delta_mag);
		else
			write_json_double(f, d->delta);
		fputs(", \"change_percent\": ", f);
		if (d->has_pct)
			write_json_double(f, d->pct);
		else
			fputs("null", f);
		fprintf(f, "}%s\n", i + 1 < n ? "," : "");
	}
}

static void write_json_scalar(FILE *f, const dw_json *v)
{
	if (!v)
		fputs("null", f);
	else
		write_scalar_text(f, v);
}

void dw_ledger_diff_write_json(FILE *f, const dw_ledger_diff *d,
	const char *a_name, const char *b_name)
{
	fputs("{\n  \"a\": ", f);
	dw_json_write_string(f, a_name, strlen(a_name));
	fputs(",\n  \"b\": ", f);
	dw_json_write_string(f, b_name, strlen(b_name));
	fprintf(f, ",\n  \"problems_differ\": %s,\n  \"figures\": [\n",
		d->problem_differs ? "true" : "false");
	write_json_rows(f, "figure", d->figure, d->nfigure, "    ");
	fputs("  ],\n  \"stages\": [\n", f);
	for (size_t i = 0; i < d->nstage; i++) {
		const dw_stage_delta *s = &d->stage[i];
		fputs("    {\"stage\": ", f);
		dw_json_write_string(f, s->stage, strlen(s->stage));
		fprintf(f, ", \"in_a\": %s, \"in_b\": %s, \"fields\": [\n",
			s->in_a ? "true" : "false", s->in_b ? "true" : "false");
		write_json_rows(f, "field", s->field, s->nfield, "      ");
		fprintf(f, "    ]}%s\n", i + 1 < d->nstage ? "," : "");
	}
	fputs("  ],\n  \"other_differences\": [\n", f);
	for (size_t i = 0; i < d->nsetting; i++) {
		fputs("    {\"field\": ", f);
		dw_json_write_string(f, d->setting[i].name, strlen(d->setting[i].name));
		fputs(", \"a\": ", f);
		write_json_scalar(f, d->setting[i].a);
		fputs(", \"b\": ", f);
		write_json_scalar(f, d->setting[i].b);
		fprintf(f, "}%s\n", i + 1 < d->nsetting ? "," : "");
	}
	fputs("  ]\n}\n", f);
}
