#!/usr/bin/python3
"""check_mtx_scipy.py - dwell's Matrix Market reader against scipy.io.

Outside reference: scipy.io.mmread and scipy.io.mmwrite from Debian's
python3-scipy package (1.10.x, the pure-Python MMFile reader/writer in
scipy/io/_mmio.py).  Our side: tests/unit/mtx_dump.c, which reads a file with
dw_mtx_read_matrix / dw_mtx_read_vector and prints the entries as JSON.

Checks:
 1. every file in tests/cases/mtx/good: our dense matrix equals
    mmread(f).toarray() (or the ndarray mmread gives for array files),
    exactly.  scipy sums repeated coordinates when it converts COO to dense,
    and mirrors symmetric / skew-symmetric / hermitian storage (a_ji = a_ij,
    -a_ij, conj(a_ij)), which is what we do.  Files scipy 1.10 cannot parse
    (listed in SCIPY_CANNOT_READ with the reason) are checked to fail in
    scipy and to read in ours.
 2. random matrices of every valid kind written by scipy.io.mmwrite (array
    for dense input, coordinate for sparse input) read back by us equal the
    matrix written.
 3. random coordinate files written here with entries shuffled, repeats,
    and comment/blank lines between entries: ours equals scipy's reading.

Usage: check_mtx_scipy.py MTX_DUMP GOOD_DIR.  Prints one line per group and
"mtx scipy check: N files, 0 differences"; exit 1 on any difference, 77
(skipped) when numpy/scipy are missing.
"""
import json
import os
import subprocess
import sys
import tempfile

try:
    import numpy as np
    import scipy
    import scipy.io
    import scipy.sparse
except ImportError as e:
    print(f"skipped: {e}")
    sys.exit(77)

# Good files that scipy 1.10's reader does not accept, and why.  The NIST
# report makes the header case-insensitive and allows comments anywhere;
# scipy checks '%%MatrixMarket' case-sensitively, only recognises '%' in the
# first column, and only skips comments directly after the header.
SCIPY_CANNOT_READ = {
    "layout-banner-all-lowercase.mtx": "scipy matches '%%MatrixMarket' case-sensitively",
    "layout-indented-comment.mtx": "scipy only sees comments starting in column 1",
    "layout-comment-after-blank.mtx": "scipy skips comments only before blank lines",
}

failures = 0


def fail(msg):
    global failures
    failures += 1
    print("FAIL:", msg)


def ours(dump, path, mode):
    """Dense complex array of our reading (vector: 1-D)."""
    run = subprocess.run([dump, mode, path], capture_output=True, text=True)
    if run.returncode != 0:
        raise RuntimeError(f"mtx_dump {mode} {path}: status {run.returncode}: {run.stderr.strip()}")
    data = json.loads(run.stdout)
    dense = np.zeros((data["rows"], data["cols"]), dtype=complex)
    for i, j, re, im in data["entries"]:
        dense[i, j] += complex(re, im)
    return dense[:, 0] if mode == "vector" else dense


def theirs(path):
    """Dense complex array of scipy's reading."""
    a = scipy.io.mmread(path)
    if scipy.sparse.issparse(a):
        a = a.toarray()
    return np.asarray(a).astype(complex)


def compare(name, mine, ref):
    if mine.shape != ref.shape:
        fail(f"{name}: shape {mine.shape} vs scipy {ref.shape}")
        return
    if not np.array_equal(mine, ref):
        bad = np.argwhere(mine != ref)
        i = tuple(bad[0])
        fail(f"{name}: {len(bad)} entries differ, first at {i}: {mine[i]} vs scipy {ref[i]}")


def check_corpus(dump, good_dir):
    names = sorted(n for n in os.listdir(good_dir) if n.endswith(".mtx"))
    compared = 0
    for name in names:
        path = os.path.join(good_dir, name)
        mode = "vector" if name.startswith("vector-") else "matrix"
        try:
            mine = ours(dump, path, mode)
        except RuntimeError as e:
            fail(str(e))
            continue
        if name in SCIPY_CANNOT_READ:
            try:
                theirs(path)
                fail(f"{name}: listed as unreadable by scipy, but scipy read it")
            except Exception:
                pass
            continue
        ref = theirs(path)
        if mode == "vector":
            ref = ref.reshape(-1)
        compare(name, mine, ref)
        compared += 1
    print(f"corpus: {compared} good files equal to scipy.io.mmread, "
          f"{len(SCIPY_CANNOT_READ)} read only by us")
    return compared + len(SCIPY_CANNOT_READ)


def random_kind(rng, n, field, symmetry):
    """A random n x n matrix with the given field and symmetry."""
    def values(shape):
        if field == "integer":
            return rng.integers(-9, 10, size=shape).astype(float)
        if field == "pattern":
            return np.ones(shape)
        v = rng.standard_normal(shape) * 10.0 ** rng.integers(-3, 4, size=shape)
        if field == "complex":
            v = v + 1j * rng.standard_normal(shape)
        return v
    mask = rng.random((n, n)) < 0.3
    a = np.where(mask, values((n, n)), 0).astype(complex if field == "complex" else float)
    if symmetry == "general":
        return a
    low = np.tril(a, -1)
    diag = np.diag(np.diag(a))
    if symmetry == "symmetric":
        return low + low.T + diag
    if symmetry == "skew-symmetric":
        return low - low.T
    return low + low.conj().T + np.real(diag)          # hermitian


# scipy 1.10's mmwrite writes the diagonal of a complex skew-symmetric
# array (its loop starts at i = j), against the NIST layout that its own
# mmread follows (skew arrays omit the diagonal).
SCIPY_WRITER_DEFECT = ("array", "complex", "skew-symmetric")

KINDS = [(fmt, field, sym)
         for fmt in ("coordinate", "array")
         for field in ("real", "integer", "complex", "pattern")
         for sym in ("general", "symmetric", "skew-symmetric", "hermitian")
         if not (fmt == "array" and field == "pattern")
         and not (sym == "hermitian" and field != "complex")
         and not (field == "pattern" and sym == "skew-symmetric")]


def check_mmwrite(dump, tmp, rng, rounds):
    count = 0
    for r in range(rounds):
        for fmt, field, sym in KINDS:
            n = int(rng.integers(1, 30))
            a = random_kind(rng, n, field, sym)
            if field == "integer":
                a = a.astype(np.int64)
            path = os.path.join(tmp, f"w{r}-{fmt}-{field}-{sym}.mtx")
            target = scipy.sparse.coo_matrix(a) if fmt == "coordinate" else a
            scipy.io.mmwrite(path, target, field=field, symmetry=sym)
            with open(path) as f:
                header = f.readline().split()
            if header[2:5] != [fmt, field, sym]:
                fail(f"{path}: scipy wrote header {header}, wanted {fmt} {field} {sym}")
                continue
            name = os.path.basename(path)
            if (fmt, field, sym) == SCIPY_WRITER_DEFECT:
                # scipy writes the (zero) diagonal too, which its own reader
                # and ours both refuse: check exactly that.
                try:
                    ours(dump, path, "matrix")
                    fail(f"{name}: we accepted a skew array that stores its diagonal")
                except RuntimeError as e:
                    if "found one more" not in str(e):
                        fail(f"{name}: unexpected error {e}")
                try:
                    theirs(path)
                    fail(f"{name}: scipy read its own diagonal-storing skew array")
                except Exception:
                    pass
                continue
            mine = ours(dump, path, "matrix")
            # scipy writes coordinate values with 16 significant digits, so
            # the file is exact only to 5e-16 relative: compare with the
            # matrix written to that tolerance, and with scipy's reading of
            # the same file exactly.
            if not np.allclose(mine, a.astype(complex), rtol=1e-15, atol=0):
                fail(f"{name}: differs from the matrix written beyond 1e-15 relative")
            compare(name, mine, theirs(path))
            count += 1
    print(f"mmwrite: {count} random files ({len(KINDS) - 1} of the {len(KINDS)} valid "
          f"kinds) read back equal; array complex skew-symmetric skipped (scipy writer "
          f"stores the diagonal; both readers refuse it)")
    return count


def check_shuffled(dump, tmp, rng, rounds):
    """Coordinate files with repeats and interleaved comments, vs mmread."""
    count = 0
    for r in range(rounds):
        for fmt, field, sym in KINDS:
            if fmt != "coordinate":
                continue
            n = int(rng.integers(1, 25))
            a = random_kind(rng, n, field, sym)
            lines = []
            for i in range(n):
                for j in range(n):
                    if a[i, j] == 0 or (sym != "general" and i < j):
                        continue
                    v = a[i, j]
                    parts = [v]
                    if field != "pattern" and rng.random() < 0.3:
                        h = np.round(v / 3, 3) if field != "integer" else 1.0
                        if sym == "hermitian" and i == j:
                            h = h.real
                        parts = [h, v - h]
                    for p in parts:
                        if field == "pattern":
                            lines.append(f"{i + 1} {j + 1}")
                        elif field == "complex":
                            lines.append(f"{i + 1} {j + 1} {p.real!r} {p.imag!r}")
                        elif field == "integer":
                            lines.append(f"{i + 1} {j + 1} {int(round(p.real))}")
                        else:
                            lines.append(f"{i + 1} {j + 1} {p.real!r}")
            order = rng.permutation(len(lines))
            path = os.path.join(tmp, f"s{r}-{field}-{sym}.mtx")
            with open(path, "w") as f:
                f.write(f"%%MatrixMarket matrix coordinate {field} {sym}\n"
                        "% generated by check_mtx_scipy.py (invented data)\n"
                        f"{n} {n} {len(lines)}\n")
                for k, idx in enumerate(order):
                    if k % 7 == 3:
                        f.write("% interleaved comment\n\n")
                    f.write(lines[idx] + "\n")
            compare(os.path.basename(path), ours(dump, path, "matrix"), theirs(path))
            count += 1
    print(f"shuffled: {count} random coordinate files with repeats equal to scipy.io.mmread")
    return count


def main():
    if len(sys.argv) != 3:
        print("usage: check_mtx_scipy.py MTX_DUMP GOOD_DIR")
        return 2
    dump, good_dir = sys.argv[1], sys.argv[2]
    print(f"reference: scipy {scipy.__version__} (Debian python3-scipy), numpy {np.__version__}")
    rng = np.random.default_rng(20261201)
    total = check_corpus(dump, good_dir)
    with tempfile.TemporaryDirectory(prefix="dwell-mtx-") as tmp:
        total += check_mmwrite(dump, tmp, rng, 4)
        total += check_shuffled(dump, tmp, rng, 4)
    print(f"mtx scipy check: {total} files, {failures} differences")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
