/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * law.c - the built-in ratio tables.  Every entry here was checked against
 * the text named in its table; entries known only from summaries are left
 * out on purpose (docs/roster-format.md lists what is shipped).
 */
#include <string.h>

#include "keel/law.h"

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
     .version = "Part 6A as in force from 2016-07-01; the 2012 regulation was later replaced "
                "(Hospital and Health Boards Regulation 2023), whose text keel has not checked",
     .encoded = "2026-12-02",
     .classes = "morning 07:00-15:00, afternoon 15:00-23:00, night 23:00-07:00 (section 30A)",
     .nentries = ARRAY_LEN(queensland_entries),
     .entries = queensland_entries},
};

size_t keel_law_ntables(void)
{
    return ARRAY_LEN(tables);
}

const keel_law_table *keel_law_table_at(size_t i)
{
    return i < ARRAY_LEN(tables) ? &tables[i] : NULL;
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

keel_shift_class keel_law_shift_class(const keel_law_table *t, int start_minute, int minutes)
{
    if (!t || !t->classes || start_minute < 0 || minutes <= 0)
        return KEEL_SHIFT_ANY;
    /* Windows of s 30A; night runs 23:00-07:00 and is counted as two parts. */
    int morning = overlap(start_minute, minutes, 7 * 60, 15 * 60);
    int afternoon = overlap(start_minute, minutes, 15 * 60, 23 * 60);
    int night = overlap(start_minute, minutes, 0, 7 * 60) +
                overlap(start_minute, minutes, 23 * 60, MINUTES_PER_DAY);
    /* s 30A(2): equal morning and afternoon is afternoon, equal afternoon
     * and night is night, equal morning and night is morning. */
    if (night >= afternoon && night > morning)
        return KEEL_SHIFT_NIGHT;
    if (afternoon >= morning)
        return KEEL_SHIFT_AFTERNOON;
    return KEEL_SHIFT_MORNING;
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
