/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/census.h - a unit's census list as CSV, read into roster patients
 * (`keel import`).
 *
 * The first row names the columns; each later row is one patient.  keel's
 * own column names (docs/census-format.md) are
 *
 *   patient   the patient's id (required)
 *   bed       the bed
 *   acuity    the acuity level (a whole number 0-99)
 *   care_minutes  an explicit figure instead of acuity
 *   needs     competencies, separated by ';' or spaces
 *   isolation contact, droplet, airborne or protective (empty: none)
 *   extras    names of policy.extra_minutes, separated by ';' or spaces
 *   ratio     "1:N"
 *   room, zone, previous_nurse, name
 *   nurse     the nurse who had the patient (a past assignment, for keel
 *             audit); with a roster to join, one of its nurses' ids
 *
 * Column names are matched ignoring case and surrounding spaces; other
 * columns are ignored.  A header mapping "field=Header,field=Header" reads a
 * field from a differently named column.  Fields follow RFC 4180: quoted
 * with '"', a doubled '"' inside quotes is one '"', and quoted fields may
 * hold commas and line breaks.  Every problem is reported as
 * file:line:column: field: what is wrong; what was expected.
 */
#ifndef KEEL_CENSUS_H
#define KEEL_CENSUS_H

#include "keel/api.h"

#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The patients of a census file.  Each patient is a roster patient (owned
 * strings, KEEL_ABSENT for figures not given); mark is where its row starts. */
typedef struct keel_census {
    char *path;
    size_t npatients;
    keel_patient *patients;
} keel_census;

/* Reads the census at path; map is a header mapping or NULL.  On success
 * *out is owned by the caller (keel_census_free()).  Statuses: KEEL_OK;
 * KEEL_ERR_IO (cannot read); KEEL_ERR_INPUT (every problem found, with line
 * and column; *out is NULL); KEEL_ERR_USAGE (a bad mapping); KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_census_load(const char *path, const char *map, keel_census **out, keel_error *err);

/* Like keel_census_load() but reads len bytes of text; name is used in
 * messages. */
KEEL_API keel_status keel_census_parse(const char *name, const char *text, size_t len, const char *map,
                              keel_census **out, keel_error *err);

/* Like keel_census_load() and keel_census_parse(), and checks each row
 * against unit, the roster the census joins, as it reads the row: an acuity
 * level must be in unit's policy.acuity_minutes (unless the row gives care
 * minutes), each extra in its policy.extra_minutes and the nurse one of its
 * nurses.  So those problems
 * come with every other problem of the file, in file order, at their line
 * and column.  unit is borrowed; NULL checks nothing against a roster, as
 * keel_census_load() does.  Statuses as for keel_census_load(). */
KEEL_API keel_status keel_census_load_for(const char *path, const char *map,
                                          const keel_roster *unit, keel_census **out,
                                          keel_error *err);
KEEL_API keel_status keel_census_parse_for(const char *name, const char *text, size_t len,
                                           const char *map, const keel_roster *unit,
                                           keel_census **out, keel_error *err);

/* Hands the census's patients to roster r, replacing its patients (r then
 * owns them; the census keeps none).  Checks them against r: acuity levels
 * in policy.acuity_minutes, extras in policy.extra_minutes, the nurse of a
 * `nurse` column among r's nurses; nurses named in previous_nurse are not checked (they may be off the roster).  Problems
 * name the census file and row (keel_census_load_for() finds the same
 * problems with the file's others, at their column).  Statuses: KEEL_OK, KEEL_ERR_INPUT. */
KEEL_API keel_status keel_census_into_roster(keel_census *c, keel_roster *r, keel_error *err);

/* NULL-safe. */
KEEL_API void keel_census_free(keel_census *c);

#ifdef __cplusplus
}
#endif
#endif
