/* sim.h - the dense state-vector simulator of the runtime (DESIGN 11).
 *
 * Takes: a number of qubits (up to 30, and no more than memory allows), or
 * a parsed OpenQASM 3 program (qasm.h) and values for its inputs.
 * Gives: the state as complex doubles, index little-endian (qubit k is bit
 * k of the index; for a program, qubits are numbered in declaration order,
 * the first declared qubit being bit 0), and the classical bits.
 *
 * Phases are exact as OpenQASM 3 (spec v3.0.0 and later) defines them:
 * U carries its e^{iθ/2} factor and gphase multiplies the state, so the
 * state is the program's state, not one equal up to a global phase.
 *
 * Kernels work in place and run over OpenMP threads when one call spans
 * at least DW_SIM_OMP_MIN amplitudes (most gates run once per half of the
 * state, so from 17 qubits on); below that a parallel region costs more
 * than it saves, and far more when other processes hold the cores.  While gates are applied the upper
 * half of the vector (top qubit = 1) sits a few KiB after the lower half,
 * so that a gate on the top qubit does not stream two arrays whose
 * addresses alias in the cache; dw_state_compact closes the gap.
 *
 * Measurement draws from xoshiro256** seeded through splitmix64 (see
 * docs/runtime.md): the same seed, program and thread count give the same
 * outcomes. */
#ifndef DWELL_SIM_H
#define DWELL_SIM_H

#include <complex.h>
#include <stdint.h>

#include "dwell/diag.h"
#include "dwell/qasm.h"

#define DW_SIM_MAX_QUBITS 30
#define DW_SIM_OMP_MIN (1u << 16)

typedef struct dw_state {
	int nqubits;
	uint64_t dim;             /* 2^nqubits */
	/* Contiguous amplitudes after dw_state_compact (dw_sim_run compacts
	 * before returning); during a simulation use dw_state_get/set. */
	double complex *amp;
	int nbits;                /* classical bits (dw_sim_exec sizes them) */
	unsigned char *bits;      /* 0/1, index = declaration order of bits */
	uint64_t gates_applied;   /* primitive operations applied (statistics) */
	/* internal */
	double complex *lo_, *hi_;  /* halves with top qubit 0 / 1 */
	uint64_t rng_[4];
} dw_state;

/* Bytes a dense state of n qubits needs (saturates on overflow). */
uint64_t dw_state_bytes(int nqubits);

/* A new state |0...0> of nqubits qubits.  Refuses more than
 * DW_SIM_MAX_QUBITS, or more memory than the machine has available, with
 * DW_EINPUT and a message naming the bytes needed. */
int dw_state_new(int nqubits, dw_state **out, dw_error *err);
void dw_state_free(dw_state *st);

/* Seed the measurement generator (dw_state_new seeds with 1). */
void dw_state_seed(dw_state *st, uint64_t seed);

/* Amplitude i in any layout. */
double complex dw_state_get(const dw_state *st, uint64_t i);
void dw_state_set(dw_state *st, uint64_t i, double complex v);

/* Make the amplitudes contiguous (st->amp[0 .. dim-1]) and return them.
 * Kernels still work afterwards. */
double complex *dw_state_compact(dw_state *st);

/* Sum of |amplitude|^2. */
double dw_state_norm2(const dw_state *st);

/* Apply the 2x2 matrix m = {m00, m01, m10, m11} (row-major; m01 maps |1>
 * to the |0> component) to qubit target, on the amplitudes whose index i
 * satisfies (i & cmask) == cval (controls; cmask must not contain target,
 * and cval must lie within cmask).  Diagonal and anti-diagonal matrices
 * take specialised kernels. */
void dw_state_apply_1q(dw_state *st, int target, const double complex m[4],
	uint64_t cmask, uint64_t cval);

/* Multiply by ph every amplitude whose index satisfies (i & mask) == val
 * (a controlled global phase; mask 0 multiplies the whole state). */
void dw_state_apply_phase(dw_state *st, double complex ph, uint64_t mask, uint64_t val);

/* Exchange qubits a and b (a != b) where (i & cmask) == cval. */
void dw_state_apply_swap(dw_state *st, int a, int b, uint64_t cmask, uint64_t cval);

/* Probability that qubit q reads 1. */
double dw_state_prob1(const dw_state *st, int q);

/* Measure qubit q in the computational basis: draw the outcome from the
 * state's generator, collapse and renormalise; returns 0 or 1. */
int dw_state_measure(dw_state *st, int q);

/* Set qubit q to |0>: measure, then flip it when the outcome was 1. */
void dw_state_reset(dw_state *st, int q);

/* Run prog on the state st (whose nqubits must equal the program's), with
 * its inputs bound from params.  Sizes st->bits to the program's bits
 * (all 0 at the start).  Run-time errors (an index out of range, a qubit
 * used twice in one gate, a non-integer loop bound ...) are DW_EINPUT with
 * "FILE:LINE:COL: ...". */
int dw_sim_exec(const dw_qasm_program *prog, const dw_qasm_params *params,
	dw_state *st, dw_error *err);

/* New state of the program's size, seeded with seed, run, compacted.  The
 * register layout (name, offset, size) is the program's: dw_qasm_qreg(),
 * dw_qasm_creg().  *out is owned by the caller (dw_state_free). */
int dw_sim_run(const dw_qasm_program *prog, const dw_qasm_params *params,
	uint64_t seed, dw_state **out, dw_error *err);

#endif
