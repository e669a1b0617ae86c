/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * bound_simple.c - the simple proven limits (see bound.h): no valid
 * assignment has its heaviest utilisation below the floor, nor its
 * lightest above the ceiling.
 *
 *   floor   = max( each counted nurse's duty / capacity,
 *                  each patient on the eligible nurse it suits best,
 *                  the unit's care and duty / the counted nurses' capacity )
 *   ceiling = the unit's care and duty / the counted nurses' capacity
 */
#include "bound.h"

/* Total work over total capacity of the counted nurses. */
static keel_ratio unit_average(const keel_workload *w)
{
    keel_ratio avg = {0, 0};
    for (size_t p = 0; p < w->npatients; p++)
        avg.num += w->care_minutes[p];
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        avg.num += w->duty_minutes[n];
        avg.den += w->capacity_minutes[n];
    }
    if (avg.den == 0)
        avg = (keel_ratio){0, 1};
    return avg;
}

keel_ratio keel_bound_simple_peak(const keel_workload *w)
{
    keel_ratio floor = unit_average(w);
    for (size_t n = 0; n < w->nnurses; n++) {
        keel_ratio duty = {w->duty_minutes[n], w->capacity_minutes[n]};
        if (keel_workload_counted(w, n) && keel_ratio_cmp(duty, floor) > 0)
            floor = duty;
    }
    for (size_t p = 0; p < w->npatients; p++) {
        bool any = false;
        keel_ratio best = {0, 1};
        for (size_t n = 0; n < w->nnurses; n++) {
            if (!keel_workload_eligible(w, p, n))
                continue;
            keel_ratio u = {(long long)w->duty_minutes[n] + w->care_minutes[p],
                            w->capacity_minutes[n]};
            if (!any || keel_ratio_cmp(u, best) < 0)
                best = u;
            any = true;
        }
        if (any && keel_ratio_cmp(best, floor) > 0)
            floor = best;
    }
    return floor;
}

keel_ratio keel_bound_simple_lift(const keel_workload *w)
{
    return unit_average(w);
}
