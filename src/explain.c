/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * explain.c - a reason per patient for the nurse it went to; see
 * keel/explain.h for the order in which reasons are tried.
 */
#include "keel/explain.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "workload_internal.h"

const char *keel_reason_name(keel_reason reason)
{
    static const char *const names[] = {"locked", "only_nurse", "kept", "same_zone", "balance"};
    return (size_t)reason < sizeof names / sizeof names[0] ? names[reason] : "balance";
}

void keel_explanation_free(keel_explanation *e)
{
    if (!e)
        return;
    for (size_t p = 0; e->text && p < e->npatients; p++)
        free(e->text[p]);
    free(e->text);
    free(e->reason);
    free(e);
}

/* The competencies p needs, as "chemo and tele", or NULL when none. */
static char *needs_of(const keel_patient *p)
{
    char *text = NULL;
    for (size_t i = 0; i < p->nneeds; i++) {
        char *next =
            text ? keel_asprintf("%s and %s", text, p->needs[i]) : keel_strdup(p->needs[i]);
        free(text);
        if (!next)
            return NULL;
        text = next;
    }
    return text;
}

static char *explain_one(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                         size_t p, keel_reason *reason)
{
    const keel_patient *pt = &r->patients[w->patient[p]];
    size_t n = (size_t)nurse_of[p];
    const char *id = r->nurses[n].id;
    size_t eligible = 0;
    for (size_t m = 0; m < w->nnurses; m++)
        eligible += keel_workload_eligible(w, p, m);
    if (pt->lock) {
        *reason = KEEL_REASON_LOCKED;
        return keel_asprintf("locked to %s", id);
    }
    if (eligible == 1) {
        *reason = KEEL_REASON_ONLY_NURSE;
        char *needs = needs_of(pt);
        char *text = needs ? keel_asprintf("%s is the only nurse taking patients who may have "
                                           "this patient (needs %s)",
                                           id, needs)
                           : keel_asprintf("%s is the only nurse taking patients who may have "
                                           "this patient",
                                           id);
        free(needs);
        return text;
    }
    if (w->previous[p] == (int)n) {
        *reason = KEEL_REASON_KEPT;
        return keel_asprintf("kept with %s from the last shift", id);
    }
    if (pt->zone) {
        size_t others = 0, same = 0;
        for (size_t q = 0; q < w->npatients; q++) {
            if (q == p || nurse_of[q] != (int)n)
                continue;
            others++;
            same += w->zone[q] == w->zone[p];
        }
        if (others > 0 && same == others) {
            *reason = KEEL_REASON_SAME_ZONE;
            return keel_asprintf("%s's other patients are in zone %s too", id, pt->zone);
        }
    }
    long long load = w->duty_minutes[n];
    for (size_t q = 0; q < w->npatients; q++)
        if (nurse_of[q] == (int)n)
            load += w->care_minutes[q];
    *reason = KEEL_REASON_BALANCE;
    return keel_asprintf("balance: %s had room for its %d min (%s ends at %.1f %%)", id,
                         w->care_minutes[p], id,
                         100.0 * (double)load / (double)w->capacity_minutes[n]);
}

keel_status keel_explain(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                         keel_explanation **out, keel_error *err)
{
    size_t np = w->npeople;
    keel_explanation *e = keel_calloc(1, sizeof *e);
    *out = NULL;
    if (!e)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    e->npatients = np;
    e->reason = keel_calloc(np ? np : 1, sizeof *e->reason);
    e->text = keel_calloc(np ? np : 1, sizeof *e->text);
    bool ok = e->reason && e->text;
    for (size_t p = 0; ok && p < np; p++) {
        size_t q = (size_t)w->first_part[p]; /* the nurse the patient starts with */
        e->text[p] = nurse_of[q] >= 0 ? explain_one(r, w, nurse_of, q, &e->reason[p])
                                      : keel_strdup("no nurse");
        ok = e->text[p] != NULL;
    }
    if (!ok) {
        keel_explanation_free(e);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    *out = e;
    return KEEL_OK;
}
