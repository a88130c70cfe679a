/* qasm.h - the OpenQASM 3 reader of the runtime (DESIGN 11).
 *
 * Takes: OpenQASM 3 program text in the subset dwell emits and users write
 * for state preparation (docs/runtime.md lists it).  Gives: an in-memory
 * program (dw_qasm_program) that the simulator (sim.h) executes, the
 * layout of its qubit and bit registers, and its `input` parameters.
 *
 * Errors are DW_EINPUT with "FILE:LINE:COL: expected ..." (columns count
 * characters from 1).  Library code: nothing here prints or exits. */
#ifndef DWELL_QASM_H
#define DWELL_QASM_H

#include <stddef.h>

#include "dwell/diag.h"

/* Evaluate a constant angle expression such as "pi/4", "-3*π/8",
 * "2*asin(sqrt(0.3))" or "1.5e-3": numbers (integer, decimal, exponent),
 * pi π tau τ euler ℇ, + - * / ** (power, right associative), unary minus,
 * parentheses, sin cos tan arcsin arccos arctan exp ln sqrt.  Arithmetic is
 * IEEE double.  On error returns DW_EINPUT with a message naming the text
 * and the column ("angle 'pi/': column 4: expected ..."); *out untouched. */
int dw_angle_expr_eval(const char *text, double *out, dw_error *err);

/* A named register: qubits offset .. offset+size-1 of the state (or bits of
 * the classical store).  Qubit offsets follow declaration order: the first
 * declared qubit is bit 0 of the amplitude index (little-endian). */
typedef struct dw_qasm_reg {
	char *name;
	int offset;
	int size;
} dw_qasm_reg;

/* An `input float x;` / `input angle[32] x;` declaration. */
typedef struct dw_qasm_input {
	char *name;
	int is_angle;     /* declared angle (1) or float (0); both are doubles */
	int slot;         /* internal */
} dw_qasm_input;

/* Values for the inputs, e.g. from `--param name=value`.  Every input
 * must be bound; a name that is not an input is an error. */
typedef struct dw_qasm_param {
	const char *name;
	double value;
} dw_qasm_param;

typedef struct dw_qasm_params {
	size_t n;
	const dw_qasm_param *list;
} dw_qasm_params;

/* The parsed program; its statements are internal (runtime/qasm_prog.h).
 * Read-only after parsing; shareable across threads. */
typedef struct dw_qasm_program dw_qasm_program;

/* Parse program text.  name_for_messages is used in error messages (a
 * file name, or e.g. "<string>").  *out is owned by the caller (free with
 * dw_qasm_free); it is NULL on error. */
int dw_qasm_parse_string(const char *text, const char *name_for_messages,
	dw_qasm_program **out, dw_error *err);

/* Read and parse a file; messages name path. */
int dw_qasm_parse_file(const char *path, dw_qasm_program **out, dw_error *err);

void dw_qasm_free(dw_qasm_program *prog);

/* Layout: total qubits and bits, registers in declaration order, inputs. */
int dw_qasm_num_qubits(const dw_qasm_program *prog);
int dw_qasm_num_bits(const dw_qasm_program *prog);
size_t dw_qasm_num_qregs(const dw_qasm_program *prog);
const dw_qasm_reg *dw_qasm_qreg(const dw_qasm_program *prog, size_t i);
size_t dw_qasm_num_cregs(const dw_qasm_program *prog);
const dw_qasm_reg *dw_qasm_creg(const dw_qasm_program *prog, size_t i);
size_t dw_qasm_num_inputs(const dw_qasm_program *prog);
const dw_qasm_input *dw_qasm_input_at(const dw_qasm_program *prog, size_t i);

#endif
