/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_internal.h - what the writers share (internal): the writer
 * interface (report.c's table), reading the plan (report_plan.c) and
 * shaping text (report_out.c).
 */
#ifndef KEEL_REPORT_INTERNAL_H
#define KEEL_REPORT_INTERNAL_H

#include <stdio.h>

#include "keel/law.h"
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
/* report_html.c: the sheet's patients by nurse, break cover and next
 * admissions, for a page of another writer (the rebalance's). */
void keel_report_html_sheet(const keel_report *report, FILE *out);
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

/* The break after the one at index *i (start with *i == c->nbreaks) in
 * time order, ties in the course's own order: true and *i set to it;
 * false after the last.  The course lists breaks by nurse; a unit has few,
 * so each step is a scan. */
bool keel_report_plan_next_break(const keel_course *c, size_t *i);

/* Why a pinned rank of s (stage "ranks") is where it is, in the words of
 * every format: "no valid plan has her lower" at the peak, else "no valid
 * plan that keeps the nurses above has her lower". */
const char *keel_report_plan_pinned_why(const keel_solution *s, const keel_rank *rk);

/* Next planned hand-off of patient p after part *q (start with *q at the
 * patient's first part): true and fills *at (minutes after the shift's
 * start), *from and *to, moving *q on; false when there are no more. */
bool keel_report_plan_next_handoff(const keel_report *rep, size_t p, int *q, int *at, int *from,
                                   int *to);

/* report_out.c */

/* Writes s as a double-quoted string with JSON escapes (valid YAML too). */
void keel_report_out_quoted(FILE *out, const char *s);

/* CSV (RFC 4180, section 2): one field, in double quotes with its quotes
 * doubled when it holds a comma, a quote or a line end (NULL: empty),
 * then "," or, for the last field of a record, CRLF. */
void keel_report_out_csv(FILE *out, const char *s, bool last);

/* HTML: s with &, <, > and " escaped (attributes are double-quoted). */
void keel_report_out_html(FILE *out, const char *s);

/* HTML: the page's head (doctype, title, keel's one stylesheet with its
 * print rules) and <body>. */
void keel_report_out_html_head(FILE *out, const char *title);

/* HTML: the footer (the caution, table t's citation when t is not NULL,
 * keel's version) and the end of the page. */
void keel_report_out_html_foot(FILE *out, const keel_law_table *t);

/* One bar of an HTML chart: a label, a value (the bar's length), the text
 * written after it, a tick at `mark` (< 0: none) and a hatched bar (never
 * colour alone: the text says why too). */
typedef struct keel_html_bar {
    const char *label;
    double value;
    char text[64];
    double mark;
    bool hatched;
} keel_html_bar;

/* One vertical line across an HTML chart at `at`, dashed or dotted, with
 * its label under the chart. */
typedef struct keel_html_line {
    double at;
    bool dotted;
    char label[64];
} keel_html_line;

/* An inline SVG chart of horizontal bars (class "bar", "bar overload" when
 * hatched), scaled so that `top` fills it. */
void keel_report_out_html_chart(FILE *out, const char *title, const keel_html_bar *bars,
                                size_t nbars, const keel_html_line *lines, size_t nlines,
                                double top);

/* Writes text as lines of at most width columns (words longer than a line
 * stand alone), each starting with indent. */
void keel_report_out_wrapped(FILE *out, const char *indent, const char *text, size_t width);

#endif
