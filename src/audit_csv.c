/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_csv.c - the audit as CSV tables (RFC 4180: records end in CRLF; a
 * field holding a comma, a double quote or a line break is quoted, its
 * quotes doubled): one row per shift, per nurse and shift, per nurse and
 * measure, per nurse and group, per broken rule.  Unknown figures are empty fields.  A table has
 * no place for the caution; the command says it on standard error.
 */
#include <stdio.h>
#include <string.h>

#include "audit_internal.h"
#include "report_internal.h"

static void field(FILE *out, const char *s, bool last)
{
    keel_report_out_csv(out, s, last);
}

static void number(FILE *out, double v, bool known)
{
    if (known)
        fprintf(out, "%.12g", v);
    fputc(',', out);
}

static void shift_key(FILE *out, const keel_audit_shift *s)
{
    field(out, s->source, false);
    fprintf(out, "%zu,", s->document);
    field(out, s->date, false);
    field(out, s->label, false);
}

keel_status keel_audit_csv_shifts(const keel_audit *a, FILE *out)
{
    fputs("source,document,date,label,weekday,patients,unassigned,counted_nurses,"
          "max_utilisation,min_utilisation,mean_utilisation,spread,peak_to_mean,cv,jain,gini,"
          "best_status,best_max_utilisation,best_bound,excess,continuity_kept,"
          "continuity_candidates,violations,rules,table_note\r\n",
          out);
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        shift_key(out, s);
        field(out, s->weekday >= 0 ? keel_audit_stats_weekday_name(s->weekday) : NULL, false);
        fprintf(out, "%zu,%zu,%zu,", s->npatients, s->nunassigned, s->ncounted);
        const double figures[] = {s->max_utilisation,
                                  s->min_utilisation,
                                  s->mean_utilisation,
                                  s->spread,
                                  s->peak_to_mean,
                                  s->cv,
                                  s->jain,
                                  s->gini};
        for (size_t k = 0; k < sizeof figures / sizeof figures[0]; k++)
            number(out, figures[k], true);
        field(out, s->best_status, false);
        number(out, s->best_max_utilisation, s->best_known);
        number(out, s->best_bound, s->best_known);
        number(out, s->excess, s->best_known);
        fprintf(out, "%ld,%ld,%zu,", s->continuity_kept, s->continuity_candidates, s->nviolations);
        /* The rules broken, each once, in the order first broken. */
        char rules[512] = "";
        for (size_t v = 0; v < s->nviolations; v++) {
            const char *r = s->violations[v].rule;
            bool seen = false;
            for (size_t u = 0; u < v; u++)
                seen = seen || strcmp(s->violations[u].rule, r) == 0;
            if (!seen && strlen(rules) + strlen(r) + 2 < sizeof rules) {
                if (*rules)
                    strcat(rules, ";");
                strcat(rules, r);
            }
        }
        field(out, rules, false);
        field(out, s->table_note, true);
    }
    return KEEL_OK;
}

keel_status keel_audit_csv_nurse_shifts(const keel_audit *a, FILE *out)
{
    fputs("source,document,date,label,nurse,counted,patients,load_minutes,capacity_minutes,"
          "utilisation,high_acuity,isolation,zones,heaviest_share,high_acuity_share,"
          "isolation_share,zones_share\r\n",
          out);
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        for (size_t n = 0; n < s->nnurses; n++) {
            const keel_audit_nurse *an = &s->nurses[n];
            shift_key(out, s);
            field(out, an->id, false);
            fprintf(out, "%s,%d,%d,%d,%.12g,%d,%d,%d", an->counted ? "true" : "false",
                    an->npatients, an->load_minutes, an->capacity_minutes, an->utilisation,
                    an->amount[KEEL_AUDIT_HIGH_ACUITY], an->amount[KEEL_AUDIT_ISOLATION],
                    an->amount[KEEL_AUDIT_ZONES]);
            for (int m = 0; m < KEEL_AUDIT_MEASURES; m++)
                fprintf(out, ",%.12g", an->share[m]);
            fputs("\r\n", out);
        }
    }
    return KEEL_OK;
}

keel_status keel_audit_csv_nurses(const keel_audit *a, FILE *out)
{
    fputs("nurse,measure,shifts,counted_shifts,mean_utilisation,worst_utilisation,violations,"
          "shifts_at_stake,count,expected,p_value,p_adjusted,stands_out\r\n",
          out);
    for (size_t i = 0; i < a->npeople; i++) {
        const keel_audit_person *p = &a->people[i];
        for (int m = 0; m < KEEL_AUDIT_MEASURES; m++) {
            const keel_audit_tally *t = &p->tally[m];
            field(out, p->id, false);
            field(out, keel_audit_measure_name((keel_audit_measure)m), false);
            fprintf(out, "%zu,%zu,", p->shifts, p->counted_shifts);
            number(out, p->mean_utilisation, true);
            number(out, p->worst_utilisation, true);
            fprintf(out, "%zu,%zu,", p->violations, t->at_stake);
            number(out, t->count, true);
            number(out, t->expected, true);
            number(out, t->p_value, t->p_value >= 0);
            number(out, t->p_adjusted, t->p_adjusted >= 0);
            fprintf(out, "%s\r\n", t->stands_out ? "true" : "false");
        }
    }
    return KEEL_OK;
}

keel_status keel_audit_csv_nurse_groups(const keel_audit *a, FILE *out)
{
    fputs("nurse,by,key,shifts,heaviest,expected_heaviest\r\n", out);
    for (size_t i = 0; i < a->npeople; i++)
        for (size_t g = 0; g < a->ngroups; g++) {
            const keel_audit_share *sh = &a->people[i].by[g];
            if (!sh->shifts)
                continue;
            field(out, a->people[i].id, false);
            field(out, a->groups[g].by, false);
            field(out, a->groups[g].key, false);
            fprintf(out, "%zu,%.12g,%.12g\r\n", sh->shifts, sh->heaviest, sh->expected);
        }
    return KEEL_OK;
}

keel_status keel_audit_csv_violations(const keel_audit *a, FILE *out)
{
    fputs("source,document,date,label,rule,patients,nurses,from,to,message\r\n", out);
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        for (size_t k = 0; k < s->nviolations; k++) {
            const keel_audit_violation *v = &s->violations[k];
            char ids[2][1024];
            for (int w = 0; w < 2; w++) {
                char *const *list = w ? v->nurses : v->patients;
                size_t n = w ? v->nnurses : v->npatients;
                ids[w][0] = '\0';
                for (size_t j = 0; j < n; j++)
                    if (strlen(ids[w]) + strlen(list[j]) + 2 < sizeof ids[w]) {
                        if (j)
                            strcat(ids[w], ";");
                        strcat(ids[w], list[j]);
                    }
            }
            shift_key(out, s);
            field(out, v->rule, false);
            field(out, ids[0], false);
            field(out, ids[1], false);
            field(out, v->nintervals ? v->intervals[0].from : NULL, false);
            field(out, v->nintervals ? v->intervals[0].to : NULL, false);
            field(out, v->message, true);
        }
    }
    return KEEL_OK;
}
