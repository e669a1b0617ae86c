/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/audit.h - past shifts looked at after the fact (`keel audit`): per
 * shift, the loads, the imbalance, every rule the plan given broke and how
 * far its heaviest utilisation was from the best possible that day; per
 * nurse over the period, how often she was given the heaviest load (and the
 * most high-acuity patients, isolation patients, zones) against chance.
 * These figures describe the assignments a nurse was given, never her
 * performance.  docs/audit.md states every definition.
 *
 * Per shift (one roster with `nurse:` filled, keel_plan_from_roster()):
 * loads, utilisation and the indices are keel_metrics_compute()'s over the
 * counted nurses; violations are keel_plan_check()'s findings plus every
 * break whose cover keel_course_compute() flags (rule break_cover), each
 * with the times it holds; the best possible is stage 1 ("peak") of
 * keel_solve() on the same roster with policy.balance peak, and excess =
 * max_utilisation - best_max_utilisation (negative when the plan given
 * broke rules to get under what the rules allow).
 *
 * The measures.  On each shift, for measure x of a counted nurse
 * (utilisation; high-acuity patients; isolation patients; zones her
 * patients span), the shift is "at stake" for x when the largest x of its
 * counted nurses is above 0; then the t counted nurses with that largest x
 * each get a share 1/t of "the most", and chance gives each counted nurse
 * 1/(counted nurses).  Over the period a nurse's count is the sum of her
 * shares, expected the sum of her chances.  When she had no tied shift the
 * count is whole and p_value = P(X >= count) for X the Poisson-binomial
 * sum of independent Bernoulli(chance) over her shifts at stake, computed
 * exactly by convolution; with a tie there is no p_value.  Holm's
 * step-down adjustment (Holm 1979) runs across the nurses of one measure
 * that have a p_value and at least min_shifts shifts at stake; a nurse
 * "stands out" when her adjusted p is at or under alpha.
 *
 * Threads: keel_audit_shifts_compute() solves shifts in up to `jobs`
 * threads at once (keel/keel.h, "Threads"); results never depend on jobs.
 */
#ifndef KEEL_AUDIT_H
#define KEEL_AUDIT_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

#include "keel/error.h"
#include "keel/roster.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The measures a nurse's share of "the most" is counted for, in report
 * order; keel_audit_measure_name() gives "heaviest", "high_acuity",
 * "isolation", "zones". */
typedef enum keel_audit_measure {
    KEEL_AUDIT_HEAVIEST,    /* the highest utilisation */
    KEEL_AUDIT_HIGH_ACUITY, /* the most high-acuity patients (policy.high_acuity) */
    KEEL_AUDIT_ISOLATION,   /* the most patients on isolation precautions */
    KEEL_AUDIT_ZONES,       /* the most zones spanned */
    KEEL_AUDIT_MEASURES
} keel_audit_measure;

KEEL_API const char *keel_audit_measure_name(keel_audit_measure m);

/* Defaults of keel_audit_options. */
#define KEEL_AUDIT_MIN_SHIFTS 20
#define KEEL_AUDIT_ALPHA 0.05

typedef struct keel_audit_options {
    bool no_best;       /* skip the best-possible solve */
    long time_limit_ms; /* per shift's solve; <= 0: keel_solve()'s default */
    size_t jobs;        /* threads; 0 or 1: one */
    size_t shard;       /* 1-based share of the shifts to compute; 0: all */
    size_t nshards;     /* shifts i (0-based, in input order) with i % nshards == shard - 1 */
    size_t min_shifts;  /* 0: KEEL_AUDIT_MIN_SHIFTS */
} keel_audit_options;

/* One nurse on one shift. */
typedef struct keel_audit_nurse {
    char *id;
    bool counted; /* patient limit above 0: in every balance figure */
    int npatients;
    int load_minutes;
    int capacity_minutes;
    double utilisation;
    int amount[KEEL_AUDIT_MEASURES];   /* high-acuity and isolation patients, zones ([0] unused) */
    double share[KEEL_AUDIT_MEASURES]; /* her share of the most: 1/t, or 0 */
} keel_audit_nurse;

/* Where a broken rule holds, as the shift's clock reads ("HH:MM"); a
 * roster without the clock has no intervals (the rule holds all shift). */
typedef struct keel_audit_interval {
    char from[6];
    char to[6];
} keel_audit_interval;

typedef struct keel_audit_violation {
    char *rule; /* a rule name of keel/finding.h */
    size_t npatients;
    char **patients; /* patient ids */
    size_t nnurses;
    char **nurses; /* nurse ids */
    size_t nintervals;
    keel_audit_interval *intervals;
    char *message;
} keel_audit_violation;

typedef struct keel_audit_shift {
    size_t index;    /* 0-based, in input order over all files and documents */
    char *source;    /* the file */
    size_t document; /* 1-based position in the file's YAML stream */
    char *date;      /* "YYYY-MM-DD" or NULL */
    char *label;     /* the shift's label or NULL */
    int weekday;     /* 0 Monday .. 6 Sunday; -1 without a date */
    size_t npatients;
    size_t nunassigned; /* patients without a nurse at some time */
    size_t ncounted;
    size_t nnurses;
    keel_audit_nurse *nurses; /* roster order */
    double max_utilisation, min_utilisation, mean_utilisation;
    double spread, peak_to_mean, cv, jain, gini;
    bool best_known;         /* the best-possible solve ran and found a valid plan */
    const char *best_status; /* keel_solve_status_name(), or "skipped" */
    double best_max_utilisation;
    double best_bound; /* proven lower limit on the best (equal when optimal) */
    double excess;     /* max_utilisation - best_max_utilisation; 0 when not known */
    long continuity_kept, continuity_candidates;
    char *table_note; /* the ratio table was encoded after the shift's date; or NULL */
    size_t nviolations;
    keel_audit_violation *violations;
} keel_audit_shift;

/* A nurse's count of one measure over the period. */
typedef struct keel_audit_tally {
    double count;      /* sum of her shares */
    double expected;   /* sum of her chances */
    size_t at_stake;   /* shifts at stake for the measure on which she was counted */
    bool whole;        /* no tied shift: count is whole and p_value exact */
    double p_value;    /* P(X >= count); negative when not whole */
    double p_adjusted; /* Holm; negative when not tested */
    bool stands_out;
} keel_audit_tally;

/* A nurse's heaviest loads on the shifts of one group (weekday or label). */
typedef struct keel_audit_share {
    size_t shifts;   /* shifts of the group she was counted on */
    double heaviest; /* her shares of the heaviest load on them */
    double expected; /* her chances on those at stake */
} keel_audit_share;

typedef struct keel_audit_person {
    char *id;
    size_t shifts;                              /* shifts on whose roster she is */
    size_t counted_shifts;                      /* of them, counted */
    double mean_utilisation, worst_utilisation; /* over counted shifts */
    size_t violations;                          /* violations naming her */
    keel_audit_tally tally[KEEL_AUDIT_MEASURES];
    keel_audit_share *by; /* [ngroups of the audit], in the order of its groups */
} keel_audit_person;

/* Shifts grouped by weekday ("Mon" ...) or by shift label. */
typedef struct keel_audit_group {
    const char *by; /* static: "weekday" or "label" */
    char *key;
    size_t shifts;
    double mean_max_utilisation;
    double mean_spread;
    size_t best_known;  /* shifts with a best possible */
    double mean_excess; /* over those */
    size_t violations;
} keel_audit_group;

typedef struct keel_audit {
    size_t nshifts;
    keel_audit_shift *shifts; /* input order */
    size_t npeople;
    keel_audit_person *people; /* by id */
    size_t ngroups;
    keel_audit_group *groups; /* weekdays Monday first, then labels by name */
    size_t nviolations;
    size_t min_shifts;
    double alpha;
} keel_audit;

/* Computes shifts[i] for rosters[i], the shift numbered first + i of the
 * audit (so that many rosters may be audited a batch at a time), when the
 * options' shard holds that number (every one without a shard), in up to
 * options->jobs threads; the others are left zeroed, with index set.
 * rosters[i] was document documents[i] of its file.  The caller owns
 * shifts[0 .. n) (keel_audit_shift_fini() each).  Statuses: KEEL_OK,
 * KEEL_ERR_INPUT (a roster whose workload cannot be derived), KEEL_ERR_NOMEM,
 * KEEL_ERR_SOLVER. */
KEEL_API keel_status keel_audit_shifts_compute(keel_roster *const *rosters, const size_t *documents,
                                               size_t n, size_t first,
                                               const keel_audit_options *options,
                                               keel_audit_shift *shifts, keel_error *err);

/* True when shift i belongs to the options' shard. */
KEEL_API bool keel_audit_in_shard(const keel_audit_options *options, size_t i);

KEEL_API void keel_audit_shift_fini(keel_audit_shift *shift);

/* Sums the shifts up over the period: takes shifts[0 .. n) over (the audit
 * owns them from the call on, even when it fails).  The caller owns *out;
 * free it with keel_audit_free().  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_audit_summarise(keel_audit_shift *shifts, size_t n,
                                          const keel_audit_options *options, keel_audit **out,
                                          keel_error *err);

KEEL_API void keel_audit_free(keel_audit *audit);

/* Fairness forward (keel assign --history): weight[i], for each nurse i of
 * roster, is her mean utilisation over the counted shifts of the audit
 * (nurses matched by id); a nurse the audit does not count gets the unit's
 * mean, the mean utilisation over every counted nurse and shift of the
 * audit (1 when it counts none).  weight has roster->nnurses entries;
 * audit and roster are borrowed for the call. */
KEEL_API void keel_audit_history_weights(const keel_audit *audit, const keel_roster *roster,
                                         double *weight);

/* What every audit report says beside the caution (KEEL_CAUTION). */
#define KEEL_AUDIT_NOTE                                                                            \
    "These figures describe the assignments each nurse was given, not how she worked; they "       \
    "judge the plans, never the nurses. For audits kept over time, identify nurses by stable "     \
    "pseudonymous ids rather than names."

/* Writes the audit in a format: "text", "json", "csv" (one row per shift),
 * "csv-nurse-shifts" (one row per nurse and shift), "csv-nurses" (one row
 * per nurse and measure), "csv-nurse-groups" (one row per nurse and
 * weekday or label) or "csv-violations" (one row per broken rule).
 * CSV follows RFC 4180.  Statuses: KEEL_OK, KEEL_ERR_USAGE (unknown
 * format), KEEL_ERR_NOMEM (nothing written). */
KEEL_API keel_status keel_audit_write(const char *format, const keel_audit *audit, FILE *out,
                                      keel_error *err);
KEEL_API size_t keel_audit_nformats(void);
KEEL_API const char *keel_audit_format_name(size_t i);

/* A partial result: the shifts of one shard (those keel_audit_in_shard()
 * holds), written exactly so that keel_audit_partial_read() gives them back
 * bit for bit.  n is the number of shifts of the whole audit. */
KEEL_API keel_status keel_audit_partial_write(const keel_audit_shift *shifts, size_t n,
                                              const keel_audit_options *options, FILE *out,
                                              keel_error *err);

/* Reads the partial results of every shard into a new array of all *n
 * shifts: the caller owns it (keel_audit_summarise() takes it over).  The
 * partials must be of one audit (the same number of shifts and shards),
 * each shard once.  Statuses: KEEL_OK, KEEL_ERR_IO, KEEL_ERR_INPUT (naming
 * the file and line), KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_audit_partial_read(const char *const *paths, size_t npaths,
                                             keel_audit_shift **shifts, size_t *n, keel_error *err);

#ifdef __cplusplus
}
#endif
#endif
