/* sparse.c - terms of X_anc (x) [X_sgn (x)] A/alpha for explicit sparse
 * matrices (DESIGN 6, docs/sparse-oracles.md).
 * Takes: an analysed problem (p->matrix Hermitian, 2^n rows).  Gives: one
 * dw_term per colour of a bipartite edge colouring of the graph of
 * X_anc (x) A, each a definition of exp(-i theta/2 T_c) built from a table
 * lookup (partner, fixed-point value), a controlled swap, value-controlled
 * rotations on anc, and the inverse swap and lookup.
 *
 * Colouring: the nonzero A[j][k] is the edge (row j, column k) of the
 * bipartite graph whose two sides are |0>_anc|j> and |1>_anc|k>; a proper
 * colouring with d colours (d = the maximum row or column count; König's
 * edge-colouring theorem) is found by the classical alternating-path
 * recolouring.  A colour is a partial permutation k = pi(j), and
 * T_c = |0><1| (x) B_c + |1><0| (x) B_c^dagger with B_c[j][pi(j)] =
 * A[j][pi(j)]: the pairs {|0,j>, |1,pi(j)>} are disjoint, so T_c is
 * 1-sparse, diagonal entries (k = j) need nothing special, and
 * sum_c T_c = X_anc (x) A for Hermitian A.
 *
 * Circuit of colour c (on anc, [sgn], sys; scratch P (n qubits) and V):
 *   lookup  |a, j>|0>|0> -> |a, j>|q>|v>  with index l = j + 2^n a,
 *           q = pi(j) (a = 0) or pi^-1(j) (a = 1), v the value of the pair;
 *   cswap   (anc; sys, P): both members of a pair become |a>|j>|pi(j)>;
 *   rotate  on anc, restricted to the pair: x X - y Y for A[j][pi(j)] =
 *           x + iy; real values: rx(theta v_i w_i) controlled by bit i of
 *           v (two's complement weights w_i); complex values in polar form
 *           r e^{i phi}: rz(phi) rx(theta r) rz(-phi), each by bits; a
 *           controlled rz is rz, cx, rz, cx and rx = h rz h;
 *           variant I: cx(anc -> sgn) around the rotations makes it
 *           (x X - y Y) (x) X_sgn;
 *   then the cswap and the lookup again (inverse).
 * Fixed point: per colour a power-of-two step u (unscaled units) with
 * max |value| / u <= 2^(b-1) - 1 (real, two's complement b bits) or
 * <= 2^b - 1 (magnitude, unsigned); phase phi = pi q / 2^(b-1), q two's
 * complement b bits.  The loaded matrix A' differs from A by at most
 * ||A' - A||_2 <= sqrt(max row sum * max column sum of |A' - A|); then
 * mu = ||A' - A|| / sigma_min and the normalised solution moves by at most
 * 2 mu / (1 - mu) (the standard perturbation bound of a linear system,
 * ||dx||/||x|| <= mu / (1 - mu), doubled for normalisation).  Auto
 * value_bits is the smallest b whose bound is within eps_data. */
#include <complex.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/program.h"
#include "dwell/sparse.h"

#define MAX_VALUE_BITS 52

/* ---- colouring ---- */

typedef struct colouring {
	int64_t dim;
	uint32_t d;
	int64_t *at_row;          /* at_row[j*d + c]: column matched to row j in c, -1 */
	int64_t *at_col;          /* at_col[k*d + c]: row matched to column k in c, -1 */
} colouring;

static uint32_t free_colour(const int64_t *at, int64_t v, uint32_t d)
{
	for (uint32_t c = 0; c < d; c++)
		if (at[v * (int64_t)d + c] < 0)
			return c;
	return d;
}

/* Swap colours a and b along the alternating path that starts at column k
 * with colour a (column k has a, lacks b). */
static void flip_path(colouring *g, int64_t k, uint32_t a, uint32_t b)
{
	int64_t d = g->d;
	/* walk: column k --a--> row r1 --b--> column k2 --a--> ... */
	int64_t v = k;
	bool at_column = true;
	uint32_t cur = a;
	/* collect the path first, then recolour */
	size_t n = 0, cap = 16;
	int64_t (*path)[2] = malloc(cap * sizeof *path);    /* (row, column) */
	if (!path)
		return;
	for (;;) {
		int64_t u = at_column ? g->at_col[v * d + cur] : g->at_row[v * d + cur];
		if (u < 0)
			break;
		if (n == cap) {
			cap *= 2;
			int64_t (*np)[2] = realloc(path, cap * sizeof *np);
			if (!np)
				break;
			path = np;
		}
		path[n][0] = at_column ? u : v;
		path[n][1] = at_column ? v : u;
		n++;
		v = u;
		at_column = !at_column;
		cur = cur == a ? b : a;
	}
	/* edge i has colour a when i even, b when odd: swap them */
	for (size_t i = 0; i < n; i++) {
		uint32_t was = i % 2 == 0 ? a : b;
		g->at_row[path[i][0] * d + was] = -1;
		g->at_col[path[i][1] * d + was] = -1;
	}
	for (size_t i = 0; i < n; i++) {
		uint32_t now = i % 2 == 0 ? b : a;
		g->at_row[path[i][0] * d + now] = path[i][1];
		g->at_col[path[i][1] * d + now] = path[i][0];
	}
	free(path);
}

static int colour_edges(const dw_csr *m, colouring *g, dw_error *e)
{
	int64_t dim = m->rows;
	int64_t *deg_col = dw_alloc(e, (size_t)dim, sizeof *deg_col);
	if (!deg_col)
		return e->status;
	uint32_t d = 0;
	for (int64_t j = 0; j < dim; j++) {
		int64_t r = 0;
		for (int64_t k = m->rowptr[j]; k < m->rowptr[j + 1]; k++)
			if (m->val[k] != 0) {
				r++;
				deg_col[m->col[k]]++;
			}
		if (r > (int64_t)d)
			d = (uint32_t)r;
	}
	for (int64_t k = 0; k < dim; k++)
		if (deg_col[k] > (int64_t)d)
			d = (uint32_t)deg_col[k];
	free(deg_col);
	g->dim = dim;
	g->d = d;
	if (d == 0)
		return DW_OK;
	if ((uint64_t)dim > SIZE_MAX / d / sizeof(int64_t))
		return dw_fail(e, DW_EINPUT, "matrix too large to colour");
	g->at_row = dw_alloc(e, (size_t)dim * d, sizeof *g->at_row);
	g->at_col = dw_alloc(e, (size_t)dim * d, sizeof *g->at_col);
	if (!g->at_row || !g->at_col)
		return e->status;
	memset(g->at_row, 0xff, (size_t)dim * d * sizeof *g->at_row);
	memset(g->at_col, 0xff, (size_t)dim * d * sizeof *g->at_col);
	for (int64_t j = 0; j < dim; j++)
		for (int64_t t = m->rowptr[j]; t < m->rowptr[j + 1]; t++) {
			if (m->val[t] == 0)
				continue;
			int64_t k = m->col[t];
			uint32_t a = free_colour(g->at_row, j, d);
			uint32_t b = free_colour(g->at_col, k, d);
			if (a == d || b == d)
				return dw_fail(e, DW_EINTERNAL, "internal: colouring ran out of colours");
			if (g->at_col[k * d + a] >= 0)
				flip_path(g, k, a, b);
			if (g->at_col[k * d + a] >= 0 || g->at_row[j * d + a] >= 0)
				return dw_fail(e, DW_EINTERNAL, "internal: colouring path flip failed");
			g->at_row[j * d + a] = k;
			g->at_col[k * d + a] = j;
		}
	return DW_OK;
}

/* ---- fixed point ---- */

/* The power-of-two step with max/u <= qmax (max > 0). */
static double step_for(double max, double qmax)
{
	int ex;
	frexp(max / qmax, &ex);
	double u = ldexp(1.0, ex);
	while (u / 2 > 0 && max / (u / 2) <= qmax)
		u /= 2;
	while (max / u > qmax)
		u *= 2;
	return u;
}

typedef struct fixed {
	int64_t q, qphase;        /* value (or magnitude) and phase integers */
} fixed;

static double colour_max(const dw_sparse_colour *col, bool cplx)
{
	double m = 0;
	for (int64_t k = 0; k < col->nedges; k++)
		m = fmax(m, cplx ? cabs(col->val[k]) : fabs(creal(col->val[k])));
	return m;
}

static double colour_step(const dw_sparse_colour *col, bool cplx, int b)
{
	double m = colour_max(col, cplx);
	if (m == 0)
		return 1.0;
	double qmax = cplx ? ldexp(1.0, b) - 1 : ldexp(1.0, b - 1) - 1;
	return step_for(m, qmax);
}

static fixed encode(double complex v, bool cplx, int b, double u)
{
	fixed f = {0, 0};
	if (!cplx) {
		double qmax = ldexp(1.0, b - 1) - 1;
		f.q = (int64_t)fmin(qmax, fmax(-qmax, nearbyint(creal(v) / u)));
		return f;
	}
	double qmax = ldexp(1.0, b) - 1;
	f.q = (int64_t)fmin(qmax, nearbyint(cabs(v) / u));
	double half = ldexp(1.0, b - 1);
	double qp = nearbyint(carg(v) / M_PI * half);
	if (qp >= half)
		qp -= 2 * half;
	f.qphase = (int64_t)qp;
	return f;
}

static double complex decode(fixed f, bool cplx, int b, double u)
{
	if (!cplx)
		return u * (double)f.q;
	return u * (double)f.q * cexp(I * M_PI * (double)f.qphase / ldexp(1.0, b - 1));
}

/* The error bound of b bits: fills delta_norm and data_error. */
static int rounding_error(const dw_problem *p, dw_sparse_plan *pl, int b, double *delta,
	double *err, dw_error *e)
{
	int64_t dim = pl->dim;
	double *rs = dw_alloc(e, (size_t)dim, sizeof *rs);
	double *cs = dw_alloc(e, (size_t)dim, sizeof *cs);
	if (!rs || !cs) {
		free(rs);
		free(cs);
		return e->status;
	}
	for (uint32_t c = 0; c < pl->ncolours; c++) {
		const dw_sparse_colour *col = &pl->colour[c];
		double u = colour_step(col, pl->complex_values, b);
		for (int64_t k = 0; k < col->nedges; k++) {
			fixed f = encode(col->val[k], pl->complex_values, b, u);
			double d = cabs(decode(f, pl->complex_values, b, u) - col->val[k]);
			rs[col->row[k]] += d;
			cs[col->col[k]] += d;
		}
	}
	double mr = 0, mc = 0;
	for (int64_t i = 0; i < dim; i++) {
		mr = fmax(mr, rs[i]);
		mc = fmax(mc, cs[i]);
	}
	free(rs);
	free(cs);
	*delta = sqrt(mr * mc);
	double mu = *delta / p->sigma_min;
	*err = mu < 1 ? 2 * mu / (1 - mu) : INFINITY;
	return DW_OK;
}

void dw_sparse_plan_free(dw_sparse_plan *pl)
{
	if (!pl)
		return;
	for (uint32_t c = 0; pl->colour && c < pl->ncolours; c++) {
		free(pl->colour[c].row);
		free(pl->colour[c].col);
		free(pl->colour[c].val);
	}
	free(pl->colour);
	memset(pl, 0, sizeof *pl);
}

int dw_sparse_plan_make(const dw_problem *p, dw_sparse_plan *pl, dw_error *e)
{
	memset(pl, 0, sizeof *pl);
	const dw_csr *m = p->matrix;
	if (!p->analysed || !m || p->n < 1 || p->n > 30 || m->rows != ((int64_t)1 << p->n)
		|| m->cols != m->rows)
		return dw_fail(e, DW_EINTERNAL, "internal: sparse lowering needs the analysed "
			"2^n-row matrix");
	pl->n = p->n;
	pl->dim = m->rows;
	colouring g = {0};
	int rc = colour_edges(m, &g, e);
	if (rc) {
		free(g.at_row);
		free(g.at_col);
		return rc;
	}
	pl->ncolours = g.d;
	pl->colour = calloc(g.d ? g.d : 1, sizeof *pl->colour);
	if (!pl->colour) {
		free(g.at_row);
		free(g.at_col);
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	}
	for (int64_t k = 0; k < m->nnz; k++)
		if (cimag(m->val[k]) != 0)
			pl->complex_values = true;
	/* per colour edge lists, in row order; values from the CSR */
	for (uint32_t c = 0; c < g.d && !rc; c++) {
		dw_sparse_colour *col = &pl->colour[c];
		int64_t cnt = 0;
		for (int64_t j = 0; j < pl->dim; j++)
			cnt += g.at_row[j * g.d + c] >= 0;
		col->row = dw_alloc(e, (size_t)cnt + 1, sizeof *col->row);
		col->col = dw_alloc(e, (size_t)cnt + 1, sizeof *col->col);
		col->val = dw_alloc(e, (size_t)cnt + 1, sizeof *col->val);
		if (!col->row || !col->col || !col->val) {
			rc = e->status;
			break;
		}
		for (int64_t j = 0; j < pl->dim; j++) {
			int64_t k = g.at_row[j * g.d + c];
			if (k < 0)
				continue;
			double complex v = 0;
			for (int64_t t = m->rowptr[j]; t < m->rowptr[j + 1]; t++)
				if (m->col[t] == k)
					v += m->val[t];
			col->row[col->nedges] = j;
			col->col[col->nedges] = k;
			col->val[col->nedges++] = v;
		}
	}
	free(g.at_row);
	free(g.at_col);
	if (rc) {
		dw_sparse_plan_free(pl);
		return rc;
	}
	dw_error_budget bud;
	dw_error_budget_split(p, &bud);
	pl->eps_data = bud.data;
	int bmin = 2;
	if (p->value_bits > 0) {
		if (p->value_bits < bmin || p->value_bits > MAX_VALUE_BITS) {
			dw_sparse_plan_free(pl);
			return dw_fail(e, DW_EINPUT, "%s: oracle.value_bits: %d is outside [%d, %d]",
				p->path, p->value_bits, bmin, MAX_VALUE_BITS);
		}
		pl->value_bits = p->value_bits;
		rc = rounding_error(p, pl, pl->value_bits, &pl->delta_norm, &pl->data_error, e);
	} else {
		pl->value_bits_auto = true;
		for (int b = bmin; b <= MAX_VALUE_BITS && !rc; b++) {
			rc = rounding_error(p, pl, b, &pl->delta_norm, &pl->data_error, e);
			pl->value_bits = b;
			if (!rc && pl->data_error <= pl->eps_data)
				break;
		}
		if (!rc && pl->data_error > pl->eps_data)
			rc = dw_fail(e, DW_EINPUT, "%s: oracle.value_bits: even %d bits leave a data "
				"error bound of %.3g above its share %.3g of the precision", p->path,
				MAX_VALUE_BITS, pl->data_error, pl->eps_data);
	}
	if (rc) {
		dw_sparse_plan_free(pl);
		return rc;
	}
	int b = pl->value_bits;
	for (uint32_t c = 0; c < pl->ncolours; c++) {
		dw_sparse_colour *col = &pl->colour[c];
		double u = colour_step(col, pl->complex_values, b);
		double mx = 0;
		for (int64_t k = 0; k < col->nedges; k++)
			mx = fmax(mx, cabs(decode(encode(col->val[k], pl->complex_values, b, u),
				pl->complex_values, b, u)));
		col->norm = mx / p->alpha;
	}
	pl->lookup_width = (uint32_t)pl->n + (uint32_t)b * (pl->complex_values ? 2u : 1u);
	if (p->lookup == DW_LOOKUP_SELECT_SWAP) {
		/* block 2^k near sqrt(L / width) (at least 2 words) */
		double L = ldexp(1.0, pl->n + 1);
		int k = (int)lround(0.5 * log2(L / pl->lookup_width));
		if (k < 1)
			k = 1;
		if (k > pl->n + 1)
			k = pl->n + 1;
		pl->block_log2 = (uint32_t)k;
	}
	return DW_OK;
}

double complex dw_sparse_loaded(const dw_sparse_plan *pl, uint32_t c, int64_t k)
{
	const dw_sparse_colour *col = &pl->colour[c];
	double u = colour_step(col, pl->complex_values, pl->value_bits);
	return decode(encode(col->val[k], pl->complex_values, pl->value_bits, u),
		pl->complex_values, pl->value_bits, u);
}

static void put_bits(uint64_t *word, uint32_t pos, uint32_t nbits, uint64_t v)
{
	for (uint32_t i = 0; i < nbits; i++)
		if ((v >> i) & 1)
			word[(pos + i) / 64] |= (uint64_t)1 << ((pos + i) % 64);
}

uint64_t *dw_sparse_table(const dw_problem *p, const dw_sparse_plan *pl, uint32_t c,
	dw_table *out, dw_error *e)
{
	(void)p;
	int b = pl->value_bits;
	uint32_t n = (uint32_t)pl->n;
	uint64_t L = (uint64_t)pl->dim * 2;
	uint32_t words = (pl->lookup_width + 63) / 64;
	uint64_t *bits = dw_alloc(e, (size_t)(L * words), sizeof *bits);
	if (!bits)
		return NULL;
	const dw_sparse_colour *col = &pl->colour[c];
	double u = colour_step(col, pl->complex_values, b);
	uint64_t mask = b >= 64 ? ~0ULL : (((uint64_t)1 << b) - 1);
	for (int64_t k = 0; k < col->nedges; k++) {
		fixed f = encode(col->val[k], pl->complex_values, b, u);
		uint64_t j = (uint64_t)col->row[k], q = (uint64_t)col->col[k];
		for (int side = 0; side < 2; side++) {
			uint64_t l = side ? q + (uint64_t)pl->dim : j;
			uint64_t *w = bits + l * words;
			put_bits(w, 0, n, side ? j : q);
			put_bits(w, n, (uint32_t)b, (uint64_t)f.q & mask);
			if (pl->complex_values)
				put_bits(w, n + (uint32_t)b, (uint32_t)b, (uint64_t)f.qphase & mask);
		}
	}
	out->L = L;
	out->width = pl->lookup_width;
	out->words = words;
	out->bits = bits;
	return bits;
}

/* Controlled rz(angle) on tgt: rz(angle/2), cx, rz(-angle/2), cx (exactly
 * crz, global phase included; common practice).  Plain rz and cx keep the
 * term lowerable to Clifford+T. */
static void ctrl_rz(dw_builder *b, uint32_t ctl, uint32_t tgt, dw_expr angle)
{
	dw_r1(b, DW_G_RZ, tgt, dw_expr_scale(angle, 0.5));
	dw_g2(b, DW_G_CX, ctl, tgt);
	dw_r1(b, DW_G_RZ, tgt, dw_expr_scale(angle, -0.5));
	dw_g2(b, DW_G_CX, ctl, tgt);
}

/* cswap(ctl; x_i, y_i) for i < n: arguments ctl, x[n], y[n]. */
static uint32_t pair_swap_def(dw_circuit *c, uint32_t n, dw_error *e)
{
	dw_builder *b = dw_begin(c, "pair_swap", 1 + 2 * n, 0, DW_STAGE_ARITH);
	for (uint32_t i = 0; i < n; i++)
		dw_g3(b, DW_G_CSWAP, 0, 1 + i, 1 + n + i);
	return dw_end(b, e);
}

uint32_t dw_sparse_term_def(dw_circuit *c, const dw_problem *p, const dw_sparse_plan *pl,
	uint32_t colour, bool with_sgn, dw_error *e)
{
	uint32_t n = (uint32_t)pl->n;
	int bits = pl->value_bits;
	bool cplx = pl->complex_values;
	bool measure = p->uncompute == DW_UNCOMPUTE_MEASURE;
	dw_table t;
	uint64_t *data = dw_sparse_table(p, pl, colour, &t, e);
	if (!data)
		return DW_NO_DEF;
	uint32_t look;
	if (pl->block_log2) {
		look = dw_lookup_select_swap_def(c, n + 1, &t, pl->block_log2, measure, e);
	} else {
		look = dw_lookup_unary_def(c, n + 1, &t, false, measure, e);
	}
	free(data);
	if (look == DW_NO_DEF)
		return DW_NO_DEF;
	uint32_t swp = pair_swap_def(c, n, e);
	if (swp == DW_NO_DEF)
		return DW_NO_DEF;

	uint32_t anc = 0, sgn = 1, sys0 = with_sgn ? 2 : 1;
	uint32_t nargs = sys0 + n;
	dw_builder *b = dw_begin(c, "sparse_term", nargs, 1, DW_STAGE_TERM);
	uint32_t outw = t.width;
	uint32_t out0 = dw_add_ancillas(b, outw);
	uint32_t P = out0, V = out0 + n, PH = out0 + n + (uint32_t)bits;
	uint32_t *q = malloc((size_t)(n + 1 + outw) * sizeof *q);
	if (!q) {
		dw_end(b, NULL);
		dw_fail(e, DW_EINTERNAL, "out of memory");
		return DW_NO_DEF;
	}
	for (uint32_t i = 0; i < n; i++)
		q[i] = sys0 + i;
	q[n] = anc;
	for (uint32_t i = 0; i < outw; i++)
		q[n + 1 + i] = out0 + i;
	uint32_t sq[1 + 2 * 32];
	sq[0] = anc;
	for (uint32_t i = 0; i < n; i++) {
		sq[1 + i] = sys0 + i;
		sq[1 + n + i] = P + i;
	}
	dw_call(b, look, q, NULL, 1);
	dw_call(b, swp, sq, NULL, 1);
	if (with_sgn)
		dw_g2(b, DW_G_CX, anc, sgn);
	double u = colour_step(&pl->colour[colour], cplx, bits);
	double half = ldexp(1.0, bits - 1);
	if (cplx)
		for (int i = 0; i < bits; i++) {
			double w = i == bits - 1 ? -half : ldexp(1.0, i);
			ctrl_rz(b, PH + (uint32_t)i, anc, dw_const(M_PI * w / half));
		}
	dw_g1(b, DW_G_H, anc);              /* rx = h rz h */
	for (int i = 0; i < bits; i++) {
		double w = (!cplx && i == bits - 1) ? -half : ldexp(1.0, i);
		ctrl_rz(b, V + (uint32_t)i, anc, dw_par(0, u * w / p->alpha));
	}
	dw_g1(b, DW_G_H, anc);
	if (cplx)
		for (int i = 0; i < bits; i++) {
			double w = i == bits - 1 ? -half : ldexp(1.0, i);
			ctrl_rz(b, PH + (uint32_t)i, anc, dw_const(-M_PI * w / half));
		}
	if (with_sgn)
		dw_g2(b, DW_G_CX, anc, sgn);
	dw_call(b, swp, sq, NULL, 1);
	dw_call(b, look, q, NULL, 1);      /* a lookup is its own inverse */
	free(q);
	return dw_end(b, e);
}

int dw_sparse_terms(const dw_problem *p, const dw_layout *lay, dw_circuit *c,
	dw_term **terms, size_t *nterms, dw_error *e)
{
	if (lay->n != (uint32_t)p->n || p->n > 30 || lay->sys0 + lay->n > 64)
		return dw_fail(e, DW_EINTERNAL, "internal: sparse terms: layout mismatch");
	dw_sparse_plan pl;
	if (dw_sparse_plan_make(p, &pl, e))
		return e->status;
	bool ind = lay->variant == 'I';
	int rc = DW_OK;
	for (uint32_t col = 0; col < pl.ncolours && rc == DW_OK; col++) {
		if (pl.colour[col].norm == 0)
			continue;
		uint32_t def = dw_sparse_term_def(c, p, &pl, col, ind, e);
		if (def == DW_NO_DEF) {
			rc = e->status;
			break;
		}
		dw_term *nt = realloc(*terms, (*nterms + 1) * sizeof *nt);
		if (!nt) {
			rc = dw_fail(e, DW_EINTERNAL, "out of memory (terms)");
			break;
		}
		*terms = nt;
		dw_term *t = &nt[(*nterms)++];
		memset(t, 0, sizeof *t);
		t->pauli = false;
		t->ca = 0;
		t->cb = 1;
		t->norm = pl.colour[col].norm;
		t->def = def;
		uint32_t k = 0;
		t->q[k++] = lay->anc;
		if (ind)
			t->q[k++] = lay->sgn;
		for (uint32_t i = 0; i < lay->n; i++)
			t->q[k++] = lay->sys0 + i;
		t->nq = k;
	}
	dw_sparse_plan_free(&pl);
	return rc;
}
