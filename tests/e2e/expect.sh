#!/usr/bin/env bash
# expect.sh CODE PATTERN CMD... — run CMD; pass if it exits CODE and its
# combined output matches the extended regex PATTERN (line-wise).
set -u
code=$1 pattern=$2
shift 2
out=$("$@" 2>&1)
rc=$?
if [[ $rc -ne $code ]]; then
  echo "expected exit $code, got $rc from: $*"; echo "$out"; exit 1
fi
if ! grep -Eq -- "$pattern" <<<"$out"; then
  echo "output of '$*' does not match /$pattern/:"; echo "$out"; exit 1
fi
# A usage error must be one line.
if [[ $code -eq 2 && $(wc -l <<<"$out") -ne 1 ]]; then
  echo "usage error should be one line, got:"; echo "$out"; exit 1
fi
exit 0
