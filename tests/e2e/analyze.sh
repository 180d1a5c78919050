#!/usr/bin/env bash
# analyze.sh CLI MAKE_STACK SCENARIO WORKDIR — end-to-end checks of
# `budledger-cli analyze` and `export --traps`: success on stacks, folders
# and simulated positions; one-line errors with exit 1 for bad input; and
# never a project file left behind by a failed run.
set -u
cli=$1 make_stack=$2 scenario=$3 work=$4
rm -rf "$work"
mkdir -p "$work"
cd "$work" || exit 1
failures=0
fail() { echo "FAIL: $*"; failures=$((failures + 1)); }

# run CODE PATTERN CMD...: CMD must exit CODE and print something matching PATTERN.
run() {
  local code=$1 pattern=$2
  shift 2
  out=$("$@" 2>&1)
  local rc=$?
  [[ $rc -eq $code ]] || fail "exit $rc (want $code) from: $* -- $out"
  grep -Eq -- "$pattern" <<<"$out" || fail "no /$pattern/ in output of: $* -- $out"
}
no_project() { [[ ! -e $1 ]] && ! compgen -G ".$(basename "$1").partial*" >/dev/null || fail "left behind: $(ls -a)"; }

"$make_stack" pos01.ome.tif 8 >/dev/null || fail "cannot make a test stack"
"$make_stack" pos02.ome.tif 8 >/dev/null
"$make_stack" single.tif 1 >/dev/null
printf 'not an image at all\n' >notes.tif

# A good run; progress goes to stderr as plain lines when not on a terminal.
run 0 "^pos01: 8 frames of 640x480, [0-9]+ traps .*detected" "$cli" analyze pos01.ome.tif --project a.budledger --group ctrl
run 0 "registering: 100%" "$cli" analyze pos02.ome.tif --project b.budledger
[[ -f a.budledger ]] || fail "no project written"
run 0 "'pos01' group 'ctrl': 8 frames of 640x480 px, [1-9][0-9]* traps" "$cli" summary a.budledger
run 0 "wrote traps.csv" "$cli" export a.budledger --traps traps.csv
[[ $(head -1 traps.csv) == "position,trap_id,row,col,x,y,edge" ]] || fail "traps.csv header: $(head -1 traps.csv)"
grep -Eq '^pos01,0,0,0,[0-9.]+,[0-9.]+,[01]$' traps.csv || fail "traps.csv rows: $(sed -n 2p traps.csv)"
run 2 "name at least one output" "$cli" export a.budledger

# The exported layout, edited down to two traps, fed back.
head -3 traps.csv >two.csv
run 0 "pos01: .* 2 traps .*supplied" "$cli" analyze pos01.ome.tif --project c.budledger --traps two.csv

# Adding to an existing project; a taken name is refused and changes nothing.
run 0 "wrote 1 position" "$cli" analyze pos02.ome.tif --project a.budledger
run 1 "position 'pos01' is already in project" "$cli" analyze pos01.ome.tif --project a.budledger
run 0 "position 2 'pos02'" "$cli" summary a.budledger

# Bad input: one line naming the file, exit 1, no project.
run 1 "^budledger-cli: .*missing.tif: file not found$" "$cli" analyze missing.tif --project d.budledger
no_project d.budledger
run 1 "^budledger-cli: .*notes.tif: not a TIFF file" "$cli" analyze notes.tif --project d.budledger
no_project d.budledger
run 1 "single.tif: stack has 1 frame; a time-lapse needs at least 2" "$cli" analyze single.tif --project d.budledger
no_project d.budledger
# All or nothing: a good stack followed by a bad one leaves no project.
run 1 "notes.tif" "$cli" analyze pos01.ome.tif notes.tif --project d.budledger
no_project d.budledger
run 1 "two inputs are both position 'pos01'" "$cli" analyze pos01.ome.tif pos01.ome.tif --project d.budledger
no_project d.budledger
run 2 "--project is required" "$cli" analyze pos01.ome.tif

# A folder of single-frame TIFFs named by a pattern.
mkdir frames
for t in 0 1 2 3 4 5; do
  "$make_stack" "frames/wellA_t$t.tif" 1 >/dev/null
done
run 0 "^wellA: 6 frames" "$cli" analyze frames --pattern '{position}_t{time}.tif' --project e.budledger
mkdir empty
run 1 "empty: folder holds no TIFF files" "$cli" analyze empty --project f.budledger
no_project f.budledger

# Simulated positions, with the simulator's own metadata.
"$cli" simulate --scenario "$scenario" --frames 12 --out sim >/dev/null 2>&1 || fail "simulate"
run 0 "wrote 2 positions" "$cli" analyze sim/*.ome.tif --project sim.budledger
run 0 "interval|position 1" "$cli" summary sim.budledger

# A project grown by one analyze per position keeps every position's events:
# the second run replaces the proposals of its own position only.
"$cli" simulate --scenario "$scenario" --frames 40 --out sim40 >/dev/null 2>&1 || fail "simulate 40"
stacks=(sim40/*.ome.tif)
first=$(basename "${stacks[0]}" .ome.tif)
count_rows() { grep -c "^$1," "$2"; }
run 0 "wrote 1 position" "$cli" analyze "${stacks[0]}" --project grown.budledger --group a
run 0 "wrote events.csv" "$cli" export grown.budledger --events events.csv
before=$(count_rows "$first" events.csv)
((before > 0)) || fail "no events proposed for $first in 40 frames"
run 0 "wrote 1 position" "$cli" analyze "${stacks[1]}" --project grown.budledger --group b
run 0 "wrote events.csv" "$cli" export grown.budledger --events events.csv
after=$(count_rows "$first" events.csv)
[[ $after == "$before" ]] || fail "$first had $before events, $after after analysing another position"

if ((failures)); then
  echo "$failures check(s) failed"
  exit 1
fi
echo "all analyze checks passed"
