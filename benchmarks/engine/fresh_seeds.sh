#!/usr/bin/env bash
# fresh_seeds.sh CLI WORKDIR FIRST LAST — the engine on a run of preset seeds it has
# never seen, one position each, difficulty by seed (seed mod 3: 0 easy, 1 normal,
# 2 hard), analysed with the true cup centres (--traps) so the row measures
# registration and the engine, not lattice finding. Prints one Markdown row per seed.
# A wide sweep is where whole-position failures show (a registration lock on the
# wrong lattice cell, backgrounds with no empty trap), which averages over a few
# validation sets hide; docs/validation.md reports it.
set -euo pipefail
cli=$(realpath "$1")
work=$2
first=$3
last=$4
mkdir -p "$work"
echo "| seed | sep F1 | bud F1 | RLS exact | RLS MAE | bias | one record | edits/100 | ECE |"
echo "|---|---:|---:|---:|---:|---:|---:|---:|---:|"
for seed in $(seq "$first" "$last"); do
  case $((seed % 3)) in
    0) difficulty=easy ;;
    1) difficulty=normal ;;
    *) difficulty=hard ;;
  esac
  dir="$work/seed-$seed"
  rm -rf "$dir" "$dir".*
  "$cli" simulate --seed "$seed" --difficulty "$difficulty" --positions 1 --out "$dir" \
    --jobs 2 > /dev/null 2>&1
  echo "position,trap_id,row,col,x,y" > "$dir.traps.csv"
  for t in "$dir"/truth/*/traps.csv; do
    tail -n +2 "$t" | sed "s/^/$(basename "$(dirname "$t")"),/" >> "$dir.traps.csv"
  done
  "$cli" analyze "$dir"/*.ome.tif --traps "$dir.traps.csv" --project "$dir.budledger" \
    > "$dir.txt" 2>/dev/null
  "$cli" evaluate --truth "$dir" --project "$dir.budledger" --json "$dir.json" > "$dir.md"
  jq -r --arg n "$seed $difficulty" '"| \($n) | \(.kinds.separation.f1*1000|round/1000) | \(.kinds.bud.f1*1000|round/1000) | \(.mothers.exact_rate*1000|round/10)% | \(.mothers.mae*100|round/100) | \(.mothers.bias*100|round/100) | \(.mothers.one_record)/\(.mothers.count) | \(.review.edits_per_100_divisions*10|round/10) | \(.calibration_error*1000|round/1000) |"' "$dir.json"
done
