/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_internal.h - what the writers share (internal): the writer
 * interface (report.c's table), reading the plan (report_plan.c) and
 * shaping text (report_out.c).
 */
#ifndef KEEL_REPORT_INTERNAL_H
#define KEEL_REPORT_INTERNAL_H

#include <stdio.h>

#include "keel/report.h"
#include "workload_internal.h"

/* A writer formats a report; it returns KEEL_OK, or KEEL_ERR_USAGE when it
 * cannot show this kind of report.  Write errors are caught by the caller
 * through ferror(). */
typedef struct keel_writer {
    const char *name;
    keel_status (*write)(const keel_report *report, FILE *out);
} keel_writer;

keel_status keel_report_text(const keel_report *report, FILE *out); /* report_text.c */
keel_status keel_report_json(const keel_report *report, FILE *out); /* report_json.c */
keel_status keel_report_yaml(const keel_report *report, FILE *out); /* report_yaml.c */
keel_status keel_report_html(const keel_report *report, FILE *out); /* report_html.c */
keel_status keel_report_csv(const keel_report *report, FILE *out);  /* report_csv.c */
keel_status keel_report_csv_nurses(const keel_report *report, FILE *out); /* report_csv.c */

/* report_yaml.c: writes one patient as an entry of a roster's patients
 * list, with nurse as its `nurse:` (NULL: none).  r gives the shift's start
 * for the patient's times; NULL when the patient has none. */
void keel_report_yaml_patient(FILE *out, const keel_roster *r, const keel_patient *patient,
                              const char *nurse);

/* report_plan.c */

/* True when some patient's care minutes come from NAS items (the reports
 * then carry keel_nas_note()). */
bool keel_report_plan_uses_nas(const keel_roster *r);

/* The nurse roster patient p starts with under the report's assignment, or
 * -1 (no assignment, or none for the patient). */
int keel_report_plan_first_nurse(const keel_report *rep, size_t p);

/* True when nurse n holds roster patient p at some time. */
bool keel_report_plan_holds(const keel_report *rep, size_t p, size_t n);

/* Minutes of patient p's care that nurse n carries (the parts she holds). */
long keel_report_plan_care_held(const keel_report *rep, size_t p, size_t n);

/* Next planned hand-off of patient p after part *q (start with *q at the
 * patient's first part): true and fills *at (minutes after the shift's
 * start), *from and *to, moving *q on; false when there are no more. */
bool keel_report_plan_next_handoff(const keel_report *rep, size_t p, int *q, int *at, int *from,
                                   int *to);

/* report_out.c */

/* Writes s as a double-quoted string with JSON escapes (valid YAML too). */
void keel_report_out_quoted(FILE *out, const char *s);

/* Writes text as lines of at most width columns (words longer than a line
 * stand alone), each starting with indent. */
void keel_report_out_wrapped(FILE *out, const char *indent, const char *text, size_t width);

#endif
