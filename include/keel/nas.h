/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/nas.h - care minutes from the Nursing Activities Score (NAS; Miranda
 * et al., Crit Care Med 2003), a published nursing workload instrument.  It
 * sits beside the roster and feeds workload:
 *
 *   roster (patients[].nas: a list of item codes) -> nas -> workload
 *
 * NAS has 23 items.  Items 1, 4, 6, 7 and 8 are scored by level ("1a",
 * "1b", "1c", ...): the levels of one item are alternatives, so at most one
 * of them is scored.  Every other item ("2", "3", "5", "9" ... "23") is
 * scored or not.  An item is scored once.  A patient's score is the sum of
 * the weights of the scored items; weights have one decimal, so scores are
 * kept exactly, in tenths of a point (55.6 points is 556).  The largest
 * possible score is 176.8 points.
 *
 * The score is the share of one nurse's time the patient took over 24
 * hours: 100 points is one nurse's whole day, 1 point is 14.4 minutes per
 * 24 hours.  The share of a shift of S minutes is score / 100 * S minutes,
 * rounded up to whole minutes like every keel load.  NAS scores the care
 * given in the past 24 hours, so minutes for the coming shift are an
 * approximation; reports that show NAS-based minutes print
 * keel_nas_note().
 *
 * Nothing here allocates, prints or keeps state between calls; the item
 * table is built in and never changes.
 */
#ifndef KEEL_NAS_H
#define KEEL_NAS_H

#include "keel/api.h"

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Items of the instrument, numbered 1 to KEEL_NAS_NITEMS. */
#define KEEL_NAS_NITEMS 23

/* Minutes of one nurse's day: 100 points of NAS. */
#define KEEL_NAS_DAY_MINUTES 1440

/* One line of the item table: an item, or one level of an item. */
typedef struct keel_nas_item {
    const char *code;  /* as written in a roster: "1a", "4b", "12" */
    int item;          /* 1 .. KEEL_NAS_NITEMS */
    char level;        /* 'a', 'b' or 'c' for a level of items 1, 4, 6, 7 and 8; '\0' otherwise */
    int weight_tenths; /* the weight in tenths of a point: 12.1 points is 121 */
    const char *label; /* a short description in keel's own words */
} keel_nas_item;

/* Lines in the item table (items and levels), and line i in table order
 * (by item, then level), or NULL when i is out of range.  Borrowed: the
 * table is static. */
KEEL_API size_t keel_nas_ntable(void);
KEEL_API const keel_nas_item *keel_nas_table_at(size_t i);

/* The line whose code is exactly code ("1a", not "1A" or " 1a"), or NULL.
 * NULL code gives NULL. */
KEEL_API const keel_nas_item *keel_nas_find(const char *code);

/* What is wrong with one entry of a patient's list of codes. */
typedef enum keel_nas_problem {
    KEEL_NAS_OK,          /* the entry is valid */
    KEEL_NAS_UNKNOWN,     /* no item or level has this code */
    KEEL_NAS_NEEDS_LEVEL, /* the number of an item scored by level ("4"): name the level */
    KEEL_NAS_DUPLICATE,   /* the same code is already in the list */
    KEEL_NAS_ALTERNATIVE, /* another level of the same item is already in the list */
} keel_nas_problem;

/* A patient's list of codes being checked entry by entry, e.g. as a loader
 * reads patients[p].nas[i] with its file position.  Initialise with
 * keel_nas_sheet_init(); nothing to free.  Fields are read-only. */
typedef struct keel_nas_sheet {
    size_t nentries;  /* entries offered so far, valid or not */
    int score_tenths; /* sum of the weights of the valid entries */
    /* Per item number: the line that scores it (NULL: not scored) and the
     * index of that entry.  Index 0 is unused. */
    const keel_nas_item *scored[KEEL_NAS_NITEMS + 1];
    size_t scored_entry[KEEL_NAS_NITEMS + 1];
} keel_nas_sheet;

/* Sets sheet to an empty list (score 0).  sheet must not be NULL. */
KEEL_API void keel_nas_sheet_init(keel_nas_sheet *sheet);

/* Offers the next entry of the list; its index is sheet->nentries before
 * the call (0 for the first).  A valid entry adds its weight to the score;
 * an invalid one is left out and the checking can go on, so a caller can
 * report every bad entry.  Returns the entry's problem (KEEL_NAS_OK when
 * valid).  When earlier is not NULL, *earlier is set to the index of the
 * entry already holding the item for KEEL_NAS_DUPLICATE and
 * KEEL_NAS_ALTERNATIVE, and to the entry's own index otherwise.  A NULL
 * code is KEEL_NAS_UNKNOWN. */
KEEL_API keel_nas_problem keel_nas_sheet_add(keel_nas_sheet *sheet, const char *code, size_t *earlier);

/* Checks codes[0 .. ncodes) and returns the first problem, or KEEL_NAS_OK
 * when the whole list is valid.  On a problem, *bad (when not NULL) is the
 * index of the first bad entry and *earlier (when not NULL) is as for
 * keel_nas_sheet_add(); both are left alone on KEEL_NAS_OK.  codes may be
 * NULL when ncodes is 0. */
KEEL_API keel_nas_problem keel_nas_validate(char *const *codes, size_t ncodes, size_t *bad, size_t *earlier);

/* The score of codes[0 .. ncodes) in tenths of a point (0 for an empty
 * list), or -1 when the list is not valid (see keel_nas_validate()). */
KEEL_API int keel_nas_score(char *const *codes, size_t ncodes);

/* Writes the message for a problem of entry code into buf, in keel's shape
 * "what is wrong; what was expected" without file, position or key (the
 * caller adds them, e.g. "patients[3].nas[2]").  earlier_code is the code
 * of the earlier entry for KEEL_NAS_DUPLICATE and KEEL_NAS_ALTERNATIVE and
 * is ignored otherwise; NULL strings are shown as "(null)".  buf is always
 * NUL-terminated when size > 0 (buf may be NULL when size is 0).  Returns
 * the length the full text needs, like snprintf. */
KEEL_API int keel_nas_problem_format(keel_nas_problem problem, const char *code, const char *earlier_code,
                            char *buf, size_t size);

/* Care minutes of a patient with a score of score_tenths over a shift of
 * shift_minutes: score / 100 * shift_minutes, i.e. score points * 14.4
 * minutes per 24 hours scaled to the shift, rounded up to whole minutes.
 * 100 points over 480 minutes is 480; 55.6 points over a day is 800.64,
 * so 801.  Returns -1 when either argument is negative or the result does
 * not fit an int.  The figure is an approximation: see keel_nas_note(). */
KEEL_API int keel_nas_shift_minutes(int score_tenths, int shift_minutes);

/* A one-sentence caution for reports that show NAS-based minutes.  Static
 * text. */
KEEL_API const char *keel_nas_note(void);

/* A short, static name of a problem ("unknown item", ...; "ok"). */
KEEL_API const char *keel_nas_problem_name(keel_nas_problem problem);

#ifdef __cplusplus
}
#endif
#endif
