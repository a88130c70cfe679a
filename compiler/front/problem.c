/* problem.c - read PROBLEM.yaml (DESIGN 3.1) plus --set overrides into a
 * dw_problem.
 * Takes: the YAML path and "key.path=value" overrides.  Gives: a filled
 * dw_problem with every default applied (docs/problem-format.md), the matrix
 * file read (Matrix Market) and the right-hand side normalised; or DW_EINPUT
 * "FILE:LINE: key.path: message" (overrides: "--set k=v: key.path: ...")
 * with *out zeroed.  Analysis (norm, kappa) is spectrum.c's job. */
#include "dwell/problem.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/mtx.h"
#include "front/yaml_doc.h"

/* Largest system size a problem may declare: 2^n must fit an int64. */
#define MAX_SYSTEM_QUBITS 62

typedef struct loader {
	dw_problem *p;
	dw_error *err;
	const char *yaml_path;   /* as given, for resolving relative paths */
	int64_t dim;             /* rows of A as given (2^n, or the file's rows) */
} loader;

static const char *const top_keys[] = {
	"name", "matrix", "rhs", "precision", "schedule", "formula", "target",
	"oracle", "budget", NULL
};
static const char *const matrix_alts[] = {"file", "stencil", "pauli", NULL};
static const char *const rhs_alts[] = {
	"amplitudes", "file", "basis", "uniform", "product", "circuit", NULL
};
/* --set of one alternative drops the others, so kinds can be switched. */
static const dw_ygroup exclusive[] = {
	{"matrix", matrix_alts}, {"rhs", rhs_alts}, {NULL, NULL}
};

/* Copy of s (NULL on allocation failure, err filled). */
static char *copy_string(const char *s, dw_error *err)
{
	size_t len = strlen(s);
	char *c = dw_alloc(err, len + 1, 1);
	if (c)
		memcpy(c, s, len + 1);
	return c;
}

/* ---- helpers ---- */

/* Exactly one of alts must be a key of map; *which gets its index. */
static int pick_one(const dw_ynode *map, const char *path,
	const char *const *alts, int *which, dw_error *err)
{
	char list[200] = "";
	size_t used = 0;
	for (int a = 0; alts[a]; a++) {
		int w = snprintf(list + used, sizeof list - used, "%s%s", a ? ", " : "", alts[a]);
		if (w > 0 && (size_t)w < sizeof list - used)
			used += (size_t)w;
	}
	*which = -1;
	for (size_t i = 0; i < map->len; i++)
		for (int a = 0; alts[a]; a++) {
			if (strcmp(map->key[i]->text, alts[a]))
				continue;
			if (*which >= 0)
				return dw_yerr(err, map->key[i], path,
					"give only one of %s (found both %s and %s)",
					list, alts[*which], alts[a]);
			*which = a;
		}
	if (*which < 0)
		return dw_yerr(err, map, path, "give one of %s", list);
	return DW_OK;
}

/* Resolve rel against the directory of the YAML file; check readability. */
static int resolve_path(loader *ld, const dw_ynode *n, const char *path, char **out)
{
	char *rel;
	if (dw_yget_string(n, path, &rel, ld->err))
		return ld->err->status;
	const char *slash = strrchr(ld->yaml_path, '/');
	size_t dirlen = (rel[0] == '/' || !slash) ? 0 : (size_t)(slash - ld->yaml_path) + 1;
	size_t rlen = strlen(rel);
	char *full = dw_alloc(ld->err, dirlen + rlen + 1, 1);
	if (full) {
		memcpy(full, ld->yaml_path, dirlen);
		memcpy(full + dirlen, rel, rlen + 1);
	}
	free(rel);
	if (!full)
		return ld->err->status;
	FILE *f = fopen(full, "rb");
	if (!f) {
		int e = errno;
		dw_yerr(ld->err, n, path, "cannot open '%s': %s", full, strerror(e));
		free(full);
		return ld->err->status;
	}
	fclose(f);
	*out = full;
	return DW_OK;
}

/* Scale v to unit 2-norm; an all-zero vector is refused. */
static int normalise(loader *ld, const dw_ynode *n, const char *path,
	double complex *v, int64_t len)
{
	double scale = 0;
	for (int64_t i = 0; i < len; i++)
		scale = fmax(scale, fmax(fabs(creal(v[i])), fabs(cimag(v[i]))));
	if (scale == 0)
		return dw_yerr(ld->err, n, path, "the right-hand side is the zero vector");
	double sum = 0;
	for (int64_t i = 0; i < len; i++) {
		double complex s = v[i] / scale;
		sum += creal(s) * creal(s) + cimag(s) * cimag(s);
	}
	double norm = scale * sqrt(sum);
	for (int64_t i = 0; i < len; i++)
		v[i] /= norm;
	return DW_OK;
}

/* "auto" -> 0, else an integer in [1, INT64_MAX]. */
static int read_steps(loader *ld, const dw_ynode *n, const char *path, int64_t *out)
{
	if (dw_yis_auto(n)) {
		*out = 0;
		return DW_OK;
	}
	return dw_yget_int(n, path, 1, INT64_MAX, "a positive integer or 'auto'",
		out, ld->err);
}

/* ---- matrix ---- */

static int read_pauli(loader *ld, const dw_ynode *seq, const char *path)
{
	static const char *const term_keys[] = {"coeff", "ops", NULL};
	dw_problem *p = ld->p;
	if (dw_yexpect_seq(seq, path, ld->err))
		return ld->err->status;
	if (seq->len == 0)
		return dw_yerr(ld->err, seq, path, "needs at least one term");
	p->pauli = dw_alloc(ld->err, seq->len, sizeof *p->pauli);
	if (!p->pauli)
		return ld->err->status;
	p->npauli = seq->len;
	for (size_t i = 0; i < seq->len; i++) {
		const dw_ynode *t = seq->item[i];
		char tp[300], kp[320];
		dw_ypath_index(tp, sizeof tp, path, i);
		if (dw_yexpect_map(t, tp, ld->err) || dw_ycheck_keys(t, tp, term_keys, ld->err))
			return ld->err->status;
		const dw_ynode *c = dw_ymap_get(t, "coeff", NULL);
		const dw_ynode *o = dw_ymap_get(t, "ops", NULL);
		dw_ypath_key(kp, sizeof kp, tp, c ? "ops" : "coeff");
		if (!c || !o)
			return dw_yerr(ld->err, t, kp, "missing required key");
		dw_ypath_key(kp, sizeof kp, tp, "coeff");
		if (dw_yget_real(c, kp, &p->pauli[i].coeff, ld->err))
			return ld->err->status;
		dw_ypath_key(kp, sizeof kp, tp, "ops");
		if (dw_yget_string(o, kp, &p->pauli[i].ops, ld->err))
			return ld->err->status;
		const char *ops = p->pauli[i].ops;
		size_t len = strlen(ops);
		size_t bad = strspn(ops, "IXYZ");
		if (bad < len)
			return dw_yerr(ld->err, o, kp, "character '%c' at position %zu is "
				"not one of I, X, Y, Z", ops[bad], bad);
		if (len > MAX_SYSTEM_QUBITS)
			return dw_yerr(ld->err, o, kp, "%zu qubits; at most %d are supported",
				len, MAX_SYSTEM_QUBITS);
		if (i == 0)
			p->n = (int)len;
		else if (len != (size_t)p->n)
			return dw_yerr(ld->err, o, kp, "%zu characters, but the first term "
				"has %d (all terms act on the same qubits)", len, p->n);
	}
	ld->dim = (int64_t)1 << p->n;
	return DW_OK;
}

static int read_matrix_file(loader *ld, const dw_ynode *n, const char *path)
{
	dw_problem *p = ld->p;
	if (resolve_path(ld, n, path, &p->matrix_file))
		return ld->err->status;
	if (dw_mtx_read_matrix(p->matrix_file, NULL, &p->matrix, ld->err))
		return ld->err->status;
	const dw_csr *m = p->matrix;
	if (m->rows != m->cols || m->rows < 1)
		return dw_yerr(ld->err, n, path, "'%s' is %lld x %lld; a square matrix "
			"is needed", p->matrix_file, (long long)m->rows, (long long)m->cols);
	int bits = 1;
	while (bits < MAX_SYSTEM_QUBITS && ((int64_t)1 << bits) < m->rows)
		bits++;
	p->n = bits;
	ld->dim = m->rows;
	return DW_OK;
}

/* One point key: "o0[,o1[,o2]]", each offset a signed integer within +-4. */
static int parse_offsets(loader *ld, const dw_ynode *key, const char *path,
	int dims, int offset[3])
{
	const char *s = key->text;
	int count = 0;
	while (true) {
		while (*s == ' ')
			s++;
		int sign = 1;
		if (*s == '+' || *s == '-')
			sign = *s++ == '-' ? -1 : 1;
		if (*s < '0' || *s > '9')
			return dw_yerr(ld->err, key, path, "expected one integer offset per "
				"axis separated by commas, like \"0\" or \"+1,0\"");
		long v = 0;
		while (*s >= '0' && *s <= '9' && v <= 4)
			v = v * 10 + (*s++ - '0');
		if (v > 4 || (*s >= '0' && *s <= '9'))
			return dw_yerr(ld->err, key, path, "offsets must lie within -4..+4");
		if (count >= dims)
			return dw_yerr(ld->err, key, path, "more offsets than the %d axes "
				"of shape", dims);
		offset[count++] = (int)(sign * v);
		while (*s == ' ')
			s++;
		if (!*s)
			break;
		if (*s++ != ',')
			return dw_yerr(ld->err, key, path, "expected one integer offset per "
				"axis separated by commas, like \"0\" or \"+1,0\"");
	}
	if (count != dims)
		return dw_yerr(ld->err, key, path, "%d offset%s for %d axes", count,
			count == 1 ? "" : "s", dims);
	return DW_OK;
}

static int read_stencil(loader *ld, const dw_ynode *map, const char *path)
{
	static const char *const keys[] = {"shape", "points", "boundary", NULL};
	static const char *const bounds[] = {"dirichlet", "periodic", NULL};
	dw_stencil *st = &ld->p->stencil;
	char kp[320];
	if (dw_yexpect_map(map, path, ld->err) || dw_ycheck_keys(map, path, keys, ld->err))
		return ld->err->status;
	const dw_ynode *shape = dw_ymap_get(map, "shape", NULL);
	const dw_ynode *points = dw_ymap_get(map, "points", NULL);
	const dw_ynode *bound = dw_ymap_get(map, "boundary", NULL);
	dw_ypath_key(kp, sizeof kp, path, shape ? "points" : "shape");
	if (!shape || !points)
		return dw_yerr(ld->err, map, kp, "missing required key");

	dw_ypath_key(kp, sizeof kp, path, "shape");
	if (dw_yexpect_seq(shape, kp, ld->err))
		return ld->err->status;
	if (shape->len < 1 || shape->len > 3)
		return dw_yerr(ld->err, shape, kp, "1 to 3 axes, got %zu", shape->len);
	st->dims = (int)shape->len;
	int qubits = 0;
	for (int a = 0; a < st->dims; a++) {
		char ap[340];
		dw_ypath_index(ap, sizeof ap, kp, (size_t)a);
		int64_t v;
		if (dw_yget_int(shape->item[a], ap, 2, INT64_MAX, "a power of two",
				&v, ld->err))
			return ld->err->status;
		if (v & (v - 1))
			return dw_yerr(ld->err, shape->item[a], ap, "%lld is not a power "
				"of two", (long long)v);
		st->shape[a] = v;
		for (; v > 1; v >>= 1)
			qubits++;
	}
	if (qubits > MAX_SYSTEM_QUBITS)
		return dw_yerr(ld->err, shape, kp, "the grid needs %d qubits; at most %d "
			"are supported", qubits, MAX_SYSTEM_QUBITS);
	ld->p->n = qubits;
	ld->dim = (int64_t)1 << qubits;

	dw_ypath_key(kp, sizeof kp, path, "boundary");
	if (bound && bound->kind == DW_Y_SEQ) {
		if (bound->len != (size_t)st->dims)
			return dw_yerr(ld->err, bound, kp, "%zu entries for %d axes",
				bound->len, st->dims);
		for (int a = 0; a < st->dims; a++) {
			char ap[340];
			dw_ypath_index(ap, sizeof ap, kp, (size_t)a);
			if (dw_yget_enum(bound->item[a], ap, bounds, &st->periodic[a], ld->err))
				return ld->err->status;
		}
	} else if (bound) {
		int b;
		if (dw_yget_enum(bound, kp, bounds, &b, ld->err))
			return ld->err->status;
		for (int a = 0; a < st->dims; a++)
			st->periodic[a] = b;
	}

	dw_ypath_key(kp, sizeof kp, path, "points");
	if (dw_yexpect_map(points, kp, ld->err))
		return ld->err->status;
	if (points->len == 0)
		return dw_yerr(ld->err, points, kp, "needs at least one point");
	st->offset = dw_alloc(ld->err, points->len, sizeof *st->offset);
	st->coeff = dw_alloc(ld->err, points->len, sizeof *st->coeff);
	if (!st->offset || !st->coeff)
		return ld->err->status;
	for (size_t i = 0; i < points->len; i++) {
		const dw_ynode *key = points->key[i];
		char pp[400];
		snprintf(pp, sizeof pp, "%s.\"%s\"", kp, key->text);
		int *off = st->offset[i];
		if (parse_offsets(ld, key, pp, st->dims, off))
			return ld->err->status;
		for (int a = 0; a < st->dims; a++)
			if (abs(off[a]) >= st->shape[a])
				return dw_yerr(ld->err, key, pp, "offset %+d on axis %d, which "
					"has only %lld points", off[a], a, (long long)st->shape[a]);
		for (size_t j = 0; j < i; j++)
			if (!memcmp(st->offset[j], off, sizeof st->offset[j]))
				return dw_yerr(ld->err, key, pp, "same offset as \"%s\" (line %ld)",
					points->key[j]->text, points->key[j]->line);
		if (dw_yget_real(points->item[i], pp, &st->coeff[i], ld->err))
			return ld->err->status;
		st->npoints = i + 1;
	}
	return DW_OK;
}

static int read_matrix(loader *ld, const dw_ynode *map)
{
	int which;
	if (dw_yexpect_map(map, "matrix", ld->err)
			|| dw_ycheck_keys(map, "matrix", matrix_alts, ld->err)
			|| pick_one(map, "matrix", matrix_alts, &which, ld->err))
		return ld->err->status;
	const dw_ynode *v = dw_ymap_get(map, matrix_alts[which], NULL);
	switch (which) {
	case 0:
		ld->p->matrix_kind = DW_MATRIX_FILE;
		return read_matrix_file(ld, v, "matrix.file");
	case 1:
		ld->p->matrix_kind = DW_MATRIX_STENCIL;
		return read_stencil(ld, v, "matrix.stencil");
	default:
		ld->p->matrix_kind = DW_MATRIX_PAULI;
		return read_pauli(ld, v, "matrix.pauli");
	}
}

/* ---- right-hand side ---- */

/* Amplitude vector: 2^n entries; for a file matrix of d rows the entries
 * past d are zero (the padding of spectrum.c). */
static int alloc_amps(loader *ld)
{
	ld->p->amps = dw_alloc(ld->err, (size_t)1 << ld->p->n, sizeof *ld->p->amps);
	return ld->p->amps ? DW_OK : ld->err->status;
}

static int read_amplitudes(loader *ld, const dw_ynode *seq, const char *path)
{
	if (dw_yexpect_seq(seq, path, ld->err))
		return ld->err->status;
	if ((int64_t)seq->len != ld->dim)
		return dw_yerr(ld->err, seq, path, "%zu entries, but the matrix has %lld "
			"rows", seq->len, (long long)ld->dim);
	if (alloc_amps(ld))
		return ld->err->status;
	for (size_t i = 0; i < seq->len; i++) {
		const dw_ynode *e = seq->item[i];
		char ep[320], cp[340];
		dw_ypath_index(ep, sizeof ep, path, i);
		double re, im = 0;
		if (e->kind == DW_Y_SEQ) {
			if (e->len != 2)
				return dw_yerr(ld->err, e, ep, "expected a number or a [re, im] "
					"pair, got a list of %zu", e->len);
			dw_ypath_index(cp, sizeof cp, ep, 0);
			if (dw_yget_real(e->item[0], cp, &re, ld->err))
				return ld->err->status;
			dw_ypath_index(cp, sizeof cp, ep, 1);
			if (dw_yget_real(e->item[1], cp, &im, ld->err))
				return ld->err->status;
		} else if (dw_yget_real(e, ep, &re, ld->err)) {
			return ld->err->status;
		}
		ld->p->amps[i] = CMPLX(re, im);
	}
	return normalise(ld, seq, path, ld->p->amps, ld->dim);
}

static int read_rhs_file(loader *ld, const dw_ynode *n, const char *path)
{
	dw_problem *p = ld->p;
	if (resolve_path(ld, n, path, &p->rhs_file))
		return ld->err->status;
	double complex *v = NULL;
	int64_t len = 0;
	if (dw_mtx_read_vector(p->rhs_file, &v, &len, ld->err))
		return ld->err->status;
	int rc = DW_OK;
	if (len != ld->dim)
		rc = dw_yerr(ld->err, n, path, "'%s' has %lld entries, but the matrix "
			"has %lld rows", p->rhs_file, (long long)len, (long long)ld->dim);
	else if (!alloc_amps(ld)) {
		for (int64_t i = 0; i < len; i++) {
			if (!isfinite(creal(v[i])) || !isfinite(cimag(v[i]))) {
				rc = dw_yerr(ld->err, n, path, "'%s': entry %lld is not finite",
					p->rhs_file, (long long)i + 1);
				break;
			}
			p->amps[i] = v[i];
		}
		if (!rc)
			rc = normalise(ld, n, path, p->amps, len);
	} else {
		rc = ld->err->status;
	}
	free(v);
	return rc;
}

static int read_product(loader *ld, const dw_ynode *seq, const char *path)
{
	dw_problem *p = ld->p;
	if (dw_yexpect_seq(seq, path, ld->err))
		return ld->err->status;
	if (seq->len != (size_t)p->n)
		return dw_yerr(ld->err, seq, path, "%zu [theta, phi] pairs, but the "
			"system has %d qubits", seq->len, p->n);
	p->product = dw_alloc(ld->err, seq->len, sizeof *p->product);
	if (!p->product)
		return ld->err->status;
	p->nproduct = seq->len;
	for (size_t i = 0; i < seq->len; i++) {
		const dw_ynode *e = seq->item[i];
		char ep[320], cp[340];
		dw_ypath_index(ep, sizeof ep, path, i);
		if (e->kind != DW_Y_SEQ || e->len != 2) {
			char got[80];
			dw_ydescribe(e, got, sizeof got);
			return dw_yerr(ld->err, e, ep, "expected a [theta, phi] pair, got %s",
				e->kind == DW_Y_SEQ ? "a list of another length" : got);
		}
		for (int k = 0; k < 2; k++) {
			dw_ypath_index(cp, sizeof cp, ep, (size_t)k);
			if (dw_yget_real(e->item[k], cp, &p->product[i][k], ld->err))
				return ld->err->status;
		}
	}
	return DW_OK;
}

static int read_rhs(loader *ld, const dw_ynode *map)
{
	dw_problem *p = ld->p;
	int which;
	if (dw_yexpect_map(map, "rhs", ld->err)
			|| dw_ycheck_keys(map, "rhs", rhs_alts, ld->err)
			|| pick_one(map, "rhs", rhs_alts, &which, ld->err))
		return ld->err->status;
	const dw_ynode *v = dw_ymap_get(map, rhs_alts[which], NULL);
	char path[64];
	dw_ypath_key(path, sizeof path, "rhs", rhs_alts[which]);
	p->rhs_kind = (dw_rhs_kind)which;
	switch (p->rhs_kind) {
	case DW_RHS_AMPLITUDES:
		return read_amplitudes(ld, v, path);
	case DW_RHS_FILE:
		return read_rhs_file(ld, v, path);
	case DW_RHS_BASIS: {
		int64_t k;
		if (dw_yget_int(v, path, 0, ld->dim - 1, "a basis index below the "
				"matrix size", &k, ld->err))
			return ld->err->status;
		p->basis = (uint64_t)k;
		return DW_OK;
	}
	case DW_RHS_UNIFORM: {
		bool on;
		if (dw_yget_bool(v, path, &on, ld->err))
			return ld->err->status;
		if (!on)
			return dw_yerr(ld->err, v, path, "only 'true' is meaningful; pick "
				"another rhs kind instead");
		return DW_OK;
	}
	case DW_RHS_PRODUCT:
		return read_product(ld, v, path);
	case DW_RHS_CIRCUIT:
		return resolve_path(ld, v, path, &p->rhs_file);
	}
	return DW_OK;
}

/* ---- the smaller sections ---- */

static int read_schedule(loader *ld, const dw_ynode *map)
{
	static const char *const keys[] = {
		"kind", "path", "power", "points", "steps", "seed", "kappa", NULL
	};
	static const char *const kinds[] = {"randomized", "adiabatic", NULL};
	static const char *const paths[] = {"gap-adapted", "linear", "power", "list", NULL};
	dw_problem *p = ld->p;
	dw_error *err = ld->err;
	if (dw_ynode_is_null(map))
		return DW_OK;
	if (dw_yexpect_map(map, "schedule", err) || dw_ycheck_keys(map, "schedule", keys, err))
		return err->status;
	const dw_ynode *v;
	int e;
	if ((v = dw_ymap_get(map, "kind", NULL))) {
		if (dw_yget_enum(v, "schedule.kind", kinds, &e, err))
			return err->status;
		p->sched_kind = (dw_sched_kind)e;
	}
	if ((v = dw_ymap_get(map, "path", NULL))) {
		if (dw_yget_enum(v, "schedule.path", paths, &e, err))
			return err->status;
		p->path_kind = (dw_path_kind)e;
	}
	if ((v = dw_ymap_get(map, "power", NULL))) {
		if (dw_yget_real(v, "schedule.power", &p->power, err))
			return err->status;
		if (!(p->power > 0))
			return dw_yerr(err, v, "schedule.power", "must be positive, got %s", v->text);
	}
	if ((v = dw_ymap_get(map, "points", NULL))) {
		if (dw_yexpect_seq(v, "schedule.points", err))
			return err->status;
		if (v->len == 0)
			return dw_yerr(err, v, "schedule.points", "needs at least one point");
		p->points = dw_alloc(err, v->len, sizeof *p->points);
		if (!p->points)
			return err->status;
		p->npoints = v->len;
		for (size_t i = 0; i < v->len; i++) {
			char ip[64];
			dw_ypath_index(ip, sizeof ip, "schedule.points", i);
			double s;
			if (dw_yget_real(v->item[i], ip, &s, err))
				return err->status;
			if (!(s > 0 && s <= 1))
				return dw_yerr(err, v->item[i], ip, "must lie in (0, 1], got %s",
					v->item[i]->text);
			if (i > 0 && !(s > p->points[i - 1]))
				return dw_yerr(err, v->item[i], ip, "points must increase strictly "
					"(%s after %.17g)", v->item[i]->text, p->points[i - 1]);
			p->points[i] = s;
		}
		if (p->points[v->len - 1] != 1.0)
			return dw_yerr(err, v, "schedule.points", "the last point must be 1");
	} else if (p->path_kind == DW_PATH_LIST) {
		return dw_yerr(err, map, "schedule.points", "missing: path 'list' needs "
			"the list of points");
	}
	if ((v = dw_ymap_get(map, "steps", NULL)) && read_steps(ld, v, "schedule.steps", &p->steps))
		return err->status;
	if ((v = dw_ymap_get(map, "seed", NULL)) && dw_yget_uint64(v, "schedule.seed", &p->seed, err))
		return err->status;
	if ((v = dw_ymap_get(map, "kappa", NULL)) && !dw_yis_auto(v)) {
		double k;
		if (dw_yget_real(v, "schedule.kappa", &k, err))
			return err->status;
		if (!(k >= 1) || k > 1e12)
			return dw_yerr(err, v, "schedule.kappa", "a condition-number bound "
				"lies in [1, 1e12], got %s", v->text);
		p->kappa_user = k;
	}
	return DW_OK;
}

static int read_formula(loader *ld, const dw_ynode *map)
{
	static const char *const keys[] = {"order", "steps", "bound", NULL};
	static const char *const orders[] = {"1", "2", "4", "6", "8", NULL};
	static const int order_value[] = {1, 2, 4, 6, 8};
	static const char *const bounds[] = {"commutator", "norm", NULL};
	dw_problem *p = ld->p;
	dw_error *err = ld->err;
	if (dw_ynode_is_null(map))
		return DW_OK;
	if (dw_yexpect_map(map, "formula", err) || dw_ycheck_keys(map, "formula", keys, err))
		return err->status;
	const dw_ynode *v;
	int e;
	if ((v = dw_ymap_get(map, "order", NULL))) {
		if (dw_yget_enum(v, "formula.order", orders, &e, err))
			return err->status;
		p->order = order_value[e];
	}
	if ((v = dw_ymap_get(map, "steps", NULL)) && read_steps(ld, v, "formula.steps", &p->formula_steps))
		return err->status;
	if ((v = dw_ymap_get(map, "bound", NULL))) {
		if (dw_yget_enum(v, "formula.bound", bounds, &e, err))
			return err->status;
		p->bound = (dw_bound_kind)e;
	}
	return DW_OK;
}

static int read_target(loader *ld, const dw_ynode *map)
{
	static const char *const keys[] = {"gates", "uncompute", NULL};
	static const char *const gates[] = {"continuous", "clifford+t", NULL};
	static const char *const uncompute[] = {"unitary", "measure", NULL};
	dw_error *err = ld->err;
	if (dw_ynode_is_null(map))
		return DW_OK;
	if (dw_yexpect_map(map, "target", err) || dw_ycheck_keys(map, "target", keys, err))
		return err->status;
	const dw_ynode *v;
	int e;
	if ((v = dw_ymap_get(map, "gates", NULL))) {
		if (dw_yget_enum(v, "target.gates", gates, &e, err))
			return err->status;
		ld->p->gates = (dw_gates_kind)e;
	}
	if ((v = dw_ymap_get(map, "uncompute", NULL))) {
		if (dw_yget_enum(v, "target.uncompute", uncompute, &e, err))
			return err->status;
		ld->p->uncompute = (dw_uncompute_kind)e;
	}
	return DW_OK;
}

static int read_oracle(loader *ld, const dw_ynode *map)
{
	static const char *const keys[] = {"value_bits", "lookup", NULL};
	static const char *const lookups[] = {"unary", "select-swap", NULL};
	dw_error *err = ld->err;
	if (dw_ynode_is_null(map))
		return DW_OK;
	if (dw_yexpect_map(map, "oracle", err) || dw_ycheck_keys(map, "oracle", keys, err))
		return err->status;
	const dw_ynode *v;
	if ((v = dw_ymap_get(map, "value_bits", NULL)) && !dw_yis_auto(v)) {
		int64_t bits;
		if (dw_yget_int(v, "oracle.value_bits", 1, 52, "an integer or 'auto'",
				&bits, err))
			return err->status;
		ld->p->value_bits = (int)bits;
	}
	if ((v = dw_ymap_get(map, "lookup", NULL))) {
		int e;
		if (dw_yget_enum(v, "oracle.lookup", lookups, &e, err))
			return err->status;
		ld->p->lookup = (dw_lookup_kind)e;
	}
	return DW_OK;
}

static int read_name(loader *ld, const dw_ynode *v)
{
	dw_problem *p = ld->p;
	if (v) {
		if (dw_yget_string(v, "name", &p->name, ld->err))
			return ld->err->status;
		size_t len = strlen(p->name);
		if (len > 200)
			return dw_yerr(ld->err, v, "name", "at most 200 characters, got %zu", len);
		for (size_t i = 0; i < len; i++)
			if ((unsigned char)p->name[i] < 0x20 || p->name[i] == 0x7f)
				return dw_yerr(ld->err, v, "name", "control characters are not "
					"allowed");
		return DW_OK;
	}
	/* the file's base name without .yaml / .yml */
	const char *base = strrchr(p->path, '/');
	base = base ? base + 1 : p->path;
	p->name = copy_string(base, ld->err);
	if (!p->name)
		return ld->err->status;
	size_t len = strlen(p->name);
	if (len > 5 && !strcmp(p->name + len - 5, ".yaml"))
		p->name[len - 5] = '\0';
	else if (len > 4 && !strcmp(p->name + len - 4, ".yml"))
		p->name[len - 4] = '\0';
	return DW_OK;
}

static int interpret(loader *ld, const dw_ynode *root)
{
	dw_problem *p = ld->p;
	dw_error *err = ld->err;
	if (dw_yexpect_map(root, "", err) || dw_ycheck_keys(root, "", top_keys, err))
		return err->status;
	if (read_name(ld, dw_ymap_get(root, "name", NULL)))
		return err->status;
	const dw_ynode *matrix = dw_ymap_get(root, "matrix", NULL);
	if (!matrix)
		return dw_yerr(err, root, "matrix", "missing required key (give one of "
			"file, stencil, pauli)");
	if (read_matrix(ld, matrix))
		return err->status;
	const dw_ynode *rhs = dw_ymap_get(root, "rhs", NULL);
	if (!rhs)
		return dw_yerr(err, root, "rhs", "missing required key (give one of "
			"amplitudes, file, basis, uniform, product, circuit)");
	if (read_rhs(ld, rhs))
		return err->status;
	const dw_ynode *v = dw_ymap_get(root, "precision", NULL);
	if (v) {
		if (dw_yget_real(v, "precision", &p->precision, err))
			return err->status;
		if (!(p->precision > 0 && p->precision < 1))
			return dw_yerr(err, v, "precision", "must lie strictly between 0 and "
				"1, got %s", v->text);
	}
	if (read_schedule(ld, dw_ymap_get(root, "schedule", NULL))
			|| read_formula(ld, dw_ymap_get(root, "formula", NULL))
			|| read_target(ld, dw_ymap_get(root, "target", NULL))
			|| read_oracle(ld, dw_ymap_get(root, "oracle", NULL)))
		return err->status;
	return dw_budget_from_ynode(dw_ymap_get(root, "budget", NULL), "budget",
		&p->budget, err);
}

/* ---- entry points ---- */

int dw_problem_load(const char *path, const char *const *sets, size_t nsets,
	dw_problem *out, dw_error *err)
{
	dw_error local = {0};
	if (!err)
		err = &local;
	memset(out, 0, sizeof *out);
	if (!path)
		return dw_fail(err, DW_EINTERNAL, "dw_problem_load: no path");
	out->precision = 0.05;
	out->power = 1.5;
	out->seed = 1;
	out->order = 2;
	out->path = copy_string(path, err);
	if (!out->path)
		return err->status;
	loader ld = {.p = out, .err = err, .yaml_path = path};
	char **labels = dw_alloc(err, nsets, sizeof *labels);
	dw_ynode *root = labels ? dw_yaml_parse_file(path, out->path, err) : NULL;
	for (size_t i = 0; root && i < nsets && err->status == DW_OK; i++) {
		size_t len = strlen(sets[i]);
		labels[i] = dw_alloc(err, len + 7, 1);
		if (!labels[i])
			break;
		snprintf(labels[i], len + 7, "--set %s", sets[i]);
		dw_yaml_override(root, sets[i], labels[i], exclusive, err);
	}
	if (root && err->status == DW_OK)
		interpret(&ld, root);
	dw_ynode_free(root);
	for (size_t i = 0; labels && i < nsets; i++)
		free(labels[i]);
	free(labels);
	if (err->status != DW_OK) {
		dw_problem_free(out);
		return err->status;
	}
	return DW_OK;
}

void dw_problem_free(dw_problem *p)
{
	if (!p)
		return;
	free(p->path);
	free(p->name);
	for (size_t i = 0; p->pauli && i < p->npauli; i++)
		free(p->pauli[i].ops);
	free(p->pauli);
	free(p->matrix_file);
	if (p->matrix)
		dw_csr_free(p->matrix);
	free(p->stencil.offset);
	free(p->stencil.coeff);
	free(p->amps);
	free(p->product);
	free(p->rhs_file);
	free(p->points);
	memset(p, 0, sizeof *p);
}
