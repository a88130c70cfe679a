#!/bin/sh
# demo.sh - set up (Debian packages), build dwell, and compile the bundled
# greenhouse sample: prints the ledger and writes out/circuit.qasm and
# out/ledger.json.  This is README.md's first command.
set -eu
cd "$(dirname "$0")/.."
sh tools/bootstrap.sh
[ -f build/build.ninja ] || meson setup build
meson compile -C build
./build/dwell compile samples/greenhouse.yaml -o out
