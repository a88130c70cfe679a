/* yaml_doc.h - a small YAML document tree built on libyaml, and typed readers
 * over it that report errors as "ORIGIN:LINE: key.path: message".
 *
 * Takes: a YAML file or string.  Gives: a tree of mappings, sequences and
 * scalars, each node with the line it came from (1-based) and its origin
 * (the file name, or a label such as "--set schedule.steps=x" for nodes made
 * from a command-line override; such nodes have line 0, so their messages
 * read "LABEL: key.path: message").  Duplicate keys, aliases, non-scalar keys
 * and more than one document are rejected while building.  Internal to the
 * front end (problem.c, budget_read.c). */
#ifndef DWELL_FRONT_YAML_DOC_H
#define DWELL_FRONT_YAML_DOC_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "dwell/budget.h"
#include "dwell/diag.h"

typedef enum { DW_Y_SCALAR, DW_Y_SEQ, DW_Y_MAP } dw_ykind;

typedef struct dw_ynode dw_ynode;
struct dw_ynode {
	dw_ykind kind;
	long line;            /* 1-based source line; 0 for override nodes */
	const char *origin;   /* not owned: must outlive the tree */
	char *text;           /* SCALAR: NUL-terminated text */
	bool plain;           /* SCALAR: written without quotes or block style */
	size_t len;           /* SEQ: items; MAP: key/value pairs */
	size_t cap;
	dw_ynode **item;      /* SEQ: items; MAP: values (parallel to key) */
	dw_ynode **key;       /* MAP: keys, scalar nodes */
};

/* Parse a whole file.  The root is a mapping, a sequence or a scalar; an
 * empty document gives an empty mapping at line 1.  origin is used in every
 * node and message (normally the path as the user gave it). */
dw_ynode *dw_yaml_parse_file(const char *path, const char *origin, dw_error *err);

/* Parse text (e.g. the value of a --set override).  Every node gets line 0
 * and the given origin; empty text gives a null scalar. */
dw_ynode *dw_yaml_parse_text(const char *text, const char *origin, dw_error *err);

void dw_ynode_free(dw_ynode *n);

/* New nodes (line and origin as given); NULL with err filled on failure. */
dw_ynode *dw_ynode_new_map(long line, const char *origin, dw_error *err);
dw_ynode *dw_ynode_new_scalar(const char *text, long line, const char *origin,
	dw_error *err);

/* Value of key in a mapping (NULL when absent); *index gets its position. */
dw_ynode *dw_ymap_get(const dw_ynode *map, const char *key, size_t *index);

/* Set key to value in a mapping, replacing (and freeing) an old value, or
 * appending key.  Takes ownership of key and value, also on failure. */
int dw_ymap_put(dw_ynode *map, dw_ynode *key, dw_ynode *value, dw_error *err);

/* Remove a key and free its value; no-op when absent. */
void dw_ymap_remove(dw_ynode *map, const char *key);

/* Keys under a top-level section that exclude each other. */
typedef struct dw_ygroup {
	const char *section;
	const char *const *keys;    /* NULL-terminated */
} dw_ygroup;

/* Apply one override "key.path=value" to the tree: the path names mapping
 * keys separated by dots (a number selects a list entry), missing sections
 * are created, the value is parsed as YAML (nodes get line 0 and origin
 * label, which must outlive the tree), and setting one key of a group in
 * groups (NULL-section terminated, may be NULL) removes the others.
 * Errors: DW_EINPUT "LABEL: message". */
int dw_yaml_override(dw_ynode *root, const char *set, const char *label,
	const dw_ygroup *groups, dw_error *err);

/* A null scalar: plain "", "~", "null", "Null" or "NULL". */
bool dw_ynode_is_null(const dw_ynode *n);

/* ---- typed readers: each fails with DW_EINPUT "ORIGIN:LINE: PATH: ..." ---- */

/* Record an error about node n at key path `path`. */
int dw_yerr(dw_error *err, const dw_ynode *n, const char *path,
	const char *fmt, ...) __attribute__((format(printf, 4, 5)));

/* Describe a node for messages: "'text'", "a mapping", "a sequence", "nothing". */
void dw_ydescribe(const dw_ynode *n, char *buf, size_t size);

/* Child key paths: "parent.key" and "parent[i]" (truncated safely). */
void dw_ypath_key(char *buf, size_t size, const char *parent, const char *key);
void dw_ypath_index(char *buf, size_t size, const char *parent, size_t i);

int dw_yexpect_map(const dw_ynode *n, const char *path, dw_error *err);
int dw_yexpect_seq(const dw_ynode *n, const char *path, dw_error *err);

/* Every key of map must be in allowed (NULL-terminated). */
int dw_ycheck_keys(const dw_ynode *map, const char *path,
	const char *const *allowed, dw_error *err);

/* A finite real number (plain scalar; .nan, .inf, overflow rejected). */
int dw_yget_real(const dw_ynode *n, const char *path, double *out, dw_error *err);

/* A decimal integer in [lo, hi] (plain scalar, overflow checked).  what
 * names the expectation in the message, e.g. "a positive integer". */
int dw_yget_int(const dw_ynode *n, const char *path, int64_t lo, int64_t hi,
	const char *what, int64_t *out, dw_error *err);

/* A non-negative decimal integer up to UINT64_MAX. */
int dw_yget_uint64(const dw_ynode *n, const char *path, uint64_t *out, dw_error *err);

/* true/false (also True/TRUE/False/FALSE). */
int dw_yget_bool(const dw_ynode *n, const char *path, bool *out, dw_error *err);

/* A non-null scalar, copied (caller frees). */
int dw_yget_string(const dw_ynode *n, const char *path, char **out, dw_error *err);

/* One of names[] (NULL-terminated); *out gets its index. */
int dw_yget_enum(const dw_ynode *n, const char *path, const char *const *names,
	int *out, dw_error *err);

/* True when n is the plain or quoted scalar "auto". */
bool dw_yis_auto(const dw_ynode *n);

/* ---- readers built on the tree, defined in budget_read.c ---- */

/* Read a budget mapping (key -> non-negative number) at key path `path`. */
int dw_budget_from_ynode(const dw_ynode *map, const char *path, dw_budget *out,
	dw_error *err);

#endif
