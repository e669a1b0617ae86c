/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report.c - the table of writers.  Last stage of the pipeline: writers
 * read the roster, the solution and the metrics and only format them; what
 * they share is in report_plan.c (reading the plan) and report_out.c
 * (writing text).
 */
#include "keel/report.h"

#include <string.h>

#include "report_internal.h"

static const keel_writer writers[] = {
    {"text", keel_report_text}, {"yaml", keel_report_yaml}, {"json", keel_report_json},
    {"html", keel_report_html}, {"csv", keel_report_csv},   {"csv-nurses", keel_report_csv_nurses},
};

size_t keel_report_nformats(void)
{
    return sizeof writers / sizeof writers[0];
}

const char *keel_report_format_name(size_t i)
{
    return i < keel_report_nformats() ? writers[i].name : NULL;
}

keel_status keel_report_write(const char *format, const keel_report *report, FILE *out,
                              keel_error *err)
{
    for (size_t i = 0; i < keel_report_nformats(); i++) {
        if (strcmp(writers[i].name, format) != 0)
            continue;
        /* Every format says the one verdict, judged here when the caller
         * gave none. */
        keel_report judged = *report;
        keel_verdict *verdict = NULL;
        if (!judged.verdict && judged.workload) {
            keel_status rc = keel_verdict_compute(judged.roster, judged.workload,
                                                  judged.solution, judged.nurse_of, &verdict, err);
            if (rc)
                return rc;
            judged.verdict = verdict;
        }
        keel_status rc = writers[i].write(&judged, out);
        keel_verdict_free(verdict);
        if (rc)
            return keel_error_add(err, rc, NULL, 0, 0, NULL,
                                  "the %s format cannot show this report", format);
        if (fflush(out) != 0 || ferror(out))
            return keel_error_add(err, KEEL_ERR_IO, NULL, 0, 0, NULL, "could not write the report");
        return KEEL_OK;
    }
    return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                          "unknown format '%s'; expected text, yaml, json, html, csv or "
                          "csv-nurses",
                          format);
}
