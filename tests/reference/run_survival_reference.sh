#!/usr/bin/env bash
# run_survival_reference.sh DRIVER SCRIPT OUTDIR — BudLedger's numbers from the
# driver, then R's comparison of them; fails if R or its survival package is
# missing (packaging/install-deps.sh installs both).
set -euo pipefail
driver=$1 script=$2 out=$3
if ! command -v Rscript >/dev/null; then
  echo "Rscript not found: install r-base-core and r-cran-survival (packaging/install-deps.sh)"
  exit 1
fi
rm -rf "$out"
"$driver" "$out" "${DATASETS:-200}"
exec Rscript --vanilla "$script" "$out"
