/* circuit.h - dwell's hierarchical circuit IR and its exact costs.
 *
 * A circuit is a set of immutable definitions.  A definition has qubit
 * arguments, clean local ancillas, real parameters, a stage label and a list
 * of operations: a primitive gate (angles are expressions linear in the
 * definition's parameters) or a call of another definition, repeated `reps`
 * times (a loop).  Definitions are hash-consed: building one identical to an
 * existing definition returns the existing id.
 *
 * Qubit numbering inside a definition: 0..nargs-1 are the arguments,
 * nargs..nargs+nanc-1 its own clean ancillas; a callee's ancilla pool (its
 * `pool` qubits, reused between consecutive calls) is mapped onto the
 * caller's pool positions just after the caller's own ancillas.  So a
 * definition acts on nargs + pool qubits, and every ancilla starts and ends
 * in |0>.
 *
 * Costs (cost.c) are computed once per definition from its callees' costs:
 * gate counts per stage (saturating 64-bit), qubits, and depth / T-depth as
 * max-plus matrices (DESIGN 7).  Nothing is ever expanded to be counted. */
#ifndef DWELL_CIRCUIT_H
#define DWELL_CIRCUIT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "dwell/diag.h"

/* Primitive gates: OpenQASM 3 stdgates.inc names. */
typedef enum dw_gate {
	DW_G_X, DW_G_Y, DW_G_Z, DW_G_H, DW_G_S, DW_G_SDG, DW_G_T, DW_G_TDG,
	DW_G_RX, DW_G_RY, DW_G_RZ, DW_G_P,
	DW_G_CX, DW_G_CY, DW_G_CZ, DW_G_CH, DW_G_SWAP,
	DW_G_CP, DW_G_CRX, DW_G_CRY, DW_G_CRZ,
	DW_G_CCX, DW_G_CSWAP,
	DW_G_MEASURE, DW_G_RESET,
	DW_G_COUNT
} dw_gate;

enum {
	DW_GF_CLIFFORD = 1,   /* Clifford gate */
	DW_GF_ROTATION = 2,   /* arbitrary-angle rotation */
	DW_GF_T = 4,          /* t or tdg */
	DW_GF_TWO_QUBIT = 8,  /* acts on exactly two qubits */
	DW_GF_NONUNITARY = 16 /* measure, reset */
};

typedef struct dw_gate_info {
	const char *name;     /* OpenQASM 3 name */
	int nqubits;
	int nangles;
	int flags;
	dw_gate inverse;      /* the gate whose action undoes this one (angles negated) */
	int t_count;          /* T gates in its Clifford+T form (ccx: 7), rotations 0 */
	int t_depth;          /* T-depth of that form (ccx: 3) */
} dw_gate_info;

extern const dw_gate_info dw_gates[DW_G_COUNT];

/* Stages: where the cost goes.  A definition's direct gates belong to its
 * stage; an unlabelled (DW_STAGE_NONE) definition's gates belong to the
 * nearest labelled caller (top level: "other"). */
typedef enum dw_stage {
	DW_STAGE_NONE, DW_STAGE_STATE_PREP, DW_STAGE_REFLECTION,
	DW_STAGE_TERM, DW_STAGE_ORACLE, DW_STAGE_ARITH, DW_STAGE_SYNTH,
	DW_STAGE_COUNT
} dw_stage;

extern const char *const dw_stage_names[DW_STAGE_COUNT];

/* An angle or parameter expression: c0 + sum_i c[i] * param[p[i]]. */
#define DW_EXPR_TERMS 4
typedef struct dw_expr {
	double c0;
	double c[DW_EXPR_TERMS];
	uint8_t p[DW_EXPR_TERMS];
	uint8_t n;
} dw_expr;

dw_expr dw_const(double v);
dw_expr dw_par(int param, double coeff);          /* coeff * param */
dw_expr dw_expr_scale(dw_expr e, double f);
double dw_expr_eval(const dw_expr *e, const double *params);

enum { DW_OP_GATE, DW_OP_CALL };

typedef struct dw_op {
	uint8_t kind;         /* DW_OP_GATE or DW_OP_CALL */
	uint8_t gate;         /* dw_gate for DW_OP_GATE */
	uint8_t cond;         /* gates: 1 = applied only when local bit `bit` is 1 */
	uint16_t bit;         /* measure: destination bit; conditional: bit tested */
	uint32_t condq;       /* conditional: the local qubit measured into `bit` */
	uint32_t callee;      /* definition id for DW_OP_CALL */
	uint64_t reps;        /* calls: repetitions (a loop when > 1); gates: 1 */
	uint32_t nq, q;       /* qubit operands: def->qs[q .. q+nq) */
	uint32_t na, a;       /* angle / parameter expressions: def->ex[a .. a+na) */
} dw_op;

typedef struct dw_cost dw_cost;

typedef struct dw_def {
	char name[64];        /* unique OpenQASM identifier */
	uint32_t nargs, nanc, nparams;
	uint32_t nbits;       /* local classical bits (measurement results) */
	uint32_t pool;        /* ancillas needed: nanc + max callee pool */
	dw_stage stage;
	dw_op *ops;
	size_t nops;
	uint32_t *qs;
	size_t nqs;
	dw_expr *ex;
	size_t nex;
	uint64_t hash;
	uint32_t inverse;     /* id of the inverse definition, or DW_NO_DEF */
	bool unitary;         /* no measure/reset inside */
	dw_cost *cost;        /* computed lazily by cost.c */
} dw_def;

#define DW_NO_DEF UINT32_MAX

typedef struct dw_circuit {
	dw_def *defs;
	size_t ndefs, cap;
	uint32_t *table;      /* hash table of ids (open addressing) */
	size_t tcap;
	double t_weight_rotation; /* T-depth weight of a rotation (cost.c) */
} dw_circuit;

dw_circuit *dw_circuit_new(void);
void dw_circuit_free(dw_circuit *c);

/* Building a definition. */
typedef struct dw_builder dw_builder;

dw_builder *dw_begin(dw_circuit *c, const char *name, uint32_t nargs,
	uint32_t nparams, dw_stage stage);
uint32_t dw_add_ancillas(dw_builder *b, uint32_t k);   /* first new index */
void dw_gate_op(dw_builder *b, dw_gate g, const uint32_t *qubits, const dw_expr *angles);
void dw_g1(dw_builder *b, dw_gate g, uint32_t q);
void dw_g2(dw_builder *b, dw_gate g, uint32_t q0, uint32_t q1);
void dw_g3(dw_builder *b, dw_gate g, uint32_t q0, uint32_t q1, uint32_t q2);
void dw_r1(dw_builder *b, dw_gate g, uint32_t q, dw_expr angle);
void dw_call(dw_builder *b, uint32_t callee, const uint32_t *qubits,
	const dw_expr *params, uint64_t reps);
/* Measurement-based pieces: local bits, measure into a bit, and a gate
 * applied only when a bit is 1 (the definition becomes non-unitary and is
 * emitted as an OpenQASM `def`). */
uint32_t dw_add_bits(dw_builder *b, uint32_t k);                /* first index */
void dw_measure(dw_builder *b, uint32_t q, uint32_t bit);
void dw_cond_gate(dw_builder *b, uint32_t bit, dw_gate g, const uint32_t *qubits);
/* Finish: returns the id (an existing one when identical), or DW_NO_DEF with
 * e filled (bad operands, allocation failure).  The builder is freed. */
uint32_t dw_end(dw_builder *b, dw_error *e);

/* The inverse of a unitary definition (memoised; reversed ops, inverse
 * gates, negated angles). */
uint32_t dw_inverse(dw_circuit *c, uint32_t id, dw_error *e);

/* ---- walking the expanded program (flat emission, brute-force counts,
 * simulation in tests) ---- */
typedef struct dw_walk_gate {
	dw_gate gate;
	bool cond;                /* applied only when the bit is 1 */
	uint32_t bit;             /* measure: destination; cond: tested (local) */
	uint32_t cond_qubit;      /* cond: the absolute qubit measured into it */
	const uint32_t *qubits;   /* absolute qubit indices */
	const double *angles;     /* evaluated angles */
	dw_stage stage;           /* effective stage (NONE at top level) */
} dw_walk_gate;

typedef int (*dw_walk_fn)(const dw_walk_gate *g, void *ctx);

/* Visit every primitive gate of definition `id` applied to absolute qubits
 * map[0..nargs+pool) with parameter values params, in order.  Stops when
 * fn returns non-zero and returns that value. */
int dw_walk(const dw_circuit *c, uint32_t id, const uint32_t *map,
	const double *params, dw_walk_fn fn, void *ctx);

/* ---- costs (cost.c) ---- */
typedef struct dw_figures {
	uint64_t gates[DW_G_COUNT];   /* primitive gates of the expanded program */
	uint64_t gate_count, t_count_exact, toffoli_count, rotation_count,
		clifford_count, two_qubit_count, measure_count;
	uint64_t cond_count;          /* classically controlled gates (counted as applied) */
	int64_t depth, t_depth;       /* t_depth: rotations weigh t_weight_rotation */
	bool saturated;               /* some figure hit 2^64-1 (or 2^62 for depth) */
} dw_figures;

/* Figures of a definition as a whole (depth from all its inputs at time 0). */
int dw_cost_figures(dw_circuit *c, uint32_t id, dw_figures *out, dw_error *e);
/* The counts only (depth and t_depth left 0): cheaper. */
int dw_cost_counts(dw_circuit *c, uint32_t id, dw_figures *out, dw_error *e);
/* Same, restricted to the gates whose effective stage is s (the top level
 * NONE counts as s == DW_STAGE_NONE), depth counting only those gates. */
int dw_cost_stage_figures(dw_circuit *c, uint32_t id, dw_stage s,
	dw_figures *out, dw_error *e);
/* Definitions on at most `ports` qubits keep a max-plus depth matrix;
 * larger ones are evaluated by propagating a front vector (both exact).
 * Default 40; tests set 0 to exercise the vector path everywhere.  Call it
 * before any cost is computed on a circuit. */
void dw_cost_set_matrix_limit(uint32_t ports);
/* Qubits a definition needs: nargs + pool. */
uint32_t dw_def_qubits(const dw_circuit *c, uint32_t id);

#endif
