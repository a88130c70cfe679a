/* stencil.c - terms of X_anc (x) [X_sgn (x)] A/alpha for constant-
 * coefficient stencils, with no tables: cost polynomial in the qubits.
 * Takes: an analysed stencil problem and the top-level layout.  Gives:
 * dw_term entries (Pauli strings where possible, else definitions with one
 * parameter theta applying exp(-i theta/2 T)).
 *
 * A = sum_o c_o S_o with S_o = (x)_a S^(a)_(o_a) (DESIGN 3.3).  A symmetric
 * stencil is c_0 I + sum over pairs {o, -o} of c_o (S_o + S_o^T); the
 * dilation of a non-symmetric one (top sys qubit t, DESIGN 3.1) is
 * c_0 X_t + sum_o c_o (s+_t (x) S_o + s-_t (x) S_o^T), s+ = |0><1|.
 *
 * Matchings (METHODS 5, colouring by offset): along an axis of N = 2^M
 * points, write |o| = 2^m q with q odd.  The edges {x, x + |o|} split into
 * two matchings by bit m of the left end x (adding |o| flips bit m and
 * keeps the bits below).  In the frame F_s = V T^(-s), where T adds 2^m
 * and V subtracts (q-1)/2 from the bits above m when bit m is 1, matching
 * s pairs y with y XOR 2^m, y having bit m clear (so it is X on bit m when
 * m = 0 and q = 1: a Pauli product).  The left end of an edge is the |0>
 * side of bit m: S_o becomes s+ on bit m for o_a > 0 and s- for o_a < 0.
 * Dirichlet axes drop the edges that wrap: with z = the bits above m of y
 * and Z = N / 2^(m+1), the edge exists iff z < Z - (q-1)/2 - s (a
 * comparator with a constant into a flag; empty when that bound is 0, no
 * condition when it is Z).  Periodic axes keep every edge.
 *
 * A point moving along several axes is a product: in the product frame its
 * edges are (x)_a s^(eps_a) on the bits m_a (plus s+ on t when dilated),
 * and (x)_a s^(eps_a) + h.c. = 2^(1-D) sum over even subsets T of the D
 * factors of (-1)^(|T|/2) prod_(a in T) eps_a  Y_T X_(rest): commuting
 * Pauli strings, so the exponential is exact as a product of (controlled)
 * Pauli rotations.  Offsets with the same |o_a| share frames: their sign
 * patterns act on orthogonal pairs of frame states, so one term per choice
 * of (s_a) carries them all, with norm max |c|/alpha.
 * Frames use the increments of adder.c (DW_STAGE_ARITH; with
 * target.uncompute: measure their ANDs are erased by measurement);
 * rotations are DW_STAGE_TERM. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/program.h"
#include "dwell/stencil.h"

typedef struct unit {
	int off[3];           /* one offset (class representative) */
	double coeff;         /* coefficient of (s^eps (x) ...) + h.c. */
} unit;

typedef struct lowering {
	const dw_problem *p;
	const dw_layout *lay;
	dw_circuit *c;
	dw_term **terms;
	size_t *nterms;
	dw_error *e;
	uint32_t axis0[3], bits[3];   /* top-level first qubit and width per axis */
	bool dil;
	uint32_t top;                 /* dilation qubit */
	dw_pauli base;                /* X_anc [X_sgn] */
} lowering;

static int push_term(lowering *L, const dw_term *t)
{
	dw_term *v = realloc(*L->terms, (*L->nterms + 1) * sizeof *v);
	if (!v)
		return dw_fail(L->e, DW_EINTERNAL, "out of memory (terms)");
	*L->terms = v;
	v[(*L->nterms)++] = *t;
	return DW_OK;
}

static int add_pauli(lowering *L, dw_pauli p, double cb)
{
	for (size_t i = 0; i < *L->nterms; i++) {
		dw_term *t = &(*L->terms)[i];
		if (t->pauli && t->p.x == p.x && t->p.z == p.z) {
			t->cb += cb;
			return DW_OK;
		}
	}
	dw_term t;
	memset(&t, 0, sizeof t);
	t.p = p;
	t.pauli = true;
	t.cb = cb;
	t.norm = 1.0;
	t.def = DW_NO_DEF;
	return push_term(L, &t);
}

/* exp(-i phi/2 P) for P = X or Y on the listed local qubits (Y where ymask
 * bit i is set) times X on the others, controlled by `flag` when it is
 * not DW_NO_DEF; phi = theta * w.  The controlled rz is a crz, or for
 * the Clifford+T gate set (which has no crz) rz(phi/2), cx, rz(-phi/2),
 * cx: X rz(-a) X = rz(a), so the target turns by phi only when the flag
 * is 1. */
static void pauli_rotation(dw_builder *b, const uint32_t *qs, uint32_t k,
	uint32_t ymask, uint32_t flag, double w, bool no_crz)
{
	for (uint32_t i = 0; i < k; i++) {
		if ((ymask >> i) & 1)
			dw_g1(b, DW_G_SDG, qs[i]);
		dw_g1(b, DW_G_H, qs[i]);
	}
	for (uint32_t i = 0; i + 1 < k; i++)
		dw_g2(b, DW_G_CX, qs[i], qs[i + 1]);
	if (flag == DW_NO_DEF) {
		dw_r1(b, DW_G_RZ, qs[k - 1], dw_par(0, w));
	} else if (no_crz) {
		dw_r1(b, DW_G_RZ, qs[k - 1], dw_par(0, w / 2));
		dw_g2(b, DW_G_CX, flag, qs[k - 1]);
		dw_r1(b, DW_G_RZ, qs[k - 1], dw_par(0, -w / 2));
		dw_g2(b, DW_G_CX, flag, qs[k - 1]);
	} else {
		uint32_t q2[2] = {flag, qs[k - 1]};
		dw_expr ang = dw_par(0, w);
		dw_gate_op(b, DW_G_CRZ, q2, &ang);
	}
	for (uint32_t i = k - 1; i-- > 0;)
		dw_g2(b, DW_G_CX, qs[i], qs[i + 1]);
	for (uint32_t i = 0; i < k; i++) {
		dw_g1(b, DW_G_H, qs[i]);
		if ((ymask >> i) & 1)
			dw_g1(b, DW_G_S, qs[i]);
	}
}

/* The frame of one axis (local qubits lq[0..M)): apply T^(-s) then V
 * (forward), or V^-1 then T^s (backward). */
static int frame(lowering *L, dw_builder *b, const uint32_t *lq, uint32_t M,
	uint32_t m, uint32_t q, int s, bool forward)
{
	uint32_t tdef = DW_NO_DEF, vdef = DW_NO_DEF;
	bool meas = L->p->uncompute == DW_UNCOMPUTE_MEASURE;
	if (s) {
		tdef = forward ? dw_decrement_def(L->c, M - m, false, meas, L->e)
			: dw_increment_def(L->c, M - m, false, meas, L->e);
		if (tdef == DW_NO_DEF)
			return L->e->status;
	}
	if (q == 3) {
		vdef = forward ? dw_decrement_def(L->c, M - m - 1, true, meas, L->e)
			: dw_increment_def(L->c, M - m - 1, true, meas, L->e);
		if (vdef == DW_NO_DEF)
			return L->e->status;
	} else if (q != 1) {
		return dw_fail(L->e, DW_EINTERNAL, "internal: stencil offset factor %u", q);
	}
	uint32_t args[64];
	if (forward && tdef != DW_NO_DEF)
		dw_call(b, tdef, lq + m, NULL, 1);
	if (vdef != DW_NO_DEF) {
		args[0] = lq[m];
		for (uint32_t i = m + 1; i < M; i++)
			args[i - m] = lq[i];
		dw_call(b, vdef, args, NULL, 1);
	}
	if (!forward && tdef != DW_NO_DEF)
		dw_call(b, tdef, lq + m, NULL, 1);
	return DW_OK;
}

/* One term: the units of a group (same |o_a| on every axis) for the
 * matching choice s[] (bit a of smask). */
static int build_term(lowering *L, const unit *u, size_t nu, const int absoff[3],
	unsigned smask)
{
	const dw_stencil *st = &L->p->stencil;
	double alpha = L->p->alpha;
	int ax[3], d = 0;
	uint32_t m[3] = {0}, q[3] = {0}, M[3] = {0};
	uint64_t bound[3] = {0};
	bool cond[3] = {false};
	bool trivial = true;
	for (int a = 0; a < st->dims; a++) {
		if (!absoff[a])
			continue;
		int i = d++;
		ax[i] = a;
		M[i] = L->bits[a];
		m[i] = (uint32_t)__builtin_ctz((unsigned)absoff[a]);
		q[i] = (uint32_t)absoff[a] >> m[i];
		int s = (smask >> i) & 1;
		if (q[i] != 1 || s)
			trivial = false;
		if (!st->periodic[a]) {
			uint32_t w = M[i] - m[i] - 1;
			int64_t Z = (int64_t)1 << w;
			int64_t U = Z - (int64_t)(q[i] - 1) / 2 - s;
			if (U <= 0)
				return DW_OK;           /* empty matching */
			if (U < Z) {
				cond[i] = true;
				bound[i] = (uint64_t)U;
				trivial = false;
			}
		}
	}
	/* Pauli strings over the D factors: bit i < d is axis ax[i]'s bit m,
	 * bit d the dilation qubit */
	int D = d + (L->dil ? 1 : 0);
	double wgt[16] = {0};
	double norm = 0;
	for (size_t k = 0; k < nu; k++) {
		int eps[4];
		for (int i = 0; i < d; i++)
			eps[i] = u[k].off[ax[i]] > 0 ? 1 : -1;
		if (L->dil)
			eps[d] = 1;
		norm = fmax(norm, fabs(u[k].coeff) / alpha);
		for (unsigned T = 0; T < (1u << D); T++) {
			int pc = __builtin_popcount(T);
			if (pc % 2)
				continue;
			double sg = (pc / 2) % 2 ? -1 : 1;
			for (int i = 0; i < D; i++)
				if ((T >> i) & 1)
					sg *= eps[i];
			wgt[T] += u[k].coeff * sg / (double)(1u << (D - 1));
		}
	}
	/* top-level qubits of the factors */
	uint32_t fq[4];
	for (int i = 0; i < d; i++)
		fq[i] = L->axis0[ax[i]] + m[i];
	if (L->dil)
		fq[d] = L->top;
	if (trivial) {
		for (unsigned T = 0; T < (1u << D); T++) {
			if (wgt[T] == 0.0)
				continue;
			dw_pauli pp = L->base;
			for (int i = 0; i < D; i++) {
				pp.x |= UINT64_C(1) << fq[i];
				if ((T >> i) & 1)
					pp.z |= UINT64_C(1) << fq[i];
			}
			if (add_pauli(L, pp, wgt[T] / alpha))
				return L->e->status;
		}
		return DW_OK;
	}
	/* a definition on anc, [sgn], the axes' bits, [t] */
	dw_term t;
	memset(&t, 0, sizeof t);
	t.ca = 0;
	t.cb = 1;
	t.norm = norm;
	t.def = DW_NO_DEF;
	t.q[t.nq++] = L->lay->anc;
	if (L->lay->variant == 'I')
		t.q[t.nq++] = L->lay->sgn;
	uint32_t lax[3];                 /* local index of each axis's bit 0 */
	for (int i = 0; i < d; i++) {
		lax[i] = t.nq;
		for (uint32_t k = 0; k < M[i]; k++)
			t.q[t.nq++] = L->axis0[ax[i]] + k;
	}
	uint32_t ltop = t.nq;
	if (L->dil)
		t.q[t.nq++] = L->top;
	char name[64];
	snprintf(name, sizeof name, "stencil_band_%d_%d_%d_s%u", absoff[0],
		st->dims > 1 ? absoff[1] : 0, st->dims > 2 ? absoff[2] : 0, smask);
	dw_builder *b = dw_begin(L->c, name, t.nq, 1, DW_STAGE_TERM);
	uint32_t lq[3][64];
	for (int i = 0; i < d; i++)
		for (uint32_t k = 0; k < M[i]; k++)
			lq[i][k] = lax[i] + k;
	int rc = DW_OK;
	for (int i = 0; i < d && !rc; i++)
		rc = frame(L, b, lq[i], M[i], m[i], q[i], (smask >> i) & 1, true);
	/* conditions: comparator outputs, ANDed into one flag */
	uint32_t cmp[3], ncmp = 0, cdef[3];
	uint32_t flag = DW_NO_DEF, andq = DW_NO_DEF;
	for (int i = 0; i < d && !rc; i++) {
		if (!cond[i])
			continue;
		uint32_t w = M[i] - m[i] - 1;
		cdef[ncmp] = dw_less_const_def(L->c, w, bound[i],
			L->p->uncompute == DW_UNCOMPUTE_MEASURE, L->e);
		if (cdef[ncmp] == DW_NO_DEF) {
			rc = L->e->status;
			break;
		}
		cmp[ncmp] = dw_add_ancillas(b, 1);
		uint32_t args[64];
		for (uint32_t k = 0; k < w; k++)
			args[k] = lq[i][m[i] + 1 + k];
		args[w] = cmp[ncmp];
		dw_call(b, cdef[ncmp], args, NULL, 1);
		ncmp++;
	}
	if (!rc && ncmp == 1)
		flag = cmp[0];
	if (!rc && ncmp == 2) {
		flag = dw_add_ancillas(b, 1);
		dw_g3(b, DW_G_CCX, cmp[0], cmp[1], flag);
	}
	if (!rc && ncmp == 3) {
		andq = dw_add_ancillas(b, 1);
		flag = dw_add_ancillas(b, 1);
		dw_g3(b, DW_G_CCX, cmp[0], cmp[1], andq);
		dw_g3(b, DW_G_CCX, andq, cmp[2], flag);
	}
	if (!rc) {
		for (unsigned T = 0; T < (1u << D); T++) {
			if (wgt[T] == 0.0)
				continue;
			uint32_t qs[8], k = 0, ymask = 0;
			qs[k++] = 0;                        /* anc */
			if (L->lay->variant == 'I')
				qs[k++] = 1;                    /* sgn */
			for (int i = 0; i < D; i++) {
				if ((T >> i) & 1)
					ymask |= 1u << k;
				qs[k++] = i < d ? lax[i] + m[i] : ltop;
			}
			pauli_rotation(b, qs, k, ymask, flag, wgt[T] / alpha,
				L->p->gates == DW_GATES_CLIFFORD_T);
		}
		if (ncmp == 3) {
			dw_g3(b, DW_G_CCX, andq, cmp[2], flag);
			dw_g3(b, DW_G_CCX, cmp[0], cmp[1], andq);
		}
		if (ncmp == 2)
			dw_g3(b, DW_G_CCX, cmp[0], cmp[1], flag);
		for (int j = d - 1, n = (int)ncmp - 1; j >= 0; j--) {
			if (!cond[j])
				continue;
			uint32_t w = M[j] - m[j] - 1;
			uint32_t args[64];
			for (uint32_t k = 0; k < w; k++)
				args[k] = lq[j][m[j] + 1 + k];
			args[w] = cmp[n];
			dw_call(b, cdef[n], args, NULL, 1);
			n--;
		}
	}
	for (int i = d - 1; i >= 0 && !rc; i--)
		rc = frame(L, b, lq[i], M[i], m[i], q[i], (smask >> i) & 1, false);
	if (rc) {
		dw_end(b, NULL);
		return rc;
	}
	t.def = dw_end(b, L->e);
	if (t.def == DW_NO_DEF)
		return L->e->status;
	return push_term(L, &t);
}

int dw_stencil_terms(const dw_problem *p, const dw_layout *lay, dw_circuit *c,
	dw_term **terms, size_t *nterms, dw_error *e)
{
	const dw_stencil *st = &p->stencil;
	lowering L;
	memset(&L, 0, sizeof L);
	L.p = p;
	L.lay = lay;
	L.c = c;
	L.terms = terms;
	L.nterms = nterms;
	L.e = e;
	L.dil = p->dilated;
	uint32_t off = lay->sys0;
	for (int a = 0; a < st->dims; a++) {
		L.axis0[a] = off;
		L.bits[a] = (uint32_t)__builtin_ctzll((unsigned long long)st->shape[a]);
		off += L.bits[a];
	}
	L.top = lay->sys0 + lay->n - 1;
	if (off != lay->sys0 + lay->n - (L.dil ? 1 : 0))
		return dw_fail(e, DW_EINTERNAL, "internal: stencil grid of %u qubits in a "
			"%u-qubit register", off - lay->sys0, lay->n);
	L.base.x = UINT64_C(1) << lay->anc;
	if (lay->variant == 'I')
		L.base.x |= UINT64_C(1) << lay->sgn;

	dw_stencil_class *cls = dw_alloc(e, st->npoints, sizeof *cls);
	unit *u = dw_alloc(e, st->npoints, sizeof *u);
	bool *done = dw_alloc(e, st->npoints, sizeof *done);
	if (!cls || !u || !done) {
		free(cls);
		free(u);
		free(done);
		return e->status;
	}
	size_t ncls = dw_stencil_classes(st, cls);
	size_t nu = 0;
	int rc = DW_OK;
	for (size_t k = 0; k < ncls && !rc; k++) {
		const int *o = cls[k].off;
		if (!o[0] && !o[1] && !o[2]) {
			dw_pauli pp = L.base;
			if (L.dil)
				pp.x |= UINT64_C(1) << L.top;
			rc = add_pauli(&L, pp, cls[k].coeff / p->alpha);
			continue;
		}
		if (L.dil) {
			u[nu].coeff = cls[k].coeff;
		} else {
			int neg[3] = {-o[0], -o[1], -o[2]};
			long j = dw_stencil_class_find(st, cls, ncls, neg);
			if (j == (long)k)
				u[nu].coeff = cls[k].coeff / 2;   /* S_o symmetric already */
			else if (j > (long)k)
				u[nu].coeff = cls[k].coeff;       /* pair {o, -o} */
			else if (j >= 0)
				continue;                         /* counted with its partner */
			else {
				rc = dw_fail(e, DW_EINTERNAL, "internal: stencil offset without "
					"its mirror in a symmetric stencil");
				break;
			}
		}
		memcpy(u[nu].off, o, sizeof u[nu].off);
		nu++;
	}
	/* groups of units with the same |o_a| */
	unit grp[32];
	memset(done, 0, st->npoints * sizeof *done);
	for (size_t k = 0; k < nu && !rc; k++) {
		if (done[k])
			continue;
		int absoff[3] = {abs(u[k].off[0]), abs(u[k].off[1]), abs(u[k].off[2])};
		size_t ng = 0;
		for (size_t j = k; j < nu; j++) {
			if (done[j] || abs(u[j].off[0]) != absoff[0] || abs(u[j].off[1]) != absoff[1]
					|| abs(u[j].off[2]) != absoff[2])
				continue;
			done[j] = true;
			if (ng == 32) {
				rc = dw_fail(e, DW_EINTERNAL, "internal: more than 32 stencil points "
					"with the same |offset|");
				break;
			}
			grp[ng++] = u[j];
		}
		if (rc)
			break;
		int d = (absoff[0] != 0) + (absoff[1] != 0) + (absoff[2] != 0);
		for (unsigned s = 0; s < (1u << d) && !rc; s++)
			rc = build_term(&L, grp, ng, absoff, s);
	}
	free(cls);
	free(u);
	free(done);
	if (rc)
		return rc;
	/* drop Pauli terms that cancelled */
	size_t w = 0;
	for (size_t i = 0; i < *nterms; i++) {
		dw_term *t = &(*terms)[i];
		if (!t->pauli || t->ca != 0.0 || t->cb != 0.0)
			(*terms)[w++] = *t;
	}
	*nterms = w;
	return DW_OK;
}
