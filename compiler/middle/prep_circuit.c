/* prep_circuit.c - rhs.circuit: the user's OpenQASM 3 state preparation.
 * Takes: a problem whose rhs is `circuit: FILE`.  Gives: the definition
 * U_b on the sys qubits (stage state_prep); the reflection uses its
 * inverse (dw_inverse), like every other state preparation.
 *
 * The runtime reader (qasm.h) parses the file.  Its public interface gives
 * the parsed program and the dense simulator (sim.h) but no gate stream,
 * so the circuit is run once on |0..0> by the runtime simulator and the
 * resulting vector is loaded by uniformly controlled rotations
 * (dw_stateprep_amplitudes).  That is exact up to a global phase, and is
 * limited to circuits the simulator can hold: at most PREP_MAX_QUBITS
 * qubits, with a clear error beyond.  The file must declare exactly the
 * problem's system qubits (the grid's qubits before a dilation), no
 * classical bits (a measurement would make b random) and no inputs. */
#include <complex.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/prep_circuit.h"
#include "dwell/program.h"
#include "dwell/qasm.h"
#include "dwell/sim.h"

#define PREP_MAX_QUBITS 20

uint32_t dw_stateprep_circuit(dw_circuit *c, const dw_problem *p, dw_error *e)
{
	int want = p->dilated ? p->n - 1 : p->n;
	if (!p->rhs_file) {
		dw_fail(e, DW_EINTERNAL, "internal: rhs.circuit without a file");
		return DW_NO_DEF;
	}
	if (want > PREP_MAX_QUBITS) {
		dw_fail(e, DW_EINPUT, "%s: rhs.circuit: the system register has %d qubits; "
			"a user circuit is loaded through its state vector, which dwell "
			"supports up to %d qubits (give rhs uniform, basis or product for "
			"larger grids)", p->path, want, PREP_MAX_QUBITS);
		return DW_NO_DEF;
	}
	dw_qasm_program *prog = NULL;
	if (dw_qasm_parse_file(p->rhs_file, &prog, e))
		return DW_NO_DEF;
	int nq = dw_qasm_num_qubits(prog);
	uint32_t id = DW_NO_DEF;
	if (nq != want) {
		dw_fail(e, DW_EINPUT, "%s: rhs.circuit: %s declares %d qubit%s; the system "
			"register has %d", p->path, p->rhs_file, nq, nq == 1 ? "" : "s", want);
	} else if (dw_qasm_num_bits(prog) != 0) {
		dw_fail(e, DW_EINPUT, "%s: rhs.circuit: %s declares classical bits; a state "
			"preparation must be unitary (no measurement)", p->path, p->rhs_file);
	} else if (dw_qasm_num_inputs(prog) != 0) {
		dw_fail(e, DW_EINPUT, "%s: rhs.circuit: %s has `input` parameters; give "
			"their values in the file", p->path, p->rhs_file);
	} else {
		dw_state *st = NULL;
		if (dw_sim_run(prog, NULL, 1, &st, e) == DW_OK) {
			size_t dim = (size_t)1 << p->n;
			double complex *amps = calloc(dim, sizeof *amps);
			if (!amps) {
				dw_fail(e, DW_EINTERNAL, "out of memory (rhs.circuit)");
			} else {
				memcpy(amps, st->amp, ((size_t)1 << want) * sizeof *amps);
				id = dw_stateprep_amplitudes(c, p->n, amps, e);
			}
			free(amps);
		}
		dw_state_free(st);
	}
	dw_qasm_free(prog);
	return id;
}
