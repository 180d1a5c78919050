#!/usr/bin/env bash
# make-screenshots.sh [BUILD_DIR] — renders the workstation's main views for
# docs/user-guide.md into docs/images/, at 100% (NAME.png) and 200% scale
# (NAME@2x.png, QT_SCALE_FACTOR=2). Uses the ui-screenshots program (built
# with the UI tests), which drives the real window with QWidget::grab, and
# the workstation's own --screenshot under a virtual X server when xvfb-run
# is available. Build first: cmake --build --preset release --target ui-screenshots budledger
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/../.." && pwd)
build=${1:-$root/build/release}
out=$root/docs/images
prog=$build/tests/ui/ui-screenshots
[[ -x $prog ]] || { echo "no $prog: build the target ui-screenshots first" >&2; exit 1; }
mkdir -p "$out"
export XDG_CONFIG_HOME=$(mktemp -d)
trap 'rm -rf "$XDG_CONFIG_HOME"' EXIT
QT_QPA_PLATFORM=offscreen QT_SCALE_FACTOR=1 "$prog" "$out" ""
QT_QPA_PLATFORM=offscreen QT_SCALE_FACTOR=2 "$prog" "$out" "@2x"
