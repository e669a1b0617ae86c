/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule.c - the table of rules and the functions that walk it (see rule.h).
 * Each rule's entry is defined in its own file (rule_<name>.c); the names
 * that other entries report under, in rule_name.c.
 *
 * Table order is the order a plan's findings are listed in (keel check):
 * competencies, then what each nurse holds at each moment, then locks and
 * avoid lists, then each nurse's whole shift, then the clock, then break
 * cover.  The tally's test asks in another order, cheapest first:
 * eligibility, the clock, the whole shift, then each moment (break cover
 * with the moment's rules).
 */
#include "rule.h"

#include <stdlib.h>
#include <string.h>

#include "workload_internal.h"

const keel_rule *const keel_rules[KEEL_NRULES] = {
    [KEEL_RULE_SKILL] = &keel_rule_skill,
    [KEEL_RULE_PATIENT_LIMIT] = &keel_rule_patient_limit,
    [KEEL_RULE_PATIENT_RATIO] = &keel_rule_patient_ratio,
    [KEEL_RULE_HIGH_ACUITY] = &keel_rule_high_acuity,
    [KEEL_RULE_ISOLATION] = &keel_rule_isolation,
    [KEEL_RULE_ZONES] = &keel_rule_zones,
    [KEEL_RULE_LOCK] = &keel_rule_lock,
    [KEEL_RULE_AVOID] = &keel_rule_avoid,
    [KEEL_RULE_ROLE_ACUITY] = &keel_rule_role_acuity,
    [KEEL_RULE_CAPACITY] = &keel_rule_capacity,
    [KEEL_RULE_MIN_PATIENTS] = &keel_rule_min_patients,
    [KEEL_RULE_HAND_OFF] = &keel_rule_hand_off,
    [KEEL_RULE_LAW_LIMIT] = &keel_rule_law_limit,
    [KEEL_RULE_MOMENT_LIMIT] = &keel_rule_moment_limit,
    [KEEL_RULE_BREAK_COVER] = &keel_rule_break_cover,
};

const keel_rule *keelRuleFind(const char *name)
{
    for (size_t i = 0; i < KEEL_NRULES; i++)
        if (strcmp(keel_rules[i]->name, name) == 0)
            return keel_rules[i];
    return NULL;
}

_Static_assert(KEEL_NRULES <= KEEL_WORKLOAD_RULES, "keel_workload's rule lists are too short");

/* The tests of one scope that can bind in the tally's workload, in table
 * order (keelRuleFlags() lists them). */
static const char *breaks_in(int scope, const keel_tally *t, size_t p, size_t n, size_t m)
{
    const keel_workload *w = t->w;
    for (size_t i = 0; i < w->ntests[scope]; i++) {
        const char *name = w->tests[scope][i]->breaks(t, p, n, m);
        if (name)
            return name;
    }
    return NULL;
}

const char *keelRuleBreaks(const keel_tally *t, size_t p, size_t n)
{
    const keel_workload *w = t->w;
    if (!keel_workload_eligible(w, p, n))
        return keel_rules[KEEL_RULE_SKILL]->name; /* the caller names the precise reason */
    const char *name = breaks_in(KEEL_WORKLOAD_CLOCK, t, p, n, 0);
    if (!name)
        name = breaks_in(KEEL_WORKLOAD_SHIFT, t, p, n, 0);
    for (int m = w->first_moment[p]; !name && m < w->last_moment[p]; m++)
        name = breaks_in(KEEL_WORKLOAD_MOMENT, t, p, n, (size_t)m);
    return name;
}

bool keelRuleWhole(const keel_tally *t)
{
    for (size_t i = 0; i < KEEL_NRULES; i++)
        if (keel_rules[i]->whole && keel_rules[i]->whole(t))
            return true;
    return false;
}

bool keelRuleAdmitsInstead(keel_tally *t, size_t p, size_t q, size_t n)
{
    if (!keel_workload_eligible(t->w, p, n))
        return false; /* what q frees cannot help */
    keel_tally_remove(t, q, n);
    bool ok = keelRuleAdmits(t, p, n);
    keel_tally_add(t, q, n);
    return ok;
}

/* True when rule i is switched on in w and can bind. */
static bool on(const keel_workload *w, keel_rule_id i)
{
    return keel_rules[i]->binds && keel_rules[i]->binds(w);
}

void keelRuleFlags(keel_workload *w)
{
    w->isolation_rule = on(w, KEEL_RULE_ISOLATION);
    w->zones_rule = on(w, KEEL_RULE_ZONES);
    w->bounds_rule = on(w, KEEL_RULE_CAPACITY) || on(w, KEEL_RULE_MIN_PATIENTS);
    w->joined_rules = w->clocked;
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        keel_rule_scope scope = keel_rules[i]->scope;
        if (scope == KEEL_SCOPE_MOMENT || scope == KEEL_SCOPE_SHIFT || scope == KEEL_SCOPE_UNIT)
            w->joined_rules = w->joined_rules || on(w, (keel_rule_id)i);
    }
    /* A test is listed unless its rule says it cannot bind here (a rule
     * without binds, the patient limit, always can). */
    memset(w->ntests, 0, sizeof w->ntests);
    w->nheld = 0;
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        const keel_rule *rule = keel_rules[i];
        if (rule->binds && !rule->binds(w))
            continue;
        int list = rule->scope == KEEL_SCOPE_CLOCK   ? KEEL_WORKLOAD_CLOCK
                   : rule->scope == KEEL_SCOPE_SHIFT ? KEEL_WORKLOAD_SHIFT
                   : rule->scope == KEEL_SCOPE_MOMENT || rule->scope == KEEL_SCOPE_UNIT
                       ? KEEL_WORKLOAD_MOMENT
                       : -1;
        if (list >= 0 && rule->breaks)
            w->tests[list][w->ntests[list]++] = rule;
        if (rule->held_alike)
            w->held[w->nheld++] = rule;
    }
}

bool keelRuleBindsBeyond(const keel_workload *w, const keel_rule_id *known, size_t nknown)
{
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        bool listed = false;
        for (size_t k = 0; k < nknown && !listed; k++)
            listed = known[k] == (keel_rule_id)i;
        if (!listed && on(w, (keel_rule_id)i))
            return true;
    }
    return false;
}

int keelRuleOrder(const keel_workload *w, size_t a, size_t b)
{
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        int d = keel_rules[i]->order ? keel_rules[i]->order(w, a, b) : 0;
        if (d)
            return d;
    }
    return 0;
}

bool keelRuleSameNurses(const keel_workload *w, size_t a, size_t b)
{
    for (size_t i = 0; i < KEEL_NRULES; i++)
        if (keel_rules[i]->nurses_alike && !keel_rules[i]->nurses_alike(w, a, b))
            return false;
    return true;
}

bool keelRuleSameHeld(const keel_tally *t, size_t a, size_t b)
{
    const keel_workload *w = t->w;
    for (size_t i = 0; i < w->nheld; i++)
        if (!w->held[i]->held_alike(t, a, b))
            return false;
    return true;
}

int keelRulePairSeverity(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    if (keel_workload_eligible(w, p, n))
        return 0;
    if (!r)
        return keel_rules[KEEL_RULE_SKILL]->severity;
    int severity = 0;
    for (size_t i = 0; i < KEEL_NRULES; i++)
        if (keel_rules[i]->pair_breaks && keel_rules[i]->pair_breaks(r, w, p, n))
            severity += keel_rules[i]->severity;
    return severity;
}

void keelRuleRows(const keel_rows *R, keel_rule_scope scope)
{
    for (size_t i = 0; i < KEEL_NRULES; i++)
        if (keel_rules[i]->scope == scope && keel_rules[i]->rows)
            keel_rules[i]->rows(R);
}
