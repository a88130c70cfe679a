#!/usr/bin/python3
"""check_spectrum.py - dwell's classical analysis of Pauli sums against
Debian's numpy (numpy.linalg.eigvalsh on a matrix built here with numpy.kron).

Usage: check_spectrum.py SPECTRUM_PROBE
Writes three random Pauli sums (fixed seed) to temporary YAML files, runs the
probe on each, and compares alpha = max |eigenvalue|, sigma_min =
min |eigenvalue|, lambda_min, lambda_max, kappa and the variant (P when
lambda_min > 0).  Reference: numpy.linalg.eigvalsh (LAPACK syevd/heevd
through numpy, an implementation separate from the code under test's call
path).  Prints "N passed, N failed" and exits non-zero on any failure.
"""
import json
import os
import subprocess
import sys
import tempfile

import numpy as np

# Pauli matrices (common practice).
PAULI = {
    "I": np.eye(2, dtype=complex),
    "X": np.array([[0, 1], [1, 0]], dtype=complex),
    "Y": np.array([[0, -1j], [1j, 0]], dtype=complex),
    "Z": np.array([[1, 0], [0, -1]], dtype=complex),
}


def dense(terms, n):
    """Sum of coeff * P; character k acts on qubit k, the k-th least
    significant bit of the index, so the Kronecker product runs from the last
    character to the first."""
    m = np.zeros((2 ** n, 2 ** n), dtype=complex)
    for coeff, ops in terms:
        k = np.eye(1, dtype=complex)
        for ch in reversed(ops):
            k = np.kron(k, PAULI[ch])
        m += coeff * k
    return m


def random_sum(rng, n, nterms):
    terms = []
    for _ in range(nterms):
        ops = "".join(rng.choice(list("IXYZ"), size=n))
        terms.append((float(rng.uniform(-1, 1)), ops))
    return terms


def main():
    probe = sys.argv[1]
    rng = np.random.default_rng(20261201)
    # (qubits, terms): the first two stay as drawn (indefinite); the last is
    # shifted to be positive definite.
    cases = [(2, 5), (3, 8), (4, 10)]
    passed = failed = 0

    def check(ok, what):
        nonlocal passed, failed
        if ok:
            passed += 1
        else:
            failed += 1
            print("FAIL:", what)

    with tempfile.TemporaryDirectory() as tmp:
        for idx, (n, nterms) in enumerate(cases):
            terms = random_sum(rng, n, nterms)
            if idx == 2:
                # make the last one positive definite: shift by 1 + |lambda_min|
                w0 = np.linalg.eigvalsh(dense(terms, n))
                terms = [(float(1.0 - w0[0]), "I" * n)] + terms
            path = os.path.join(tmp, "sum%d.yaml" % idx)
            with open(path, "w") as f:
                f.write("# random Pauli sum for check_spectrum.py\nmatrix:\n  pauli:\n")
                for coeff, ops in terms:
                    f.write('    - {coeff: %r, ops: "%s"}\n' % (coeff, ops))
                f.write("rhs: {basis: 0}\n")
            out = subprocess.run([probe, path], capture_output=True, text=True)
            check(out.returncode == 0, "case %d: probe failed: %s" % (idx, out.stderr))
            if out.returncode != 0:
                continue
            got = json.loads(out.stdout)
            w = np.linalg.eigvalsh(dense(terms, n))
            alpha = float(np.max(np.abs(w)))
            smin = float(np.min(np.abs(w)))
            tol = 1e-10 * alpha
            check(got["n"] == n, "case %d: n %s vs %d" % (idx, got["n"], n))
            for key, ref in (("alpha", alpha), ("sigma_min", smin),
                             ("lambda_min", float(w[0])), ("lambda_max", float(w[-1]))):
                check(abs(got[key] - ref) <= tol,
                      "case %d: %s %.17g vs numpy %.17g" % (idx, key, got[key], ref))
            check(abs(got["kappa"] - alpha / smin) <= 1e-8 * alpha / smin,
                  "case %d: kappa %.17g vs %.17g" % (idx, got["kappa"], alpha / smin))
            want_variant = "P" if w[0] > 0 else "I"
            check(got["variant"] == want_variant,
                  "case %d: variant %s vs %s" % (idx, got["variant"], want_variant))
            print("case %d: n=%d alpha=%.6g sigma_min=%.6g kappa=%.6g variant=%s"
                  % (idx, n, alpha, smin, alpha / smin, want_variant))
    print("%d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
