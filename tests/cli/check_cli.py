#!/usr/bin/python3
"""check_cli.py - the dwell command line end to end.

Usage: check_cli.py DWELL_BINARY SOURCE_ROOT

Checks: same input and seed give byte-identical files; --instances K writes
K numbered circuits and ledgers with seeds seed..seed+K-1; every bad input
file exits 2 with "dwell: FILE:LINE:" and writes no file; --set overrides
reach the ledger; a problem-file budget that is exceeded exits 3 naming the
figure; --flat holds only standard gates and as many gates as the ledger
counts; `cost --json` equals the compiled ledger; diff and check run on real
ledgers; measurement-mode circuits (def subroutines) verify with the trace
distance of unitary uncomputation and run to the state of their flat form.  The JSON is read with Python's json module (RFC 8259) and the
OpenQASM text is checked against the OpenQASM 3 stdgates.inc names."""
import json
import os
import re
import subprocess
import sys
import tempfile

DWELL, ROOT = sys.argv[1], sys.argv[2]
failed = 0
checks = 0


def check(cond, what):
    global failed, checks
    checks += 1
    if not cond:
        failed += 1
        print("FAIL:", what)


def run(*args):
    p = subprocess.run([DWELL, *args], capture_output=True, text=True, cwd=ROOT)
    return p.returncode, p.stdout, p.stderr


def read(path, mode="r"):
    with open(path, mode) as f:
        return f.read()


SAMPLE = "samples/greenhouse.yaml"
tmp = tempfile.mkdtemp(prefix="dwell-cli-")

# 1. determinism
for d in ("a", "b"):
    rc, out, err = run("compile", SAMPLE, "-o", f"{tmp}/{d}", "--quiet")
    check(rc == 0, f"compile {d}: rc {rc} {err}")
for name in ("circuit.qasm", "ledger.json"):
    check(read(f"{tmp}/a/{name}", "rb") == read(f"{tmp}/b/{name}", "rb"),
          f"{name} identical for the same input and seed")
led = json.loads(read(f"{tmp}/a/ledger.json"))
check(led["schedule"]["seed"] == 7, "seed from the problem file")
check(led["qubits"]["total"] == 3, "greenhouse: anc + 2 sys")

# 2. instances
rc, out, err = run("compile", SAMPLE, "-o", f"{tmp}/k", "--instances", "3", "--quiet")
check(rc == 0, f"--instances 3: {err}")
for k in (1, 2, 3):
    lk = json.loads(read(f"{tmp}/k/ledger-{k:03d}.json"))
    check(lk["schedule"]["seed"] == 7 + k - 1, f"instance {k} uses seed + {k - 1}")
    check(lk["instance"] == k, f"instance number {k}")
    check(os.path.exists(f"{tmp}/k/circuit-{k:03d}.qasm"), f"circuit-{k:03d}.qasm")
check(read(f"{tmp}/k/circuit-001.qasm", "rb") == read(f"{tmp}/a/circuit.qasm", "rb"),
      "instance 1 equals the single compile")
check(read(f"{tmp}/k/circuit-002.qasm") != read(f"{tmp}/k/circuit-003.qasm"),
      "instances differ")

# 3. bad inputs: exit 2, located message, no output file
bad_dir = os.path.join(ROOT, "tests/cases/front")
bad = sorted(f for f in os.listdir(bad_dir) if f.startswith("bad_") and f.endswith(".yaml"))
check(len(bad) >= 20, "a corpus of bad problem files")
for f in bad:
    out_dir = f"{tmp}/bad-{f}"
    rc, out, err = run("compile", f"tests/cases/front/{f}", "-o", out_dir)
    check(rc == 2, f"{f}: exit {rc}, want 2 ({err.strip()})")
    check(re.match(r"dwell: tests/cases/front/" + re.escape(f) + r":\d+: ", err) is not None,
          f"{f}: message starts with FILE:LINE: {err.strip()}")
    check(not os.path.exists(out_dir), f"{f}: no output written")

# 4. --set overrides
rc, out, err = run("cost", SAMPLE, "--json", "--set", "schedule.steps=5",
                   "--set", "formula.order=1", "--set", "schedule.seed=99")
check(rc == 0, f"cost with overrides: {err}")
lo = json.loads(out)
check(lo["schedule"]["steps"] == 5 and not lo["schedule"]["steps_auto"], "--set schedule.steps")
check(lo["formula"]["order"] == 1, "--set formula.order")
check(lo["schedule"]["seed"] == 99, "--set schedule.seed")
rc, out, err = run("cost", SAMPLE, "--set", "schedule.stepz=5")
check(rc == 2 and "stepz" in err, f"unknown key in --set: rc {rc} {err}")
rc, out, err = run("cost", SAMPLE, "--set", "rhs.basis=2", "--json")
check(rc == 0 and json.loads(out)["gates"].get("ry", 0) == 0, "--set switches the rhs kind")

# 5. budget in the problem file
rc, out, err = run("cost", SAMPLE, "--set", "budget.t_count=1000", "--set", "budget.qubits=100")
check(rc == 3, f"over budget exits 3 (rc {rc})")
check("t_count" in err and "qubits" not in err.replace("qubits.total", ""),
      f"only the exceeded line is named: {err}")
rc, out, err = run("cost", SAMPLE, "--set", "budget.qubits=100")
check(rc == 0, "within budget exits 0")

# 6. flat output
rc, out, err = run("compile", SAMPLE, "-o", f"{tmp}/flat", "--flat", "--quiet",
                   "--set", "schedule.steps=3", "--set", "formula.steps=2")
check(rc == 0, f"--flat: {err}")
text = read(f"{tmp}/flat/circuit.qasm")
lf = json.loads(read(f"{tmp}/flat/ledger.json"))
stdgates = {"x", "y", "z", "h", "s", "sdg", "t", "tdg", "rx", "ry", "rz", "p", "cx", "cy",
            "cz", "ch", "swap", "cp", "crx", "cry", "crz", "ccx", "cswap"}
ops = {}
for line in text.splitlines():
    line = line.strip()
    if not line or line.startswith("//") or line.startswith("OPENQASM") or \
            line.startswith("include") or line.startswith("qubit"):
        continue
    name = re.match(r"[a-z_0-9]+", line).group(0)
    ops[name] = ops.get(name, 0) + 1
check(set(ops) <= stdgates, f"flat program uses only stdgates.inc gates: {set(ops) - stdgates}")
check(ops == lf["gates"], f"flat gate counts equal the ledger: {ops} vs {lf['gates']}")
check(sum(ops.values()) == lf["gate_count"], "gate_count")

# 7. cost --json equals the compiled ledger
rc, out, err = run("cost", SAMPLE, "--json")
check(rc == 0 and json.loads(out) == led, "cost --json equals compile's ledger.json")

# 8. diff and check on real ledgers
rc, out, err = run("diff", f"{tmp}/k/ledger-001.json", f"{tmp}/k/ledger-002.json")
check(rc == 0 and "total_time" in out, f"diff runs: {rc} {err}")
with open(f"{tmp}/budget.yaml", "w") as f:
    f.write("qubits: 2\nt_count: 1.0e15\n")
rc, out, err = run("check", f"{tmp}/a/ledger.json", "--budget", f"{tmp}/budget.yaml")
check(rc == 3 and "qubits" in err, f"check over budget: {rc} {err}")

# 9. clifford+t: only Clifford+T gates, and the exact T-count equals the
#    t/tdg gates of the flat program
rc, out, err = run("compile", "samples/seesaw.yaml", "-o", f"{tmp}/ct", "--flat", "--quiet",
                   "--set", "schedule.steps=4")
check(rc == 0, f"clifford+t --flat: {err}")
lc = json.loads(read(f"{tmp}/ct/ledger.json"))
ct_ops = {}
for line in read(f"{tmp}/ct/circuit.qasm").splitlines():
    line = line.strip()
    if not line or line.startswith(("//", "OPENQASM", "include", "qubit")):
        continue
    name = re.match(r"[a-z_0-9]+", line).group(0)
    ct_ops[name] = ct_ops.get(name, 0) + 1
clifford_t = {"h", "s", "sdg", "t", "tdg", "x", "y", "z", "cx", "cz", "measure", "reset"}
check(set(ct_ops) <= clifford_t, f"only Clifford+T gates: {set(ct_ops) - clifford_t}")
check(ct_ops.get("t", 0) + ct_ops.get("tdg", 0) == lc["t_count"] and lc["t_count"] > 0,
      f"exact t_count {lc['t_count']} equals the t/tdg gates of the flat program")
check(lc["t_count_estimated"] is False and lc["rotation_count"] == 0, "t_count exact")
check(lc["synthesis"]["max_error"] <= lc["eps_rotation"], "every rotation within its share")

# 10. verify: passes on a sample, fails (exit 3) when starved
rc, out, err = run("verify", SAMPLE, "--json", "--instances", "8")
check(rc == 0, f"verify passes: {rc} {err}")
v = json.loads(out)
for key in ("trace_distance", "fidelity", "fidelity_min", "work_clean_probability",
            "precision", "instances", "passed"):
    check(key in v, f"verify JSON has {key}")
check(v["passed"] is True and v["trace_distance"] <= v["precision"] and v["instances"] == 8,
      "verify figures")
rc, out, err = run("verify", SAMPLE, "--json", "--set", "schedule.steps=1",
                   "--set", "formula.steps=1")
v = json.loads(out) if out else {}
check(rc == 3 and v.get("passed") is False and v.get("trace_distance", 0) > 0.1,
      f"starved verify fails with exit 3 and a large trace distance: {rc} {out}")

# 11. measurement mode (target.uncompute: measure): the circuits hold `def`
#     subroutines with mid-circuit measurement and classically controlled
#     corrections.  The measured erasure is exact on every outcome, so verify
#     passes with the trace distance of the unitary uncomputation (up to
#     rounding); and the def program run by the runtime gives the same state
#     as its --flat expansion for the same seed (the same measurements are
#     drawn in the same order).
#     The 8 x 8 plate has 3-bit axes, so its stencil increments, decrements
#     and comparators hold measured logical-ANDs too.
for prob, k, extra in ((SAMPLE, "8", []), ("samples/cooling-plate.yaml", "16", []),
                       ("samples/cooling-plate.yaml", "2",
                        ["--set", "matrix.stencil.shape=[8,8]"])):
    td = {}
    for mode in ("unitary", "measure"):
        rc, out, err = run("verify", prob, "--json", "--instances", k,
                           "--set", f"target.uncompute={mode}", *extra)
        v = json.loads(out) if rc == 0 and out else {}
        check(rc == 0 and v.get("passed") is True,
              f"verify {prob} {extra} in {mode} mode: {rc} {err}")
        td[mode] = v.get("trace_distance", -1.0)
        if mode == "measure":
            check(abs(v.get("work_clean_probability", 0) - 1) <= 1e-9,
                  f"{prob} {extra}: work qubits back in |0> in measure mode: {out}")
    check(td["unitary"] > 0 and abs(td["measure"] - td["unitary"]) <= 1e-9,
          f"{prob} {extra}: same trace distance in measure mode: {td}")
cp = "samples/cooling-plate.yaml"
for form in ("def", "flat"):
    rc, out, err = run("compile", cp, "--set", "target.uncompute=measure", "-o",
                       f"{tmp}/m-{form}", "--quiet", *(["--flat"] if form == "flat" else []))
    check(rc == 0, f"compile {cp} in measure mode ({form}): {err}")
hier = read(f"{tmp}/m-def/circuit.qasm")
check(re.search(r"^def \w+\(.*qubit", hier, re.M) is not None
      and re.search(r"=\s*measure", hier) is not None,
      "measure-mode circuit holds def subroutines with measurements")
amps = {}
for form in ("def", "flat"):
    rc, out, err = run("run", f"{tmp}/m-{form}/circuit.qasm", "--json", "--seed", "3")
    check(rc == 0, f"run the {form} measure-mode circuit: {err}")
    amps[form] = json.loads(out)["amplitudes"] if rc == 0 else []
check(len(amps["def"]) == 256 and len(amps["def"]) == len(amps["flat"])
      and max(abs(complex(*a) - complex(*b)) for a, b in zip(amps["def"], amps["flat"])) <= 1e-12,
      "def program and its flat expansion give the same state for seed 3")

# 12. usage errors
rc, out, err = run("compile")
check(rc == 1, "missing problem: usage error")
rc, out, err = run("compile", SAMPLE, "--bogus")
check(rc == 1, "unknown option: usage error")
rc, out, err = run("compile", "no/such/file.yaml", "-o", f"{tmp}/none")
check(rc == 2 and "no/such/file.yaml" in err and not os.path.exists(f"{tmp}/none"),
      "missing file: exit 2")

print(f"{checks} checks, {failed} failed")
sys.exit(1 if failed else 0)
