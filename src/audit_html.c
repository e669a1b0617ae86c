/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_html.c - the audit as a document for a manager: one self-contained
 * HTML page.  The period and what the figures mean; a chart per nurse of
 * how often she carried the heaviest load against how often chance alone
 * would have given it to her (a tick), a nurse who stands out after Holm's
 * adjustment hatched and labelled; the shifts furthest from the best
 * balance possible; every rule broken; the figures by weekday and shift
 * label; the definitions and the caution.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "audit_internal.h"
#include "keel/keel.h"
#include "report_internal.h"

enum { WORST_SHIFTS = 10 };

static void shift_name(FILE *out, const keel_audit_shift *s)
{
    keel_report_out_html(out, s->date ? s->date : "(no date)");
    fputc(' ', out);
    keel_report_out_html(out, s->label ? s->label : "shift");
}

static void write_chart(FILE *out, const keel_audit *a)
{
    if (a->npeople == 0)
        return;
    keel_html_bar *bars = keel_calloc(a->npeople, sizeof *bars);
    if (!bars)
        return; /* the table below says the same */
    double top = 1;
    for (size_t i = 0; i < a->npeople; i++) {
        const keel_audit_person *p = &a->people[i];
        const keel_audit_tally *t = &p->tally[KEEL_AUDIT_HEAVIEST];
        bars[i] = (keel_html_bar){.label = p->id, .value = t->count, .mark = t->expected,
                                  .hatched = t->stands_out};
        if (t->stands_out)
            snprintf(bars[i].text, sizeof bars[i].text, "%.4g (chance %.3g) STANDS OUT, p %.2g",
                     t->count, t->expected, t->p_adjusted);
        else
            snprintf(bars[i].text, sizeof bars[i].text, "%.4g (chance %.3g)", t->count,
                     t->expected);
        if (t->count > top)
            top = t->count;
        if (t->expected > top)
            top = t->expected;
    }
    fputs("<h2>The heaviest load, per nurse, against chance</h2>\n"
          "<p>The bar: the shifts on which she carried the heaviest load (a tie of t nurses "
          "gives each 1/t); the tick: how many chance alone would give her. Hatched and "
          "labelled STANDS OUT: a count this high is unlikely by chance after Holm's "
          "adjustment across the nurses.</p>\n",
          out);
    keel_report_out_html_chart(out, "heaviest loads per nurse against chance", bars, a->npeople,
                               NULL, 0, top * 1.15);
    free(bars);
}

static void write_worst(FILE *out, const keel_audit *a)
{
    const keel_audit_shift **order = keel_calloc(a->nshifts ? a->nshifts : 1, sizeof *order);
    if (!order)
        return;
    for (size_t i = 0; i < a->nshifts; i++)
        order[i] = &a->shifts[i];
    qsort(order, a->nshifts, sizeof *order, keel_audit_text_by_excess);
    fputs("<h2>Shifts furthest from the best balance the rules allowed</h2>\n<table><tr>"
          "<th>Shift</th><th class=\"num\">Heaviest</th><th class=\"num\">Best possible</th>"
          "<th class=\"num\">Excess</th><th class=\"num\">Rules broken</th></tr>\n",
          out);
    for (size_t i = 0; i < a->nshifts && i < WORST_SHIFTS; i++) {
        const keel_audit_shift *s = order[i];
        fputs("<tr><td>", out);
        shift_name(out, s);
        fprintf(out, "</td><td class=\"num\">%.1f %%</td>", 100 * s->max_utilisation);
        if (s->best_known)
            fprintf(out, "<td class=\"num\">%.1f %%%s</td><td class=\"num\">%.1f pts</td>",
                    100 * s->best_max_utilisation,
                    strcmp(s->best_status, "optimal") == 0 ? "" : " (not proven)",
                    100 * s->excess);
        else
            fputs("<td class=\"num\">-</td><td class=\"num\">-</td>", out);
        fprintf(out, "<td class=\"num\">%zu</td></tr>\n", s->nviolations);
    }
    fputs("</table>\n", out);
    free(order);
}

static void write_breaks(FILE *out, const keel_audit *a)
{
    fprintf(out, "<h2>Rules broken: %zu</h2>\n", a->nviolations);
    if (a->nviolations == 0)
        return;
    fputs("<ul>\n", out);
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        for (size_t v = 0; v < s->nviolations; v++) {
            fputs("<li>", out);
            shift_name(out, s);
            fputs(" <b>", out);
            keel_report_out_html(out, s->violations[v].rule);
            fputs("</b>: ", out);
            keel_report_out_html(out, s->violations[v].message);
            fputs("</li>\n", out);
        }
    }
    fputs("</ul>\n", out);
}

static void write_people(FILE *out, const keel_audit *a)
{
    fputs("<h2>Each nurse over the period</h2>\n<table><tr><th>Nurse</th>"
          "<th class=\"num\">Shifts</th><th class=\"num\">Mean</th><th class=\"num\">Worst</th>"
          "<th class=\"num\">Heaviest</th><th class=\"num\">By chance</th>"
          "<th class=\"num\">p</th><th class=\"num\">Adjusted</th></tr>\n",
          out);
    for (size_t i = 0; i < a->npeople; i++) {
        const keel_audit_person *p = &a->people[i];
        const keel_audit_tally *t = &p->tally[KEEL_AUDIT_HEAVIEST];
        fputs("<tr><td>", out);
        keel_report_out_html(out, p->id);
        fprintf(out,
                "</td><td class=\"num\">%zu</td><td class=\"num\">%.0f %%</td>"
                "<td class=\"num\">%.0f %%</td><td class=\"num\">%.4g</td>"
                "<td class=\"num\">%.4g</td>",
                p->shifts, 100 * p->mean_utilisation, 100 * p->worst_utilisation, t->count,
                t->expected);
        if (t->p_value >= 0)
            fprintf(out, "<td class=\"num\">%.3g</td>", t->p_value);
        else
            fprintf(out, "<td class=\"num\">%s</td>", t->at_stake ? "tie" : "-");
        if (t->p_adjusted >= 0)
            fprintf(out, "<td class=\"num\">%.3g%s</td></tr>\n", t->p_adjusted,
                    t->stands_out ? " STANDS OUT" : "");
        else
            fprintf(out, "<td class=\"num\">%s</td></tr>\n", t->p_value >= 0 ? "too few" : "-");
    }
    fputs("</table>\n", out);
}

static void write_groups(FILE *out, const keel_audit *a)
{
    if (!a->ngroups)
        return;
    fputs("<h2>By weekday and shift label</h2>\n<table><tr><th>Group</th>"
          "<th class=\"num\">Shifts</th><th class=\"num\">Mean heaviest</th>"
          "<th class=\"num\">Mean spread</th><th class=\"num\">Mean excess</th>"
          "<th class=\"num\">Rules broken</th></tr>\n",
          out);
    for (size_t i = 0; i < a->ngroups; i++) {
        const keel_audit_group *g = &a->groups[i];
        fputs("<tr><td>", out);
        keel_report_out_html(out, g->by);
        fputc(' ', out);
        keel_report_out_html(out, g->key);
        fprintf(out,
                "</td><td class=\"num\">%zu</td><td class=\"num\">%.1f %%</td>"
                "<td class=\"num\">%.1f pts</td>",
                g->shifts, 100 * g->mean_max_utilisation, 100 * g->mean_spread);
        if (g->best_known)
            fprintf(out, "<td class=\"num\">%.1f pts</td>", 100 * g->mean_excess);
        else
            fputs("<td class=\"num\">-</td>", out);
        fprintf(out, "<td class=\"num\">%zu</td></tr>\n", g->violations);
    }
    fputs("</table>\n", out);
}

keel_status keel_audit_html(const keel_audit *a, FILE *out)
{
    keel_report_out_html_head(out, "Audit of past shifts");
    fprintf(out, "<h1>Audit of past shifts</h1>\n<p class=\"sub\">%zu shift%s, %zu nurse%s, "
                 "%zu rule%s broken.</p>\n<p class=\"verdict\">",
            a->nshifts, a->nshifts == 1 ? "" : "s", a->npeople, a->npeople == 1 ? "" : "s",
            a->nviolations, a->nviolations == 1 ? "" : "s");
    keel_report_out_html(out, KEEL_AUDIT_NOTE);
    fputs("</p>\n", out);
    write_chart(out, a);
    write_worst(out, a);
    write_breaks(out, a);
    write_people(out, a);
    write_groups(out, a);
    fprintf(out,
            "<p>p is the exact chance of a count at least that high (only without ties); "
            "'too few' means under the minimum of %zu shifts at stake; adjusted by Holm's "
            "method at %.2f. Definitions: docs/audit.md.</p>\n",
            a->min_shifts, a->alpha);
    keel_report_out_html_foot(out, NULL);
    return KEEL_OK;
}
