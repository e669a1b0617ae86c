/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule.h - the rules of an assignment, one table (internal).
 *
 * Every rule keel keeps is one entry of keel_rules[], in the one list of
 * rule names that diagnoses, plan checks, explanations and reports use.  An
 * entry holds everything keel knows about its rule: its name and severity
 * (the best-effort weight), whether it is switched on in a workload, the
 * tally's test (may nurse n take part p?), the plan check in plain words,
 * its rows in the integer programmes (kept, or broken at its severity), how
 * the diagnosis relaxes it and says it conflicts, and which patient data it
 * reads (so that searches know when two patients are alike to every rule).
 * Each rule lives in a file of its own, src/rule_<name>.c (skill, lock and
 * avoid, the eligibility rules, share rule_pair.c), that opens with its
 * properties; rule.c holds the table and the functions that walk it.
 * A new rule is one file and one line of the table, with its roster key,
 * its data in the workload and its tests (docs/architecture.md, "A new
 * rule", names every file); test_every_rule_has_every_part
 * (tests/test_rules.c) fails when a rule lacks a part.
 *
 * Scopes.  PAIR rules (skill, lock, avoid) remove patient-nurse pairs up
 * front (workload.c's eligibility); MOMENT rules count what a nurse holds at
 * each moment of the shift; SHIFT rules judge her whole shift (care, fewest
 * patients); CLOCK rules hold the parts of one patient together; UNIT
 * rules count what two nurses hold together at each moment (break cover:
 * a nurse on break and the nurse who holds her patients then).  NAME
 * entries are names other entries report under (law_limit and moment_limit
 * are the patient limit's names when the table sets it and under the
 * clock).
 *
 * Layers: below the workload (which asks the table which rules bind) and
 * the solver; above the tally (the counts the tests read) and lp.h (the
 * rows are written against keel_lp).
 */
#ifndef KEEL_RULE_H
#define KEEL_RULE_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/finding.h"
#include "keel/roster.h"
#include "lp.h"
#include "tally.h"

/* In the order a plan's findings are listed (keel check). */
typedef enum keel_rule_id {
    KEEL_RULE_SKILL,
    KEEL_RULE_PATIENT_LIMIT,
    KEEL_RULE_PATIENT_RATIO,
    KEEL_RULE_HIGH_ACUITY,
    KEEL_RULE_ISOLATION,
    KEEL_RULE_ZONES,
    KEEL_RULE_LOCK,
    KEEL_RULE_AVOID,
    KEEL_RULE_ROLE_ACUITY,
    KEEL_RULE_CAPACITY,
    KEEL_RULE_MIN_PATIENTS,
    KEEL_RULE_HAND_OFF,
    KEEL_RULE_LAW_LIMIT,
    KEEL_RULE_MOMENT_LIMIT,
    KEEL_RULE_BREAK_COVER,
    KEEL_NRULES
} keel_rule_id;

typedef enum keel_rule_scope {
    KEEL_SCOPE_PAIR,   /* a patient-nurse pair, removed up front */
    KEEL_SCOPE_MOMENT, /* what a nurse holds at each moment */
    KEEL_SCOPE_SHIFT,  /* a nurse's whole shift */
    KEEL_SCOPE_CLOCK,  /* the parts of one patient over the shift */
    KEEL_SCOPE_UNIT,   /* what two nurses hold together at each moment (break cover) */
    KEEL_SCOPE_NAME,   /* a name another entry reports under */
} keel_rule_scope;

/* Where a rule's rows go: one nurse at one moment of one model. */
typedef struct keel_rows {
    keel_lp *lp;
    const keel_workload *w;
    size_t n;           /* the nurse */
    int moment;         /* -1: the whole shift (no clock), else the moment */
    size_t ncols;       /* the nurse's columns that cover the moment */
    const int *col;     /* [ncols] */
    const size_t *part; /* [ncols]: a part each column stands for (its traits) */
    const double *most; /* [ncols]: the most patients a column counts (a class's size, or 1) */
    bool soft;          /* the best-effort model: a row may be broken at the rule's severity */
    double census;      /* the patients of the workload: the big number of soft rows */
    double zone_cost;   /* the objective's price on each zone binary (proximity), else 0 */
    int near_row;       /* > 0: proximity's binaries go into this row at their price (held,
                           not minimised) instead of the objective */
    /* UNIT rules: others(R, nurse) writes that nurse's columns that cover
     * R's moment to R->ocol and returns how many; each counts patients as
     * R's columns do.  model is what it reads. */
    size_t (*others)(const struct keel_rows *R, size_t nurse);
    int *ocol;
    const void *model;
} keel_rows;

/* What a plan check sees: the roster, the workload, the plan. */
typedef struct keel_rule_plan {
    const keel_roster *r;
    const keel_workload *w;
    const int *nurse_of;
} keel_rule_plan;

/* Arrays a relaxed copy of a workload borrows in place of its own. */
typedef struct keel_rule_spare {
    int *census;       /* [npatients]: no patient's ratio below the census */
    signed char *none; /* [npatients]: no isolation side */
    long long *no_cap; /* [nnurses]: no care cap */
    int *no_min;       /* [nnurses]: no fewest patients */
    struct keel_cover *covers; /* [ncovers]: the break plan, for dropping covers one by one */
} keel_rule_spare;

typedef struct keel_rule {
    const char *name;      /* the design's rule name */
    keel_rule_scope scope; /* see above */
    int severity;          /* best effort: the weight of each unit broken (docs/model.md) */
    bool staffing;         /* a limit on what a nurse holds: a plan that breaks it is short of
                              nurses (the staffing verdict, verdict.c) */

    /* True when the rule is switched on in w and can bind (NULL: never). */
    bool (*binds)(const keel_workload *w);

    /* The tally's test: the name of the rule nurse n breaks by taking part p
     * (for MOMENT and UNIT rules at moment m), or NULL.  A rule that can only be
     * judged on a whole plan (min_patients) has whole instead: true when the
     * plan the tally holds breaks it. */
    const char *(*breaks)(const keel_tally *t, size_t p, size_t n, size_t m);
    bool (*whole)(const keel_tally *t);

    /* The plan check: appends a finding (rule name, patients, nurse, plain
     * words) for each way nurse n breaks the rule.  MOMENT and UNIT rules
     * are asked at each moment m with the parts mine[0..k) she holds then; SHIFT rules
     * once (m 0, every part she holds); PAIR rules once per part that
     * starts a stretch with her (mine[0] that part, k 1); CLOCK rules once
     * per patient (mine: its parts in time order; n unused).  Statuses:
     * KEEL_OK, KEEL_ERR_NOMEM. */
    keel_status (*check)(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out);

    /* PAIR rules: true when giving part p to nurse n breaks the rule (the
     * best-effort model weighs such a pair at the rule's severity). */
    bool (*pair_breaks)(const keel_roster *r, const keel_workload *w, size_t p, size_t n);

    /* The integer-programme rows of the rule for R's nurse: MOMENT rules at
     * R's moment, UNIT rules at R's moment with the other nurse's columns
     * (R->others), SHIFT and CLOCK rules over the whole shift.  Rows keep the
     * rule, or, in the best-effort model (R->soft), weigh each unit broken
     * at the rule's severity.  A rule whose data is absent adds nothing. */
    void (*rows)(const keel_rows *R);

    /* The diagnosis: touches says patient p is one the rule concerns; relax
     * switches the rule off in a copy (borrowing spare's arrays); say gives
     * the rule as this roster sets it, in plain words; conflict says that no
     * assignment keeps the rule together with nothers other rules (tail: "
     * together with the ... rules", or "" when there are none), with what
     * is short when it can tell.  The strings are new; NULL when memory ran
     * out. */
    bool (*touches)(const keel_workload *w, size_t p);
    void (*relax)(keel_workload *copy, const keel_rule_spare *spare);
    char *(*say)(const keel_roster *r, const keel_workload *w);
    char *(*conflict)(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers);

    /* Pieces: a rule made of separate constraints (break cover: one per
     * kept cover) can be relaxed one piece at a time, so that the
     * diagnosis names the pieces in conflict.  pieces gives how many;
     * keep_piece switches piece i on or off in a copy that borrows
     * spare's arrays (the first call makes the copy borrow them) and
     * returns whether it was on. */
    size_t (*pieces)(const keel_workload *w);
    bool (*keep_piece)(keel_workload *copy, size_t i, bool keep, const keel_rule_spare *spare);

    /* Alikeness.  order: what the rule reads of patients a and b, 0 when
     * they are alike to it, else an order (for sorting twins together);
     * nurses_alike: the rule's data of nurses a and b is the same;
     * held_alike: what nurses a and b hold looks the same to the rule (the
     * patients still to come may go to one exactly when to the other).
     * NULL: the rule reads nothing there. */
    int (*order)(const keel_workload *w, size_t a, size_t b);
    bool (*nurses_alike)(const keel_workload *w, size_t a, size_t b);
    bool (*held_alike)(const keel_tally *t, size_t a, size_t b);
} keel_rule;

/* The entries, each defined in the file its comment names.  An entry
 * reports under its own name (or, for the limits, under one of the names
 * of rule_name.c); only rule.c reads them through the table. */
extern const keel_rule keel_rule_skill, keel_rule_lock, keel_rule_avoid,
    keel_rule_role_acuity; /* rule_pair.c */
extern const keel_rule keel_rule_patient_limit;                          /* rule_limit.c */
extern const keel_rule keel_rule_patient_ratio;                          /* rule_ratio.c */
extern const keel_rule keel_rule_high_acuity;                            /* rule_high.c */
extern const keel_rule keel_rule_isolation;                              /* rule_isolation.c */
extern const keel_rule keel_rule_zones;                                  /* rule_zones.c */
extern const keel_rule keel_rule_capacity;                               /* rule_capacity.c */
extern const keel_rule keel_rule_min_patients;                           /* rule_min.c */
extern const keel_rule keel_rule_hand_off;                               /* rule_hand_off.c */
extern const keel_rule keel_rule_break_cover;                            /* rule_cover.c */
extern const keel_rule keel_rule_law_limit,
    keel_rule_moment_limit; /* rule_name.c: names that other entries report under */

/* The table, indexed by keel_rule_id (rule.c). */
extern const keel_rule *const keel_rules[KEEL_NRULES];

/* The entry of a rule name, or NULL. */
const keel_rule *keelRuleFind(const char *name);

/* The name of the rule nurse n would break by taking part p given what the
 * tally holds, or NULL when she may take it.  An ineligible pair is
 * "skill" (the caller names the precise reason). */
const char *keelRuleBreaks(const keel_tally *t, size_t p, size_t n);

static inline bool keelRuleAdmits(const keel_tally *t, size_t p, size_t n)
{
    return keelRuleBreaks(t, p, n) == NULL;
}

/* True when n may take p in place of q, which n holds. */
bool keelRuleAdmitsInstead(keel_tally *t, size_t p, size_t q, size_t n);

/* True when the plan the tally holds breaks a rule that is judged on a
 * whole plan (min_patients); the others are kept when every part was
 * admitted in turn. */
bool keelRuleWhole(const keel_tally *t);

/* rule_pair.c: true when patient p's acuity is above what nurse n's role
 * takes (policy.roles.<role>.max_acuity; rule role_acuity).  Eligibility
 * (workload.c) and the diagnosis (feas_hall.c) ask it. */
bool keel_rule_pair_over_role_acuity(const keel_roster *r, const keel_patient *p,
                                     const keel_nurse *n);

/* rule_min.c: true when n may give one patient away and keep her fewest
 * patients. */
bool keelRuleMinMayGive(const keel_tally *t, size_t n);

/* Sets w's cached switches (joined_rules, bounds_rule, isolation_rule,
 * zones_rule) from the rules that bind: after workload.c derives w, and
 * after a copy is relaxed or cut to a part of the unit. */
void keelRuleFlags(keel_workload *w);

/* True when a rule binds in w that is not one of known[0..nknown) (the
 * pair rules, kept through eligibility, never count): for a search that
 * keeps only the rules it knows, and must leave the others to the chains
 * that read the whole table. */
bool keelRuleBindsBeyond(const keel_workload *w, const keel_rule_id *known, size_t nknown);

/* 0 when every rule sees patients a and b alike, else an order. */
int keelRuleOrder(const keel_workload *w, size_t a, size_t b);

/* True when every rule sees nurses a and b alike (patient limits, fewest
 * patients, care cap, eligible parts). */
bool keelRuleSameNurses(const keel_workload *w, size_t a, size_t b);

/* True when every rule sees what nurses a and b hold alike. */
bool keelRuleSameHeld(const keel_tally *t, size_t a, size_t b);

/* The best-effort weight of giving part p to nurse n: the severities of
 * the PAIR rules the pair breaks (without a roster, every ineligible pair
 * weighs as one broken competency). */
int keelRulePairSeverity(const keel_roster *r, const keel_workload *w, size_t p, size_t n);

/* Appends the rows of every rule of the scope to R: the model calls it with
 * KEEL_SCOPE_MOMENT for each nurse at each moment (R->moment; -1 without
 * the clock) over the columns that cover it, and with KEEL_SCOPE_SHIFT and
 * KEEL_SCOPE_CLOCK once per nurse over all her columns. */
void keelRuleRows(const keel_rows *R, keel_rule_scope scope);

/* rule_finding.c: appends a finding of rule on nurse n holding the parts
 * mine[0..k) (reported as their roster patients); takes msg (freed on
 * failure).  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_rule_finding_add(const keel_rule_plan *c, const char *rule, const size_t *mine,
                                  size_t k, size_t n, char *msg, keel_findings *out);

/* rule_tie.c: a binary x that is 1 whenever some column of R with trait(w, part) == v
 * counts a patient: the row sum of those columns <= big x, and, when x has
 * a cost, each column alone <= min(most, big) x (the same integer points, a
 * far tighter relaxation).  With R->near_row the cost goes into that row
 * instead of the objective.  Returns x, or 0 when no column has the value. */
int keelRuleTie(const keel_rows *R, int (*trait)(const keel_workload *w, size_t part), int v,
                double big, double cost);

#endif
