/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * measure.h - the solver's shared measures (internal; the bottom layer of
 * src/solve/): exact utilisations, loads, the heaviest and lightest
 * utilisation, sums of squares, continuity and proximity counts, whether a
 * plan keeps every rule, the balance windows.  Every file of the solver may
 * call these; they call nothing of the solver.
 *
 * Utilisations are exact fractions load/capacity of whole minutes, so the
 * stages compare them without rounding: a/b < c/d  <=>  a*d < c*b.
 */
#ifndef KEEL_SOLVE_MEASURE_H
#define KEEL_SOLVE_MEASURE_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "workload_internal.h"

/* An exact utilisation: num minutes of load over den minutes of capacity. */
typedef struct keel_ratio {
    long long num;
    long long den; /* > 0 */
} keel_ratio;

static inline int keel_ratio_cmp(keel_ratio a, keel_ratio b)
{
    long long l = a.num * b.den, r = b.num * a.den;
    return (l > r) - (l < r);
}

static inline double keel_ratio_value(keel_ratio a)
{
    return (double)a.num / (double)a.den;
}

/* Relative gap between a stage's value and its proven limit:
 * |value - bound| / max(|value|, |bound|), 0 when both are 0. */
static inline double keel_gap(double value, double bound)
{
    double a = value < 0 ? -value : value, b = bound < 0 ? -bound : bound;
    double d = value - bound, m = a > b ? a : b;
    return m > 0 ? (d < 0 ? -d : d) / m : 0.0;
}

/* floor(x / d) and ceil(x / d) for d > 0. */
static inline long long keel_floor_div(long long x, long long d)
{
    return x >= 0 ? x / d : -((-x + d - 1) / d);
}

static inline long long keel_ceil_div(long long x, long long d)
{
    return -keel_floor_div(-x, d);
}

/* Loads of every nurse under nurse_of (-1 entries ignored) into load[nnurses]. */
void keel_measure_loads(const keel_workload *w, const int *nurse_of, long long *load);

/* Utilisation of nurse n under nurse_of. */
keel_ratio keel_measure_utilisation(const keel_workload *w, const int *nurse_of, size_t n);

/* Heaviest and lightest utilisation of the counted nurses under nurse_of.
 * With no counted nurse both are 0/1. */
keel_ratio keel_measure_peak(const keel_workload *w, const int *nurse_of);
keel_ratio keel_measure_lift(const keel_workload *w, const int *nurse_of);

/* Sum of load^2 / capacity over the counted nurses under nurse_of (NULL: no
 * patient placed, every nurse at her duty, which is a floor). */
double keel_measure_squares(const keel_workload *w, const int *nurse_of);

/* Stage 6's sum over the counted nurses of weight[n] x load(n) / capacity(n)
 * under nurse_of. */
double keel_measure_history(const keel_workload *w, const int *nurse_of, const double *weight);

/* Sets *valid when nurse_of keeps every hard rule of w (every patient
 * placed), by the tally.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_measure_validate(const keel_workload *w, const int *nurse_of, bool *valid);

/* Patients of nurse_of kept with their previous nurse. */
long long keel_measure_kept(const keel_workload *w, const int *nurse_of);

/* Zones and rooms of every nurse under nurse_of, summed over nurses. */
void keel_measure_spread(const keel_workload *w, const int *nurse_of, long long *zones,
                         long long *rooms);

/* True when nurses a and b are interchangeable for every patient: the same
 * capacity, duty and rules (keelRuleSameNurses()). */
bool keel_measure_alike(const keel_workload *w, size_t a, size_t b);

/* True when each nurse works in one zone: policy.max_zones 1, every
 * patient in a zone, at least two zones, no clock (where the zone polish and
 * the zone-split floor apply). */
bool keel_measure_one_zone_each(const keel_workload *w);

/* The care windows of every counted nurse around a balance (docs/model.md,
 * "The order of objectives"): with level[n] nurse n's ceiling (the peak U*,
 * or her level from stage "ranks"), lightest L* and tolerance t (in
 * 1/KEEL_TOLERANCE_SCALE),
 *   hi[n] = floor((level[n] + t) capacity(n)) - duty(n)
 *   lo[n] = max(0, ceil((L* - t) capacity(n)) - duty(n));
 * nurses who are not counted get lo 0, hi -1. */
void keel_measure_windows(const keel_workload *w, const keel_ratio *level, keel_ratio lift,
                          long long t, long long *lo, long long *hi);

/* How far care c is from counted nurse n's window lo[n]..hi[n], in
 * minutes (0 for a nurse who is not counted): the local searches' excess. */
static inline long long keel_measure_window_off(const keel_workload *w, const long long *lo,
                                                const long long *hi, size_t n, long long c)
{
    if (!keel_workload_counted(w, n))
        return 0;
    return c > hi[n] ? c - hi[n] : c < lo[n] ? lo[n] - c : 0;
}

/* Patients by eligibility: class_of[p], each class's first member, care
 * and size; within[a * k + b] says class a's nurses are all class b's.  A
 * unit has few classes (by needs, locks and avoid lists), so the group
 * floors of the bound's words and of the sums answerer cost classes
 * squared, not patients squared. */
typedef struct keel_classes {
    size_t k;
    size_t *class_of, *first, *size;
    long long *care;
    bool *within;
} keel_classes;

/* Fills *c for w; false when memory ran out (free it either way). */
bool keel_measure_classes(const keel_workload *w, keel_classes *c);
void keel_measure_classes_free(keel_classes *c);

/* The fixed-seed coin of the local searches (xorshift64): the next value
 * of *state, which must not be zero. */
static inline unsigned long long keel_measure_coin(unsigned long long *state)
{
    *state ^= *state << 13;
    *state ^= *state >> 7;
    *state ^= *state << 17;
    return *state;
}

/* The local searches' tabu memory: patient p may not go back to nurse n
 * until a given step.  Each step forbids at most a few pairs for at most a
 * few steps, so a ring of the latest entries holds every live one: memory
 * grows with the census, not with census x nurses, and a patient that has
 * not moved lately is answered in one look. */
typedef struct keel_tabu_entry {
    size_t p, n;
    long until;
} keel_tabu_entry;

typedef struct keel_tabu {
    keel_tabu_entry *ring; /* [size]: the latest entries, ring[at - 1] newest */
    size_t size, at;
    long *latest; /* [npatients]: the last step p is tabu anywhere, as far as it was set */
} keel_tabu;

/* An empty tabu memory for npatients patients holding the last size
 * entries (size: the most entries written within the longest tenure).
 * False when memory ran out (free it either way). */
bool keel_measure_tabu_init(keel_tabu *tabu, size_t npatients, size_t size);
void keel_measure_tabu_free(keel_tabu *tabu);

/* Patient p may not go back to nurse n before step until. */
void keel_measure_tabu_set(keel_tabu *tabu, size_t p, size_t n, long until);

/* True when p may go to n at step: the latest entry for the pair, if it is
 * still in the ring, has run out. */
bool keel_measure_tabu_allows(const keel_tabu *tabu, size_t p, size_t n, long step);

#endif
