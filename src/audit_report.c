/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_report.c - the audit's writers, one table: a format is a name and
 * a function; keel_audit_write() looks the name up.
 */
#include <string.h>

#include "audit_internal.h"

typedef struct audit_writer {
    const char *name;
    keel_status (*write)(const keel_audit *audit, FILE *out);
} audit_writer;

static const audit_writer writers[] = {
    {"text", keel_audit_text},
    {"json", keel_audit_json},
    {"html", keel_audit_html},
    {"csv", keel_audit_csv_shifts},
    {"csv-nurse-shifts", keel_audit_csv_nurse_shifts},
    {"csv-nurses", keel_audit_csv_nurses},
    {"csv-nurse-groups", keel_audit_csv_nurse_groups},
    {"csv-violations", keel_audit_csv_violations},
};

enum { NWRITERS = sizeof writers / sizeof writers[0] };

size_t keel_audit_nformats(void)
{
    return NWRITERS;
}

const char *keel_audit_format_name(size_t i)
{
    return i < NWRITERS ? writers[i].name : NULL;
}

keel_status keel_audit_write(const char *format, const keel_audit *audit, FILE *out,
                             keel_error *err)
{
    for (size_t i = 0; i < NWRITERS; i++)
        if (strcmp(writers[i].name, format) == 0) {
            keel_status rc = writers[i].write(audit, out);
            return rc ? keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory") : KEEL_OK;
        }
    return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                          "unknown audit format '%s'; expected text, json, html, csv, "
                          "csv-nurse-shifts, csv-nurses, csv-nurse-groups or csv-violations",
                          format);
}
