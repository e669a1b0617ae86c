/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_html.c - the sheet to post: one self-contained HTML file (no
 * external assets, no script) with a print stylesheet that fits a unit's
 * assignment on one landscape page.  At the top the figures a charge nurse
 * uses: the verdict, a chart of utilisation per nurse (text labels, the
 * 100 % line and the proven bound; overload hatched and labelled, never
 * colour alone), then per nurse her patients by bed with acuity, care
 * minutes, needs, isolation, extras and hand-off times; the break cover and
 * the next-admission order; the caution and the table's citation in the
 * footer.  The imbalance indices and the stages follow in a section the
 * print stylesheet leaves out.  Patients appear by id, bed and room; names
 * only when the report asks for them (a private sheet, --names).
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "keel/keel.h"
#include "keel/law.h"
#include "report_internal.h"
#include "workload_internal.h"

static void write_head(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    char title[256];
    snprintf(title, sizeof title, "%s: %s", rep->kind == KEEL_REPORT_ASSIGN ? "Assignment" : "Check",
             r->unit.name ? r->unit.name : "unit");
    keel_report_out_html_head(out, title);
}

static void write_heading(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    fputs("<header>\n<h1>", out);
    keel_report_out_html(out, r->unit.name ? r->unit.name : "Unit");
    fputs("</h1>\n<p class=\"sub\">", out);
    fputs(rep->kind == KEEL_REPORT_ASSIGN ? "Assignment" : "Plan check", out);
    if (r->shift.label) {
        fputs(", ", out);
        keel_report_out_html(out, r->shift.label);
        fputs(" shift", out);
    }
    if (r->shift.date) {
        fputc(' ', out);
        keel_report_out_html(out, r->shift.date);
    }
    if (r->shift.start_minute != KEEL_ABSENT)
        fprintf(out, " from %02d:%02d", r->shift.start_minute / 60, r->shift.start_minute % 60);
    fprintf(out, " (%d min). %zu patient%s, %zu nurse%s.</p>\n", r->shift.minutes, r->npatients,
            r->npatients == 1 ? "" : "s", r->nnurses, r->nnurses == 1 ? "" : "s");
    for (size_t n = 0; n < r->nnurses; n++)
        if (r->nurses[n].role == KEEL_ROLE_CHARGE) {
            fputs("<p class=\"sub\">Charge nurse: ", out);
            keel_report_out_html(out, r->nurses[n].id);
            if (r->nurses[n].name) {
                fputc(' ', out);
                keel_report_out_html(out, r->nurses[n].name);
            }
            fputs("</p>\n", out);
        }
    fputs("</header>\n", out);
}

/* The status of the solve in a sentence a nurse acts on. */
static void write_status(FILE *out, const keel_report *rep)
{
    const keel_solution *s = rep->solution;
    if (rep->kind != KEEL_REPORT_ASSIGN || !s)
        return;
    if (s->best_effort)
        fputs("<p class=\"banner\">BEST-EFFORT PLAN, not an assignment: no valid assignment "
              "exists and this plan breaks the rules listed below. Tell the house supervisor "
              "before using any of it.</p>\n",
              out);
    else if (s->status == KEEL_SOLVE_INFEASIBLE)
        fputs("<p class=\"banner\">No valid assignment exists for this roster.</p>\n", out);
    else if (s->status == KEEL_SOLVE_OPTIMAL)
        fputs("<p>Balance: proven best possible under the unit's rules.</p>\n", out);
    else
        fputs("<p>Balance: this plan keeps every rule; it is not proven the most even "
              "(details below).</p>\n",
              out);
}

static void write_verdict(FILE *out, const keel_report *rep)
{
    if (!rep->verdict || !rep->verdict->text)
        return;
    fputs("<p class=\"verdict\">", out);
    keel_report_out_html(out, rep->verdict->text);
    fputs("</p>\n", out);
}

/* The chart: a bar per nurse who takes patients, its utilisation written
 * beside it; the 100 % line and, when the solve proved one, the bound on
 * the heaviest ("no plan below", or for a plan checked, the best possible
 * heaviest).  Overload: a hatched bar and the word OVER. */
static void write_chart(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_metrics *m = rep->metrics;
    if (!rep->nurse_of || m->ncounted == 0)
        return;
    keel_html_bar *bars = keel_calloc(m->nnurses, sizeof *bars);
    if (!bars)
        return; /* the sheet without its chart; the tables below say the same */
    size_t k = 0;
    double top = 1.2;
    for (size_t n = 0; n < m->nnurses; n++) {
        const keel_nurse_metrics *nm = &m->nurses[n];
        if (!nm->counted)
            continue;
        bool over = nm->load_minutes > nm->capacity_minutes;
        bars[k] = (keel_html_bar){.label = r->nurses[n].id, .value = nm->utilisation,
                                  .mark = -1, .hatched = over};
        snprintf(bars[k].text, sizeof bars[k].text, "%.1f %%%s", 100.0 * nm->utilisation,
                 over ? " OVER" : "");
        if (nm->utilisation + 0.1 > top)
            top = nm->utilisation + 0.1;
        k++;
    }
    keel_html_line lines[2] = {{.at = 1.0, .label = "100 %"}};
    size_t nlines = 1;
    const keel_solution *s = rep->solution;
    if (s && s->status != KEEL_SOLVE_INFEASIBLE && s->nstages > 0 &&
        strcmp(s->stages[0].name, "peak") == 0) {
        lines[1] = (keel_html_line){.at = s->stages[0].bound, .dotted = true};
        snprintf(lines[1].label, sizeof lines[1].label, "%s %.1f %%",
                 rep->kind == KEEL_REPORT_CHECK ? "best possible heaviest" : "no plan below",
                 100.0 * s->stages[0].bound);
        nlines = 2;
    }
    keel_report_out_html_chart(out, "utilisation per nurse", bars, k, lines, nlines, top);
    free(bars);
}

static void time_of(const keel_report *rep, int minutes, char *buf)
{
    keel_roster_clock_text(rep->roster, minutes, buf);
}

/* The times of patient p's stay and its hand-offs, as seen by nurse n. */
static void write_times(FILE *out, const keel_report *rep, size_t p, size_t n)
{
    const keel_roster *r = rep->roster;
    const keel_patient *pat = &r->patients[p];
    char at[KEEL_TIME_SIZE];
    if (pat->arrives_at != KEEL_ABSENT) {
        time_of(rep, pat->arrives_at, at);
        fprintf(out, "%s %s ", pat->expected ? "expected" : "arrives", at);
    }
    if (pat->leaves_at != KEEL_ABSENT) {
        time_of(rep, pat->leaves_at, at);
        fprintf(out, "leaves %s ", at);
    }
    int q = rep->workload->first_part[p], when, from, to;
    while (keel_report_plan_next_handoff(rep, p, &q, &when, &from, &to)) {
        time_of(rep, when, at);
        if (from == (int)n) {
            fputs("to ", out);
            keel_report_out_html(out, to >= 0 ? r->nurses[to].id : "nobody");
            fprintf(out, " at %s ", at);
        } else if (to == (int)n) {
            fputs("from ", out);
            keel_report_out_html(out, r->nurses[from].id);
            fprintf(out, " at %s ", at);
        }
    }
}

/* Writes item after a ", " unless it is the first of its cell. */
static void item(FILE *out, bool *first, const char *text)
{
    fputs(*first ? "" : ", ", out);
    keel_report_out_html(out, text);
    *first = false;
}

/* Which optional columns the sheet needs. */
typedef struct columns {
    bool room;  /* some patient has a room */
    bool times; /* the roster has the clock */
} columns;

static void write_patient_row(FILE *out, const keel_report *rep, const columns *cols, size_t p,
                              size_t n)
{
    const keel_patient *pat = &rep->roster->patients[p];
    fputs("<tr><td>", out);
    keel_report_out_html(out, pat->bed ? pat->bed : "-");
    fputs("</td><td>", out);
    keel_report_out_html(out, pat->id);
    if (rep->names && pat->name) {
        fputs(" ", out);
        keel_report_out_html(out, pat->name);
    }
    if (cols->room) {
        fputs("</td><td>", out);
        keel_report_out_html(out, pat->room ? pat->room : "");
    }
    fputs("</td><td class=\"num\">", out);
    if (pat->acuity != KEEL_ABSENT)
        fprintf(out, "%d", pat->acuity);
    fprintf(out, "</td><td class=\"num\">%ld</td><td>", keel_report_plan_care_held(rep, p, n));
    bool first = true;
    char text[64];
    for (size_t i = 0; i < pat->nneeds; i++)
        item(out, &first, pat->needs[i]);
    if (pat->isolation != KEEL_ISOLATION_NONE) {
        snprintf(text, sizeof text, "%s isolation", keel_isolation_name(pat->isolation));
        item(out, &first, text);
    }
    if (pat->ratio != KEEL_ABSENT) {
        snprintf(text, sizeof text, "1:%d", pat->ratio);
        item(out, &first, text);
    }
    for (size_t i = 0; i < pat->nextras; i++)
        item(out, &first, pat->extras[i]);
    if (pat->sitter)
        item(out, &first, "sitter");
    if (pat->lock)
        item(out, &first, "locked");
    if (cols->times) {
        fputs("</td><td>", out);
        write_times(out, rep, p, n);
    }
    fputs("</td></tr>\n", out);
}

static void write_nurses(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_metrics *m = rep->metrics;
    columns cols = {.times = r->clock};
    for (size_t p = 0; p < r->npatients; p++)
        cols.room = cols.room || r->patients[p].room;
    fputs("<h2>Patients by nurse</h2>\n<div class=\"nurses\">\n", out);
    for (size_t n = 0; n < r->nnurses; n++) {
        const keel_nurse_metrics *nm = &m->nurses[n];
        const keel_nurse *nu = &r->nurses[n];
        fputs("<section class=\"nurse\"><h3>", out);
        keel_report_out_html(out, nu->id);
        if (nu->name) {
            fputc(' ', out);
            keel_report_out_html(out, nu->name);
        }
        if (nu->role != KEEL_ROLE_STAFF)
            fprintf(out, " (%s)", keel_role_name(nu->role));
        if (nu->role == KEEL_ROLE_ORIENTEE) {
            fputs(" <span>orientee: shares ", out);
            keel_report_out_html(out, nu->preceptor);
            fputs("'s assignment</span></h3></section>\n", out);
            continue;
        }
        if (!nm->counted) {
            fputs(" <span>takes no patients</span></h3></section>\n", out);
            continue;
        }
        fprintf(out, " <span>&mdash; %d patient%s, %d of %d min, %.1f %%</span>", nm->npatients,
                nm->npatients == 1 ? "" : "s", nm->load_minutes, nm->capacity_minutes,
                100.0 * nm->utilisation);
        if (nm->load_minutes > nm->capacity_minutes)
            fprintf(out, " <span class=\"over\">OVER HER TIME by %d min</span>",
                    nm->load_minutes - nm->capacity_minutes);
        fprintf(out,
                "</h3>\n<table><tr><th>Bed</th><th>Patient</th>%s<th class=\"num\">Acuity</th>"
                "<th class=\"num\">Min</th><th>Needs</th>%s</tr>\n",
                cols.room ? "<th>Room</th>" : "", cols.times ? "<th>Times</th>" : "");
        for (size_t p = 0; p < r->npatients; p++)
            if (keel_report_plan_holds(rep, p, n))
                write_patient_row(out, rep, &cols, p, n);
        fputs("</table></section>\n", out);
    }
    fputs("</div>\n", out);
}

static void write_breaks(FILE *out, const keel_report *rep)
{
    const keel_course *c = rep->course;
    const keel_roster *r = rep->roster;
    if (!c || c->nbreaks == 0)
        return;
    fputs("<h2>Break cover, in time order</h2>\n<ul class=\"cols\">\n", out);
    for (size_t next = c->nbreaks; keel_report_plan_next_break(c, &next);) {
        const keel_break_cover *b = &c->breaks[next];
        char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
        time_of(rep, b->at, from);
        time_of(rep, b->at + b->minutes, to);
        fprintf(out, "<li>%s-%s ", from, to);
        keel_report_out_html(out, r->nurses[b->nurse].id);
        fputs(": ", out);
        if (b->npatients == 0) {
            fputs("nothing to hand over", out);
        } else if (b->cover < 0) {
            fputs("<b>nobody covers</b>", out);
        } else {
            keel_report_out_html(out, r->nurses[b->cover].id);
            fprintf(out, " (%s), %d of %d", b->relief ? "relief" : "buddy", b->most, b->limit);
        }
        if (b->rule)
            fprintf(out, " <b>FLAG %s</b>", b->rule);
        fputs("</li>\n", out);
    }
    fputs("</ul>\n", out);
}

static void write_admissions(FILE *out, const keel_report *rep)
{
    const keel_course *c = rep->course;
    const keel_roster *r = rep->roster;
    if (!c)
        return;
    fprintf(out, "<p><b>Next unplanned admissions</b> (a typical admission: %d min): ",
            c->admission_minutes);
    if (c->npicks == 0)
        fputs("nobody can take one; every nurse who takes patients is at a limit.", out);
    for (size_t i = 0; i < c->npicks; i++) {
        static const char *const nth[] = {"1st", "2nd", "3rd"};
        fprintf(out, "%s%s ", i ? "; " : "", i < 3 ? nth[i] : "next");
        keel_report_out_html(out, r->nurses[c->picks[i].nurse].id);
        fprintf(out, " (%.1f %%%s)", 100.0 * c->picks[i].utilisation,
                c->picks[i].over ? ", <span class=\"over\">OVER HER TIME</span>" : "");
    }
    fputs("</p>\n", out);
}

static void write_findings(FILE *out, const char *title, const keel_findings *f)
{
    if (!f || f->n == 0)
        return;
    fputs("<h2>", out);
    keel_report_out_html(out, title);
    fputs("</h2>\n<ul>\n", out);
    for (size_t i = 0; i < f->n; i++) {
        fputs("<li><b>", out);
        keel_report_out_html(out, f->items[i].rule);
        fputs("</b>: ", out);
        keel_report_out_html(out, f->items[i].message);
        fputs("</li>\n", out);
    }
    fputs("</ul>\n", out);
}

/* What the sheet leaves to those who want it: the indices and the stages. */
static void write_details(FILE *out, const keel_report *rep)
{
    const keel_metrics *m = rep->metrics;
    const keel_solution *s = rep->solution;
    fputs("<section class=\"details\">\n<h2>Details (not printed)</h2>\n", out);
    if (rep->nurse_of)
        fprintf(out,
                "<p>Over the %zu nurse%s who take patients: heaviest %.1f %%, lightest %.1f %%, "
                "spread %.1f points; peak-to-mean %.3f, coefficient of variation %.3f, "
                "Jain's index %.3f, Gini %.3f.</p>\n",
                m->ncounted, m->ncounted == 1 ? "" : "s", 100.0 * m->max_utilisation,
                100.0 * m->min_utilisation, 100.0 * m->spread, m->peak_to_mean, m->cv, m->jain,
                m->gini);
    if (s && s->status != KEEL_SOLVE_INFEASIBLE) {
        fputs("<table><tr><th>Stage</th><th>Status</th><th>Value</th><th>Bound</th>"
              "<th>Gap</th></tr>\n",
              out);
        for (size_t i = 0; i < s->nstages; i++)
            fprintf(out,
                    "<tr><td>%s</td><td>%s</td><td class=\"num\">%.4f</td>"
                    "<td class=\"num\">%.4f</td><td class=\"num\">%.2f %%</td></tr>\n",
                    s->stages[i].name, keel_solve_status_name(s->stages[i].status),
                    s->stages[i].value, s->stages[i].bound, 100.0 * s->stages[i].gap);
        fputs("</table>\n", out);
        for (size_t k = 0; k < s->nranks; k++) {
            const keel_rank *rk = &s->ranks[k];
            fputs("<p>", out);
            if (rk->pinned) {
                keel_report_out_html(out, rep->roster->nurses[rk->nurse].id);
                fprintf(out, " is pinned at %.1f %%: %s.</p>\n", 100.0 * rk->utilisation,
                        keel_report_plan_pinned_why(s, rk));
            } else {
                fprintf(out,
                        "The heaviest of the others in the most even plan: %.1f %% (%s).</p>\n",
                        100.0 * rk->utilisation,
                        rk->status == KEEL_SOLVE_OPTIMAL ? "proven best possible" : "not proven");
            }
        }
        if (s->bound_reason.text) {
            fputs("<p>What sets the bound: ", out);
            keel_report_out_html(out, s->bound_reason.text);
            fputs("</p>\n", out);
        }
    }
    fputs("</section>\n", out);
}

void keel_report_html_sheet(const keel_report *rep, FILE *out)
{
    write_nurses(out, rep);
    write_breaks(out, rep);
    write_admissions(out, rep);
}

keel_status keel_report_html(const keel_report *rep, FILE *out)
{
    const keel_solution *s = rep->solution;
    bool plan = rep->nurse_of != NULL;
    write_head(out, rep);
    fputs("<div class=\"top\"><div>\n", out);
    write_heading(out, rep);
    write_status(out, rep);
    write_verdict(out, rep);
    if (plan && !(s && s->best_effort))
        write_admissions(out, rep);
    fputs("</div><div>\n", out);
    if (plan)
        write_chart(out, rep);
    fputs("</div></div>\n", out);
    if (s && s->status == KEEL_SOLVE_INFEASIBLE && rep->kind == KEEL_REPORT_ASSIGN)
        write_findings(out, "Why", &s->diagnoses);
    if (plan) {
        write_nurses(out, rep);
        write_breaks(out, rep);
    }
    write_findings(
        out, s && s->best_effort ? "Rules this best-effort plan breaks" : "Rules the plan breaks",
        rep->violations);
    if (rep->kind == KEEL_REPORT_CHECK && plan && rep->violations && rep->violations->n == 0)
        fputs("<p>The plan keeps every rule keel checks.</p>\n", out);
    write_details(out, rep);
    keel_report_out_html_foot(out, rep->roster->policy.ratio_table);
    return KEEL_OK;
}
