/* verify.c - prove compiled circuits correct by simulating them
 * (`dwell verify`, DESIGN 11).
 * Takes: an analysed problem and an instance count K.  Gives: the trace
 * distance between the instance-averaged reduced state on (anc, [sgn],
 * sys) and the target |0>[|+>]|x>, with x solving the ORIGINAL A x = b by
 * LAPACKE_zgesv; the mean and minimum fidelity; the probability that every
 * work qubit returned to |0>.  Each instance is compiled exactly as
 * `compile --instances K` writes it (instance k uses seed + k - 1), written
 * as OpenQASM 3 text, read back by the runtime reader and simulated by the
 * dense simulator, so the check covers the emitted text too.
 *
 * The averaged state has rank at most K times the number of work-register
 * values with weight, so its trace distance to the target is computed
 * exactly in the span of those vectors and the target (an orthonormal basis
 * by modified Gram-Schmidt, eigenvalues by LAPACKE_zheev). */
#include <complex.h>
#include <lapacke.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"
#include "dwell/sim.h"
#include "dwell/verify.h"

typedef double complex cplx;

/* The full rhs vector of the analysed problem (2^n entries, normalised). */
static int rhs_vector(const dw_problem *p, cplx *b, dw_error *e)
{
	size_t N = (size_t)1 << p->n;
	for (size_t i = 0; i < N; i++) {
		switch (p->rhs_kind) {
		case DW_RHS_BASIS:
			b[i] = i == p->basis ? 1 : 0;
			break;
		case DW_RHS_UNIFORM:
			b[i] = 1 / sqrt((double)N);
			break;
		case DW_RHS_PRODUCT: {
			cplx a = 1;
			for (int k = 0; k < p->n && (size_t)k < p->nproduct; k++)
				a *= (i >> k) & 1 ? cexp(I * p->product[k][1]) * sin(p->product[k][0] / 2)
					: cos(p->product[k][0] / 2);
			b[i] = a;
			break;
		}
		case DW_RHS_AMPLITUDES:
		case DW_RHS_FILE:
			b[i] = p->amps[i];
			break;
		default:
			b[i] = 0;   /* rhs.circuit: filled below */
		}
	}
	if (p->rhs_kind == DW_RHS_CIRCUIT) {
		/* the user's preparation circuit, simulated by the runtime: |b> on
		 * its qubits (the low sys qubits), zeros above */
		dw_qasm_program *prog = NULL;
		dw_state *st = NULL;
		if (dw_qasm_parse_file(p->rhs_file, &prog, e) ||
		    dw_sim_run(prog, NULL, 1, &st, e)) {
			dw_qasm_free(prog);
			return e->status;
		}
		if (st->dim > N) {
			dw_state_free(st);
			dw_qasm_free(prog);
			return dw_fail(e, DW_EINPUT, "%s: rhs.circuit has more qubits than the "
				"system", p->rhs_file);
		}
		for (uint64_t i = 0; i < st->dim; i++)
			b[i] = st->amp[i];
		dw_state_free(st);
		dw_qasm_free(prog);
	}
	return DW_OK;
}

/* Dense column-major matrix of a stencil problem (DESIGN 3.3 convention:
 * A[j][j+o] = c, index j = x0 + N0 x1 + N0 N1 x2). */
static cplx *stencil_dense(const dw_stencil *s, size_t N)
{
	cplx *A = calloc(N * N, sizeof *A);
	if (!A)
		return NULL;
	for (size_t j = 0; j < N; j++) {
		int64_t x[3] = {0, 0, 0};
		size_t r = j;
		for (int a = 0; a < s->dims; a++) {
			x[a] = (int64_t)(r % (size_t)s->shape[a]);
			r /= (size_t)s->shape[a];
		}
		for (size_t k = 0; k < s->npoints; k++) {
			int64_t y[3];
			bool inside = true;
			for (int a = 0; a < s->dims; a++) {
				y[a] = x[a] + s->offset[k][a];
				if (y[a] < 0 || y[a] >= s->shape[a]) {
					if (s->periodic[a])
						y[a] = (y[a] % s->shape[a] + s->shape[a]) % s->shape[a];
					else
						inside = false;
				}
			}
			if (!inside)
				continue;
			size_t col = 0, stride = 1;
			for (int a = 0; a < s->dims; a++) {
				col += (size_t)y[a] * stride;
				stride *= (size_t)s->shape[a];
			}
			A[col * N + j] += s->coeff[k];
		}
	}
	return A;
}

int dw_verify_target(const dw_problem *p, cplx **target, size_t *dim, dw_error *e)
{
	*target = NULL;
	if (p->n > 13)
		return dw_fail(e, DW_EINPUT, "%s: verify: the exact solution is computed densely, "
			"up to 2^13 rows (this problem has 2^%d)", p->path, p->n);
	size_t N = (size_t)1 << p->n;
	cplx *b = malloc(N * sizeof *b);
	if (!b)
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	if (rhs_vector(p, b, e)) {
		free(b);
		return e->status;
	}
	/* the original system: size N0, and where x sits in the sys register */
	size_t N0 = N, off = 0;
	cplx *A = NULL;
	if (p->matrix_kind == DW_MATRIX_PAULI) {
		A = dw_pauli_dense(p, e);
	} else if (p->matrix_kind == DW_MATRIX_FILE) {
		dw_csr *m = NULL;
		if (dw_mtx_read_matrix(p->matrix_file, NULL, &m, e)) {
			free(b);
			return e->status;
		}
		N0 = (size_t)m->rows;
		A = calloc(N0 * N0, sizeof *A);
		if (A)
			for (int64_t i = 0; i < m->rows; i++)
				for (int64_t k = m->rowptr[i]; k < m->rowptr[i + 1]; k++)
					A[(size_t)m->col[k] * N0 + (size_t)i] += m->val[k];
		dw_csr_free(m);
		if (p->dilated)
			off = N / 2;     /* solution |1>|x>: the top sys qubit */
	} else {
		size_t pts = 1;
		for (int a = 0; a < p->stencil.dims; a++)
			pts *= (size_t)p->stencil.shape[a];
		N0 = pts;
		A = stencil_dense(&p->stencil, N0);
		if (p->dilated)
			off = N / 2;
	}
	if (!A) {
		free(b);
		return e->status ? e->status : dw_fail(e, DW_EINTERNAL, "out of memory");
	}
	lapack_int *ipiv = malloc(N0 * sizeof *ipiv);
	cplx *x = calloc(N0, sizeof *x);
	if (!ipiv || !x) {
		free(A); free(b); free(ipiv); free(x);
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	}
	memcpy(x, b, N0 * sizeof *x);   /* b~ = |0>|b> (dilated) or b padded */
	int info = LAPACKE_zgesv(LAPACK_COL_MAJOR, (lapack_int)N0, 1, A, (lapack_int)N0, ipiv,
		x, (lapack_int)N0);
	free(A);
	free(ipiv);
	free(b);
	if (info != 0) {
		free(x);
		return dw_fail(e, DW_EINPUT, "%s: verify: LAPACKE_zgesv failed (info %d): the "
			"matrix is singular", p->path, info);
	}
	double nx = 0;
	for (size_t i = 0; i < N0; i++)
		nx += creal(x[i] * conj(x[i]));
	bool ind = p->variant == 'I';
	size_t D = N << (ind ? 2 : 1);
	cplx *t = calloc(D, sizeof *t);
	if (!t) {
		free(x);
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	}
	for (size_t i = 0; i < N0; i++) {
		cplx v = x[i] / sqrt(nx);
		size_t j = i + off;
		if (ind) {
			t[(j << 2) | 0] = v / sqrt(2.0);
			t[(j << 2) | 2] = v / sqrt(2.0);
		} else {
			t[j << 1] = v;
		}
	}
	free(x);
	*target = t;
	*dim = D;
	return DW_OK;
}

static int write_qasm(const dw_program *pg, char **text, dw_error *e)
{
	size_t len = 0;
	*text = NULL;
	FILE *f = open_memstream(text, &len);
	if (!f)
		return dw_fail(e, DW_EINTERNAL, "out of memory");
	int rc = dw_qasm_write(pg, f, false, e);
	if (fclose(f) != 0 && !rc)
		rc = dw_fail(e, DW_EINTERNAL, "out of memory");
	return rc;
}

/* Vectors v_i with weights w_i: eigenvalues of sum_i w_i v_i v_i^dagger. */
typedef struct vecset {
	size_t D, n, cap;
	cplx **v;
	double *w;
} vecset;

static int vec_push(vecset *s, cplx *v, double w)
{
	if (s->n == s->cap) {
		size_t nc = s->cap ? 2 * s->cap : 16;
		cplx **nv = realloc(s->v, nc * sizeof *nv);
		double *nw = nv ? realloc(s->w, nc * sizeof *nw) : NULL;
		if (!nv || !nw) {
			if (nv)
				s->v = nv;
			return -1;
		}
		s->v = nv;
		s->w = nw;
		s->cap = nc;
	}
	s->v[s->n] = v;
	s->w[s->n++] = w;
	return 0;
}

static double trace_norm_half(const vecset *s, dw_error *e)
{
	size_t D = s->D, n = s->n;
	cplx *Q = calloc(n * D, sizeof *Q);     /* orthonormal columns, row-major by vector */
	size_t r = 0;
	if (!Q) {
		dw_fail(e, DW_EINTERNAL, "out of memory");
		return NAN;
	}
	for (size_t i = 0; i < n; i++) {
		cplx *q = Q + r * D;
		memcpy(q, s->v[i], D * sizeof *q);
		for (int pass = 0; pass < 2; pass++)
			for (size_t j = 0; j < r; j++) {
				cplx ov = 0;
				const cplx *qj = Q + j * D;
				for (size_t k = 0; k < D; k++)
					ov += conj(qj[k]) * q[k];
				for (size_t k = 0; k < D; k++)
					q[k] -= ov * qj[k];
			}
		double nq = 0;
		for (size_t k = 0; k < D; k++)
			nq += creal(q[k] * conj(q[k]));
		if (nq < 1e-26)
			continue;
		for (size_t k = 0; k < D; k++)
			q[k] /= sqrt(nq);
		r++;
	}
	cplx *M = calloc(r * r, sizeof *M), *c = malloc(r * sizeof *c);
	double *ev = malloc(r * sizeof *ev);
	double td = NAN;
	if (M && c && ev) {
		for (size_t i = 0; i < n; i++) {
			for (size_t j = 0; j < r; j++) {
				cplx ov = 0;
				const cplx *qj = Q + j * D;
				for (size_t k = 0; k < D; k++)
					ov += conj(qj[k]) * s->v[i][k];
				c[j] = ov;
			}
			for (size_t a = 0; a < r; a++)
				for (size_t b = 0; b < r; b++)
					M[a * r + b] += s->w[i] * c[a] * conj(c[b]);
		}
		if (r == 0 || LAPACKE_zheev(LAPACK_ROW_MAJOR, 'N', 'U', (lapack_int)r, M,
			(lapack_int)r, ev) == 0) {
			td = 0;
			for (size_t a = 0; a < r; a++)
				td += fabs(ev[a]) / 2;
		} else {
			dw_fail(e, DW_EINTERNAL, "LAPACKE_zheev failed");
		}
	} else {
		dw_fail(e, DW_EINTERNAL, "out of memory");
	}
	free(Q);
	free(M);
	free(c);
	free(ev);
	return td;
}

int dw_verify(const dw_problem *p, int K, FILE *progress, dw_verify_report *out,
	dw_error *e)
{
	memset(out, 0, sizeof *out);
	out->instances = K;
	out->precision = p->precision;
	out->fidelity_min = 1;
	cplx *t = NULL;
	size_t D = 0;
	if (dw_verify_target(p, &t, &D, e))
		return e->status;
	vecset vs = {D, 0, 0, NULL, NULL};
	int rc = DW_OK;
	double dropped = 0;
	for (int k = 1; k <= K && rc == DW_OK; k++) {
		dw_program pg;
		char *text = NULL;
		dw_qasm_program *prog = NULL;
		dw_state *st = NULL;
		if ((rc = dw_program_build(p, (uint32_t)k, &pg, e)) == DW_OK) {
			uint32_t nq = pg.nqubits + pg.nwork;
			out->qubits = (int)nq;
			if (nq > DW_SIM_MAX_QUBITS)
				rc = dw_fail(e, DW_EINPUT, "%s: verify: %u qubits need %.3g bytes of state; "
					"the dense simulator stops at %d qubits", p->path, nq,
					ldexp(16.0, (int)nq), DW_SIM_MAX_QUBITS);
		}
		char name[64];
		snprintf(name, sizeof name, "instance-%03d.qasm", k);
		if (rc == DW_OK && (rc = write_qasm(&pg, &text, e)) == DW_OK &&
		    (rc = dw_qasm_parse_string(text, name, &prog, e)) == DW_OK &&
		    (rc = dw_sim_run(prog, NULL, p->seed + (uint64_t)k - 1, &st, e)) == DW_OK) {
			/* split by work-register value: blocks of D amplitudes */
			uint64_t blocks = st->dim / D;
			cplx ov = 0;
			for (size_t i = 0; i < D; i++)
				ov += conj(t[i]) * st->amp[i];
			double fid = creal(ov * conj(ov));
			out->fidelity += fid / K;
			if (fid < out->fidelity_min)
				out->fidelity_min = fid;
			for (uint64_t w = 0; w < blocks && rc == DW_OK; w++) {
				const cplx *blk = st->amp + w * D;
				double nb = 0;
				for (size_t i = 0; i < D; i++)
					nb += creal(blk[i] * conj(blk[i]));
				if (w == 0)
					out->work_clean_probability += nb / K;
				if (nb < 1e-14) {
					dropped += nb / K;
					continue;
				}
				cplx *v = malloc(D * sizeof *v);
				if (!v || vec_push(&vs, v, 1.0 / K)) {
					free(v);
					rc = dw_fail(e, DW_EINTERNAL, "out of memory");
					break;
				}
				memcpy(v, blk, D * sizeof *v);
			}
			if (progress)
				fprintf(progress, "dwell: verify: instance %d of %d: fidelity %.6f, "
					"%llu gates simulated\n", k, K, fid,
					(unsigned long long)st->gates_applied);
		}
		dw_state_free(st);
		dw_qasm_free(prog);
		free(text);
		dw_program_free(&pg);
	}
	if (rc == DW_OK) {
		if (vec_push(&vs, t, -1.0)) {
			rc = dw_fail(e, DW_EINTERNAL, "out of memory");
		} else {
			t = NULL;   /* owned by vs now */
			double td = trace_norm_half(&vs, e);
			if (isnan(td))
				rc = e->status;
			out->trace_distance = td + dropped;
			out->passed = out->trace_distance <= p->precision;
		}
	}
	for (size_t i = 0; i < vs.n; i++)
		free(vs.v[i]);
	free(vs.v);
	free(vs.w);
	free(t);
	return rc;
}
