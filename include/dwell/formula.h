/* formula.h - product formulas over the terms of H(s) (formula.c). */
#ifndef DWELL_FORMULA_H
#define DWELL_FORMULA_H

#include <stdbool.h>
#include <stdint.h>

#include "dwell/program.h"

/* One exponential exp(-i frac * dt * H_j), H_j = K_term / 2 (group 0) or
 * R K_term R / 2 (group 1). */
typedef struct dw_item {
	int group;
	uint32_t term;
	double frac;
} dw_item;

typedef struct dw_items {
	dw_item *v;
	size_t n, cap;
} dw_items;

/* Items of one step of the formula of the given order over m terms per
 * group (neighbours merged).  Caller frees out->v. */
int dw_formula_items(uint32_t m, int order, dw_items *out, dw_error *e);

/* Suzuki's u_k = 1 / (4 - 4^(1/(2k-1))). */
double dw_suzuki_u(int k);

typedef struct dw_bound {
	int order;
	bool commutator;          /* commutator bound, else norm bound */
	char name[40];
	double w[4];              /* commutator: C(s) = sum_i w_i (1-s)^(d-i) s^i */
	double lambda[2];         /* norm: Lambda_1(s) = lambda0 (1-s) + lambda1 s */
	double growth;            /* prod_m (8 u_m - 1) for Suzuki orders */
} dw_bound;

int dw_formula_bound_prepare(const dw_term *terms, uint32_t m, int order,
	dw_bound_kind kind, dw_bound *out, dw_error *e);
/* Bound on || S(t) - exp(-i t H(s)) || for one step of length t. */
double dw_formula_step_bound(const dw_bound *b, double s, double t);
/* Smallest r >= 1 with r * bound(t / r) <= eps (-1 if beyond 2^60). */
int64_t dw_formula_steps(const dw_bound *b, double s, double t, double eps);

#endif
