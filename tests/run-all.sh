#!/bin/sh
# run-all.sh - set up, build with AddressSanitizer + UBSan (warnings are
# errors) and run every test; ends with the line "N passed, N failed" and
# exits non-zero on any failure.  This is README.md's test command.
set -eu
cd "$(dirname "$0")/.."
sh tools/bootstrap.sh
build=build-test
if [ ! -f "$build/build.ninja" ]; then
	meson setup "$build" -Dwerror=true -Db_sanitize=address,undefined \
		-Dc_args=-fno-sanitize-recover=all -Dc_link_args=-fno-sanitize-recover=all
fi
meson compile -C "$build"
export ASAN_OPTIONS=detect_leaks=1:abort_on_error=1
export UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1
export OMP_NUM_THREADS=2
status=0
meson test -C "$build" --print-errorlogs --num-processes 2 || status=$?
/usr/bin/python3 - "$build/meson-logs/testlog.json" <<'PY'
import json, sys
passed = failed = 0
for line in open(sys.argv[1]):
    line = line.strip()
    if not line:
        continue
    r = json.loads(line)
    if r.get("result") in ("OK", "EXPECTEDFAIL", "SKIP"):
        passed += 1
    else:
        failed += 1
        print("FAILED:", r.get("name"))
print(f"{passed} passed, {failed} failed")
sys.exit(1 if failed else 0)
PY
exit $status
