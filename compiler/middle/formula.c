/* formula.c - product formulas over the terms of H(s) = (K + R K R) / 2.
 * Takes: the terms K_k of K(s)/2 (Pauli strings with s-dependent
 * coefficients), the order, a time step.  Gives:
 *  - the exponentials of one step as items (group: 0 = K_k, 1 = R K_k R;
 *    term; fraction of the step), built by Lie-Trotter (order 1), Strang
 *    (order 2) and the Suzuki recursion S_2k(t) = S(u t)^2 S((1-4u) t)
 *    S(u t)^2 with u = 1/(4 - 4^(1/(2k-1))) ("General theory of fractal
 *    path integrals with applications to many-body theories and
 *    statistical physics", J. Math. Phys. 32, 400, 1991), neighbouring
 *    exponentials of the same term merged;
 *  - error bounds per step: the commutator bounds of "Theory of Trotter
 *    error with commutator scaling", Phys. Rev. X 11, 011020 (2021) for
 *    orders 1 and 2, and the always-valid Taylor norm bound
 *    2 (beta t)^(p+1) / (p+1)! e^(beta t) otherwise (METHODS 4);
 *  - the smallest r with r * bound(t / r) <= eps. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/formula.h"

static int push(dw_items *it, int group, uint32_t term, double frac)
{
	if (it->n && it->v[it->n - 1].group == group && it->v[it->n - 1].term == term) {
		it->v[it->n - 1].frac += frac;
		return 0;
	}
	if (it->n == it->cap) {
		size_t nc = it->cap ? it->cap * 2 : 64;
		dw_item *v = realloc(it->v, nc * sizeof *v);
		if (!v)
			return -1;
		it->v = v;
		it->cap = nc;
	}
	it->v[it->n++] = (dw_item){group, term, frac};
	return 0;
}

static int strang(dw_items *it, uint32_t m, double f)
{
	int rc = 0;
	for (int g = 0; g < 2; g++)
		for (uint32_t k = 0; k < m; k++)
			rc |= push(it, g, k, f / 2);
	for (int g = 1; g >= 0; g--)
		for (uint32_t k = m; k-- > 0;)
			rc |= push(it, g, k, f / 2);
	return rc;
}

double dw_suzuki_u(int k)
{
	return 1.0 / (4.0 - pow(4.0, 1.0 / (2.0 * k - 1.0)));
}

static int suzuki(dw_items *it, uint32_t m, int order, double f)
{
	if (order == 2)
		return strang(it, m, f);
	int k = order / 2;
	double u = dw_suzuki_u(k);
	int rc = 0;
	rc |= suzuki(it, m, order - 2, u * f);
	rc |= suzuki(it, m, order - 2, u * f);
	rc |= suzuki(it, m, order - 2, (1 - 4 * u) * f);
	rc |= suzuki(it, m, order - 2, u * f);
	rc |= suzuki(it, m, order - 2, u * f);
	return rc;
}

int dw_formula_items(uint32_t m, int order, dw_items *out, dw_error *e)
{
	memset(out, 0, sizeof *out);
	int rc = 0;
	if (order == 1) {
		for (int g = 0; g < 2; g++)
			for (uint32_t k = 0; k < m; k++)
				rc |= push(out, g, k, 1.0);
	} else if (order >= 2 && order % 2 == 0 && order <= 8) {
		rc = suzuki(out, m, order, 1.0);
	} else {
		return dw_fail(e, DW_EINPUT, "formula.order: %d is not 1, 2, 4, 6 or 8", order);
	}
	if (rc) {
		free(out->v);
		memset(out, 0, sizeof *out);
		return dw_fail(e, DW_EINTERNAL, "out of memory (product formula)");
	}
	return DW_OK;
}

/* ---- bounds ---- */

/* |coefficient of H_j|, bounded by (1-s)|ca|/2 + s|cb|/2, as a pair. */
typedef struct lin { double u, v; } lin;   /* u (1-s) + v s */

static lin coef(const dw_term *t)
{
	return (lin){fabs(t->ca) / 2 * t->norm, fabs(t->cb) / 2 * t->norm};
}

/* Multiply polynomials in the basis (1-s)^(d-i) s^i. */
static void pmul(double *out, const double *a, int da, lin b)
{
	for (int i = 0; i <= da + 1; i++)
		out[i] = 0;
	for (int i = 0; i <= da; i++) {
		out[i] += a[i] * b.u;
		out[i + 1] += a[i] * b.v;
	}
}

static double peval(const double *w, int d, double s)
{
	double r = 0;
	for (int i = 0; i <= d; i++)
		r += w[i] * pow(1 - s, d - i) * pow(s, i);
	return r;
}

int dw_formula_bound_prepare(const dw_term *terms, uint32_t m, int order,
	dw_bound_kind kind, dw_bound *out, dw_error *e)
{
	(void)e;
	memset(out, 0, sizeof *out);
	out->order = order;
	/* Lambda_1 = sum_j ||H_j|| over both groups (2m terms) */
	for (uint32_t k = 0; k < m; k++) {
		lin c = coef(&terms[k]);
		out->lambda[0] += 2 * c.u;
		out->lambda[1] += 2 * c.v;
	}
	double growth = 1.0;
	for (int k = 2; k <= order / 2; k++)
		growth *= 8 * dw_suzuki_u(k) - 1;
	out->growth = growth;
	uint64_t gamma = 2ULL * m;
	if (kind == DW_BOUND_NORM || order > 2 || gamma > 400) {
		out->commutator = false;
		snprintf(out->name, sizeof out->name, "%s",
			kind == DW_BOUND_NORM ? "norm" :
			order > 2 ? "norm (order > 2)" : "norm (too many terms)");
		return DW_OK;
	}
	out->commutator = true;
	snprintf(out->name, sizeof out->name, "commutator");
	/* term j of the formula order: j < m -> K_j (group 0), else R K R */
	double w1[3] = {0}, w2[4] = {0}, tmp[5], tmp2[5];
	for (uint64_t j = 0; j < gamma; j++) {
		const dw_term *tj = &terms[j % m];
		int gj = (int)(j / m);
		lin cj = coef(tj);
		for (uint64_t l = j + 1; l < gamma; l++) {
			const dw_term *tl = &terms[l % m];
			int gl = (int)(l / m);
			lin cl = coef(tl);
			/* inner [H_l, H_j] */
			double inner = 2.0;      /* ||[P, Q]|| <= 2 ||P|| ||Q|| */
			bool exact = gl == gj && tl->pauli && tj->pauli;
			dw_pauli prod = {tl->p.x ^ tj->p.x, tl->p.z ^ tj->p.z};
			if (exact && dw_pauli_commute(tl->p, tj->p))
				inner = 0.0;
			if (inner == 0.0)
				continue;
			double base[1] = {inner};
			pmul(tmp, base, 0, cl);
			pmul(tmp2, tmp, 1, cj);
			if (order == 1) {
				for (int i = 0; i < 3; i++)
					w1[i] += 0.5 * tmp2[i];
				continue;
			}
			/* order 2: [H_k, [H_l, H_j]] for k > j (weight 1/12) */
			for (uint64_t k = j + 1; k < gamma; k++) {
				const dw_term *tk = &terms[k % m];
				int gk = (int)(k / m);
				double outer = 2.0;
				if (exact && gk == gj && tk->pauli && dw_pauli_commute(tk->p, prod))
					outer = 0.0;
				if (outer == 0.0)
					continue;
				double t3[5];
				pmul(t3, tmp2, 2, coef(tk));
				for (int i = 0; i < 4; i++)
					w2[i] += outer * t3[i] / 12.0;
			}
			/* [H_j, [H_j, H_l]] (weight 1/24) */
			{
				double outer = 2.0;
				if (exact && dw_pauli_commute(tj->p, prod))
					outer = 0.0;
				if (outer != 0.0) {
					double t3[5];
					pmul(t3, tmp2, 2, cj);
					for (int i = 0; i < 4; i++)
						w2[i] += outer * t3[i] / 24.0;
				}
			}
		}
	}
	if (order == 1)
		memcpy(out->w, w1, sizeof w1);   /* w[3] stays 0 */
	else
		memcpy(out->w, w2, sizeof w2);
	return DW_OK;
}

double dw_formula_step_bound(const dw_bound *b, double s, double t)
{
	int p = b->order;
	if (b->commutator) {
		double C = peval(b->w, p == 1 ? 2 : 3, s);
		return C * pow(fabs(t), p + 1);
	}
	double beta = (b->lambda[0] * (1 - s) + b->lambda[1] * s) * b->growth;
	double x = beta * fabs(t);
	double fact = 1;
	for (int i = 2; i <= p + 1; i++)
		fact *= i;
	return 2.0 * pow(x, p + 1) / fact * exp(x);
}

int64_t dw_formula_steps(const dw_bound *b, double s, double t, double eps)
{
	if (t == 0.0)
		return 1;
	if (dw_formula_step_bound(b, s, t) <= eps)
		return 1;
	/* grow geometrically, then bisect */
	int64_t lo = 1, hi = 2;
	while (hi < ((int64_t)1 << 60) &&
	       (double)hi * dw_formula_step_bound(b, s, t / (double)hi) > eps) {
		lo = hi;
		hi *= 2;
	}
	if (hi >= ((int64_t)1 << 60))
		return -1;
	while (hi - lo > 1) {
		int64_t mid = lo + (hi - lo) / 2;
		if ((double)mid * dw_formula_step_bound(b, s, t / (double)mid) > eps)
			lo = mid;
		else
			hi = mid;
	}
	return hi;
}
