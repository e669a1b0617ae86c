/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * heur_homes.c - a home zone for each nurse who takes patients, so that
 * the greedy placement can keep policy.max_zones on a large pooled unit.
 *
 * Placing patients heaviest first across the whole unit spreads each zone's
 * patients over many nurses; once every nurse has used her zones, the last
 * patients of a zone find no nurse.  Deciding first which nurses work where
 * avoids that.  The homes are chosen in five passes:
 *
 *   pins      a zoned patient with one eligible nurse (a lock, a rare
 *             skill) brings that nurse home to the patient's zone;
 *   counts    the nurses left are grouped by patient limit and room
 *             (capacity less duty); a table over the zones chooses how
 *             many of each group each zone gets, so that every zone has
 *             places for its patients and nurses for its high-acuity
 *             patients, with the least highest care per minute of room;
 *             the nurses themselves are then chosen one at a time, for the
 *             zone short of the most places when its patients are matched
 *             to its nurses (shortage()), the nurse who leaves it shortest;
 *   cover     patients with the fewest eligible nurses first: a patient
 *             none of whose zone's nurses may take gets the eligible nurse
 *             without a home who may take the fewest patients overall;
 *   fill      each nurse still without a home goes to the zone short of
 *             the most places (patients over the zone's patient limits, or
 *             high-acuity patients over what its nurses may hold), else to
 *             the zone with the highest care per minute of capacity; of the
 *             nurses, the one eligible for most of that zone's patients;
 *   trade     nurses are moved or exchanged between two zones while that
 *             lowers the two zones' shortage.
 *
 * A heuristic: the homes only steer the placement; every rule is still
 * checked by the tally, and a patient its zone cannot hold is placed after.
 */
#include <stdlib.h>

#include "alloc.h"
#include "budget.h"
#include "heur.h"
#include "measure.h"
#include "workload_internal.h"

typedef struct homes {
    const keel_workload *w;
    int *home;           /* [nnurses]: zone, or -1 */
    size_t *eligible_in; /* [nnurses * nzones]: zoned parts n may take, per zone */
    size_t *eligible;    /* [nnurses]: parts n may take */
    long long *places;   /* [nzones]: patient places of the zone's nurses */
    long long *high;     /* [nzones]: high-acuity places */
    long long *capacity; /* [nzones]: capacity less duty of the zone's nurses */
    long long *parts;    /* [nzones]: parts in the zone */
    long long *highs;    /* [nzones]: high-acuity parts */
    long long *care;     /* [nzones] */
    int *match;          /* [npatients]: the shortage's matching */
    int *used;           /* [nnurses] */
    bool *seen;          /* [nnurses] */
} homes;

/* Capacity less duty. */
static long long room_of(const keel_workload *w, size_t n)
{
    return (long long)w->capacity_minutes[n] - w->duty_minutes[n];
}

static void settle(homes *H, size_t n, int z)
{
    const keel_workload *w = H->w;
    H->home[n] = z;
    H->places[z] += w->max_patients[n];
    H->high[z] += w->max_high_acuity == KEEL_ABSENT ? w->max_patients[n] : w->max_high_acuity;
    H->capacity[z] += room_of(w, n);
}

static bool homeless(const homes *H, size_t n)
{
    return keel_workload_counted(H->w, n) && H->home[n] < 0;
}

/* The homeless nurse eligible for p who may take the fewest parts, or -1. */
static int narrowest_for(const homes *H, size_t p)
{
    int best = -1;
    for (size_t n = 0; n < H->w->nnurses; n++)
        if (homeless(H, n) && keel_workload_eligible(H->w, p, n) &&
            (best < 0 || H->eligible[n] < H->eligible[best]))
            best = (int)n;
    return best;
}

static bool covered(const homes *H, size_t p)
{
    for (size_t n = 0; n < H->w->nnurses; n++)
        if (H->home[n] == H->w->zone[p] && keel_workload_eligible(H->w, p, n))
            return true;
    return false;
}

/* A zoned part and how many counted nurses may take it. */
typedef struct ranked {
    size_t nurses, p;
} ranked;

/* Parts with fewer eligible nurses first, ties by index. */
static int fewest_nurses(const void *a, const void *b)
{
    const ranked *x = a, *y = b;
    if (x->nurses != y->nurses)
        return x->nurses < y->nurses ? -1 : 1;
    return (x->p > y->p) - (x->p < y->p);
}

/* The zone that most needs one more nurse, among zones not closed. */
static int neediest(const homes *H, const bool *closed)
{
    int best = -1;
    long long best_short = 0;
    for (size_t z = 0; z < H->w->nzones; z++) {
        long long s = H->parts[z] - H->places[z];
        if (H->highs[z] - H->high[z] > s)
            s = H->highs[z] - H->high[z];
        if (!closed[z] && s > best_short) {
            best = (int)z;
            best_short = s;
        }
    }
    if (best >= 0)
        return best;
    /* care[z] / capacity[z] largest; a zone without capacity first. */
    for (size_t z = 0; z < H->w->nzones; z++) {
        if (closed[z] || H->parts[z] == 0)
            continue;
        if (best < 0 || H->care[z] * H->capacity[best] > H->care[best] * H->capacity[z])
            best = (int)z;
    }
    return best;
}

static bool fill(homes *H)
{
    const keel_workload *w = H->w;
    bool *closed = keel_calloc(w->nzones + 1, sizeof *closed);
    if (!closed)
        return false;
    for (;;) {
        int z = neediest(H, closed);
        if (z < 0)
            break;
        int best = -1;
        for (size_t n = 0; n < w->nnurses; n++) {
            if (!homeless(H, n))
                continue;
            size_t here = H->eligible_in[n * w->nzones + z];
            size_t top = best < 0 ? 0 : H->eligible_in[(size_t)best * w->nzones + z];
            if (here > top || (here == top && here > 0 && H->eligible[n] < H->eligible[best]))
                best = (int)n;
        }
        if (best < 0)
            closed[z] = true; /* no homeless nurse may take any of its patients */
        else
            settle(H, (size_t)best, z);
    }
    free(closed);
    return true;
}

static void unsettle(homes *H, size_t n)
{
    const keel_workload *w = H->w;
    int z = H->home[n];
    H->home[n] = -1;
    H->places[z] -= w->max_patients[n];
    H->high[z] -= w->max_high_acuity == KEEL_ABSENT ? w->max_patients[n] : w->max_high_acuity;
    H->capacity[z] -= room_of(w, n);
}

/* Kuhn's augmenting path for part p within its zone's nurses. */
static bool augment(homes *H, size_t p)
{
    const keel_workload *w = H->w;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (H->home[n] != w->zone[p] || H->seen[n] || !keel_workload_eligible(w, p, n))
            continue;
        H->seen[n] = true;
        if (H->used[n] < w->max_patients[n]) {
            H->used[n]++;
            H->match[p] = (int)n;
            return true;
        }
        for (size_t q = 0; q < w->npatients; q++)
            if (H->match[q] == (int)n && augment(H, q)) {
                H->match[p] = (int)n;
                return true;
            }
    }
    return false;
}

/* Patients of zone z left without a place when each goes to an eligible
 * nurse of the zone within her patient limit (a largest matching): the
 * zone's shortage of places and of competencies together. */
static long long shortage(homes *H, size_t z)
{
    const keel_workload *w = H->w;
    long long left = 0;
    for (size_t n = 0; n < w->nnurses; n++)
        H->used[n] = 0;
    for (size_t p = 0; p < w->npatients; p++)
        H->match[p] = -1;
    for (size_t p = 0; p < w->npatients; p++) {
        if (w->zone[p] != (int)z)
            continue;
        for (size_t n = 0; n < w->nnurses; n++)
            H->seen[n] = false;
        left += !augment(H, p);
    }
    return left;
}

/* Moves nurse i to zone b and, when j >= 0, nurse j to i's zone. */
static void exchange(homes *H, size_t i, int b, int j)
{
    int a = H->home[i];
    unsettle(H, i);
    if (j >= 0) {
        unsettle(H, (size_t)j);
        settle(H, (size_t)j, a);
    }
    settle(H, i, b);
}

/* One move of a nurse out of zone a, or exchange of two nurses between a
 * and another zone, that lowers the two zones' shortage together.  True
 * when it made one. */
static bool trade_once(homes *H, size_t a, long long *short_of)
{
    const keel_workload *w = H->w;
    size_t nn = w->nnurses;
    for (size_t i = 0; i < nn; i++) {
        if (H->home[i] != (int)a)
            continue;
        for (size_t b = 0; b < w->nzones; b++) {
            if (b == a)
                continue;
            for (int j = -1; j < (int)nn; j++) {
                if (j >= 0 && H->home[j] != (int)b)
                    continue;
                exchange(H, i, (int)b, j);
                long long sa = shortage(H, a), sb = shortage(H, b);
                if (sa + sb < short_of[a] + short_of[b]) {
                    short_of[a] = sa, short_of[b] = sb;
                    return true;
                }
                exchange(H, i, (int)a, j); /* back */
            }
        }
    }
    return false;
}

/* While some zone is short, trades nurses between zones.  Each trade
 * lowers the total shortage, so the loop ends. */
static bool trade(homes *H)
{
    const keel_workload *w = H->w;
    long long *short_of = keel_calloc(w->nzones + 1, sizeof *short_of);
    if (!short_of)
        return false;
    for (size_t z = 0; z < w->nzones; z++)
        short_of[z] = shortage(H, z);
    for (bool again = true; again;) {
        again = false;
        for (size_t z = 0; z < w->nzones; z++)
            if (short_of[z] > 0 && trade_once(H, z, short_of))
                again = true;
    }
    free(short_of);
    return true;
}

/* Limits on the count plan's table: beyond them the passes after it do
 * the work alone. */
#define COUNT_CLASSES_MAX 6
#define COUNT_STATES_MAX 100000

/* The nurses without a home, grouped by patient limit. */
typedef struct count_plan {
    size_t nclass;
    int limit[COUNT_CLASSES_MAX];      /* largest first */
    long long room[COUNT_CLASSES_MAX]; /* capacity less duty */
    int avail[COUNT_CLASSES_MAX];
    size_t nstates; /* prod (avail + 1): how many of each class are used */
    int *options;   /* per zone, vectors of nurses per class that cover it */
    size_t *first;  /* [nz + 1]: zone z's options are first[z] .. first[z + 1) */
    size_t noptions, cap;
} count_plan;

static bool in_class(const count_plan *C, const keel_workload *w, size_t n, size_t c)
{
    return C->limit[c] == w->max_patients[n] && C->room[c] == room_of(w, n);
}

static size_t need_nurses(const homes *H, size_t z)
{
    int h = H->w->max_high_acuity;
    long long s = H->highs[z] - H->high[z];
    return h == KEEL_ABSENT || h <= 0 || s <= 0 ? 0 : (size_t)((s + h - 1) / h);
}

static bool add_option(count_plan *C, const int *k)
{
    if (C->noptions == C->cap) {
        size_t cap = C->cap ? 2 * C->cap : 64;
        int *o = keel_realloc(C->options, cap * C->nclass * sizeof *o);
        if (!o)
            return false;
        C->options = o, C->cap = cap;
    }
    for (size_t c = 0; c < C->nclass; c++)
        C->options[C->noptions * C->nclass + c] = k[c];
    C->noptions++;
    return true;
}

/* Every vector k (nurses per class) that covers the places and nurses zone
 * z is short of and from which no nurse can be dropped: the classes
 * after the first are enumerated from c on, the first (the largest limit)
 * takes what is left. */
static bool options_for(count_plan *C, long long places, size_t nurses, int *k, size_t c)
{
    if (c < C->nclass) {
        for (int i = 0; i <= C->avail[c]; i++) {
            k[c] = i;
            if (!options_for(C, places, nurses, k, c + 1))
                return false;
            if ((long long)i * C->limit[c] >= places && (size_t)i >= nurses)
                break; /* more of this class could not be minimal */
        }
        return true;
    }
    long long rest = places;
    size_t used = 0;
    for (size_t d = 1; d < C->nclass; d++) {
        rest -= (long long)k[d] * C->limit[d];
        used += (size_t)k[d];
    }
    long long k0 = rest > 0 ? (rest + C->limit[0] - 1) / C->limit[0] : 0;
    if (used + (size_t)k0 < nurses)
        k0 = (long long)(nurses - used);
    if (k0 > C->avail[0])
        return true;
    k[0] = (int)k0;
    long long got = 0;
    used += (size_t)k0;
    for (size_t d = 0; d < C->nclass; d++)
        got += (long long)k[d] * C->limit[d];
    for (size_t d = 0; d < C->nclass; d++) /* minimal: no nurse to spare */
        if (k[d] > 0 && got - C->limit[d] >= places && used - 1 >= nurses)
            return true;
    return add_option(C, k);
}

/* The count plan: how many nurses of each class (patient limit and room)
 * each zone gets, so that every zone has places for its patients (and
 * nurses for its high-acuity patients) and the highest care per minute of
 * room over the zones is least, by a table over the zones whose state is
 * how many nurses of each class are used.  Writes need[z * nclass + c] and
 * returns 1; 0 when it does not apply or no plan covers every zone; -1
 * when memory ran out. */
static int plan_counts(homes *H, count_plan *C, int **need_out)
{
    const keel_workload *w = H->w;
    size_t nz = w->nzones;
    *need_out = NULL;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!homeless(H, n))
            continue;
        size_t c = 0;
        while (c < C->nclass && !in_class(C, w, n, c))
            c++;
        if (c == C->nclass) {
            if (c == COUNT_CLASSES_MAX)
                return 0;
            C->limit[c] = w->max_patients[n];
            C->room[c] = room_of(w, n);
            C->nclass++;
        }
        C->avail[c]++;
    }
    for (size_t a = 0; a < C->nclass; a++) /* largest limit first */
        for (size_t b = a + 1; b < C->nclass; b++)
            if (C->limit[b] > C->limit[a]) {
                int t = C->limit[a];
                C->limit[a] = C->limit[b], C->limit[b] = t;
                t = C->avail[a];
                C->avail[a] = C->avail[b], C->avail[b] = t;
                long long r = C->room[a];
                C->room[a] = C->room[b], C->room[b] = r;
            }
    C->nstates = 1;
    for (size_t c = 0; c < C->nclass; c++) {
        C->nstates *= (size_t)C->avail[c] + 1;
        if (C->nstates > COUNT_STATES_MAX)
            return 0;
    }
    if (C->nclass == 0)
        return 0;
    C->first = keel_calloc(nz + 1, sizeof *C->first);
    double *cost = keel_malloc(2 * C->nstates * sizeof *cost);
    int *choice = keel_malloc(nz * C->nstates * sizeof *choice);
    int *need = keel_calloc(nz * C->nclass + 1, sizeof *need);
    int k[COUNT_CLASSES_MAX];
    int ok = C->first && cost && choice && need ? 1 : -1;
    for (size_t z = 0; ok > 0 && z < nz; z++) {
        C->first[z] = C->noptions;
        long long short_places = H->parts[z] - H->places[z];
        if (!options_for(C, short_places > 0 ? short_places : 0, need_nurses(H, z), k, 1))
            ok = -1;
    }
    if (ok < 0)
        goto out;
    C->first[nz] = C->noptions;
    const double none = -1;
    double *now = cost, *next = cost + C->nstates;
    for (size_t s = 0; s < C->nstates; s++)
        now[s] = none;
    now[0] = 0;
    for (size_t z = 0; z < nz; z++) {
        for (size_t s = 0; s < C->nstates; s++)
            next[s] = none;
        for (size_t s = 0; s < C->nstates; s++) {
            if (now[s] == none)
                continue;
            for (size_t o = C->first[z]; o < C->first[z + 1]; o++) {
                const int *v = C->options + o * C->nclass;
                size_t t = 0, radix = 1, rest = s;
                long long room = H->capacity[z];
                bool fits = true;
                for (size_t c = 0; c < C->nclass; c++) {
                    size_t used = rest % ((size_t)C->avail[c] + 1) + (size_t)v[c];
                    rest /= (size_t)C->avail[c] + 1;
                    fits = fits && used <= (size_t)C->avail[c];
                    t += used * radix;
                    radix *= (size_t)C->avail[c] + 1;
                    room += (long long)v[c] * C->room[c];
                }
                if (!fits)
                    continue;
                /* the zone's care per minute of room (a zone without room
                 * last), the worst zone so far */
                double ratio = room > 0 ? (double)H->care[z] / (double)room : 1e300;
                double c2 = now[s] > ratio ? now[s] : ratio;
                if (next[t] == none || c2 < next[t]) {
                    next[t] = c2;
                    choice[z * C->nstates + t] = (int)o;
                }
            }
        }
        double *swap = now;
        now = next, next = swap;
    }
    size_t best = C->nstates;
    for (size_t s = 0; s < C->nstates; s++)
        if (now[s] != none && (best == C->nstates || now[s] < now[best]))
            best = s;
    ok = best < C->nstates;
    for (size_t z = nz; ok > 0 && z-- > 0;) { /* back along the choices */
        const int *v = C->options + (size_t)choice[z * C->nstates + best] * C->nclass;
        size_t radix = 1;
        for (size_t c = 0; c < C->nclass; c++) {
            need[z * C->nclass + c] = v[c];
            best -= (size_t)v[c] * radix;
            radix *= (size_t)C->avail[c] + 1;
        }
    }
out:
    free(cost);
    free(choice);
    if (ok > 0)
        *need_out = need;
    else
        free(need);
    return ok;
}

/* The class of nurse n in the count plan. */
static size_t class_of(const count_plan *C, const keel_workload *w, size_t n)
{
    size_t c = 0;
    while (!in_class(C, w, n, c))
        c++;
    return c;
}

/* Settles the count plan's nurses (need, which it uses up), one at a
 * time: to the zone with numbers still open that is short of the most
 * places (matching its patients to its nurses, shortage()), the nurse of
 * an open class who leaves it shortest, then who may take the fewest
 * patients overall. */
static void settle_counts(homes *H, const count_plan *C, int *need)
{
    const keel_workload *w = H->w;
    for (;;) {
        int z = -1;
        long long most = -1;
        for (size_t y = 0; y < w->nzones; y++) {
            bool open = false;
            for (size_t c = 0; c < C->nclass; c++)
                open = open || need[y * C->nclass + c] > 0;
            long long s = open ? shortage(H, y) : -1;
            if (open && s > most)
                z = (int)y, most = s;
        }
        if (z < 0)
            return;
        int best = -1;
        long long best_short = 0;
        for (size_t n = 0; n < w->nnurses; n++) {
            if (!homeless(H, n) || need[(size_t)z * C->nclass + class_of(C, w, n)] == 0)
                continue;
            settle(H, n, z);
            long long s = shortage(H, (size_t)z);
            unsettle(H, n);
            if (best < 0 || s < best_short ||
                (s == best_short && H->eligible[n] < H->eligible[best]))
                best = (int)n, best_short = s;
        }
        if (best < 0) { /* cannot happen: the plan counts the nurses there are */
            for (size_t c = 0; c < C->nclass; c++)
                need[(size_t)z * C->nclass + c] = 0;
            continue;
        }
        need[(size_t)z * C->nclass + class_of(C, w, (size_t)best)]--;
        settle(H, (size_t)best, z);
    }
}

bool keel_heur_homes(const keel_workload *w, int *home)
{
    size_t np = w->npatients, nn = w->nnurses, nz = w->nzones;
    homes H = {.w = w, .home = home};
    H.eligible_in = keel_calloc(nn * nz + 1, sizeof *H.eligible_in);
    H.eligible = keel_calloc(nn + 1, sizeof *H.eligible);
    long long *sums = keel_calloc(6 * nz + 1, sizeof *sums);
    ranked *order = keel_malloc((np + 1) * sizeof *order);
    H.match = keel_malloc((np + 1) * sizeof *H.match);
    H.used = keel_malloc((nn + 1) * sizeof *H.used);
    H.seen = keel_malloc((nn + 1) * sizeof *H.seen);
    bool ok = H.eligible_in && H.eligible && sums && order && H.match && H.used && H.seen;
    if (!ok)
        goto out;
    H.places = sums, H.high = sums + nz, H.capacity = sums + 2 * nz;
    H.parts = sums + 3 * nz, H.highs = sums + 4 * nz, H.care = sums + 5 * nz;
    for (size_t n = 0; n < nn; n++)
        home[n] = -1;
    size_t nzoned = 0;
    for (size_t p = 0; p < np; p++) {
        int z = w->zone[p], only = -1;
        size_t count = 0;
        for (size_t n = 0; n < nn; n++)
            if (keel_workload_counted(w, n) && keel_workload_eligible(w, p, n)) {
                H.eligible[n]++;
                if (z >= 0)
                    H.eligible_in[n * nz + (size_t)z]++;
                only = (int)n, count++;
            }
        if (z < 0)
            continue;
        H.parts[z]++;
        H.highs[z] += w->high_acuity[p];
        H.care[z] += w->care_minutes[p];
        order[nzoned++] = (ranked){count, p};
        if (count == 1 && home[only] < 0) /* pins */
            settle(&H, (size_t)only, z);
    }
    qsort(order, nzoned, sizeof *order, fewest_nurses);
    count_plan C = {0};
    int *need = NULL;
    int planned = plan_counts(&H, &C, &need);
    if (planned > 0)
        settle_counts(&H, &C, need);
    free(need);
    free(C.options);
    free(C.first);
    for (size_t k = 0; k < nzoned; k++) { /* cover */
        size_t p = order[k].p;
        int n = covered(&H, p) ? -1 : narrowest_for(&H, p);
        if (n >= 0)
            settle(&H, (size_t)n, w->zone[p]);
    }
    ok = planned >= 0 && fill(&H) && trade(&H);
out:
    free(H.match);
    free(H.used);
    free(H.seen);
    free(H.eligible_in);
    free(H.eligible);
    free(sums);
    free(order);
    return ok;
}
