/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_text.c - the audit as a manager reads it first: the period in one
 * line, what the figures mean, the shifts furthest from the best possible,
 * the nurses who stand out, the rules broken, then each nurse's figures and
 * the groups by weekday and label, and the caution.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "audit_internal.h"
#include "keel/keel.h"
#include "report_internal.h"

enum {
    WIDTH = 78,
    WORST_SHIFTS = 5,   /* shifts listed as furthest from the best possible */
    LISTED_BREAKS = 20, /* broken rules listed one by one */
};

static void shift_name(FILE *out, const keel_audit_shift *s)
{
    fprintf(out, "%s %s (%s", s->date ? s->date : "(no date)", s->label ? s->label : "shift",
            s->source ? s->source : "");
    if (s->document > 1)
        fprintf(out, ", document %zu", s->document);
    fputc(')', out);
}

int keel_audit_text_by_excess(const void *x, const void *y)
{
    const keel_audit_shift *a = *(const keel_audit_shift *const *)x;
    const keel_audit_shift *b = *(const keel_audit_shift *const *)y;
    if (a->best_known != b->best_known)
        return a->best_known ? -1 : 1;
    double ea = a->best_known ? a->excess : a->max_utilisation;
    double eb = b->best_known ? b->excess : b->max_utilisation;
    if (ea != eb)
        return ea > eb ? -1 : 1;
    return a->index < b->index ? -1 : a->index > b->index;
}

/* order: room for a->nshifts pointers. */
static void write_worst(FILE *out, const keel_audit *a, const keel_audit_shift **order)
{
    for (size_t i = 0; i < a->nshifts; i++)
        order[i] = &a->shifts[i];
    qsort(order, a->nshifts, sizeof *order, keel_audit_text_by_excess);
    fputs("\nShifts furthest from the best balance the rules allowed:\n", out);
    size_t shown = 0;
    for (size_t i = 0; i < a->nshifts && shown < WORST_SHIFTS; i++, shown++) {
        const keel_audit_shift *s = order[i];
        fputs("  ", out);
        shift_name(out, s);
        fprintf(out, ": heaviest %.1f %%", 100 * s->max_utilisation);
        if (s->best_known)
            fprintf(out, ", best possible %.1f %%%s, excess %.1f points",
                    100 * s->best_max_utilisation,
                    strcmp(s->best_status, "optimal") == 0 ? "" : " (not proven)", 100 * s->excess);
        else
            fprintf(out, ", best possible %s",
                    strcmp(s->best_status, "skipped") == 0 ? "not sought"
                                                           : "unknown (no valid plan)");
        fprintf(out, "; %zu rule%s broken\n", s->nviolations, s->nviolations == 1 ? "" : "s");
    }
}

static void write_standouts(FILE *out, const keel_audit *a)
{
    fprintf(out,
            "\nNurses who stand out (Holm-adjusted p at or under %.2f, at least %zu shifts at "
            "stake):\n",
            a->alpha, a->min_shifts);
    size_t any = 0;
    for (size_t i = 0; i < a->npeople; i++)
        for (int m = 0; m < KEEL_AUDIT_MEASURES; m++) {
            const keel_audit_tally *t = &a->people[i].tally[m];
            if (!t->stands_out)
                continue;
            any++;
            fprintf(out,
                    "  %s: %s on %.0f of %zu shifts, %.1f by chance; p = %.3g, adjusted "
                    "%.3g\n",
                    a->people[i].id,
                    m == KEEL_AUDIT_HEAVIEST      ? "the heaviest load"
                    : m == KEEL_AUDIT_HIGH_ACUITY ? "the most high-acuity patients"
                    : m == KEEL_AUDIT_ISOLATION   ? "the most isolation patients"
                                                  : "the most zones",
                    t->count, t->at_stake, t->expected, t->p_value, t->p_adjusted);
        }
    if (!any)
        fputs("  none\n", out);
}

static void write_breaks(FILE *out, const keel_audit *a)
{
    fprintf(out, "\nRules broken: %zu\n", a->nviolations);
    size_t listed = 0;
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        for (size_t v = 0; v < s->nviolations; v++) {
            if (listed++ == LISTED_BREAKS)
                continue;
            fputs("  ", out);
            shift_name(out, s);
            fprintf(out, " [%s]\n", s->violations[v].rule);
            keel_report_out_wrapped(out, "      ", s->violations[v].message, WIDTH);
        }
    }
    if (listed > LISTED_BREAKS)
        fprintf(out, "  and %zu more (every one is in --format json and csv-violations)\n",
                listed - LISTED_BREAKS);
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        if (!s->nunassigned)
            continue;
        fputs("  ", out);
        shift_name(out, s);
        fprintf(out,
                ": %zu patient%s without a nurse in the file; the figures count only the "
                "patients with one\n",
                s->nunassigned, s->nunassigned == 1 ? "" : "s");
    }
    /* The ratio table's date, once: the note of the first shift it concerns. */
    size_t noted = 0;
    const keel_audit_shift *first = NULL;
    for (size_t i = 0; i < a->nshifts; i++)
        if (a->shifts[i].table_note && !noted++)
            first = &a->shifts[i];
    if (first) {
        fprintf(out, "\nOn %zu shift%s, ", noted, noted == 1 ? "" : "s");
        fputs(noted == 1 ? "" : "as on the first, ", out);
        shift_name(out, first);
        fputs(":\n", out);
        keel_report_out_wrapped(out, "  ", first->table_note, WIDTH);
    }
}

static void write_people(FILE *out, const keel_audit *a)
{
    fputs("\nEach nurse over the period (utilisation over the shifts she took patients):\n"
          "  nurse        shifts   mean  worst  heaviest  by chance        p   adjusted\n",
          out);
    for (size_t i = 0; i < a->npeople; i++) {
        const keel_audit_person *p = &a->people[i];
        const keel_audit_tally *t = &p->tally[KEEL_AUDIT_HEAVIEST];
        fprintf(out, "  %-12s %6zu %5.0f%% %5.0f%% %9.4g %10.4g ", p->id, p->shifts,
                100 * p->mean_utilisation, 100 * p->worst_utilisation, t->count, t->expected);
        if (t->p_value >= 0)
            fprintf(out, "%8.3g", t->p_value);
        else
            fputs(t->at_stake ? "     tie" : "       -", out);
        if (t->p_adjusted >= 0)
            fprintf(out, " %10.3g\n", t->p_adjusted);
        else
            fputs(t->p_value >= 0 ? "   too few\n" : "          -\n", out);
    }
}

static void write_groups(FILE *out, const keel_audit *a)
{
    if (!a->ngroups)
        return;
    fputs("\nBy weekday and shift label:\n"
          "  group            shifts  mean heaviest  mean spread  mean excess  rules broken\n",
          out);
    for (size_t i = 0; i < a->ngroups; i++) {
        const keel_audit_group *g = &a->groups[i];
        fprintf(out, "  %-7s %-8s %6zu %13.1f%% %11.1f%% ", g->by, g->key, g->shifts,
                100 * g->mean_max_utilisation, 100 * g->mean_spread);
        if (g->best_known)
            fprintf(out, "%8.1f pts", 100 * g->mean_excess);
        else
            fputs("           -", out);
        fprintf(out, " %13zu\n", g->violations);
    }
}

keel_status keel_audit_text(const keel_audit *a, FILE *out)
{
    const keel_audit_shift **order = keel_calloc(a->nshifts ? a->nshifts : 1, sizeof *order);
    if (!order) /* say nothing rather than half a report */
        return KEEL_ERR_NOMEM;
    const char *first = NULL, *last = NULL;
    for (size_t i = 0; i < a->nshifts; i++) {
        const char *d = a->shifts[i].date;
        if (d && (!first || strcmp(d, first) < 0))
            first = d;
        if (d && (!last || strcmp(d, last) > 0))
            last = d;
    }
    fprintf(out, "keel audit: %zu shift%s", a->nshifts, a->nshifts == 1 ? "" : "s");
    if (first && strcmp(first, last) == 0)
        fprintf(out, " on %s", first);
    else if (first)
        fprintf(out, " from %s to %s", first, last);
    fprintf(out, ", %zu nurse%s, %zu rule%s broken\n\n", a->npeople, a->npeople == 1 ? "" : "s",
            a->nviolations, a->nviolations == 1 ? "" : "s");
    keel_report_out_wrapped(out, "", KEEL_AUDIT_NOTE, WIDTH);
    write_worst(out, a, order);
    free(order);
    write_standouts(out, a);
    write_breaks(out, a);
    write_people(out, a);
    write_groups(out, a);
    fputs("\nThe heaviest load of a shift goes to the nurse(s) with the highest utilisation (a\n"
          "tie of t nurses gives each 1/t); by chance each counted nurse would get it on\n"
          "1/(counted nurses) of her shifts. p is the exact chance of a count at least that\n"
          "high (only without ties); 'too few' means under the minimum of shifts at stake.\n"
          "Definitions: docs/audit.md.\n\n",
          out);
    fprintf(out, "%s\n", KEEL_CAUTION);
    return KEEL_OK;
}
