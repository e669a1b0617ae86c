/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/finding.h - a statement about a roster or a plan, tied to one of the
 * design's rule names: why no valid assignment exists (a diagnosis), or
 * which rule a given plan breaks (a violation).  The same shape serves both,
 * so every report lists them the same way.
 *
 * Rule names (one list for the whole product): skill, patient_limit,
 * patient_ratio, law_limit, high_acuity, isolation, zones, lock, avoid,
 * capacity, min_patients, moment_limit, hand_off, break_cover, role_acuity.
 */
#ifndef KEEL_FINDING_H
#define KEEL_FINDING_H

#include "keel/api.h"

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct keel_finding {
    const char *rule; /* static rule name */
    size_t npatients;
    size_t *patients; /* patient indices into the roster */
    size_t nnurses;
    size_t *nurses; /* nurse indices into the roster */
    char *message;  /* plain words, naming patients, nurses and what is short */
} keel_finding;

/* A growable list of findings; owns its entries. */
typedef struct keel_findings {
    size_t n;
    keel_finding *items;
} keel_findings;

/* Frees every finding in the list and empties it.  NULL-safe. */
KEEL_API void keel_findings_fini(keel_findings *list);

#ifdef __cplusplus
}
#endif
#endif
