#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# CLI tests of keel rebalance: exit codes, the text, json and yaml reports
# and the round trip of the yaml plan through keel rebalance and keel
# check, as a TAP stream for meson.  Usage: run_rebalance_tests.sh KEEL
# CLI_DATA_DIR
set -u
keel=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
data=$(cd "$2" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
n=0
failed=0
caution="Decision support only: the charge nurse's judgement, facility policy and the staffing law that applies locally govern every assignment."

ok() { n=$((n + 1)); echo "ok $n - $1"; }
not_ok() { n=$((n + 1)); failed=$((failed + 1)); echo "not ok $n - $1"; sed 's/^/# /' "$work/out" "$work/err" 2>/dev/null | head -40; }
expect() { # expect CODE NAME -- COMMAND...
    code=$1 name=$2
    shift 3
    "$@" >"$work/out" 2>"$work/err"
    got=$?
    if [ "$got" -eq "$code" ]; then ok "$name (exit $code)"; else echo "# exit $got, wanted $code"; not_ok "$name"; fi
}
has() { # has FILE TEXT NAME
    if grep -qF -- "$2" "$1"; then ok "$3"; else echo "# missing: $2"; not_ok "$3"; fi
}
hasnt() { # hasnt FILE TEXT NAME
    if grep -qF -- "$2" "$1"; then echo "# present: $2"; not_ok "$3"; else ok "$3"; fi
}
last_line_is_caution() { # FILE NAME
    if [ "$(tail -n 1 "$1")" = "$caution" ]; then ok "$2"; else not_ok "$2"; fi
}
json() { # json FILE EXPRESSION NAME: the python expression on the parsed report j is true
    if /usr/bin/python3 -c "import json,sys; j=json.load(open(sys.argv[1])); sys.exit(0 if ($2) else 1)" "$1"; then
        ok "$3"; else echo "# false: $2"; not_ok "$3"; fi
}

roster=$data/rebalance-midshift.yaml
expect 0 "help for rebalance" -- "$keel" help rebalance
has "$work/out" "--max-handoffs" "rebalance help names its options"
last_line_is_caution "$work/out" "rebalance help ends with the caution"
expect 1 "a budget that is not a number" -- "$keel" rebalance "$roster" --max-handoffs many
has "$work/err" "--max-handoffs: 'many' is not a whole number from 0 to 20" "the bad budget is named"
expect 1 "a gain above 1" -- "$keel" rebalance "$roster" --min-gain 2
expect 1 "a negative option" -- "$keel" rebalance "$roster" --handoffs -1
expect 1 "rebalance over its own roster" -- "$keel" rebalance "$roster" -o "$roster"

expect 0 "rebalance a mid-shift roster" -- "$keel" rebalance "$roster"
has "$work/out" "Hand-off frontier" "the frontier is shown"
has "$work/out" "  1  optimal        58.3 %     50.0 %    8.3 pts         58.3 %    0.0 %          1   recommended" "option 1 is proven and recommended"
has "$work/out" "P3 (bed 103A): N1 → N2" "the hand-off is named with its bed"
has "$work/out" "P7 (bed 107A): N4 → N2" "the forced move is listed"
has "$work/out" "P9 (bed 109A): → N3" "the new patient is placed"
last_line_is_caution "$work/out" "the text ends with the caution"

expect 0 "json" -- "$keel" rebalance "$roster" --format json
cp "$work/out" "$work/r.json"
json "$work/r.json" "j['status'] == 'optimal' and j['recommended_handoffs'] == 1 and j['at'] is None" "json: status, recommendation, at"
json "$work/r.json" "[o['handoffs'] for o in j['options']] == [0, 1, 2, 3]" "json: one option per budget"
json "$work/r.json" "all(len(o['moves']) <= o['handoffs'] for o in j['options'])" "json: no option moves more than its budget"
json "$work/r.json" "all(a['max_utilisation'] >= b['max_utilisation'] for a, b in zip(j['options'], j['options'][1:]))" "json: the frontier never worsens"
json "$work/r.json" "j['forced_moves'] == [{'patient': 'P7', 'bed': '107A', 'from': 'N4', 'to': 'N2'}]" "json: the forced move"
json "$work/r.json" "all(set(o) >= {'status', 'max_utilisation', 'min_utilisation', 'spread', 'bound', 'gap', 'moves', 'nurses'} for o in j['options'])" "json: every option's fields"
json "$work/r.json" "all(any(p == 'P1' for nu in o['nurses'] if nu['id'] == 'N1' for p in nu['patients']) for o in j['options'])" "json: the locked patient never moves"
json "$work/r.json" "j['caution'].startswith('Decision support only')" "json: the caution"

expect 0 "yaml of the recommended option" -- "$keel" rebalance "$roster" --format yaml -o "$work/next.yaml"
expect 0 "check the updated roster" -- "$keel" check "$work/next.yaml"
has "$work/out" "The plan keeps every rule keel checks." "the updated roster keeps every rule"
expect 0 "rebalance the updated roster" -- "$keel" rebalance "$work/next.yaml" --format json
cp "$work/out" "$work/again.json"
json "$work/again.json" "j['recommended_handoffs'] == 0 and j['forced_moves'] == [] and j['new'] == 0" "the updated roster needs no hand-off"
expect 0 "yaml of option 0" -- "$keel" rebalance "$roster" --handoffs 0 --format yaml -o "$work/zero.yaml"
has "$work/zero.yaml" "$caution" "the yaml carries the caution"
expect 0 "the text details the chosen option" -- "$keel" rebalance "$roster" --handoffs 0
has "$work/out" "Option 0 (chosen with --handoffs):" "the chosen option is named"
has "$work/out" "No hand-offs: every patient with a nurse keeps her." "option 0 hands nothing off"

# A second nurse may not take P5 (chemo): with N3 gone too, P5's only
# nurse is N2 and nobody may take more than one patient: no plan.
sed -e 's/max_patients: 4/max_patients: 1/' "$roster" >"$work/short.yaml"
expect 3 "no option has a plan" -- "$keel" rebalance "$work/short.yaml" -o "$work/short-out.yaml"
has "$work/err" "no valid assignment exists, whatever the hand-offs" "stderr says that no budget would do"
has "$work/err" "[patient_limit] 9 patients, but the 3 nurses on shift who may take patients may take 3 in all" "stderr gives the diagnosis"
last_line_is_caution "$work/err" "stderr ends with the caution"
if [ -e "$work/short-out.yaml" ]; then not_ok "no file is written without a plan"; else ok "no file is written without a plan"; fi

# A new chemo patient only N1 may take, and N1 full: one hand-off is needed.
cat >"$work/one-needed.yaml" <<'EOF'
version: 1
shift: {minutes: 480}
policy: {acuity_minutes: {1: 60}, max_patients: 2}
nurses:
  - {id: N1, skills: [chemo]}
  - {id: N2}
  - {id: N3}
patients:
  - {id: P1, acuity: 1, nurse: N1}
  - {id: P2, acuity: 1, nurse: N1}
  - {id: P3, acuity: 1, nurse: N2}
  - {id: P4, acuity: 1, nurse: N2}
  - {id: P5, acuity: 1, nurse: N3}
  - {id: P6, acuity: 1, needs: [chemo]}
EOF
expect 3 "no plan within a budget of 0" -- "$keel" rebalance "$work/one-needed.yaml" --max-handoffs 0
has "$work/err" "no plan keeps every rule with at most 0 hand-offs; one with more exists (try a larger --max-handoffs)" "stderr says that more hand-offs would do"
has "$work/out" "No option has a plan that keeps every rule with at most 0 hand-offs (standard error says why)." "the report says so too"
expect 0 "one hand-off makes room" -- "$keel" rebalance "$work/one-needed.yaml" --max-handoffs 1
has "$work/out" "Recommended: 1 hand-off" "the one hand-off is recommended"

# --at: the rest of the shift (the worked example of docs/model.md).
at=$data/rebalance-at.yaml
expect 1 "--at that is not a time" -- "$keel" rebalance "$at" --at 25:00
has "$work/err" "--at: '25:00' is not a time of day HH:MM" "the bad time is named"
expect 1 "--at outside the shift" -- "$keel" rebalance "$at" --at 06:00
has "$work/err" "--at 06:00 is not inside the shift, which runs from 07:00 to 19:00" "the shift's times are given"
expect 1 "--at without a shift start" -- "$keel" rebalance "$roster" --at 09:00
has "$work/err" "--at needs the shift's start" "the missing start is named"
expect 0 "rebalance at 09:30" -- "$keel" rebalance "$at" --at 09:30
has "$work/out" "At 09:30: the rest of the shift, 570 min; care and capacity from then on; discharged before then: 1" "the rest of the shift is named"
has "$work/out" "P2 (bed 2A): N2 → N3" "the patient of the nurse who left is a forced move"
has "$work/out" "P4 (bed 4A): → N1" "the admission is placed"
has "$work/out" "N4        2 patients  load  120 of  420 min   28.6 %  P1 (later), P2 (later)" "the patients a nurse takes over later are marked"
last_line_is_caution "$work/out" "the text at 09:30 ends with the caution"
expect 0 "json at 09:30" -- "$keel" rebalance "$at" --at 09:30 --format json
cp "$work/out" "$work/at.json"
json "$work/at.json" "j['at'] == '09:30' and j['discharged'] == 1 and j['recommended_handoffs'] == 2" "json: at, discharged, recommendation"
expect 0 "yaml at 09:30" -- "$keel" rebalance "$at" --at 09:30 --format yaml -o "$work/rest.yaml"
has "$work/rest.yaml" 'start: "07:00"' "the yaml is the whole shift, from 07:00"
has "$work/rest.yaml" '      - {nurse: "N2", from: "07:00", to: "09:30"}' "P2's record: N2 until she left"
has "$work/rest.yaml" '    leaves_at: "09:00"' "the patient discharged before 09:30 stays on the roster"
has "$work/rest.yaml" '      - {nurse: "N1", from: "07:00", to: "09:00"}' "with her record"
hasnt "$work/rest.yaml" "care_minutes" "the care is the whole shift's, not the rest's"
expect 0 "check the whole shift" -- "$keel" check "$work/rest.yaml"
has "$work/out" "The plan keeps every rule keel checks." "the whole shift keeps every rule"
expect 0 "rebalance the written roster again at 12:00" -- "$keel" rebalance "$work/rest.yaml" --at 12:00 --format json
cp "$work/out" "$work/again-at.json"
json "$work/again-at.json" "j['at'] == '12:00' and j['forced_moves'] == [] and j['new'] == 0 and j['discharged'] == 1" "the next rebalance starts from the written roster"
expect 1 "a rebalance before the end of the record" -- "$keel" rebalance "$work/rest.yaml" --at 09:00
has "$work/err" "--at 09:00 is before 09:30, where the record of P1 ends (the time of the last rebalance); expected a time from then on" "the time of the last rebalance is named"
expect 2 "assign refuses a roster with a record" -- "$keel" assign "$work/rest.yaml"
has "$work/err" "rest.yaml:29:9: patients[0].record: keel assign plans the whole shift and would re-plan what the record says happened; expected keel rebalance --at HH:MM for the rest of the shift, or a roster without record" "assign says why, at the record"
expect 0 "without --at the record is carried through" -- "$keel" rebalance "$work/rest.yaml" --format yaml -o "$work/plain.yaml"
if diff "$work/rest.yaml" "$work/plain.yaml" | grep -q '^[<>] *- {nurse'; then not_ok "the record is unchanged"; else ok "the record is unchanged"; fi

# The whole shift from an assignment: assign, rebalance at 09:30 and at
# 13:00 on its output, then check and audit the whole shift.
sed -e 's/, nurse: N[0-9]//' "$at" >"$work/fresh.yaml"
expect 0 "assign the fresh shift" -- "$keel" assign "$work/fresh.yaml" --format yaml -o "$work/posted.yaml"
expect 0 "rebalance the posted plan at 09:30" -- "$keel" rebalance "$work/posted.yaml" --at 09:30 --format yaml -o "$work/s0930.yaml"
expect 0 "rebalance its output at 13:00" -- "$keel" rebalance "$work/s0930.yaml" --at 13:00 --format yaml -o "$work/s1300.yaml"
expect 0 "check the whole shift after two rebalances" -- "$keel" check "$work/s1300.yaml"
has "$work/out" "The plan keeps every rule keel checks." "the whole shift keeps every rule"
expect 0 "audit the whole shift" -- "$keel" audit "$work/s1300.yaml"
/usr/bin/python3 "$data/../reference/check_record.py" "$work/posted.yaml" 09:30 "$work/s0930.yaml" >"$work/out" 2>"$work/err" && ok "the record at 09:30 is the posted plan" || not_ok "the record at 09:30 is the posted plan"
/usr/bin/python3 "$data/../reference/check_record.py" "$work/s0930.yaml" 13:00 "$work/s1300.yaml" >"$work/out" 2>"$work/err" && ok "the record at 13:00 extends the one at 09:30" || not_ok "the record at 13:00 extends the one at 09:30"

# A limit broken only in the recorded morning: as posted, N2 held three
# patients under a limit of two until she left at 09:30; an admission
# comes in then.
morning=$data/rebalance-record.yaml
expect 0 "rebalance the morning at 09:30" -- "$keel" rebalance "$morning" --at 09:30 --format yaml -o "$work/m0930.yaml"
has "$work/m0930.yaml" '    arrives_at: "09:30"' "the admission arrives at the time of the rebalance"
expect 0 "rebalance it at 13:00" -- "$keel" rebalance "$work/m0930.yaml" --at 13:00 --format yaml -o "$work/m1300.yaml"
has "$work/m1300.yaml" '      - {nurse: "N2", from: "07:00", to: "09:30"}' "N2's morning is on the record"
expect 0 "check sees the morning" -- "$keel" check "$work/m1300.yaml"
has "$work/out" "[moment_limit] from 07:00 to 09:30, N2 has 3 patients; the patient limit is 2" "check reports the limit broken in the morning"
has "$work/out" "  09:30  P1: N2 → N5" "check lists the hand-offs on the record"
expect 5 "audit sees the morning" -- "$keel" audit "$work/m1300.yaml"
has "$work/out" "from 07:00 to 09:30, N2 has 3 patients; the patient limit is 2" "the audit lists it"

# The incoming patient preview.
incoming=$data/rebalance-incoming.yaml
expect 0 "rebalance with an expected admission" -- "$keel" rebalance "$incoming"
has "$work/out" "A1 (bed 6A): N2 41.7 %; N1 ruled out [moment_limit]; N3 ruled out [skill]" "the preview ranks the nurses and names the rules"
last_line_is_caution "$work/out" "the preview's report ends with the caution"
expect 0 "json with an expected admission" -- "$keel" rebalance "$incoming" --format json
cp "$work/out" "$work/incoming.json"
json "$work/incoming.json" "[a['patient'] for a in j['incoming']] == ['A1'] and j['incoming'][0]['nurses'][1:] == [{'id': 'N1', 'allowed': False, 'rule': 'moment_limit'}, {'id': 'N3', 'allowed': False, 'rule': 'skill'}]" "json: the nurses ruled out, and why"
json "$work/incoming.json" "(lambda n: n['id'] == 'N2' and n['allowed'] and abs(n['utilisation'] - 300 / 720) < 1e-9 and not n['overload'])(j['incoming'][0]['nurses'][0])" "json: N2 could take A1, reaching (240 + 60) / 720"
json "$work/r.json" "j['incoming'] == []" "json: no expected admission, no preview"

echo "1..$n"
[ "$failed" -eq 0 ]
