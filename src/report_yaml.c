/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_yaml.c - the roster again, every key it had, with each patient's
 * `nurse:` set to the assignment, so the file can be fed back in (to
 * `keel check`, or by hand edits to `keel assign`).  Strings are written
 * double-quoted; the first lines carry the caution as a comment.
 */
#include <stdio.h>

#include "keel/keel.h"
#include "report_internal.h"
#include "workload_internal.h"

static void write_key_string(FILE *out, const char *indent, const char *key, const char *value)
{
    if (!value)
        return;
    fprintf(out, "%s%s: ", indent, key);
    keel_report_out_quoted(out, value);
    fputc('\n', out);
}

static void write_key_int(FILE *out, const char *indent, const char *key, int value)
{
    if (value != KEEL_ABSENT)
        fprintf(out, "%s%s: %d\n", indent, key, value);
}

static void write_key_list(FILE *out, const char *indent, const char *key, char *const *items,
                           size_t n)
{
    if (n == 0)
        return;
    fprintf(out, "%s%s: [", indent, key);
    for (size_t i = 0; i < n; i++) {
        if (i)
            fputs(", ", out);
        keel_report_out_quoted(out, items[i]);
    }
    fputs("]\n", out);
}

static void write_head(FILE *out, const keel_roster *r)
{
    fputs("version: 1\n", out);
    if (r->unit.name || r->unit.type) {
        fputs("unit:\n", out);
        write_key_string(out, "  ", "name", r->unit.name);
        write_key_string(out, "  ", "type", r->unit.type);
    }
    fputs("shift:\n", out);
    write_key_string(out, "  ", "label", r->shift.label);
    write_key_string(out, "  ", "date", r->shift.date);
    if (r->shift.start_minute != KEEL_ABSENT)
        fprintf(out, "  start: \"%02d:%02d\"\n", r->shift.start_minute / 60,
                r->shift.start_minute % 60);
    write_key_int(out, "  ", "minutes", r->shift.minutes);
    write_key_int(out, "  ", "break_minutes", r->shift.break_minutes);
    bool roles = false;
    for (size_t i = 0; i < KEEL_NROLES; i++)
        roles = roles || r->policy.roles[i].max_patients != KEEL_ABSENT ||
                r->policy.roles[i].duty_minutes != KEEL_ABSENT ||
                r->policy.roles[i].max_acuity != KEEL_ABSENT;
    bool needs = false;
    for (size_t i = 0; i < KEEL_NISOLATION; i++)
        needs = needs || r->policy.nisolation_needs[i] > 0;
    if (r->policy.max_patients == KEEL_ABSENT && r->policy.nacuity == 0 && r->policy.nextras == 0 &&
        !roles && !needs && !r->policy.ratio_table && r->policy.high_acuity.level == KEEL_ABSENT &&
        r->policy.isolation_separation && r->policy.max_zones == KEEL_ABSENT &&
        r->policy.balance_tolerance == KEEL_ABSENT && r->policy.min_patients == KEEL_ABSENT &&
        r->policy.max_utilisation == KEEL_ABSENT && r->policy.balance == KEEL_BALANCE_PEAK)
        return;
    fputs("policy:\n", out);
    write_key_int(out, "  ", "max_patients", r->policy.max_patients);
    if (r->policy.nacuity) {
        fputs("  acuity_minutes: {", out);
        for (size_t i = 0; i < r->policy.nacuity; i++)
            fprintf(out, "%s%d: %d", i ? ", " : "", r->policy.acuity_minutes[i].level,
                    r->policy.acuity_minutes[i].minutes);
        fputs("}\n", out);
    }
    if (r->policy.nextras) {
        fputs("  extra_minutes: {", out);
        for (size_t i = 0; i < r->policy.nextras; i++) {
            fputs(i ? ", " : "", out);
            keel_report_out_quoted(out, r->policy.extra_minutes[i].name);
            fprintf(out, ": %d", r->policy.extra_minutes[i].minutes);
        }
        fputs("}\n", out);
    }
    if (roles)
        fputs("  roles:\n", out);
    for (size_t i = 0; roles && i < KEEL_NROLES; i++) {
        const keel_role_policy *rp = &r->policy.roles[i];
        if (rp->max_patients == KEEL_ABSENT && rp->duty_minutes == KEEL_ABSENT &&
            rp->max_acuity == KEEL_ABSENT)
            continue;
        fprintf(out, "    %s:\n", keel_role_name((keel_role)i));
        write_key_int(out, "      ", "max_patients", rp->max_patients);
        write_key_int(out, "      ", "duty_minutes", rp->duty_minutes);
        write_key_int(out, "      ", "max_acuity", rp->max_acuity);
    }
    if (r->policy.ratio_table) {
        char cite[KEEL_LAW_CITE_SIZE];
        keel_law_cite(r->policy.ratio_table, cite, sizeof cite);
        fprintf(out, "  # %s\n", cite);
        if (r->policy.ratio_table->note)
            fprintf(out, "  # %s\n", r->policy.ratio_table->note);
        fprintf(out, "  ratio_table: %s\n", r->policy.ratio_table->name);
    }
    if (r->policy.high_acuity.level != KEEL_ABSENT)
        fprintf(out, "  high_acuity: {level: %d, max_per_nurse: %d}\n", r->policy.high_acuity.level,
                r->policy.high_acuity.max_per_nurse);
    if (!r->policy.isolation_separation)
        fputs("  isolation_separation: false\n", out);
    if (needs)
        fputs("  isolation_needs:\n", out);
    for (size_t i = 0; i < KEEL_NISOLATION; i++)
        write_key_list(out, "    ", keel_isolation_name((keel_isolation)i),
                       r->policy.isolation_needs[i], r->policy.nisolation_needs[i]);
    write_key_int(out, "  ", "max_zones", r->policy.max_zones);
    if (r->policy.balance_tolerance != KEEL_ABSENT)
        fprintf(out, "  balance_tolerance: %d.%06d\n",
                r->policy.balance_tolerance / KEEL_TOLERANCE_SCALE,
                r->policy.balance_tolerance % KEEL_TOLERANCE_SCALE);
    write_key_int(out, "  ", "min_patients", r->policy.min_patients);
    if (r->policy.max_utilisation != KEEL_ABSENT)
        fprintf(out, "  max_utilisation: %d.%06d\n",
                r->policy.max_utilisation / KEEL_TOLERANCE_SCALE,
                r->policy.max_utilisation % KEEL_TOLERANCE_SCALE);
    if (r->policy.balance != KEEL_BALANCE_PEAK)
        fprintf(out, "  balance: %s\n", keel_balance_name(r->policy.balance));
}

/* `indent key: "HH:MM"` for a time given on the roster. */
static void write_key_time(FILE *out, const keel_roster *r, const char *indent, const char *key,
                           int offset)
{
    char buf[KEEL_TIME_SIZE];
    if (!r || offset == KEEL_ABSENT)
        return;
    keel_roster_clock_text(r, offset, buf);
    fprintf(out, "%s%s: \"%s\"\n", indent, key, buf);
}

static void write_nurses(FILE *out, const keel_roster *r)
{
    fputs("nurses:\n", out);
    for (size_t n = 0; n < r->nnurses; n++) {
        const keel_nurse *nu = &r->nurses[n];
        fputs("  - id: ", out);
        keel_report_out_quoted(out, nu->id);
        fputc('\n', out);
        write_key_string(out, "    ", "name", nu->name);
        write_key_list(out, "    ", "skills", nu->skills, nu->nskills);
        write_key_int(out, "    ", "max_patients", nu->max_patients);
        write_key_int(out, "    ", "min_patients", nu->min_patients);
        write_key_int(out, "    ", "minutes", nu->minutes);
        write_key_int(out, "    ", "break_minutes", nu->break_minutes);
        write_key_int(out, "    ", "duty_minutes", nu->duty_minutes);
        if (nu->role != KEEL_ROLE_STAFF)
            fprintf(out, "    role: %s\n", keel_role_name(nu->role));
        if (nu->licence == KEEL_LICENCE_LPN)
            fputs("    licence: lpn\n", out);
        write_key_string(out, "    ", "preceptor", nu->preceptor);
        write_key_time(out, r, "    ", "start", nu->start);
        write_key_time(out, r, "    ", "end", nu->end);
        if (nu->nbreaks)
            fputs("    breaks:\n", out);
        for (size_t i = 0; i < nu->nbreaks; i++) {
            write_key_time(out, r, "      - ", "at", nu->breaks[i].at);
            fprintf(out, "        minutes: %d\n", nu->breaks[i].minutes);
        }
        write_key_string(out, "    ", "covers", nu->covers);
    }
}

void keel_report_yaml_patient(FILE *out, const keel_roster *r, const keel_patient *pa,
                             const char *nurse)
{
    fputs("  - id: ", out);
    keel_report_out_quoted(out, pa->id);
    fputc('\n', out);
    write_key_string(out, "    ", "bed", pa->bed);
    write_key_string(out, "    ", "name", pa->name);
    write_key_int(out, "    ", "acuity", pa->acuity);
    write_key_int(out, "    ", "care_minutes", pa->care_minutes);
    write_key_list(out, "    ", "extras", pa->extras, pa->nextras);
    write_key_list(out, "    ", "needs", pa->needs, pa->nneeds);
    write_key_string(out, "    ", "nurse", nurse);
    if (pa->lock)
        fputs("    lock: true\n", out);
    if (pa->sitter)
        fputs("    sitter: true\n", out);
    write_key_list(out, "    ", "avoid", pa->avoid, pa->navoid);
    if (pa->ratio != KEEL_ABSENT)
        fprintf(out, "    ratio: \"1:%d\"\n", pa->ratio);
    if (pa->isolation != KEEL_ISOLATION_NONE)
        fprintf(out, "    isolation: %s\n", keel_isolation_name(pa->isolation));
    write_key_string(out, "    ", "room", pa->room);
    write_key_string(out, "    ", "zone", pa->zone);
    write_key_string(out, "    ", "previous_nurse", pa->previous_nurse);
    write_key_list(out, "    ", "nas", pa->nas, pa->nnas);
    write_key_time(out, r, "    ", pa->expected ? "at" : "arrives_at", pa->arrives_at);
    write_key_time(out, r, "    ", "leaves_at", pa->leaves_at);
    if (pa->nrecord)
        fputs("    record:\n", out);
    for (size_t i = 0; i < pa->nrecord; i++) {
        char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
        keel_roster_clock_text(r, pa->record[i].from, from);
        keel_roster_clock_text(r, pa->record[i].to, to);
        fputs("      - {nurse: ", out);
        keel_report_out_quoted(out, pa->record[i].nurse);
        fprintf(out, ", from: \"%s\", to: \"%s\"}\n", from, to);
    }
}

/* The planned hand-offs of patient p under the report's assignment, or as
 * the roster gives them when there is none. */
static void write_handoffs(FILE *out, const keel_report *rep, size_t p)
{
    const keel_roster *r = rep->roster;
    if (!rep->nurse_of) {
        write_key_list(out, "    ", "handoffs", r->patients[p].handoffs, r->patients[p].nhandoffs);
        return;
    }
    int q = rep->workload->first_part[p], at, from, to;
    size_t k = 0;
    for (; keel_report_plan_next_handoff(rep, p, &q, &at, &from, &to); k++) {
        fputs(k ? ", " : "    handoffs: [", out);
        keel_report_out_quoted(out, to >= 0 ? r->nurses[to].id : "");
    }
    if (k)
        fputs("]\n", out);
}

/* The patients, or the expected admissions, with their nurses. */
static void write_patients(FILE *out, const keel_report *rep, bool expected)
{
    const keel_roster *r = rep->roster;
    bool any = !expected; /* the patients' key is always written */
    if (!expected)
        fputs("patients:\n", out);
    for (size_t p = 0; p < r->npatients; p++) {
        if (r->patients[p].expected != expected)
            continue;
        if (!any)
            fputs("expected_admissions:\n", out);
        any = true;
        int n = keel_report_plan_first_nurse(rep, p);
        keel_patient shown = r->patients[p];
        if (rep->deidentify)
            shown.name = NULL;
        keel_report_yaml_patient(out, r, &shown, n >= 0 ? r->nurses[n].id : shown.nurse);
        write_handoffs(out, rep, p);
    }
}

keel_status keel_report_yaml(const keel_report *rep, FILE *out)
{
    const keel_solution *s = rep->solution;
    /* A best-effort plan says so on its first line, before anyone reads on. */
    if (s && s->best_effort)
        fputs("# BEST-EFFORT PLAN: no valid assignment exists; the nurses below break rules\n"
              "# (see keel assign's report). Tell the house supervisor before using any of it.\n",
              out);
    fprintf(out, "# Written by keel %s", keel_version());
    if (s)
        fprintf(out, " (%s, status %s)", s->method, keel_solve_status_name(s->status));
    fprintf(out, "\n# %s\n", KEEL_CAUTION);
    if (rep->verdict)
        fprintf(out, "# Staffing verdict (%s): %s\n", keel_verdict_kind_name(rep->verdict->kind),
                rep->verdict->text);
    write_head(out, rep->roster);
    write_nurses(out, rep->roster);
    write_patients(out, rep, false);
    write_patients(out, rep, true);
    return KEEL_OK;
}
