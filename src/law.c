/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * law.c - the built-in ratio tables.  Every entry here was checked against
 * the text named in its table; entries known only from summaries are left
 * out on purpose (docs/roster-format.md lists what is shipped).
 */
#include <string.h>

#include "keel/law.h"
#include "textbuf.h"

#define ARRAY_LEN(a) (sizeof(a) / sizeof((a)[0]))
#define MINUTES_PER_DAY 1440

/* Per-nurse maxima of licensed nurses (RN or LVN) to patients, at all times,
 * for the unit types whose rule was read in the regulation's text. */
static const keel_law_entry california_entries[] = {
    {"icu", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 2},       /* critical care 1:2 */
    {"step-down", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 3}, /* step-down 1:3 */
    {"telemetry", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 4}, /* telemetry 1:4 */
    {"med-surg", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 5},  /* medical-surgical 1:5 */
};

/* Ward minimums for prescribed adult acute medical and surgical wards: one
 * nurse for every 4 patients on morning and afternoon shifts, 1 for every 7
 * at night, for the ward's census. */
static const keel_law_entry queensland_entries[] = {
    {"med-surg", KEEL_LAW_WARD_MIN, KEEL_SHIFT_MORNING, 4},
    {"med-surg", KEEL_LAW_WARD_MIN, KEEL_SHIFT_AFTERNOON, 4},
    {"med-surg", KEEL_LAW_WARD_MIN, KEEL_SHIFT_NIGHT, 7},
};

static const keel_law_table tables[] = {
    {.name = "california",
     .citation = "California Code of Regulations, Title 22, section 70217(a)",
     .version = "medical-surgical 1:5 in force from 2005-01-01 (CDPH AFL 08-07, 2008)",
     .encoded = "2026-12-02",
     .classes = NULL,
     .nentries = ARRAY_LEN(california_entries),
     .entries = california_entries},
    {.name = "queensland",
     .citation = "Hospital and Health Boards Regulation 2012 (Qld), Part 6A",
     .version = "Part 6A as in force from 2016-07-01",
     .encoded = "2026-12-02",
     .classes = "morning 07:00-15:00, afternoon 15:00-23:00, night 23:00-07:00 (section 30A)",
     .nentries = ARRAY_LEN(queensland_entries),
     .entries = queensland_entries,
     /* (from memory) The 2012 regulation was later replaced.  The sources read
      * name no successor, so the note names none, and no entry was checked
      * against it. */
     .note = "This table encodes superseded text: the Hospital and Health Boards Regulation "
             "2012 (Qld) was replaced by a later text, and keel has not checked the table "
             "against that successor."},
};

size_t keel_law_ntables(void)
{
    return ARRAY_LEN(tables);
}

const keel_law_table *keel_law_table_at(size_t i)
{
    return i < ARRAY_LEN(tables) ? &tables[i] : NULL;
}

int keel_law_cite(const keel_law_table *t, char *buf, size_t size)
{
    keel_textbuf k = {buf, size, 0};
    if (buf && size > 0)
        buf[0] = '\0';
    if (t)
        keel_textbuf_put(&k, "%s (%s; %s; as encoded by keel on %s)", t->name, t->citation,
                         t->version, t->encoded);
    return (int)k.len;
}

const keel_law_table *keel_law_find(const char *name)
{
    for (size_t i = 0; name && i < ARRAY_LEN(tables); i++)
        if (strcmp(tables[i].name, name) == 0)
            return &tables[i];
    return NULL;
}

bool keel_law_covers(const keel_law_table *t, const char *unit_type)
{
    for (size_t i = 0; t && unit_type && i < t->nentries; i++)
        if (strcmp(t->entries[i].unit_type, unit_type) == 0)
            return true;
    return false;
}

int keel_law_nurse_max(const keel_law_table *t, const char *unit_type)
{
    for (size_t i = 0; t && unit_type && i < t->nentries; i++)
        if (t->entries[i].kind == KEEL_LAW_NURSE_MAX &&
            strcmp(t->entries[i].unit_type, unit_type) == 0)
            return t->entries[i].patients_per_nurse;
    return -1;
}

/* Minutes of [start, start + len) that fall in the daily window [from, to),
 * counting every day the shift touches (a shift may cross midnight). */
static int overlap(int start, int len, int from, int to)
{
    int total = 0;
    for (int day = 0; day <= 2; day++) {
        int a = from + day * MINUTES_PER_DAY, b = to + day * MINUTES_PER_DAY;
        int lo = start > a ? start : a, hi = start + len < b ? start + len : b;
        if (hi > lo)
            total += hi - lo;
    }
    return total;
}

/* Minutes of the shift that fall in class c of s 30A (the only shift classes
 * a table has); night runs 23:00-07:00 and is counted as two parts. */
static int class_minutes(int start, int len, keel_shift_class c)
{
    switch (c) {
    case KEEL_SHIFT_MORNING:
        return overlap(start, len, 7 * 60, 15 * 60);
    case KEEL_SHIFT_AFTERNOON:
        return overlap(start, len, 15 * 60, 23 * 60);
    case KEEL_SHIFT_NIGHT:
        return overlap(start, len, 0, 7 * 60) + overlap(start, len, 23 * 60, MINUTES_PER_DAY);
    case KEEL_SHIFT_ANY:
        break;
    }
    return 0;
}

static bool has_classes(const keel_law_table *t, int start_minute, int minutes)
{
    return t && t->classes && start_minute >= 0 && minutes > 0;
}

keel_shift_class keel_law_shift_class(const keel_law_table *t, int start_minute, int minutes)
{
    if (!has_classes(t, start_minute, minutes))
        return KEEL_SHIFT_ANY;
    int morning = class_minutes(start_minute, minutes, KEEL_SHIFT_MORNING);
    int afternoon = class_minutes(start_minute, minutes, KEEL_SHIFT_AFTERNOON);
    int night = class_minutes(start_minute, minutes, KEEL_SHIFT_NIGHT);
    /* s 30A(2): equal morning and afternoon is afternoon, equal afternoon
     * and night is night, equal morning and night is morning. */
    if (night >= afternoon && night > morning)
        return KEEL_SHIFT_NIGHT;
    if (afternoon >= morning)
        return KEEL_SHIFT_AFTERNOON;
    return KEEL_SHIFT_MORNING;
}

/* The shift's minutes in each class (in[c], c from MORNING to NIGHT); returns
 * how many classes it touches, 0 for a table without classes. */
static int split_by_class(const keel_law_table *t, int start_minute, int minutes,
                          int in[KEEL_SHIFT_NIGHT + 1])
{
    int classes = 0;
    for (int c = KEEL_SHIFT_MORNING; c <= KEEL_SHIFT_NIGHT; c++) {
        in[c] = has_classes(t, start_minute, minutes)
                    ? class_minutes(start_minute, minutes, (keel_shift_class)c)
                    : 0;
        classes += in[c] > 0;
    }
    return classes;
}

bool keel_law_shift_spans(const keel_law_table *t, int start_minute, int minutes)
{
    int in[KEEL_SHIFT_NIGHT + 1];
    return split_by_class(t, start_minute, minutes, in) > 1;
}

int keel_law_shift_class_note(const keel_law_table *t, int start_minute, int minutes, char *buf,
                              size_t size)
{
    keel_textbuf k = {buf, size, 0};
    char cite[KEEL_LAW_CITE_SIZE];
    int in[KEEL_SHIFT_NIGHT + 1];
    if (buf && size > 0)
        buf[0] = '\0';
    int classes = split_by_class(t, start_minute, minutes, in);
    if (classes < 2)
        return 0;
    keel_law_cite(t, cite, sizeof cite);
    keel_textbuf_put(&k, "classed as %s under %s (the shift spans ",
                     keel_shift_class_name(keel_law_shift_class(t, start_minute, minutes)), cite);
    for (int c = KEEL_SHIFT_MORNING, seen = 0; c <= KEEL_SHIFT_NIGHT; c++) {
        if (in[c] == 0)
            continue;
        seen++;
        keel_textbuf_put(&k, "%s%d min of %s",
                         seen == 1         ? ""
                         : seen == classes ? " and "
                                           : ", ",
                         in[c], keel_shift_class_name((keel_shift_class)c));
    }
    keel_textbuf_put(&k, "; keel applies the class that holds most of the shift's minutes, a tie "
                         "settled as section 30A(2) of the text says)");
    return (int)k.len;
}

const char *keel_shift_class_name(keel_shift_class c)
{
    static const char *const names[] = {"any", "morning", "afternoon", "night"};
    return (size_t)c < ARRAY_LEN(names) ? names[c] : "any";
}

int keel_law_ward_minimum(const keel_law_table *t, const char *unit_type, keel_shift_class c,
                          size_t census)
{
    for (size_t i = 0; t && unit_type && i < t->nentries; i++) {
        const keel_law_entry *e = &t->entries[i];
        if (e->kind == KEEL_LAW_WARD_MIN && strcmp(e->unit_type, unit_type) == 0 &&
            (e->shift == KEEL_SHIFT_ANY || e->shift == c))
            return (int)((census + (size_t)e->patients_per_nurse - 1) /
                         (size_t)e->patients_per_nurse);
    }
    return -1;
}
