/* dwell.h - every public header of libdwell. */
#ifndef DWELL_H
#define DWELL_H

#define DWELL_VERSION "0.1.0"

#include "dwell/diag.h"
#include "dwell/budget.h"
#include "dwell/problem.h"
#include "dwell/mtx.h"
#include "dwell/circuit.h"
#include "dwell/program.h"
#include "dwell/sparse.h"
#include "dwell/stencil.h"
#include "dwell/prep_circuit.h"
#include "dwell/formula.h"
#include "dwell/emit.h"
#include "dwell/qasm.h"
#include "dwell/synth.h"
#include "dwell/sim.h"
#include "dwell/json.h"
#include "dwell/audit.h"
#include "dwell/cli.h"

#endif
