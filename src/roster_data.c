/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_data.c - a loaded roster's data: freeing it, and the look-ups on
 * it (a nurse by id, the minutes of an acuity level or an extra, a skill).
 * The loader's files and the modules above use them.
 */
#include "keel/roster.h"

#include <stdlib.h>
#include <string.h>

#include "roster_internal.h"

static void free_names(char **names, size_t count)
{
    for (size_t i = 0; names && i < count; i++)
        free(names[i]);
    free(names);
}

void keel_roster_data_patient_fini(keel_patient *p)
{
    free(p->id);
    free(p->bed);
    free(p->name);
    free_names(p->extras, p->nextras);
    free_names(p->needs, p->nneeds);
    free(p->nurse);
    free_names(p->avoid, p->navoid);
    free(p->room);
    free(p->zone);
    free(p->previous_nurse);
    free_names(p->nas, p->nnas);
    free_names(p->handoffs, p->nhandoffs);
    for (size_t i = 0; p->record && i < p->nrecord; i++)
        free(p->record[i].nurse);
    free(p->record);
}

void keel_roster_free(keel_roster *roster)
{
    if (!roster)
        return;
    for (size_t i = 0; i < roster->nnurses; i++) {
        keel_nurse *n = &roster->nurses[i];
        free(n->id);
        free(n->name);
        free_names(n->skills, n->nskills);
        free(n->preceptor);
        free(n->breaks);
        free(n->covers);
    }
    free(roster->nurses);
    for (size_t i = 0; i < roster->npatients; i++)
        keel_roster_data_patient_fini(&roster->patients[i]);
    free(roster->patients);
    for (size_t i = 0; i < KEEL_NISOLATION; i++)
        free_names(roster->policy.isolation_needs[i], roster->policy.nisolation_needs[i]);
    for (size_t i = 0; i < roster->policy.nextras; i++)
        free(roster->policy.extra_minutes[i].name);
    free(roster->policy.extra_minutes);
    free(roster->policy.acuity_minutes);
    free(roster->shift.label);
    free(roster->shift.date);
    free(roster->unit.name);
    free(roster->unit.type);
    free(roster->path);
    free(roster);
}

int keel_roster_find_nurse(const keel_roster *roster, const char *id)
{
    for (size_t i = 0; roster && id && i < roster->nnurses; i++)
        if (roster->nurses[i].id && strcmp(roster->nurses[i].id, id) == 0)
            return (int)i;
    return -1;
}

int keel_roster_acuity_minutes(const keel_roster *roster, int level)
{
    for (size_t i = 0; roster && i < roster->policy.nacuity; i++)
        if (roster->policy.acuity_minutes[i].level == level)
            return roster->policy.acuity_minutes[i].minutes;
    return KEEL_ABSENT;
}

int keel_roster_extra_minutes(const keel_roster *roster, const char *name)
{
    for (size_t i = 0; roster && name && i < roster->policy.nextras; i++)
        if (strcmp(roster->policy.extra_minutes[i].name, name) == 0)
            return roster->policy.extra_minutes[i].minutes;
    return KEEL_ABSENT;
}

bool keel_nurse_has_skill(const keel_nurse *nurse, const char *skill)
{
    for (size_t i = 0; i < nurse->nskills; i++)
        if (strcmp(nurse->skills[i], skill) == 0)
            return true;
    return false;
}
