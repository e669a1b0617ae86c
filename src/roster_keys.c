/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_keys.c - the roster format's key tables (docs/roster-format.md) and
 * the parsers they name: version, unit, shift, policy, nurses, patients and
 * expected admissions.  Each parser checks its value and fills its field of
 * the roster; a value that fails its check leaves its field absent, so that
 * later checks do not repeat the problem.
 *
 * Expected admissions are read apart and appended to the patients after the
 * walk (keel_roster_keys_merge_expected()), so that the order of the two
 * lists in the file does not matter.  The words the format allows (unit
 * types, roles, licences, precautions, balances) are here too, with the
 * public functions that name them.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "roster_internal.h"
#include "roster_loader.h"
#include "sort.h"

enum {
    MAX_PATIENTS = 99,
    MAX_LEVEL = 99,
    MAX_UTILISATION = 10 * KEEL_TOLERANCE_SCALE, /* policy.max_utilisation, in millionths */
};

static void *field_of(void *target, size_t offset)
{
    return (char *)target + offset;
}

static void parse_string(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster_words_read_string(ld, value, field_of(target, rule->offset));
}

static void parse_int(loader *ld, const node *value, void *target, const key_rule *rule)
{
    int number;
    if (keel_roster_words_read_int(ld, value, rule->min, rule->max, &number))
        *(int *)field_of(target, rule->offset) = number;
}

/* Reads a list of strings into *names and *count; with once, each name
 * may appear once.  expected says what the list should be. */
static void read_names(loader *ld, const node *value, char ***names, size_t *count, bool once,
                       const char *expected)
{
    char shown[SHOWN_SIZE];
    if (value->kind != NODE_SEQUENCE) {
        keel_roster_tree_report_type(ld, value, expected);
        return;
    }
    *names = keel_calloc(value->nitems, sizeof **names);
    if (!*names) {
        ld->nomem = true;
        return;
    }
    *count = value->nitems;
    for (size_t i = 0; i < value->nitems; i++) {
        size_t old = keel_roster_report_push_index(ld, i);
        keel_roster_words_read_string(ld, value->items[i], &(*names)[i]);
        keel_roster_report_pop_path(ld, old);
    }
    if (!once || value->nitems < 2)
        return;
    /* Repeated names by one sort (a list may hold 20 000): each problem at
     * its item, so the file order of problems is what a walk would give. */
    size_t *first = keel_malloc(value->nitems * sizeof *first);
    if (!first || !keelSortFirstSame((const char *const *)*names, value->nitems, first)) {
        free(first);
        ld->nomem = true;
        return;
    }
    for (size_t i = 0; i < value->nitems; i++) {
        if (first[i] == i)
            continue;
        size_t old = keel_roster_report_push_index(ld, i);
        keel_roster_report_problem(ld, value->items[i]->mark,
                                   "'%s' is already listed at [%zu]; expected each name once",
                                   keel_roster_report_show(shown, (*names)[i]), first[i]);
        keel_roster_report_pop_path(ld, old);
    }
    free(first);
}

/* A list of names (skills, needs, extras): strings, each once. */
static void parse_names(loader *ld, const node *value, void *target, const key_rule *rule)
{
    read_names(ld, value, field_of(target, rule->offset), field_of(target, rule->count_offset),
               true, "a list of names such as [a, b] ([] for none)");
}

/* patients[].handoffs: nurse ids in order.  The format asks only that
 * neighbours differ (check_handoffs() in roster_check.c); whether each
 * hand-off can happen is a question about the plan, not the file. */
static void parse_handoffs(loader *ld, const node *value, void *target, const key_rule *rule)
{
    read_names(ld, value, field_of(target, rule->offset), field_of(target, rule->count_offset),
               false, "a list of nurse ids such as [N4] ([] for none)");
}

static void parse_section(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster_walk_mapping(ld, value, rule->keys, rule->nkeys, target);
}

static void parse_version(loader *ld, const node *value, void *target, const key_rule *rule)
{
    long version;
    char shown[SHOWN_SIZE];
    (void)target;
    (void)rule;
    if (!keel_roster_words_scan_int(value, &version))
        keel_roster_tree_report_type(ld, value, "the integer 1");
    else if (version != 1)
        keel_roster_report_problem(ld, value->mark, "%s is not supported; expected 1",
                                   keel_roster_report_show(shown, value->text));
}

static void parse_clock(loader *ld, const node *value, void *target, const key_rule *rule)
{
    int minute = value->kind == NODE_SCALAR ? keel_roster_words_scan_clock(value->text) : -1;
    if (minute < 0)
        keel_roster_tree_report_type(ld, value, "a time of day from 00:00 to 23:59");
    else
        *(int *)field_of(target, rule->offset) = minute;
}

/* A nurse's or patient's own time of day.  Kept as minutes after midnight
 * until keel_roster_clock_convert() reads it against the shift. */
static void parse_time(loader *ld, const node *value, void *target, const key_rule *rule)
{
    ld->roster->clock = true;
    parse_clock(ld, value, target, rule);
}

static void parse_date(loader *ld, const node *value, void *target, const key_rule *rule)
{
    char **date = field_of(target, rule->offset);
    if (value->kind != NODE_SCALAR || !keel_roster_words_is_date(value->text)) {
        keel_roster_tree_report_type(ld, value, "a calendar date as YYYY-MM-DD");
        return;
    }
    *date = keel_strdup(value->text);
    if (!*date)
        ld->nomem = true;
}

/* The words a roster may use for unit.type, nurses[].role and
 * nurses[].licence; each enum's values are in this order. */
static const char *const unit_types[] = {
    "icu",       "step-down", "telemetry",   "med-surg",       "pediatrics",
    "emergency", "oncology",  "psychiatric", "labor-delivery", "postpartum",
    "pacu",      "burn",      "nicu",        "other"};
static const char *const role_names[KEEL_NROLES] = {"staff", "charge",   "resource",
                                                    "float", "orientee", "relief"};
static const char *const licence_names[] = {"rn", "lpn"};
static const char *const isolation_names[KEEL_NISOLATION] = {"none", "contact", "droplet",
                                                             "airborne", "protective"};

static void parse_unit_type(loader *ld, const node *value, void *target, const key_rule *rule)
{
    char **type = field_of(target, rule->offset);
    int index;
    if (!keel_roster_words_read_word(ld, value, "unit type", unit_types, ARRAY_LEN(unit_types),
                                     false, &index))
        return;
    *type = keel_strdup(unit_types[index]);
    if (!*type)
        ld->nomem = true;
}

static void parse_role(loader *ld, const node *value, void *target, const key_rule *rule)
{
    int index;
    if (keel_roster_words_read_word(ld, value, "role", role_names, KEEL_NROLES, true, &index))
        *(keel_role *)field_of(target, rule->offset) = (keel_role)index;
}

static void parse_licence(loader *ld, const node *value, void *target, const key_rule *rule)
{
    int index;
    if (keel_roster_words_read_word(ld, value, "licence", licence_names, ARRAY_LEN(licence_names),
                                    true, &index))
        *(keel_licence *)field_of(target, rule->offset) = (keel_licence)index;
}

/* A YAML boolean, written plainly as true or false. */
static void parse_bool(loader *ld, const node *value, void *target, const key_rule *rule)
{
    bool is_true = value->kind == NODE_SCALAR && !value->quoted && strcmp(value->text, "true") == 0;
    bool is_false =
        value->kind == NODE_SCALAR && !value->quoted && strcmp(value->text, "false") == 0;
    if (!is_true && !is_false)
        keel_roster_tree_report_type(ld, value, "true or false");
    else
        *(bool *)field_of(target, rule->offset) = is_true;
}

static void parse_isolation(loader *ld, const node *value, void *target, const key_rule *rule)
{
    int index;
    if (keel_roster_words_read_word(ld, value, "precaution", isolation_names + 1,
                                    KEEL_NISOLATION - 1, false, &index))
        *(keel_isolation *)field_of(target, rule->offset) = (keel_isolation)(index + 1);
}

/* patients[].ratio: "1:N", the most patients this patient's nurse may have. */
static void parse_ratio(loader *ld, const node *value, void *target, const key_rule *rule)
{
    const char *s = value->kind == NODE_SCALAR ? value->text : "";
    char *end;
    long n = -1;
    if (s[0] == '1' && s[1] == ':' && s[2] >= '0' && s[2] <= '9')
        n = strtol(s + 2, &end, 10);
    if (n < 1 || n > MAX_PATIENTS || *end != '\0')
        keel_roster_tree_report_type(ld, value, "a ratio such as \"1:2\" (1:1 to 1:99)");
    else
        *(int *)field_of(target, rule->offset) = (int)n;
}

/* policy.ratio_table: the name of a built-in table. */
static void parse_ratio_table(loader *ld, const node *value, void *target, const key_rule *rule)
{
    const char *names[8];
    size_t count = keel_law_ntables();
    int index;
    for (size_t i = 0; i < count && i < ARRAY_LEN(names); i++)
        names[i] = keel_law_table_at(i)->name;
    if (keel_roster_words_read_word(ld, value, "ratio table", names, count, false, &index))
        *(const keel_law_table **)field_of(target, rule->offset) = keel_law_table_at((size_t)index);
}

/* A number from 0 to 1 (policy.balance_tolerance), or from rule->min to
 * rule->max millionths (policy.max_utilisation), with at most six
 * decimals, kept exactly in millionths. */
static void parse_tolerance(loader *ld, const node *value, void *target, const key_rule *rule)
{
    long most = rule->max > 0 ? rule->max : KEEL_TOLERANCE_SCALE;
    const char *s = value->kind == NODE_SCALAR && !value->quoted ? value->text : "";
    long whole = 0, frac = 0;
    int digits = 0, i = 0;
    bool ok = s[0] >= '0' && s[0] <= '9';
    while (ok && s[i] >= '0' && s[i] <= '9' && whole <= most)
        whole = whole * 10 + (s[i++] - '0');
    if (ok && s[i] == '.') {
        for (i++; s[i] >= '0' && s[i] <= '9'; i++) {
            if (++digits > 6)
                ok = false;
            else
                frac = frac * 10 + (s[i] - '0');
        }
    }
    ok = ok && s[i] == '\0';
    for (; digits < 6; digits++)
        frac *= 10;
    long ppm = whole * KEEL_TOLERANCE_SCALE + frac;
    if (rule->max > 0 && (!ok || ppm > most || ppm < rule->min))
        keel_roster_tree_report_type(
            ld, value, "a number above 0 and at most 10 with at most 6 decimals, such as 1.0");
    else if (!ok || ppm > most)
        keel_roster_tree_report_type(ld, value,
                                     "a number from 0 to 1 with at most 6 decimals, such as 0.05");
    else
        *(int *)field_of(target, rule->offset) = (int)ppm;
}

static const char *const balance_names[] = {"peak", "squares"};

const char *keel_balance_name(keel_balance balance)
{
    return (size_t)balance < ARRAY_LEN(balance_names) ? balance_names[balance] : "unknown";
}

/* policy.balance: peak or squares. */
static void parse_balance(loader *ld, const node *value, void *target, const key_rule *rule)
{
    int index;
    if (keel_roster_words_read_word(ld, value, "balance", balance_names, ARRAY_LEN(balance_names),
                                    false, &index))
        *(keel_balance *)field_of(target, rule->offset) = (keel_balance)index;
}

/* The key before items[i] of a mapping that reads the same as items[i], or
 * NULL: a key given twice. */
static const node *earlier_key(const node *map, size_t i)
{
    const node *key = map->items[i];
    for (size_t j = 0; j < i; j += 2) {
        const node *earlier = map->items[j];
        if (earlier->kind == NODE_SCALAR && strcmp(earlier->text, key->text) == 0)
            return earlier;
    }
    return NULL;
}

/* policy.isolation_needs: precaution -> competencies every such patient needs. */
static void parse_isolation_needs(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster *r = target;
    (void)rule;
    if (value->kind != NODE_MAPPING) {
        keel_roster_tree_report_type(
            ld, value, "a mapping from precaution to competencies, like {airborne: [n95]}");
        return;
    }
    for (size_t i = 0; i + 1 < value->nitems; i += 2) {
        const node *key = value->items[i], *first = NULL;
        int kind;
        if (!keel_roster_walk_check_key(ld, key))
            continue;
        size_t old = keel_roster_report_push_key(ld, key->text);
        first = earlier_key(value, i);
        if (first) {
            keel_roster_report_problem(
                ld, key->mark, "given twice (first on line %d); expected each precaution once",
                first->mark.line);
        } else if (keel_roster_words_read_word(ld, key, "precaution", isolation_names + 1,
                                               KEEL_NISOLATION - 1, false, &kind)) {
            key_rule names = {.offset = offsetof(keel_roster, policy.isolation_needs) +
                                        (size_t)(kind + 1) * sizeof(char **),
                              .count_offset = offsetof(keel_roster, policy.nisolation_needs) +
                                              (size_t)(kind + 1) * sizeof(size_t)};
            parse_names(ld, value->items[i + 1], r, &names);
        }
        keel_roster_report_pop_path(ld, old);
    }
}

static int compare_levels(const void *a, const void *b)
{
    const keel_acuity_level *x = a, *y = b;
    return (x->level > y->level) - (x->level < y->level);
}

/* The line of the first key in map[0..end) that reads as level, or 0. */
static int find_level_line(const node *map, size_t end, long level)
{
    long other;
    for (size_t i = 0; i < end; i += 2)
        if (keel_roster_words_scan_int(map->items[i], &other) && other == level)
            return map->items[i]->mark.line;
    return 0;
}

/* policy.acuity_minutes: acuity level -> care minutes, stored sorted. */
static void parse_acuity_table(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster *r = target;
    char shown[SHOWN_SIZE];
    (void)rule;
    ld->acuity_table = TABLE_BROKEN;
    if (value->kind != NODE_MAPPING) {
        keel_roster_tree_report_type(ld, value,
                                     "a mapping from acuity level to care minutes, like {1: 90}");
        return;
    }
    if (value->nitems == 0) {
        keel_roster_report_problem(
            ld, value->mark, "found an empty mapping; expected care minutes per acuity level");
        return;
    }
    r->policy.acuity_minutes = keel_calloc(value->nitems / 2, sizeof *r->policy.acuity_minutes);
    if (!r->policy.acuity_minutes) {
        ld->nomem = true;
        return;
    }
    ld->acuity_table = TABLE_READ;
    for (size_t i = 0; i + 1 < value->nitems; i += 2) {
        const node *key = value->items[i];
        long level;
        int first;
        if (!keel_roster_walk_check_key(ld, key))
            continue;
        size_t old = keel_roster_report_push_key(ld, key->text);
        keel_acuity_level entry = {.minutes = KEEL_ABSENT};
        if (!keel_roster_words_scan_int(key, &level) || level < 0 || level > MAX_LEVEL) {
            keel_roster_report_problem(ld, key->mark,
                                       "level '%s' is not valid; expected an integer from 0 to %d",
                                       keel_roster_report_show(shown, key->text), MAX_LEVEL);
        } else if ((first = find_level_line(value, i, level)) > 0) {
            keel_roster_report_problem(
                ld, key->mark, "level %ld given twice (first on line %d); expected each once",
                level, first);
        } else {
            entry.level = (int)level;
            keel_roster_words_read_int(ld, value->items[i + 1], 0, MINUTES_PER_DAY, &entry.minutes);
            r->policy.acuity_minutes[r->policy.nacuity++] = entry;
        }
        keel_roster_report_pop_path(ld, old);
    }
    qsort(r->policy.acuity_minutes, r->policy.nacuity, sizeof *r->policy.acuity_minutes,
          compare_levels);
}

/* policy.extra_minutes: name of an extra -> care minutes, in file order. */
static void parse_extra_table(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster *r = target;
    (void)rule;
    ld->extra_table = TABLE_BROKEN;
    if (value->kind != NODE_MAPPING) {
        keel_roster_tree_report_type(ld, value,
                                     "a mapping from extra to care minutes, like {admission: 90}");
        return;
    }
    r->policy.extra_minutes = keel_calloc(value->nitems / 2, sizeof *r->policy.extra_minutes);
    if (!r->policy.extra_minutes) {
        ld->nomem = true;
        return;
    }
    ld->extra_table = TABLE_READ;
    for (size_t i = 0; i + 1 < value->nitems; i += 2) {
        const node *key = value->items[i];
        const node *first = NULL;
        if (!keel_roster_walk_check_key(ld, key))
            continue;
        size_t old = keel_roster_report_push_key(ld, key->text);
        first = earlier_key(value, i);
        if (first) {
            keel_roster_report_problem(ld, key->mark,
                                       "given twice (first on line %d); expected each extra once",
                                       first->mark.line);
        } else {
            keel_extra *extra = &r->policy.extra_minutes[r->policy.nextras];
            extra->minutes = KEEL_ABSENT;
            if (keel_roster_words_read_string(ld, key, &extra->name)) {
                r->policy.nextras++;
                keel_roster_words_read_int(ld, value->items[i + 1], 0, MINUTES_PER_DAY,
                                           &extra->minutes);
            }
        }
        keel_roster_report_pop_path(ld, old);
    }
}

/* True when value is a non-empty sequence (reported if not). */
static bool check_list(loader *ld, const node *value, const char *what)
{
    char expected[64];
    snprintf(expected, sizeof expected, "a list of %ss", what);
    if (value->kind != NODE_SEQUENCE) {
        keel_roster_tree_report_type(ld, value, expected);
        return false;
    }
    if (value->nitems == 0) {
        keel_roster_report_problem(ld, value->mark, "found an empty list; expected at least one %s",
                                   what);
        return false;
    }
    return true;
}

static const key_rule break_keys[] = {
    {.name = "at",
     .parse = parse_time,
     .offset = offsetof(keel_break, at),
     .need = "every break needs at: the time it starts"},
    {.name = "minutes",
     .parse = parse_int,
     .offset = offsetof(keel_break, minutes),
     .min = 1,
     .max = MINUTES_PER_DAY,
     .need = "every break needs its length in minutes"},
};

/* nurses[].breaks: timed breaks, each {at, minutes}; checked against the
 * nurse's time on the unit by check_breaks() in roster_clock.c. */
static void parse_breaks(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_nurse *n = target;
    (void)rule;
    ld->roster->clock = true;
    if (!check_list(ld, value, "break"))
        return;
    n->breaks = keel_calloc(value->nitems, sizeof *n->breaks);
    if (!n->breaks) {
        ld->nomem = true;
        return;
    }
    n->nbreaks = value->nitems;
    for (size_t i = 0; i < value->nitems; i++) {
        n->breaks[i] =
            (keel_break){.at = KEEL_ABSENT, .minutes = KEEL_ABSENT, .mark = value->items[i]->mark};
        size_t old = keel_roster_report_push_index(ld, i);
        keel_roster_walk_mapping(ld, value->items[i], break_keys, ARRAY_LEN(break_keys),
                                 &n->breaks[i]);
        keel_roster_report_pop_path(ld, old);
    }
}

static const key_rule stretch_keys[] = {
    {.name = "nurse",
     .parse = parse_string,
     .offset = offsetof(keel_stretch, nurse),
     .need = "every stretch of a record needs nurse: the id of the nurse who held the patient"},
    {.name = "from",
     .parse = parse_time,
     .offset = offsetof(keel_stretch, from),
     .need = "every stretch of a record needs from: the time it starts"},
    {.name = "to",
     .parse = parse_time,
     .offset = offsetof(keel_stretch, to),
     .need = "every stretch of a record needs to: the time it ends"},
};

/* patients[].record: who held the patient, each {nurse, from, to}; checked
 * against the patient's stay by check_record() in roster_clock.c. */
static void parse_record(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_patient *p = target;
    (void)rule;
    ld->roster->clock = true;
    if (value->kind != NODE_SEQUENCE) {
        keel_roster_tree_report_type(
            ld, value, "a list of stretches such as [{nurse: N1, from: \"07:00\", to: \"09:30\"}]");
        return;
    }
    if (value->nitems == 0) {
        keel_roster_report_problem(
            ld, value->mark, "found an empty list; expected at least one stretch, or no record");
        return;
    }
    p->record = keel_calloc(value->nitems, sizeof *p->record);
    if (!p->record) {
        ld->nomem = true;
        return;
    }
    p->nrecord = value->nitems;
    for (size_t i = 0; i < value->nitems; i++) {
        p->record[i] =
            (keel_stretch){.from = KEEL_ABSENT, .to = KEEL_ABSENT, .mark = value->items[i]->mark};
        size_t old = keel_roster_report_push_index(ld, i);
        keel_roster_walk_mapping(ld, value->items[i], stretch_keys, ARRAY_LEN(stretch_keys),
                                 &p->record[i]);
        keel_roster_report_pop_path(ld, old);
    }
}

static const key_rule nurse_keys[] = {
    {.name = "id",
     .parse = parse_string,
     .offset = offsetof(keel_nurse, id),
     .need = "every nurse needs a unique id"},
    {.name = "name", .parse = parse_string, .offset = offsetof(keel_nurse, name)},
    {.name = "skills",
     .parse = parse_names,
     .offset = offsetof(keel_nurse, skills),
     .count_offset = offsetof(keel_nurse, nskills)},
    {.name = "max_patients",
     .parse = parse_int,
     .offset = offsetof(keel_nurse, max_patients),
     .min = 0,
     .max = MAX_PATIENTS},
    {.name = "min_patients",
     .parse = parse_int,
     .offset = offsetof(keel_nurse, min_patients),
     .min = 0,
     .max = MAX_PATIENTS},
    {.name = "minutes",
     .parse = parse_int,
     .offset = offsetof(keel_nurse, minutes),
     .min = 1,
     .max = MINUTES_PER_DAY},
    {.name = "break_minutes",
     .parse = parse_int,
     .offset = offsetof(keel_nurse, break_minutes),
     .min = 0,
     .max = MINUTES_PER_DAY - 1},
    {.name = "duty_minutes",
     .parse = parse_int,
     .offset = offsetof(keel_nurse, duty_minutes),
     .min = 0,
     .max = MINUTES_PER_DAY},
    {.name = "role", .parse = parse_role, .offset = offsetof(keel_nurse, role)},
    {.name = "licence", .parse = parse_licence, .offset = offsetof(keel_nurse, licence)},
    {.name = "preceptor", .parse = parse_string, .offset = offsetof(keel_nurse, preceptor)},
    {.name = "start", .parse = parse_time, .offset = offsetof(keel_nurse, start)},
    {.name = "end", .parse = parse_time, .offset = offsetof(keel_nurse, end)},
    {.name = "breaks", .parse = parse_breaks},
    {.name = "covers", .parse = parse_string, .offset = offsetof(keel_nurse, covers)},
};

/* The keys a patient and an expected admission share, up to the times: all
 * but id and the arrival (arrives_at for a patient, at for an expected
 * admission). */
/* clang-format off */
#define PATIENT_COMMON_KEYS                                                                        \
    {.name = "bed", .parse = parse_string, .offset = offsetof(keel_patient, bed)},                 \
    {.name = "name", .parse = parse_string, .offset = offsetof(keel_patient, name)},               \
    {.name = "acuity",                                                                             \
     .parse = parse_int,                                                                           \
     .offset = offsetof(keel_patient, acuity),                                                     \
     .min = 0,                                                                                     \
     .max = MAX_LEVEL},                                                                            \
    {.name = "care_minutes",                                                                       \
     .parse = parse_int,                                                                           \
     .offset = offsetof(keel_patient, care_minutes),                                               \
     .min = 0,                                                                                     \
     .max = MINUTES_PER_DAY},                                                                      \
    {.name = "extras",                                                                             \
     .parse = parse_names,                                                                         \
     .offset = offsetof(keel_patient, extras),                                                     \
     .count_offset = offsetof(keel_patient, nextras)},                                             \
    {.name = "needs",                                                                              \
     .parse = parse_names,                                                                         \
     .offset = offsetof(keel_patient, needs),                                                      \
     .count_offset = offsetof(keel_patient, nneeds)},                                              \
    {.name = "nurse", .parse = parse_string, .offset = offsetof(keel_patient, nurse)},             \
    {.name = "lock", .parse = parse_bool, .offset = offsetof(keel_patient, lock)},                 \
    {.name = "sitter", .parse = parse_bool, .offset = offsetof(keel_patient, sitter)},             \
    {.name = "avoid",                                                                              \
     .parse = parse_names,                                                                         \
     .offset = offsetof(keel_patient, avoid),                                                      \
     .count_offset = offsetof(keel_patient, navoid)},                                              \
    {.name = "ratio", .parse = parse_ratio, .offset = offsetof(keel_patient, ratio)},              \
    {.name = "isolation", .parse = parse_isolation, .offset = offsetof(keel_patient, isolation)},  \
    {.name = "room", .parse = parse_string, .offset = offsetof(keel_patient, room)},               \
    {.name = "zone", .parse = parse_string, .offset = offsetof(keel_patient, zone)},               \
    {.name = "previous_nurse",                                                                     \
     .parse = parse_string,                                                                        \
     .offset = offsetof(keel_patient, previous_nurse)},                                            \
    {.name = "nas",                                                                                \
     .parse = parse_names,                                                                         \
     .offset = offsetof(keel_patient, nas),                                                        \
     .count_offset = offsetof(keel_patient, nnas)}
/* clang-format on */

static const key_rule patient_keys[] = {
    {.name = "id",
     .parse = parse_string,
     .offset = offsetof(keel_patient, id),
     .need = "every patient needs a unique id"},
    PATIENT_COMMON_KEYS,
    {.name = "arrives_at", .parse = parse_time, .offset = offsetof(keel_patient, arrives_at)},
    {.name = "leaves_at", .parse = parse_time, .offset = offsetof(keel_patient, leaves_at)},
    {.name = "handoffs",
     .parse = parse_handoffs,
     .offset = offsetof(keel_patient, handoffs),
     .count_offset = offsetof(keel_patient, nhandoffs)},
    {.name = "record", .parse = parse_record},
};

static const key_rule expected_keys[] = {
    {.name = "id",
     .parse = parse_string,
     .offset = offsetof(keel_patient, id),
     .need = "every expected admission needs a unique id"},
    {.name = "at",
     .parse = parse_time,
     .offset = offsetof(keel_patient, arrives_at),
     .need = "every expected admission needs at: the time it is expected"},
    PATIENT_COMMON_KEYS,
    {.name = "leaves_at", .parse = parse_time, .offset = offsetof(keel_patient, leaves_at)},
    {.name = "handoffs",
     .parse = parse_handoffs,
     .offset = offsetof(keel_patient, handoffs),
     .count_offset = offsetof(keel_patient, nhandoffs)},
    {.name = "arrives_at",
     .refused = "not used for an expected admission; expected at: the time it is expected"},
};

static void parse_nurses(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster *r = target;
    (void)rule;
    if (!check_list(ld, value, "nurse"))
        return;
    r->nurses = keel_calloc(value->nitems, sizeof *r->nurses);
    if (!r->nurses) {
        ld->nomem = true;
        return;
    }
    r->nnurses = value->nitems;
    for (size_t i = 0; i < value->nitems; i++) {
        r->nurses[i] = (keel_nurse){.max_patients = KEEL_ABSENT,
                                    .min_patients = KEEL_ABSENT,
                                    .minutes = KEEL_ABSENT,
                                    .break_minutes = KEEL_ABSENT,
                                    .duty_minutes = KEEL_ABSENT,
                                    .start = KEEL_ABSENT,
                                    .end = KEEL_ABSENT,
                                    .mark = value->items[i]->mark};
        size_t old = keel_roster_report_push_index(ld, i);
        keel_roster_walk_mapping(ld, value->items[i], nurse_keys, ARRAY_LEN(nurse_keys),
                                 &r->nurses[i]);
        keel_roster_report_pop_path(ld, old);
    }
}

/* Reads the entries of a patient list into a new array *out of *count
 * patients, each checked against keys. */
static void read_patients(loader *ld, const node *value, const key_rule *keys, size_t nkeys,
                          bool expected, keel_patient **out, size_t *count)
{
    *out = keel_calloc(value->nitems, sizeof **out);
    if (!*out) {
        ld->nomem = true;
        return;
    }
    *count = value->nitems;
    for (size_t i = 0; i < value->nitems; i++) {
        (*out)[i] = (keel_patient){.acuity = KEEL_ABSENT,
                                   .care_minutes = KEEL_ABSENT,
                                   .ratio = KEEL_ABSENT,
                                   .arrives_at = KEEL_ABSENT,
                                   .leaves_at = KEEL_ABSENT,
                                   .expected = expected,
                                   .mark = value->items[i]->mark};
        size_t old = keel_roster_report_push_index(ld, i);
        keel_roster_walk_mapping(ld, value->items[i], keys, nkeys, &(*out)[i]);
        keel_roster_report_pop_path(ld, old);
    }
}

/* patients: [] is none, as is no key at all: a unit's roster without
 * patients is what `keel import --roster` fills from a census. */
static void parse_patients(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster *r = target;
    (void)rule;
    if (value->kind != NODE_SEQUENCE)
        keel_roster_tree_report_type(ld, value, "a list of patients ([] for none)");
    else if (value->nitems > 0)
        read_patients(ld, value, patient_keys, ARRAY_LEN(patient_keys), false, &r->patients,
                      &r->npatients);
}

/* expected_admissions: patients with a time of arrival, kept apart until
 * keel_roster_keys_merge_expected() appends them to the patients.  [] is none. */
static void parse_expected(loader *ld, const node *value, void *target, const key_rule *rule)
{
    (void)target;
    (void)rule;
    if (value->kind != NODE_SEQUENCE)
        keel_roster_tree_report_type(ld, value, "a list of expected admissions ([] for none)");
    else if (value->nitems > 0)
        read_patients(ld, value, expected_keys, ARRAY_LEN(expected_keys), true, &ld->expected,
                      &ld->nexpected);
}

static const key_rule unit_keys[] = {
    {.name = "name", .parse = parse_string, .offset = offsetof(keel_roster, unit.name)},
    {.name = "type", .parse = parse_unit_type, .offset = offsetof(keel_roster, unit.type)},
};

static const key_rule shift_keys[] = {
    {.name = "label", .parse = parse_string, .offset = offsetof(keel_roster, shift.label)},
    {.name = "date", .parse = parse_date, .offset = offsetof(keel_roster, shift.date)},
    {.name = "start", .parse = parse_clock, .offset = offsetof(keel_roster, shift.start_minute)},
    {.name = "minutes",
     .parse = parse_int,
     .offset = offsetof(keel_roster, shift.minutes),
     .min = 1,
     .max = MINUTES_PER_DAY,
     .need = "every shift needs its length in minutes"},
    {.name = "break_minutes",
     .parse = parse_int,
     .offset = offsetof(keel_roster, shift.break_minutes),
     .min = 0,
     .max = MINUTES_PER_DAY - 1},
};

static const key_rule role_policy_keys[] = {
    {.name = "max_patients",
     .parse = parse_int,
     .offset = offsetof(keel_role_policy, max_patients),
     .min = 0,
     .max = MAX_PATIENTS},
    {.name = "duty_minutes",
     .parse = parse_int,
     .offset = offsetof(keel_role_policy, duty_minutes),
     .min = 0,
     .max = MINUTES_PER_DAY},
    {.name = "max_acuity",
     .parse = parse_int,
     .offset = offsetof(keel_role_policy, max_acuity),
     .min = 0,
     .max = MAX_LEVEL},
};

/* policy.roles: role name -> that role's limits. */
static void parse_role_table(loader *ld, const node *value, void *target, const key_rule *rule)
{
    keel_roster *r = target;
    (void)rule;
    if (value->kind != NODE_MAPPING) {
        keel_roster_tree_report_type(
            ld, value, "a mapping from role to its limits, like {charge: {max_patients: 2}}");
        return;
    }
    for (size_t i = 0; i + 1 < value->nitems; i += 2) {
        const node *key = value->items[i], *first = NULL;
        int role;
        if (!keel_roster_walk_check_key(ld, key))
            continue;
        size_t old = keel_roster_report_push_key(ld, key->text);
        first = earlier_key(value, i);
        if (first)
            keel_roster_report_problem(ld, key->mark,
                                       "given twice (first on line %d); expected each role once",
                                       first->mark.line);
        else if (keel_roster_words_read_word(ld, key, "role", role_names, KEEL_NROLES, true, &role))
            keel_roster_walk_mapping(ld, value->items[i + 1], role_policy_keys,
                                     ARRAY_LEN(role_policy_keys), &r->policy.roles[role]);
        keel_roster_report_pop_path(ld, old);
    }
}

static const key_rule high_acuity_keys[] = {
    {.name = "level",
     .parse = parse_int,
     .offset = offsetof(keel_roster, policy.high_acuity.level),
     .min = 0,
     .max = MAX_LEVEL,
     .need = "the acuity level from which a patient counts as high-acuity"},
    {.name = "max_per_nurse",
     .parse = parse_int,
     .offset = offsetof(keel_roster, policy.high_acuity.max_per_nurse),
     .min = 0,
     .max = MAX_PATIENTS,
     .need = "the most high-acuity patients one nurse may have"},
};

static const key_rule policy_keys[] = {
    {.name = "max_patients",
     .parse = parse_int,
     .offset = offsetof(keel_roster, policy.max_patients),
     .min = 0,
     .max = MAX_PATIENTS},
    {.name = "acuity_minutes", .parse = parse_acuity_table},
    {.name = "extra_minutes", .parse = parse_extra_table},
    {.name = "roles", .parse = parse_role_table},
    {.name = "ratio_table",
     .parse = parse_ratio_table,
     .offset = offsetof(keel_roster, policy.ratio_table)},
    {.name = "high_acuity",
     .parse = parse_section,
     .keys = high_acuity_keys,
     .nkeys = ARRAY_LEN(high_acuity_keys)},
    {.name = "isolation_separation",
     .parse = parse_bool,
     .offset = offsetof(keel_roster, policy.isolation_separation)},
    {.name = "isolation_needs", .parse = parse_isolation_needs},
    {.name = "max_zones",
     .parse = parse_int,
     .offset = offsetof(keel_roster, policy.max_zones),
     .min = 1,
     .max = MAX_PATIENTS},
    {.name = "balance_tolerance",
     .parse = parse_tolerance,
     .offset = offsetof(keel_roster, policy.balance_tolerance)},
    {.name = "min_patients",
     .parse = parse_int,
     .offset = offsetof(keel_roster, policy.min_patients),
     .min = 0,
     .max = MAX_PATIENTS},
    {.name = "max_utilisation",
     .parse = parse_tolerance,
     .offset = offsetof(keel_roster, policy.max_utilisation),
     .min = 1,
     .max = MAX_UTILISATION},
    {.name = "balance", .parse = parse_balance, .offset = offsetof(keel_roster, policy.balance)},
};

static const key_rule roster_keys[] = {
    {.name = "version", .parse = parse_version},
    {.name = "unit", .parse = parse_section, .keys = unit_keys, .nkeys = ARRAY_LEN(unit_keys)},
    {.name = "shift",
     .parse = parse_section,
     .keys = shift_keys,
     .nkeys = ARRAY_LEN(shift_keys),
     .need = "every roster needs a shift with its length in minutes"},
    {.name = "policy",
     .parse = parse_section,
     .keys = policy_keys,
     .nkeys = ARRAY_LEN(policy_keys)},
    {.name = "nurses", .parse = parse_nurses, .need = "every roster needs a list of nurses"},
    {.name = "patients", .parse = parse_patients},
    {.name = "expected_admissions", .parse = parse_expected},
};

/* Reads the roster's top mapping into ld->roster. */
void keel_roster_keys_read(loader *ld, const node *root)
{
    if (root->kind != NODE_MAPPING)
        keel_roster_tree_report_type(ld, root,
                                     "a mapping with the keys shift, nurses and patients");
    else
        keel_roster_walk_mapping(ld, root, roster_keys, ARRAY_LEN(roster_keys), ld->roster);
}

/* The node of roster->patients[i]: an entry of patients or, after those,
 * of expected_admissions. */
const node *keel_roster_keys_patient_node(const loader *ld, size_t i)
{
    return i < ld->nlisted ? ld->patient_list->items[i] : ld->expected_list->items[i - ld->nlisted];
}

/* Sets the path to patients[i].key or expected_admissions[j].key. */
void keel_roster_keys_patient_path(loader *ld, size_t i, const char *key)
{
    if (i < ld->nlisted)
        keel_roster_report_set_path(ld, "patients", i, key);
    else
        keel_roster_report_set_path(ld, "expected_admissions", i - ld->nlisted, key);
}

/* Appends the expected admissions to the patients (after the walk, so that
 * the order of the two lists in the file does not matter). */
void keel_roster_keys_merge_expected(loader *ld)
{
    keel_roster *r = ld->roster;
    ld->nlisted = r->npatients;
    if (ld->nexpected == 0)
        return;
    keel_patient *all = keel_reallocarray(r->patients, r->npatients + ld->nexpected, sizeof *all);
    if (!all) {
        ld->nomem = true;
        for (size_t i = 0; i < ld->nexpected; i++)
            keel_roster_data_patient_fini(&ld->expected[i]);
    } else {
        memcpy(all + r->npatients, ld->expected, ld->nexpected * sizeof *all);
        r->patients = all;
        r->npatients += ld->nexpected;
        r->clock = true;
    }
    free(ld->expected);
    ld->expected = NULL;
    ld->nexpected = 0;
}

size_t keel_unit_ntypes(void)
{
    return ARRAY_LEN(unit_types);
}

const char *keel_unit_type(size_t i)
{
    return i < ARRAY_LEN(unit_types) ? unit_types[i] : NULL;
}

const char *keel_isolation_name(keel_isolation isolation)
{
    return (size_t)isolation < KEEL_NISOLATION ? isolation_names[isolation] : "none";
}

const char *keel_role_name(keel_role role)
{
    return (unsigned)role < KEEL_NROLES ? role_names[role] : "unknown";
}
