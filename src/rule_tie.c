/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_tie.c - the one row pattern several rules share (see rule.h): a
 * binary that is 1 when a nurse holds any patient of one kind (a zone, a
 * precaution side, a ratio class).
 */
#include "lp.h"
#include "rule.h"
#include "workload_internal.h"

int keelRuleTie(const keel_rows *R, int (*trait)(const keel_workload *w, size_t part), int v,
                double big, double cost)
{
    int row = 0;
    for (size_t i = 0; i < R->ncols; i++) {
        if (trait(R->w, R->part[i]) != v)
            continue;
        if (!row)
            row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, 0.0);
        keel_lp_put(R->lp, row, R->col[i], 1.0);
    }
    if (!row)
        return 0;
    int x = keel_lp_indicator(R->lp, row, big, R->near_row > 0 ? 0.0 : cost);
    if (R->near_row > 0 && cost > 0)
        keel_lp_put(R->lp, R->near_row, x, cost);
    for (size_t i = 0; i < R->ncols && cost > 0; i++) {
        if (trait(R->w, R->part[i]) != v)
            continue;
        double most = R->most[i] < big ? R->most[i] : big;
        int alone = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, 0.0);
        keel_lp_put(R->lp, alone, R->col[i], 1.0);
        keel_lp_put(R->lp, alone, x, -most);
    }
    return x;
}
