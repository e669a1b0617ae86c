/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/law.h - built-in nurse-to-patient ratio tables (policy.ratio_table).
 *
 * A table encodes one published rule, entry by entry, each entry with its
 * kind: a per-nurse maximum (no nurse has more than N patients) or a ward
 * minimum (the ward has at least ceil(census / N) nurses; the patients are
 * then shared out by acuity).  Only entries checked against the primary
 * text are shipped.  Each table says which text, which version and when it
 * was encoded, and keel names a table everywhere with all three
 * (keel_law_cite()): a report says a plan "exceeds the limit of 1:5 for
 * med-surg in <the table cited>", never that a roster is lawful or unlawful.
 */
#ifndef KEEL_LAW_H
#define KEEL_LAW_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum keel_law_kind {
    KEEL_LAW_NURSE_MAX, /* at most N patients per nurse, at all times */
    KEEL_LAW_WARD_MIN,  /* at least ceil(census / N) nurses on the ward */
} keel_law_kind;

/* The shift classes a ward-minimum rule may distinguish. */
typedef enum keel_shift_class {
    KEEL_SHIFT_ANY,
    KEEL_SHIFT_MORNING,
    KEEL_SHIFT_AFTERNOON,
    KEEL_SHIFT_NIGHT,
} keel_shift_class;

typedef struct keel_law_entry {
    const char *unit_type; /* a unit.type word */
    keel_law_kind kind;
    keel_shift_class shift; /* KEEL_SHIFT_ANY unless the rule differs by shift */
    int patients_per_nurse; /* the N of 1:N */
} keel_law_entry;

typedef struct keel_law_table {
    const char *name;     /* the policy.ratio_table word */
    const char *citation; /* the text encoded */
    const char *version;  /* the version or effective date of that text */
    const char *encoded;  /* when keel encoded it, YYYY-MM-DD */
    const char *classes;  /* how the shift classes are defined, or NULL */
    size_t nentries;
    const keel_law_entry *entries;
    const char *note; /* what a reader must know beside the citation (e.g. that the
                         text was superseded), a sentence; NULL when nothing */
} keel_law_table;

/* Room enough for keel_law_cite() of every built-in table. */
#define KEEL_LAW_CITE_SIZE 512

/* The built-in tables, in a fixed order. */
KEEL_API size_t keel_law_ntables(void);
KEEL_API const keel_law_table *keel_law_table_at(size_t i);

/* Writes how keel names table t wherever it names one: its name, the text it
 * encodes, the version of that text and the date keel encoded it, as
 * "<name> (<citation>; <version>; as encoded by keel on <encoded>)", e.g.
 * "queensland (Hospital and Health Boards Regulation 2012 (Qld), Part 6A;
 * Part 6A as in force from 2016-07-01; as encoded by keel on 2026-12-02)".
 * t->note is not part of it: a report shows the note once beside the table.
 * buf is always NUL-terminated when size > 0 (buf may be NULL when size is
 * 0); KEEL_LAW_CITE_SIZE holds every built-in table.  Returns the length the
 * full text needs, like snprintf; with t NULL, "" and 0. */
KEEL_API int keel_law_cite(const keel_law_table *t, char *buf, size_t size);

/* The table named name, or NULL. */
KEEL_API const keel_law_table *keel_law_find(const char *name);

/* True when the table has an entry of any kind for the unit type. */
KEEL_API bool keel_law_covers(const keel_law_table *t, const char *unit_type);

/* The per-nurse maximum for the unit type, or -1 when the table sets none. */
KEEL_API int keel_law_nurse_max(const keel_law_table *t, const char *unit_type);

/* The shift class of a shift that starts start_minute after midnight and
 * lasts minutes: the class whose hours it overlaps most, ties settled as the
 * table's text says (Queensland s 30A(2): morning and afternoon equal is
 * afternoon, afternoon and night equal is night, morning and night equal is
 * morning).  A table without shift classes, or start_minute < 0, gives
 * KEEL_SHIFT_ANY. */
KEEL_API keel_shift_class keel_law_shift_class(const keel_law_table *t, int start_minute, int minutes);

/* True when the shift (as for keel_law_shift_class()) has minutes in more
 * than one of the table's shift classes, e.g. 19:00-07:00 under queensland
 * (4 h afternoon, 8 h night); false for a table without shift classes or
 * start_minute < 0. */
KEEL_API bool keel_law_shift_spans(const keel_law_table *t, int start_minute, int minutes);

/* When the shift spans classes (keel_law_shift_spans()), writes how keel
 * classes it and by which rule: "classed as night under <keel_law_cite(t)>
 * (the shift spans 240 min of afternoon and 480 min of night; keel applies
 * the class that holds most of the shift's minutes, a tie settled as section
 * 30A(2) of the text says)"; otherwise writes "" and returns 0.  buf and the
 * return value as for keel_law_cite(); 2 * KEEL_LAW_CITE_SIZE holds it. */
KEEL_API int keel_law_shift_class_note(const keel_law_table *t, int start_minute, int minutes,
                                       char *buf, size_t size);

/* Name of a shift class ("morning", ...; "any"). */
KEEL_API const char *keel_shift_class_name(keel_shift_class c);

/* The ward minimum of nurses for census patients on a unit of this type and
 * shift class, or -1 when the table sets none. */
KEEL_API int keel_law_ward_minimum(const keel_law_table *t, const char *unit_type, keel_shift_class c,
                          size_t census);

#ifdef __cplusplus
}
#endif
#endif
