/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_copy.c - a deep copy of a loaded roster, for modules that derive a
 * roster of their own from one (the rest of a shift, keel rebalance --at).
 * The copy owns every string and array it holds, as a loaded roster does;
 * the ratio table stays borrowed from keel's built-in tables.
 *
 * Invariant while copying: every pointer of the copy is either its own or
 * NULL, so keel_roster_free() frees a copy cut short by a failed
 * allocation.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "roster_internal.h"

/* *to = a copy of s (NULL stays NULL); false when memory ran out. */
static bool dup(char **to, const char *s)
{
    *to = s ? keel_strdup(s) : NULL;
    return !s || *to;
}

/* *to = a copy of the n names; false when memory ran out (*to then holds
 * what was copied, NULL-terminated, for the roster's own freeing). */
static bool dup_names(char ***to, char *const *names, size_t n)
{
    *to = NULL;
    if (!names || n == 0)
        return true;
    if (!(*to = keel_calloc(n, sizeof **to)))
        return false;
    for (size_t i = 0; i < n; i++)
        if (!dup(&(*to)[i], names[i]))
            return false;
    return true;
}

static bool copy_nurse(keel_nurse *to, const keel_nurse *from)
{
    *to = *from;
    to->id = to->name = to->preceptor = to->covers = NULL;
    to->skills = NULL;
    to->breaks = NULL;
    if (from->nbreaks) {
        if (!(to->breaks = keel_calloc(from->nbreaks, sizeof *to->breaks)))
            return false;
        memcpy(to->breaks, from->breaks, from->nbreaks * sizeof *to->breaks);
    }
    return dup(&to->id, from->id) && dup(&to->name, from->name) &&
           dup(&to->preceptor, from->preceptor) && dup(&to->covers, from->covers) &&
           dup_names(&to->skills, from->skills, from->nskills);
}

/* to->record = a copy of from's record; false when memory ran out (the
 * stretches not copied hold no nurse, for the patient's own freeing). */
static bool copy_record(keel_patient *to, const keel_patient *from)
{
    if (from->nrecord == 0)
        return true;
    if (!(to->record = keel_calloc(from->nrecord, sizeof *to->record)))
        return false;
    to->nrecord = from->nrecord;
    for (size_t i = 0; i < from->nrecord; i++) {
        to->record[i] = from->record[i];
        if (!dup(&to->record[i].nurse, from->record[i].nurse))
            return false;
    }
    return true;
}

bool keel_roster_copy_patient(keel_patient *to, const keel_patient *from)
{
    *to = *from;
    to->id = to->bed = to->name = to->nurse = to->room = to->zone = to->previous_nurse = NULL;
    to->extras = to->needs = to->avoid = to->nas = to->handoffs = NULL;
    to->record = NULL;
    to->nrecord = 0;
    return copy_record(to, from) && dup(&to->id, from->id) && dup(&to->bed, from->bed) &&
           dup(&to->name, from->name) && dup(&to->nurse, from->nurse) &&
           dup(&to->room, from->room) && dup(&to->zone, from->zone) &&
           dup(&to->previous_nurse, from->previous_nurse) &&
           dup_names(&to->extras, from->extras, from->nextras) &&
           dup_names(&to->needs, from->needs, from->nneeds) &&
           dup_names(&to->avoid, from->avoid, from->navoid) &&
           dup_names(&to->nas, from->nas, from->nnas) &&
           dup_names(&to->handoffs, from->handoffs, from->nhandoffs);
}

static bool copy_policy(keel_roster *to, const keel_roster *from)
{
    size_t na = from->policy.nacuity, ne = from->policy.nextras;
    to->policy.acuity_minutes = NULL;
    to->policy.extra_minutes = NULL;
    to->policy.nextras = 0; /* until the array is there, for the roster's own freeing */
    for (size_t i = 0; i < KEEL_NISOLATION; i++)
        to->policy.isolation_needs[i] = NULL;
    if (na && !(to->policy.acuity_minutes = keel_calloc(na, sizeof *to->policy.acuity_minutes)))
        return false;
    if (na)
        memcpy(to->policy.acuity_minutes, from->policy.acuity_minutes,
               na * sizeof *to->policy.acuity_minutes);
    if (ne && !(to->policy.extra_minutes = keel_calloc(ne, sizeof *to->policy.extra_minutes)))
        return false;
    to->policy.nextras = ne;
    for (size_t i = 0; i < ne; i++) {
        to->policy.extra_minutes[i].minutes = from->policy.extra_minutes[i].minutes;
        if (!dup(&to->policy.extra_minutes[i].name, from->policy.extra_minutes[i].name))
            return false;
    }
    for (size_t i = 0; i < KEEL_NISOLATION; i++)
        if (!dup_names(&to->policy.isolation_needs[i], from->policy.isolation_needs[i],
                       from->policy.nisolation_needs[i]))
            return false;
    return true;
}

keel_roster *keel_roster_copy(const keel_roster *from)
{
    keel_roster *to = keel_malloc(sizeof *to);
    if (!to)
        return NULL;
    *to = *from;
    to->path = to->unit.name = to->unit.type = to->shift.label = to->shift.date = NULL;
    to->nurses = NULL;
    to->patients = NULL;
    to->nnurses = to->npatients = 0;
    bool ok = copy_policy(to, from) && dup(&to->path, from->path) &&
              dup(&to->unit.name, from->unit.name) && dup(&to->unit.type, from->unit.type) &&
              dup(&to->shift.label, from->shift.label) && dup(&to->shift.date, from->shift.date);
    if (ok && from->nnurses && !(to->nurses = keel_calloc(from->nnurses, sizeof *to->nurses)))
        ok = false;
    for (size_t n = 0; ok && n < from->nnurses; n++, to->nnurses++)
        ok = copy_nurse(&to->nurses[n], &from->nurses[n]);
    if (ok && from->npatients &&
        !(to->patients = keel_calloc(from->npatients, sizeof *to->patients)))
        ok = false;
    for (size_t p = 0; ok && p < from->npatients; p++, to->npatients++)
        ok = keel_roster_copy_patient(&to->patients[p], &from->patients[p]);
    if (!ok) {
        keel_roster_free(to);
        return NULL;
    }
    return to;
}
