/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * testutil.h - small in-memory rosters and workloads for the solver tests,
 * without going through the YAML loader.  A seeded generator keeps random
 * tests repeatable.
 */
#ifndef KEEL_TESTUTIL_H
#define KEEL_TESTUTIL_H

#include <stdint.h>
#include <stdio.h>
#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "keel/keel.h"
#include "rule.h"
#include "workload_internal.h"

/* A roster with nurses N1.. and patients P1.., owned by the test. */
typedef struct tu_case {
    keel_roster roster;
    keel_workload w;
} tu_case;

static inline uint64_t tu_next(uint64_t *state)
{
    /* splitmix64 */
    uint64_t z = (*state += 0x9e3779b97f4a7c15ULL);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
}

static inline int tu_range(uint64_t *state, int lo, int hi)
{
    return lo + (int)(tu_next(state) % (uint64_t)(hi - lo + 1));
}

static inline char *tu_strdup(const char *s)
{
    char *c = malloc(strlen(s) + 1);
    strcpy(c, s);
    return c;
}

/* Allocates a case with nn nurses and np patients, every pair eligible,
 * capacity 660, no duty, no limit beyond the census. */
static inline tu_case *tu_case_new(size_t nn, size_t np)
{
    tu_case *c = calloc(1, sizeof *c);
    char id[32];
    c->roster.path = tu_strdup("memory");
    c->roster.shift.minutes = 720;
    c->roster.shift.start_minute = KEEL_ABSENT;
    c->roster.shift.break_minutes = 60;
    c->roster.policy.max_patients = KEEL_ABSENT;
    for (size_t i = 0; i < KEEL_NROLES; i++)
        c->roster.policy.roles[i] = (keel_role_policy){KEEL_ABSENT, KEEL_ABSENT, KEEL_ABSENT};
    c->roster.nnurses = nn;
    c->roster.nurses = calloc(nn ? nn : 1, sizeof *c->roster.nurses);
    c->roster.npatients = np;
    c->roster.patients = calloc(np ? np : 1, sizeof *c->roster.patients);
    for (size_t n = 0; n < nn; n++) {
        snprintf(id, sizeof id, "N%zu", n + 1);
        c->roster.nurses[n].id = tu_strdup(id);
        c->roster.nurses[n].skills = calloc(8, sizeof(char *));
        c->roster.nurses[n].max_patients = KEEL_ABSENT;
        c->roster.nurses[n].minutes = KEEL_ABSENT;
        c->roster.nurses[n].break_minutes = KEEL_ABSENT;
        c->roster.nurses[n].duty_minutes = KEEL_ABSENT;
        c->roster.nurses[n].start = KEEL_ABSENT;
        c->roster.nurses[n].end = KEEL_ABSENT;
    }
    for (size_t p = 0; p < np; p++) {
        snprintf(id, sizeof id, "P%zu", p + 1);
        c->roster.patients[p].id = tu_strdup(id);
        c->roster.patients[p].needs = calloc(8, sizeof(char *));
        c->roster.patients[p].acuity = KEEL_ABSENT;
        c->roster.patients[p].care_minutes = KEEL_ABSENT;
        c->roster.patients[p].arrives_at = KEEL_ABSENT;
        c->roster.patients[p].leaves_at = KEEL_ABSENT;
    }
    c->w.npatients = np;
    c->w.nnurses = nn;
    c->w.care_minutes = calloc(np ? np : 1, sizeof(int));
    c->w.capacity_minutes = calloc(nn ? nn : 1, sizeof(int));
    c->w.duty_minutes = calloc(nn ? nn : 1, sizeof(int));
    c->w.max_patients = calloc(nn ? nn : 1, sizeof(int));
    c->w.eligible = calloc(np * nn > 0 ? np * nn : 1, sizeof(bool));
    c->w.law_limit = KEEL_ABSENT;
    c->w.ratio_limit = calloc(np ? np : 1, sizeof(int));
    c->w.high_acuity = calloc(np ? np : 1, sizeof(bool));
    c->w.max_high_acuity = KEEL_ABSENT;
    c->w.side = calloc(np ? np : 1, sizeof(signed char));
    c->w.zone = calloc(np ? np : 1, sizeof(int));
    c->w.max_zones = KEEL_ABSENT;
    c->w.room = calloc(np ? np : 1, sizeof(int));
    c->w.previous = calloc(np ? np : 1, sizeof(int));
    c->w.min_patients = calloc(nn ? nn : 1, sizeof(int));
    c->w.max_care = calloc(nn ? nn : 1, sizeof(long long));
    c->w.tolerance = KEEL_TOLERANCE_SCALE / 20;
    /* No clock: one part per patient, one moment. */
    c->w.npeople = np;
    c->w.shift_minutes = 720;
    c->w.patient = calloc(np ? np : 1, sizeof(int));
    c->w.first_part = calloc(np + 1, sizeof(int));
    c->w.part_start = calloc(np ? np : 1, sizeof(int));
    c->w.part_end = calloc(np ? np : 1, sizeof(int));
    c->w.first_moment = calloc(np ? np : 1, sizeof(int));
    c->w.last_moment = calloc(np ? np : 1, sizeof(int));
    c->w.nurse_start = calloc(nn ? nn : 1, sizeof(int));
    c->w.nurse_end = calloc(nn ? nn : 1, sizeof(int));
    c->w.nmoments = 1;
    c->w.moment_start = calloc(2, sizeof(int));
    c->w.moment_start[1] = 720;
    for (size_t p = 0; p <= np; p++)
        c->w.first_part[p] = (int)p;
    for (size_t n = 0; n < nn; n++)
        c->w.nurse_end[n] = 720;
    for (size_t p = 0; p < np; p++) {
        c->w.patient[p] = (int)p;
        c->w.part_end[p] = 720;
        c->w.last_moment[p] = 1;
    }
    for (size_t p = 0; p < np; p++) {
        c->w.ratio_limit[p] = (int)np;
        c->w.zone[p] = -1;
        c->w.room[p] = -1;
        c->w.previous[p] = -1;
    }
    for (size_t n = 0; n < nn; n++) {
        c->w.max_care[n] = LLONG_MAX;
        c->w.capacity_minutes[n] = 660;
        c->w.max_patients[n] = (int)np;
    }
    for (size_t i = 0; i < np * nn; i++)
        c->w.eligible[i] = true;
    keelRuleFlags(&c->w);
    return c;
}

/* Gives nurse n the skill, patient p the need (static strings), and keeps
 * the eligibility matrix in step with them. */
static inline void tu_add_skill(tu_case *c, size_t n, const char *skill)
{
    keel_nurse *nu = &c->roster.nurses[n];
    nu->skills[nu->nskills++] = tu_strdup(skill);
}

static inline void tu_add_need(tu_case *c, size_t p, const char *skill)
{
    keel_patient *pa = &c->roster.patients[p];
    pa->needs[pa->nneeds++] = tu_strdup(skill);
}

/* Recomputes eligible pairs from skills, needs and limits, and the rule
 * switches (keelRuleFlags()): call it after changing a case's rule data. */
static inline void tu_refresh(tu_case *c)
{
    for (size_t p = 0; p < c->w.npatients; p++) {
        const keel_patient *pa = &c->roster.patients[p];
        for (size_t n = 0; n < c->w.nnurses; n++) {
            const keel_nurse *nu = &c->roster.nurses[n];
            bool ok = c->w.max_patients[n] > 0;
            for (size_t i = 0; i < pa->nneeds && ok; i++) {
                bool has = false;
                for (size_t j = 0; j < nu->nskills; j++)
                    has = has || strcmp(nu->skills[j], pa->needs[i]) == 0;
                ok = has;
            }
            c->w.eligible[p * c->w.nnurses + n] = ok;
        }
    }
    keelRuleFlags(&c->w);
}

static inline void tu_case_free(tu_case *c)
{
    if (!c)
        return;
    for (size_t n = 0; n < c->roster.nnurses; n++) {
        free(c->roster.nurses[n].id);
        for (size_t i = 0; i < c->roster.nurses[n].nskills; i++)
            free(c->roster.nurses[n].skills[i]);
        free(c->roster.nurses[n].skills);
    }
    for (size_t p = 0; p < c->roster.npatients; p++) {
        free(c->roster.patients[p].id);
        for (size_t i = 0; i < c->roster.patients[p].nneeds; i++)
            free(c->roster.patients[p].needs[i]);
        free(c->roster.patients[p].needs);
    }
    free(c->roster.nurses);
    free(c->roster.patients);
    free(c->roster.path);
    free(c->w.care_minutes);
    free(c->w.capacity_minutes);
    free(c->w.duty_minutes);
    free(c->w.max_patients);
    free(c->w.column_kind);
    free(c->w.eligible);
    free(c->w.ratio_limit);
    free(c->w.high_acuity);
    free(c->w.side);
    free(c->w.zone);
    free(c->w.room);
    free(c->w.previous);
    free(c->w.min_patients);
    free(c->w.max_care);
    free(c->w.patient);
    free(c->w.first_part);
    free(c->w.part_start);
    free(c->w.part_end);
    free(c->w.first_moment);
    free(c->w.last_moment);
    free(c->w.nurse_start);
    free(c->w.nurse_end);
    free(c->w.moment_start);
    free(c);
}

#endif
