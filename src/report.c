/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report.c - the table of writers and what they share.  Last stage of the
 * pipeline: writers read the roster, the solution and the metrics and only
 * format them.
 */
#include "keel/report.h"

#include <string.h>

#include "report_internal.h"
#include "workload_internal.h"

static const keel_writer writers[] = {
    {"text", keel_report_text},
    {"yaml", keel_report_yaml},
    {"json", keel_report_json},
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
        keel_status rc = writers[i].write(report, out);
        if (rc)
            return keel_error_add(err, rc, NULL, 0, 0, NULL,
                                  "the %s format cannot show this report", format);
        if (fflush(out) != 0 || ferror(out))
            return keel_error_add(err, KEEL_ERR_IO, NULL, 0, 0, NULL, "could not write the report");
        return KEEL_OK;
    }
    return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                          "unknown format '%s'; expected text, yaml or json", format);
}

void keel_write_quoted(FILE *out, const char *s)
{
    fputc('"', out);
    for (const unsigned char *c = (const unsigned char *)s; *c; c++) {
        switch (*c) {
        case '"':
            fputs("\\\"", out);
            break;
        case '\\':
            fputs("\\\\", out);
            break;
        case '\n':
            fputs("\\n", out);
            break;
        case '\t':
            fputs("\\t", out);
            break;
        case '\r':
            fputs("\\r", out);
            break;
        default:
            if (*c < 0x20)
                fprintf(out, "\\u%04x", *c);
            else
                fputc(*c, out);
        }
    }
    fputc('"', out);
}

void keel_write_wrapped(FILE *out, const char *indent, const char *text, size_t width)
{
    size_t room = width > strlen(indent) ? width - strlen(indent) : 1;
    while (*text) {
        while (*text == ' ')
            text++;
        if (!*text)
            break;
        size_t len = strlen(text), cut = len;
        if (len > room) {
            cut = room;
            /* Break at a space, but not before a lone "%". */
            while (cut > 0 && (text[cut] != ' ' || text[cut + 1] == '%'))
                cut--;
            if (cut == 0) /* one long word */
                for (cut = room; text[cut] && text[cut] != ' '; cut++)
                    ;
        }
        fprintf(out, "%s%.*s\n", indent, (int)cut, text);
        text += cut;
    }
}

bool keel_report_uses_nas(const keel_roster *r)
{
    for (size_t p = 0; p < r->npatients; p++)
        if (r->patients[p].nnas > 0 && r->patients[p].care_minutes == KEEL_ABSENT)
            return true;
    return false;
}

int keel_report_first_nurse(const keel_report *rep, size_t p)
{
    return rep->nurse_of ? rep->nurse_of[rep->workload->first_part[p]] : -1;
}

bool keel_report_holds(const keel_report *rep, size_t p, size_t n)
{
    const keel_workload *w = rep->workload;
    for (int q = w->first_part[p]; rep->nurse_of && q < w->first_part[p + 1]; q++)
        if (rep->nurse_of[q] == (int)n)
            return true;
    return false;
}

long keel_report_care_held(const keel_report *rep, size_t p, size_t n)
{
    const keel_workload *w = rep->workload;
    long care = 0;
    for (int q = w->first_part[p]; rep->nurse_of && q < w->first_part[p + 1]; q++)
        if (rep->nurse_of[q] == (int)n)
            care += w->care_minutes[q];
    return care;
}

bool keel_report_next_handoff(const keel_report *rep, size_t p, int *q, int *at, int *from, int *to)
{
    const keel_workload *w = rep->workload;
    if (!rep->nurse_of)
        return false;
    for ((*q)++; *q < w->first_part[p + 1]; (*q)++) {
        int before = rep->nurse_of[*q - 1], now = rep->nurse_of[*q];
        if (before != now) {
            *at = w->part_start[*q];
            *from = before;
            *to = now;
            return true;
        }
    }
    return false;
}
