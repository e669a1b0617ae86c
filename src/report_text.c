/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_text.c - the report a charge nurse reads: one block per nurse, the
 * balance, the proof, the staffing line and the caution.  Patients appear by
 * id and bed only (names stay out of anything that may be posted).
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "keel/keel.h"
#include "alloc.h"
#include "report_internal.h"
#include "workload_internal.h"

static void write_heading(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    fprintf(out, "keel %s: %s", rep->kind == KEEL_REPORT_ASSIGN ? "assignment" : "check",
            r->unit.name ? r->unit.name : (r->path ? r->path : "roster"));
    if (r->shift.label)
        fprintf(out, ", %s shift", r->shift.label);
    if (r->shift.date)
        fprintf(out, " %s", r->shift.date);
    if (r->shift.start_minute != KEEL_ABSENT)
        fprintf(out, " from %02d:%02d", r->shift.start_minute / 60, r->shift.start_minute % 60);
    fprintf(out, " (%d min)\n", r->shift.minutes);
    fprintf(out, "%zu patient%s, %zu nurse%s\n\n", r->npatients, r->npatients == 1 ? "" : "s",
            r->nnurses, r->nnurses == 1 ? "" : "s");
}

/* text with every full citation of table t (keel_law_cite()) shortened to
 * "<name> (table cited above)": the report cites the table in full once, at
 * its head.  A new string, or NULL when out of memory. */
static char *cited_above(const keel_law_table *t, const char *text)
{
    char cite[KEEL_LAW_CITE_SIZE], shortened[KEEL_LAW_CITE_SIZE];
    keel_law_cite(t, cite, sizeof cite);
    snprintf(shortened, sizeof shortened, "%s (table cited above)", t ? t->name : "");
    size_t clen = strlen(cite), slen = strlen(shortened), nhits = 0;
    for (const char *at = text; t && (at = strstr(at, cite)) != NULL; at += clen)
        nhits++;
    char *out = keel_malloc(strlen(text) + nhits * slen + 1);
    if (!out)
        return NULL;
    size_t len = 0;
    for (const char *at, *from = text;; from = at + clen) {
        at = t ? strstr(from, cite) : NULL;
        size_t keep = at ? (size_t)(at - from) : strlen(from);
        memcpy(out + len, from, keep);
        len += keep;
        if (!at)
            break;
        memcpy(out + len, shortened, slen);
        len += slen;
    }
    out[len] = '\0';
    return out;
}

/* text (which may cite table t), its citation shortened as the head has
 * cited the table: after prefix on one line, or wrapped under it. */
static void write_cited(FILE *out, const keel_law_table *t, const char *prefix, const char *text,
                        bool wrap)
{
    char *shown = cited_above(t, text);
    const char *line = shown ? shown : text;
    if (wrap)
        keel_report_out_wrapped(out, prefix, line, 78);
    else
        fprintf(out, "%s%s\n", prefix, line);
    free(shown);
}

/* The ratio table the roster selects, cited in full once: what it encodes,
 * its note, and how keel classed a shift that spans its shift classes. */
static void write_ratio_table(FILE *out, const keel_roster *r)
{
    const keel_law_table *t = r->policy.ratio_table;
    char cite[KEEL_LAW_CITE_SIZE], classed[2 * KEEL_LAW_CITE_SIZE];
    if (!t)
        return;
    keel_law_cite(t, cite, sizeof cite);
    fputs("Ratio table\n", out);
    keel_report_out_wrapped(out, "  ", cite, 78);
    if (t->note)
        keel_report_out_wrapped(out, "  ", t->note, 78);
    if (keel_law_shift_class_note(t, r->shift.start_minute, r->shift.minutes, classed,
                                  sizeof classed) > 0) {
        char *line = keel_asprintf("This shift is %s.", classed);
        write_cited(out, t, "  ", line ? line : classed, true);
        free(line);
    }
    fputc('\n', out);
}

/* With the clock: when the patient is here, and whom nurse n (-1: none)
 * hands the patient to or takes the patient from. */
static void write_stay(FILE *out, const keel_report *rep, size_t p, int n)
{
    const keel_roster *r = rep->roster;
    const keel_patient *pat = &r->patients[p];
    char buf[KEEL_TIME_SIZE];
    if (pat->expected) {
        keel_roster_clock_text(r, pat->arrives_at, buf);
        fprintf(out, "  expected admission at %s", buf);
    } else if (pat->arrives_at != KEEL_ABSENT) {
        keel_roster_clock_text(r, pat->arrives_at, buf);
        fprintf(out, "  arrives %s", buf);
    }
    if (pat->leaves_at != KEEL_ABSENT) {
        keel_roster_clock_text(r, pat->leaves_at, buf);
        fprintf(out, "  leaves %s", buf);
    }
    int q = rep->workload->first_part[p], at, from, to;
    while (keel_report_plan_next_handoff(rep, p, &q, &at, &from, &to)) {
        keel_roster_clock_text(r, at, buf);
        if (from == n)
            fprintf(out, "  hands over to %s at %s", to >= 0 ? r->nurses[to].id : "nobody", buf);
        else if (to == n)
            fprintf(out, "  takes over from %s at %s", r->nurses[from].id, buf);
    }
}

/* One patient in nurse n's block (the minutes she carries), or, n < 0,
 * with all its care. */
static void write_patient_line(FILE *out, const keel_report *rep, size_t p, int n)
{
    const keel_patient *pat = &rep->roster->patients[p];
    long long care = n >= 0 ? keel_report_plan_care_held(rep, p, (size_t)n)
                            : keel_workload_patient_care(rep->workload, p);
    fprintf(out, "      %-10s bed %-8s %4lld min", pat->id, pat->bed ? pat->bed : "-", care);
    if (pat->acuity != KEEL_ABSENT)
        fprintf(out, "  acuity %d", pat->acuity);
    if (pat->nnas > 0 && pat->care_minutes == KEEL_ABSENT) {
        int score = keel_nas_score(pat->nas, pat->nnas);
        fprintf(out, "  NAS %d.%d*", score / 10, score % 10);
    }
    for (size_t i = 0; i < pat->nneeds; i++)
        fprintf(out, "%s%s", i ? ", " : "  needs ", pat->needs[i]);
    if (pat->isolation != KEEL_ISOLATION_NONE)
        fprintf(out, "  %s isolation", keel_isolation_name(pat->isolation));
    if (pat->ratio != KEEL_ABSENT)
        fprintf(out, "  1:%d", pat->ratio);
    if (pat->zone)
        fprintf(out, "  zone %s", pat->zone);
    if (pat->lock)
        fputs("  locked", out);
    if (pat->sitter)
        fputs("  sitter", out);
    const keel_workload *w = rep->workload;
    int first = w->first_part[p];
    if (rep->roster->clock)
        write_stay(out, rep, p, n);
    if (rep->nurse_of && w->previous[first] >= 0 && rep->nurse_of[first] == n)
        fputs(rep->nurse_of[first] == w->previous[first] ? "  kept" : "  new nurse", out);
    fputc('\n', out);
    if (rep->explanation && rep->nurse_of && rep->nurse_of[first] == n)
        fprintf(out, "        why: %s\n", rep->explanation->text[p]);
}

/* Nurse n's patient count over the shift, as "07:00 4, 11:00 3, 15:00 off". */
static void write_timeline(FILE *out, const keel_report *rep, size_t n)
{
    const keel_course_timeline *t = &rep->course->timelines[n];
    char at[KEEL_TIME_SIZE];
    fputs("       patients over the shift:", out);
    for (size_t i = 0; i < t->nchanges; i++) {
        keel_roster_clock_text(rep->roster, t->changes[i].at, at);
        if (t->changes[i].patients == KEEL_COURSE_OFF)
            fprintf(out, "%s %s off", i ? "," : "", at);
        else
            fprintf(out, "%s %s %d", i ? "," : "", at, t->changes[i].patients);
    }
    fputc('\n', out);
}

/* The hand-offs on patients' records (up to the last rebalance), in
 * time order within each patient. */
static void write_recorded(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    bool any = false;
    char at[KEEL_TIME_SIZE];
    for (size_t p = 0; p < r->npatients; p++) {
        int q = rep->workload->first_part[p], when, from, to;
        int open = keel_workload_first_open(r, rep->workload, p);
        while (keel_report_plan_next_handoff(rep, p, &q, &when, &from, &to) && q <= open) {
            if (!any)
                fputs("Hand-offs on the record (up to the last rebalance)\n", out);
            any = true;
            keel_roster_clock_text(r, when, at);
            fprintf(out, "  %s  %s: %s \u2192 %s\n", at, r->patients[p].id,
                    from >= 0 ? r->nurses[from].id : "nobody",
                    to >= 0 ? r->nurses[to].id : "nobody");
        }
    }
    if (any)
        fputc('\n', out);
}

/* The planned hand-offs after the records, by the nurse who leaves. */
static void write_handoffs(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    bool any = false;
    char at[KEEL_TIME_SIZE];
    write_recorded(out, rep);
    for (size_t n = 0; n < r->nnurses; n++) {
        size_t k = 0;
        for (size_t p = 0; p < r->npatients; p++) {
            int q = rep->workload->first_part[p], when, from, to;
            int open = keel_workload_first_open(r, rep->workload, p);
            while (keel_report_plan_next_handoff(rep, p, &q, &when, &from, &to)) {
                if (from != (int)n || q <= open)
                    continue;
                if (!any)
                    fputs("Planned hand-offs (a nurse leaves; not balance moves)\n", out);
                any = true;
                if (k++ == 0) {
                    keel_roster_clock_text(r, when, at);
                    fprintf(out, "  %s  %s leaves:", at, r->nurses[n].id);
                }
                fprintf(out, "%s %s to %s", k > 1 ? "," : "", r->patients[p].id,
                        to >= 0 ? r->nurses[to].id : "nobody");
            }
        }
        if (k)
            fputc('\n', out);
    }
    if (any)
        fputc('\n', out);
}

static void write_expected(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    bool any = false;
    char at[KEEL_TIME_SIZE];
    for (size_t p = 0; p < r->npatients; p++) {
        if (!r->patients[p].expected)
            continue;
        if (!any)
            fputs("Expected admissions, assigned in advance\n", out);
        any = true;
        int n = keel_report_plan_first_nurse(rep, p);
        keel_roster_clock_text(r, r->patients[p].arrives_at, at);
        fprintf(out, "  %s  %-10s %4lld min  to %s\n", at, r->patients[p].id,
                keel_workload_patient_care(rep->workload, p), n >= 0 ? r->nurses[n].id : "nobody");
    }
    if (any)
        fputc('\n', out);
}

static void write_one_cover(FILE *out, const keel_report *rep, const keel_break_cover *b)
{
    const keel_roster *r = rep->roster;
    char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
    keel_roster_clock_text(r, b->at, from);
    keel_roster_clock_text(r, b->at + b->minutes, to);
    fprintf(out, "  %s-%s  %s on break: ", from, to, r->nurses[b->nurse].id);
    if (b->npatients == 0) {
        fputs("holds no patients then\n", out);
        return;
    }
    if (b->cover >= 0)
        fprintf(out, "%s (%s) holds", r->nurses[b->cover].id, b->relief ? "relief" : "buddy");
    else
        fputs("nobody holds", out);
    for (size_t i = 0; i < b->npatients; i++)
        fprintf(out, "%s %s", i ? "," : "", r->patients[b->patients[i]].id);
    if (b->cover >= 0)
        fprintf(out, "; %d patient%s at most (limit %d)", b->most, b->most == 1 ? "" : "s",
                b->limit);
    fputc('\n', out);
    if (!b->rule)
        return;
    if (strcmp(b->rule, "law_limit") == 0)
        fprintf(out,
                "      FLAG law_limit: exceeds the limit of 1:%d for %s in %s (table cited "
                "above), which holds during breaks\n",
                b->limit, r->unit.type, r->policy.ratio_table->name);
    else if (strcmp(b->rule, "patient_limit") == 0)
        fprintf(out, "      FLAG patient_limit: over the patient limit of %d\n", b->limit);
    else
        fputs("      FLAG no_cover: no buddy or relief nurse is on and free to cover\n", out);
}

/* Break cover, the relief nurses it needs, and the admission order. */
static void write_course(FILE *out, const keel_report *rep)
{
    const keel_course *c = rep->course;
    const keel_roster *r = rep->roster;
    if (c->nbreaks > 0) {
        fputs("Break cover, in time order\n", out);
        size_t flagged = 0;
        for (size_t i = c->nbreaks; keel_report_plan_next_break(c, &i);) {
            write_one_cover(out, rep, &c->breaks[i]);
            flagged += c->breaks[i].rule != NULL;
        }
        fprintf(out,
                "  Relief nurses the break plan needs at one time: %d (on the roster: %d); "
                "breaks flagged: %zu\n\n",
                c->relief_needed, c->relief_on_roster, flagged);
    }
    if (c->npicks == 0) {
        fputs("Next unplanned admissions: nobody can take one. Every nurse who takes patients\n"
              "  is at her patient limit (or a patient's 1:N) at the end of her time on the unit.\n\n",
              out);
        return;
    }
    fprintf(out, "Next unplanned admissions (a typical admission: %d min)\n", c->admission_minutes);
    static const char *const place[] = {"1st", "2nd", "3rd"};
    for (size_t i = 0; i < c->npicks; i++) {
        char nth[32];
        if (i < 3)
            snprintf(nth, sizeof nth, "%s", place[i]);
        else
            snprintf(nth, sizeof nth, "%zuth", i + 1);
        fprintf(out, "  %s  %s, who would reach %.1f %%%s\n", nth, r->nurses[c->picks[i].nurse].id,
                100.0 * c->picks[i].utilisation,
                c->picks[i].over ? "  OVER HER TIME: nobody with room stays under 100 %" : "");
    }
    fputc('\n', out);
}

static void write_nurse_blocks(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_workload *w = rep->workload;
    for (size_t n = 0; n < r->nnurses; n++) {
        const keel_nurse_metrics *m = &rep->metrics->nurses[n];
        if (r->nurses[n].role == KEEL_ROLE_ORIENTEE) {
            fprintf(out, "%-6s %-22s orientee: shares %s's assignment", r->nurses[n].id,
                    r->nurses[n].name ? r->nurses[n].name : "", r->nurses[n].preceptor);
            if (r->nurses[n].max_patients != KEEL_ABSENT)
                fprintf(out, " (the orientee's share: up to %d of those patients)",
                        r->nurses[n].max_patients);
            fputc('\n', out);
            continue;
        }
        fprintf(out, "%-6s %-22s %2d patient%s  load %4d of %4d min  %5.1f %%", r->nurses[n].id,
                r->nurses[n].name ? r->nurses[n].name : "", m->npatients,
                m->npatients == 1 ? " " : "s", m->load_minutes, m->capacity_minutes,
                100.0 * m->utilisation);
        if (w->duty_minutes[n] > 0)
            fprintf(out, "  (incl. %d duty min)", w->duty_minutes[n]);
        if (keel_workload_no_break(r, n))
            fputs("  no break (on under half the shift)", out);
        if (rep->nurse_of && m->counted && m->load_minutes > m->capacity_minutes)
            fprintf(out, "  OVER HER TIME by %d min", m->load_minutes - m->capacity_minutes);
        if (r->nurses[n].role != KEEL_ROLE_STAFF)
            fprintf(out, "  %s", keel_role_name(r->nurses[n].role));
        if (!m->counted)
            fputs("  takes no patients", out);
        fputc('\n', out);
        if (rep->course && r->clock && m->counted)
            write_timeline(out, rep, n);
        for (size_t p = 0; p < r->npatients; p++)
            if (keel_report_plan_holds(rep, p, n))
                write_patient_line(out, rep, p, (int)n);
    }
    fputc('\n', out);
}

static void write_balance(FILE *out, const keel_metrics *m)
{
    fprintf(out, "Balance over the %zu nurse%s who take%s patients\n", m->ncounted,
            m->ncounted == 1 ? "" : "s", m->ncounted == 1 ? "s" : "");
    fprintf(out, "  heaviest %.1f %%, lightest %.1f %%, spread %.1f points\n",
            100.0 * m->max_utilisation, 100.0 * m->min_utilisation, 100.0 * m->spread);
    fprintf(out,
            "  peak-to-mean %.3f, coefficient of variation %.3f, Jain's index %.3f, "
            "Gini %.3f\n\n",
            m->peak_to_mean, m->cv, m->jain, m->gini);
}

/* One balance stage, with this plan's own value first: when the later
 * stages spent some of the balance tolerance, the stage's best is said
 * apart, in the same line, with the reason. */
static void write_stage(FILE *out, const keel_stage *st, double plan, const char *spent_on,
                        const char *what, const char *limit)
{
    bool same = plan > st->value - 5e-10 && plan < st->value + 5e-10;
    fprintf(out, "  %-9s %5.1f %%  ", what, 100.0 * plan);
    if (!same)
        fprintf(out, "(tolerance spent on %s; the most even plan: %.1f %%, ", spent_on,
                100.0 * st->value);
    if (st->status == KEEL_SOLVE_OPTIMAL)
        fputs("proven best possible", out);
    else
        fprintf(out, "not proven: %s %.1f %% (gap %.2f %%)", limit, 100.0 * st->bound,
                100.0 * st->gap);
    if (!same)
        fputc(')', out);
    if (st->solver_calls > 0)
        fprintf(out, "  [%d integer programme%s, %.2f s]", st->solver_calls,
                st->solver_calls == 1 ? "" : "s", st->seconds);
    fputc('\n', out);
}

/* Stages 3 and 4 count patients and zones, not utilisations. */
static void write_count_stage(FILE *out, const keel_stage *st, const char *what, const char *unit,
                              const char *limit)
{
    fprintf(out, "  %-11s %3.0f %-8s ", what, st->value, unit);
    if (st->status == KEEL_SOLVE_OPTIMAL)
        fputs("proven best possible", out);
    else if (st->value == st->bound) /* proximity: the zones proven, the rooms not */
        fputs("proven best possible; the rooms are not proven", out);
    else
        fprintf(out, "not proven: %s %.0f", limit, st->bound);
    if (st->solver_calls > 0)
        fprintf(out, "  [%d integer programme%s, %.2f s]", st->solver_calls,
                st->solver_calls == 1 ? "" : "s", st->seconds);
    fputc('\n', out);
}

/* Stage 1 under policy.balance squares: the sum of load^2 / capacity. */
static void write_squares_stage(FILE *out, const keel_stage *st)
{
    fprintf(out, "  sum of squares %.1f (load squared over capacity, summed)  ", st->value);
    if (st->status == KEEL_SOLVE_OPTIMAL)
        fputs("proven best possible", out);
    else
        fprintf(out, "not proven: the best possible is at least %.1f (gap %.2f %%)", st->bound,
                100.0 * st->gap);
    fputc('\n', out);
}

/* Stage 5 (fairness forward): the sum of weight x utilisation. */
static void write_history_stage(FILE *out, const keel_stage *st)
{
    fprintf(out, "  history %.4f (weight by past load x utilisation, summed)  ", st->value);
    if (st->status == KEEL_SOLVE_OPTIMAL)
        fputs("proven best possible", out);
    else
        fprintf(out, "not proven: the best possible is at least %.4f", st->bound);
    fputc('\n', out);
}

/* The stage of s with this name, or NULL. */
static const keel_stage *stage_named(const keel_solution *s, const char *name)
{
    for (size_t i = 0; i < s->nstages; i++)
        if (strcmp(s->stages[i].name, name) == 0)
            return &s->stages[i];
    return NULL;
}

/* What the stages after the balance may spend the tolerance on. */
static const char *spent_on(const keel_solution *s)
{
    bool keep = s->continuity.applies, near = s->proximity.applies;
    if (s->nstages > 0 && strcmp(s->stages[s->nstages - 1].name, "history") == 0)
        return keep && near ? "continuity, proximity and fairness forward"
               : keep       ? "continuity and fairness forward"
               : near       ? "proximity and fairness forward"
                            : "fairness forward";
    return keep && near ? "continuity and proximity" : keep ? "continuity" : "proximity";
}

/* Stage "ranks": the nurses pinned at their level (at the peak first), then
 * the heaviest of the others with its proof. */
static void write_ranks_stage(FILE *out, const keel_roster *r, const keel_solution *s,
                              const keel_stage *st, const keel_metrics *m)
{
    double plan = 0; /* this plan's heaviest of the nurses not pinned */
    for (size_t n = 0; n < m->nnurses; n++) {
        bool pinned = false;
        for (size_t k = 0; k < s->nranks; k++) {
            const keel_rank *rk = &s->ranks[k];
            pinned = pinned || (rk->pinned && rk->nurse == (int)n);
        }
        if (m->nurses[n].counted && !pinned && m->nurses[n].utilisation > plan)
            plan = m->nurses[n].utilisation;
    }
    for (size_t k = 0; k < s->nranks; k++) {
        const keel_rank *rk = &s->ranks[k];
        if (rk->pinned)
            fprintf(out, "  pinned    %s at %.1f %%: %s\n", r->nurses[rk->nurse].id,
                    100.0 * rk->utilisation, keel_report_plan_pinned_why(s, rk));
        else if (rk->status != KEEL_SOLVE_OPTIMAL && st->gap == 0)
            fprintf(out, "  %-9s not decided: the time limit came before every nurse at %.1f %% "
                         "was asked whether she is pinned there\n",
                    k == 0 ? "ranks" : "the rest", 100.0 * rk->utilisation);
        else
            write_stage(out, st, plan, spent_on(s), "the rest", "the best possible is at least");
    }
}

static void write_proof(FILE *out, const keel_roster *r, const keel_solution *s,
                        const keel_metrics *m)
{
    fprintf(out, "Status: %s (method %s, %.2f s)\n", keel_solve_status_name(s->status), s->method,
            s->seconds);
    for (size_t i = 0; i < s->nstages; i++) {
        const keel_stage *st = &s->stages[i];
        if (strcmp(st->name, "peak") == 0)
            write_stage(out, st, m->max_utilisation, spent_on(s), "heaviest",
                        "the best possible is at least");
        else if (strcmp(st->name, "ranks") == 0)
            write_ranks_stage(out, r, s, st, m);
        else if (strcmp(st->name, "lift") == 0)
            write_stage(out, st, m->min_utilisation, spent_on(s), "lightest",
                        "the best possible is at most");
        else if (strcmp(st->name, "squares") == 0)
            write_squares_stage(out, st);
        else if (strcmp(st->name, "history") == 0)
            write_history_stage(out, st);
        else if (st->name[0] == 'c')
            write_count_stage(out, st, "continuity", "kept", "the best possible is at most");
        else
            write_count_stage(out, st, "proximity", "zones", "the best possible is at least");
    }
    /* Stages 3 and 4 may have spent some of the balance tolerance. */
    const keel_stage *lift = stage_named(s, "lift");
    if (lift && s->nstages > 2 && strcmp(s->stages[0].name, "peak") == 0 &&
        s->stages[0].value > 0 &&
        (m->max_utilisation > s->stages[0].value + 5e-10 ||
         m->min_utilisation < lift->value - 5e-10)) {
        char *line = keel_asprintf(
            "This plan spends some of the balance tolerance (%.1f points) on %s: heaviest "
            "%.1f %% and lightest %.1f %%, against %.1f %% and %.1f %% %s.",
            100.0 * s->continuity.tolerance, spent_on(s), 100.0 * m->max_utilisation,
            100.0 * m->min_utilisation, 100.0 * s->stages[0].value, 100.0 * lift->value,
            s->stages[0].status == KEEL_SOLVE_OPTIMAL && lift->status == KEEL_SOLVE_OPTIMAL
                ? "at best"
                : "in the most even plan found");
        if (line)
            keel_report_out_wrapped(out, "  ", line, 78);
        free(line);
    }
    if (s->bound_reason.text) {
        char *line = keel_asprintf("What sets the bound: %s.", s->bound_reason.text);
        if (line)
            keel_report_out_wrapped(out, "  ", line, 78);
        free(line);
    }
    if (s->continuity.applies) {
        char zero[160] = "";
        if (s->continuity.tolerance > 0 && s->continuity.kept_at_zero >= 0)
            snprintf(zero, sizeof zero,
                     "; at zero balance tolerance %s%ld, so the tolerance of %.1f points bought "
                     "%s%ld",
                     s->continuity.zero_proven ? "" : "at least ", s->continuity.kept_at_zero,
                     100.0 * s->continuity.tolerance, s->continuity.zero_proven ? "" : "at most ",
                     s->continuity.kept - s->continuity.kept_at_zero);
        bool one = s->continuity.candidates == 1;
        char *line = keel_asprintf("Continuity: %ld of %ld patient%s keep%s their nurse from the "
                                   "last shift%s.",
                                   s->continuity.kept, s->continuity.candidates, one ? "" : "s",
                                   one ? "s" : "", zero);
        if (line)
            keel_report_out_wrapped(out, "  ", line, 78);
        free(line);
    }
    if (s->proximity.applies && s->proximity.rooms > 0)
        fprintf(out, "  Proximity: %ld zone%s and %ld room%s across the nurses' assignments.\n",
                s->proximity.zones, s->proximity.zones == 1 ? "" : "s", s->proximity.rooms,
                s->proximity.rooms == 1 ? "" : "s");
    else if (s->proximity.applies)
        fprintf(out, "  Proximity: %ld zone%s across the nurses' assignments.\n",
                s->proximity.zones, s->proximity.zones == 1 ? "" : "s");
    if (s->status == KEEL_SOLVE_TIME_LIMIT)
        fputs("  The time limit ended the search: this plan is valid but not proven the most "
              "even.\n",
              out);
    fputc('\n', out);
}

static void write_staffing(FILE *out, const keel_metrics *m, const keel_staffing *st,
                           const keel_verdict *v)
{
    fputs("Staffing\n", out);
    if (v)
        keel_report_out_wrapped(out, "  ", v->text, 78);
    fprintf(out, "  care %ld min + duty %ld min against %ld min of nurse time: %.1f %%\n",
            m->care_minutes, m->duty_minutes, m->capacity_minutes, 100.0 * m->unit_utilisation);
    if (!st)
        fprintf(out, "  %.1f nurses needed at full utilisation; %zu on shift take patients\n",
                m->nurses_needed, m->ncounted);
    long work = m->care_minutes + m->duty_minutes;
    if (work > m->capacity_minutes)
        fprintf(out,
                "  The work exceeds the nurses' time by %ld min: every assignment leaves "
                "someone over 100 %%.\n",
                work - m->capacity_minutes);
    if (st) {
        size_t size = (size_t)keel_staffing_format(st, NULL, 0) + 1;
        char *buf = keel_malloc(size);
        if (buf) {
            keel_staffing_format(st, buf, size);
            write_cited(out, st->table, "  ", buf, true);
        }
        free(buf);
    }
    fputc('\n', out);
}

static void write_findings(FILE *out, const keel_law_table *t, const char *title,
                           const keel_findings *list)
{
    char prefix[64];
    if (!list || list->n == 0)
        return;
    fprintf(out, "%s\n", title);
    for (size_t i = 0; i < list->n; i++) {
        snprintf(prefix, sizeof prefix, "  [%s] ", list->items[i].rule);
        write_cited(out, t, prefix, list->items[i].message, false);
    }
    fputc('\n', out);
}

static void write_workload(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_workload *w = rep->workload;
    fputs("Care minutes per patient\n", out);
    for (size_t p = 0; p < r->npatients; p++)
        write_patient_line(out, rep, p, -1);
    fputs("\nNurses\n", out);
    for (size_t n = 0; n < r->nnurses; n++)
        fprintf(out, "  %-6s %-22s capacity %4d min  duty %3d min  limit %d patient%s%s\n",
                r->nurses[n].id, r->nurses[n].name ? r->nurses[n].name : "", w->capacity_minutes[n],
                w->duty_minutes[n], w->max_patients[n], w->max_patients[n] == 1 ? "" : "s",
                keel_workload_no_break(r, n) ? "  no break (on under half the shift)" : "");
    fputc('\n', out);
}

/* The first screen: a line per nurse with her load, a bar of her
 * utilisation (20 marks to 100 %, '>' past it) and her patients by bed;
 * the details follow.  Colour (ANSI) only when the report asks for it. */
static void write_glance(FILE *out, const keel_report *rep)
{
    const keel_roster *r = rep->roster;
    const keel_metrics *m = rep->metrics;
    const char *bar_on = rep->colour ? "\033[36m" : "", *warn_on = rep->colour ? "\033[1;31m" : "",
               *off = rep->colour ? "\033[0m" : "";
    fputs("At a glance (bar: 20 marks to 100 % of her time)\n", out);
    for (size_t n = 0; n < r->nnurses; n++) {
        const keel_nurse_metrics *nm = &m->nurses[n];
        fprintf(out, "  %-6s ", r->nurses[n].id);
        if (!nm->counted) {
            fprintf(out, "%s, takes no patients\n",
                    r->nurses[n].role == KEEL_ROLE_ORIENTEE ? "orientee"
                                                            : keel_role_name(r->nurses[n].role));
            continue;
        }
        int marks = (int)(20.0 * nm->utilisation + 0.5);
        fprintf(out, "%4d/%-4d %5.1f %% |%s", nm->load_minutes, nm->capacity_minutes,
                100.0 * nm->utilisation, bar_on);
        for (int i = 0; i < 20; i++)
            fputc(i < marks ? '#' : ' ', out);
        fprintf(out, "%s|", off);
        bool over = nm->load_minutes > nm->capacity_minutes;
        if (over) {
            fputs(warn_on, out);
            for (int i = 20; i < marks && i < 30; i++)
                fputc('>', out);
            fprintf(out, " OVER%s", off);
        }
        fputc(' ', out);
        for (size_t p = 0; p < r->npatients; p++)
            if (keel_report_plan_holds(rep, p, n))
                fprintf(out, " %s", r->patients[p].bed ? r->patients[p].bed : r->patients[p].id);
        fputc('\n', out);
    }
    fputc('\n', out);
}

keel_status keel_report_text(const keel_report *rep, FILE *out)
{
    const keel_solution *s = rep->solution;
    const keel_law_table *t = rep->roster->policy.ratio_table;
    bool best_effort = rep->kind == KEEL_REPORT_ASSIGN && s && s->best_effort && rep->nurse_of;
    if (best_effort) /* on the first line, before anyone reads on */
        fputs("BEST-EFFORT PLAN, not an assignment: no valid assignment exists and this plan "
              "breaks rules.\n\n",
              out);
    write_heading(out, rep);
    if (rep->nurse_of && rep->metrics)
        write_glance(out, rep);
    write_ratio_table(out, rep->roster);
    if (rep->kind == KEEL_REPORT_CHECK)
        write_workload(out, rep);
    if (s && s->status == KEEL_SOLVE_INFEASIBLE && rep->kind == KEEL_REPORT_ASSIGN) {
        fputs("No valid assignment exists for this roster.\n\n", out);
        write_findings(out, t, "Why", &s->diagnoses);
        if (best_effort) {
            fprintf(out,
                    "BEST-EFFORT PLAN - it breaks the rules listed below (severity %ld).\n"
                    "Escalate: tell the house supervisor before using any of it.\n\n",
                    s->severity);
            write_nurse_blocks(out, rep);
            write_handoffs(out, rep);
            write_balance(out, rep->metrics);
            write_findings(out, t, "Rules this best-effort plan breaks", rep->violations);
        }
    } else if (rep->nurse_of) {
        if (rep->kind == KEEL_REPORT_CHECK)
            fputs("The roster's own plan\n", out);
        write_nurse_blocks(out, rep);
        write_handoffs(out, rep);
        write_expected(out, rep);
        write_balance(out, rep->metrics);
        if (rep->course)
            write_course(out, rep);
    }
    if (rep->kind == KEEL_REPORT_ASSIGN && s && s->status != KEEL_SOLVE_INFEASIBLE)
        write_proof(out, rep->roster, s, rep->metrics);
    if (rep->kind == KEEL_REPORT_CHECK) {
        if (rep->nurse_of)
            write_findings(out, t, "Rules the plan breaks", rep->violations);
        if (rep->nurse_of && rep->violations && rep->violations->n == 0)
            fputs("The plan keeps every rule keel checks.\n\n", out);
        if (s && s->status == KEEL_SOLVE_INFEASIBLE)
            write_findings(out, t, "No valid assignment exists", &s->diagnoses);
        else if (s && s->nstages > 0 && strcmp(s->stages[0].name, "peak") == 0) {
            bool recorded = false; /* a record of the shift: the best is planned from its start */
            for (size_t p = 0; p < rep->roster->npatients; p++)
                recorded = recorded || rep->roster->patients[p].nrecord > 0;
            fprintf(out, "Best possible heaviest utilisation%s: %.1f %% (%s)",
                    recorded ? ", planning the whole shift from its start" : "",
                    100.0 * s->stages[0].value,
                    s->stages[0].status == KEEL_SOLVE_OPTIMAL ? "proven" : "best found, not proven");
            if (rep->nurse_of)
                fprintf(out, "; this plan's: %.1f %%", 100.0 * rep->metrics->max_utilisation);
            fputc('\n', out);
            double over = rep->nurse_of ? rep->metrics->max_utilisation - s->stages[0].value : 0;
            if ((s->continuity.applies || s->proximity.applies) && over > 5e-10 &&
                over <= s->continuity.tolerance + 5e-10)
                fprintf(out,
                        "The plan is within the balance tolerance (%.1f points) that keel "
                        "spends on continuity\nand proximity.\n",
                        100.0 * s->continuity.tolerance);
            fputc('\n', out);
        }
    }
    if (keel_report_plan_uses_nas(rep->roster))
        fprintf(out, "* %s\n\n", keel_nas_note());
    write_staffing(out, rep->metrics, rep->staffing, rep->verdict);
    fprintf(out, "%s\n", KEEL_CAUTION);
    return KEEL_OK;
}
