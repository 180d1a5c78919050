#!/usr/bin/env bash
# screenshot.sh GUI CLI OUTDIR — the workstation renders its window offscreen
# and writes a real PNG (magic bytes, plausible size), exiting 0.
set -eu
gui=$1 cli=$2 out=$3
mkdir -p "$out"
rm -f "$out/window.png"
QT_QPA_PLATFORM=offscreen XDG_CONFIG_HOME="$out/config" "$gui" --screenshot "$out/window.png"
magic=$(head -c 8 "$out/window.png" | od -An -tx1 | tr -d ' \n')
[[ $magic == 89504e470d0a1a0a ]] || { echo "not a PNG: $magic"; exit 1; }
size=$(stat -c %s "$out/window.png")
(( size > 5000 )) || { echo "PNG suspiciously small: $size bytes"; exit 1; }
echo "screenshot ok: $size bytes"
