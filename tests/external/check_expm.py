#!/usr/bin/python3
"""check_expm.py - compiled product-formula circuits against
scipy.linalg.expm (Debian python3-scipy).

Usage: check_expm.py DWELL_BINARY SOURCE_ROOT

For small Pauli problems of both variants, compile ONE segment
(schedule.steps=1, so s_1 = 1) with r product-formula steps, simulate the
emitted OpenQASM with `dwell run --json`, and compare the final state with
expm(-i t_1 H) |start>, where numpy builds, independently of dwell's code,
H = |0><1| (x) A Q + |1><0| (x) Q A (the definition of the Hamiltonian of
the randomization method, DESIGN 4), A the Pauli sum scaled by its norm,
Q = I - |b~><b~|.  The difference must be within the splitting-error bound
the ledger reports (plus rounding), and it must shrink as r grows
(order-2 formula: by about 4x when r doubles)."""
import json
import os
import subprocess
import sys
import tempfile

import numpy as np
import scipy.linalg

DWELL, ROOT = sys.argv[1], sys.argv[2]
failed = checks = 0


def check(cond, what):
    global failed, checks
    checks += 1
    if not cond:
        failed += 1
        print("FAIL:", what)


PAULI = {"I": np.eye(2), "X": np.array([[0, 1], [1, 0]]),
         "Y": np.array([[0, -1j], [1j, 0]]), "Z": np.diag([1.0, -1.0])}


def pauli_matrix(ops):
    # character k acts on sys[k] = bit k (little-endian): kron puts the
    # most significant factor first
    m = np.array([[1.0]])
    for ch in reversed(ops):
        m = np.kron(m, PAULI[ch])
    return m


def case(name, terms, amps, order, steps, variant_expected):
    n = len(terms[0][1])
    tmp = tempfile.mkdtemp(prefix="dwell-expm-")
    yaml = os.path.join(tmp, "p.yaml")
    with open(yaml, "w") as f:
        f.write(f"name: {name}\nmatrix:\n  pauli:\n")
        for c, ops in terms:
            f.write(f"    - {{coeff: {c!r}, ops: \"{ops}\"}}\n")
        f.write(f"rhs:\n  amplitudes: {json.dumps(amps)}\nprecision: 0.1\n")
        f.write(f"schedule:\n  steps: 1\n  seed: 4\nformula:\n  order: {order}\n"
                f"  steps: {steps}\n")
    out = os.path.join(tmp, "out")
    p = subprocess.run([DWELL, "compile", yaml, "-o", out, "--quiet"], capture_output=True,
                       text=True)
    check(p.returncode == 0, f"{name}: compile: {p.stderr}")
    led = json.load(open(os.path.join(out, "ledger.json")))
    seg = led["segments"][0]
    t, s = seg["dwell_time"], seg["s"]
    bound = seg["split_error_bound"]
    p = subprocess.run([DWELL, "run", os.path.join(out, "circuit.qasm"), "--json"],
                       capture_output=True, text=True)
    check(p.returncode == 0, f"{name}: run: {p.stderr}")
    got = np.array([complex(a, b) for a, b in json.loads(p.stdout)["amplitudes"]])
    # independent construction
    A = sum(c * pauli_matrix(ops) for c, ops in terms)
    A = A / np.max(np.abs(np.linalg.eigvalsh(A)))
    N = 2 ** n
    b = np.array(amps, dtype=complex)
    b = b / np.linalg.norm(b)
    variant = "P" if np.min(np.linalg.eigvalsh(A)) > 0 else "I"
    check(variant == variant_expected and led["problem"]["variant"] == variant,
          f"{name}: variant {variant}")
    if variant == "P":
        As = (1 - s) * np.eye(N) + s * A
        bt = b
        start_sys = b
        nsgn = 0
    else:
        # sgn is the qubit after anc, below sys: in kron order sys (x) sgn
        Z, X = PAULI["Z"], PAULI["X"]
        As = (1 - s) * np.kron(np.eye(N), Z) + s * np.kron(A, X)
        plus = np.array([1, 1]) / np.sqrt(2)
        minus = np.array([1, -1]) / np.sqrt(2)
        bt = np.kron(b, plus)
        start_sys = np.kron(b, minus)
        nsgn = 1
    M = N * 2 ** nsgn
    Q = np.eye(M) - np.outer(bt, bt.conj())
    # anc is bit 0: kron(system part, anc part)
    s01 = np.array([[0, 1], [0, 0]])   # |0><1|
    s10 = np.array([[0, 0], [1, 0]])   # |1><0|
    H = np.kron(As @ Q, s01) + np.kron(Q @ As, s10)
    start = np.kron(start_sys, np.array([1, 0]))
    want = scipy.linalg.expm(-1j * t * H) @ start
    dim = len(want)
    check(len(got) >= dim, f"{name}: state size")
    # work qubits (above) must be |0>: only the first dim amplitudes remain
    tail = np.linalg.norm(got[dim:]) if len(got) > dim else 0.0
    check(tail < 1e-9, f"{name}: work qubits clean ({tail:.3g})")
    g = got[:dim]
    ph = np.vdot(want, g)
    ph = ph / abs(ph)
    err = np.linalg.norm(g - ph * want)
    print(f"{name}: order {order}, r = {steps}, t = {t:.4g}: |state - expm| = {err:.3g} "
          f"(bound {bound:.3g})")
    check(err <= bound + 1e-9, f"{name}: error {err:.3g} above the bound {bound:.3g}")
    return err


for order in (1, 2, 4):
    errs = []
    for r in (4, 8, 16):
        errs.append(case(f"pd-o{order}-r{r}", [(1.0, "II"), (0.3, "XI"), (0.2, "ZZ"),
                                                (0.15, "YX")], [1.0, 0.5, -0.25, 0.8],
                         order, r, "P"))
    check(errs[2] < errs[0], f"order {order}: error shrinks with r: {errs}")
    if order == 2:
        check(errs[0] / errs[1] > 3.0 and errs[1] / errs[2] > 3.0,
              f"order 2: about 4x per doubling: {errs}")
for r in (4, 16):
    case(f"indef-r{r}", [(0.9, "ZI"), (0.4, "XX"), (-0.35, "IZ")], [0.6, 0.0, 0.8, 0.0],
         2, r, "I")

print(f"{checks} checks, {failed} failed")
sys.exit(1 if failed else 0)
