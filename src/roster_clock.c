/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_clock.c - the shift's clock: the nurses' and patients' own times
 * (start, end, breaks, arrivals, departures), read as times of day, become
 * minutes after the shift's start (keel_roster_clock_convert()), which is
 * what the roster keeps; then each nurse's and patient's times are checked
 * against each other and against the shift.  Runs after the walk.
 */
#include <stdio.h>
#include <string.h>

#include "roster_internal.h"
#include "roster_loader.h"

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
void keel_roster_clock_convert(loader *ld, const node *root)
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
        const node *record = keel_roster_tree_find(item, "record");
        for (size_t k = 0; k < p->nrecord; k++) {
            keel_stretch *st = &p->record[k];
            keel_roster_keys_patient_path(ld, i, "record");
            size_t old = keel_roster_report_push_index(ld, k);
            keel_roster_report_push_key(ld, "from");
            convert_time(ld, shift, keel_roster_tree_find(record->items[k], "from"), false,
                         &st->from);
            keel_roster_report_pop_path(ld, old);
            keel_roster_report_push_key(ld, "to");
            convert_time(ld, shift, keel_roster_tree_find(record->items[k], "to"), true, &st->to);
        }
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

/* A patient's own arrival comes before the departure (a patient who
 * arrives as the shift ends, or leaves as it starts, is not on it). */
void keel_roster_clock_check_patient(loader *ld, size_t i, const node *item)
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

/* Sets the path to patients[i].record[k].key and returns where key is. */
static keel_mark stretch_at(loader *ld, size_t i, const node *item, size_t k, const char *key)
{
    const node *entry = keel_roster_tree_find(item, "record")->items[k];
    keel_roster_keys_patient_path(ld, i, "record");
    keel_roster_report_push_index(ld, k);
    keel_roster_report_push_key(ld, key);
    return keel_roster_tree_find(entry, key)->mark;
}

/* A patient's record covers her stay from her arrival without gaps: each
 * stretch ends after it starts, the first starts when she arrives, each
 * next one when the one before it ends, and none ends after she leaves. */
void keel_roster_clock_check_record(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const char *arrival = p->expected ? "at" : "arrives_at";
    char from[CLOCK_SIZE], to[CLOCK_SIZE], edge[CLOCK_SIZE];
    if (p->nrecord == 0 || r->shift.minutes == KEEL_ABSENT ||
        r->shift.start_minute == KEEL_ABSENT || !time_read(item, arrival, p->arrives_at) ||
        !time_read(item, "leaves_at", p->leaves_at))
        return;
    int arrives = p->arrives_at == KEEL_ABSENT ? 0 : p->arrives_at;
    int leaves = p->leaves_at == KEEL_ABSENT ? r->shift.minutes : p->leaves_at;
    for (size_t k = 0; k < p->nrecord; k++) {
        const keel_stretch *st = &p->record[k];
        if (st->from == KEEL_ABSENT || st->to == KEEL_ABSENT)
            return; /* reported already; the rest cannot be judged */
        clock_text(r, st->from, from);
        clock_text(r, st->to, to);
        int before = k ? p->record[k - 1].to : arrives;
        clock_text(r, before, edge);
        if (st->from >= st->to)
            keel_roster_report_problem(ld, stretch_at(ld, i, item, k, "to"),
                                       "%s is not after the stretch's start at %s; expected a "
                                       "stretch that ends after it starts",
                                       to, from);
        else if (k == 0 && st->from != arrives)
            keel_roster_report_problem(ld, stretch_at(ld, i, item, k, "from"),
                                       "the record starts at %s, but the patient is here from "
                                       "%s; expected the first stretch from her arrival",
                                       from, edge);
        else if (st->from != before)
            keel_roster_report_problem(ld, stretch_at(ld, i, item, k, "from"),
                                       st->from < before
                                           ? "%s is before %s, when record[%zu] ends; expected "
                                             "stretches in time order that do not overlap"
                                           : "%s leaves a gap after %s, when record[%zu] ends; "
                                             "expected each stretch to start when the one "
                                             "before it ends",
                                       from, edge, k - 1);
        else if (st->to > leaves)
            keel_roster_report_problem(ld, stretch_at(ld, i, item, k, "to"),
                                       "%s is after the patient leaves at %s; expected a "
                                       "stretch that ends by her departure",
                                       to, clock_text(r, leaves, edge));
        else
            continue;
        return; /* the stretches after a problem cannot be judged */
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

/* The nurse's own times: her start before her end, her timed breaks inside
 * her time on the unit, and her minutes, break and duty minutes within it. */
void keel_roster_clock_check_nurse(loader *ld, size_t i, const node *item)
{
    if (!check_nurse_span(ld, i, item))
        return;
    int breaks = ld->roster->nurses[i].nbreaks ? check_breaks(ld, i, item) : 0;
    check_nurse_minutes(ld, i, item, breaks);
}

void keel_roster_clock_text(const keel_roster *r, int offset, char buf[KEEL_TIME_SIZE])
{
    if (r->shift.start_minute == KEEL_ABSENT) {
        snprintf(buf, KEEL_TIME_SIZE, "+%d min", offset);
        return;
    }
    int minute = (r->shift.start_minute + offset) % 1440;
    snprintf(buf, KEEL_TIME_SIZE, "%02d:%02d", minute / 60, minute % 60);
}
