/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_rebalance.c - the writers of a rebalance (keel rebalance): "text"
 * (the frontier as a table, the chosen option's hand-offs, forced moves and
 * new patients, the recommendation, the caution), "json" (every option in
 * full) and "yaml" (the whole shift after the chosen option, with each
 * patient's record, keel_rebalance_shift(), through the assignment's yaml
 * writer, so that it feeds back into keel rebalance, keel check and keel
 * audit) and "html" (the frontier as a chart, the moves, and the
 * chosen option's sheet as the assignment's).  Writers only read: each
 * plan's figures come from its keel_metrics.
 */
#include "keel/report.h"

#include <stdio.h>
#include <string.h>

#include "report_internal.h"

static const char *nurse_id(const keel_roster *r, int n)
{
    return n >= 0 ? r->nurses[n].id : "(not on the roster)";
}

/* "P-514 (bed 514B)". */
static void write_patient(FILE *out, const keel_roster *r, size_t p)
{
    const keel_patient *pt = &r->patients[p];
    fputs(pt->id, out);
    if (pt->bed)
        fprintf(out, " (bed %s)", pt->bed);
}

/* ---- text ------------------------------------------------------------ */

static void text_moves(FILE *out, const keel_roster *r, const char *title,
                       const keel_rebalance_move *moves, size_t n)
{
    if (n == 0)
        return;
    fprintf(out, "%s:\n", title);
    for (size_t i = 0; i < n; i++) {
        fputs("  ", out);
        write_patient(out, r, moves[i].patient);
        const keel_patient *pt = &r->patients[moves[i].patient];
        if (moves[i].from >= 0 || (pt->nurse && !pt->expected))
            fprintf(out, ": %s \u2192 %s\n",
                    moves[i].from >= 0 ? r->nurses[moves[i].from].id
                                       : r->patients[moves[i].patient].nurse,
                    nurse_id(r, moves[i].to));
        else
            fprintf(out, ": \u2192 %s\n", nurse_id(r, moves[i].to));
    }
}

static void text_frontier(FILE *out, const keel_rebalance_report *rep)
{
    const keel_rebalance *rb = rep->rebalance;
    fputs("Hand-off frontier (option k: the best plan with at most k hand-offs; forced moves "
          "and new patients apart):\n",
          out);
    fputs("  k  status       heaviest   lightest     spread  no plan below      gap  hand-offs\n",
          out);
    for (size_t k = 0; k < rb->noptions; k++) {
        const keel_rebalance_option *o = &rb->options[k];
        const char *status = keel_solve_status_name(o->solution->status);
        if (!o->found) {
            fprintf(out, "  %-2d %-11s %s\n", o->handoffs, status,
                    o->solution->status == KEEL_SOLVE_INFEASIBLE
                        ? "no plan keeps every rule with this few hand-offs"
                        : "no plan found within the time limit");
            continue;
        }
        const keel_metrics *m = rep->metrics[k];
        fprintf(out, "  %-2d %-11s %7.1f %%  %7.1f %%  %5.1f pts  %11.1f %%  %5.1f %%  %9zu%s\n",
                o->handoffs, status, 100.0 * m->max_utilisation, 100.0 * m->min_utilisation,
                100.0 * m->spread, 100.0 * o->bound, 100.0 * o->gap, o->nmoves,
                (int)k == rb->recommended ? "   recommended" : "");
    }
}

static void text_nurses(FILE *out, const keel_rebalance_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_rebalance *rb = rep->rebalance;
    const keel_rebalance_option *o = &rb->options[rep->chosen];
    const keel_metrics *m = rep->metrics[rep->chosen];
    keel_report plan = {.kind = KEEL_REPORT_ASSIGN,
                        .roster = r,
                        .workload = rb->workload,
                        .nurse_of = o->solution->nurse_of};
    fputs("Nurses:\n", out);
    for (size_t n = 0; n < r->nnurses; n++) {
        const keel_nurse_metrics *nm = &m->nurses[n];
        if (!nm->counted) {
            fprintf(out, "  %-8s takes no patients\n", r->nurses[n].id);
            continue;
        }
        fprintf(out, "  %-8s %2d patient%s  load %4d of %4d min  %5.1f %%%s ", r->nurses[n].id,
                nm->npatients, nm->npatients == 1 ? " " : "s", nm->load_minutes,
                nm->capacity_minutes, 100.0 * nm->utilisation,
                nm->load_minutes > nm->capacity_minutes ? "  OVER HER TIME" : "");
        /* With the clock, the patients she takes over later too, marked. */
        const char *sep = " ";
        for (size_t p = 0; p < r->npatients; p++) {
            if (!keel_report_plan_holds(&plan, p, n))
                continue;
            fprintf(out, "%s%s%s", sep, r->patients[p].id,
                    keel_rebalance_nurse(rb, o, p) == (int)n ? "" : " (later)");
            sep = ", ";
        }
        fputc('\n', out);
    }
}

/* Each expected admission without a nurse: who could take it with no
 * hand-off, lightest first, and the rule against each other nurse. */
static void text_preview(FILE *out, const keel_rebalance_report *rep)
{
    const keel_roster *r = rep->roster;
    if (!rep->preview || rep->preview->nadmissions == 0)
        return;
    fputs("Expected admissions (who could take each with no hand-off):\n", out);
    for (size_t i = 0; i < rep->preview->nadmissions; i++) {
        const keel_preview_admission *a = &rep->preview->admissions[i];
        fputs("  ", out);
        write_patient(out, r, a->patient);
        fputs(":", out);
        const char *sep = " ";
        for (size_t k = 0; k < a->nnurses; k++) {
            const keel_preview_nurse *pn = &a->nurses[k];
            if (pn->allowed)
                fprintf(out, "%s%s %.1f %%%s", sep, r->nurses[pn->nurse].id,
                        100.0 * pn->utilisation, pn->overload ? " OVER HER TIME" : "");
            else
                fprintf(out, "%s%s ruled out [%s]", sep, r->nurses[pn->nurse].id, pn->rule);
            sep = "; ";
        }
        fputc('\n', out);
    }
}

static keel_status write_text(const keel_rebalance_report *rep, FILE *out)
{
    const keel_roster *r = rep->roster;
    const keel_rebalance *rb = rep->rebalance;
    fprintf(out, "keel rebalance: %s", r->unit.name ? r->unit.name : (r->path ? r->path : "roster"));
    if (r->shift.label)
        fprintf(out, ", %s shift", r->shift.label);
    if (r->shift.date)
        fprintf(out, " %s", r->shift.date);
    fputc('\n', out);
    if (rb->at_minute >= 0)
        fprintf(out,
                "At %02d:%02d: the rest of the shift, %d min; care and capacity from then on; "
                "discharged before then: %zu\n",
                rb->at_minute / 60, rb->at_minute % 60, r->shift.minutes, rb->discharged);
    else
        fputs("The roster's figures are taken as the work that remains.\n", out);
    fprintf(out, "Now: %zu patient%s with a nurse, %zu new; status %s (%.1f s)\n\n", rb->npresent,
            rb->npresent == 1 ? "" : "s", rb->nnew, keel_solve_status_name(rb->status),
            rb->seconds);
    text_frontier(out, rep);
    fputc('\n', out);
    if (rb->recommended < 0) {
        fprintf(out,
                "No option has a plan that keeps every rule with at most %zu hand-off%s "
                "(standard error says why).\n\n",
                rb->noptions - 1, rb->noptions == 2 ? "" : "s");
        fprintf(out, "%s\n", KEEL_CAUTION);
        return KEEL_OK;
    }
    const keel_rebalance_option *best = &rb->options[rb->recommended];
    fprintf(out,
            "Recommended: %d hand-off%s (the fewest whose heaviest utilisation, %.1f %%, is "
            "within %.1f points of the best option's)\n",
            best->handoffs, best->handoffs == 1 ? "" : "s",
            100.0 * rep->metrics[rb->recommended]->max_utilisation, 100.0 * rb->min_gain);
    const keel_rebalance_option *o = &rb->options[rep->chosen];
    fprintf(out, "\nOption %d%s:\n", o->handoffs,
            (int)rep->chosen == rb->recommended ? " (recommended)" : " (chosen with --handoffs)");
    if (!o->found) {
        fprintf(out, "No plan with at most %d hand-off%s.\n\n%s\n", o->handoffs,
                o->handoffs == 1 ? "" : "s", KEEL_CAUTION);
        return KEEL_OK;
    }
    if (o->nmoves == 0)
        fputs("No hand-offs: every patient with a nurse keeps her.\n", out);
    text_moves(out, r, "Hand-offs", o->moves, o->nmoves);
    text_moves(out, r, "Forced moves (the nurse is gone or may not keep the patient; not counted)",
               o->forced, o->nforced);
    text_moves(out, r, "New patients", o->placed, o->nplaced);
    text_nurses(out, rep);
    text_preview(out, rep);
    fprintf(out, "\n%s\n", KEEL_CAUTION);
    return KEEL_OK;
}

/* ---- json ------------------------------------------------------------ */

static void json_moves(FILE *out, const keel_roster *r, const keel_rebalance_move *moves, size_t n)
{
    fputc('[', out);
    for (size_t i = 0; i < n; i++) {
        const keel_patient *pt = &r->patients[moves[i].patient];
        fputs(i ? ", {\"patient\": " : "{\"patient\": ", out);
        keel_report_out_quoted(out, pt->id);
        if (pt->bed) {
            fputs(", \"bed\": ", out);
            keel_report_out_quoted(out, pt->bed);
        }
        fputs(", \"from\": ", out);
        if (moves[i].from >= 0)
            keel_report_out_quoted(out, r->nurses[moves[i].from].id);
        else if (pt->nurse && !pt->expected)
            keel_report_out_quoted(out, pt->nurse);
        else
            fputs("null", out);
        fputs(", \"to\": ", out);
        keel_report_out_quoted(out, r->nurses[moves[i].to].id);
        fputc('}', out);
    }
    fputc(']', out);
}

static void json_option(FILE *out, const keel_rebalance_report *rep, size_t k)
{
    const keel_roster *r = rep->roster;
    const keel_rebalance *rb = rep->rebalance;
    const keel_rebalance_option *o = &rb->options[k];
    fprintf(out, "    {\"handoffs\": %d, \"status\": \"%s\", \"found\": %s", o->handoffs,
            keel_solve_status_name(o->solution->status), o->found ? "true" : "false");
    if (!o->found) {
        fputs("}", out);
        return;
    }
    const keel_metrics *m = rep->metrics[k];
    fprintf(out,
            ", \"max_utilisation\": %.12g, \"min_utilisation\": %.12g, \"spread\": %.12g, "
            "\"bound\": %.12g, \"gap\": %.12g, \"handoffs_made\": %zu,\n     \"moves\": ",
            m->max_utilisation, m->min_utilisation, m->spread, o->bound, o->gap, o->nmoves);
    json_moves(out, r, o->moves, o->nmoves);
    fputs(",\n     \"forced_moves\": ", out);
    json_moves(out, r, o->forced, o->nforced);
    fputs(",\n     \"placed\": ", out);
    json_moves(out, r, o->placed, o->nplaced);
    fputs(",\n     \"stages\": [", out);
    for (size_t i = 0; i < o->solution->nstages; i++) {
        const keel_stage *st = &o->solution->stages[i];
        fprintf(out,
                "%s{\"name\": \"%s\", \"status\": \"%s\", \"value\": %.12g, \"bound\": %.12g, "
                "\"gap\": %.12g}",
                i ? ", " : "", st->name, keel_solve_status_name(st->status), st->value, st->bound,
                st->gap);
    }
    fputs("],\n     \"nurses\": [", out);
    for (size_t n = 0; n < r->nnurses; n++) {
        fputs(n ? ", {\"id\": " : "{\"id\": ", out);
        keel_report_out_quoted(out, r->nurses[n].id);
        fprintf(out, ", \"utilisation\": %.12g, \"patients\": [", m->nurses[n].utilisation);
        bool first = true;
        for (size_t p = 0; p < r->npatients; p++) {
            if (keel_rebalance_nurse(rb, o, p) != (int)n)
                continue;
            fputs(first ? "" : ", ", out);
            keel_report_out_quoted(out, r->patients[p].id);
            first = false;
        }
        fputs("]}", out);
    }
    fputs("]}", out);
}

static keel_status write_json(const keel_rebalance_report *rep, FILE *out)
{
    const keel_rebalance *rb = rep->rebalance;
    const keel_rebalance_option *o = &rb->options[rep->chosen];
    fprintf(out, "{\n  \"status\": \"%s\",\n  \"at\": ", keel_solve_status_name(rb->status));
    if (rb->at_minute >= 0)
        fprintf(out, "\"%02d:%02d\"", rb->at_minute / 60, rb->at_minute % 60);
    else
        fputs("null", out);
    fprintf(out, ",\n  \"discharged\": %zu,\n  \"recommended_handoffs\": ", rb->discharged);
    if (rb->recommended >= 0)
        fprintf(out, "%d", rb->recommended);
    else
        fputs("null", out);
    fprintf(out,
            ",\n  \"chosen_handoffs\": %d,\n  \"min_gain\": %.12g,\n  \"present\": %zu,\n"
            "  \"new\": %zu,\n  \"seconds\": %.3f,\n  \"forced_moves\": ",
            o->handoffs, rb->min_gain, rb->npresent, rb->nnew, rb->seconds);
    json_moves(out, rep->roster, o->forced, o->nforced);
    fputs(",\n  \"options\": [\n", out);
    for (size_t k = 0; k < rb->noptions; k++) {
        json_option(out, rep, k);
        fputs(k + 1 < rb->noptions ? ",\n" : "\n", out);
    }
    fputs("  ],\n  \"incoming\": [", out);
    for (size_t i = 0; rep->preview && i < rep->preview->nadmissions; i++) {
        const keel_preview_admission *a = &rep->preview->admissions[i];
        fputs(i ? ",\n    {\"patient\": " : "\n    {\"patient\": ", out);
        keel_report_out_quoted(out, rep->roster->patients[a->patient].id);
        fputs(", \"nurses\": [", out);
        for (size_t k = 0; k < a->nnurses; k++) {
            const keel_preview_nurse *pn = &a->nurses[k];
            fputs(k ? ", {\"id\": " : "{\"id\": ", out);
            keel_report_out_quoted(out, rep->roster->nurses[pn->nurse].id);
            if (pn->allowed)
                fprintf(out, ", \"allowed\": true, \"utilisation\": %.12g, \"overload\": %s}",
                        pn->utilisation, pn->overload ? "true" : "false");
            else
                fprintf(out, ", \"allowed\": false, \"rule\": \"%s\"}", pn->rule);
        }
        fputs("]}", out);
    }
    fputs(rep->preview && rep->preview->nadmissions ? "\n  ],\n  \"caution\": "
                                                    : "],\n  \"caution\": ",
          out);
    keel_report_out_quoted(out, KEEL_CAUTION);
    fputs("\n}\n", out);
    return KEEL_OK;
}

/* ---- html ------------------------------------------------------------ */

static void html_moves(FILE *out, const keel_roster *r, const char *title,
                       const keel_rebalance_move *moves, size_t n)
{
    if (n == 0)
        return;
    fputs("<h2>", out);
    keel_report_out_html(out, title);
    fputs("</h2>\n<ul class=\"cols\">\n", out);
    for (size_t i = 0; i < n; i++) {
        const keel_patient *pt = &r->patients[moves[i].patient];
        fputs("<li>", out);
        keel_report_out_html(out, pt->id);
        if (pt->bed) {
            fputs(" (bed ", out);
            keel_report_out_html(out, pt->bed);
            fputc(')', out);
        }
        fputs(": ", out);
        if (moves[i].from >= 0 || (pt->nurse && !pt->expected)) {
            keel_report_out_html(out,
                                 moves[i].from >= 0 ? r->nurses[moves[i].from].id : pt->nurse);
            fputc(' ', out);
        }
        fputs("&rarr; ", out);
        keel_report_out_html(out, nurse_id(r, moves[i].to));
        fputs("</li>\n", out);
    }
    fputs("</ul>\n", out);
}

/* The page: the frontier as a chart (heaviest utilisation per number of
 * hand-offs), the recommendation, the chosen option's moves, then its
 * sheet as the assignment's (patients by nurse, break cover, next
 * admissions), the caution. */
static keel_status write_html(const keel_rebalance_report *rep, FILE *out)
{
    const keel_roster *r = rep->roster;
    const keel_rebalance *rb = rep->rebalance;
    char title[256];
    snprintf(title, sizeof title, "Rebalance: %s", r->unit.name ? r->unit.name : "unit");
    keel_report_out_html_head(out, title);
    fputs("<h1>", out);
    keel_report_out_html(out, r->unit.name ? r->unit.name : "Unit");
    fputs("</h1>\n<p class=\"sub\">Rebalance", out);
    if (r->shift.label) {
        fputs(", ", out);
        keel_report_out_html(out, r->shift.label);
        fputs(" shift", out);
    }
    if (rb->at_minute >= 0)
        fprintf(out, " at %02d:%02d (the rest of the shift)", rb->at_minute / 60,
                rb->at_minute % 60);
    fprintf(out, ". %zu patient%s with a nurse, %zu new.</p>\n", rb->npresent,
            rb->npresent == 1 ? "" : "s", rb->nnew);
    keel_html_bar bars[32];
    char labels[32][24];
    size_t nbars = 0;
    double top = 1.2;
    for (size_t k = 0; k < rb->noptions && nbars < 32; k++) {
        const keel_rebalance_option *o = &rb->options[k];
        keel_html_bar *b = &bars[nbars++];
        snprintf(labels[k], sizeof labels[k], "%d hand-off%s", o->handoffs,
                 o->handoffs == 1 ? "" : "s");
        *b = (keel_html_bar){.label = labels[k], .mark = -1};
        if (!o->found) {
            snprintf(b->text, sizeof b->text, "no plan");
            continue;
        }
        double u = rep->metrics[k]->max_utilisation;
        b->value = u;
        b->hatched = u > 1.0;
        snprintf(b->text, sizeof b->text, "heaviest %.1f %%%s%s", 100.0 * u,
                 o->solution->status == KEEL_SOLVE_OPTIMAL ? "" : " (not proven)",
                 (int)k == rb->recommended ? " RECOMMENDED" : "");
        if (u + 0.1 > top)
            top = u + 0.1;
    }
    keel_html_line line = {.at = 1.0, .label = "100 %"};
    fputs("<h2>The best plan for each number of hand-offs</h2>\n", out);
    keel_report_out_html_chart(out, "heaviest utilisation against hand-offs", bars, nbars, &line,
                               1, top);
    if (rb->recommended < 0) {
        fputs("<p class=\"banner\">No option has a plan that keeps every rule.</p>\n", out);
        keel_report_out_html_foot(out, r->policy.ratio_table);
        return KEEL_OK;
    }
    const keel_rebalance_option *o = &rb->options[rep->chosen];
    fprintf(out,
            "<p class=\"verdict\">Recommended: %d hand-off%s (the fewest whose heaviest "
            "utilisation is within %.1f points of the best option's).</p>\n",
            rb->options[rb->recommended].handoffs,
            rb->options[rb->recommended].handoffs == 1 ? "" : "s", 100.0 * rb->min_gain);
    if (!o->found) {
        fprintf(out, "<p>Option %d has no plan.</p>\n", o->handoffs);
        keel_report_out_html_foot(out, r->policy.ratio_table);
        return KEEL_OK;
    }
    if (o->nmoves == 0)
        fputs("<p>No hand-offs: every patient with a nurse keeps her.</p>\n", out);
    html_moves(out, r, "Hand-offs", o->moves, o->nmoves);
    html_moves(out, r, "Forced moves (the nurse is gone or may not keep the patient)", o->forced,
               o->nforced);
    html_moves(out, r, "New patients", o->placed, o->nplaced);
    keel_course *course = NULL;
    keel_error err;
    keel_error_init(&err);
    keel_status rc = keel_course_compute(r, rb->workload, o->solution->nurse_of, 3, &course, &err);
    keel_error_fini(&err);
    if (rc)
        return rc;
    keel_verdict *verdict = NULL;
    keel_error_init(&err);
    rc = keel_verdict_compute(r, rb->workload, o->solution, o->solution->nurse_of, &verdict,
                              &err);
    keel_error_fini(&err);
    if (rc) {
        keel_course_free(course);
        return rc;
    }
    if (verdict->text) {
        fputs("<p class=\"verdict\">", out);
        keel_report_out_html(out, verdict->text);
        fputs("</p>\n", out);
    }
    keel_report sheet = {.kind = KEEL_REPORT_ASSIGN,
                         .roster = r,
                         .workload = rb->workload,
                         .nurse_of = o->solution->nurse_of,
                         .metrics = rep->metrics[rep->chosen],
                         .solution = o->solution,
                         .course = course,
                         .verdict = verdict};
    keel_report_html_sheet(&sheet, out);
    keel_verdict_free(verdict);
    keel_course_free(course);
    keel_report_out_html_foot(out, r->policy.ratio_table);
    return KEEL_OK;
}

/* ---- yaml ------------------------------------------------------------ */

/* The whole shift after the chosen option (keel_rebalance_shift()). */
static keel_status write_yaml(const keel_rebalance_report *rep, FILE *out)
{
    const keel_rebalance_option *o = &rep->rebalance->options[rep->chosen];
    keel_roster *shift = NULL;
    keel_error err;
    keel_error_init(&err);
    keel_status rc = keel_rebalance_shift(rep->rebalance, rep->chosen, &shift, &err);
    keel_error_fini(&err);
    if (rc)
        return rc;
    keel_report r = {.kind = KEEL_REPORT_ASSIGN, .roster = shift, .solution = o->solution};
    rc = keel_report_yaml(&r, out);
    keel_roster_free(shift);
    return rc;
}

typedef struct writer {
    const char *name;
    keel_status (*write)(const keel_rebalance_report *rep, FILE *out);
} writer;

static const writer writers[] = {
    {"text", write_text},
    {"json", write_json},
    {"yaml", write_yaml},
    {"html", write_html},
};

keel_status keel_report_rebalance_write(const char *format, const keel_rebalance_report *rep,
                                        FILE *out, keel_error *err)
{
    const keel_rebalance *rb = rep->rebalance;
    for (size_t i = 0; i < sizeof writers / sizeof *writers; i++) {
        if (strcmp(writers[i].name, format) != 0)
            continue;
        if (strcmp(format, "yaml") == 0 &&
            (rep->chosen >= rb->noptions || !rb->options[rep->chosen].found))
            return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                                  "the chosen option has no plan to write");
        keel_status rc = writers[i].write(rep, out);
        if (rc == KEEL_ERR_NOMEM)
            rc = keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
        if (!rc && ferror(out))
            rc = keel_error_add(err, KEEL_ERR_IO, NULL, 0, 0, NULL, "write failed");
        return rc;
    }
    return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                          "unknown format '%s'; expected text, json, yaml or html", format);
}
