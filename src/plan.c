/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * plan.c - an assignment people wrote (each patient's `nurse:`), and the
 * rules it breaks.  Used by `keel check` to score a charge nurse's own plan.
 * Every rule of the table (rule.h) judges the plan where its scope says:
 * each stretch of a patient with a nurse, each nurse at each moment, each
 * nurse's shift, each patient's parts; this file walks the plan and words
 * the time of a broken limit: every stretch of moments in which it holds,
 * worded where the nurse holds the most.  A limit set by a ratio table is
 * reported as "exceeds the limit of 1:N for <unit type> in <table cited>"
 * (keel_law_cite(): the text, its version and the date keel encoded it),
 * never as a judgement
 * that the plan is unlawful.
 */
#include "keel/plan.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

/* True when nurse n is on throughout part q. */
static bool on_for(const keel_workload *w, size_t q, int n)
{
    return n >= 0 && w->nurse_start[n] <= w->part_start[q] && w->nurse_end[n] >= w->part_end[q];
}

/* The nurse of the stretch of patient pat's record that part q lies in. */
static int recorded(const keel_roster *r, const keel_workload *w, const keel_patient *pat, size_t q)
{
    size_t k = 0;
    while (k + 1 < pat->nrecord && pat->record[k].to <= w->part_start[q])
        k++;
    return keel_roster_find_nurse(r, pat->record[k].nurse);
}

bool keel_plan_from_roster(const keel_roster *r, const keel_workload *w, int *nurse_of)
{
    bool complete = true;
    for (size_t p = 0; p < r->npatients; p++) {
        const keel_patient *pat = &r->patients[p];
        size_t next = 0; /* the next planned hand-off */
        int open = keel_workload_first_open(r, w, p);
        int n = pat->nurse ? keel_roster_find_nurse(r, pat->nurse) : -1;
        for (int q = w->first_part[p]; q < open; q++) {
            nurse_of[q] = recorded(r, w, pat, (size_t)q);
            complete = complete && nurse_of[q] >= 0;
        }
        for (int q = open; q < w->first_part[p + 1]; q++) {
            if (q > open && n >= 0 && !on_for(w, (size_t)q, n))
                n = next < pat->nhandoffs ? keel_roster_find_nurse(r, pat->handoffs[next++]) : -1;
            nurse_of[q] = n;
            complete = complete && n >= 0;
        }
    }
    return complete;
}

/* True when part q starts a stretch with a new nurse (the patient's first
 * part, or a hand-off). */
static bool starts_stretch(const keel_workload *w, const int *nurse_of, size_t q)
{
    return w->first_part[w->patient[q]] == (int)q || nurse_of[q - 1] != nurse_of[q];
}

/* True when rule i is to be checked on w. */
static bool applies(const keel_workload *w, size_t i)
{
    return keel_rules[i]->check && (!keel_rules[i]->binds || keel_rules[i]->binds(w));
}

/* Asks rules [first, end) of a run about one place of the plan. */
static keel_status ask(const keel_rule_plan *c, size_t first, size_t end, size_t n, size_t m,
                       const size_t *mine, size_t k, keel_findings *out)
{
    keel_status rc = KEEL_OK;
    for (size_t i = first; i < end && !rc; i++)
        if (applies(c->w, i))
            rc = keel_rules[i]->check(c, n, m, mine, k, out);
    return rc;
}

/* One rule a nurse breaks at one moment, holding k parts then. */
typedef struct hit {
    size_t m, k;
    keel_finding f; /* owned until reported */
} hit;

static void hit_free(hit *h)
{
    free(h->f.patients);
    free(h->f.nurses);
    free(h->f.message);
    h->f = (keel_finding){0};
}

/* Reports one nurse's hits as stretches: the moments in a row during which
 * she breaks the same rule make one finding, worded at the moment she holds
 * the most and timed over the whole stretch; a rule broken again later is a
 * stretch of its own.  Every hit is freed. */
static keel_status report_stretches(const keel_roster *r, const keel_workload *w, hit *hits,
                                    size_t nhits, keel_findings *out)
{
    keel_status rc = KEEL_OK;
    for (size_t i = 0; i < nhits; i++) {
        if (!hits[i].f.rule)
            continue;
        size_t m0 = hits[i].m, m1 = m0 + 1, worst = i;
        for (size_t j = i + 1; j < nhits; j++) {
            if (!hits[j].f.rule || strcmp(hits[j].f.rule, hits[i].f.rule) != 0)
                continue;
            if (hits[j].m > m1)
                break; /* a gap: the rule is broken again later, a stretch of its own */
            if (hits[j].m == m1)
                m1++;
            if (hits[j].k > hits[worst].k) {
                if (worst != i)
                    hit_free(&hits[worst]);
                worst = j;
            } else {
                hit_free(&hits[j]);
            }
        }
        const keel_finding *f = &hits[worst].f;
        char at[KEEL_TIME_SIZE], until[KEEL_TIME_SIZE];
        keel_roster_clock_text(r, w->moment_start[m0], at);
        keel_roster_clock_text(r, w->moment_start[m1], until);
        char *msg = w->clocked ? keel_asprintf("from %s to %s, %s", at, until, f->message)
                               : keel_strdup(f->message);
        if (!rc)
            rc = keel_findings_add(out, f->rule, f->patients, f->npatients, f->nurses, f->nnurses,
                                   msg);
        else
            free(msg);
        if (worst != i)
            hit_free(&hits[worst]);
        hit_free(&hits[i]);
    }
    for (size_t i = 0; i < nhits; i++)
        hit_free(&hits[i]);
    return rc;
}

/* The rules that judge one pair: each part that starts a stretch with a
 * nurse. */
static keel_status check_pairs(const keel_rule_plan *c, size_t first, size_t end,
                               keel_findings *out)
{
    const keel_workload *w = c->w;
    keel_status rc = KEEL_OK;
    for (size_t q = 0; q < w->npatients && !rc; q++)
        if (c->nurse_of[q] >= 0 && starts_stretch(w, c->nurse_of, q))
            rc = ask(c, first, end, (size_t)c->nurse_of[q], 0, &q, 1, out);
    return rc;
}

/* The rules on what a nurse holds at each moment, each broken rule
 * reported for every stretch of moments in which it holds. */
static keel_status check_moments(const keel_rule_plan *c, size_t first, size_t end, size_t *mine,
                                 keel_findings *out)
{
    const keel_workload *w = c->w;
    keel_status rc = KEEL_OK;
    hit *hits = NULL;
    size_t cap = 0;
    for (size_t n = 0; n < w->nnurses && !rc; n++) {
        size_t nhits = 0;
        for (size_t m = 0; m < w->nmoments && !rc; m++) {
            size_t k = 0;
            for (size_t q = 0; q < w->npatients; q++)
                if (c->nurse_of[q] == (int)n && w->first_moment[q] <= (int)m &&
                    (int)m < w->last_moment[q])
                    mine[k++] = q;
            if (k == 0)
                continue;
            keel_findings found = {0};
            rc = ask(c, first, end, n, m, mine, k, &found);
            for (size_t i = 0; !rc && i < found.n; i++) {
                if (nhits == cap) {
                    size_t bigger = cap ? 2 * cap : 16;
                    hit *grown = keel_reallocarray(hits, bigger, sizeof *hits);
                    if (!grown) {
                        rc = KEEL_ERR_NOMEM;
                        break;
                    }
                    hits = grown;
                    cap = bigger;
                }
                hits[nhits++] = (hit){.m = m, .k = k, .f = found.items[i]};
                found.items[i] = (keel_finding){0};
            }
            keel_findings_fini(&found);
        }
        keel_status done = report_stretches(c->r, w, hits, nhits, out);
        rc = rc ? rc : done;
    }
    free(hits);
    return rc;
}

/* The rules on a nurse's whole shift. */
static keel_status check_shifts(const keel_rule_plan *c, size_t first, size_t end, size_t *mine,
                                keel_findings *out)
{
    const keel_workload *w = c->w;
    keel_status rc = KEEL_OK;
    for (size_t n = 0; n < w->nnurses && !rc; n++) {
        size_t k = 0;
        for (size_t q = 0; q < w->npatients; q++)
            if (c->nurse_of[q] == (int)n)
                mine[k++] = q;
        rc = ask(c, first, end, n, 0, mine, k, out);
    }
    return rc;
}

/* The rules on one patient's parts over the shift. */
static keel_status check_patients(const keel_rule_plan *c, size_t first, size_t end, size_t *mine,
                                  keel_findings *out)
{
    const keel_workload *w = c->w;
    keel_status rc = KEEL_OK;
    for (size_t p = 0; p < w->npeople && !rc; p++) {
        size_t k = 0;
        for (int q = w->first_part[p]; q < w->first_part[p + 1]; q++)
            mine[k++] = (size_t)q;
        if (k > 0)
            rc = ask(c, first, end, 0, 0, mine, k, out);
    }
    return rc;
}

keel_status keel_plan_check(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                            keel_findings *out, keel_error *err)
{
    keel_rule_plan c = {.r = r, .w = w, .nurse_of = nurse_of};
    size_t *mine = keel_malloc((w->npatients ? w->npatients : 1) * sizeof *mine);
    keel_status rc = mine ? KEEL_OK : KEEL_ERR_NOMEM;
    /* The table in runs of one scope, in its order. */
    for (size_t first = 0, end; first < KEEL_NRULES && !rc; first = end) {
        keel_rule_scope scope = keel_rules[first]->scope;
        for (end = first + 1; end < KEEL_NRULES && keel_rules[end]->scope == scope; end++)
            ;
        switch (scope) {
        case KEEL_SCOPE_PAIR:
            rc = check_pairs(&c, first, end, out);
            break;
        case KEEL_SCOPE_MOMENT:
        case KEEL_SCOPE_UNIT:
            rc = check_moments(&c, first, end, mine, out);
            break;
        case KEEL_SCOPE_SHIFT:
            rc = check_shifts(&c, first, end, mine, out);
            break;
        case KEEL_SCOPE_CLOCK:
            rc = check_patients(&c, first, end, mine, out);
            break;
        case KEEL_SCOPE_NAME:
            break;
        }
    }
    free(mine);
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    return rc;
}
