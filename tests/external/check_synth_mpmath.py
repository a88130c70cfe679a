#!/usr/bin/env python3
"""check_synth_mpmath.py - `dwell synth` against mpmath (Debian python3-mpmath).

Runs `dwell synth ANGLE --precision EPS --json` for fixed pseudo-random angles
and several precisions.  For each answer it multiplies the gate matrices out in
60-digit arithmetic and checks the distance to rz(theta) up to global phase.
The gate matrices are those of the OpenQASM 3 standard library (stdgates.inc;
"OpenQASM 3: A broader and deeper quantum assembly language", ACM TQC 2022),
and rz(theta) = diag(e^{-i theta/2}, e^{i theta/2}).  Distance up to phase:
|e^{i phi} P - R| at phi = -arg tr(R^dagger P), with the operator norm of a
2x2 matrix from the largest eigenvalue of M^dagger M (common practice).
Also checked: t_count equals the number of t/tdg; the reported error; the
T-count bound 3 log2(1/eps) + 15 (the optimal method's typical count is
3 log2(1/eps) + O(log log 1/eps), "Optimal ancilla-free Clifford+T
approximation of z-rotations", QIC 16(11&12), 2016); and the exit statuses
of bad command lines (1) and bad values (2), as DESIGN section 10 fixes them.

usage: check_synth_mpmath.py DWELL_BINARY
"""
import json
import math
import random
import subprocess
import sys

try:
    import mpmath as mp
except ImportError:                     # python3-mpmath not installed
    print("mpmath not available: skipped")
    sys.exit(77)

mp.mp.dps = 60
R = mp.sqrt(mp.mpf(1) / 2)
W = mp.expjpi(mp.mpf(1) / 4)
GATES = {
    "h": [[R, R], [R, -R]],
    "s": [[1, 0], [0, 1j]],
    "sdg": [[1, 0], [0, -1j]],
    "t": [[1, 0], [0, W]],
    "tdg": [[1, 0], [0, mp.conj(W)]],
    "x": [[0, 1], [1, 0]],
    "y": [[0, -1j], [1j, 0]],
    "z": [[1, 0], [0, -1]],
}

failures = 0


def fail(msg):
    global failures
    failures += 1
    print("FAIL:", msg)


def product(seq):
    p = mp.eye(2)
    for g in seq:
        p = mp.matrix(GATES[g]) * p     # circuit order: first gate first
    return p


def distance(p, theta):
    th = mp.mpf(theta)
    r = mp.matrix([[mp.expj(-th / 2), 0], [0, mp.expj(th / 2)]])
    tr = sum(mp.conj(r[i, j]) * p[i, j] for i in range(2) for j in range(2))
    ph = mp.conj(tr) / abs(tr)
    d = ph * p - r
    m = d.H * d
    a, b, c = mp.re(m[0, 0]), m[0, 1], mp.re(m[1, 1])
    lam = (a + c) / 2 + mp.sqrt(((a - c) / 2) ** 2 + abs(b) ** 2)
    return mp.sqrt(lam)


def run(args):
    return subprocess.run(args, capture_output=True, text=True)


def main():
    dwell = sys.argv[1]
    rng = random.Random(20261201)
    cases = []
    for eps in (1e-3, 1e-6, 1e-10, 1e-15, 1e-20):
        for _ in range(12):
            cases.append((repr(rng.uniform(-7.0, 7.0)), eps))
    cases += [("pi/8", 1e-9), ("-3*pi/4", 1e-9), ("0.3*pi", 1e-12), ("pi/2", 1e-5)]
    checked = 0
    for angle, eps in cases:
        r = run([dwell, "synth", angle, "--precision", repr(eps), "--json"])
        if r.returncode != 0:
            fail(f"{angle} {eps}: exit {r.returncode}: {r.stderr.strip()}")
            continue
        out = json.loads(r.stdout)
        theta = out["angle"]
        if out["precision"] != eps:
            fail(f"{angle}: precision echoed as {out['precision']}")
        seq = out["sequence"]
        if any(g not in GATES for g in seq):
            fail(f"{angle}: unknown gate in {seq}")
            continue
        tcount = sum(1 for g in seq if g in ("t", "tdg"))
        if tcount != out["t_count"]:
            fail(f"{angle}: t_count {out['t_count']} but {tcount} t/tdg")
        d = distance(product(seq), theta)
        if d > eps:
            fail(f"{angle} eps {eps}: distance {mp.nstr(d, 8)}")
        if abs(d - out["error"]) > 1e-6 * eps + 1e-30:
            fail(f"{angle} eps {eps}: reported error {out['error']}, mpmath {mp.nstr(d, 8)}")
        if out["t_count"] > 3 * math.log2(1 / eps) + 15:
            fail(f"{angle} eps {eps}: T-count {out['t_count']}")
        checked += 1
    # pi/2 is S up to phase: no T at all
    r = run([dwell, "synth", "pi/2", "--precision", "1e-5", "--json"])
    if r.returncode != 0 or json.loads(r.stdout)["t_count"] != 0:
        fail("rz(pi/2) should need no T")
    # exit statuses
    for args, want in ((["synth"], 1), (["synth", "0.3"], 1), (["synth", "0.3", "--bogus"], 1),
                       (["synth", "pi/", "--precision", "1e-3"], 2),
                       (["synth", "0.3", "--precision", "0"], 2),
                       (["synth", "0.3", "--precision", "1.5"], 2)):
        r = run([dwell] + args)
        if r.returncode != want:
            fail(f"{' '.join(args)}: exit {r.returncode}, expected {want}")
        if want == 2 and not r.stderr.startswith("dwell: "):
            fail(f"{' '.join(args)}: message '{r.stderr.strip()}'")
    print(f"{checked} sequences checked against mpmath at 60 digits, {failures} failures")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
