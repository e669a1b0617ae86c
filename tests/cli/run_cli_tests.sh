#!/bin/sh
# SPDX-License-Identifier: GPL-3.0-or-later
#
# CLI tests: exit codes, stdout and stderr of the keel command, as a TAP
# stream for meson.  Usage: run_cli_tests.sh KEEL CLI_DATA_DIR EXAMPLES_DIR
set -u
keel=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
data=$(cd "$2" && pwd)
examples=$(cd "$3" && pwd)
bad=$(cd "$data/../data/bad" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
n=0
failed=0
caution="Decision support only: the charge nurse's judgement, facility policy and the staffing law that applies locally govern every assignment."

ok() { n=$((n + 1)); echo "ok $n - $1"; }
not_ok() { n=$((n + 1)); failed=$((failed + 1)); echo "not ok $n - $1"; sed 's/^/# /' "$work/out" "$work/err" 2>/dev/null | head -40; }

# expect CODE NAME -- COMMAND...: runs the command, stdout to $work/out,
# stderr to $work/err, and checks the exit code.
expect() {
    code=$1 name=$2
    shift 3
    "$@" >"$work/out" 2>"$work/err"
    got=$?
    if [ "$got" -eq "$code" ]; then ok "$name (exit $code)"; else echo "# exit $got, wanted $code"; not_ok "$name"; fi
}
has() { # has FILE TEXT NAME
    if grep -qF -- "$2" "$1"; then ok "$3"; else echo "# missing: $2"; not_ok "$3"; fi
}
matches() { # matches FILE REGEX NAME (extended regular expression)
    if grep -qE -- "$2" "$1"; then ok "$3"; else echo "# missing: $2"; not_ok "$3"; fi
}
has_joined() { # has_joined FILE TEXT NAME: TEXT in FILE with its wrapped lines joined
    if tr '\n' ' ' <"$1" | sed 's/  */ /g' | grep -qF -- "$2"; then ok "$3"; else echo "# missing: $2"; not_ok "$3"; fi
}
count_is() { # count_is FILE TEXT N NAME: TEXT occurs N times in FILE, lines joined
    got=$(tr '\n' ' ' <"$1" | sed 's/  */ /g' | grep -oF -- "$2" | wc -l)
    if [ "$got" -eq "$3" ]; then ok "$4"; else echo "# $got times: $2"; not_ok "$4"; fi
}
last_line_is_caution() { # FILE NAME
    if [ "$(tail -n 1 "$1")" = "$caution" ]; then ok "$2"; else not_ok "$2"; fi
}

expect 0 "version" -- "$keel" --version
has "$work/out" "keel 0." "version names the release"
expect 0 "help" -- "$keel" --help
has "$work/out" "Exit codes" "help lists the exit codes"
last_line_is_caution "$work/out" "help ends with the caution"
expect 0 "help for assign" -- "$keel" help assign
has "$work/out" "--time-limit" "assign help names its options"
expect 1 "no command" -- "$keel"
expect 1 "unknown command" -- "$keel" rota
expect 1 "assign without a roster" -- "$keel" assign
expect 1 "unknown format" -- "$keel" assign "$examples/icu-night.yaml" --format pdf
expect 1 "bad time limit" -- "$keel" assign "$examples/icu-night.yaml" --time-limit soon
expect 1 "unknown option" -- "$keel" assign "$examples/icu-night.yaml" --fast
expect 2 "missing roster file" -- "$keel" assign "$work/nope.yaml"
has "$work/err" "nope.yaml: cannot open" "a missing file is named"

# Bad rosters: the CLI prints exactly the problems the loader reports.
cd "$bad" || exit 1
for f in many-problems unknown-keys wrong-types; do
    expect 2 "bad roster $f" -- "$keel" assign "$f.yaml"
    if cmp -s "$work/err" "$f.expected"; then ok "$f: every problem with file:line:column"; else
        diff "$f.expected" "$work/err" | sed 's/^/# /'; not_ok "$f: every problem with file:line:column"; fi
done
cd "$work" || exit 1

# A roster with no valid assignment: exit 3 and a reason in plain words.
expect 3 "infeasible roster" -- "$keel" assign "$data/infeasible-chemo.yaml"
has "$work/err" "2 patients (X-1 and X-3) need chemo; no nurse on shift" "the reason names patients and skill"
expect 3 "infeasible roster as json" -- "$keel" assign "$data/infeasible-chemo.yaml" --format json
has "$work/out" '"rule": "skill", "patients": ["X-1", "X-3"]' "json carries the diagnosis"
has "$work/out" '"status": "infeasible"' "json says infeasible"

# Locks and avoid lists that leave a patient without a nurse.
expect 3 "a lock that cannot hold" -- "$keel" assign "$data/lock-cannot-hold.yaml"
has "$work/err" "[lock] L-1 is locked to A2, who does not have tele" "the lock is named"
has "$work/err" "[avoid] every nurse on shift who may take patients is on L-2's avoid list (A1 and A2)" "the avoid list is named"

# The main job on both examples.
for ex in medsurg-day icu-night; do
    expect 0 "assign $ex" -- "$keel" assign "$examples/$ex.yaml"
    has "$work/out" "Balance over the" "$ex: the balance is shown"
    has "$work/out" "Staffing" "$ex: the staffing line is shown"
    last_line_is_caution "$work/out" "$ex: the report ends with the caution"
    expect 0 "assign $ex as json" -- "$keel" assign "$examples/$ex.yaml" --format json
    has "$work/out" '"imbalance": {"max_utilisation": ' "$ex: json has the imbalance"
    has "$work/out" '"caution": ' "$ex: json has the caution"
done

# -o writes atomically, never over the input, and the yaml reads back.
cp "$examples/icu-night.yaml" "$work/roster.yaml"
expect 1 "refuses to write over the roster" -- "$keel" assign "$work/roster.yaml" -o "$work/roster.yaml"
if cmp -s "$examples/icu-night.yaml" "$work/roster.yaml"; then ok "the roster is untouched"; else not_ok "the roster is untouched"; fi
expect 0 "assign to a yaml file" -- "$keel" assign "$work/roster.yaml" --format yaml -o "$work/plan.yaml"
if [ -s "$work/plan.yaml" ] && [ ! -s "$work/out" ]; then ok "the plan went to the file, not stdout"; else not_ok "the plan went to the file"; fi
if ls "$work"/plan.yaml.tmp-* >/dev/null 2>&1; then not_ok "no temporary file is left"; else ok "no temporary file is left"; fi
expect 0 "check the written plan" -- "$keel" check "$work/plan.yaml"
has "$work/out" "The plan keeps every rule keel checks." "the written plan keeps every rule"
has "$work/out" "Best possible heaviest utilisation" "check shows the best possible"

# keel check scores a hand-made plan and names every rule it breaks.
expect 0 "check a plan that breaks rules" -- "$keel" check "$data/plan-breaks-rules.yaml"
has "$work/out" "[skill] Y-4 needs tele; B2 does not have it" "check names the missing competency"
has "$work/out" "[patient_limit] B1 has 3 patients; the patient limit is 2" "check names the nurse over the limit"
expect 0 "check as json" -- "$keel" check "$data/plan-breaks-rules.yaml" --format json
has "$work/out" '"violations": [' "json lists the violations"
expect 0 "check without a plan" -- "$keel" check "$examples/medsurg-day.yaml"
has "$work/out" "Care minutes per patient" "check shows care minutes"
has "$work/out" "nurses take patients" "check shows the nurses needed against those on shift"

# The rules that join patients: a diagnosis names the rule; a plan check
# names every rule a plan breaks; a ward minimum is a staffing check.
expect 3 "too many high-acuity patients" -- "$keel" assign "$data/high-acuity-short.yaml" --format json
has "$work/out" '"rule": "high_acuity"' "the diagnosis names high_acuity"
has "$work/out" "1 more nurse who may take them is needed" "the diagnosis says what is short"
expect 0 "check a plan that breaks the joining rules" -- "$keel" check "$data/plan-breaks-joined-rules.yaml"
has "$work/out" "[law_limit] A has 6 patients: exceeds the limit of 1:5 for med-surg in california (table cited above)" "check names the table's limit, the table cited above"
has "$work/out" "[patient_ratio] p4 is a 1:2 patient" "check names a patient's own ratio"
has "$work/out" "[high_acuity] A has 2 high-acuity patients" "check names high acuity"
has "$work/out" "[isolation] A has 1 protective-isolation patient" "check names isolation"
has "$work/out" "[zones] A has patients in 2 zones" "check names zones"
has "$work/out" "which need n95 (policy.isolation_needs)" "check names a precaution's competency"
# Source: Queensland Hospital and Health Boards Regulation 2012, Part 6A: the
# state's worked example, 28 patients need 7 nurses on morning and afternoon
# shifts; 11:00-19:00 is an afternoon shift (s 30A).
expect 0 "a ward short of its minimum still gets an assignment" -- "$keel" assign "$data/ward-minimum.yaml" --format json
has "$work/out" '"ward_minimum": 7, "needed": 7, "binding": "ward minimum", "slack": -1' "the staffing view names the ward minimum and the shortfall"
has "$work/out" '"shift_class": "afternoon"' "11:00-19:00 is an afternoon shift"

# Every report cites the table it uses: name, text, version, date of encoding.
# Source: California Code of Regulations, Title 22, section 70217(a); CDPH AFL
# 08-07, 2008: medical-surgical 1:5 from 2005-01-01 (sources.md, read).
california="california (California Code of Regulations, Title 22, section 70217(a); medical-surgical 1:5 in force from 2005-01-01 (CDPH AFL 08-07, 2008); as encoded by keel on 2026-12-02)"
# Source: Hospital and Health Boards Regulation 2012 (Qld), Part 6A, from
# 2016-07-01 (sources.md, read); the 2012 regulation was later replaced (from
# memory), by a text keel has not read.
queensland="queensland (Hospital and Health Boards Regulation 2012 (Qld), Part 6A; Part 6A as in force from 2016-07-01; as encoded by keel on 2026-12-02)"
superseded="This table encodes superseded text: the Hospital and Health Boards Regulation 2012 (Qld) was replaced by a later text, and keel has not checked the table against that successor."
# Source: same, s 30A: afternoon 15:00-23:00, night 23:00-07:00, so 19:00-07:00
# is 4 h afternoon and 8 h night (worked from the definition).
spans="(the shift spans 240 min of afternoon and 480 min of night; keel applies the class that holds most of the shift's minutes, a tie settled as section 30A(2) of the text says)"
for cmd in check assign; do
    expect 0 "$cmd under queensland, 19:00-07:00, as text" -- "$keel" $cmd "$data/queensland-night.yaml"
    has_joined "$work/out" "Ratio table $queensland" "$cmd text cites queensland at its head"
    count_is "$work/out" "as encoded by keel on" 1 "$cmd text cites the table in full once"
    has_joined "$work/out" "$superseded" "$cmd text says queensland encodes superseded text"
    has_joined "$work/out" "This shift is classed as night under queensland (table cited above) $spans." "$cmd text says how a shift across two classes is classed"
    has_joined "$work/out" "under queensland (table cited above) (night shift)" "$cmd text's staffing line refers to the citation above"
    expect 0 "$cmd under queensland as json" -- "$keel" $cmd "$data/queensland-night.yaml" --format json
    has "$work/out" '"ratio_table": {"name": "queensland", "encoded": "2026-12-02", "shift_class": "night", "citation": "Hospital and Health Boards Regulation 2012 (Qld), Part 6A", "version": "Part 6A as in force from 2016-07-01", ' "$cmd json cites queensland, old fields first"
    has "$work/out" "\"note\": \"$superseded\"" "$cmd json carries the superseded note"
    has "$work/out" "\"shift_class_note\": \"classed as night under $queensland $spans\"" "$cmd json says how the shift is classed"
done
expect 0 "a plan under queensland as yaml" -- "$keel" assign "$data/queensland-night.yaml" --format yaml -o "$work/qld.yaml"
has "$work/qld.yaml" "  # $queensland" "the yaml plan cites the table in a comment"
has "$work/qld.yaml" "  # $superseded" "the yaml plan carries the superseded note"
expect 0 "the yaml plan under queensland reads back" -- "$keel" check "$work/qld.yaml"
has "$work/out" "The plan keeps every rule keel checks." "the written plan keeps every rule"
expect 0 "a plan under california as json" -- "$keel" check "$data/plan-breaks-joined-rules.yaml" --format json
has "$work/out" "\"citation\": \"California Code of Regulations, Title 22, section 70217(a)\", \"version\": \"medical-surgical 1:5 in force from 2005-01-01 (CDPH AFL 08-07, 2008)\", \"note\": null, \"shift_class_note\": null}" "json cites california, no note, no class"
has "$work/out" "exceeds the limit of 1:5 for med-surg in $california" "json findings cite the table in full"
expect 0 "every stage as json" -- "$keel" assign "$data/../data/every-rule.yaml" --format json
has "$work/out" '"name": "continuity"' "json has the continuity stage"
has "$work/out" '"proximity": {"zones": ' "json has the proximity totals"
has "$work/out" '"continuity": {"kept": ' "json has the continuity totals"
has "$work/out" '"staffing_needs": {' "json has the staffing needs"

# Source: California Code of Regulations, Title 22, section 70217(a):
# telemetry 1:4, so two nurses may hold 8 telemetry patients (as encoded).
expect 3 "a census over the table's limit" -- "$keel" assign "$data/law-limit-short.yaml"
has "$work/err" "[law_limit] 11 patients, but the 2 nurses on shift who may take patients may take 8 in all under the limit of 1:4 for telemetry in $california" "the diagnosis cites the table as encoded"

# --explain gives each patient a reason.
expect 0 "explain" -- "$keel" assign "$data/../data/every-rule.yaml" --explain
has "$work/out" "why: locked to C" "a locked patient says so"
has "$work/out" "why: kept with B from the last shift" "a kept patient says so"
expect 0 "explain as json" -- "$keel" assign "$data/../data/every-rule.yaml" --explain --format json
has "$work/out" '"why": {"reason": "locked", "text": "locked to C"}' "json carries the reason"
expect 1 "explain is for assign" -- "$keel" check "$data/../data/every-rule.yaml" --explain

# --best-effort: a labelled plan, still exit 3, with an escalation caution.
expect 3 "best effort" -- "$keel" assign "$data/high-acuity-short.yaml" --best-effort
has "$work/out" "BEST-EFFORT PLAN" "the plan is labelled"
has "$work/out" "tell the house supervisor" "the plan carries the escalation caution"
has "$work/out" "[high_acuity] A has 2 high-acuity patients" "the plan lists the rule it breaks"
last_line_is_caution "$work/out" "a best-effort report ends with the caution"
expect 3 "best effort as json" -- "$keel" assign "$data/infeasible-chemo.yaml" --best-effort --format json
has "$work/out" '"best_effort": true' "json labels the best-effort plan"
has "$work/out" '"severity": 200' "json gives its severity (two patients without their competency)"
expect 3 "best effort as yaml" -- "$keel" assign "$data/infeasible-chemo.yaml" --best-effort --format yaml
has "$work/out" "# BEST-EFFORT PLAN" "yaml labels the best-effort plan"
expect 3 "no best effort unless asked" -- "$keel" assign "$data/infeasible-chemo.yaml" --format json
has "$work/out" '"best_effort": false' "json says when there is no best-effort plan"

# keel new writes a template that keel refuses until every placeholder is
# filled in; a law applies only when the user names a table.
expect 0 "new" -- "$keel" new --type med-surg -o "$work/new.yaml"
expect 2 "a template with placeholders is refused" -- "$keel" check "$work/new.yaml"
has "$work/err" "new.yaml:16:18: shift.break_minutes: FILL_IN is a placeholder from keel new; put the unit's own value here" "each placeholder is named with its place"
expect 0 "new without a table names none" -- "$keel" new --type icu
if grep -q "ratio_table" "$work/out"; then not_ok "no table unless asked"; else ok "no table unless asked"; fi
expect 0 "new with a table" -- "$keel" new --type telemetry --table california
has "$work/out" "ratio_table: california" "the named table is in the template"
has "$work/out" "at most 4 patients per nurse" "the template says the table's number"
expect 1 "a table without the unit type" -- "$keel" new --type oncology --table california
expect 1 "new takes no file" -- "$keel" new roster.yaml

# keel import: a census into a base roster, or into a template.
expect 0 "import into a base roster" -- "$keel" import "$data/census-plain.csv" --roster "$examples/medsurg-day.yaml" -o "$work/tonight.yaml"
expect 0 "the imported roster assigns" -- "$keel" assign "$work/tonight.yaml" --format json
has "$work/out" '"id": "P-30103"' "the census's patients are in the roster"
has "$work/out" '"isolation": "protective"' "isolation comes through"
expect 0 "import into a template" -- "$keel" import "$data/census-plain.csv" --type med-surg
has "$work/out" "# Patients from the census" "the template holds the census"
has "$work/out" 'id: "P-30105"' "every patient is written"
expect 2 "a bad census" -- "$keel" import "$data/census-bad.csv" --map patient=MRN,acuity=Level,needs=Skills,isolation=Iso
has "$work/err" "census-bad.csv:3:7: acuity: 'seven' is not a whole number from 0 to 99" "a bad figure is named with line and column"
has "$work/err" "census-bad.csv:3:14: isolation: unknown precaution 'airbone'" "a bad precaution is named"
expect 1 "a bad mapping" -- "$keel" import "$data/census-plain.csv" --map acuity
expect 1 "import refuses to write over the census" -- "$keel" import "$data/census-plain.csv" -o "$data/census-plain.csv"
expect 1 "a base roster gives the unit" -- "$keel" import "$data/census-plain.csv" --roster "$examples/medsurg-day.yaml" --type icu
# A past shift: the census's nurse column is who had whom, scored by keel check.
expect 0 "import a past shift with its nurses" -- "$keel" import "$data/census-past.csv" --roster "$examples/medsurg-day.yaml" -o "$work/past.yaml"
has "$work/past.yaml" 'nurse: "N03"' "the census's nurse column comes in as the patients' nurses"
expect 0 "the past shift is scored as a plan" -- "$keel" check "$work/past.yaml" --format json
has "$work/out" '"violations"' "keel check scores the imported plan"
expect 2 "a past shift naming a nurse the unit lacks" -- "$keel" import "$data/census-past-bad.csv" --roster "$examples/medsurg-day.yaml"
has "$work/err" "census-past-bad.csv:3:17: nurse: patient P-30102 has nurse 'N99', who is not one of" "an unknown nurse is named with file, line and column"

# Source: Miranda et al., Crit Care Med 2003 (NAS weights as in sources.md):
# 1b 12.1 + 4b 16.5 + 6b 12.4 + 7a 4.0 + 8a 4.2 + 9 1.4 + 12 1.2 + 14 1.7 +
# 17 7.0 = 60.5 points; 1 point = 14.4 min per 24 h, so a 720-min shift's
# share is 60.5 x 7.2 = 435.6 min, rounded up to 436.
expect 0 "NAS-scored patients" -- "$keel" assign "$data/nas-icu.yaml" --format json
has "$work/out" '"care_minutes": 436, "locked": false, "sitter": false, "nas_score": 60.5' "NAS points become the shift's share of care minutes"
has "$work/out" '"nas_note": "NAS-based minutes are an approximation' "json carries the approximation note"
expect 0 "NAS in text" -- "$keel" assign "$data/nas-icu.yaml"
has "$work/out" "NAS 60.5*" "the sheet shows the score"
has "$work/out" "* NAS-based minutes are an approximation" "the sheet labels the minutes an approximation"

# The greedy method is never called optimal unless its bound proves it.
expect 0 "greedy method" -- "$keel" assign "$examples/medsurg-day.yaml" --method greedy --format json
has "$work/out" '"method": "greedy"' "the greedy method says so"

# The shift's clock (docs/model.md, "The clock").
# (a short time limit: the checks below hold for any valid plan, proven or not)
clock="$examples/medsurg-day-clock.yaml"
expect 0 "a roster with a clock" -- "$keel" assign "$clock" --time-limit 2
matches "$work/out" "patients over the shift: 07:00 [0-9], 15:00 off" "a nurse's count over the shift, and when she leaves"
has "$work/out" "Planned hand-offs (a nurse leaves; not balance moves)" "planned hand-offs are listed apart"
matches "$work/out" "15:00  E05 leaves: P-61[0-9]+ to E0[0-9]" "who takes whom when a nurse leaves"
has "$work/out" "Expected admissions, assigned in advance" "expected admissions have a nurse"
has "$work/out" "Break cover, in time order" "break cover is shown"
has "$work/out" "Next unplanned admissions" "the admission order is shown"
last_line_is_caution "$work/out" "the clock's report ends with the caution"
expect 0 "a clocked plan as yaml" -- "$keel" assign "$clock" --time-limit 2 --format yaml -o "$work/clock-plan.yaml"
has "$work/clock-plan.yaml" 'handoffs: ["' "the yaml plan names the planned hand-offs"
has "$work/clock-plan.yaml" "expected_admissions:" "expected admissions are written back apart"
expect 0 "the clocked plan checks clean" -- "$keel" check "$work/clock-plan.yaml" --time-limit 2
has "$work/out" "The plan keeps every rule keel checks." "keel's own clocked plan keeps every rule at every moment"
# The first six patients (all here at 07:00) moved onto one nurse, whose limit is 5.
awk '/- id:/ {moving = /id: "P-610[1-6]"/} moving && /nurse:/ {sub(/"E0[0-9]"/, "\"E02\"")} moving && /handoffs:/ {next} 1' "$work/clock-plan.yaml" > "$work/clock-edited.yaml"
expect 0 "a hand edit of the clocked plan" -- "$keel" check "$work/clock-edited.yaml" --time-limit 2 --format json
has "$work/out" '"rule": "moment_limit"' "a limit broken at a moment is named moment_limit"
expect 3 "too few places after a nurse leaves" -- "$keel" assign "$data/clock-too-few-later.yaml"
has "$work/err" "[moment_limit]" "the diagnosis names the moment limit"
has "$work/err" "the busiest time is 11:00 to 19:00, with 2 patients for 1 place" "and the busiest time"
expect 3 "too few places after a nurse leaves, as json" -- "$keel" assign "$data/clock-too-few-later.yaml" --format json
has "$work/out" '"tightest_moment": {"from": "11:00", "to": "19:00", "nurses_on": 1, "limits_need": 2}' "staffing counts the nurses on at each moment"
expect 3 "nobody on for a patient at night" -- "$keel" assign "$data/clock-night-gap.yaml"
has "$work/err" "no nurse who may take P1 is on from 03:00 to 07:00" "a stretch with no nurse on is named across midnight"
expect 3 "high acuity that no nurse may take, with the clock" -- "$keel" assign "$data/clock-high-acuity-none.yaml"
has "$work/err" "[high_acuity] 2 high-acuity patients (acuity 4 or more)" "the diagnosis counts patients, not the clock's parts"

# Every help page ends with the caution (keel help COMMAND, keel COMMAND
# --help, keel help help).
for c in assign check new import help; do
    expect 0 "keel help $c" -- "$keel" help "$c"
    last_line_is_caution "$work/out" "keel help $c ends with the caution"
done
for c in assign check new import; do
    expect 0 "keel $c --help" -- "$keel" "$c" --help
    last_line_is_caution "$work/out" "keel $c --help ends with the caution"
done
expect 0 "help on help" -- "$keel" help help
has "$work/out" "usage: keel help [COMMAND]" "keel help help shows help's own usage"
has "$work/out" "'keel COMMAND --help' shows the same" "and says where else help is"

# A mistyped command gets a "did you mean"; a made-up one does not.
expect 1 "a mistyped command" -- "$keel" asign roster.yaml
has "$work/err" "keel: no command 'asign'; did you mean 'assign'?" "a mistyped command gets a did you mean"
expect 1 "a mistyped command for help" -- "$keel" help chek
has "$work/err" "keel help: no command 'chek'; did you mean 'check'?" "keel help: a mistyped command gets a did you mean"
expect 1 "a mistyped help" -- "$keel" hlep
has "$work/err" "did you mean 'help'?" "help itself is suggested"
expect 1 "a made-up command" -- "$keel" rota
if grep -q "did you mean" "$work/err"; then not_ok "no suggestion for a word far from every command"; else ok "no suggestion for a word far from every command"; fi

# Exit 3: the reasons on stderr end with the caution, and -o writes no plan:
# an old file is left as it was.
expect 3 "no valid assignment, reasons on stderr" -- "$keel" assign "$data/infeasible-chemo.yaml"
last_line_is_caution "$work/err" "the reasons on exit 3 end with the caution"
printf 'the plan posted earlier\n' > "$work/posted.txt"
cp "$work/posted.txt" "$work/posted.before"
for f in text yaml json; do
    expect 3 "no valid assignment with -o, as $f" -- "$keel" assign "$data/infeasible-chemo.yaml" --format "$f" -o "$work/posted.txt"
    if cmp -s "$work/posted.txt" "$work/posted.before"; then ok "$f: the old file is untouched"; else not_ok "$f: the old file is untouched"; fi
    has "$work/err" "keel assign: no plan written to $work/posted.txt: no valid assignment exists" "$f: stderr says no plan was written"
    last_line_is_caution "$work/err" "$f: stderr ends with the caution"
done
expect 3 "no valid assignment with -o a new file" -- "$keel" assign "$data/infeasible-chemo.yaml" -o "$work/never.txt"
if [ -e "$work/never.txt" ]; then not_ok "no file is created"; else ok "no file is created"; fi
if ls "$work"/never.txt.tmp-* "$work"/posted.txt.tmp-* >/dev/null 2>&1; then not_ok "no temporary file is left on exit 3"; else ok "no temporary file is left on exit 3"; fi
# With --best-effort the file holds the plan, labelled on its first line.
expect 3 "best effort to a yaml file" -- "$keel" assign "$data/infeasible-chemo.yaml" --best-effort --format yaml -o "$work/be.yaml"
if head -n 1 "$work/be.yaml" | grep -q "^# BEST-EFFORT PLAN: no valid assignment exists"; then ok "the yaml label is the first line"; else not_ok "the yaml label is the first line"; fi
has "$work/err" "keel assign: $work/be.yaml holds a BEST-EFFORT plan, not an assignment: it breaks 2 rules" "stderr says the file is a best-effort plan, not an assignment"
last_line_is_caution "$work/err" "best effort: stderr ends with the caution"
expect 3 "best effort to a text file" -- "$keel" assign "$data/infeasible-chemo.yaml" --best-effort -o "$work/be.txt"
if head -n 1 "$work/be.txt" | grep -q "^BEST-EFFORT PLAN, not an assignment"; then ok "the text label is the first line"; else not_ok "the text label is the first line"; fi
last_line_is_caution "$work/be.txt" "the best-effort text file ends with the caution"
expect 3 "best effort to a json file" -- "$keel" assign "$data/infeasible-chemo.yaml" --best-effort --format json -o "$work/be.json"
has "$work/be.json" '"best_effort": true' "the json file says best_effort"
has "$work/be.json" '"status": "infeasible"' "the json file keeps the status"

# A unit's roster without patients: import fills it; check and assign say
# there is nothing to do, and write nothing.
expect 0 "check a roster without patients" -- "$keel" check "$data/unit-no-patients.yaml"
has "$work/err" "the roster is valid but has no patients, so there is nothing to score" "check says the roster is valid and has no patients"
if [ -s "$work/out" ]; then not_ok "check writes no report without patients"; else ok "check writes no report without patients"; fi
expect 2 "assign a roster without patients" -- "$keel" assign "$data/unit-no-patients.yaml" -o "$work/none.txt"
has "$work/err" "has no patients, so there is nothing to assign; keel import CENSUS.csv --roster" "assign says there is nothing to assign, and how to fill it"
if [ -e "$work/none.txt" ]; then not_ok "assign writes nothing without patients"; else ok "assign writes nothing without patients"; fi
grep -v '^patients:' "$data/unit-no-patients.yaml" > "$work/no-key.yaml"
expect 0 "check a roster with no patients key" -- "$keel" check "$work/no-key.yaml"
has "$work/err" "has no patients" "no patients key is no patients"
expect 0 "import into a roster without patients" -- "$keel" import "$data/census-plain.csv" --roster "$work/no-key.yaml" -o "$work/filled.yaml"
expect 0 "the filled roster assigns" -- "$keel" assign "$work/filled.yaml" --format json
has "$work/out" '"id": "P-30105"' "the census's patients are in it"

# --explain with yaml is a usage error that names the combination.
expect 1 "explain with yaml" -- "$keel" assign "$data/../data/every-rule.yaml" --explain --format yaml
has "$work/err" "--explain does not go with --format yaml" "the refusal names the combination"

# -o follows the umask: a posted plan is readable by the unit's other accounts.
for mask in 022 027; do
    rm -f "$work/mode.yaml" "$work/mode-new.yaml"
    (umask "$mask" && "$keel" assign "$examples/icu-night.yaml" --format yaml -o "$work/mode.yaml" >/dev/null 2>&1 &&
        "$keel" new --type icu -o "$work/mode-new.yaml" >/dev/null 2>&1)
    want=$(printf '%o' $((0666 & ~0$mask)))
    got=$(stat -c %a "$work/mode.yaml" 2>/dev/null)
    if [ "$got" = "$want" ]; then ok "umask $mask: assign -o writes mode $want"; else echo "# mode $got"; not_ok "umask $mask: assign -o writes mode $want"; fi
    got=$(stat -c %a "$work/mode-new.yaml" 2>/dev/null)
    if [ "$got" = "$want" ]; then ok "umask $mask: new -o writes mode $want"; else echo "# mode $got"; not_ok "umask $mask: new -o writes mode $want"; fi
done

# One of a thing is singular: "limit 1 patient", never "1 patients".
: > "$work/singular"
for args in "assign $data/one-of-each.yaml" "check $data/one-of-each.yaml" \
    "assign $data/one-nurse-short.yaml" "assign $data/one-nurse-two-high.yaml" \
    "check $data/plan-one-over.yaml" "assign $data/plan-one-over.yaml --best-effort"; do
    # shellcheck disable=SC2086 # the command and its arguments
    "$keel" $args >>"$work/singular" 2>&1
done
cp "$work/singular" "$work/out"
has "$work/out" "1 patient, 1 nurse" "the heading counts 1 patient, 1 nurse"
has "$work/out" "limit 1 patient" "the workload says limit 1 patient"
has "$work/out" "Continuity: 1 of 1 patient keeps their nurse" "continuity counts 1 patient"
has "$work/out" "Balance over the 1 nurse who takes patients" "the balance counts 1 nurse"
has "$work/out" "2 patients, but the 1 nurse on shift who may take patients may take 1 in all" "the limits' diagnosis counts 1 nurse"
has "$work/out" "the 1 nurse who may take them can hold 1" "the high-acuity diagnosis counts 1 nurse"
has "$work/out" "[patient_limit] A has 1 patient; the patient limit is 0" "the plan check counts 1 patient"
has "$work/out" "A has 1 high-acuity patient (acuity 4 or more)" "the high-acuity check counts 1 patient"
has "$work/out" "1 high-acuity patient (acuity 4 or more), but policy.high_acuity.max_per_nurse is 0, so no nurse may take one" "the high-acuity diagnosis counts 1 patient"
if grep -nE '(^|[^0-9.])1 ([a-z-]+ )?(patients|nurses)\b' "$work/singular" > "$work/err"; then not_ok "no '1 patients' or '1 nurses' anywhere"; else ok "no '1 patients' or '1 nurses' anywhere"; fi

# A census saved with ';' gets a hint; every problem of a census, levels
# missing from the unit's scale included, comes in one run in file order.
expect 2 "a census separated by ';'" -- "$keel" import "$data/census-semicolon.csv"
has "$work/err" "census-semicolon.csv:1:1: the header is one column holding ';': the file seems to use ';' as separator; keel reads commas" "the hint names the separator"
if [ "$(wc -l < "$work/err")" -eq 1 ]; then ok "the hint comes alone"; else not_ok "the hint comes alone"; fi
expect 2 "a census with row problems and levels the unit lacks" -- "$keel" import "$data/census-mixed.csv" --roster "$examples/medsurg-day.yaml"
cat > "$work/mixed.expected" <<EOF
$data/census-mixed.csv:2:15: acuity: patient P-30101 has acuity 9, which $examples/medsurg-day.yaml's policy.acuity_minutes does not give; expected a level of the unit's scale
$data/census-mixed.csv:3:18: isolation: unknown precaution 'airbone'; expected contact, droplet, airborne, protective or an empty field
$data/census-mixed.csv:4:19: extras: patient P-30103 lists extra 'transfer', which $examples/medsurg-day.yaml's policy.extra_minutes does not give
$data/census-mixed.csv:5:15: acuity: 'seven' is not a whole number from 0 to 99
EOF
if cmp -s "$work/mixed.expected" "$work/err"; then ok "every census problem in one run, in file order, with line and column"; else
    diff "$work/mixed.expected" "$work/err" | sed 's/^/# /'; not_ok "every census problem in one run, in file order, with line and column"; fi
expect 2 "a bad base roster and a bad census" -- "$keel" import "$data/census-mixed.csv" --roster "$bad/many-problems.yaml"
has "$work/err" "many-problems.yaml:" "the base roster's problems are named"
has "$work/err" "census-mixed.csv:3:18: isolation: unknown precaution 'airbone'" "and the census's, in the same run"
expect 3 "no nurse takes patients" -- "$keel" assign "$data/nobody-takes-patients.yaml"
has "$work/err" "[patient_limit] 1 patient (P1) but no nurse on shift takes patients" "the diagnosis names the limits, not a competency"
expect 0 "check a plan that gives the charge nurse a patient above her role's acuity" -- "$keel" check "$data/role-acuity.yaml"
has "$work/out" "[role_acuity] P1 is acuity 4; C1 is a charge nurse, and charge nurses take patients up to acuity 2" "check names the role's acuity cap"
expect 0 "assign keeps the role's acuity cap" -- "$keel" assign "$data/role-acuity.yaml" --format yaml -o "$work/role-acuity-plan.yaml"
expect 0 "the written plan keeps every rule" -- "$keel" check "$work/role-acuity-plan.yaml"
has "$work/out" "The plan keeps every rule keel checks." "no role_acuity in keel's own plan"
sed 's/roles: {charge: {max_patients: 2, max_acuity: 2}}/roles: {charge: {max_patients: 2, max_acuity: 2}, staff: {max_acuity: 3}}/' "$data/role-acuity.yaml" > "$work/role-acuity-none.yaml"
expect 3 "no nurse's role takes acuity 4" -- "$keel" assign "$work/role-acuity-none.yaml"
has "$work/err" "[role_acuity] P1 is acuity 4; no nurse on shift may take it" "the diagnosis names the roles' acuity caps"

# Break cover inside the plan: keel's plan keeps each buddy within the limit
# during the break; a plan that does not is named; a break nobody can cover
# is diagnosed before the shift, naming the break.
expect 0 "assign keeps break cover" -- "$keel" assign "$data/break-cover.yaml" --format yaml -o "$work/break-cover-plan.yaml"
expect 0 "keel's plan with break cover checks clean" -- "$keel" check "$work/break-cover-plan.yaml"
has "$work/out" "The plan keeps every rule keel checks." "no break_cover in keel's own plan"
has "$work/out" "breaks flagged: 0" "no break flagged in keel's own plan"
expect 0 "check a plan that breaks a buddy's cover" -- "$keel" check "$data/break-cover.yaml"
has "$work/out" "[break_cover] from 11:00 to 11:30, A is on break and B (buddy) holds 6 patients with hers: exceeds the limit of 1:5" "check names the break and its cover"
has "$work/out" "Short: this plan leaves 1 break without cover within the limit." "the verdict counts the break once"
sed 's/, covers: B}/}/' "$data/break-cover.yaml" > "$work/break-no-buddy.yaml"
expect 3 "a break nobody can cover" -- "$keel" assign "$work/break-no-buddy.yaml"
has "$work/err" "[break_cover] no buddy or relief nurse is free to cover B's break 13:00-13:30" "the diagnosis names the break without cover"
last_line_is_caution "$work/err" "the exit-3 reasons end with the caution"
expect 3 "a break nobody can cover, best effort" -- "$keel" assign "$work/break-no-buddy.yaml" --best-effort
has "$work/out" "[break_cover] from 13:00 to 13:30, B is on break holding 2 patients and nobody is free to cover her" "the best-effort plan names the break it leaves without cover"
sed 's/  - {id: p7, acuity: 1, nurse: C}/  - {id: p7, acuity: 1, nurse: C}\n  - {id: p8, acuity: 1, nurse: C}\n  - {id: p9, acuity: 1, nurse: C}\n  - {id: p10, acuity: 1, nurse: C}\n  - {id: p11, acuity: 1, nurse: C}/' "$data/break-cover.yaml" > "$work/break-too-full.yaml"
expect 3 "breaks that cannot be covered within the limit" -- "$keel" assign "$work/break-too-full.yaml"
has "$work/err" "C's break 12:00-12:30 cannot be covered within the limit: at 12:00 the other nurses on may hold only so many that C and A (buddy) would hold 6 patients together, limit 5" "the diagnosis names one break the count rules out"
expect 3 "break covers in conflict" -- "$keel" assign "$data/break-cover-pieces.yaml"
has "$work/err" "during A's break 11:00-11:30 (buddy B), B's break 13:00-13:30 (buddy C), C's break 12:00-12:30 (buddy A); add a relief nurse or move one of these breaks" "the diagnosis names the breaks in conflict"
if grep -qF "D's break" "$work/err"; then not_ok "the diagnosis leaves out the break not in conflict"; else ok "the diagnosis leaves out the break not in conflict"; fi

# GLPK is bounded: a solve that reaches its memory limit is a clean exit 4
# that says so.  A 301-patient roster with no valid plan: the best-effort
# model is an integer programme of 12 000 binaries, far over 1 MiB.
{
    printf 'version: 1\nshift: {minutes: 720}\npolicy: {max_patients: 8}\nnurses:\n'
    for i in $(seq 1 40); do echo "  - {id: N$i}"; done
    echo "patients:"
    echo "  - {id: P0, care_minutes: 100, needs: [ecmo]}"
    for i in $(seq 1 300); do echo "  - {id: P$i, care_minutes: $((30 + i % 370))}"; done
} > "$work/big.yaml"
expect 4 "GLPK at its memory limit" -- env KEEL_SOLVER_MEMORY_MB=1 "$keel" assign "$work/big.yaml" --best-effort --time-limit 5
has "$work/err" "the integer programming solver (GLPK) reached its memory limit of 1 MiB" "the memory limit is named"

# No lost data: a full disk and a closed stdout are errors (exit 4), and a
# device named by -o is written straight, never replaced by a file.
if [ -c /dev/full ]; then
    expect 4 "a report to a full disk" -- "$keel" assign "$examples/medsurg-day.yaml" --time-limit 1 -o /dev/full
    has "$work/err" "/dev/full: write failed: No space left on device" "the full disk is named"
    if [ -c /dev/full ]; then ok "the device is still a device"; else not_ok "the device is still a device"; fi
    "$keel" assign "$examples/medsurg-day.yaml" --time-limit 1 > /dev/full 2> "$work/err"
    if [ $? -eq 4 ]; then ok "a full standard output is exit 4"; else not_ok "a full standard output is exit 4"; fi
    has "$work/err" "standard output: write failed" "and says so"
    expect 4 "a template to a full disk" -- "$keel" new -o /dev/full
fi
expect 0 "-o /dev/stdout writes straight to it" -- "$keel" assign "$examples/medsurg-day.yaml" --time-limit 1 -o /dev/stdout
last_line_is_caution "$work/out" "the report came through the device"
if [ -L /dev/stdout ] || [ ! -e /dev/stdout ]; then ok "/dev/stdout is still a link"; else not_ok "/dev/stdout is still a link"; fi
cp "$examples/medsurg-day.yaml" "$work/keep.yaml"
echo "old plan" > "$work/old-plan.txt"
"$keel" assign "$work/keep.yaml" --time-limit 1 -o "$work/old-plan.txt" > /dev/full 2>/dev/null
if [ "$(cat "$work/old-plan.txt")" != "old plan" ]; then ok "a good run replaces the old file"; else not_ok "a good run replaces the old file"; fi
# Colour only for a terminal (a pseudo-terminal from script(1), util-linux)
# and never with NO_COLOR set.
if command -v script >/dev/null 2>&1; then
    script -qc "'$keel' assign '$examples/medsurg-day.yaml' --time-limit 1" /dev/null > "$work/tty" 2>&1
    if grep -q "$(printf '\033')\[" "$work/tty"; then ok "colour on a terminal"; else not_ok "colour on a terminal"; fi
    NO_COLOR=1 script -qc "'$keel' assign '$examples/medsurg-day.yaml' --time-limit 1" /dev/null > "$work/tty" 2>&1
    if grep -q "$(printf '\033')\[" "$work/tty"; then not_ok "no colour with NO_COLOR"; else ok "no colour with NO_COLOR"; fi
    has "$work/tty" "At a glance" "the terminal opens with the glance"
fi
expect 0 "an html sheet" -- "$keel" assign "$examples/icu-night.yaml" --format html --time-limit 1
has "$work/out" "<svg" "the sheet holds its chart"
has "$work/out" "$caution" "the sheet carries the caution"
expect 1 "--names and --deidentify together" -- "$keel" assign "$examples/icu-night.yaml" --format html --names --deidentify
# keel audit: past shifts, one stream of rosters (tests/reference/gen_history.py
# wrote both files; audit-history.yaml has four planted breaks).
hist="$data/audit-history.yaml"
expect 5 "an audit that finds rules broken" -- "$keel" audit "$hist"
has "$work/out" "keel audit: 6 shifts from 2026-01-05 to 2026-01-07, 8 nurses, 4 rules broken" "the first line sums the period up"
has_joined "$work/out" "not how she worked" "the report says the figures describe assignments, not performance"
has_joined "$work/out" "stable pseudonymous ids" "and recommends pseudonymous ids"
has "$work/out" "[patient_limit]" "a planted break is listed with its rule"
last_line_is_caution "$work/out" "the audit ends with the caution"
expect 0 "an audit of clean shifts" -- "$keel" audit "$data/audit-clean.yaml" --no-best --format json
has "$work/out" '"best_status": "skipped"' "--no-best skips the best possible"
has "$work/out" '"caution": ' "the json carries the caution"
expect 5 "the audit as CSV" -- "$keel" audit "$hist" --format csv
if head -n 1 "$work/out" | grep -q "^source,document,date,label,weekday,.*table_note$(printf '\r')\$"; then ok "CSV records end in CRLF (RFC 4180)"; else not_ok "CSV records end in CRLF (RFC 4180)"; fi
if [ "$(wc -l < "$work/out")" -eq 7 ]; then ok "one CSV row per shift"; else not_ok "one CSV row per shift"; fi
has "$work/err" "$caution" "CSV output says the caution on standard error"
expect 5 "one CSV row per nurse and shift" -- "$keel" audit "$hist" --format csv-nurse-shifts --no-best
has "$work/out" "source,document,date,label,nurse,counted," "the nurse-shift table has its header"
expect 1 "audit without files" -- "$keel" audit
expect 1 "a shard out of range" -- "$keel" audit "$hist" --shard 3/2
expect 1 "merge takes partials only" -- "$keel" audit --merge "$hist" --shard 1/2
expect 1 "audit refuses to write over a history" -- "$keel" audit "$hist" -o "$hist"
printf 'shift: {minutes: 600}\nnurses: [{id: A}]\npatients: []\n---\nshift: {minutes: -1}\nnurses: [{id: A}]\npatients: []\n' > "$work/bad-stream.yaml"
expect 2 "a bad document in a stream" -- "$keel" audit "$work/bad-stream.yaml"
has "$work/err" "bad-stream.yaml:5:" "its problem is named at its line in the file"
# Shards merged give the single run's report, byte for byte; the same with
# GNU parallel running the shards, when it is installed.
"$keel" audit "$hist" --format json --jobs 1 > "$work/single.json"
for i in 1 2 3; do "$keel" audit "$hist" --shard $i/3 -o "$work/part-$i.txt"; done
expect 5 "merge the shards" -- "$keel" audit --merge "$work/part-3.txt" "$work/part-1.txt" "$work/part-2.txt" --format json
if cmp -s "$work/out" "$work/single.json"; then ok "the merged report is the single run's, byte for byte"; else not_ok "the merged report is the single run's, byte for byte"; fi
expect 2 "a merge missing a shard" -- "$keel" audit --merge "$work/part-1.txt" "$work/part-2.txt"
has "$work/err" "shard 3/3 is missing" "the missing shard is named"
"$keel" audit "$hist" --shard 3/3 --no-best -o "$work/part-3-nobest.txt"
expect 2 "a merge of shards run with other options" -- "$keel" audit --merge "$work/part-1.txt" "$work/part-2.txt" "$work/part-3-nobest.txt"
has "$work/err" "part-3-nobest.txt:1:1: this partial was run with other options" "the odd partial is named at its line"
"$keel" audit "$hist" --jobs 2 --format json > "$work/jobs.json"
if cmp -s "$work/jobs.json" "$work/single.json"; then ok "two threads give the one thread's report"; else not_ok "two threads give the one thread's report"; fi
if command -v parallel >/dev/null 2>&1; then
    parallel --will-cite "$keel" audit "$hist" --shard {}/4 -o "$work/par-{}.txt" ::: 1 2 3 4
    "$keel" audit --merge "$work"/par-*.txt --format json > "$work/par.json"
    if cmp -s "$work/par.json" "$work/single.json"; then ok "GNU parallel's shards merge to the single run"; else not_ok "GNU parallel's shards merge to the single run"; fi
else
    ok "GNU parallel's shards merge to the single run # SKIP parallel is not installed"
fi

# keel assign --history (fairness forward).  history-today.yaml has two
# plans equally balanced (the heaviest 330/660, the lightest 320/660 either
# way); history-past.yaml has NA at 0.9 and NB at 0.6 on both past shifts,
# so the stage minimises 0.9 u(NA) + 0.6 u(NB): NA takes P2 (320 min), NB
# P1 (330 min), 0.9 x 320/660 + 0.6 x 330/660 = 486/660 = 0.736364, against
# 0.9 x 330/660 + 0.6 x 320/660 = 489/660 the other way.
expect 0 "assign with a history" -- "$keel" assign "$data/history-today.yaml" --history "$data/history-past.yaml" --format csv
has "$work/out" "P1,,,,3,330,NB," "the heavier patient goes to the nurse with the lighter past"
has "$work/out" "P2,,,,3,320,NA," "the lighter patient goes to the nurse with the heavier past"
expect 0 "assign with a history, json" -- "$keel" assign "$data/history-today.yaml" --history "$data/history-past.yaml" --format json
has "$work/out" '"name": "history", "status": "optimal", "value": 0.736363636364' "json reports the history stage, proven"
expect 0 "assign with a history, text" -- "$keel" assign "$data/history-today.yaml" --history "$data/history-past.yaml"
has "$work/out" "history 0.7364 (weight by past load x utilisation, summed)  proven best possible" "text reports the history stage"
expect 0 "assign without a history" -- "$keel" assign "$data/history-today.yaml" --format json
if grep -q '"history"' "$work/out"; then not_ok "no history stage without --history"; else ok "no history stage without --history"; fi
expect 1 "--history without a file" -- "$keel" assign "$data/history-today.yaml" --history --format json
has "$work/err" "--history needs a file or more" "the usage error says what is missing"
printf 'version: 1\nunit: {name: "X", type: med-surg}\nnurses: [\n' > "$work/bad-history.yaml"
expect 2 "a broken history file" -- "$keel" assign "$data/history-today.yaml" --history "$data/history-past.yaml" "$work/bad-history.yaml"
matches "$work/err" "bad-history.yaml:[0-9]+:[0-9]+: " "the error names the history file, line and column"
# Stages 1-4 are the same with and without a history (the examples whose
# stages are proven within the limit), and the plan keeps them.
for ex in icu-night medsurg-day; do
    "$keel" assign "$examples/$ex.yaml" --format json > "$work/plain.json"
    "$keel" assign "$examples/$ex.yaml" --format json --history "$examples/tutorial/history.yaml" > "$work/hist.json"
    if /usr/bin/python3 - "$work/plain.json" "$work/hist.json" <<'PY'
import json, sys
a, b = (json.load(open(f)) for f in sys.argv[1:3])
first = [(s["name"], s["status"], s["value"]) for s in a["stages"]]
then = [(s["name"], s["status"], s["value"]) for s in b["stages"] if s["name"] != "history"]
ok = first == then and [s["name"] for s in b["stages"]][-1] == "history"
ok = ok and b.get("continuity", {}).get("kept", 0) >= a.get("continuity", {}).get("kept", 0)
ok = ok and b.get("proximity", {}).get("zones", 0) <= a.get("proximity", {}).get("zones", 0)
sys.exit(0 if ok else 1)
PY
    then ok "$ex: stages 1-4 the same with a history"; else not_ok "$ex: stages 1-4 the same with a history"; fi
done

# The rebalance's page and the audit's document (the browser suite renders
# them; here they are written under the sanitizers).
expect 0 "a rebalance as html" -- "$keel" rebalance "$data/rebalance-midshift.yaml" --format html
has "$work/out" "heaviest utilisation against hand-offs" "the frontier is a chart"
has "$work/out" "$caution" "the rebalance's page carries the caution"
expect 5 "an audit as html" -- "$keel" audit "$examples/tutorial/history.yaml" --format html --no-best
has "$work/out" "heaviest loads per nurse against chance" "the audit's chart"
has "$work/out" "$caution" "the audit's page carries the caution"

# Stage ranks: a nurse pinned at the peak is named, the rest balanced
# below her (the exhaustive suites check the values).
expect 0 "a nurse pinned at the peak" -- "$keel" assign "$data/ranks-pinned.yaml"
has "$work/out" "pinned    N1 at 166.7 %: no valid plan has her lower" "the pinned nurse is named"
matches "$work/out" "^  the rest +[0-9.]+ %  .*81.9 %, proven best possible" "the rest's level is proven"
has_joined "$work/out" "P01 alone needs 300 min of care" "what sets the bound says why"
expect 0 "the ranks as json" -- "$keel" assign "$data/ranks-pinned.yaml" --format json
if /usr/bin/env python3 - "$work/out" <<'PY'
import json, sys
d = json.load(open(sys.argv[1]))
r = d["ranks"]
ok = (r[0] == {"rank": 1, "nurse": "N1", "utilisation": r[0]["utilisation"], "pinned": True,
               "status": "optimal"} and abs(r[0]["utilisation"] - 300 / 180) < 1e-9
      and r[-1]["nurse"] is None and not r[-1]["pinned"] and abs(r[-1]["utilisation"] - 590 / 720) < 1e-9
      and [s["name"] for s in d["stages"]][:3] == ["peak", "ranks", "lift"]
      and all(n["utilisation"] <= 590 / 720 + d["continuity"]["tolerance"] + 1e-9
              for n in d["nurses"] if n["id"] != "N1"))
sys.exit(0 if ok else 1)
PY
then ok "ranks in json: N1 pinned, the rest at 81.9 %, the others within it and the tolerance"; else not_ok "ranks in json"; fi

# The golden bad censuses: each its exact problems, exit 2.
for csv in "$data/../data/bad-census"/*.csv; do
    case_name=$(basename "$csv" .csv)
    (cd "$data/../data/bad-census" && "$keel" import "$case_name.csv" --roster unit.yaml >/dev/null 2>"$work/err")
    got=$?
    grep -v "^Decision support only\|^Try 'keel" "$work/err" > "$work/err.problems"
    if [ "$got" -eq 2 ] && cmp -s "$work/err.problems" "$data/../data/bad-census/$case_name.expected"; then
        ok "bad census $case_name"
    else
        echo "# exit $got"; diff "$data/../data/bad-census/$case_name.expected" "$work/err.problems" | sed 's/^/# /' | head -10
        not_ok "bad census $case_name"
    fi
done

echo "1..$n"
[ "$failed" -eq 0 ]
