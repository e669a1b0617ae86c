/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/template.h - a commented roster to fill in (`keel new`), optionally
 * with the patients of a census (`keel import` without a base roster).
 *
 * Where only the unit knows the value (its acuity scale, its limits, its
 * nurses) the template writes KEEL_PLACEHOLDER, which the loader refuses
 * until it is replaced: keel ships no acuity scale of its own, and no law
 * applies unless the user names a ratio table.
 */
#ifndef KEEL_TEMPLATE_H
#define KEEL_TEMPLATE_H

#include "keel/api.h"

#include <stdio.h>

#include "keel/census.h"
#include "keel/error.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct keel_template_options {
    const char *unit_type; /* a unit.type word (keel_unit_type()); NULL: "other" */
    const char *table;     /* a ratio table's name, or NULL for none */
    const char *unit_name; /* or NULL: a placeholder */
    const char *shift;     /* "day", "evening" or "night"; NULL: "day" */
} keel_template_options;

/* Writes the template to out; census may be NULL (one placeholder patient).
 * Statuses: KEEL_OK; KEEL_ERR_USAGE (unknown unit type, shift or table, or a
 * table without an entry for the unit type); KEEL_ERR_IO (a write failed). */
KEEL_API keel_status keel_template_write(const keel_template_options *options, const keel_census *census,
                                FILE *out, keel_error *err);

#ifdef __cplusplus
}
#endif
#endif
