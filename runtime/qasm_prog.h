/* qasm_prog.h - internal form of a parsed OpenQASM 3 program, shared by
 * the lexer (qasm_lex.c), the expression parser/evaluator (qasm_expr.c),
 * the statement reader (qasm_read.c) and the executor (sim_exec.c).
 *
 * A program is a tree of statement blocks.  Expressions live in one pool
 * (prog->ex) and are referred to by index; they read numbered variable
 * slots of the current frame (the top level has one frame, each gate or
 * def call gets a fresh one).  A `def` is a qx_gatedef with is_def set: its
 * declared arguments in order (classical values in slots, qubits as
 * positions in the call's qubit list) and its local bit registers, which
 * each call gets fresh.  Locations (line, col) are kept for run-time
 * errors. */
#ifndef DWELL_QASM_PROG_H
#define DWELL_QASM_PROG_H

#include <stddef.h>

#include "dwell/diag.h"
#include "dwell/qasm.h"

/* ---- tokens (qasm_lex.c) ---- */

typedef enum { QT_EOF, QT_IDENT, QT_INT, QT_FLOAT, QT_STRING, QT_PUNCT } qx_tok_kind;

typedef struct qx_token {
	qx_tok_kind kind;
	const char *text;     /* points into the source; not terminated */
	size_t len;
	long line, col;       /* 1-based; col counts characters */
	double num;           /* QT_INT, QT_FLOAT */
} qx_token;

/* Incremental lexer over a NUL-terminated text. */
typedef struct qx_lexer {
	const char *s, *file;
	size_t i;
	long line, col;
	dw_error *err;
} qx_lexer;

void qx_lexer_init(qx_lexer *L, const char *text, const char *name, dw_error *err);

/* Next token into *out (QT_EOF at the end, again on every later call). */
int qx_lex_next(qx_lexer *L, qx_token *out);

/* Split text into tokens (comments and white space dropped); the last
 * token is QT_EOF.  *tok is malloc'd. */
int qx_lex(const char *text, const char *name, qx_token **tok, size_t *ntok,
	dw_error *err);

/* ---- expressions (qasm_expr.c) ---- */

enum { QE_NUM, QE_SLOT, QE_NEG, QE_ADD, QE_SUB, QE_MUL, QE_DIV, QE_POW, QE_FN };
enum { QF_SIN, QF_COS, QF_TAN, QF_ASIN, QF_ACOS, QF_ATAN, QF_EXP, QF_LN, QF_SQRT };

typedef struct qx_expr {
	unsigned char op, fn;
	int a, b;             /* operands (pool indices) */
	int slot;             /* QE_SLOT */
	double num;           /* QE_NUM */
	long line, col;
	int depth;            /* height of the tree (evaluation recurses this deep) */
} qx_expr;

#define QX_MAX_NEST 1000      /* deepest expression, and deepest gate-call chain */
#define QX_MAX_QUBITS 62      /* amplitude indices and masks are uint64 */
#define QX_MAX_BITS (1 << 20)
#define QX_MAX_DEPTH 200      /* nesting of bodies */

/* ---- statements ---- */

enum { QO_REG, QO_ELEM, QO_ARG };          /* whole register, reg[i], gate argument */

typedef struct qx_operand {
	unsigned char kind;
	unsigned char local;  /* reg indexes the enclosing def's lq (qubits) or lbits */
	int reg;              /* register index, or argument index for QO_ARG */
	int index;            /* QO_ELEM: expression, or -1 for the constant `fixed` */
	int fixed;
	long line, col;
} qx_operand;

enum { QM_CTRL, QM_NEGCTRL, QM_INV, QM_POW };

typedef struct qx_mod {
	unsigned char kind;
	int count;            /* QM_CTRL/QM_NEGCTRL: number of controls */
	int expr;             /* QM_POW: exponent expression */
} qx_mod;

/* QS_CALL: a def call (user = def index, params = its classical arguments
 * in order, ops = its qubit arguments in order); QS_BITDECL: a local bit
 * register of a def (slot = its index in lbits) set to zeros. */
enum { QS_GATE, QS_GPHASE, QS_FOR, QS_MEASURE, QS_RESET, QS_IF, QS_CALL, QS_BITDECL };

typedef struct qx_block {
	struct qx_stmt *s;
	size_t n, cap;
} qx_block;

typedef struct qx_stmt {
	unsigned char kind;
	long line, col;
	/* QS_GATE / QS_GPHASE */
	int builtin;          /* QS_GATE: builtin gate id, or -1 */
	int user;             /* QS_GATE: user gate index, or -1 */
	int nmods;
	qx_mod *mods;
	int nparams;
	int *params;          /* expressions */
	int nops;             /* also QS_MEASURE (1 or 2: qubit, bit), QS_RESET (1), QS_IF (1 bit operand) */
	qx_operand *ops;
	/* QS_FOR: slot = start, start + step, ... while not past stop */
	int slot, start, step, stop;
	qx_block *body;       /* QS_FOR, QS_IF */
	qx_block *orelse;     /* QS_IF, may be NULL */
	int cond_value;       /* QS_IF: expression compared with the bit(s) */
	int cond_not;         /* QS_IF: 1 for != */
} qx_stmt;

/* A declared argument of a def. */
enum { QA_VALUE, QA_QUBIT, QA_QREG };

typedef struct qx_defarg {
	unsigned char kind;
	int index;            /* QA_VALUE: slot; QA_QUBIT: qubit position; QA_QREG: lq index */
} qx_defarg;

typedef struct qx_gatedef {
	char *name;
	int nparams, nqubits; /* classical arguments; qubits in all (a qubit[n] counts n) */
	int nslots;           /* params occupy slots 0..nparams-1 */
	qx_block body;
	/* def only */
	int is_def;
	int nargs;
	qx_defarg *args;      /* declared order */
	dw_qasm_reg *lq;      /* qubit[n] arguments: offset = first position in the call's qubits */
	size_t nlq;
	dw_qasm_reg *lbits;   /* local bit registers: offset into the call's bit frame */
	size_t nlbits;
	int nbits;            /* size of that frame */
} qx_gatedef;

/* Built-in gates: U and gphase always; the rest after
 * include "stdgates.inc".  Order fixed (ids used by sim_exec.c). */
enum {
	QB_U, QB_GPHASE,
	QB_P, QB_X, QB_Y, QB_Z, QB_H, QB_S, QB_SDG, QB_T, QB_TDG, QB_SX,
	QB_RX, QB_RY, QB_RZ, QB_CX, QB_CY, QB_CZ, QB_CP, QB_CRX, QB_CRY, QB_CRZ,
	QB_CH, QB_SWAP, QB_CCX, QB_CSWAP, QB_CU,
	QB_CX_OLD, QB_PHASE, QB_CPHASE, QB_ID, QB_U1, QB_U2, QB_U3,
	QB_COUNT
};

typedef struct qx_builtin {
	const char *name;
	int nparams, nqubits;
} qx_builtin;

extern const qx_builtin qx_builtins[QB_COUNT];

struct dw_qasm_program {
	char *name;
	int nqubits, nbits;
	size_t nqregs, ncregs, ninputs, ngates;
	dw_qasm_reg *qregs, *cregs;
	dw_qasm_input *inputs;
	qx_gatedef *gates;
	int nslots;           /* top-level frame */
	qx_block main;
	qx_expr *ex;
	size_t nex, capex;
};

/* ---- parser state shared by qasm_expr.c and qasm_read.c ---- */

enum { SY_SLOT, SY_CONST, SY_QREG, SY_CREG, SY_GATE, SY_QARG, SY_DEF, SY_LQREG, SY_LCREG };

typedef struct qx_sym {
	const char *name;
	size_t len;
	int kind;
	int index;            /* slot, register, gate or argument index */
	double value;         /* SY_CONST */
} qx_sym;

typedef struct qx_parser {
	const char *file;
	qx_token *tok;        /* window: the current top-level statement and lookahead */
	size_t ntok, pos, captok;
	qx_lexer lex;         /* source of further tokens (qasm_read.c) */
	dw_qasm_program *prog;
	qx_sym *sym;
	size_t nsym, capsym;
	size_t barrier;       /* symbols below this index are outside the gate body being read */
	int in_gate;
	qx_gatedef *in_def;   /* the def whose body is being read, or NULL */
	const qx_token *def_name;
	int *nslots;          /* slot counter of the current frame */
	int have_stdgates;
	int nest;             /* recursion depth of the expression parser */
	dw_error *err;
} qx_parser;

/* The current token (the last one of the window if the parser ran past
 * it, which a well-formed window never allows). */
static inline const qx_token *qx_cur(const qx_parser *p)
{
	return &p->tok[p->pos < p->ntok ? p->pos : p->ntok - 1];
}

/* Record "FILE:LINE:COL: message" and return DW_EINPUT. */
int qx_error_at(qx_parser *p, const qx_token *t, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));

/* Does token t equal the punctuation or identifier s? */
int qx_is(const qx_token *t, const char *s);

const qx_sym *qx_lookup(qx_parser *p, const char *name, size_t len);

/* expression := term (('+'|'-') term)* ; returns the pool index in *out. */
int qx_parse_expr(qx_parser *p, int *out);

/* Parse an expression that must be constant (no inputs, parameters or
 * loop variables); gives its value. */
int qx_parse_const(qx_parser *p, double *out);

/* Evaluate expression e with slot values vars; on a non-finite result or a
 * division by zero fills err with "FILE:LINE:COL: ..." and returns
 * DW_EINPUT. */
int qx_eval(const dw_qasm_program *prog, int e, const double *vars,
	double *out, dw_error *err);

/* Append an expression node; returns its index or -1 (err filled). */
int qx_new_expr(qx_parser *p, const qx_expr *node);

/* ---- reader internals shared by qasm_read.c and qasm_decl.c ---- */

int qx_expect(qx_parser *p, const char *s);
char *qx_dup_tok(qx_parser *p, const qx_token *t);
/* Grow *arr (of *cap elements of size sz) so that index n fits. */
int qx_grow(qx_parser *p, void **arr, size_t *cap, size_t n, size_t sz);
int qx_builtin_id(qx_parser *p, const qx_token *t);
int qx_declare(qx_parser *p, const qx_token *t, int kind, int index, double value);
int qx_const_int(qx_parser *p, long lo, long hi, const char *what, long *out);
int qx_designator(qx_parser *p, long lo, long hi, const char *what, long def, long *out);
void qx_free_stmt(qx_stmt *s);
void qx_free_block(qx_block *b);
void qx_free_gatedef(qx_gatedef *d);
int qx_append(qx_parser *p, qx_block *b, qx_stmt *s);
const dw_qasm_reg *qx_operand_reg(const qx_parser *p, const qx_operand *o, int quantum);
int qx_parse_qubit(qx_parser *p, qx_operand *o);
int qx_parse_bit(qx_parser *p, qx_operand *o);
int qx_push_operand(qx_parser *p, qx_stmt *s, size_t *cap, const qx_operand *o);
int qx_parse_statement(qx_parser *p, qx_block *b, int depth);
int qx_parse_body(qx_parser *p, qx_block **out, int depth);
/* Declarations (qasm_decl.c); each starts at its first keyword. */
int qx_parse_register(qx_parser *p, int quantum, int old_style);
int qx_parse_input(qx_parser *p);
int qx_parse_const_decl(qx_parser *p);
int qx_parse_gatedef(qx_parser *p);
int qx_parse_def(qx_parser *p);
int qx_parse_local_bits(qx_parser *p, qx_block *b, int old_style);
int qx_parse_defcall(qx_parser *p, qx_block *b);

#endif
