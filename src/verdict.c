/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * verdict.c - the staffing verdict (see keel/verdict.h): the plan checked
 * again here, rule by rule, break by break and nurse by nurse, so that the
 * sentence is true of the plan it stands beside.  Which rules are limits
 * on what a nurse holds is the rule table's `staffing` property.
 */
#include "keel/verdict.h"

#include <stdlib.h>

#include "alloc.h"
#include "keel/course.h"
#include "keel/metrics.h"
#include "keel/plan.h"
#include "keel/staffing.h"
#include "rule.h"
#include "workload_internal.h"

const char *keel_verdict_kind_name(keel_verdict_kind kind)
{
    switch (kind) {
    case KEEL_VERDICT_ENOUGH:
        return "enough";
    case KEEL_VERDICT_SHORT:
        return "short";
    case KEEL_VERDICT_RULES_BROKEN:
        return "rules_broken";
    case KEEL_VERDICT_NO_PLAN:
        return "no_plan";
    case KEEL_VERDICT_NOT_JUDGED:
        return "not_judged";
    }
    return "?";
}

void keel_verdict_free(keel_verdict *v)
{
    if (!v)
        return;
    free(v->text);
    free(v);
}

static const char *plural(size_t n)
{
    return n == 1 ? "" : "s";
}

/* Counts the plan's broken rules, limits apart from the rest; a break
 * without cover is counted once, with the break plan. */
static keel_status count_findings(const keel_roster *r, const keel_workload *w,
                                  const int *nurse_of, keel_verdict *v, keel_error *err)
{
    keel_findings found = {0};
    keel_status rc = keel_plan_check(r, w, nurse_of, &found, err);
    for (size_t i = 0; !rc && i < found.n; i++) {
        const keel_rule *rule = keelRuleFind(found.items[i].rule);
        if (rule == keel_rules[KEEL_RULE_BREAK_COVER])
            continue; /* the break plan's count (count_course()) */
        if (rule && rule->staffing)
            v->limits_broken++;
        else
            v->rules_broken++;
    }
    keel_findings_fini(&found);
    return rc;
}

/* Counts the breaks without cover within the limit, and the nurses over
 * their time. */
static keel_status count_course(const keel_roster *r, const keel_workload *w,
                                const int *nurse_of, keel_verdict *v, keel_error *err)
{
    keel_course *c = NULL;
    keel_metrics *m = NULL;
    keel_status rc = keel_course_compute(r, w, nurse_of, 0, &c, err);
    if (!rc)
        rc = keel_metrics_compute(w, nurse_of, &m, err);
    for (size_t i = 0; !rc && i < c->nbreaks; i++) {
        v->breaks += c->breaks[i].npatients > 0;
        v->breaks_uncovered += c->breaks[i].rule != NULL;
    }
    for (size_t n = 0; !rc && n < m->nnurses; n++) {
        const keel_nurse_metrics *nm = &m->nurses[n];
        if (!nm->counted || nm->load_minutes <= nm->capacity_minutes)
            continue;
        v->overloaded++;
        if (v->most_over < 0 || nm->utilisation > v->most_over_utilisation) {
            v->most_over = (int)n;
            v->most_over_utilisation = nm->utilisation;
        }
    }
    keel_metrics_free(m);
    keel_course_free(c);
    return rc;
}

/* "goes over a limit 2 times, leaves 1 break without cover within the
 * limit and has 1 nurse over 100 % of her time (N3 at 104.2 %)". */
static char *what_is_short(const keel_roster *r, const keel_verdict *v)
{
    char *parts[4] = {NULL, NULL, NULL, NULL};
    size_t k = 0;
    if (v->ward_short)
        parts[k++] = keel_asprintf("has %d nurse%s who take patients where the ratio table's "
                                   "ward minimum for this census is %d",
                                   v->ward_minimum - v->ward_short,
                                   plural((size_t)(v->ward_minimum - v->ward_short)),
                                   v->ward_minimum);
    if (v->limits_broken)
        parts[k++] = keel_asprintf("goes over a limit on the patients a nurse holds %zu time%s",
                                   v->limits_broken, plural(v->limits_broken));
    if (v->breaks_uncovered)
        parts[k++] = keel_asprintf("leaves %zu break%s without cover within the limit",
                                   v->breaks_uncovered, plural(v->breaks_uncovered));
    if (v->overloaded)
        parts[k++] = keel_asprintf("has %zu nurse%s over 100 %% of %s time (%s at %.1f %%)",
                                   v->overloaded, plural(v->overloaded),
                                   v->overloaded == 1 ? "her" : "their",
                                   r->nurses[v->most_over].id, 100.0 * v->most_over_utilisation);
    char *text = NULL;
    bool ok = true;
    for (size_t i = 0; i < k; i++)
        ok = ok && parts[i];
    if (ok && k == 1)
        text = keel_asprintf("%s", parts[0]);
    else if (ok && k == 2)
        text = keel_asprintf("%s and %s", parts[0], parts[1]);
    else if (ok && k == 3)
        text = keel_asprintf("%s, %s and %s", parts[0], parts[1], parts[2]);
    else if (ok && k == 4)
        text = keel_asprintf("%s, %s, %s and %s", parts[0], parts[1], parts[2], parts[3]);
    for (size_t i = 0; i < k; i++)
        free(parts[i]);
    return text;
}

/* The verdict in words, from the counts. */
static char *words(const keel_roster *r, const keel_solution *s, const keel_verdict *v)
{
    switch (v->kind) {
    case KEEL_VERDICT_ENOUGH:
        return keel_asprintf("Enough: this plan keeps every rule keel checks at every moment of "
                             "the shift, %sno nurse is over 100 %% of her time.",
                             v->breaks ? "every break has cover within the limit, and " : "and ");
    case KEEL_VERDICT_SHORT: {
        char *what = what_is_short(r, v);
        char *text = what ? keel_asprintf("Short: this plan %s.", what) : NULL;
        free(what);
        return text;
    }
    case KEEL_VERDICT_RULES_BROKEN:
        return keel_asprintf("Not enough to act on: this plan keeps every staffing limit, but "
                             "breaks %zu other rule%s (listed in this report).",
                             v->rules_broken, plural(v->rules_broken));
    case KEEL_VERDICT_NO_PLAN:
        return keel_asprintf("No plan: no valid assignment exists for these patients and nurses "
                             "under the rules%s.",
                             s && s->best_effort ? "; the best-effort plan shown breaks rules"
                                                 : "");
    case KEEL_VERDICT_NOT_JUDGED:
        return keel_asprintf(
            "Not judged: the roster gives no complete plan%s.",
            s && s->status != KEEL_SOLVE_INFEASIBLE
                ? "; a valid assignment exists (keel assign builds one and judges it)"
                : "");
    }
    return NULL;
}

keel_status keel_verdict_compute(const keel_roster *r, const keel_workload *w,
                                 const keel_solution *s, const int *nurse_of,
                                 keel_verdict **out, keel_error *err)
{
    *out = NULL;
    keel_verdict *v = keel_calloc(1, sizeof *v);
    if (!v)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    v->most_over = -1;
    keel_staffing st;
    keel_status rc = keel_staffing_compute(r, w, &st, err);
    if (rc) {
        keel_verdict_free(v);
        return rc;
    }
    v->ward_minimum = st.ward_minimum;
    if (st.ward_minimum >= 0 && st.ncounted < (size_t)st.ward_minimum)
        v->ward_short = st.ward_minimum - (int)st.ncounted;
    bool no_plan = s && s->status == KEEL_SOLVE_INFEASIBLE;
    if (nurse_of && (!no_plan || s->best_effort)) {
        rc = count_findings(r, w, nurse_of, v, err);
        if (!rc)
            rc = count_course(r, w, nurse_of, v, err);
    }
    if (rc) {
        keel_verdict_free(v);
        return rc;
    }
    if (no_plan)
        v->kind = KEEL_VERDICT_NO_PLAN;
    else if (!nurse_of)
        v->kind = KEEL_VERDICT_NOT_JUDGED;
    else if (v->limits_broken || v->breaks_uncovered || v->overloaded || v->ward_short)
        v->kind = KEEL_VERDICT_SHORT;
    else if (v->rules_broken)
        v->kind = KEEL_VERDICT_RULES_BROKEN;
    else
        v->kind = KEEL_VERDICT_ENOUGH;
    v->text = words(r, s, v);
    if (!v->text) {
        keel_verdict_free(v);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    *out = v;
    return KEEL_OK;
}
