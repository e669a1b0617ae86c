/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_json.c - the machine-readable report.  Field names are a contract
 * other tools rely on (docs/output.md): extend, never rename.  Utilisations
 * and indices carry 10 significant digits.
 */
#include <stdio.h>
#include <string.h>

#include "keel/keel.h"
#include "report_internal.h"
#include "workload_internal.h"

static void write_ids_of_patients(FILE *out, const keel_roster *r, const size_t *idx, size_t n)
{
    fputc('[', out);
    for (size_t i = 0; i < n; i++) {
        if (i)
            fputs(", ", out);
        keel_report_out_quoted(out, r->patients[idx[i]].id);
    }
    fputc(']', out);
}

static void write_ids_of_nurses(FILE *out, const keel_roster *r, const size_t *idx, size_t n)
{
    fputc('[', out);
    for (size_t i = 0; i < n; i++) {
        if (i)
            fputs(", ", out);
        keel_report_out_quoted(out, r->nurses[idx[i]].id);
    }
    fputc(']', out);
}

static void write_findings(FILE *out, const keel_roster *r, const char *key,
                           const keel_findings *list)
{
    fprintf(out, "  \"%s\": [", key);
    for (size_t i = 0; list && i < list->n; i++) {
        const keel_finding *f = &list->items[i];
        fputs(i ? ",\n    " : "\n    ", out);
        fprintf(out, "{\"rule\": \"%s\", \"patients\": ", f->rule);
        write_ids_of_patients(out, r, f->patients, f->npatients);
        fputs(", \"nurses\": ", out);
        write_ids_of_nurses(out, r, f->nurses, f->nnurses);
        fputs(", \"message\": ", out);
        keel_report_out_quoted(out, f->message);
        fputc('}', out);
    }
    fputs(list && list->n ? "\n  ],\n" : "],\n", out);
}

/* `, "key": "HH:MM"` for a time given on the roster. */
static void write_time(FILE *out, const keel_roster *r, const char *key, int offset)
{
    char buf[KEEL_TIME_SIZE];
    if (offset == KEEL_ABSENT)
        return;
    keel_roster_clock_text(r, offset, buf);
    fprintf(out, ", \"%s\": \"%s\"", key, buf);
}

/* `, "timeline": [{"at": "07:00", "patients": 4}, ..., {"at": "15:00", "off": true}]`. */
static void write_timeline(FILE *out, const keel_report *rep, size_t n)
{
    const keel_course_timeline *t = &rep->course->timelines[n];
    char at[KEEL_TIME_SIZE];
    fputs(", \"timeline\": [", out);
    for (size_t i = 0; i < t->nchanges; i++) {
        keel_roster_clock_text(rep->roster, t->changes[i].at, at);
        if (t->changes[i].patients == KEEL_COURSE_OFF)
            fprintf(out, "%s{\"at\": \"%s\", \"off\": true}", i ? ", " : "", at);
        else
            fprintf(out, "%s{\"at\": \"%s\", \"patients\": %d}", i ? ", " : "", at,
                    t->changes[i].patients);
    }
    fputc(']', out);
}

/* Break cover, the relief nurses it needs and the admission order. */
static void write_course(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_course *c = rep->course;
    char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
    fputs("  \"break_cover\": [", out);
    for (size_t i = 0; i < c->nbreaks; i++) {
        const keel_break_cover *b = &c->breaks[i];
        keel_roster_clock_text(r, b->at, from);
        keel_roster_clock_text(r, b->at + b->minutes, to);
        fputs(i ? ",\n    {\"nurse\": " : "\n    {\"nurse\": ", out);
        keel_report_out_quoted(out, r->nurses[b->nurse].id);
        fprintf(out, ", \"from\": \"%s\", \"to\": \"%s\", \"cover\": ", from, to);
        if (b->cover >= 0)
            keel_report_out_quoted(out, r->nurses[b->cover].id);
        else
            fputs("null", out);
        fprintf(out, ", \"relief\": %s, \"patients\": ", b->relief ? "true" : "false");
        write_ids_of_patients(out, r, b->patients, b->npatients);
        fprintf(out,
                ", \"most_patients\": %d, \"limit\": %d, \"needs_relief\": %s, \"flag\": ", b->most,
                b->limit, b->needs_relief ? "true" : "false");
        if (b->rule)
            fprintf(out, "\"%s\"}", b->rule);
        else
            fputs("null}", out);
    }
    fputs(c->nbreaks ? "\n  ],\n" : "],\n", out);
    fprintf(out, "  \"relief\": {\"needed\": %d, \"on_roster\": %d},\n", c->relief_needed,
            c->relief_on_roster);
    fprintf(out, "  \"admission_order\": {\"admission_minutes\": %d, \"nurses\": [",
            c->admission_minutes);
    for (size_t i = 0; i < c->npicks; i++) {
        fputs(i ? ", {\"nurse\": " : "{\"nurse\": ", out);
        keel_report_out_quoted(out, r->nurses[c->picks[i].nurse].id);
        fprintf(out, ", \"load_minutes\": %d, \"utilisation\": %.12g, \"overload\": %s}",
                c->picks[i].load_minutes, c->picks[i].utilisation,
                c->picks[i].over ? "true" : "false");
    }
    fprintf(out, "], \"nobody_has_room\": %s},\n", c->npicks == 0 ? "true" : "false");
}

static void write_nurses(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_workload *w = rep->workload;
    fputs("  \"nurses\": [", out);
    for (size_t n = 0; n < r->nnurses; n++) {
        fputs(n ? ",\n    " : "\n    ", out);
        fputs("{\"id\": ", out);
        keel_report_out_quoted(out, r->nurses[n].id);
        fprintf(out, ", \"role\": \"%s\"", keel_role_name(r->nurses[n].role));
        if (r->nurses[n].preceptor) {
            fputs(", \"preceptor\": ", out);
            keel_report_out_quoted(out, r->nurses[n].preceptor);
            if (r->nurses[n].max_patients != KEEL_ABSENT)
                fprintf(out, ", \"share_max_patients\": %d", r->nurses[n].max_patients);
        }
        if (r->clock) {
            write_time(out, r, "start", w->nurse_start[n]);
            write_time(out, r, "end", w->nurse_end[n]);
        }
        fputs(", \"patients\": [", out);
        size_t k = 0;
        for (size_t p = 0; rep->nurse_of && p < r->npatients; p++) {
            if (!keel_report_plan_holds(rep, p, n))
                continue;
            fputs(k++ ? ", " : "", out);
            keel_report_out_quoted(out, r->patients[p].id);
        }
        fputc(']', out);
        const keel_nurse_metrics *m = &rep->metrics->nurses[n];
        if (rep->nurse_of)
            fprintf(out, ", \"load_minutes\": %d, \"care_minutes\": %d", m->load_minutes,
                    m->care_minutes);
        fprintf(out, ", \"duty_minutes\": %d, \"capacity_minutes\": %d, \"break_minutes\": %d",
                w->duty_minutes[n], w->capacity_minutes[n],
                keel_workload_on_unit(r, n) - w->capacity_minutes[n]);
        if (rep->nurse_of)
            fprintf(out, ", \"utilisation\": %.12g, \"overload\": %s", m->utilisation,
                    m->counted && m->load_minutes > m->capacity_minutes ? "true" : "false");
        fprintf(out, ", \"max_patients\": %d, \"counted\": %s", w->max_patients[n],
                keel_workload_counted(w, n) ? "true" : "false");
        if (rep->course)
            write_timeline(out, rep, n);
        fputc('}', out);
    }
    fputs("\n  ],\n", out);
}

static void write_patients(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    fputs("  \"patients\": [", out);
    for (size_t p = 0; p < r->npatients; p++) {
        fputs(p ? ",\n    " : "\n    ", out);
        fputs("{\"id\": ", out);
        keel_report_out_quoted(out, r->patients[p].id);
        if (r->patients[p].bed) {
            fputs(", \"bed\": ", out);
            keel_report_out_quoted(out, r->patients[p].bed);
        }
        fprintf(out, ", \"care_minutes\": %lld, \"locked\": %s, \"sitter\": %s",
                keel_workload_patient_care(rep->workload, p),
                r->patients[p].lock ? "true" : "false", r->patients[p].sitter ? "true" : "false");
        if (r->patients[p].expected)
            fputs(", \"expected\": true", out);
        write_time(out, r, "arrives_at", r->patients[p].arrives_at);
        write_time(out, r, "leaves_at", r->patients[p].leaves_at);
        if (r->patients[p].isolation != KEEL_ISOLATION_NONE)
            fprintf(out, ", \"isolation\": \"%s\"", keel_isolation_name(r->patients[p].isolation));
        if (rep->workload->high_acuity[rep->workload->first_part[p]])
            fputs(", \"high_acuity\": true", out);
        if (r->patients[p].nnas > 0 && r->patients[p].care_minutes == KEEL_ABSENT) {
            int score = keel_nas_score(r->patients[p].nas, r->patients[p].nnas);
            fprintf(out, ", \"nas_score\": %d.%d", score / 10, score % 10);
        }
        if (r->patients[p].previous_nurse) {
            fputs(", \"previous_nurse\": ", out);
            keel_report_out_quoted(out, r->patients[p].previous_nurse);
        }
        fputs(", \"nurse\": ", out);
        int n = keel_report_plan_first_nurse(rep, p);
        if (n >= 0)
            keel_report_out_quoted(out, r->nurses[n].id);
        else
            fputs("null", out);
        if (r->clock && rep->nurse_of) {
            fputs(", \"handoffs\": [", out);
            int q = rep->workload->first_part[p], at, from, to;
            for (size_t k = 0; keel_report_plan_next_handoff(rep, p, &q, &at, &from, &to); k++) {
                char buf[KEEL_TIME_SIZE];
                keel_roster_clock_text(r, at, buf);
                fprintf(out, "%s{\"at\": \"%s\", \"from\": ", k ? ", " : "", buf);
                keel_report_out_quoted(out, r->nurses[from].id);
                fputs(", \"to\": ", out);
                if (to >= 0)
                    keel_report_out_quoted(out, r->nurses[to].id);
                else
                    fputs("null", out);
                fputc('}', out);
            }
            fputc(']', out);
        }
        if (rep->explanation && n >= 0) {
            fprintf(out, ", \"why\": {\"reason\": \"%s\", \"text\": ",
                    keel_reason_name(rep->explanation->reason[p]));
            keel_report_out_quoted(out, rep->explanation->text[p]);
            fputc('}', out);
        }
        fputc('}', out);
    }
    fputs(r->npatients ? "\n  ],\n" : "],\n", out);
}

static void write_imbalance(FILE *out, const keel_metrics *m)
{
    fprintf(out,
            "  \"imbalance\": {\"max_utilisation\": %.12g, \"min_utilisation\": %.12g, "
            "\"mean_utilisation\": %.12g, \"spread\": %.12g, \"peak_to_mean\": %.12g, "
            "\"cv\": %.12g, \"jain\": %.12g, \"gini\": %.12g, \"counted_nurses\": %zu},\n",
            m->max_utilisation, m->min_utilisation, m->mean_utilisation, m->spread, m->peak_to_mean,
            m->cv, m->jain, m->gini, m->ncounted);
}

/* Stage "ranks": each rank held, heaviest first. */
static void write_ranks(FILE *out, const keel_roster *r, const keel_solution *s)
{
    fputs("  \"ranks\": [", out);
    for (size_t k = 0; k < s->nranks; k++) {
        const keel_rank *rk = &s->ranks[k];
        fprintf(out, "%s{\"rank\": %zu, \"nurse\": ", k ? ",\n    " : "\n    ", k + 1);
        if (rk->nurse >= 0)
            keel_report_out_quoted(out, r->nurses[rk->nurse].id);
        else
            fputs("null", out);
        fprintf(out, ", \"utilisation\": %.12g, \"pinned\": %s, \"status\": \"%s\"}",
                rk->utilisation, rk->pinned ? "true" : "false", keel_solve_status_name(rk->status));
    }
    fputs("\n  ],\n", out);
}

static void write_stages(FILE *out, const keel_roster *r, const keel_solution *s)
{
    if (s->nstages > 0 && strcmp(s->stages[0].name, "peak") == 0) {
        fprintf(out, "  \"bound\": {\"max_utilisation\": %.12g, \"gap\": %.12g", s->stages[0].bound,
                s->stages[0].gap);
        if (s->bound_reason.text) {
            fprintf(out, ", \"reason\": \"%s\", \"simple_floor\": %.12g, \"explanation\": ",
                    s->bound_reason.kind, s->bound_reason.floor);
            keel_report_out_quoted(out, s->bound_reason.text);
        }
        fputs("},\n", out);
    }
    fputs("  \"stages\": [", out);
    for (size_t i = 0; i < s->nstages; i++) {
        const keel_stage *st = &s->stages[i];
        fprintf(out,
                "%s{\"name\": \"%s\", \"status\": \"%s\", \"value\": %.12g, \"bound\": %.12g, "
                "\"gap\": %.12g, \"solver_calls\": %d, \"seconds\": %.3f}",
                i ? ",\n    " : "\n    ", st->name, keel_solve_status_name(st->status), st->value,
                st->bound, st->gap, st->solver_calls, st->seconds);
    }
    fputs(s->nstages ? "\n  ],\n" : "],\n", out);
    if (s->nranks > 0)
        write_ranks(out, r, s);
    if (s->continuity.applies) {
        fprintf(
            out,
            "  \"continuity\": {\"kept\": %ld, \"candidates\": %ld, \"kept_at_zero_tolerance\": ",
            s->continuity.kept, s->continuity.candidates);
        if (s->continuity.kept_at_zero >= 0)
            fprintf(out, "%ld", s->continuity.kept_at_zero);
        else
            fputs("null", out);
        fprintf(out, ", \"kept_at_zero_tolerance_proven\": %s, \"tolerance\": %.12g},\n",
                s->continuity.zero_proven ? "true" : "false", s->continuity.tolerance);
    }
    if (s->proximity.applies)
        fprintf(out, "  \"proximity\": {\"zones\": %ld, \"rooms\": %ld},\n", s->proximity.zones,
                s->proximity.rooms);
}

/* `, "key": "text"`, or `null` for no text. */
static void write_key_text(FILE *out, const char *key, const char *text)
{
    fprintf(out, ", \"%s\": ", key);
    if (text)
        keel_report_out_quoted(out, text);
    else
        fputs("null", out);
}

/* The ratio table: its name, what it encodes, its note, the shift's class
 * and, when the shift spans classes, how keel classed it. */
static void write_ratio_table(FILE *out, const keel_roster *r, const keel_staffing *st)
{
    const keel_law_table *t = st->table;
    char note[2 * KEEL_LAW_CITE_SIZE];
    fprintf(out, "{\"name\": \"%s\", \"encoded\": \"%s\", \"shift_class\": \"%s\"", t->name,
            t->encoded, keel_shift_class_name(st->shift_class));
    write_key_text(out, "citation", t->citation);
    write_key_text(out, "version", t->version);
    write_key_text(out, "note", t->note);
    bool spans = keel_law_shift_class_note(t, r->shift.start_minute, r->shift.minutes, note,
                                           sizeof note) > 0;
    write_key_text(out, "shift_class_note", spans ? note : NULL);
    fputc('}', out);
}

static void write_staffing(FILE *out, const keel_report *rep)
{
    const keel_metrics *m = rep->metrics;
    fprintf(out,
            "  \"staffing\": {\"patients\": %zu, \"nurses_on_shift\": %zu, "
            "\"nurses_taking_patients\": %zu, \"care_minutes\": %ld, \"duty_minutes\": %ld, "
            "\"capacity_minutes\": %ld, \"utilisation\": %.12g, \"nurses_needed\": %.12g},\n",
            rep->workload->npeople, m->nnurses, m->ncounted, m->care_minutes, m->duty_minutes,
            m->capacity_minutes, m->unit_utilisation, m->nurses_needed);
    const keel_staffing *st = rep->staffing;
    if (!st)
        return;
    fprintf(out,
            "  \"staffing_needs\": {\"by_care_minutes\": %d, \"by_limits\": %d, "
            "\"ward_minimum\": %d, \"needed\": %d, \"binding\": \"%s\", \"slack\": %d, "
            "\"nurse_hours_per_patient\": %.12g, \"ratio_table\": ",
            st->by_minutes, st->by_limits, st->ward_minimum, st->needed,
            keel_staffing_need_name(st->binding), st->slack, st->hours_per_patient);
    if (st->table)
        write_ratio_table(out, rep->roster, st);
    else
        fputs("null", out);
    if (st->clocked && st->moment_need > 0) {
        char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
        keel_roster_clock_text(rep->roster, st->moment_from, from);
        keel_roster_clock_text(rep->roster, st->moment_to, to);
        fprintf(out,
                ", \"tightest_moment\": {\"from\": \"%s\", \"to\": \"%s\", \"nurses_on\": %d, "
                "\"limits_need\": %d}",
                from, to, st->moment_on, st->moment_need);
    }
    fputs("},\n", out);
}

keel_status keel_report_json(const keel_report *rep, FILE *out)
{
    const keel_roster *r = rep->roster;
    const keel_solution *s = rep->solution;
    fputs("{\n", out);
    fprintf(out, "  \"keel_version\": \"%s\",\n", keel_version());
    fprintf(out, "  \"command\": \"%s\",\n", rep->kind == KEEL_REPORT_ASSIGN ? "assign" : "check");
    fputs("  \"roster\": ", out);
    keel_report_out_quoted(out, r->path ? r->path : "");
    fputs(",\n", out);
    if (rep->kind == KEEL_REPORT_ASSIGN && s) {
        fprintf(out, "  \"status\": \"%s\",\n  \"method\": \"%s\",\n  \"seconds\": %.3f,\n",
                keel_solve_status_name(s->status), s->method, s->seconds);
        fprintf(out, "  \"best_effort\": %s,\n", s->best_effort ? "true" : "false");
        if (s->best_effort)
            fprintf(out,
                    "  \"severity\": %ld,\n  \"escalation\": \"BEST-EFFORT PLAN: no valid "
                    "assignment exists and this plan breaks rules; tell the house supervisor "
                    "before using any of it.\",\n",
                    s->severity);
    }
    if (rep->kind == KEEL_REPORT_CHECK)
        fprintf(out, "  \"plan\": %s,\n", rep->nurse_of ? "true" : "false");
    if (rep->verdict) {
        const keel_verdict *v = rep->verdict;
        fprintf(out,
                "  \"verdict\": {\"kind\": \"%s\", \"limits_broken\": %zu, \"rules_broken\": %zu, "
                "\"breaks\": %zu, \"breaks_uncovered\": %zu, \"overloaded\": %zu, "
                "\"ward_short\": %d, \"text\": ",
                keel_verdict_kind_name(v->kind), v->limits_broken, v->rules_broken, v->breaks,
                v->breaks_uncovered, v->overloaded, v->ward_short);
        keel_report_out_quoted(out, v->text);
        fputs("},\n", out);
    }
    write_nurses(out, rep);
    write_patients(out, rep);
    write_staffing(out, rep);
    if (rep->course)
        write_course(out, rep);
    if (rep->nurse_of && rep->metrics->nunassigned == 0)
        write_imbalance(out, rep->metrics);
    if (rep->kind == KEEL_REPORT_ASSIGN && s && s->best_effort)
        write_findings(out, r, "violations", rep->violations);
    if (rep->kind == KEEL_REPORT_CHECK) {
        write_findings(out, r, "violations", rep->violations);
        if (s && s->status != KEEL_SOLVE_INFEASIBLE && s->nstages > 0 &&
            strcmp(s->stages[0].name, "peak") == 0)
            fprintf(out,
                    "  \"best_possible\": {\"status\": \"%s\", \"max_utilisation\": %.12g, "
                    "\"bound\": %.12g},\n",
                    keel_solve_status_name(s->stages[0].status), s->stages[0].value,
                    s->stages[0].bound);
    }
    if (s && s->status != KEEL_SOLVE_INFEASIBLE)
        write_stages(out, r, s);
    if (s)
        write_findings(out, r, "diagnosis", &s->diagnoses);
    if (keel_report_plan_uses_nas(r)) {
        fputs("  \"nas_note\": ", out);
        keel_report_out_quoted(out, keel_nas_note());
        fputs(",\n", out);
    }
    fputs("  \"caution\": ", out);
    keel_report_out_quoted(out, KEEL_CAUTION);
    fputs("\n}\n", out);
    return KEEL_OK;
}
