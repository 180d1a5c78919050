#!/usr/bin/env bash
# expect_clean.sh CODE PATTERN CMD... — like ../expect.sh, and also: the output
# never shows NaN or infinity as a number, and a failure (exit 1) is one line.
set -u
here=$(dirname "$0")
code=$1 pattern=$2
shift 2
bash "$here/../expect.sh" "$code" "$pattern" "$@" || exit 1
out=$("$@" 2>&1)
if grep -Eiq -- '(^|[^a-z])(nan|inf|infinity)([^a-z]|$)' <<<"$out"; then
  echo "output shows NaN or infinity:"; grep -Ein -- '(^|[^a-z])(nan|inf|infinity)([^a-z]|$)' <<<"$out" | head; exit 1
fi
if [[ $code -eq 1 && $(wc -l <<<"$out") -ne 1 ]]; then
  echo "a failure should be one line, got:"; echo "$out"; exit 1
fi
exit 0
