#!/usr/bin/env bash
# make-demo.sh CLI OUTDIR — generate the demo experiment with the simulator and
# analyse it into OUTDIR/demo.budledger (rebuilt from scratch every time).
set -euo pipefail
cli=$1 out=$2
here=$(cd "$(dirname "$0")" && pwd)
rm -rf "$out"
mkdir -p "$out"
"$cli" simulate --scenario "$here/scenarios/demo.json" --out "$out/images"
# One analyze per group, so the survival curves compare the groups the
# simulator drew (positions.csv: position,group,file,...).
for group in $(tail -n +2 "$out/images/positions.csv" | cut -d, -f2 | sort -u); do
  files=()
  while IFS=, read -r _ g file _; do
    [[ $g == "$group" ]] && files+=("$out/images/$file")
  done < <(tail -n +2 "$out/images/positions.csv")
  "$cli" analyze "${files[@]}" --group "$group" --project "$out/demo.budledger"
done
"$cli" summary "$out/demo.budledger"
