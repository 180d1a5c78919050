#!/usr/bin/env bash
# quickstart.sh demo|test — the README's two commands.
#   demo: install dependencies, build, generate the demo experiment, analyse it
#         and open the workstation on it (a printed summary when no display).
#   test: install dependencies, build and run the whole test suite with ctest;
#         exits non-zero on any failure.
set -euo pipefail
cd "$(dirname "$0")/.."

what=${1:-}
case $what in demo | test) ;; *) echo "usage: packaging/quickstart.sh demo|test" >&2; exit 2 ;; esac

bash packaging/install-deps.sh
[[ ${CI:-} == true ]] && export BUDLEDGER_WERROR=ON
cmake --preset release >/dev/null
cmake --build --preset release

if [[ $what == test ]]; then
  exec ctest --preset release
fi

bin=build/release/app
out=build/demo
bash demo/make-demo.sh "$bin/cli/budledger-cli" "$out"
exec "$bin/gui/budledger" "$out/demo.budledger"
