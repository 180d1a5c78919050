#!/usr/bin/env bash
# make-demo.sh CLI OUTDIR — generate the demo experiment with the simulator and
# analyse it into OUTDIR/demo.budledger (rebuilt from scratch every time).
set -euo pipefail
cli=$1 out=$2
here=$(cd "$(dirname "$0")" && pwd)
rm -rf "$out"
mkdir -p "$out"
"$cli" simulate --scenario "$here/scenarios/demo.json" --out "$out/images"
"$cli" analyze "$out"/images/*.tif --project "$out/demo.budledger"
"$cli" summary "$out/demo.budledger"
