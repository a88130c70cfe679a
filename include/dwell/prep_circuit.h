/* prep_circuit.h - rhs.circuit: a user OpenQASM 3 state preparation turned
 * into a definition of the circuit IR (compiler/middle/prep_circuit.c). */
#ifndef DWELL_PREP_CIRCUIT_H
#define DWELL_PREP_CIRCUIT_H

#include <stdint.h>

#include "dwell/circuit.h"
#include "dwell/problem.h"

/* Definition U_b on the p->n sys qubits with U_b |0..0> = |b> up to a
 * global phase, b the state the file p->rhs_file prepares from |0..0>
 * (on the low n-1 qubits when p->dilated: |0>|b>).  DW_EINPUT errors name
 * the problem and the circuit file. */
uint32_t dw_stateprep_circuit(dw_circuit *c, const dw_problem *p, dw_error *e);

#endif
