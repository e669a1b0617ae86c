/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_plan.c - what the writers read of the plan: a patient's first
 * nurse, whether and how much of a patient a nurse holds across the parts
 * of the clock, the planned hand-offs, and whether NAS sets care minutes.
 */
#include "report_internal.h"
#include "workload_internal.h"

bool keel_report_plan_uses_nas(const keel_roster *r)
{
    for (size_t p = 0; p < r->npatients; p++)
        if (r->patients[p].nnas > 0 && r->patients[p].care_minutes == KEEL_ABSENT)
            return true;
    return false;
}

int keel_report_plan_first_nurse(const keel_report *rep, size_t p)
{
    return rep->nurse_of ? rep->nurse_of[rep->workload->first_part[p]] : -1;
}

bool keel_report_plan_holds(const keel_report *rep, size_t p, size_t n)
{
    const keel_workload *w = rep->workload;
    for (int q = w->first_part[p]; rep->nurse_of && q < w->first_part[p + 1]; q++)
        if (rep->nurse_of[q] == (int)n)
            return true;
    return false;
}

long keel_report_plan_care_held(const keel_report *rep, size_t p, size_t n)
{
    const keel_workload *w = rep->workload;
    long care = 0;
    for (int q = w->first_part[p]; rep->nurse_of && q < w->first_part[p + 1]; q++)
        if (rep->nurse_of[q] == (int)n)
            care += w->care_minutes[q];
    return care;
}

bool keel_report_plan_next_handoff(const keel_report *rep, size_t p, int *q, int *at, int *from, int *to)
{
    const keel_workload *w = rep->workload;
    if (!rep->nurse_of)
        return false;
    for ((*q)++; *q < w->first_part[p + 1]; (*q)++) {
        int before = rep->nurse_of[*q - 1], now = rep->nurse_of[*q];
        if (before != now) {
            *at = w->part_start[*q];
            *from = before;
            *to = now;
            return true;
        }
    }
    return false;
}

const char *keel_report_plan_pinned_why(const keel_solution *s, const keel_rank *rk)
{
    return rk->utilisation == s->stages[0].value
               ? "no valid plan has her lower"
               : "no valid plan that keeps the nurses above has her lower";
}

bool keel_report_plan_next_break(const keel_course *c, size_t *i)
{
    bool first = *i >= c->nbreaks;
    int last = first ? 0 : c->breaks[*i].at;
    size_t next = c->nbreaks;
    for (size_t k = 0; k < c->nbreaks; k++) {
        int at = c->breaks[k].at;
        bool after = first || at > last || (at == last && k > *i);
        if (after && (next == c->nbreaks || at < c->breaks[next].at))
            next = k;
    }
    *i = next;
    return next < c->nbreaks;
}
