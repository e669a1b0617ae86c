/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/report.h - writers that format an assignment or a workload view.
 * Writers are plugins behind one table ({name, write}): "text" for people,
 * "yaml" (the roster again with every patient's nurse filled in, so it can
 * be fed back in), "json" for other tools, "html" (the sheet to post: one
 * self-contained page, patients by id, bed and room unless `names`), "csv"
 * (a row per patient) and "csv-nurses" (a row per nurse) for spreadsheets.  Writers only read:
 * every number comes from keel_metrics.  Every format meant for people ends with the caution
 * (KEEL_CAUTION).
 */
#ifndef KEEL_REPORT_H
#define KEEL_REPORT_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

#include "keel/course.h"
#include "keel/error.h"
#include "keel/finding.h"
#include "keel/explain.h"
#include "keel/metrics.h"
#include "keel/preview.h"
#include "keel/rebalance.h"
#include "keel/staffing.h"
#include "keel/roster.h"
#include "keel/solve.h"
#include "keel/verdict.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The safety caution carried by every human-facing output. */
#define KEEL_CAUTION                                                                               \
    "Decision support only: the charge nurse's judgement, facility policy and the staffing "       \
    "law that applies locally govern every assignment."

typedef enum keel_report_kind {
    KEEL_REPORT_ASSIGN, /* a solved assignment (keel assign) */
    KEEL_REPORT_CHECK,  /* a workload view, and the score of a given plan if any (keel check) */
} keel_report_kind;

/* Everything a writer may show.  All borrowed. */
typedef struct keel_report {
    keel_report_kind kind;
    const keel_roster *roster;
    const keel_workload *workload;
    const int *nurse_of;             /* the assignment shown, or NULL (check without a plan) */
    const keel_metrics *metrics;     /* of nurse_of (of no assignment when nurse_of is NULL) */
    const keel_solution *solution;   /* assign: the solve; check: the best-possible solve or NULL */
    const keel_findings *violations; /* check: rules the given plan breaks, or NULL */
    const keel_staffing *staffing;   /* the staffing view, or NULL */
    const keel_explanation *explanation; /* why each patient went where, or NULL */
    const keel_course *course;           /* the course of the shift under nurse_of, or NULL */
    const keel_verdict *verdict; /* the staffing verdict; NULL: keel_report_write() judges
                                    nurse_of itself (keel/verdict.h) */
    bool names;                  /* html: patients' names on the sheet (one that stays private) */
    bool deidentify;             /* no patient's name in any format (the yaml plan drops `name`) */
    bool colour;                 /* text: ANSI colour (the command sets it for a terminal without
                                    NO_COLOR) */
} keel_report;

/* Writes the report in the named format to out.  Statuses: KEEL_OK,
 * KEEL_ERR_USAGE (unknown format, or a format that cannot show this kind),
 * KEEL_ERR_IO (a write failed). */
KEEL_API keel_status keel_report_write(const char *format, const keel_report *report, FILE *out,
                              keel_error *err);

/* A rebalance to show.  All borrowed. */
typedef struct keel_rebalance_report {
    const keel_roster *roster;
    const keel_rebalance *rebalance;
    const keel_metrics *const *metrics; /* [noptions]: each option's plan's, NULL without one */
    size_t chosen; /* the option the yaml writes and the text details (the recommended one
                      unless the caller picks another) */
    const keel_preview *preview; /* the expected admissions under the chosen option, or NULL */
} keel_rebalance_report;

/* Writes a rebalance in format "text" (the frontier, the chosen option's
 * moves, the caution), "json" (every option) or "yaml" (the chosen option's
 * plan as the updated roster).  Statuses: KEEL_OK, KEEL_ERR_USAGE (unknown
 * format; yaml of an option without a plan), KEEL_ERR_IO. */
KEEL_API keel_status keel_report_rebalance_write(const char *format,
                                                 const keel_rebalance_report *report, FILE *out,
                                                 keel_error *err);

/* Number of formats and their names, for help texts. */
KEEL_API size_t keel_report_nformats(void);
KEEL_API const char *keel_report_format_name(size_t i);

#ifdef __cplusplus
}
#endif
#endif
