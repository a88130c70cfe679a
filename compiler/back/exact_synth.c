/* exact_synth.c - exact synthesis of a D[omega] unitary into Clifford+T.
 *
 * Takes: a 2x2 unitary U with entries in D[omega].  Gives: gates h, s, sdg,
 * t, x, y, z (circuit order) whose product is U up to a power of omega.
 *
 * Method.  Every single-qubit Clifford+T operator has entries in D[omega]
 * ("Fast and efficient exact synthesis of single-qubit unitaries generated
 * by Clifford and T gates", QIC 13(7-8), 2013), and has a normal form
 * (T | 1)(HT | SHT)* C with C a Clifford ("Representation of quantum
 * circuits with Clifford and pi/8 gates", arXiv:0806.3834, 2008).  We work
 * on the Bloch-sphere matrix R(U)_ij = tr(s_i U s_j U^dagger)/2 (s = Pauli
 * X, Y, Z), whose entries lie in Z[1/sqrt2] with a least common
 * denominator exponent k.  Cliffords act as signed permutations (k kept)
 * and T mixes two rows with 1/sqrt2, so any circuit has at least k T gates.
 * Each step removes one leading syllable g in {T, HT, SHT} for which
 * R(g)^-1 R(U) has exponent k - 1 (one always exists: the normal form's
 * leading syllable); after k steps R is a signed permutation, i.e. a
 * Clifford, looked up in a table of the 24 built by breadth-first search.
 * The result has exactly k T gates, the minimum.  The global phase w^j is
 * found by multiplying the sequence out exactly and comparing with U. */
#include "back/exact_synth.h"

#include <stdlib.h>
#include <string.h>

/* ---------------- 2x2 matrices over D[omega] ---------------- */

void dw_dmat2_init(dw_dmat2 *m)
{
	for (int r = 0; r < 2; r++)
		for (int c = 0; c < 2; c++)
			dw_dw_init(&m->e[r][c]);
}

void dw_dmat2_clear(dw_dmat2 *m)
{
	for (int r = 0; r < 2; r++)
		for (int c = 0; c < 2; c++)
			dw_dw_clear(&m->e[r][c]);
}

void dw_dmat2_set(dw_dmat2 *d, const dw_dmat2 *m)
{
	for (int r = 0; r < 2; r++)
		for (int c = 0; c < 2; c++)
			dw_dw_set(&d->e[r][c], &m->e[r][c]);
}

void dw_dmat2_identity(dw_dmat2 *m)
{
	dw_dw_set_si(&m->e[0][0], 1, 0, 0, 0, 0);
	dw_dw_set_si(&m->e[0][1], 0, 0, 0, 0, 0);
	dw_dw_set_si(&m->e[1][0], 0, 0, 0, 0, 0);
	dw_dw_set_si(&m->e[1][1], 1, 0, 0, 0, 0);
}

void dw_dmat2_mul(dw_dmat2 *out, const dw_dmat2 *a, const dw_dmat2 *b)
{
	dw_dmat2 r;
	dw_domega t;
	dw_dmat2_init(&r);
	dw_dw_init(&t);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++) {
			dw_dw_mul(&r.e[i][j], &a->e[i][0], &b->e[0][j]);
			dw_dw_mul(&t, &a->e[i][1], &b->e[1][j]);
			dw_dw_add(&r.e[i][j], &r.e[i][j], &t);
		}
	dw_dmat2_set(out, &r);
	dw_dmat2_clear(&r);
	dw_dw_clear(&t);
}

static void dmat2_adjoint(dw_dmat2 *out, const dw_dmat2 *a)
{
	dw_dmat2 r;
	dw_dmat2_init(&r);
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++)
			dw_dw_conj(&r.e[i][j], &a->e[j][i]);
	dw_dmat2_set(out, &r);
	dw_dmat2_clear(&r);
}

void dw_dmat2_gate(dw_dmat2 *m, dw_sq_gate g)
{
	dw_dmat2_identity(m);
	switch (g) {
	case DW_SQ_H:
		dw_dw_set_si(&m->e[0][0], 1, 0, 0, 0, 1);
		dw_dw_set_si(&m->e[0][1], 1, 0, 0, 0, 1);
		dw_dw_set_si(&m->e[1][0], 1, 0, 0, 0, 1);
		dw_dw_set_si(&m->e[1][1], -1, 0, 0, 0, 1);
		break;
	case DW_SQ_S:
		dw_dw_set_si(&m->e[1][1], 0, 0, 1, 0, 0);      /* i = w^2 */
		break;
	case DW_SQ_SDG:
		dw_dw_set_si(&m->e[1][1], 0, 0, -1, 0, 0);
		break;
	case DW_SQ_T:
		dw_dw_set_si(&m->e[1][1], 0, 1, 0, 0, 0);      /* w */
		break;
	case DW_SQ_TDG:
		dw_dw_set_si(&m->e[1][1], 0, 0, 0, -1, 0);     /* w^7 = -w^3 */
		break;
	case DW_SQ_X:
		dw_dw_set_si(&m->e[0][0], 0, 0, 0, 0, 0);
		dw_dw_set_si(&m->e[0][1], 1, 0, 0, 0, 0);
		dw_dw_set_si(&m->e[1][0], 1, 0, 0, 0, 0);
		dw_dw_set_si(&m->e[1][1], 0, 0, 0, 0, 0);
		break;
	case DW_SQ_Y:
		dw_dw_set_si(&m->e[0][0], 0, 0, 0, 0, 0);
		dw_dw_set_si(&m->e[0][1], 0, 0, -1, 0, 0);
		dw_dw_set_si(&m->e[1][0], 0, 0, 1, 0, 0);
		dw_dw_set_si(&m->e[1][1], 0, 0, 0, 0, 0);
		break;
	case DW_SQ_Z:
		dw_dw_set_si(&m->e[1][1], -1, 0, 0, 0, 0);
		break;
	}
}

/* m <- g m, by row operations (cheaper than a general product) */
static void dmat2_apply_left(dw_dmat2 *m, dw_sq_gate g)
{
	switch (g) {
	case DW_SQ_H:
		for (int c = 0; c < 2; c++) {
			dw_domega s, d;
			dw_dw_init(&s);
			dw_dw_init(&d);
			dw_dw_add(&s, &m->e[0][c], &m->e[1][c]);
			dw_dw_sub(&d, &m->e[0][c], &m->e[1][c]);
			s.k++;
			d.k++;
			dw_dw_reduce(&s);
			dw_dw_reduce(&d);
			dw_dw_set(&m->e[0][c], &s);
			dw_dw_set(&m->e[1][c], &d);
			dw_dw_clear(&s);
			dw_dw_clear(&d);
		}
		break;
	case DW_SQ_S:
	case DW_SQ_SDG:
	case DW_SQ_T:
	case DW_SQ_TDG:
	case DW_SQ_Z: {
		int j = g == DW_SQ_S ? 2 : g == DW_SQ_SDG ? 6 : g == DW_SQ_T ? 1
			: g == DW_SQ_TDG ? 7 : 4;
		for (int c = 0; c < 2; c++)
			dw_dw_mul_omega_pow(&m->e[1][c], &m->e[1][c], j);
		break;
	}
	case DW_SQ_X:
	case DW_SQ_Y:
		for (int c = 0; c < 2; c++) {
			dw_domega t;
			dw_dw_init(&t);
			dw_dw_set(&t, &m->e[0][c]);
			dw_dw_set(&m->e[0][c], &m->e[1][c]);
			dw_dw_set(&m->e[1][c], &t);
			dw_dw_clear(&t);
			if (g == DW_SQ_Y) {
				/* Y = [[0, -i], [i, 0]] */
				dw_dw_mul_omega_pow(&m->e[0][c], &m->e[0][c], 6);
				dw_dw_mul_omega_pow(&m->e[1][c], &m->e[1][c], 2);
			}
		}
		break;
	}
}

void dw_dmat2_circuit(dw_dmat2 *m, const dw_sq_gate *g, size_t n)
{
	dw_dmat2_identity(m);
	for (size_t i = 0; i < n; i++)
		dmat2_apply_left(m, g[i]);
}

int dw_dmat2_equal_phase(const dw_dmat2 *a, const dw_dmat2 *b, int *j)
{
	dw_domega t;
	dw_dw_init(&t);
	int found = 0;
	for (int p = 0; p < 8 && !found; p++) {
		int all = 1;
		for (int r = 0; r < 2 && all; r++)
			for (int c = 0; c < 2 && all; c++) {
				dw_dw_mul_omega_pow(&t, &b->e[r][c], p);
				all = dw_dw_equal(&a->e[r][c], &t);
			}
		if (all) {
			found = 1;
			*j = p;
		}
	}
	dw_dw_clear(&t);
	return found;
}

/* ---------------- Bloch-sphere matrices over Z[1/sqrt2] ---------------- */

typedef struct so3 {
	dw_zroot2 m[3][3];    /* numerators; value m / sqrt2^k */
	long k;
} so3;

static void so3_init(so3 *r)
{
	for (int i = 0; i < 3; i++)
		for (int j = 0; j < 3; j++)
			dw_zr2_init(&r->m[i][j]);
	r->k = 0;
}

static void so3_clear(so3 *r)
{
	for (int i = 0; i < 3; i++)
		for (int j = 0; j < 3; j++)
			dw_zr2_clear(&r->m[i][j]);
}

static void so3_copy(so3 *d, const so3 *s)
{
	for (int i = 0; i < 3; i++)
		for (int j = 0; j < 3; j++)
			dw_zr2_set(&d->m[i][j], &s->m[i][j]);
	d->k = s->k;
}

static void so3_reduce(so3 *r)
{
	while (r->k > 0) {
		for (int i = 0; i < 3; i++)
			for (int j = 0; j < 3; j++)
				if (!dw_zr2_div_by_sqrt2(&r->m[i][j]))
					return;
		for (int i = 0; i < 3; i++)
			for (int j = 0; j < 3; j++)
				dw_zr2_div_sqrt2(&r->m[i][j], &r->m[i][j]);
		r->k--;
	}
}

/* rows <- R(H) rows: (x, y, z) -> (z, -y, x) */
static void so3_apply_h(so3 *r)
{
	for (int j = 0; j < 3; j++) {
		mpz_swap(r->m[0][j].a, r->m[2][j].a);
		mpz_swap(r->m[0][j].b, r->m[2][j].b);
		dw_zr2_neg(&r->m[1][j], &r->m[1][j]);
	}
}

/* rows <- R(S^dagger) rows: (x, y, z) -> (y, -x, z) */
static void so3_apply_sdg(so3 *r)
{
	for (int j = 0; j < 3; j++) {
		mpz_swap(r->m[0][j].a, r->m[1][j].a);
		mpz_swap(r->m[0][j].b, r->m[1][j].b);
		dw_zr2_neg(&r->m[1][j], &r->m[1][j]);
	}
}

/* rows <- R(T^dagger) rows: x' = (x + y)/sqrt2, y' = (y - x)/sqrt2 */
static void so3_apply_tdg(so3 *r)
{
	dw_zroot2 t;
	dw_zr2_init(&t);
	for (int j = 0; j < 3; j++) {
		dw_zr2_set(&t, &r->m[0][j]);
		dw_zr2_add(&r->m[0][j], &r->m[0][j], &r->m[1][j]);
		dw_zr2_sub(&r->m[1][j], &r->m[1][j], &t);
		dw_zr2_mul_sqrt2(&r->m[2][j], &r->m[2][j]);
	}
	r->k++;
	dw_zr2_clear(&t);
	so3_reduce(r);
}

/* R(U) from U: R_ij = tr(s_i W_j) / 2 with W_j = U s_j U^dagger. */
static int so3_from_unitary(so3 *r, const dw_dmat2 *u)
{
	dw_dmat2 ud, pauli, w;
	dw_domega tr, t;
	dw_domega val[3][3];
	int ok = 1;
	dw_dmat2_init(&ud);
	dw_dmat2_init(&pauli);
	dw_dmat2_init(&w);
	dw_dw_init(&tr);
	dw_dw_init(&t);
	for (int i = 0; i < 3; i++)
		for (int j = 0; j < 3; j++)
			dw_dw_init(&val[i][j]);
	dmat2_adjoint(&ud, u);
	static const dw_sq_gate paulis[3] = {DW_SQ_X, DW_SQ_Y, DW_SQ_Z};
	for (int j = 0; j < 3; j++) {
		dw_dmat2_gate(&pauli, paulis[j]);
		dw_dmat2_mul(&w, u, &pauli);
		dw_dmat2_mul(&w, &w, &ud);
		/* tr(X W) = W01 + W10 */
		dw_dw_add(&val[0][j], &w.e[0][1], &w.e[1][0]);
		/* tr(Y W) = i (W01 - W10) */
		dw_dw_sub(&t, &w.e[0][1], &w.e[1][0]);
		dw_dw_mul_omega_pow(&val[1][j], &t, 2);
		/* tr(Z W) = W00 - W11 */
		dw_dw_sub(&val[2][j], &w.e[0][0], &w.e[1][1]);
	}
	long kmax = 0;
	for (int i = 0; i < 3; i++)
		for (int j = 0; j < 3; j++) {
			val[i][j].k += 2;         /* halve: 2 = sqrt2^2 */
			dw_dw_reduce(&val[i][j]);
			if (val[i][j].k > kmax)
				kmax = val[i][j].k;
		}
	for (int i = 0; i < 3 && ok; i++)
		for (int j = 0; j < 3 && ok; j++) {
			dw_zomega n;
			dw_zw_init(&n);
			dw_zw_set(&n, &val[i][j].num);
			for (long s = val[i][j].k; s < kmax; s++)
				dw_zw_mul_sqrt2(&n, &n);
			if (!dw_zw_to_zr2(&r->m[i][j], &n))
				ok = 0;               /* not real: U was not unitary */
			dw_zw_clear(&n);
		}
	r->k = kmax;
	so3_reduce(r);
	dw_dmat2_clear(&ud);
	dw_dmat2_clear(&pauli);
	dw_dmat2_clear(&w);
	dw_dw_clear(&tr);
	dw_dw_clear(&t);
	for (int i = 0; i < 3; i++)
		for (int j = 0; j < 3; j++)
			dw_dw_clear(&val[i][j]);
	return ok;
}

/* ---------------- the 24 single-qubit Cliffords ---------------- */

typedef struct clifford_entry {
	int rot[3][3];
	dw_sq_gate word[6];   /* operator order: product word[0] word[1] ... */
	int len;
} clifford_entry;

static void int_rot_of_gate(dw_sq_gate g, int m[3][3])
{
	static const int rh[3][3] = {{0, 0, 1}, {0, -1, 0}, {1, 0, 0}};
	static const int rs[3][3] = {{0, -1, 0}, {1, 0, 0}, {0, 0, 1}};
	static const int rsd[3][3] = {{0, 1, 0}, {-1, 0, 0}, {0, 0, 1}};
	static const int rx[3][3] = {{1, 0, 0}, {0, -1, 0}, {0, 0, -1}};
	static const int ry[3][3] = {{-1, 0, 0}, {0, 1, 0}, {0, 0, -1}};
	static const int rz[3][3] = {{-1, 0, 0}, {0, -1, 0}, {0, 0, 1}};
	const int (*src)[3] = rh;
	switch (g) {
	case DW_SQ_H: src = rh; break;
	case DW_SQ_S: src = rs; break;
	case DW_SQ_SDG: src = rsd; break;
	case DW_SQ_X: src = rx; break;
	case DW_SQ_Y: src = ry; break;
	case DW_SQ_Z: src = rz; break;
	default: break;
	}
	memcpy(m, src, sizeof(int) * 9);
}

/* Breadth-first over words in h, s, sdg, x, y, z: shortest word for each
 * of the 24 rotations.  Returns the number found (24). */
static int clifford_table(clifford_entry tab[24])
{
	static const dw_sq_gate gens[6] = {DW_SQ_H, DW_SQ_S, DW_SQ_SDG, DW_SQ_X,
		DW_SQ_Y, DW_SQ_Z};
	int n = 1;
	memset(tab, 0, sizeof(clifford_entry) * 24);
	for (int i = 0; i < 3; i++)
		tab[0].rot[i][i] = 1;
	for (int head = 0; head < n; head++)
		for (int g = 0; g < 6; g++) {
			int gm[3][3], prod[3][3];
			int_rot_of_gate(gens[g], gm);
			for (int i = 0; i < 3; i++)
				for (int j = 0; j < 3; j++) {
					prod[i][j] = 0;
					for (int l = 0; l < 3; l++)
						prod[i][j] += tab[head].rot[i][l] * gm[l][j];
				}
			int seen = 0;
			for (int e = 0; e < n && !seen; e++)
				seen = !memcmp(tab[e].rot, prod, sizeof prod);
			if (seen || n >= 24 || tab[head].len >= 6)
				continue;
			memcpy(tab[n].rot, prod, sizeof prod);
			memcpy(tab[n].word, tab[head].word, sizeof tab[n].word);
			tab[n].word[tab[head].len] = gens[g];
			tab[n].len = tab[head].len + 1;
			n++;
		}
	return n;
}

/* ---------------- the synthesis ---------------- */

int dw_exact_synth(const dw_dmat2 *u, dw_sq_gate **gates, size_t *count,
	int *phase8, dw_error *err)
{
	int status = DW_OK;
	so3 r, cand;
	dw_sq_gate *ops = NULL;          /* operator order */
	size_t nops = 0;
	so3_init(&r);
	so3_init(&cand);

	/* unitarity, exactly */
	{
		dw_dmat2 ud, p, id;
		dw_dmat2_init(&ud);
		dw_dmat2_init(&p);
		dw_dmat2_init(&id);
		dmat2_adjoint(&ud, u);
		dw_dmat2_mul(&p, &ud, u);
		dw_dmat2_identity(&id);
		int j = 0;
		int unitary = dw_dmat2_equal_phase(&p, &id, &j) && j == 0;
		dw_dmat2_clear(&ud);
		dw_dmat2_clear(&p);
		dw_dmat2_clear(&id);
		if (!unitary) {
			status = dw_fail(err, DW_EINPUT, "exact synthesis: matrix is not unitary");
			goto done;
		}
	}
	if (!so3_from_unitary(&r, u)) {
		status = dw_fail(err, DW_EINTERNAL, "exact synthesis: Bloch matrix not real");
		goto done;
	}
	if (r.k > (1L << 24)) {
		status = dw_fail(err, DW_EINPUT, "exact synthesis: denominator exponent %ld too large", r.k);
		goto done;
	}
	ops = dw_alloc(err, (size_t)r.k * 3 + 8, sizeof *ops);
	if (!ops) {
		status = DW_EINTERNAL;
		goto done;
	}
	while (r.k > 0) {
		/* syllables: 0 = T, 1 = HT, 2 = SHT (operator order) */
		int chosen = -1;
		for (int syl = 0; syl < 3 && chosen < 0; syl++) {
			so3_copy(&cand, &r);
			if (syl == 2)
				so3_apply_sdg(&cand);
			if (syl >= 1)
				so3_apply_h(&cand);
			so3_apply_tdg(&cand);
			if (cand.k == r.k - 1)
				chosen = syl;
		}
		if (chosen < 0) {
			status = dw_fail(err, DW_EINTERNAL,
				"exact synthesis: no syllable reduces exponent %ld", r.k);
			goto done;
		}
		if (chosen == 2)
			ops[nops++] = DW_SQ_S;
		if (chosen >= 1)
			ops[nops++] = DW_SQ_H;
		ops[nops++] = DW_SQ_T;
		so3_copy(&r, &cand);
	}
	/* r is now a signed permutation: a Clifford */
	{
		clifford_entry tab[24];
		int n = clifford_table(tab);
		int m[3][3];
		int valid = 1;
		for (int i = 0; i < 3; i++)
			for (int j = 0; j < 3; j++) {
				if (mpz_sgn(r.m[i][j].b) != 0 || !mpz_fits_sint_p(r.m[i][j].a))
					valid = 0;
				m[i][j] = valid ? (int)mpz_get_si(r.m[i][j].a) : 0;
			}
		int which = -1;
		for (int e = 0; e < n && valid && which < 0; e++)
			if (!memcmp(tab[e].rot, m, sizeof m))
				which = e;
		if (which < 0) {
			status = dw_fail(err, DW_EINTERNAL, "exact synthesis: residue is not a Clifford");
			goto done;
		}
		for (int i = 0; i < tab[which].len; i++)
			ops[nops++] = tab[which].word[i];
	}
	/* circuit order is the reverse of operator order */
	for (size_t i = 0; i < nops / 2; i++) {
		dw_sq_gate t = ops[i];
		ops[i] = ops[nops - 1 - i];
		ops[nops - 1 - i] = t;
	}
	{
		dw_dmat2 p;
		dw_dmat2_init(&p);
		dw_dmat2_circuit(&p, ops, nops);
		int j = 0;
		int same = dw_dmat2_equal_phase(u, &p, &j);
		dw_dmat2_clear(&p);
		if (!same) {
			status = dw_fail(err, DW_EINTERNAL, "exact synthesis: product differs from input");
			goto done;
		}
		*phase8 = j;
	}
	*gates = ops;
	*count = nops;
	ops = NULL;
done:
	free(ops);
	so3_clear(&r);
	so3_clear(&cand);
	return status;
}
