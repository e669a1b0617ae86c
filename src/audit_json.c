/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_json.c - the audit as one JSON object (docs/audit.md lists every
 * field): the caution and the note on what the figures mean, the
 * definitions' parameters, each shift, each nurse over the period, and the
 * groups by weekday and label.  Unknown figures are null.
 */
#include <stdio.h>

#include "audit_internal.h"
#include "keel/keel.h"
#include "report_internal.h"

/* A p-value or other figure that may be unknown (negative): null. */
static void maybe(FILE *out, double v)
{
    if (v < 0)
        fputs("null", out);
    else
        fprintf(out, "%.12g", v);
}

static void str_or_null(FILE *out, const char *s)
{
    if (s)
        keel_report_out_quoted(out, s);
    else
        fputs("null", out);
}

static void id_list(FILE *out, char *const *ids, size_t n)
{
    fputc('[', out);
    for (size_t i = 0; i < n; i++) {
        if (i)
            fputs(", ", out);
        keel_report_out_quoted(out, ids[i]);
    }
    fputc(']', out);
}

static void write_violation(FILE *out, const keel_audit_violation *v)
{
    fputs("{\"rule\": ", out);
    keel_report_out_quoted(out, v->rule);
    fputs(", \"patient\": ", out);
    str_or_null(out, v->npatients ? v->patients[0] : NULL);
    fputs(", \"nurse\": ", out);
    str_or_null(out, v->nnurses ? v->nurses[0] : NULL);
    fputs(", \"patients\": ", out);
    id_list(out, v->patients, v->npatients);
    fputs(", \"nurses\": ", out);
    id_list(out, v->nurses, v->nnurses);
    fputs(", \"intervals\": [", out);
    for (size_t i = 0; i < v->nintervals; i++)
        fprintf(out, "%s{\"from\": \"%s\", \"to\": \"%s\"}", i ? ", " : "", v->intervals[i].from,
                v->intervals[i].to);
    fputs("], \"message\": ", out);
    keel_report_out_quoted(out, v->message ? v->message : "");
    fputc('}', out);
}

static void write_shift(FILE *out, const keel_audit_shift *s)
{
    fputs("    {\"source\": ", out);
    keel_report_out_quoted(out, s->source ? s->source : "");
    fprintf(out, ", \"document\": %zu, \"date\": ", s->document);
    str_or_null(out, s->date);
    fputs(", \"label\": ", out);
    str_or_null(out, s->label);
    fputs(", \"weekday\": ", out);
    str_or_null(out, s->weekday >= 0 ? keel_audit_stats_weekday_name(s->weekday) : NULL);
    fprintf(out,
            ", \"patients\": %zu, \"unassigned\": %zu, \"counted_nurses\": %zu,\n"
            "     \"max_utilisation\": %.12g, \"min_utilisation\": %.12g, "
            "\"mean_utilisation\": %.12g, \"spread\": %.12g, \"peak_to_mean\": %.12g, "
            "\"cv\": %.12g, \"jain\": %.12g, \"gini\": %.12g,\n     \"best_status\": \"%s\", "
            "\"best_max_utilisation\": ",
            s->npatients, s->nunassigned, s->ncounted, s->max_utilisation, s->min_utilisation,
            s->mean_utilisation, s->spread, s->peak_to_mean, s->cv, s->jain, s->gini,
            s->best_status);
    maybe(out, s->best_known ? s->best_max_utilisation : -1);
    fputs(", \"best_bound\": ", out);
    maybe(out, s->best_known ? s->best_bound : -1);
    fputs(", \"excess\": ", out);
    if (s->best_known)
        fprintf(out, "%.12g", s->excess);
    else
        fputs("null", out);
    fprintf(out, ", \"continuity\": {\"kept\": %ld, \"candidates\": %ld}, \"table_note\": ",
            s->continuity_kept, s->continuity_candidates);
    str_or_null(out, s->table_note);
    fputs(",\n     \"nurses\": [", out);
    for (size_t n = 0; n < s->nnurses; n++) {
        const keel_audit_nurse *an = &s->nurses[n];
        fprintf(out, "%s{\"id\": ", n ? ", " : "");
        keel_report_out_quoted(out, an->id);
        fprintf(out,
                ", \"counted\": %s, \"patients\": %d, \"load_minutes\": %d, "
                "\"capacity_minutes\": %d, \"utilisation\": %.12g, \"high_acuity\": %d, "
                "\"isolation\": %d, \"zones\": %d, \"shares\": {",
                an->counted ? "true" : "false", an->npatients, an->load_minutes,
                an->capacity_minutes, an->utilisation, an->amount[KEEL_AUDIT_HIGH_ACUITY],
                an->amount[KEEL_AUDIT_ISOLATION], an->amount[KEEL_AUDIT_ZONES]);
        for (int m = 0; m < KEEL_AUDIT_MEASURES; m++)
            fprintf(out, "%s\"%s\": %.12g", m ? ", " : "",
                    keel_audit_measure_name((keel_audit_measure)m), an->share[m]);
        fputs("}}", out);
    }
    fputs("],\n     \"violations\": [", out);
    for (size_t v = 0; v < s->nviolations; v++) {
        fputs(v ? ",\n       " : "\n       ", out);
        write_violation(out, &s->violations[v]);
    }
    fputs("]}", out);
}

static void write_tally(FILE *out, const keel_audit_tally *t)
{
    fprintf(out, "{\"count\": %.12g, \"expected\": %.12g, \"shifts_at_stake\": %zu, \"p_value\": ",
            t->count, t->expected, t->at_stake);
    maybe(out, t->p_value);
    fputs(", \"p_adjusted\": ", out);
    maybe(out, t->p_adjusted);
    fprintf(out, ", \"stands_out\": %s}", t->stands_out ? "true" : "false");
}

static void write_person(FILE *out, const keel_audit *a, const keel_audit_person *p)
{
    const keel_audit_tally *h = &p->tally[KEEL_AUDIT_HEAVIEST];
    fputs("    {\"id\": ", out);
    keel_report_out_quoted(out, p->id);
    fprintf(out,
            ", \"shifts\": %zu, \"counted_shifts\": %zu, \"mean_utilisation\": %.12g, "
            "\"worst_utilisation\": %.12g, \"violations\": %zu,\n     \"heaviest\": %.12g, "
            "\"expected_heaviest\": %.12g, \"p_value\": ",
            p->shifts, p->counted_shifts, p->mean_utilisation, p->worst_utilisation, p->violations,
            h->count, h->expected);
    maybe(out, h->p_value);
    fputs(", \"p_adjusted\": ", out);
    maybe(out, h->p_adjusted);
    fprintf(out, ", \"stands_out\": %s,\n     \"measures\": {", h->stands_out ? "true" : "false");
    for (int m = 0; m < KEEL_AUDIT_MEASURES; m++) {
        fprintf(out, "%s\"%s\": ", m ? ", " : "", keel_audit_measure_name((keel_audit_measure)m));
        write_tally(out, &p->tally[m]);
    }
    fputs("},\n     \"by\": [", out);
    for (size_t g = 0, k = 0; g < a->ngroups; g++) {
        if (!p->by[g].shifts)
            continue;
        fprintf(out, "%s{\"by\": \"%s\", \"key\": ", k++ ? ", " : "", a->groups[g].by);
        keel_report_out_quoted(out, a->groups[g].key);
        fprintf(out, ", \"shifts\": %zu, \"heaviest\": %.12g, \"expected_heaviest\": %.12g}",
                p->by[g].shifts, p->by[g].heaviest, p->by[g].expected);
    }
    fputs("]}", out);
}

keel_status keel_audit_json(const keel_audit *a, FILE *out)
{
    fprintf(out, "{\n  \"keel_version\": \"%s\",\n  \"command\": \"audit\",\n  \"caution\": ",
            keel_version());
    keel_report_out_quoted(out, KEEL_CAUTION);
    fputs(",\n  \"note\": ", out);
    keel_report_out_quoted(out, KEEL_AUDIT_NOTE);
    fprintf(out,
            ",\n  \"definitions\": {\"min_shifts\": %zu, \"alpha\": %.12g, \"adjustment\": "
            "\"holm\", \"tail\": \"poisson_binomial_exact\"},\n  \"violations\": %zu,\n"
            "  \"shifts\": [\n",
            a->min_shifts, a->alpha, a->nviolations);
    for (size_t i = 0; i < a->nshifts; i++) {
        write_shift(out, &a->shifts[i]);
        fputs(i + 1 < a->nshifts ? ",\n" : "\n", out);
    }
    fputs("  ],\n  \"nurses\": [\n", out);
    for (size_t i = 0; i < a->npeople; i++) {
        write_person(out, a, &a->people[i]);
        fputs(i + 1 < a->npeople ? ",\n" : "\n", out);
    }
    fputs("  ],\n  \"groups\": [\n", out);
    for (size_t i = 0; i < a->ngroups; i++) {
        const keel_audit_group *g = &a->groups[i];
        fprintf(out, "    {\"by\": \"%s\", \"key\": ", g->by);
        keel_report_out_quoted(out, g->key);
        fprintf(out,
                ", \"shifts\": %zu, \"mean_max_utilisation\": %.12g, \"mean_spread\": %.12g, "
                "\"best_known\": %zu, \"mean_excess\": ",
                g->shifts, g->mean_max_utilisation, g->mean_spread, g->best_known);
        if (g->best_known)
            fprintf(out, "%.12g", g->mean_excess);
        else
            fputs("null", out);
        fprintf(out, ", \"violations\": %zu}%s\n", g->violations, i + 1 < a->ngroups ? "," : "");
    }
    fputs("  ]\n}\n", out);
    return KEEL_OK;
}
