/* stencil.h - constant-coefficient stencils: offset classes, closed-form
 * spectra (front/stencil_spectrum.c), and the arithmetic pieces their
 * lowering uses (middle/adder.c, middle/stencil.c).
 *
 * Grid convention (DESIGN 3.3): index j = x_0 + N_0 x_1 + N_0 N_1 x_2, a
 * point o with coefficient c means A[j][j+o] = c; Dirichlet axes drop the
 * neighbours outside the grid, periodic axes wrap them.  So
 * A = sum_o c_o S_o with S_o = (x)_a S^(a)_(o_a) and S_(-o) = S_o^T. */
#ifndef DWELL_STENCIL_H
#define DWELL_STENCIL_H

#include <stdbool.h>
#include <stdint.h>

#include "dwell/circuit.h"
#include "dwell/problem.h"

/* An offset class: the offsets that give the same shift matrix (periodic
 * axes reduce o_a modulo N_a into (-N_a/2, N_a/2]), with the sum of their
 * coefficients. */
typedef struct dw_stencil_class {
	int off[3];
	double coeff;
} dw_stencil_class;

/* The classes of p->stencil with a nonzero coefficient (at most
 * p->stencil.npoints; cls must hold that many).  Returns their number. */
size_t dw_stencil_classes(const dw_stencil *st, dw_stencil_class *cls);

/* Index of the class of the shift -o in cls[0..n), or -1 when none. */
long dw_stencil_class_find(const dw_stencil *st, const dw_stencil_class *cls,
	size_t n, const int off[3]);

/* True when A is symmetric (c of class o equals c of class -o, to a
 * relative 1e-12 of the largest coefficient). */
bool dw_stencil_symmetric(const dw_stencil *st);

/* Spectrum of a stencil problem (front/stencil_spectrum.c): fills
 * alpha, sigma_min, the extreme eigenvalues (+-alpha when dilated), the
 * source name, and whether A needs the dilation. */
typedef struct dw_stencil_spectrum {
	double alpha, sigma_min, lmin, lmax;
	char source[48];
	bool dilate;
	int64_t nnz;          /* nonzeros of A (before the dilation) */
} dw_stencil_spectrum;

int dw_stencil_analyse(const dw_problem *p, dw_stencil_spectrum *out, dw_error *e);

/* After the figures were accepted: record the dilation (one more, most
 * significant, sys qubit; rhs |0>|b>) and nnz. */
int dw_stencil_finish(dw_problem *p, const dw_stencil_spectrum *s, dw_error *e);

/* ---- arithmetic (middle/adder.c), stage DW_STAGE_ARITH ----
 * Increment |x> -> |x + 1 mod 2^w> on w qubits (qubit i = bit i), with a
 * carry ladder of Toffolis into clean ancillas; `controlled` adds a first
 * argument: the increment happens when it is |1> (arguments: [ctl], x).
 * 2(w-2) Toffolis uncontrolled, 2(w-1) controlled.  With `measure` the
 * ladder uses temporary logical-ANDs erased by measurement (the
 * definition is then non-unitary). */
uint32_t dw_increment_def(dw_circuit *c, uint32_t w, bool controlled, bool measure,
	dw_error *e);
/* |x> -> |x - 1 mod 2^w>: the inverse of the increment, or with `measure`
 * X^w, increment, X^w. */
uint32_t dw_decrement_def(dw_circuit *c, uint32_t w, bool controlled, bool measure,
	dw_error *e);

/* Comparator with a constant: |z>|t> -> |z>|t XOR [z < bound]> on w + 1
 * qubits (z = qubits 0..w-1, t = qubit w), 1 <= bound < 2^w, by the carry
 * of z + (2^w - bound) computed into clean ancillas and undone (with
 * `measure`: temporary ANDs erased by measurement). */
uint32_t dw_less_const_def(dw_circuit *c, uint32_t w, uint64_t bound, bool measure,
	dw_error *e);

#endif
