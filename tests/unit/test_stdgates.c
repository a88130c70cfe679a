/* test_stdgates.c - every gate of stdgates.inc, U and gphase, as simulated,
 * against its definition in the OpenQASM 3 specification.
 *
 * Source: OpenQASM 3 specification, stdgates.inc (spec v3.0.0), and the
 * built-in U and gphase of gates.rst (spec v3.0.0), as quoted in
 * METHODS.md 10.1-10.2.  Each gate's matrix is computed here from its
 * file body -- U written in the spec's own form
 *   U(θ,φ,λ) = ½ [[1+e^{iθ}, −i e^{iλ}(1−e^{iθ})], [i e^{iφ}(1−e^{iθ}), e^{i(φ+λ)}(1+e^{iθ})]],
 * gphase(γ) = e^{iγ}, ctrl @ G = |0><0| ⊗ I + |1><1| ⊗ G (the control is
 * the first operand), inv @ G = G^†, and pow(1/2) @ G the principal square
 * root (eigenvalues' principal roots; the spec's pow for non-integer
 * exponents, from memory -- it gives s = diag(1, i), t = diag(1, e^{iπ/4})
 * and sx = ½[[1+i, 1−i], [1−i, 1+i]] as METHODS 10.2 lists).  The
 * simulator's action on every basis state must equal the matrix column,
 * global phase included, for operands in order and permuted, with the top
 * qubit of the state among them. */
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "dwell/qasm.h"
#include "dwell/sim.h"

#define MAXK 3
#define DIM (1 << MAXK)

typedef struct mat {
	int k;                        /* qubits */
	double complex a[DIM][DIM];   /* a[row][col], index bit j = operand j */
} mat;

static const double PI = 3.14159265358979323846;

static mat identity(int k)
{
	mat m;
	memset(&m, 0, sizeof m);
	m.k = k;
	for (int i = 0; i < (1 << k); i++)
		m.a[i][i] = 1;
	return m;
}

static mat mul(const mat *x, const mat *y)
{
	mat r;
	memset(&r, 0, sizeof r);
	r.k = x->k;
	int d = 1 << x->k;
	for (int i = 0; i < d; i++)
		for (int j = 0; j < d; j++)
			for (int l = 0; l < d; l++)
				r.a[i][j] += x->a[i][l] * y->a[l][j];
	return r;
}

static mat scale(mat m, double complex s)
{
	for (int i = 0; i < (1 << m.k); i++)
		for (int j = 0; j < (1 << m.k); j++)
			m.a[i][j] *= s;
	return m;
}

static mat dagger(const mat *m)
{
	mat r = *m;
	for (int i = 0; i < (1 << m->k); i++)
		for (int j = 0; j < (1 << m->k); j++)
			r.a[i][j] = conj(m->a[j][i]);
	return r;
}

/* 2x2 matrix g on operand q of a k-operand gate. */
static mat on(int k, int q, const mat *g)
{
	mat r;
	memset(&r, 0, sizeof r);
	r.k = k;
	for (int i = 0; i < (1 << k); i++)
		for (int j = 0; j < (1 << k); j++) {
			if ((i & ~(1 << q)) != (j & ~(1 << q)))
				continue;
			r.a[i][j] = g->a[(i >> q) & 1][(j >> q) & 1];
		}
	return r;
}

/* ctrl @ G with control operand c: G (a k-operand matrix acting as the
 * identity on c) where operand c is 1, the identity where it is 0. */
static mat ctrl(int c, const mat *g)
{
	mat r = identity(g->k);
	for (int i = 0; i < (1 << g->k); i++)
		for (int j = 0; j < (1 << g->k); j++)
			if (((i >> c) & 1) && ((j >> c) & 1))
				r.a[i][j] = g->a[i][j];
	return r;
}

/* The spec's U(θ, φ, λ), 1 operand. */
static mat U(double th, double ph, double la)
{
	double complex e = cexp(I * th);
	mat m;
	memset(&m, 0, sizeof m);
	m.k = 1;
	m.a[0][0] = 0.5 * (1 + e);
	m.a[0][1] = 0.5 * (-I * cexp(I * la) * (1 - e));
	m.a[1][0] = 0.5 * (I * cexp(I * ph) * (1 - e));
	m.a[1][1] = 0.5 * (cexp(I * (ph + la)) * (1 + e));
	return m;
}

/* gphase(γ) on k operands. */
static mat gphase(int k, double g)
{
	return scale(identity(k), cexp(I * g));
}

/* pow(1/2) @ m for a 2x2 m: principal square roots mu1, mu2 of the
 * eigenvalues; sqrt(m) = (m + mu1 mu2 I) / (mu1 + mu2). */
static mat sqrt2(const mat *m)
{
	double complex tr = m->a[0][0] + m->a[1][1];
	double complex det = m->a[0][0] * m->a[1][1] - m->a[0][1] * m->a[1][0];
	double complex disc = csqrt(tr * tr / 4 - det);
	double complex l1 = tr / 2 + disc, l2 = tr / 2 - disc;
	double complex mu1 = csqrt(l1), mu2 = csqrt(l2);
	mat r = *m;
	r.a[0][0] += mu1 * mu2;
	r.a[1][1] += mu1 * mu2;
	return scale(r, 1 / (mu1 + mu2));
}

/* ---- the file bodies of stdgates.inc (spec v3.0.0) ---- */

static mat g_p(double la) { mat g = gphase(1, la); return ctrl(0, &g); }   /* ctrl @ gphase(λ) a */
static mat g_x(void) { return scale(U(PI, 0, PI), cexp(-I * PI / 2)); }
static mat g_y(void) { return scale(U(PI, PI / 2, PI / 2), cexp(-I * PI / 2)); }
static mat g_z(void) { return g_p(PI); }
static mat g_h(void) { return scale(U(PI / 2, 0, PI), cexp(-I * PI / 4)); }
static mat g_s(void) { mat z = g_z(); return sqrt2(&z); }
static mat g_sdg(void) { mat s = g_s(); return dagger(&s); }
static mat g_t(void) { mat s = g_s(); return sqrt2(&s); }
static mat g_tdg(void) { mat t = g_t(); return dagger(&t); }
static mat g_sx(void) { mat x = g_x(); return sqrt2(&x); }
static mat g_rx(double th) { return scale(U(th, -PI / 2, PI / 2), cexp(-I * th / 2)); }
static mat g_ry(double th) { return scale(U(th, 0, 0), cexp(-I * th / 2)); }
static mat g_rz(double la) { return scale(U(0, 0, la), cexp(-I * la / 2)); }

/* ctrl @ g a, b for a 1-operand g */
static mat c1(mat g)
{
	mat on_b = on(2, 1, &g);
	return ctrl(0, &on_b);
}

static mat g_swap(void)
{
	mat x = g_x();
	mat cab = c1(x);                        /* cx a, b */
	mat xa = on(2, 0, &x), cba = ctrl(1, &xa); /* cx b, a */
	mat r = mul(&cba, &cab);
	return mul(&cab, &r);                   /* cx a,b; cx b,a; cx a,b */
}

static mat g_ccx(void)
{
	mat x = g_x();
	mat xc = on(3, 2, &x);
	mat inner = ctrl(1, &xc);
	return ctrl(0, &inner);
}

static mat g_cswap(void)
{
	mat s = g_swap();
	mat s3;
	memset(&s3, 0, sizeof s3);
	s3.k = 3;
	/* swap on operands 1, 2 */
	for (int i = 0; i < 8; i++)
		for (int j = 0; j < 8; j++)
			if ((i & 1) == (j & 1))
				s3.a[i][j] = s.a[i >> 1][j >> 1];
	return ctrl(0, &s3);
}

/* cu(θ,φ,λ,γ) a, b = p(γ−θ/2) a; ctrl @ U(θ,φ,λ) a, b */
static mat g_cu(double th, double ph, double la, double ga)
{
	mat p = g_p(ga - th / 2), pa = on(2, 0, &p);
	mat cu = c1(U(th, ph, la));
	return mul(&cu, &pa);
}

static mat g_u2(double ph, double la)
{
	return scale(U(PI / 2, ph, la), cexp(-I * (ph + la + PI / 2) / 2));
}

static mat g_u3(double th, double ph, double la)
{
	return scale(U(th, ph, la), cexp(-I * (ph + la + th) / 2));
}

/* ---- comparison with the simulator ---- */

/* Run text on a state of n qubits prepared in basis state j; out[2^n]. */
static int run_basis(const char *text, int n, uint64_t j, double complex *out)
{
	dw_error err = {0};
	dw_qasm_program *prog = NULL;
	dw_state *st = NULL;
	int rc = dw_qasm_parse_string(text, "<test>", &prog, &err);
	if (rc == DW_OK)
		rc = dw_state_new(n, &st, &err);
	if (rc == DW_OK) {
		dw_state_set(st, 0, 0);
		dw_state_set(st, j, 1);
		rc = dw_sim_exec(prog, NULL, st, &err);
	}
	if (rc == DW_OK)
		for (uint64_t i = 0; i < ((uint64_t)1 << n); i++)
			out[i] = dw_state_get(st, i);
	if (rc)
		fprintf(stderr, "%s\n", err.msg);
	dw_state_free(st);
	dw_qasm_free(prog);
	return rc;
}

/* Check `call` (e.g. "cu(0.7, -1.3, 2.1, 0.4)") with operands on physical
 * qubits phys[0..k-1] of an n-qubit state against m. */
static void check_gate(const char *call, const mat *m, int n, const int *phys)
{
	char text[512];
	int len = snprintf(text, sizeof text, "OPENQASM 3.0;\ninclude \"stdgates.inc\";\n"
		"qubit[%d] q;\n%s ", n, call);
	for (int a = 0; a < m->k; a++)
		len += snprintf(text + len, sizeof text - (size_t)len, "%sq[%d]", a ? ", " : "", phys[a]);
	snprintf(text + len, sizeof text - (size_t)len, ";\n");
	uint64_t dim = (uint64_t)1 << n;
	double complex out[64];
	double worst = 0;
	for (uint64_t j = 0; j < dim; j++) {
		if (run_basis(text, n, j, out)) {
			CHECK(0, "%s: simulation failed", call);
			return;
		}
		int lj = 0;
		for (int a = 0; a < m->k; a++)
			lj |= (int)((j >> phys[a]) & 1) << a;
		uint64_t others = j;
		for (int a = 0; a < m->k; a++)
			others &= ~((uint64_t)1 << phys[a]);
		for (uint64_t i = 0; i < dim; i++) {
			uint64_t io = i;
			int li = 0;
			for (int a = 0; a < m->k; a++) {
				li |= (int)((i >> phys[a]) & 1) << a;
				io &= ~((uint64_t)1 << phys[a]);
			}
			double complex want = io == others ? m->a[li][lj] : 0;
			double d = cabs(out[i] - want);
			if (d > worst)
				worst = d;
		}
	}
	CHECK(worst <= 1e-14, "%s on qubits %d%s%d%s%d of %d: largest deviation from the spec "
		"matrix %.3g (stdgates.inc, spec v3.0.0)", call, phys[0], m->k > 1 ? "," : "",
		m->k > 1 ? phys[1] : 0, m->k > 2 ? "," : "", m->k > 2 ? phys[2] : 0, n, worst);
}

/* Each gate: in operand order on a k-qubit state, and permuted on a
 * 4-qubit state with the top qubit (3) as the first operand. */
static void check_both(const char *call, const mat m)
{
	static const int ordered[3] = {0, 1, 2};
	static const int permuted[3][3] = {{3}, {3, 1}, {3, 0, 2}};
	check_gate(call, &m, m.k, ordered);
	check_gate(call, &m, 4, permuted[m.k - 1]);
	if (m.k > 1) {
		int last_top[3] = {1, 0, 0};
		last_top[m.k - 1] = 3;
		if (m.k == 3)
			last_top[1] = 2;
		check_gate(call, &m, 4, last_top);
	}
}

int main(void)
{
	const double th = 0.7, ph = -1.3, la = 2.1, ga = 0.4;

	/* built-ins */
	check_both("U(0.7, -1.3, 2.1)", U(th, ph, la));
	check_both("U(pi, 0, pi)", U(PI, 0, PI));

	/* stdgates.inc, in file order */
	check_both("p(2.1)", g_p(la));
	check_both("x", g_x());
	check_both("y", g_y());
	check_both("z", g_z());
	check_both("h", g_h());
	check_both("s", g_s());
	check_both("sdg", g_sdg());
	check_both("t", g_t());
	check_both("tdg", g_tdg());
	check_both("sx", g_sx());
	check_both("rx(0.7)", g_rx(th));
	check_both("ry(0.7)", g_ry(th));
	check_both("rz(2.1)", g_rz(la));
	check_both("cx", c1(g_x()));
	check_both("cy", c1(g_y()));
	check_both("cz", c1(g_z()));
	check_both("cp(2.1)", c1(g_p(la)));
	check_both("crx(0.7)", c1(g_rx(th)));
	check_both("cry(0.7)", c1(g_ry(th)));
	check_both("crz(2.1)", c1(g_rz(la)));
	check_both("ch", c1(g_h()));
	check_both("swap", g_swap());
	check_both("ccx", g_ccx());
	check_both("cswap", g_cswap());
	check_both("cu(0.7, -1.3, 2.1, 0.4)", g_cu(th, ph, la, ga));
	/* OpenQASM 2 compatibility part of the file */
	check_both("CX", c1(U(PI, 0, PI)));
	check_both("phase(2.1)", U(0, 0, la));
	check_both("cphase(2.1)", c1(U(0, 0, la)));
	check_both("id", U(0, 0, 0));
	check_both("u1(2.1)", U(0, 0, la));
	check_both("u2(-1.3, 2.1)", g_u2(ph, la));
	check_both("u3(0.7, -1.3, 2.1)", g_u3(th, ph, la));

	/* The closed forms METHODS 10.2 lists (num-checked there). */
	mat s = g_s(), t = g_t(), sx = g_sx();
	CHECK(cabs(s.a[1][1] - I) < 1e-15 && cabs(s.a[0][0] - 1) < 1e-15, "s = diag(1, i)");
	CHECK(cabs(t.a[1][1] - cexp(I * PI / 4)) < 1e-15, "t = diag(1, e^{i pi/4})");
	CHECK(cabs(sx.a[0][1] - 0.5 * (1 - I)) < 1e-15 && cabs(sx.a[0][0] - 0.5 * (1 + I)) < 1e-15,
		"sx = 1/2 [[1+i, 1-i], [1-i, 1+i]]");

	/* Modifier identities stated by the spec (gates.rst, v3.0.0):
	 * inv @ U(θ,φ,λ) = U(−θ,−λ,−φ); ctrl @ gphase(a) = p(a);
	 * inv @ gphase(a) = gphase(−a); pow(k) for integer k repeats. */
	check_both("inv @ U(0.7, -1.3, 2.1)", U(-th, -la, -ph));
	check_both("ctrl @ gphase(2.1)", g_p(la));
	{
		mat m = g_rx(th), m2 = mul(&m, &m), m3 = mul(&m2, &m);
		check_both("pow(3) @ rx(0.7)", m3);
		mat d = dagger(&m2);
		check_both("pow(-2) @ rx(0.7)", d);
		check_both("pow(0) @ rx(0.7)", identity(1));
	}
	{
		/* negctrl @ G: G where the control is 0 */
		mat x = g_x(), xb = on(2, 1, &x), r = identity(2);
		for (int i = 0; i < 4; i++)
			for (int j = 0; j < 4; j++)
				if (!(i & 1) && !(j & 1))
					r.a[i][j] = xb.a[i][j];
		check_both("negctrl @ x", r);
	}
	{
		/* gphase alone multiplies the whole state */
		double complex out[4];
		int rc = run_basis("OPENQASM 3.0; qubit[2] q; gphase(0.4);", 2, 2, out);
		CHECK(rc == DW_OK && cabs(out[2] - cexp(I * ga)) < 1e-15 && cabs(out[0]) == 0,
			"gphase(0.4) multiplies the state by e^{0.4 i} (spec gates.rst)");
		rc = run_basis("OPENQASM 3.0; qubit[2] q; inv @ gphase(0.4);", 2, 1, out);
		CHECK(rc == DW_OK && cabs(out[1] - cexp(-I * ga)) < 1e-15,
			"inv @ gphase(0.4) = gphase(-0.4)");
	}
	return check_done();
}
