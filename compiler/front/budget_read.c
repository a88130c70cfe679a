/* budget_read.c - read an audit budget: a mapping from ledger figure names
 * to non-negative upper limits, from a budget YAML file (optionally under a
 * top-level `budget:` key) or from the `budget:` section of a problem file.
 * Takes: a YAML path or tree.  Gives: dw_budget, or DW_EINPUT with
 * "FILE:LINE: budget.KEY: message". */
#include <stdio.h>
#include <string.h>

#include "dwell/budget.h"
#include "front/yaml_doc.h"

/* The ledger figures a budget may limit (DESIGN 7).  Kept in step with
 * docs/problem-format.md. */
static const char *const budget_keys[] = {
	"qubits", "t_count", "t_depth", "depth", "toffoli_count",
	"rotation_count", "clifford_count", "two_qubit_count", "measure_count",
	"gate_count", NULL
};

int dw_budget_from_ynode(const dw_ynode *map, const char *path, dw_budget *out,
	dw_error *err)
{
	memset(out, 0, sizeof *out);
	if (dw_ynode_is_null(map))
		return DW_OK;
	if (dw_yexpect_map(map, path, err) || dw_ycheck_keys(map, path, budget_keys, err))
		return err->status;
	if (map->len > DW_BUDGET_MAX)
		return dw_yerr(err, map, path, "at most %d limits", DW_BUDGET_MAX);
	for (size_t i = 0; i < map->len; i++) {
		char sub[300];
		dw_ypath_key(sub, sizeof sub, path, map->key[i]->text);
		double v;
		if (dw_yget_real(map->item[i], sub, &v, err))
			return err->status;
		if (v < 0)
			return dw_yerr(err, map->item[i], sub,
				"a limit must not be negative, got %s", map->item[i]->text);
		dw_budget_line *l = &out->line[out->n++];
		/* keys come from budget_keys, all shorter than l->key */
		snprintf(l->key, sizeof l->key, "%s", map->key[i]->text);
		l->limit = v;
		l->line = map->key[i]->line;
	}
	return DW_OK;
}

int dw_budget_load(const char *path, dw_budget *out, dw_error *err)
{
	memset(out, 0, sizeof *out);
	dw_ynode *root = dw_yaml_parse_file(path, path, err);
	if (!root)
		return err->status;
	const dw_ynode *map = root;
	const char *prefix = "";
	int rc = DW_OK;
	if (root->kind == DW_Y_MAP && dw_ymap_get(root, "budget", NULL)) {
		static const char *const top[] = {"budget", NULL};
		rc = dw_ycheck_keys(root, "", top, err);
		map = dw_ymap_get(root, "budget", NULL);
		prefix = "budget";
	} else if (dw_ynode_is_null(root) || (root->kind == DW_Y_MAP && root->len == 0)) {
		rc = dw_yerr(err, root, NULL, "the budget file gives no limits");
	}
	if (!rc)
		rc = dw_budget_from_ynode(map, prefix, out, err);
	if (!rc && out->n == 0)
		rc = dw_yerr(err, map, prefix, "the budget file gives no limits");
	dw_ynode_free(root);
	if (rc)
		memset(out, 0, sizeof *out);
	return rc;
}
