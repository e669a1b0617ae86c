/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_clock.c - the shift's clock against exhaustive enumeration on small
 * random rosters with churn: nurses who start late or leave early,
 * patients who arrive or leave, night shifts across midnight.  The
 * enumeration is written here again from docs/model.md ("The clock"),
 * without keel's workload, tally or solver: every way to give each patient
 * a chain of nurses (the first on at arrival, the next when she leaves),
 * every counting rule at every moment, care and capacity by the documented
 * arithmetic.  keel's stages 1 and 2 must reach the same optima, and its
 * plan must keep every rule and carry the loads it reports.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "keel/keel.h"
#include "workload_internal.h"
#include "tu_ranks.h"

#define MAXN 3
#define MAXP 5
#define MAXCHAIN 4
#define SHIFT 720

/* ---- Random rosters ------------------------------------------------------- */

static unsigned long long seed;

static int draw(int n)
{
    seed = seed * 6364136223846793005ULL + 1442695040888963407ULL;
    return (int)((seed >> 33) % (unsigned long long)n);
}

typedef struct spec {
    int nn, np, start_hour;
    int nstart[MAXN], nend[MAXN], limit;
    bool nskill[MAXN];
    int arrive[MAXP], leave[MAXP], care[MAXP], ratio[MAXP];
    bool need[MAXP], high[MAXP];
    int high_max; /* -1: no rule */
} spec;

static void clock_text(const spec *s, int offset, char *buf)
{
    int t = (s->start_hour * 60 + offset) % 1440;
    sprintf(buf, "\"%02d:%02d\"", t / 60, t % 60);
}

static void make(spec *s, char *text, size_t size)
{
    static const int starts[] = {0, 0, 0, 240};
    static const int ends[] = {720, 720, 720, 480};
    static const int arrivals[] = {0, 0, 0, 240, 360};
    static const int departures[] = {720, 720, 720, 240, 480, 600};
    memset(s, 0, sizeof *s);
    s->nn = 2 + draw(MAXN - 1);
    s->np = 3 + draw(MAXP - 2);
    s->start_hour = draw(2) ? 7 : 19;
    s->limit = 2 + draw(2);
    s->high_max = draw(3) == 0 ? 1 : -1;
    size_t k = (size_t)snprintf(text, size,
                                "unit: {name: \"Test unit\", type: med-surg}\n"
                                "shift: {start: \"%02d:00\", minutes: %d, break_minutes: 60}\n"
                                "policy: {max_patients: %d",
                                s->start_hour, SHIFT, s->limit);
    if (s->high_max >= 0)
        k += (size_t)snprintf(text + k, size - k,
                              ", acuity_minutes: {1: 60, 4: 200}, "
                              "high_acuity: {level: 4, max_per_nurse: %d}",
                              s->high_max);
    k += (size_t)snprintf(text + k, size - k, "}\nnurses:\n");
    for (int n = 0; n < s->nn; n++) {
        char a[16], b[16];
        s->nstart[n] = starts[draw(4)];
        s->nend[n] = ends[draw(4)];
        if (s->nend[n] <= s->nstart[n])
            s->nend[n] = SHIFT;
        s->nskill[n] = n == 0 || draw(2);
        clock_text(s, s->nstart[n], a);
        clock_text(s, s->nend[n], b);
        k += (size_t)snprintf(text + k, size - k, "  - {id: N%d, start: %s, end: %s%s}\n", n + 1, a,
                              b, s->nskill[n] ? ", skills: [tele]" : "");
    }
    k += (size_t)snprintf(text + k, size - k, "patients:\n");
    for (int p = 0; p < s->np; p++) {
        char a[16], b[16];
        s->arrive[p] = arrivals[draw(5)];
        s->leave[p] = departures[draw(6)];
        if (s->leave[p] <= s->arrive[p])
            s->leave[p] = SHIFT;
        s->need[p] = draw(4) == 0;
        s->ratio[p] = draw(5) == 0 ? 1 + draw(2) : 0;
        s->high[p] = s->high_max >= 0 && draw(3) == 0;
        s->care[p] = s->high_max >= 0 ? (s->high[p] ? 200 : 60) : 30 + draw(170);
        clock_text(s, s->arrive[p], a);
        clock_text(s, s->leave[p], b);
        k += (size_t)snprintf(text + k, size - k, "  - {id: P%d, arrives_at: %s, leaves_at: %s",
                              p + 1, a, b);
        if (s->high_max >= 0)
            k += (size_t)snprintf(text + k, size - k, ", acuity: %d", s->high[p] ? 4 : 1);
        else
            k += (size_t)snprintf(text + k, size - k, ", care_minutes: %d", s->care[p]);
        if (s->need[p])
            k += (size_t)snprintf(text + k, size - k, ", needs: [tele]");
        if (s->ratio[p])
            k += (size_t)snprintf(text + k, size - k, ", ratio: \"1:%d\"", s->ratio[p]);
        k += (size_t)snprintf(text + k, size - k, "}\n");
    }
}

/* ---- Exhaustive enumeration, from the definitions --------------------------- */

/* One way to care for a patient: nurses in turn, each until she leaves. */
typedef struct chain {
    int len;
    int nurse[MAXCHAIN];
    int from[MAXCHAIN]; /* she holds the patient over [from[i], from[i + 1]) */
    int until[MAXCHAIN];
} chain;

typedef struct search {
    const spec *s;
    chain chains[MAXP][64];
    int nchains[MAXP];
    int pick[MAXP];
    bool found;
    long long bu_num, bu_den; /* best heaviest utilisation */
    tu_plans plans;           /* every valid plan's loads, for the ranks and the lift */
} search;

static bool may_take(const spec *s, int p, int n)
{
    return !s->need[p] || s->nskill[n];
}

static void chains_from(search *S, int p, chain c, int t)
{
    const spec *s = S->s;
    for (int n = 0; n < s->nn; n++) {
        if (!may_take(s, p, n) || s->nstart[n] > t || s->nend[n] <= t)
            continue;
        chain d = c;
        d.nurse[d.len] = n;
        d.from[d.len] = t;
        int until = s->nend[n] < s->leave[p] ? s->nend[n] : s->leave[p];
        d.until[d.len] = until;
        d.len++;
        if (until == s->leave[p])
            S->chains[p][S->nchains[p]++] = d;
        else if (d.len < MAXCHAIN)
            chains_from(S, p, d, until);
    }
}

/* ceil(a * b / c) */
static long long ceil_share(long long a, long long b, long long c)
{
    return (a * b + c - 1) / c;
}

/* Care nurse n carries for patient p under chain c. */
static long long carried(const spec *s, int p, const chain *c, int n)
{
    long long a = s->arrive[p], b = s->leave[p];
    long long present = ceil_share(s->care[p], b - a, SHIFT), sum = 0;
    for (int i = 0; i < c->len; i++)
        if (c->nurse[i] == n)
            sum += ceil_share(present, c->until[i] - a, b - a) -
                   ceil_share(present, c->from[i] - a, b - a);
    return sum;
}

/* Time on the unit less the shift's 60-minute break, which a nurse takes
 * only when she is on for at least half the shift (docs/roster-format.md,
 * "break_minutes"). */
static int capacity(const spec *s, int n)
{
    int on = s->nend[n] - s->nstart[n];
    return 2 * on < SHIFT ? on : on - 60;
}

/* Every counting rule at every minute on the hour grid (all times here
 * are on the half hour, so checking each half hour checks every moment). */
static bool keeps_rules(const search *S)
{
    const spec *s = S->s;
    for (int t = 0; t < SHIFT; t += 30) {
        for (int n = 0; n < s->nn; n++) {
            int k = 0, high = 0, tightest = 99;
            for (int p = 0; p < s->np; p++) {
                const chain *c = &S->chains[p][S->pick[p]];
                for (int i = 0; i < c->len; i++) {
                    if (c->nurse[i] != n || t < c->from[i] || t >= c->until[i])
                        continue;
                    k++;
                    high += s->high[p];
                    if (s->ratio[p] && s->ratio[p] < tightest)
                        tightest = s->ratio[p];
                }
            }
            if (k > s->limit || k > tightest || (s->high_max >= 0 && high > s->high_max))
                return false;
        }
    }
    return true;
}

static void visit(search *S, int p)
{
    const spec *s = S->s;
    if (p < s->np) {
        for (int i = 0; i < S->nchains[p]; i++) {
            S->pick[p] = i;
            visit(S, p + 1);
        }
        return;
    }
    if (!keeps_rules(S))
        return;
    long long hi_num = -1, hi_den = 1, loads[TU_RANKS_MAX];
    for (int n = 0; n < s->nn; n++) {
        long long load = 0;
        for (int q = 0; q < s->np; q++)
            load += carried(s, q, &S->chains[q][S->pick[q]], n);
        long long cap = capacity(s, n);
        if (hi_num < 0 || load * hi_den > hi_num * cap)
            hi_num = load, hi_den = cap;
        loads[n] = load;
    }
    if (!S->found || hi_num * S->bu_den < S->bu_num * hi_den)
        S->bu_num = hi_num, S->bu_den = hi_den;
    S->found = true;
    S->plans.nnurses = (size_t)s->nn;
    tu_plans_add(&S->plans, loads);
}

/* ---- keel against the enumeration ------------------------------------------- */

/* The chain of patient p under keel's plan, from its parts. */
static chain chain_of(const keel_workload *w, const int *nurse_of, int p)
{
    chain c = {0};
    for (int q = w->first_part[p]; q < w->first_part[p + 1]; q++) {
        if (c.len > 0 && c.nurse[c.len - 1] == nurse_of[q]) {
            c.until[c.len - 1] = w->part_end[q];
            continue;
        }
        c.nurse[c.len] = nurse_of[q];
        c.from[c.len] = w->part_start[q];
        c.until[c.len] = w->part_end[q];
        c.len++;
    }
    return c;
}

/* What the rosters covered, so that a change that stops exercising the
 * clock shows: rosters without any plan, with planned hand-offs, and with
 * arrivals or departures inside the shift. */
static int ninfeasible, nhandoffs, nchurn, nranked;

static void check_one(void)
{
    static char text[8192];
    spec s;
    make(&s, text, sizeof text);
    keel_roster *r = NULL;
    keel_workload *w = NULL;
    keel_solution *sol = NULL;
    keel_error err;
    keel_error_init(&err);
    if (keel_roster_parse("clock.yaml", text, strlen(text), &r, &err) != KEEL_OK) {
        print_message("%s\n%s\n", text, err.nproblems ? err.problems[0].message : "");
        fail();
    }
    assert_int_equal(keel_workload_compute(r, &w, &err), KEEL_OK);
    nhandoffs += w->npatients > w->npeople;
    nchurn += w->nmoments > 1;
    keel_solve_options opt = {.time_limit_ms = 20000};
    assert_int_equal(keel_solve(r, w, &opt, &sol, &err), KEEL_OK);

    search *S = calloc(1, sizeof *S);
    S->s = &s;
    for (int p = 0; p < s.np; p++)
        chains_from(S, p, (chain){0}, s.arrive[p]);
    visit(S, 0);
    if (!S->found) {
        ninfeasible++;
        if (sol->status != KEEL_SOLVE_INFEASIBLE)
            print_message("%s\n", text);
        assert_int_equal(sol->status, KEEL_SOLVE_INFEASIBLE);
    } else {
        if (sol->status != KEEL_SOLVE_OPTIMAL)
            print_message("%s\nstatus %s\n", text, keel_solve_status_name(sol->status));
        assert_int_equal(sol->status, KEEL_SOLVE_OPTIMAL);
        /* The ranks and the lift over the enumerated plans (tu_ranks.h). */
        int cap[TU_RANKS_MAX];
        bool counted[TU_RANKS_MAX];
        for (int n = 0; n < s.nn; n++) {
            cap[n] = capacity(&s, n);
            counted[n] = keel_workload_counted(w, (size_t)n);
        }
        tu_ranks ranks;
        tu_ranks_compute(&S->plans, cap, counted, &ranks);
        nranked += ranks.nranks > 0;
        double u = (double)S->bu_num / (double)S->bu_den;
        bool same = tu_ranks_match(&ranks, sol);
        if (sol->stages[0].value > u + 1e-9 || sol->stages[0].value < u - 1e-9 || !same)
            print_message("%s\nkeel U %.9f, enumeration U %.9f L %.9f, %zu ranks\n", text,
                          sol->stages[0].value, u, keel_ratio_value(ranks.lift), ranks.nranks);
        assert_true(sol->stages[0].value <= u + 1e-9 && sol->stages[0].value >= u - 1e-9);
        assert_true(same);
        /* keel's plan is one of the enumerated chains and keeps every rule;
         * the loads keel reports follow the documented arithmetic. */
        keel_metrics *m = NULL;
        assert_int_equal(keel_metrics_compute(w, sol->nurse_of, &m, &err), KEEL_OK);
        for (int p = 0; p < s.np; p++) {
            chain c = chain_of(w, sol->nurse_of, p);
            bool listed = false;
            for (int i = 0; i < S->nchains[p] && !listed; i++) {
                const chain *d = &S->chains[p][i];
                listed = d->len == c.len;
                for (int j = 0; j < c.len && listed; j++)
                    listed = d->nurse[j] == c.nurse[j] && d->from[j] == c.from[j] &&
                             d->until[j] == c.until[j];
                if (listed)
                    S->pick[p] = i;
            }
            assert_true(listed);
        }
        assert_true(keeps_rules(S));
        for (int n = 0; n < s.nn; n++) {
            long long load = 0;
            for (int p = 0; p < s.np; p++)
                load += carried(&s, p, &S->chains[p][S->pick[p]], n);
            assert_int_equal(m->nurses[n].load_minutes, load);
            assert_int_equal(m->nurses[n].capacity_minutes, capacity(&s, n));
        }
        keel_metrics_free(m);
    }
    free(S->plans.load);
    free(S);
    keel_solution_free(sol);
    keel_workload_free(w);
    keel_roster_free(r);
    keel_error_fini(&err);
}

static void test_the_clock_matches_exhaustive_enumeration(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every chain of nurses per patient, by
     * the definitions of docs/model.md ("The clock").  Half-open stays, and
     * no hand-off when a patient leaves as her nurse does, are conventions
     * (common practice, no source). */
    seed = 20261202;
    int rosters = 2000;
    for (int i = 0; i < rosters; i++)
        check_one();
    print_message("# %d rosters: %d without a valid plan, %d with parts cut at a nurse's end, "
                  "%d with more than one moment, %d with ranks\n",
                  rosters, ninfeasible, nhandoffs, nchurn, nranked);
    assert_true(ninfeasible > 0 && ninfeasible < rosters / 2);
    assert_true(nhandoffs > rosters / 4 && nchurn > rosters / 2 && nranked > rosters / 10);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_the_clock_matches_exhaustive_enumeration),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
