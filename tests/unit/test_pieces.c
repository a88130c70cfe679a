/* test_pieces.c - each lowered piece against its exact matrix:
 *  - the symmetrisation identity H(s) = (K + R K R)/2 (DESIGN 4) for random
 *    Hermitian A and b, both variants, and the zero eigenvector |0>|x(s)>
 *    with x(s) from LAPACKE_zgesv;
 *  - Pauli rotations exp(-i theta/2 P) = cos(theta/2) I - i sin(theta/2) P
 *    (Pauli matrices: common practice) on every basis state;
 *  - the reflection I - 2|v><v|, v = |1>|b~>, on every basis state;
 *  - every state preparation kind against the normalised vector;
 *  - the multi-controlled Z on every basis state, ancillas back to |0>. */
#include <complex.h>
#include <lapacke.h>
#include <stdlib.h>
#include <string.h>

#include "dwell/dwell.h"
#include "check.h"
#include "irsim.h"

static uint64_t rs = 12345;
static double urand(void)
{
	rs ^= rs << 13;
	rs ^= rs >> 7;
	rs ^= rs << 17;
	return (double)(rs >> 11) * 0x1.0p-53;
}

typedef double complex cplx;

/* C = A B (d x d, row-major) */
static void mm(cplx *C, const cplx *A, const cplx *B, int d)
{
	for (int i = 0; i < d; i++)
		for (int j = 0; j < d; j++) {
			cplx s = 0;
			for (int k = 0; k < d; k++)
				s += A[i * d + k] * B[k * d + j];
			C[i * d + j] = s;
		}
}

static void test_symmetrisation(char variant)
{
	int N = 4, M = variant == 'I' ? 2 * N : N, D = 2 * M;
	cplx *A = calloc((size_t)N * N, sizeof *A), *As = calloc((size_t)M * M, sizeof *As);
	cplx *b = calloc((size_t)M, sizeof *b);
	cplx *H = calloc((size_t)D * D, sizeof *H), *K = calloc((size_t)D * D, sizeof *K);
	cplx *R = calloc((size_t)D * D, sizeof *R), *T = calloc((size_t)D * D, sizeof *T);
	cplx *RKR = calloc((size_t)D * D, sizeof *RKR), *Q = calloc((size_t)M * M, sizeof *Q);
	cplx *AQ = calloc((size_t)M * M, sizeof *AQ), *QA = calloc((size_t)M * M, sizeof *QA);
	for (int i = 0; i < N; i++)
		for (int j = 0; j <= i; j++) {
			cplx v = (urand() - 0.5) + (i == j ? 0 : I * (urand() - 0.5));
			A[i * N + j] = v;
			A[j * N + i] = conj(v);
		}
	/* b~ normalised: variant I uses |+>|b> (sgn is the high index bit here) */
	double nb = 0;
	cplx bb[4];
	for (int i = 0; i < N; i++) {
		bb[i] = (urand() - 0.5) + I * (urand() - 0.5);
		nb += creal(bb[i] * conj(bb[i]));
	}
	for (int i = 0; i < N; i++)
		bb[i] /= sqrt(nb);
	for (int i = 0; i < M; i++)
		b[i] = variant == 'I' ? bb[i % N] / sqrt(2.0) : bb[i];
	for (int t = 0; t < 5; t++) {
		double s = 0.2 * t + 0.1;
		/* A(s) */
		for (int i = 0; i < M; i++)
			for (int j = 0; j < M; j++) {
				cplx v;
				if (variant == 'P') {
					v = s * A[i * N + j] + (i == j ? 1 - s : 0);
				} else {
					int si = i / N, sj = j / N, ii = i % N, jj = j % N;
					v = 0;
					if (si == sj && ii == jj)
						v += (1 - s) * (si ? -1.0 : 1.0);   /* Z_sgn */
					if (si != sj)
						v += s * A[ii * N + jj];               /* X_sgn A */
				}
				As[i * M + j] = v;
				Q[i * M + j] = (i == j ? 1 : 0) - b[i] * conj(b[j]);
			}
		mm(AQ, As, Q, M);
		mm(QA, Q, As, M);
		memset(H, 0, (size_t)D * D * sizeof *H);
		memset(K, 0, (size_t)D * D * sizeof *K);
		for (int i = 0; i < M; i++)
			for (int j = 0; j < M; j++) {
				H[i * D + (M + j)] = AQ[i * M + j];      /* |0><1| A Q */
				H[(M + i) * D + j] = QA[i * M + j];      /* |1><0| Q A */
				K[i * D + (M + j)] = As[i * M + j];
				K[(M + i) * D + j] = As[i * M + j];
			}
		for (int i = 0; i < D; i++)
			for (int j = 0; j < D; j++) {
				cplx vi = i >= M ? b[i - M] : 0, vj = j >= M ? b[j - M] : 0;
				R[i * D + j] = (i == j ? 1 : 0) - 2 * vi * conj(vj);
			}
		mm(T, R, K, D);
		mm(RKR, T, R, D);
		double err = 0;
		for (int i = 0; i < D * D; i++)
			err = fmax(err, cabs(H[i] - (K[i] + RKR[i]) / 2));
		CHECK(err < 1e-13, "variant %c s=%g: |H - (K+RKR)/2| = %.3g", variant, s, err);
		/* zero eigenvector |0>|x(s)>, x(s) = A(s)^-1 b~ (LAPACKE_zgesv) */
		cplx *Acopy = malloc((size_t)M * M * sizeof *Acopy);
		cplx x[8];
		lapack_int ipiv[8];
		memcpy(Acopy, As, (size_t)M * M * sizeof *Acopy);
		memcpy(x, b, (size_t)M * sizeof *x);
		int info = LAPACKE_zgesv(LAPACK_ROW_MAJOR, M, 1, Acopy, M, ipiv, x, 1);
		free(Acopy);
		if (info != 0)
			continue;   /* A(s) singular at this s: skip (measure zero) */
		double nr = 0, nx = 0;
		for (int i = 0; i < D; i++) {
			cplx hv = 0;
			for (int j = 0; j < M; j++)
				hv += H[i * D + j] * x[j];
			nr += creal(hv * conj(hv));
		}
		for (int j = 0; j < M; j++)
			nx += creal(x[j] * conj(x[j]));
		CHECK(sqrt(nr / nx) < 1e-12, "variant %c s=%g: H |0,x(s)> = %.3g", variant, s,
			sqrt(nr / nx));
	}
	free(A); free(As); free(b); free(H); free(K); free(R); free(T); free(RKR);
	free(Q); free(AQ); free(QA);
}

/* P|e> for a Pauli string: returns the index and the phase */
static size_t pauli_apply(dw_pauli p, size_t e, cplx *phase)
{
	cplx ph = 1;
	for (int q = 0; q < 64; q++) {
		uint64_t bit = 1ULL << q;
		bool x = p.x & bit, z = p.z & bit, one = e & bit;
		if (x && z)
			ph *= one ? -I : I;        /* Y|0> = i|1>, Y|1> = -i|0> */
		else if (z && one)
			ph *= -1;
	}
	*phase = ph;
	return e ^ p.x;
}

static void test_pauli_rotations(void)
{
	for (int trial = 0; trial < 40; trial++) {
		int nq = 4;
		dw_pauli p = {0, 0};
		while (!(p.x | p.z)) {
			p.x = (uint64_t)(urand() * 16) & 15;
			p.z = (uint64_t)(urand() * 16) & 15;
		}
		double theta = (urand() - 0.5) * 7;
		dw_circuit *c = dw_circuit_new();
		dw_error e = {0};
		uint32_t d = dw_pauli_rotation_def(c, p, &e);
		uint32_t sup[64];
		uint32_t k = dw_pauli_support(p, sup);
		CHECK(d != DW_NO_DEF && c->defs[d].nargs == k, "built");
		for (size_t e0 = 0; e0 < 16; e0++) {
			irsim s;
			irsim_init(&s, nq);
			s.psi[0] = 0;
			s.psi[e0] = 1;
			irsim_apply(&s, c, d, sup, &theta);
			cplx ph;
			size_t f = pauli_apply(p, e0, &ph);
			double err = 0;
			for (size_t i = 0; i < 16; i++) {
				cplx want = (i == e0 ? cos(theta / 2) : 0) +
					(i == f ? -I * sin(theta / 2) * ph : 0);
				err = fmax(err, cabs(s.psi[i] - want));
			}
			CHECK(err < 1e-12, "pauli x=%llx z=%llx basis %zu: err %.3g",
				(unsigned long long)p.x, (unsigned long long)p.z, e0, err);
			free(s.psi);
		}
		dw_circuit_free(c);
	}
}

static void test_mcz(void)
{
	for (uint32_t k = 1; k <= 6; k++) {
		dw_circuit *c = dw_circuit_new();
		dw_error e = {0};
		uint32_t d = dw_mcz_def(c, k, false, &e);
		uint32_t nq = dw_def_qubits(c, d);
		CHECK(nq == k + (k >= 4 ? k - 3 : 0), "mcz %u uses %u qubits", k, nq);
		uint32_t map[16];
		for (uint32_t q = 0; q < nq; q++)
			map[q] = q;
		for (size_t e0 = 0; e0 < ((size_t)1 << k); e0++) {
			irsim s;
			irsim_init(&s, (int)nq);
			s.psi[0] = 0;
			s.psi[e0] = 1;
			irsim_apply(&s, c, d, map, NULL);
			double want = e0 == ((size_t)1 << k) - 1 ? -1 : 1;
			CHECK(cabs(s.psi[e0] - want) < 1e-12, "mcz %u on %zu: %g%+gi", k, e0,
				creal(s.psi[e0]), cimag(s.psi[e0]));
			free(s.psi);
		}
		dw_figures f;
		dw_cost_figures(c, d, &f, &e);
		if (k >= 3)
			CHECK(f.toffoli_count == 2 * (k - 1) - 3, "mcz %u: %llu Toffolis, want 2(k-1)-3 "
				"(clean-ancilla ladder, Phys. Rev. A 52, 3457, 1995)", k,
				(unsigned long long)f.toffoli_count);
		dw_circuit_free(c);
	}
}

/* temporary logical-AND: |a, b, 0> -> |a, b, ab> exactly, 4 T ("Halving
 * the cost of quantum addition", Quantum 2, 74, 2018); the measured
 * multi-controlled Z uses 4(k-2) T, k-2 measurements, no Toffoli */
static void test_and_gadget(void)
{
	dw_circuit *c = dw_circuit_new();
	dw_error e = {0};
	uint32_t d = dw_and_compute_def(c, &e);
	uint32_t map[3] = {0, 1, 2};
	for (size_t ab = 0; ab < 4; ab++) {
		irsim s;
		irsim_init(&s, 3);
		s.psi[0] = 0;
		s.psi[ab] = 1;
		irsim_apply(&s, c, d, map, NULL);
		size_t want = ab | (ab == 3 ? 4 : 0);
		double err = 0;
		for (size_t i = 0; i < 8; i++)
			err = fmax(err, cabs(s.psi[i] - (i == want ? 1 : 0)));
		CHECK(err < 1e-12, "AND on |%zu>: err %.3g", ab, err);
		free(s.psi);
	}
	dw_figures f;
	dw_cost_figures(c, d, &f, &e);
	CHECK(f.t_count_exact == 4, "AND T-count %llu", (unsigned long long)f.t_count_exact);
	for (uint32_t k = 3; k <= 7; k++) {
		uint32_t m = dw_mcz_def(c, k, true, &e);
		dw_cost_figures(c, m, &f, &e);
		CHECK(f.t_count_exact == 4 * (k - 2) && f.toffoli_count == 0,
			"measured mcz %u: %llu T", k, (unsigned long long)f.t_count_exact);
		CHECK(f.measure_count == k - 2 && f.cond_count == 2 * (k - 2),
			"measured mcz %u: %llu measurements, %llu controlled", k,
			(unsigned long long)f.measure_count, (unsigned long long)f.cond_count);
		CHECK(!c->defs[m].unitary, "measured mcz is not unitary");
	}
	dw_circuit_free(c);
}

/* U_b |0> equals b (normalised) up to a global phase */
static double prep_error(dw_problem *p, const cplx *want)
{
	dw_circuit *c = dw_circuit_new();
	dw_error e = {0};
	uint32_t d = dw_stateprep_def(c, p, &e);
	irsim s;
	irsim_init(&s, p->n);
	uint32_t map[16];
	for (int q = 0; q < 16; q++)
		map[q] = (uint32_t)q;
	irsim_apply(&s, c, d, map, NULL);
	cplx ov = 0;
	for (size_t i = 0; i < s.dim; i++)
		ov += conj(want[i]) * s.psi[i];
	double err = 0;
	cplx ph = cabs(ov) > 0 ? ov / cabs(ov) : 1;
	for (size_t i = 0; i < s.dim; i++)
		err = fmax(err, cabs(s.psi[i] - ph * want[i]));
	free(s.psi);
	dw_circuit_free(c);
	return err;
}

static void test_stateprep(void)
{
	dw_problem p;
	memset(&p, 0, sizeof p);
	p.path = "test";
	cplx want[64];
	for (int n = 1; n <= 6; n++) {
		size_t N = (size_t)1 << n;
		p.n = n;
		for (int complex_amps = 0; complex_amps < 2; complex_amps++) {
			double nrm = 0;
			for (size_t i = 0; i < N; i++) {
				want[i] = (urand() - 0.5) + (complex_amps ? I * (urand() - 0.5) : 0);
				if (i % 5 == 3)
					want[i] = 0;    /* exercise empty subtrees */
				nrm += creal(want[i] * conj(want[i]));
			}
			for (size_t i = 0; i < N; i++)
				want[i] /= sqrt(nrm);
			p.rhs_kind = DW_RHS_AMPLITUDES;
			p.amps = want;
			double err = prep_error(&p, want);
			CHECK(err < 1e-12, "amplitudes n=%d complex=%d: err %.3g", n, complex_amps, err);
			/* published counts for real amplitudes (QIC 5(6), 467, 2005) */
			if (!complex_amps) {
				dw_circuit *c = dw_circuit_new();
				dw_error e = {0};
				p.amps = want;
				uint32_t d = dw_stateprep_def(c, &p, &e);
				dw_figures f;
				dw_cost_figures(c, d, &f, &e);
				CHECK(f.gates[DW_G_CX] == N - 2, "n=%d: %llu cx, want 2^n - 2", n,
					(unsigned long long)f.gates[DW_G_CX]);
				CHECK(f.gates[DW_G_RY] <= N - 1, "n=%d: %llu ry, at most 2^n - 1", n,
					(unsigned long long)f.gates[DW_G_RY]);
				dw_circuit_free(c);
			}
		}
		/* basis */
		p.rhs_kind = DW_RHS_BASIS;
		p.basis = (uint64_t)(urand() * (double)N);
		for (size_t i = 0; i < N; i++)
			want[i] = i == p.basis ? 1 : 0;
		CHECK(prep_error(&p, want) < 1e-14, "basis n=%d", n);
		/* uniform */
		p.rhs_kind = DW_RHS_UNIFORM;
		for (size_t i = 0; i < N; i++)
			want[i] = 1 / sqrt((double)N);
		CHECK(prep_error(&p, want) < 1e-12, "uniform n=%d", n);
		/* product: qubit k in cos(t/2)|0> + e^{i phi} sin(t/2)|1> */
		double prod[6][2];
		p.rhs_kind = DW_RHS_PRODUCT;
		p.nproduct = (size_t)n;
		p.product = prod;
		for (int k = 0; k < n; k++) {
			prod[k][0] = urand() * M_PI;
			prod[k][1] = (urand() - 0.5) * 6;
		}
		for (size_t i = 0; i < N; i++) {
			cplx a = 1;
			for (int k = 0; k < n; k++)
				a *= (i >> k) & 1 ? cexp(I * prod[k][1]) * sin(prod[k][0] / 2)
					: cos(prod[k][0] / 2);
			want[i] = a;
		}
		CHECK(prep_error(&p, want) < 1e-12, "product n=%d", n);
	}
}

/* the reflection of a compiled program, found by name */
static void test_reflection(char variant)
{
	dw_problem p;
	memset(&p, 0, sizeof p);
	p.path = "test";
	p.name = "t";
	p.matrix_kind = DW_MATRIX_PAULI;
	p.n = 2;
	dw_pauli_term terms[2] = {{1.0, "ZI"}, {variant == 'P' ? 2.5 : 0.3, "II"}};
	p.npauli = 2;
	p.pauli = terms;
	cplx amps[4] = {0.5, -0.1 + 0.3 * I, 0.7, 0.2};
	double nrm = 0;
	for (int i = 0; i < 4; i++)
		nrm += creal(amps[i] * conj(amps[i]));
	for (int i = 0; i < 4; i++)
		amps[i] /= sqrt(nrm);
	p.rhs_kind = DW_RHS_AMPLITUDES;
	p.amps = amps;
	p.precision = 0.1;
	p.order = 2;
	p.steps = 2;
	p.formula_steps = 1;
	p.seed = 1;
	p.analysed = true;
	p.variant = variant;
	p.alpha = variant == 'P' ? 3.5 : 1.3;
	p.kappa = variant == 'P' ? 3.5 / 1.5 : 1.3 / 0.7;
	dw_program pg;
	dw_error e = {0};
	CHECK(dw_program_build(&p, 1, &pg, &e) == 0, "%s", e.msg);
	uint32_t refl = DW_NO_DEF;
	for (size_t i = 0; i < pg.circ->ndefs; i++)
		if (!strncmp(pg.circ->defs[i].name, "reflect_", 8))
			refl = (uint32_t)i;
	CHECK(refl != DW_NO_DEF, "reflection found");
	uint32_t nq = dw_def_qubits(pg.circ, refl), narg = pg.nqubits;
	uint32_t map[16];
	for (uint32_t q = 0; q < nq; q++)
		map[q] = q;
	/* v = |1>_anc |b~>: anc is bit 0, [sgn bit 1], sys above */
	size_t D = (size_t)1 << narg;
	cplx *v = calloc(D, sizeof *v);
	for (size_t i = 0; i < 4; i++) {
		if (variant == 'P') {
			v[1 | (i << 1)] = amps[i];
		} else {
			v[1 | 0 | (i << 2)] = amps[i] / sqrt(2.0);
			v[1 | 2 | (i << 2)] = amps[i] / sqrt(2.0);
		}
	}
	for (size_t e0 = 0; e0 < D; e0++) {
		irsim s;
		irsim_init(&s, (int)nq);
		s.psi[0] = 0;
		s.psi[e0] = 1;
		irsim_apply(&s, pg.circ, refl, map, NULL);
		double err = 0;
		for (size_t i = 0; i < s.dim; i++) {
			cplx want = i < D ? (i == e0 ? 1 : 0) - 2 * v[i] * conj(v[e0]) : 0;
			err = fmax(err, cabs(s.psi[i] - want));
		}
		CHECK(err < 1e-12, "reflection variant %c on basis %zu: err %.3g", variant, e0, err);
		free(s.psi);
	}
	free(v);
	dw_program_free(&pg);
}

int main(void)
{
	test_symmetrisation('P');
	test_symmetrisation('I');
	test_pauli_rotations();
	test_mcz();
	test_and_gadget();
	test_stateprep();
	test_reflection('P');
	test_reflection('I');
	return check_done();
}
