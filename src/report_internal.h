/* SPDX-License-Identifier: GPL-3.0-or-later */
/* report_internal.h - the writer plugin interface (internal). */
#ifndef KEEL_REPORT_INTERNAL_H
#define KEEL_REPORT_INTERNAL_H

#include <stdio.h>

#include "keel/report.h"

/* A writer formats a report; it returns KEEL_OK, or KEEL_ERR_USAGE when it
 * cannot show this kind of report.  Write errors are caught by the caller
 * through ferror(). */
typedef struct keel_writer {
    const char *name;
    keel_status (*write)(const keel_report *report, FILE *out);
} keel_writer;

keel_status keel_report_text(const keel_report *report, FILE *out);
keel_status keel_report_json(const keel_report *report, FILE *out);
keel_status keel_report_yaml(const keel_report *report, FILE *out);

/* Writes s as a double-quoted string with JSON escapes (valid YAML too). */
void keel_write_quoted(FILE *out, const char *s);

/* True when some patient's care minutes come from NAS items (the reports
 * then carry keel_nas_note()). */
bool keel_report_uses_nas(const keel_roster *r);

/* Writes one patient as an entry of a roster's patients list, with nurse as
 * its `nurse:` (NULL: none). */
void keel_yaml_write_patient(FILE *out, const keel_patient *patient, const char *nurse);

/* Writes text as lines of at most width columns (words longer than a line
 * stand alone), each starting with indent. */
void keel_write_wrapped(FILE *out, const char *indent, const char *text, size_t width);

#endif
