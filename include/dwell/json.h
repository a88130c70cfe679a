/* json.h - a small, strict JSON reader (the grammar of RFC 8259) used to
 * read ledgers back (dwell diff, dwell check, the compile-time budget).
 *
 * Takes: JSON text (a file or a buffer).  Gives: a tree of dw_json values
 * that keeps members in document order and numbers both as written and as
 * doubles; integer literals whose magnitude fits in 64 bits are also kept
 * exactly (sign + uint64 magnitude), so counts above 2^53 compare exactly.
 * Errors: DW_EINPUT with "FILE:LINE:COL: message" (line and column count
 * from 1; the column counts bytes).  Strictness: one value per document,
 * no comments, no trailing commas, no leading zeros, UTF-8 only (a leading
 * byte-order mark is skipped), escapes checked, unpaired surrogates and
 * duplicate member names refused, nesting at most DW_JSON_MAX_DEPTH. */
#ifndef DWELL_JSON_H
#define DWELL_JSON_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "dwell/diag.h"

#define DW_JSON_MAX_DEPTH 128
#define DW_JSON_MAX_BYTES ((size_t)1 << 30)  /* refuse larger files */

typedef enum dw_json_kind {
	DW_JSON_NULL, DW_JSON_BOOL, DW_JSON_NUMBER, DW_JSON_STRING,
	DW_JSON_ARRAY, DW_JSON_OBJECT
} dw_json_kind;

typedef struct dw_json {
	dw_json_kind kind;
	long line, col;           /* where the value starts */
	char *key;                /* member name inside an object, else NULL */
	size_t key_len;           /* (a name may hold NUL via \u0000) */
	int boolean;              /* BOOL: 0 or 1 */
	char *str;                /* STRING: decoded UTF-8, NUL-terminated;
	                             NUMBER: the literal exactly as written */
	size_t len;               /* bytes in str */
	double num;               /* NUMBER: nearest double */
	int is_int;               /* NUMBER: integer literal (no fraction or
	                             exponent) with magnitude <= UINT64_MAX */
	int negative;             /* NUMBER, is_int: minus sign (never for 0) */
	uint64_t mag;             /* NUMBER, is_int: magnitude, exact */
	size_t n;                 /* ARRAY, OBJECT: number of children */
	struct dw_json *item;     /* ARRAY, OBJECT: children in order */
} dw_json;

/* Parse len bytes of text.  origin names the text in messages (a file
 * name, or e.g. "<ledger>").  On success *out owns the tree. */
int dw_json_parse_string(const char *text, size_t len, const char *origin,
	dw_json **out, dw_error *err);

/* Read and parse a file ("-" is not special). */
int dw_json_parse_file(const char *path, dw_json **out, dw_error *err);

/* Free a tree returned by a parse function (NULL is fine). */
void dw_json_free(dw_json *v);

/* Member of an object by name, or NULL (also when obj is no object). */
const dw_json *dw_json_member(const dw_json *obj, const char *key);

/* Follow a dotted path: "qubits.total", "gates.cx", "stages.2.depth"
 * (a decimal segment indexes an array).  NULL when absent. */
const dw_json *dw_json_path(const dw_json *root, const char *path);

/* Exact unsigned value of a non-negative integer number: DW_OK and *out,
 * or DW_EINPUT when v is no such number (no message is recorded). */
int dw_json_get_u64(const dw_json *v, uint64_t *out);

/* Write s (len bytes) as a JSON string literal with escapes. */
void dw_json_write_string(FILE *f, const char *s, size_t len);

#endif
