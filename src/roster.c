/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster.c - loads a roster file and checks it against the roster format
 * (docs/roster-format.md).  First stage of the pipeline: every later stage
 * may trust that a keel_roster is complete and consistent.
 *
 * Two steps.  read_document() turns libyaml's event stream into a small
 * owned tree of nodes (scalar, sequence, mapping) that keeps each node's
 * 1-based position and whether a scalar was quoted; anchors, aliases and
 * tags are reported, never expanded.  keel_roster_walk_mapping() then checks a mapping
 * against a table of keys, one row per key naming its parser, so a new key
 * is one new row.  Checks that need the whole file (unique ids, references,
 * limits that depend on the shift) run after the walk, on the filled roster.
 * So do two steps of the shift's clock: expected admissions, read apart,
 * are appended to the patients (keel_roster_keys_merge_expected()), and the nurses' and
 * patients' own times, read as clock times, become minutes after the
 * shift's start (convert_times()), which is what the roster keeps.
 *
 * Invariants: every problem in the file is reported, not only the first;
 * on any failure *out is NULL and nothing leaks; a value that fails its
 * check leaves its field absent, so later checks do not repeat the problem.
 * The steps already in files of their own are listed in roster_loader.h.
 */
#include "keel/roster.h"

#include <assert.h>
#include <errno.h>
#include <limits.h>
#include <stdarg.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "keel/nas.h"
#include "roster_internal.h"
#include "roster_loader.h"

/* ---------------------------------------------------------------------------
 * Checks across the file, after the walk
 */

/* The shift's break must leave time for patients. */
static void check_shift_break(loader *ld, const node *root)
{
    const keel_roster *r = ld->roster;
    if (r->shift.minutes == KEEL_ABSENT || r->shift.break_minutes == KEEL_ABSENT ||
        r->shift.break_minutes < r->shift.minutes)
        return;
    keel_roster_report_pop_path(ld, 0);
    keel_roster_report_push_key(ld, "shift");
    keel_roster_report_push_key(ld, "break_minutes");
    keel_roster_report_problem(
        ld, keel_roster_tree_find(keel_roster_tree_find(root, "shift"), "break_minutes")->mark,
        "a %d-minute break leaves no time in a %d-minute shift; expected less than %d",
        r->shift.break_minutes, r->shift.minutes, r->shift.minutes);
}

/* ---------------------------------------------------------------------------
 * The shift's clock: the nurses' and patients' own times
 */

enum { CLOCK_SIZE = 16 };

/* Writes the time of day `offset` minutes after the shift's start, "HH:MM". */
static const char *clock_text(const keel_roster *r, int offset, char *buf)
{
    int minute = (r->shift.start_minute + offset) % MINUTES_PER_DAY;
    snprintf(buf, CLOCK_SIZE, "%02d:%02d", minute / 60, minute % 60);
    return buf;
}

/* Reads the time at *minute (minutes after midnight, as the file gives it)
 * against the shift: offset = (time - shift.start) mod 1440, which must lie
 * in [0, shift.minutes].  An end-like time at the shift's start ends a
 * 24-hour shift (offset 1440).  A time that cannot be read becomes
 * KEEL_ABSENT, reported unless a problem of the shift itself says why.
 * value is the time's node; the path names its key. */
static void convert_time(loader *ld, const node *shift, const node *value, bool end_like,
                         int *minute)
{
    const keel_roster *r = ld->roster;
    char shown[SHOWN_SIZE], from[CLOCK_SIZE], to[CLOCK_SIZE];
    int time = *minute;
    if (time == KEEL_ABSENT)
        return;
    *minute = KEEL_ABSENT;
    if (r->shift.start_minute == KEEL_ABSENT) {
        if (shift && shift->kind == NODE_MAPPING && !keel_roster_tree_find(shift, "start"))
            keel_roster_report_problem(
                ld, value->mark,
                "%s needs shift.start to be read against the shift; expected shift.start, "
                "the time the shift starts",
                keel_roster_report_show(shown, value->text));
        return;
    }
    if (r->shift.minutes == KEEL_ABSENT)
        return;
    int offset = (time - r->shift.start_minute + MINUTES_PER_DAY) % MINUTES_PER_DAY;
    if (end_like && offset == 0 && r->shift.minutes == MINUTES_PER_DAY)
        offset = MINUTES_PER_DAY;
    if (offset > r->shift.minutes) {
        clock_text(r, 0, from);
        clock_text(r, r->shift.minutes, to);
        keel_roster_report_problem(
            ld, value->mark, "%s is outside the shift (%s to %s); expected a time from %s to %s",
            keel_roster_report_show(shown, value->text), from, to, from, to);
        return;
    }
    *minute = offset;
}

/* Turns every nurse's and patient's time into minutes after the shift's
 * start (the checks below and the roster keep those). */
static void convert_times(loader *ld, const node *root)
{
    keel_roster *r = ld->roster;
    const node *shift = keel_roster_tree_find(root, "shift"),
               *nurses = keel_roster_tree_find(root, "nurses");
    for (size_t i = 0; i < r->nnurses; i++) {
        keel_nurse *n = &r->nurses[i];
        const node *item = nurses->items[i], *breaks = keel_roster_tree_find(item, "breaks");
        keel_roster_report_set_path(ld, "nurses", i, "start");
        convert_time(ld, shift, keel_roster_tree_find(item, "start"), false, &n->start);
        keel_roster_report_set_path(ld, "nurses", i, "end");
        convert_time(ld, shift, keel_roster_tree_find(item, "end"), true, &n->end);
        for (size_t b = 0; b < n->nbreaks; b++) {
            keel_roster_report_set_path(ld, "nurses", i, "breaks");
            keel_roster_report_push_index(ld, b);
            keel_roster_report_push_key(ld, "at");
            convert_time(ld, shift, keel_roster_tree_find(breaks->items[b], "at"), false,
                         &n->breaks[b].at);
        }
    }
    for (size_t i = 0; i < r->npatients; i++) {
        keel_patient *p = &r->patients[i];
        const node *item = keel_roster_keys_patient_node(ld, i);
        const char *arrival = p->expected ? "at" : "arrives_at";
        keel_roster_keys_patient_path(ld, i, arrival);
        convert_time(ld, shift, keel_roster_tree_find(item, arrival), false, &p->arrives_at);
        keel_roster_keys_patient_path(ld, i, "leaves_at");
        convert_time(ld, shift, keel_roster_tree_find(item, "leaves_at"), true, &p->leaves_at);
    }
}

/* The nurse's time on the unit, [*start, *end) after the shift's start. */
static void nurse_span(const keel_roster *r, const keel_nurse *n, int *start, int *end)
{
    *start = n->start == KEEL_ABSENT ? 0 : n->start;
    *end = n->end == KEEL_ABSENT ? r->shift.minutes : n->end;
}

/* True when the key is absent or its time was read. */
static bool time_read(const node *item, const char *key, int value)
{
    return !keel_roster_tree_find(item, key) || value != KEEL_ABSENT;
}

/* A nurse's own start comes before her end; `minutes`, when given with
 * them, is the time between.  True when the nurse's time on the unit is
 * known and sound, so that the checks that depend on it can run. */
static bool check_nurse_span(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_nurse *n = &r->nurses[i];
    char from[CLOCK_SIZE], to[CLOCK_SIZE];
    int start, end;
    if (!time_read(item, "start", n->start) || !time_read(item, "end", n->end))
        return false;
    if (n->start == KEEL_ABSENT && n->end == KEEL_ABSENT)
        return true;
    if (r->shift.minutes == KEEL_ABSENT)
        return false;
    nurse_span(r, n, &start, &end);
    clock_text(r, start, from);
    clock_text(r, end, to);
    if (start >= end && n->start != KEEL_ABSENT && n->end != KEEL_ABSENT) {
        keel_roster_report_set_path(ld, "nurses", i, "end");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "end")->mark,
            "%s is not after the nurse's start at %s; expected an end later than the start", to,
            from);
        return false;
    }
    if (start >= end && n->start != KEEL_ABSENT) {
        keel_roster_report_set_path(ld, "nurses", i, "start");
        keel_roster_report_problem(ld, keel_roster_tree_find(item, "start")->mark,
                                   "%s is when the shift ends; expected a start before %s", from,
                                   to);
        return false;
    }
    if (start >= end) {
        keel_roster_report_set_path(ld, "nurses", i, "end");
        keel_roster_report_problem(ld, keel_roster_tree_find(item, "end")->mark,
                                   "%s is when the shift starts; expected an end after %s", to,
                                   from);
        return false;
    }
    if (n->minutes != KEEL_ABSENT && n->minutes != end - start) {
        keel_roster_report_set_path(ld, "nurses", i, "minutes");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "minutes")->mark,
            "%d minutes on the unit, but %s to %s is %d minutes; expected %d, or no minutes",
            n->minutes, from, to, end - start, end - start);
    }
    return true;
}

/* A nurse's timed breaks lie inside her time on the unit [start, end), in
 * time order, without overlapping; break_minutes, when also given, is their
 * total.  Returns that total, or KEEL_ABSENT when a break has a problem. */
static int check_breaks(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_nurse *n = &r->nurses[i];
    const node *list = keel_roster_tree_find(item, "breaks");
    const keel_break *before = NULL;
    size_t before_index = 0;
    char at[CLOCK_SIZE], from[CLOCK_SIZE], to[CLOCK_SIZE], other[CLOCK_SIZE];
    int start, end, total = 0;
    bool complete = true;
    if (r->shift.start_minute == KEEL_ABSENT || r->shift.minutes == KEEL_ABSENT)
        return KEEL_ABSENT;
    nurse_span(r, n, &start, &end);
    clock_text(r, start, from);
    clock_text(r, end, to);
    for (size_t k = 0; k < n->nbreaks; k++) {
        const keel_break *b = &n->breaks[k];
        const node *entry = list->items[k];
        if (b->at == KEEL_ABSENT || b->minutes == KEEL_ABSENT) {
            complete = false;
            continue;
        }
        keel_roster_report_set_path(ld, "nurses", i, "breaks");
        keel_roster_report_push_index(ld, k);
        clock_text(r, b->at, at);
        if (before)
            clock_text(r, before->at, other);
        if (b->at < start || b->at >= end) {
            keel_roster_report_push_key(ld, "at");
            keel_roster_report_problem(
                ld, keel_roster_tree_find(entry, "at")->mark,
                "the break at %s is outside the nurse's time on the unit (%s to %s); expected "
                "a break that starts from %s and before %s",
                at, from, to, from, to);
        } else if (b->at + b->minutes > end) {
            keel_roster_report_push_key(ld, "minutes");
            keel_roster_report_problem(
                ld, keel_roster_tree_find(entry, "minutes")->mark,
                "a %d-minute break at %s runs past the nurse's end at %s; expected at most %d",
                b->minutes, at, to, end - b->at);
        } else if (before && b->at < before->at) {
            keel_roster_report_push_key(ld, "at");
            keel_roster_report_problem(
                ld, keel_roster_tree_find(entry, "at")->mark,
                "the break at %s comes before the break at %s (breaks[%zu]); expected the "
                "breaks in time order",
                at, other, before_index);
        } else if (before && b->at < before->at + before->minutes) {
            char ends[CLOCK_SIZE];
            keel_roster_report_push_key(ld, "at");
            keel_roster_report_problem(
                ld, keel_roster_tree_find(entry, "at")->mark,
                "the break at %s starts before the %d-minute break at %s (breaks[%zu]) ends "
                "at %s; expected breaks that do not overlap",
                at, before->minutes, other, before_index,
                clock_text(r, before->at + before->minutes, ends));
        } else {
            total += b->minutes;
            before = b;
            before_index = k;
            continue;
        }
        complete = false;
    }
    if (!complete)
        return KEEL_ABSENT;
    if (n->break_minutes != KEEL_ABSENT && n->break_minutes != total) {
        keel_roster_report_set_path(ld, "nurses", i, "break_minutes");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "break_minutes")->mark,
            "%d break minutes, but the breaks add up to %d; expected %d, or no break_minutes",
            n->break_minutes, total, total);
    }
    return total;
}

/* A break buddy is another nurse of the roster. */
static void check_covers(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_nurse *n = &r->nurses[i];
    const node *given = keel_roster_tree_find(item, "covers");
    char shown[SHOWN_SIZE];
    if (!n->covers)
        return;
    int k = keel_roster_find_nurse(r, n->covers);
    keel_roster_report_set_path(ld, "nurses", i, "covers");
    if (k < 0)
        keel_roster_report_problem(ld, given->mark, "no nurse '%s' on this roster",
                                   keel_roster_report_show(shown, n->covers));
    else if ((size_t)k == i || (n->id && strcmp(n->id, n->covers) == 0))
        keel_roster_report_problem(
            ld, given->mark,
            "'%s' is this nurse's own id; expected the id of another nurse, whose patients "
            "this nurse holds during that nurse's breaks",
            keel_roster_report_show(shown, n->covers));
}

/* A patient's own arrival comes before the departure (a patient who
 * arrives as the shift ends, or leaves as it starts, is not on it). */
static void check_patient_times(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const char *arrival = p->expected ? "at" : "arrives_at";
    char from[CLOCK_SIZE], to[CLOCK_SIZE];
    if (!time_read(item, arrival, p->arrives_at) || !time_read(item, "leaves_at", p->leaves_at) ||
        (p->arrives_at == KEEL_ABSENT && p->leaves_at == KEEL_ABSENT) ||
        r->shift.minutes == KEEL_ABSENT)
        return;
    int arrives = p->arrives_at == KEEL_ABSENT ? 0 : p->arrives_at;
    int leaves = p->leaves_at == KEEL_ABSENT ? r->shift.minutes : p->leaves_at;
    if (arrives < leaves)
        return;
    clock_text(r, arrives, from);
    clock_text(r, leaves, to);
    if (p->arrives_at != KEEL_ABSENT && p->leaves_at != KEEL_ABSENT) {
        keel_roster_keys_patient_path(ld, i, "leaves_at");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "leaves_at")->mark,
            "%s is not after the patient's arrival at %s; expected a departure later than "
            "the arrival",
            to, from);
    } else if (p->arrives_at != KEEL_ABSENT) {
        keel_roster_keys_patient_path(ld, i, arrival);
        keel_roster_report_problem(ld, keel_roster_tree_find(item, arrival)->mark,
                                   "%s is when the shift ends; expected an arrival before %s", from,
                                   to);
    } else {
        keel_roster_keys_patient_path(ld, i, "leaves_at");
        keel_roster_report_problem(ld, keel_roster_tree_find(item, "leaves_at")->mark,
                                   "%s is when the shift starts; expected a departure after %s", to,
                                   from);
    }
}

/* Planned hand-offs follow the patient's nurse: each names a nurse of the
 * roster other than the one just before it. */
static void check_handoffs(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const node *list = keel_roster_tree_find(item, "handoffs");
    char shown[SHOWN_SIZE];
    if (p->nhandoffs == 0)
        return;
    if (!keel_roster_tree_find(item, "nurse")) {
        keel_roster_keys_patient_path(ld, i, "handoffs");
        keel_roster_report_problem(
            ld, list->mark,
            "hand-offs without a nurse; expected nurse: the id of the nurse who has the "
            "patient first");
        return;
    }
    for (size_t k = 0; k < p->nhandoffs; k++) {
        const char *id = p->handoffs[k], *before = k ? p->handoffs[k - 1] : p->nurse;
        if (!id)
            continue;
        keel_roster_keys_patient_path(ld, i, "handoffs");
        keel_roster_report_push_index(ld, k);
        if (r->nnurses && keel_roster_find_nurse(r, id) < 0)
            keel_roster_report_problem(ld, list->items[k]->mark, "no nurse '%s' on this roster",
                                       keel_roster_report_show(shown, id));
        else if (before && strcmp(before, id) == 0 && k == 0)
            keel_roster_report_problem(
                ld, list->items[k]->mark,
                "'%s' is the patient's nurse already; expected a hand-off to another nurse",
                keel_roster_report_show(shown, id));
        else if (before && strcmp(before, id) == 0)
            keel_roster_report_problem(
                ld, list->items[k]->mark,
                "'%s' already has the patient from handoffs[%zu]; expected a hand-off to "
                "another nurse",
                keel_roster_report_show(shown, id), k - 1);
    }
}

/* Reports that a nurse's break (her break_minutes, her timed breaks or the
 * shift's break) leaves no time in her `minutes` on the unit: at the key
 * that gives the break, else at minutes_key, the key that gives her time
 * (NULL: the shift's length, reported with the shift). */
static void report_break_fills(loader *ld, size_t i, const node *item, int minutes,
                               int break_minutes, const char *minutes_key)
{
    const keel_nurse *n = &ld->roster->nurses[i];
    if (n->break_minutes != KEEL_ABSENT) {
        keel_roster_report_set_path(ld, "nurses", i, "break_minutes");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "break_minutes")->mark,
            "a %d-minute break leaves no time in %d minutes on the unit; expected less than %d",
            break_minutes, minutes, minutes);
    } else if (n->nbreaks) {
        keel_roster_report_set_path(ld, "nurses", i, "breaks");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "breaks")->mark,
            "breaks of %d minutes in all leave no time in %d minutes on the unit; expected "
            "less than %d",
            break_minutes, minutes, minutes);
    } else if (minutes_key) {
        keel_roster_report_set_path(ld, "nurses", i, minutes_key);
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, minutes_key)->mark,
            "%d minutes on the unit leave no time after the shift's %d-minute break; "
            "expected more than %d, or break_minutes for this nurse",
            minutes, break_minutes, break_minutes);
    }
}

/* A nurse's time on the unit must fit the shift, and the nurse's break and
 * duty minutes must fit that time.  A nurse with her own start or end is on
 * the unit from start to end; breaks is her timed breaks' total (or
 * KEEL_ABSENT).  Only the checks use these figures: the roster keeps the
 * fields as given, and the workload module applies the defaults. */
static void check_nurse_minutes(loader *ld, size_t i, const node *item, int breaks)
{
    const keel_roster *r = ld->roster;
    const keel_nurse *n = &r->nurses[i];
    bool timed = n->start != KEEL_ABSENT || n->end != KEEL_ABSENT;
    int start, end;
    nurse_span(r, n, &start, &end);
    int minutes = timed ? end - start : n->minutes == KEEL_ABSENT ? r->shift.minutes : n->minutes;
    const char *minutes_key = n->minutes != KEEL_ABSENT ? "minutes"
                              : n->end != KEEL_ABSENT   ? "end"
                                                        : "start";
    int shift_break = r->shift.break_minutes == KEEL_ABSENT ? 0 : r->shift.break_minutes;
    int break_minutes = n->break_minutes != KEEL_ABSENT ? n->break_minutes
                        : n->nbreaks                    ? breaks
                                                        : shift_break;
    if (minutes == KEEL_ABSENT)
        return;
    if (!timed && r->shift.minutes != KEEL_ABSENT && minutes > r->shift.minutes) {
        keel_roster_report_set_path(ld, "nurses", i, "minutes");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "minutes")->mark,
            "%d minutes on the unit exceed the %d-minute shift; expected at most %d", minutes,
            r->shift.minutes, r->shift.minutes);
        return;
    }
    if (break_minutes != KEEL_ABSENT && break_minutes >= minutes)
        report_break_fills(ld, i, item, minutes, break_minutes,
                           n->minutes != KEEL_ABSENT || timed ? minutes_key : NULL);
    if (n->duty_minutes != KEEL_ABSENT && n->duty_minutes > minutes) {
        keel_roster_report_set_path(ld, "nurses", i, "duty_minutes");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(item, "duty_minutes")->mark,
            "%d duty minutes exceed the %d minutes on the unit; expected at most %d",
            n->duty_minutes, minutes, minutes);
    }
}

/* The id of list item i must differ from those before it.  what names the
 * list's entries ("nurse"). */
static void check_unique_id(loader *ld, const node *list, size_t i, const char *what)
{
    const node *id = keel_roster_tree_find(list->items[i], "id");
    char shown[SHOWN_SIZE], key[16];
    if (!id || id->kind != NODE_SCALAR || keel_roster_tree_is_null(id) ||
        keel_roster_tree_is_placeholder(id))
        return;
    for (size_t j = 0; j < i; j++) {
        const node *other = keel_roster_tree_find(list->items[j], "id");
        if (other && other->kind == NODE_SCALAR && !keel_roster_tree_is_null(other) &&
            strcmp(other->text, id->text) == 0) {
            snprintf(key, sizeof key, "%ss", what);
            keel_roster_report_set_path(ld, key, i, "id");
            keel_roster_report_problem(
                ld, id->mark, "%s id '%s' is already used on line %d; expected a unique id", what,
                keel_roster_report_show(shown, id->text), other->mark.line);
            return;
        }
    }
}

/* True when the nurse's role is known: absent (staff) or read without a
 * problem.  A role already reported is not reported again through its
 * preceptor. */
static bool role_is_known(const keel_nurse *n, const node *item)
{
    const node *role = keel_roster_tree_find(item, "role");
    return !role || (role->kind == NODE_SCALAR && strcmp(role->text, keel_role_name(n->role)) == 0);
}

/* An orientee works under a preceptor: another nurse on the roster who is
 * not an orientee.  Nobody else has a preceptor. */
static void check_preceptor(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_nurse *n = &r->nurses[i];
    const node *given = keel_roster_tree_find(item, "preceptor");
    char shown[SHOWN_SIZE];
    if (!role_is_known(n, item))
        return;
    keel_roster_report_set_path(ld, "nurses", i, "preceptor");
    if (n->role == KEEL_ROLE_ORIENTEE && !given) {
        keel_roster_report_problem(
            ld, item->mark,
            "missing; an orientee needs a preceptor, the id of a nurse on this roster who "
            "is not an orientee");
        return;
    }
    if (!n->preceptor)
        return;
    int k = keel_roster_find_nurse(r, n->preceptor);
    if (n->role != KEEL_ROLE_ORIENTEE)
        keel_roster_report_problem(
            ld, given->mark,
            "a preceptor is given but the role is %s; expected role: orientee, or no "
            "preceptor",
            keel_role_name(n->role));
    else if (k < 0)
        keel_roster_report_problem(ld, given->mark, "no nurse '%s' on this roster",
                                   keel_roster_report_show(shown, n->preceptor));
    else if ((size_t)k == i || (n->id && strcmp(n->id, n->preceptor) == 0))
        keel_roster_report_problem(
            ld, given->mark,
            "'%s' is this nurse's own id; expected the id of another nurse who is not an "
            "orientee",
            keel_roster_report_show(shown, n->preceptor));
    else if (r->nurses[k].role == KEEL_ROLE_ORIENTEE)
        keel_roster_report_problem(
            ld, given->mark,
            "nurse '%s' is an orientee too; expected a preceptor who is not an orientee",
            keel_roster_report_show(shown, n->preceptor));
}

static void check_nurses(loader *ld, const node *list)
{
    for (size_t i = 0; i < ld->roster->nnurses; i++) {
        if (list->items[i]->kind != NODE_MAPPING)
            continue;
        check_unique_id(ld, list, i, "nurse");
        if (check_nurse_span(ld, i, list->items[i])) {
            int breaks = ld->roster->nurses[i].nbreaks ? check_breaks(ld, i, list->items[i]) : 0;
            check_nurse_minutes(ld, i, list->items[i], breaks);
        }
        check_preceptor(ld, i, list->items[i]);
        check_covers(ld, i, list->items[i]);
    }
}

/* Writes the levels of policy.acuity_minutes as ranges, like "1-5" or "1-3, 5". */
static void format_levels(const keel_roster *r, char *buf, size_t size)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < r->policy.nacuity && used < size; i++) {
        size_t last = i;
        while (last + 1 < r->policy.nacuity &&
               r->policy.acuity_minutes[last + 1].level == r->policy.acuity_minutes[last].level + 1)
            last++;
        int first_level = r->policy.acuity_minutes[i].level;
        int last_level = r->policy.acuity_minutes[last].level;
        if (last == i)
            snprintf(buf + used, size - used, "%s%d", used ? ", " : "", first_level);
        else
            snprintf(buf + used, size - used, "%s%d-%d", used ? ", " : "", first_level, last_level);
        used = strlen(buf);
        i = last;
    }
}

static void check_acuity(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    char levels[128];
    if (p->acuity == KEEL_ABSENT || ld->acuity_table != TABLE_READ || r->policy.nacuity == 0)
        return;
    for (size_t k = 0; k < r->policy.nacuity; k++)
        if (r->policy.acuity_minutes[k].level == p->acuity)
            return;
    format_levels(r, levels, sizeof levels);
    keel_roster_keys_patient_path(ld, i, "acuity");
    keel_roster_report_problem(ld, keel_roster_tree_find(item, "acuity")->mark,
                               "level %d is not in policy.acuity_minutes (%s)", p->acuity, levels);
}

/* Each entry of patients[i].nas is an item code of the instrument, each
 * item scored once and one level per item. */
static void check_nas(loader *ld, size_t i, const node *item)
{
    const keel_patient *p = &ld->roster->patients[i];
    const node *list = keel_roster_tree_find(item, "nas");
    keel_nas_sheet sheet;
    char message[256];
    if (!list || list->kind != NODE_SEQUENCE || p->nnas == 0)
        return;
    keel_nas_sheet_init(&sheet);
    for (size_t k = 0; k < p->nnas; k++) {
        size_t earlier = k;
        keel_nas_problem problem = keel_nas_sheet_add(&sheet, p->nas[k], &earlier);
        /* A repeated code is reported by the list reader already. */
        if (problem == KEEL_NAS_OK || problem == KEEL_NAS_DUPLICATE || !p->nas[k])
            continue;
        keel_nas_problem_format(problem, p->nas[k], p->nas[earlier], message, sizeof message);
        keel_roster_keys_patient_path(ld, i, "nas");
        keel_roster_report_push_index(ld, k);
        keel_roster_report_problem(ld, list->items[k]->mark, "%s", message);
    }
}

static bool has_extra(const keel_roster *r, const char *name)
{
    for (size_t k = 0; k < r->policy.nextras; k++)
        if (strcmp(r->policy.extra_minutes[k].name, name) == 0)
            return true;
    return false;
}

static void check_extras(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const node *list = keel_roster_tree_find(item, "extras");
    char shown[SHOWN_SIZE], names[256] = "";
    if (ld->extra_table == TABLE_BROKEN)
        return;
    for (size_t k = 0; k < r->policy.nextras; k++) {
        const char *name = r->policy.extra_minutes[k].name;
        if (strlen(names) + strlen(name) + 8 < sizeof names)
            strcat(strcat(names, k ? ", " : ""), name);
    }
    for (size_t e = 0; e < p->nextras; e++) {
        if (!p->extras[e] || has_extra(r, p->extras[e]))
            continue;
        keel_roster_keys_patient_path(ld, i, "extras");
        keel_roster_report_push_index(ld, e);
        if (r->policy.nextras == 0)
            keel_roster_report_problem(
                ld, list->items[e]->mark,
                "unknown extra '%s'; expected a name from policy.extra_minutes, which has none",
                keel_roster_report_show(shown, p->extras[e]));
        else
            keel_roster_report_problem(ld, list->items[e]->mark,
                                       "unknown extra '%s'; expected one of %s",
                                       keel_roster_report_show(shown, p->extras[e]), names);
    }
}

static void check_patient_nurse(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    char shown[SHOWN_SIZE];
    if (!p->nurse || r->nnurses == 0 || keel_roster_find_nurse(r, p->nurse) >= 0)
        return;
    keel_roster_keys_patient_path(ld, i, "nurse");
    keel_roster_report_problem(ld, keel_roster_tree_find(item, "nurse")->mark,
                               "no nurse '%s' on this roster",
                               keel_roster_report_show(shown, p->nurse));
}

/* A locked patient keeps the nurse it names. */
static void check_lock(loader *ld, size_t i, const node *item)
{
    if (!ld->roster->patients[i].lock || keel_roster_tree_find(item, "nurse"))
        return;
    keel_roster_keys_patient_path(ld, i, "lock");
    keel_roster_report_problem(
        ld, keel_roster_tree_find(item, "lock")->mark,
        "lock: true without a nurse; a locked patient needs nurse: the id of the nurse who "
        "keeps the patient");
}

/* Every nurse a patient avoids is on the roster, and a locked patient is
 * not locked to one of them.  (An unlocked patient's nurse on its avoid
 * list is a plan that breaks a rule: keel check reports it.) */
static void check_avoid(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const node *list = keel_roster_tree_find(item, "avoid");
    char shown[SHOWN_SIZE];
    for (size_t a = 0; a < p->navoid; a++) {
        if (!p->avoid[a])
            continue;
        if (keel_roster_find_nurse(r, p->avoid[a]) < 0) {
            keel_roster_keys_patient_path(ld, i, "avoid");
            keel_roster_report_push_index(ld, a);
            keel_roster_report_problem(ld, list->items[a]->mark, "no nurse '%s' on this roster",
                                       keel_roster_report_show(shown, p->avoid[a]));
        } else if (p->lock && p->nurse && strcmp(p->nurse, p->avoid[a]) == 0) {
            keel_roster_keys_patient_path(ld, i, "nurse");
            keel_roster_report_problem(
                ld, keel_roster_tree_find(item, "nurse")->mark,
                "the patient is locked to '%s', who is on its avoid list (avoid[%zu] on line "
                "%d); expected a nurse the patient does not avoid",
                keel_roster_report_show(shown, p->nurse), a, list->items[a]->mark.line);
        }
    }
}

/* The id of roster->patients[i] differs from those before it, across the
 * patients and the expected admissions. */
static void check_unique_patient_id(loader *ld, size_t i)
{
    const node *id = keel_roster_tree_find(keel_roster_keys_patient_node(ld, i), "id");
    char shown[SHOWN_SIZE];
    if (!id || id->kind != NODE_SCALAR || keel_roster_tree_is_null(id) ||
        keel_roster_tree_is_placeholder(id))
        return;
    for (size_t j = 0; j < i; j++) {
        const node *other = keel_roster_tree_find(keel_roster_keys_patient_node(ld, j), "id");
        if (other && other->kind == NODE_SCALAR && !keel_roster_tree_is_null(other) &&
            strcmp(other->text, id->text) == 0) {
            keel_roster_keys_patient_path(ld, i, "id");
            keel_roster_report_problem(
                ld, id->mark, "patient id '%s' is already used on line %d; expected a unique id",
                keel_roster_report_show(shown, id->text), other->mark.line);
            return;
        }
    }
}

static void check_patients(loader *ld)
{
    for (size_t i = 0; i < ld->roster->npatients; i++) {
        const node *item = keel_roster_keys_patient_node(ld, i);
        if (item->kind != NODE_MAPPING)
            continue;
        check_unique_patient_id(ld, i);
        if (!keel_roster_tree_find(item, "acuity") &&
            !keel_roster_tree_find(item, "care_minutes") && !keel_roster_tree_find(item, "nas")) {
            keel_roster_keys_patient_path(ld, i, "acuity");
            keel_roster_report_problem(ld, item->mark,
                                       "missing; every patient needs acuity, care_minutes or nas");
        }
        check_acuity(ld, i, item);
        check_nas(ld, i, item);
        check_extras(ld, i, item);
        check_patient_nurse(ld, i, item);
        check_lock(ld, i, item);
        if (ld->roster->nnurses)
            check_avoid(ld, i, item);
        check_patient_times(ld, i, item);
        check_handoffs(ld, i, item);
    }
}

/* Patients that give an acuity level need the policy's scale: keel has none
 * of its own.  Reported once, where policy.acuity_minutes would go. */
static void check_acuity_scale(loader *ld, const node *root)
{
    const keel_roster *r = ld->roster;
    const node *policy = keel_roster_tree_find(root, "policy");
    if (ld->acuity_table != TABLE_ABSENT)
        return;
    for (size_t i = 0; i < r->npatients; i++) {
        if (r->patients[i].acuity == KEEL_ABSENT)
            continue;
        keel_roster_keys_patient_path(ld, i, NULL);
        char entry[MAX_PATH];
        snprintf(entry, sizeof entry, "%s", ld->path);
        keel_roster_report_pop_path(ld, 0);
        keel_roster_report_push_key(ld, "policy");
        keel_roster_report_push_key(ld, "acuity_minutes");
        keel_roster_report_problem(
            ld, policy ? policy->mark : root->mark,
            "missing, but %s on line %d gives an acuity level; expected care minutes per "
            "level, as keel has no acuity scale of its own",
            entry,
            keel_roster_tree_find(keel_roster_keys_patient_node(ld, i), "acuity")->mark.line);
        return;
    }
}

/* A limit of value at node at (key path already set) must not be looser
 * than the selected table's per-nurse maximum. */
static void check_not_looser(loader *ld, const node *at, int value, const char *what)
{
    const keel_roster *r = ld->roster;
    const keel_law_table *t = r->policy.ratio_table;
    int law = keel_law_nurse_max(t, r->unit.type);
    if (law < 0 || value == KEEL_ABSENT || value <= law)
        return;
    keel_roster_report_problem(
        ld, at->mark,
        "%s%d is looser than the %s table (%s, 1:%d for %s as encoded on %s); expected at "
        "most %d",
        what, value, t->name, t->citation, law, r->unit.type, t->encoded, law);
}

/* policy.ratio_table needs a unit type it covers (and, for a table that
 * tells shifts apart, the shift's start); no limit in the roster may be
 * looser than the table's. */
static void check_ratio_table(loader *ld, const node *root)
{
    const keel_roster *r = ld->roster;
    const keel_law_table *t = r->policy.ratio_table;
    const node *policy = keel_roster_tree_find(root, "policy");
    char covered[256] = "";
    if (!t)
        return;
    for (size_t i = 0, used = 0; i < t->nentries && used < sizeof covered; i++) {
        if (strstr(covered, t->entries[i].unit_type))
            continue;
        snprintf(covered + used, sizeof covered - used, "%s%s", used ? ", " : "",
                 t->entries[i].unit_type);
        used = strlen(covered);
    }
    keel_roster_report_pop_path(ld, 0);
    keel_roster_report_push_key(ld, "policy");
    keel_roster_report_push_key(ld, "ratio_table");
    const node *at = keel_roster_tree_find(policy, "ratio_table");
    if (!r->unit.type) {
        keel_roster_report_problem(
            ld, at->mark,
            "the %s table needs unit.type to know which entry applies; expected unit.type, "
            "one of %s",
            t->name, covered);
        return;
    }
    if (!keel_law_covers(t, r->unit.type)) {
        keel_roster_report_problem(
            ld, at->mark,
            "the %s table as encoded on %s has no entry for unit type '%s'; expected a unit "
            "of type %s, or no ratio_table",
            t->name, t->encoded, r->unit.type, covered);
        return;
    }
    if (t->classes && r->shift.start_minute == KEEL_ABSENT)
        keel_roster_report_problem(
            ld, at->mark,
            "the %s table differs by shift (%s); expected shift.start to tell which applies",
            t->name, t->classes);
    if (r->policy.max_patients != KEEL_ABSENT) {
        keel_roster_report_pop_path(ld, 0);
        keel_roster_report_push_key(ld, "policy");
        keel_roster_report_push_key(ld, "max_patients");
        check_not_looser(ld, keel_roster_tree_find(policy, "max_patients"), r->policy.max_patients,
                         "max_patients ");
    }
    const node *roles = keel_roster_tree_find(policy, "roles");
    for (size_t i = 0; roles && roles->kind == NODE_MAPPING && i + 1 < roles->nitems; i += 2) {
        const node *key = roles->items[i],
                   *limit = keel_roster_tree_find(roles->items[i + 1], "max_patients");
        long value;
        if (!limit || !keel_roster_words_scan_int(limit, &value) || key->kind != NODE_SCALAR)
            continue;
        keel_roster_report_pop_path(ld, 0);
        keel_roster_report_push_key(ld, "policy");
        keel_roster_report_push_key(ld, "roles");
        keel_roster_report_push_key(ld, key->text);
        keel_roster_report_push_key(ld, "max_patients");
        check_not_looser(ld, limit, (int)value, "max_patients ");
    }
    const node *nurses = keel_roster_tree_find(root, "nurses");
    for (size_t i = 0; i < r->nnurses; i++) {
        if (r->nurses[i].max_patients == KEEL_ABSENT)
            continue;
        keel_roster_report_set_path(ld, "nurses", i, "max_patients");
        check_not_looser(ld, keel_roster_tree_find(nurses->items[i], "max_patients"),
                         r->nurses[i].max_patients, "max_patients ");
    }
    for (size_t i = 0; i < r->npatients; i++) {
        if (r->patients[i].ratio == KEEL_ABSENT)
            continue;
        keel_roster_keys_patient_path(ld, i, "ratio");
        check_not_looser(ld, keel_roster_tree_find(keel_roster_keys_patient_node(ld, i), "ratio"),
                         r->patients[i].ratio, "ratio 1:");
    }
}

static void check_roster(loader *ld, const node *root)
{
    const node *nurses = keel_roster_tree_find(root, "nurses");
    const node *policy = keel_roster_tree_find(root, "policy");
    if (policy && policy->kind != NODE_MAPPING) {
        ld->acuity_table = TABLE_BROKEN;
        ld->extra_table = TABLE_BROKEN;
    }
    ld->patient_list = keel_roster_tree_find(root, "patients");
    ld->expected_list = keel_roster_tree_find(root, "expected_admissions");
    keel_roster_keys_merge_expected(ld);
    convert_times(ld, root);
    check_shift_break(ld, root);
    if (ld->roster->nnurses)
        check_nurses(ld, nurses);
    if (ld->roster->npatients) {
        check_patients(ld);
        check_acuity_scale(ld, root);
    }
    check_ratio_table(ld, root);
    keel_roster_report_pop_path(ld, 0);
}

/* ---------------------------------------------------------------------------
 * The public functions
 */

static keel_roster *new_roster(const char *name)
{
    keel_roster *r = keel_calloc(1, sizeof *r);
    if (!r)
        return NULL;
    r->shift.start_minute = KEEL_ABSENT;
    r->shift.minutes = KEEL_ABSENT;
    r->shift.break_minutes = KEEL_ABSENT;
    r->policy.max_patients = KEEL_ABSENT;
    for (size_t i = 0; i < KEEL_NROLES; i++)
        r->policy.roles[i] = (keel_role_policy){KEEL_ABSENT, KEEL_ABSENT};
    r->policy.high_acuity.level = KEEL_ABSENT;
    r->policy.high_acuity.max_per_nurse = KEEL_ABSENT;
    r->policy.isolation_separation = true;
    r->policy.max_zones = KEEL_ABSENT;
    r->policy.balance_tolerance = KEEL_ABSENT;
    r->policy.min_patients = KEEL_ABSENT;
    r->policy.max_utilisation = KEEL_ABSENT;
    r->path = keel_strdup(name);
    if (!r->path) {
        free(r);
        return NULL;
    }
    return r;
}

static void free_names(char **names, size_t count)
{
    for (size_t i = 0; names && i < count; i++)
        free(names[i]);
    free(names);
}

void keel_patient_fini(keel_patient *p)
{
    free(p->id);
    free(p->bed);
    free(p->name);
    free_names(p->extras, p->nextras);
    free_names(p->needs, p->nneeds);
    free(p->nurse);
    free_names(p->avoid, p->navoid);
    free(p->room);
    free(p->zone);
    free(p->previous_nurse);
    free_names(p->nas, p->nnas);
    free_names(p->handoffs, p->nhandoffs);
}

void keel_roster_free(keel_roster *roster)
{
    if (!roster)
        return;
    for (size_t i = 0; i < roster->nnurses; i++) {
        keel_nurse *n = &roster->nurses[i];
        free(n->id);
        free(n->name);
        free_names(n->skills, n->nskills);
        free(n->preceptor);
        free(n->breaks);
        free(n->covers);
    }
    free(roster->nurses);
    for (size_t i = 0; i < roster->npatients; i++)
        keel_patient_fini(&roster->patients[i]);
    free(roster->patients);
    for (size_t i = 0; i < KEEL_NISOLATION; i++)
        free_names(roster->policy.isolation_needs[i], roster->policy.nisolation_needs[i]);
    for (size_t i = 0; i < roster->policy.nextras; i++)
        free(roster->policy.extra_minutes[i].name);
    free(roster->policy.extra_minutes);
    free(roster->policy.acuity_minutes);
    free(roster->shift.label);
    free(roster->shift.date);
    free(roster->unit.name);
    free(roster->unit.type);
    free(roster->path);
    free(roster);
}

/* Puts this load's problems in file order (line, then column), keeping the
 * order of problems at the same place. */
static bool comes_after(const keel_problem *a, const keel_problem *b)
{
    return a->line > b->line || (a->line == b->line && a->column > b->column);
}

static void sort_problems(loader *ld)
{
    keel_problem *p = ld->err ? ld->err->problems : NULL;
    for (size_t i = ld->first_problem + 1; p && i < ld->err->nproblems; i++) {
        keel_problem moved = p[i];
        size_t j = i;
        for (; j > ld->first_problem && comes_after(&p[j - 1], &moved); j--)
            p[j] = p[j - 1];
        p[j] = moved;
    }
}

/* Turns the loader's outcome into a status; hands over or frees roster. */
static keel_status finish(loader *ld, keel_roster *roster, keel_roster **out)
{
    if (ld->nomem) {
        keel_roster_free(roster);
        return keel_error_add(ld->err, KEEL_ERR_NOMEM, ld->file, 0, 0, NULL, "out of memory");
    }
    if (ld->nproblems) {
        sort_problems(ld);
        keel_roster_free(roster);
        return KEEL_ERR_INPUT;
    }
    *out = roster;
    return KEEL_OK;
}

keel_status keel_roster_parse(const char *name, const char *text, size_t len, keel_roster **out,
                              keel_error *err)
{
    loader ld = {.file = name,
                 .text = text,
                 .len = len,
                 .err = err,
                 .first_problem = err ? err->nproblems : 0};
    node *root = NULL;
    if (!out || !name || (!text && len))
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "keel_roster_parse: out, name and text are required");
    *out = NULL;
    ld.roster = new_roster(name);
    if (!ld.roster) {
        ld.nomem = true;
        return finish(&ld, ld.roster, out);
    }
    if (keel_roster_tree_read(&ld, &root)) {
        keel_roster_keys_read(&ld, root);
        check_roster(&ld, root);
    }
    keel_roster_tree_free(root);
    return finish(&ld, ld.roster, out);
}

/* Reads the whole file at path into a new buffer. */
keel_status keel_read_file(const char *path, char **text, size_t *len, keel_error *err)
{
    size_t capacity = 0, used = 0;
    char *buf = NULL;
    FILE *f = fopen(path, "rb");
    if (!f)
        return keel_error_add(err, KEEL_ERR_IO, path, 0, 0, NULL, "cannot open: %s",
                              strerror(errno));
    for (size_t got = 1; got > 0; used += got) {
        char *grown = used < capacity ? buf : keel_realloc(buf, capacity = 2 * capacity + 4096);
        if (!grown) {
            free(buf);
            fclose(f);
            return keel_error_add(err, KEEL_ERR_NOMEM, path, 0, 0, NULL, "out of memory");
        }
        buf = grown;
        got = fread(buf + used, 1, capacity - used, f);
    }
    if (ferror(f)) {
        int saved = errno;
        free(buf);
        fclose(f);
        return keel_error_add(err, KEEL_ERR_IO, path, 0, 0, NULL, "cannot read: %s",
                              strerror(saved));
    }
    fclose(f);
    *text = buf;
    *len = used;
    return KEEL_OK;
}

keel_status keel_roster_load(const char *path, keel_roster **out, keel_error *err)
{
    char *text = NULL;
    size_t len = 0;
    if (!out || !path)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "keel_roster_load: out and path are required");
    *out = NULL;
    keel_status rc = keel_read_file(path, &text, &len, err);
    if (rc)
        return rc;
    rc = keel_roster_parse(path, text, len, out, err);
    free(text);
    return rc;
}

int keel_roster_find_nurse(const keel_roster *roster, const char *id)
{
    for (size_t i = 0; roster && id && i < roster->nnurses; i++)
        if (roster->nurses[i].id && strcmp(roster->nurses[i].id, id) == 0)
            return (int)i;
    return -1;
}

int keel_roster_acuity_minutes(const keel_roster *roster, int level)
{
    for (size_t i = 0; roster && i < roster->policy.nacuity; i++)
        if (roster->policy.acuity_minutes[i].level == level)
            return roster->policy.acuity_minutes[i].minutes;
    return KEEL_ABSENT;
}

int keel_roster_extra_minutes(const keel_roster *roster, const char *name)
{
    for (size_t i = 0; roster && name && i < roster->policy.nextras; i++)
        if (strcmp(roster->policy.extra_minutes[i].name, name) == 0)
            return roster->policy.extra_minutes[i].minutes;
    return KEEL_ABSENT;
}

bool keel_nurse_has_skill(const keel_nurse *nurse, const char *skill)
{
    for (size_t i = 0; i < nurse->nskills; i++)
        if (strcmp(nurse->skills[i], skill) == 0)
            return true;
    return false;
}

void keel_time_text(const keel_roster *r, int offset, char buf[KEEL_TIME_SIZE])
{
    if (r->shift.start_minute == KEEL_ABSENT) {
        snprintf(buf, KEEL_TIME_SIZE, "+%d min", offset);
        return;
    }
    int minute = (r->shift.start_minute + offset) % 1440;
    snprintf(buf, KEEL_TIME_SIZE, "%02d:%02d", minute / 60, minute % 60);
}
