/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * nas.c - the Nursing Activities Score item table, the rules of scoring it
 * (one level per item, each item once) and the conversion of a score to
 * care minutes for a shift.  Scores are exact, in tenths of a point; the
 * only rounding is the final one, up to whole minutes.  See keel/nas.h.
 */
#include "keel/nas.h"

#include <limits.h>
#include <stdbool.h>
#include <string.h>

#include "textbuf.h"

#define ARRAY_LEN(a) (sizeof(a) / sizeof((a)[0]))

/* Tenths of a point in 100 points: a whole nurse's time. */
#define FULL_TIME_TENTHS 1000

/*
 * Source: Miranda et al., Crit Care Med 2003 (the instrument's weights), as
 * reprinted in two read sources (sources.md, "Workload instruments that
 * convert to nursing time"), for every weight except 7a and 7b.
 *
 * 7a 4.0 and 7b 32.0 were first written from memory and then checked in
 * three stored secondary sources, which agree: a Portuguese-language NAS
 * item table in a public ICU workload project (7a 4, 7b 32), an English
 * NAS scoring module and a Spanish NAS scoring form (both 7a 4.0, 7b 32.0),
 * and a doctoral thesis on ICU nursing workload stating that NAS weights
 * run from 1.2 to 32.0 points.  None of these is the primary text.
 *
 * The labels are keel's own short words, not the instrument's.
 */
static const keel_nas_item table[] = {
    {"1a", 1, 'a', 45, "routine observation"},
    {"1b", 1, 'b', 121, "bedside watch, 2 h or more in a shift"},
    {"1c", 1, 'c', 196, "bedside watch, 4 h or more in a shift"},
    {"2", 2, '\0', 43, "lab tests"},
    {"3", 3, '\0', 56, "medicines other than vasoactive"},
    {"4a", 4, 'a', 41, "hygiene care"},
    {"4b", 4, 'b', 165, "hygiene care, over 2 h in a shift"},
    {"4c", 4, 'c', 200, "hygiene care, over 4 h in a shift"},
    {"5", 5, '\0', 18, "drain care"},
    {"6a", 6, 'a', 55, "moving and turning, up to 3 times a day"},
    {"6b", 6, 'b', 124, "moving and turning, more often or by 2 nurses"},
    {"6c", 6, 'c', 170, "moving and turning by 3 or more nurses"},
    {"7a", 7, 'a', 40, "support of patient and family, about 1 h"},
    {"7b", 7, 'b', 320, "support of patient and family, 3 h or more"},
    {"8a", 8, 'a', 42, "routine records and handover"},
    {"8b", 8, 'b', 232, "records and coordination, about 2 h"},
    {"8c", 8, 'c', 300, "records and coordination, 4 h or more"},
    {"9", 9, '\0', 14, "breathing support"},
    {"10", 10, '\0', 18, "artificial airway care"},
    {"11", 11, '\0', 44, "lung function treatment"},
    {"12", 12, '\0', 12, "vasoactive drugs"},
    {"13", 13, '\0', 25, "large fluid replacement"},
    {"14", 14, '\0', 17, "heart pressure catheter"},
    {"15", 15, '\0', 71, "resuscitation in the past day"},
    {"16", 16, '\0', 77, "dialysis or filtration"},
    {"17", 17, '\0', 70, "urine output measured"},
    {"18", 18, '\0', 16, "intracranial pressure monitoring"},
    {"19", 19, '\0', 13, "acid-base treatment"},
    {"20", 20, '\0', 28, "intravenous nutrition"},
    {"21", 21, '\0', 13, "tube feeding"},
    {"22", 22, '\0', 28, "procedure on the unit"},
    {"23", 23, '\0', 19, "procedure away from the unit"},
};

size_t keel_nas_ntable(void)
{
    return ARRAY_LEN(table);
}

const keel_nas_item *keel_nas_table_at(size_t i)
{
    return i < ARRAY_LEN(table) ? &table[i] : NULL;
}

const keel_nas_item *keel_nas_find(const char *code)
{
    if (!code)
        return NULL;
    for (size_t i = 0; i < ARRAY_LEN(table); i++)
        if (strcmp(table[i].code, code) == 0)
            return &table[i];
    return NULL;
}

/* True when line is a level of the item whose number is number[0 .. len):
 * "4b" is a level of "4"; "12" is no level of "1". */
static bool is_level_of(const keel_nas_item *line, const char *number, size_t len)
{
    return line->level && strlen(line->code) == len + 1 && strncmp(line->code, number, len) == 0;
}

/* Count of the levels of the item numbered code ("4" has 3; "12" has 0). */
static size_t count_levels(const char *code)
{
    size_t n = 0, len = strlen(code);
    for (size_t i = 0; i < ARRAY_LEN(table); i++)
        if (is_level_of(&table[i], code, len))
            n++;
    return n;
}

void keel_nas_sheet_init(keel_nas_sheet *sheet)
{
    *sheet = (keel_nas_sheet){0};
}

keel_nas_problem keel_nas_sheet_add(keel_nas_sheet *sheet, const char *code, size_t *earlier)
{
    size_t index = sheet->nentries++;
    const keel_nas_item *line = keel_nas_find(code);
    keel_nas_problem problem = KEEL_NAS_OK;
    size_t other = index;

    if (!line) {
        problem = code && count_levels(code) > 0 ? KEEL_NAS_NEEDS_LEVEL : KEEL_NAS_UNKNOWN;
    } else if (sheet->scored[line->item]) {
        problem = sheet->scored[line->item] == line ? KEEL_NAS_DUPLICATE : KEEL_NAS_ALTERNATIVE;
        other = sheet->scored_entry[line->item];
    } else {
        sheet->scored[line->item] = line;
        sheet->scored_entry[line->item] = index;
        sheet->score_tenths += line->weight_tenths;
    }
    if (earlier)
        *earlier = other;
    return problem;
}

keel_nas_problem keel_nas_validate(char *const *codes, size_t ncodes, size_t *bad, size_t *earlier)
{
    keel_nas_sheet sheet;
    keel_nas_sheet_init(&sheet);
    for (size_t i = 0; i < ncodes; i++) {
        size_t other;
        keel_nas_problem problem = keel_nas_sheet_add(&sheet, codes[i], &other);
        if (problem != KEEL_NAS_OK) {
            if (bad)
                *bad = i;
            if (earlier)
                *earlier = other;
            return problem;
        }
    }
    return KEEL_NAS_OK;
}

int keel_nas_score(char *const *codes, size_t ncodes)
{
    keel_nas_sheet sheet;
    keel_nas_sheet_init(&sheet);
    for (size_t i = 0; i < ncodes; i++)
        if (keel_nas_sheet_add(&sheet, codes[i], NULL) != KEEL_NAS_OK)
            return -1;
    return sheet.score_tenths;
}

static const char *shown(const char *s)
{
    return s ? s : "(null)";
}

/* "4a, 4b or 4c": the levels of the item numbered code. */
static void put_levels(keel_textbuf *t, const char *code)
{
    size_t len = strlen(code), total = count_levels(code), n = 0;
    for (size_t i = 0; i < ARRAY_LEN(table); i++) {
        if (!is_level_of(&table[i], code, len))
            continue;
        keel_textbuf_put(t, "%s%s", n == 0 ? "" : n + 1 == total ? " or " : ", ", table[i].code);
        n++;
    }
}

int keel_nas_problem_format(keel_nas_problem problem, const char *code, const char *earlier_code,
                            char *buf, size_t size)
{
    keel_textbuf t = {buf, size, 0};
    const keel_nas_item *line = keel_nas_find(code);
    if (buf && size)
        buf[0] = '\0';
    switch (problem) {
    case KEEL_NAS_OK:
        keel_textbuf_put(&t, "NAS item \"%s\" is valid", shown(code));
        break;
    case KEEL_NAS_UNKNOWN:
        keel_textbuf_put(
            &t,
            "\"%s\" is not a NAS item; expected an item 2, 3, 5 or 9 to 23, or a level "
            "1a-1c, 4a-4c, 6a-6c, 7a-7b or 8a-8c",
            shown(code));
        break;
    case KEEL_NAS_NEEDS_LEVEL:
        keel_textbuf_put(&t, "NAS item %s is scored by level; expected ", shown(code));
        if (code)
            put_levels(&t, code);
        break;
    case KEEL_NAS_DUPLICATE:
        keel_textbuf_put(&t, "NAS item \"%s\" is listed twice; expected each item once",
                         shown(code));
        break;
    case KEEL_NAS_ALTERNATIVE:
        if (line)
            keel_textbuf_put(
                &t,
                "\"%s\" and \"%s\" are two levels of NAS item %d; expected one level per "
                "item",
                shown(earlier_code), code, line->item);
        else
            keel_textbuf_put(&t,
                             "\"%s\" and \"%s\" are two levels of one NAS item; expected one level",
                             shown(earlier_code), shown(code));
        break;
    }
    if (t.len > INT_MAX)
        return INT_MAX;
    return (int)t.len;
}

int keel_nas_shift_minutes(int score_tenths, int shift_minutes)
{
    if (score_tenths < 0 || shift_minutes < 0)
        return -1;
    /* score / 100 * S minutes = score_tenths * S / 1000, rounded up. */
    long long share = (long long)score_tenths * shift_minutes;
    long long minutes = (share + FULL_TIME_TENTHS - 1) / FULL_TIME_TENTHS;
    return minutes <= INT_MAX ? (int)minutes : -1;
}

const char *keel_nas_note(void)
{
    return "NAS-based minutes are an approximation: NAS scores the care of the past 24 hours, "
           "and keel takes this shift's share of it.";
}

const char *keel_nas_problem_name(keel_nas_problem problem)
{
    switch (problem) {
    case KEEL_NAS_OK:
        return "ok";
    case KEEL_NAS_UNKNOWN:
        return "unknown item";
    case KEEL_NAS_NEEDS_LEVEL:
        return "level missing";
    case KEEL_NAS_DUPLICATE:
        return "item listed twice";
    case KEEL_NAS_ALTERNATIVE:
        return "two levels of one item";
    }
    return "unknown problem";
}
