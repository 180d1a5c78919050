#!/usr/bin/env bash
# journal_cli.sh SCENARIO CLI HELPER WORKDIR — end-to-end scenarios for the
# journal's verbs (edit, log, verify, signoff, undo, redo, merge, export).
# HELPER is tests/core/store's journal_storm: it makes projects with
# proposals (no engine needed), changes files behind the CLI's back and
# plays a second writer. Each check prints what it expected on failure.
set -u
scenario=$1 cli=$2 helper=$3 work=$4
rm -rf "$work" && mkdir -p "$work" && cd "$work" || exit 1
export USER=tech01

fail() { echo "FAIL [$scenario]: $*"; exit 1; }
# expect CODE REGEX CMD… — run CMD, check exit code and combined output.
expect() {
  local code=$1 pattern=$2
  shift 2
  local out rc
  out=$("$@" 2>&1)
  rc=$?
  [[ $rc -eq $code ]] || fail "expected exit $code, got $rc from: $* — $out"
  grep -Eq -- "$pattern" <<<"$out" || fail "output of '$*' does not match /$pattern/: $out"
  last=$out
}
entries() { "$cli" log "$1" --format csv | tail -n +2 | wc -l; }

"$helper" fixture p.budledger 2 3 100 1 west control >/dev/null || fail "fixture"

case $scenario in
  edit)
    expect 0 "^entry 2: accept bud of 'west1' trap 0" "$cli" edit p.budledger accept --event 1 --reason "clear bud"
    expect 0 "nothing changed" "$cli" edit p.budledger accept --event 1
    expect 0 "^entry 3: move .* frame [0-9]+ → 40 \(moved\)" "$cli" edit p.budledger move --event 2 --frame 40 --as tech02
    expect 0 "^entry 4: delete .*→ rejected" "$cli" edit p.budledger delete --event 3 --reason debris
    expect 0 "^entry 5: added death of 'west2' trap 1 at frame 90 \(event -5\)" "$cli" edit p.budledger add --position west2 --trap 1 --frame 90 --kind death
    expect 0 "^entry 6: set outcome of mother 0 in 'west2' trap 1: death → washout" "$cli" edit p.budledger outcome --position west2 --trap 1 --mother 0 --outcome washout --reason "flushed out"
    expect 0 "^entry 7: noted on trap" "$cli" edit p.budledger note --position west1 --trap 2 --text "dust on the lens"
    expect 1 "there is no event 9999" "$cli" edit p.budledger accept --event 9999
    expect 1 "frame 100 is outside position 'west1'" "$cli" edit p.budledger move --event 1 --frame 100
    expect 1 "no position named 'nowhere'" "$cli" edit p.budledger add --position nowhere --trap 1 --frame 9 --kind bud
    expect 2 "--kind" "$cli" edit p.budledger add --position west1 --trap 1 --frame 9
    expect 2 "give one edit" "$cli" edit p.budledger
    expect 0 "^entry 8: undid entry 6" "$cli" undo p.budledger
    expect 0 "^entry 9: undid entry 5" "$cli" undo p.budledger
    expect 0 "^entry 10: redid entry 5" "$cli" redo p.budledger
    expect 0 "^entry 11: redid entry 6" "$cli" redo p.budledger
    expect 1 "nothing to redo" "$cli" redo p.budledger
    [[ $(entries p.budledger) -eq 11 ]] || fail "expected 11 entries"
    expect 0 "tech02 \(technician\)  move .*→ frame 40 moved" "$cli" log p.budledger
    expect 0 "outcome death → washout  — flushed out" "$cli" log p.budledger
    expect 0 '^seq,utc,actor,role,action,target,value_before,value_after,reason,origin,prev_hash,hash$' "$cli" log p.budledger --format csv
    expect 0 '"action": "sign-off"|"action": "undo"' "$cli" log p.budledger --format json
    expect 0 '^ok: 11 journal entries' "$cli" verify p.budledger
    ;;
  batch)
    printf 'action,event,frame,position,trap,kind,reason\naccept,1,,,,,looks right\nmove,2,30,,,,\nadd,,99,west1,2,washout,missed\n' >good.csv
    expect 0 "^applied 3 edits from good.csv" "$cli" edit p.budledger --batch good.csv
    printf 'action,event,frame\naccept,4,\nmove,5,abc\naccept,6,\n' >bad.csv
    expect 1 "^budledger-cli: bad.csv: row 3, column 'frame': 'abc' is not a whole number \(1 edit before it applied\)" "$cli" edit p.budledger --batch bad.csv
    [[ $(entries p.budledger) -eq 5 ]] || fail "the rows before the bad one should be applied, not the ones after"
    printf 'action,event,colour\n' >cols.csv
    expect 1 "cols.csv: row 1, column 3: unknown column 'colour'" "$cli" edit p.budledger --batch cols.csv
    printf 'action,event\nacept,4\n' >verb.csv
    expect 1 "verb.csv: row 2, column 'action': 'acept' is not" "$cli" edit p.budledger --batch verb.csv
    expect 0 '^ok: 5 journal entries' "$cli" verify p.budledger
    ;;
  signoff)
    expect 0 "^entry 2: approved trap:west1/0 as pi \(sign-off 2\)" "$cli" signoff p.budledger --scope trap:west1/0 --meaning approved --as pi01 --role pi --reason "counts checked"
    expect 0 "nothing changed" "$cli" signoff p.budledger --scope trap:west1/0 --meaning approved --as pi01 --role pi
    expect 1 "inside sign-off 2 \(trap:west1/0, signed by pi01\); revoke it first" "$cli" edit p.budledger delete --event 1
    expect 1 "needs a reason" "$cli" signoff p.budledger --revoke 2 --as pi01 --role pi
    expect 1 "role" "$cli" signoff p.budledger --scope position:west2 --meaning reviewed
    expect 1 "scope 'room:1' is not one of" "$cli" signoff p.budledger --scope room:1 --meaning reviewed --role pi
    expect 0 "approved trap:west1/0 by pi01 \(pi\)" "$cli" signoff p.budledger --list
    expect 0 "^ok: .* 1 active sign-off holds" "$cli" verify p.budledger
    expect 0 "^entry 3: revoked sign-off 2" "$cli" signoff p.budledger --revoke 2 --as pi01 --role pi --reason "recount"
    expect 0 "^entry 4: delete" "$cli" edit p.budledger delete --event 1
    expect 0 "revoked by entry 3" "$cli" signoff p.budledger --list
    expect 0 '^ok: 4 journal entries' "$cli" verify p.budledger
    ;;
  verify)
    "$cli" edit p.budledger accept --event 1 >/dev/null
    "$cli" edit p.budledger move --event 2 --frame 33 >/dev/null
    "$cli" edit p.budledger delete --event 3 >/dev/null
    cp p.budledger clean.budledger
    expect 0 '^head 4:[0-9a-f]{64}$' "$cli" verify p.budledger
    for t in value deleted reordered state; do cp clean.budledger $t.budledger; done
    g="DROP TRIGGER journal_no_update; DROP TRIGGER journal_no_delete;"
    "$helper" sql value.budledger "$g UPDATE journal SET reason = 'edited' WHERE seq = 3"
    expect 1 "^FAILED: journal entry 3: its content does not match its hash" "$cli" verify value.budledger
    "$helper" sql deleted.budledger "$g DELETE FROM journal WHERE seq = 2"
    expect 1 "^FAILED: journal entry 2 is missing" "$cli" verify deleted.budledger
    "$helper" sql reordered.budledger "$g UPDATE journal SET seq = -1 WHERE seq = 2; UPDATE journal SET seq = 2 WHERE seq = 3; UPDATE journal SET seq = 3 WHERE seq = -1"
    expect 1 "^FAILED: journal entry 2:" "$cli" verify reordered.budledger
    "$helper" sql state.budledger "UPDATE current_events SET frame = 34 WHERE event_id = 2"
    expect 1 "^FAILED: current event 2: stored as" "$cli" verify state.budledger
    expect 1 "does not exist" "$cli" verify missing.budledger
    ;;
  merge)
    "$helper" fixture q.budledger 1 3 100 2 east treated >/dev/null || fail "fixture q"
    "$cli" edit p.budledger accept --event 1 >/dev/null
    "$cli" edit q.budledger delete --event 2 >/dev/null
    expect 0 "^merged 2 projects into all.budledger: 3 positions, 5 journal entries" "$cli" merge p.budledger q.budledger --out all.budledger
    expect 0 "^ok: 5 journal entries" "$cli" verify all.budledger
    expect 0 "\[from q.budledger#2\]" "$cli" log all.budledger
    expect 1 "already exists" "$cli" merge p.budledger q.budledger --out all.budledger
    "$helper" fixture r.budledger 1 2 100 3 west control >/dev/null || fail "fixture r"
    expect 1 "position 'west1' is in both p.budledger and r.budledger" "$cli" merge p.budledger r.budledger --out bad.budledger
    [[ ! -e bad.budledger ]] || fail "a refused merge left a file"
    "$helper" fixture s.budledger 1 2 100 4 south control >/dev/null || fail "fixture s"
    "$helper" sql s.budledger "UPDATE meta SET value = '5' WHERE key = 'interval_min'"
    expect 1 "p.budledger has interval_min 10 but s.budledger has 5" "$cli" merge p.budledger s.budledger --out bad.budledger
    expect 2 "projects" "$cli" merge p.budledger --out bad.budledger
    ;;
  export)
    "$cli" edit p.budledger delete --event 2 >/dev/null
    expect 0 "^wrote events.csv" "$cli" export p.budledger --events events.csv --lifespans lifespans.csv
    [[ $(head -1 events.csv) == "position,group,trap_id,mother_id,frame,time_min,kind,confidence,status" ]] || fail "events header: $(head -1 events.csv)"
    [[ $(head -1 lifespans.csv) == "position,group,trap_id,mother_id,first_frame,last_frame,divisions,outcome,censor_reason" ]] || fail "lifespans header"
    grep -Eq '^west1,control,0,,[0-9]+,[0-9]+,separation,[0-9.]+,rejected$' events.csv || fail "rejected row: $(sed -n 2,4p events.csv)"
    grep -Eq '^west1,control,0,0,[0-9]+,[0-9]+,bud,[0-9.]+,proposed$' events.csv || fail "proposed row"
    grep -Eq '^west[12],control,[0-9]+,0,0,[0-9]+,[0-9]+,(death,|censored,(washout|end-of-imaging))$' lifespans.csv || fail "lifespans rows"
    ls | grep -q tmp && fail "temporary files left"
    expect 2 "at least one output" "$cli" export p.budledger
    ;;
  second-writer)
    "$helper" storm p.budledger 5 >storm.out 2>&1 &
    storm=$!
    for _ in $(seq 50); do grep -q '^ack' storm.out && break; sleep 0.1; done
    grep -q '^ack' storm.out || { kill $storm; fail "the storm did not start"; }
    expect 1 "read-only: another program is writing this project \(pid $storm on host" "$cli" edit p.budledger accept --event 1
    expect 0 "engine-run" "$cli" log p.budledger
    kill -KILL $storm; wait $storm 2>/dev/null
    expect 0 "^entry [0-9]+: " "$cli" edit p.budledger note --text "after the crash"
    expect 0 '^ok: ' "$cli" verify p.budledger
    ;;
  *) fail "unknown scenario" ;;
esac
echo "ok [$scenario]"
