/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_csv.c - the plan as comma-separated values (RFC 4180: a header
 * row, CRLF line ends, a field holding a comma, a quote or a line end in
 * double quotes with its quotes doubled), for a spreadsheet: "csv", a row
 * per patient, and "csv-nurses", a row per nurse.  Patients appear by id,
 * bed and room, never by name.  A CSV file has no place for the caution;
 * the command says it on standard error.
 */
#include <stdio.h>
#include <string.h>

#include "keel/keel.h"
#include "report_internal.h"
#include "workload_internal.h"

static void field(FILE *out, const char *s, bool last)
{
    keel_report_out_csv(out, s, last);
}

static void number(FILE *out, long v, bool last)
{
    char buf[32];
    snprintf(buf, sizeof buf, "%ld", v);
    field(out, buf, last);
}

/* A list as one field: "a; b; c". */
static void list(FILE *out, char *const *items, size_t n, bool last)
{
    char buf[512] = "";
    size_t used = 0;
    for (size_t i = 0; i < n && used < sizeof buf; i++)
        used += (size_t)snprintf(buf + used, sizeof buf - used, "%s%s", i ? "; " : "", items[i]);
    field(out, buf, last);
}

static void clock_field(FILE *out, const keel_roster *r, int minutes, bool last)
{
    char at[KEEL_TIME_SIZE] = "";
    if (minutes != KEEL_ABSENT)
        keel_roster_clock_text(r, minutes, at);
    field(out, at, last);
}

/* Patient p's planned hand-offs, "15:00 E05 to E02; …". */
static void handoffs(FILE *out, const keel_report *rep, size_t p, bool last)
{
    char buf[512] = "", at[KEEL_TIME_SIZE];
    size_t used = 0;
    int q = rep->workload->first_part[p], when, from, to;
    while (used < sizeof buf && keel_report_plan_next_handoff(rep, p, &q, &when, &from, &to)) {
        keel_roster_clock_text(rep->roster, when, at);
        used += (size_t)snprintf(buf + used, sizeof buf - used, "%s%s %s to %s", used ? "; " : "",
                                 at, rep->roster->nurses[from].id,
                                 to >= 0 ? rep->roster->nurses[to].id : "nobody");
    }
    field(out, buf, last);
}

keel_status keel_report_csv(const keel_report *rep, FILE *out)
{
    const keel_roster *r = rep->roster;
    fputs("patient,bed,room,zone,acuity,care_minutes,nurse,handoffs,arrives,leaves,needs,"
          "isolation,ratio,expected\r\n",
          out);
    for (size_t p = 0; rep->nurse_of && p < r->npatients; p++) {
        const keel_patient *pat = &r->patients[p];
        int n = keel_report_plan_first_nurse(rep, (size_t)p);
        field(out, pat->id, false);
        field(out, pat->bed, false);
        field(out, pat->room, false);
        field(out, pat->zone, false);
        if (pat->acuity != KEEL_ABSENT)
            number(out, pat->acuity, false);
        else
            field(out, "", false);
        number(out, (long)keel_workload_patient_care(rep->workload, p), false);
        field(out, n >= 0 ? r->nurses[n].id : "", false);
        handoffs(out, rep, p, false);
        clock_field(out, r, pat->arrives_at, false);
        clock_field(out, r, pat->leaves_at, false);
        list(out, pat->needs, pat->nneeds, false);
        field(out, pat->isolation != KEEL_ISOLATION_NONE ? keel_isolation_name(pat->isolation) : "",
              false);
        if (pat->ratio != KEEL_ABSENT) {
            char ratio[24];
            snprintf(ratio, sizeof ratio, "1:%d", pat->ratio);
            field(out, ratio, false);
        } else {
            field(out, "", false);
        }
        field(out, pat->expected ? "yes" : "no", true);
    }
    return KEEL_OK;
}

keel_status keel_report_csv_nurses(const keel_report *rep, FILE *out)
{
    const keel_roster *r = rep->roster;
    const keel_metrics *m = rep->metrics;
    fputs("nurse,name,role,takes_patients,patients,care_minutes,duty_minutes,load_minutes,"
          "capacity_minutes,utilisation,overload\r\n",
          out);
    for (size_t n = 0; rep->nurse_of && n < r->nnurses; n++) {
        const keel_nurse_metrics *nm = &m->nurses[n];
        field(out, r->nurses[n].id, false);
        field(out, r->nurses[n].name, false);
        field(out, keel_role_name(r->nurses[n].role), false);
        field(out, nm->counted ? "yes" : "no", false);
        number(out, nm->npatients, false);
        number(out, nm->care_minutes, false);
        number(out, rep->workload->duty_minutes[n], false);
        number(out, nm->load_minutes, false);
        number(out, nm->capacity_minutes, false);
        char u[32];
        snprintf(u, sizeof u, "%.6f", nm->utilisation);
        field(out, u, false);
        field(out, nm->counted && nm->load_minutes > nm->capacity_minutes ? "yes" : "no", true);
    }
    return KEEL_OK;
}
