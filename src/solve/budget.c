/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * budget.c - the solver's clock and the one table of time shares (see
 * budget.h).  Read top to bottom, the table follows a solve: the balance
 * stages, then the stages that follow, then the questions and the chains
 * of answerers inside them, then the zones.
 */
#include "budget.h"

#include <time.h>

const keel_share keel_budget_shares[KEEL_NSHARES] = {
    [KEEL_SHARE_BALANCE] = {"balance", 6, 10, 0, 0,
                            "stages 1-2 (peak, lift) get 60 % of the limit when "
                            "continuity or proximity follow, else all of it"},
    [KEEL_SHARE_POLISH] = {"polish", 1, 2, 0, 0,
                           "on pooled units of more than 100 patients, the zone polish before "
                           "the stages: half of the balance time"},
    [KEEL_SHARE_PEAK] = {"peak", 7, 10, 0, 0,
                         "stage 1 may use 70 % of the balance time; the lift gets the rest"},
    [KEEL_SHARE_RANKS] = {"ranks", 1, 2, 0, 0,
                          "the ranks beyond a pinned peak: half of the balance time the peak "
                          "leaves; the lift gets the rest"},
    [KEEL_SHARE_DESCENT] = {"descent", 1, 6, 0, 0,
                            "the greedy method's local descent: a sixth of the balance time "
                            "(1 s of the default limit with stages 3-4)"},
    [KEEL_SHARE_QUESTION] = {"question", 1, 5, 0, 1,
                             "while the bisection narrows its range, one question gets a fifth "
                             "of the time left, so one hard question cannot stall it; the "
                             "decisive question gets all that is left"},
    [KEEL_SHARE_CHAIN_LOCAL] = {"chain.local", 1, 5, 0, 0,
                                "the window chain's local search: a fifth of the question's time"},
    [KEEL_SHARE_CHAIN_FIT] = {"chain.fit", 1, 2, 0, 0,
                              "the window chain's dedicated search: until half of the question's "
                              "time; GLPK gets the rest"},
    [KEEL_SHARE_VALID_ILP] = {"valid.ilp", 1, 3, 0, 1,
                              "the valid chain: GLPK on the bare question gets a third of what "
                              "is left (it proves most rosters without an assignment quickly); "
                              "the least severity gets the rest"},
    [KEEL_SHARE_CONFLICT] = {"conflict", 0, 0, 0, 0,
                             "the diagnosis of conflicting rules: each rule group still to test "
                             "gets an equal share"},
    [KEEL_SHARE_KEEP] = {"keep", 1, 2, 0, 0,
                         "continuity gets half of the time after the balance when proximity "
                         "follows, else all of it"},
    [KEEL_SHARE_KEEP_ZERO] = {"keep.zero", 1, 3, 0, 0,
                              "continuity at zero tolerance (what the tolerance bought): a third "
                              "of the continuity stage"},
    [KEEL_SHARE_NEAR_LOCAL] = {"near.local", 1, 5, 0, 0,
                               "proximity's local search: a fifth of the stage; GLPK the rest"},
    [KEEL_SHARE_NEAR] = {"near", 1, 2, 0, 0,
                         "with --history, continuity and proximity get half of the time after "
                         "the balance and fairness forward the rest: each is one GLPK model "
                         "from a good start"},
    [KEEL_SHARE_ZONE_TRY] = {"zone.try", 0, 0, 5, 0,
                             "by zone, stage 1 of one zone with k nurses: an equal share of the "
                             "tries left, at most a fifth (most are proven at once)"},
    [KEEL_SHARE_ZONE_LIFT] = {"zone.lift", 1, 4, 0, 1,
                              "by zone, the lift of one zone with k nurses: a quarter of the "
                              "time left"},
    [KEEL_SHARE_ZONE_EACH] = {"zone.each", 0, 0, 0, 0,
                              "the zone polish: each zone still to polish gets an equal share"},
    [KEEL_SHARE_TRADE] = {"trade", 0, 0, 0, 0,
                          "a zone trade solves its two zones exactly: the first a quarter of the "
                          "time left (k = 4), the second a third (k = 3)"},
    [KEEL_SHARE_FRONTIER] = {"frontier", 0, 0, 0, 0,
                             "a rebalance: each option of the hand-off frontier still to solve "
                             "gets an equal share of the time left (what a quickly proven option "
                             "leaves goes to the later ones)"},
};

long long keel_budget_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (long long)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

long long keel_budget_until(keel_share_id id, long long from_ms, long long deadline_ms, size_t k)
{
    const keel_share *s = &keel_budget_shares[id];
    long long left = deadline_ms - from_ms, share;
    if (s->den > 0) {
        share = left * s->num / s->den;
    } else {
        long long parts = k > 0 ? (long long)k : 1;
        if (s->most_parts > 0 && parts > s->most_parts)
            parts = s->most_parts;
        share = left / parts;
    }
    share += s->plus_ms;
    return from_ms + (share > 0 ? share : 1);
}
