/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * workload_cover.c - the break plan: who holds a nurse's patients during
 * each of her timed breaks, chosen from the roster alone before the solve,
 * so that the assignment can keep it (rule_cover.c) and the course of the
 * shift reports the same cover (course.c).
 *
 * A nurse is free during a break when she is on throughout it and on no
 * break of her own that overlaps it.  Breaks are taken in time order (ties
 * by nurse, then break), twice:
 *   1. the breaks of nurses without a free buddy (no nurse whose `covers`
 *      names her is free): the first relief nurse (role relief, by index)
 *      who is free and not covering an overlapping break already; else
 *      nobody;
 *   2. the other breaks: such a relief nurse when one is left, else the
 *      first free buddy.
 * So a relief nurse goes first where nobody else can cover, then saves the
 * buddies the extra patients wherever she is free.
 *
 * The limit during a break is the ratio table's per-nurse maximum when the
 * table sets one (it holds at all times, breaks included; Source:
 * California Code of Regulations, Title 22, section 70217(a), CDPH AFL
 * 08-07, 2008, as encoded in src/law.c), else the cover's patient limit; a
 * relief nurse stands in for the breaking nurse, so hers is at least the
 * breaking nurse's.
 *
 * A cover is kept (the assignment holds the nurse's and the cover's
 * patients together within the limit at every moment of the break) when
 * the roster plans cover, naming a buddy or a relief nurse, and the limit
 * can bind: her limit and the cover's add up to more than it, and it is
 * below the number of patients.  A break
 * without a cover is kept as "she holds nobody then", which no assignment
 * can meet when she has patients: the diagnosis names the break.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "workload_internal.h"

static bool overlaps(int a, int b, int s, int e)
{
    return a < e && s < b;
}

bool keel_workload_cover_free(const keel_roster *r, const keel_workload *w, size_t i, int a, int b)
{
    if (w->nurse_start[i] > a || w->nurse_end[i] < b)
        return false;
    const keel_nurse *nu = &r->nurses[i];
    for (size_t k = 0; k < nu->nbreaks; k++)
        if (overlaps(a, b, nu->breaks[k].at, nu->breaks[k].at + nu->breaks[k].minutes))
            return false;
    return true;
}

/* The first nurse whose `covers` names nurse n and who is free during
 * cover c's break, or -1. */
static int free_buddy(const keel_roster *r, const keel_workload *w, const keel_cover *c)
{
    for (size_t i = 0; i < r->nnurses; i++)
        if (i != c->nurse && r->nurses[i].covers &&
            strcmp(r->nurses[i].covers, r->nurses[c->nurse].id) == 0 &&
            keel_workload_cover_free(r, w, i, c->start, c->end))
            return (int)i;
    return -1;
}

/* The first relief nurse free during c's break and covering no break
 * that overlaps it, or -1. */
static int free_relief(const keel_roster *r, const keel_workload *w, const keel_cover *c)
{
    for (size_t i = 0; i < r->nnurses; i++) {
        if (r->nurses[i].role != KEEL_ROLE_RELIEF ||
            !keel_workload_cover_free(r, w, i, c->start, c->end))
            continue;
        bool busy = false;
        for (size_t k = 0; k < w->ncovers && !busy; k++) {
            const keel_cover *o = &w->covers[k];
            busy = o != c && o->relief && o->cover == (int)i &&
                   overlaps(c->start, c->end, o->start, o->end);
        }
        if (!busy)
            return (int)i;
    }
    return -1;
}

int keel_workload_cover_limit(const keel_workload *w, size_t nurse, int cover, bool relief)
{
    if (w->law_limit != KEEL_ABSENT)
        return w->law_limit;
    if (cover < 0)
        return w->max_patients[nurse];
    int limit = w->max_patients[cover];
    if (relief && w->max_patients[nurse] > limit)
        limit = w->max_patients[nurse];
    return limit;
}

/* True when the roster plans cover: some nurse names a buddy, or a relief
 * nurse is on it. */
static bool plans_cover(const keel_roster *r)
{
    for (size_t i = 0; i < r->nnurses; i++)
        if (r->nurses[i].covers || r->nurses[i].role == KEEL_ROLE_RELIEF)
            return true;
    return false;
}

static int earlier(const void *x, const void *y)
{
    const keel_cover *a = *(const keel_cover *const *)x, *b = *(const keel_cover *const *)y;
    if (a->start != b->start)
        return (a->start > b->start) - (a->start < b->start);
    /* covers are in nurse, then break order: the address keeps it */
    return (a > b) - (a < b);
}

keel_status keel_workload_cover_plan(const keel_roster *r, keel_workload *w)
{
    size_t nb = 0;
    for (size_t n = 0; n < r->nnurses; n++)
        nb += r->nurses[n].nbreaks;
    w->covers = keel_calloc(nb ? nb : 1, sizeof *w->covers);
    w->covered = keel_calloc(r->nnurses ? r->nnurses : 1, sizeof *w->covered);
    keel_cover **order = keel_calloc(nb ? nb : 1, sizeof *order);
    if (!w->covers || !w->covered || !order) {
        free(order);
        return KEEL_ERR_NOMEM;
    }
    for (size_t n = 0; n < r->nnurses; n++)
        for (size_t i = 0; i < r->nurses[n].nbreaks; i++) {
            const keel_break *b = &r->nurses[n].breaks[i];
            keel_cover *c = &w->covers[w->ncovers];
            *c = (keel_cover){
                .nurse = n, .brk = i, .start = b->at, .end = b->at + b->minutes, .cover = -1};
            order[w->ncovers++] = c;
        }
    qsort(order, nb, sizeof *order, earlier);
    for (int pass = 1; pass <= 2; pass++)
        for (size_t k = 0; k < nb; k++) {
            keel_cover *c = order[k];
            int buddy = free_buddy(r, w, c);
            if ((pass == 1) != (buddy < 0))
                continue;
            c->cover = free_relief(r, w, c);
            c->relief = c->cover >= 0;
            if (c->cover < 0)
                c->cover = buddy;
        }
    bool planned = plans_cover(r);
    for (size_t k = 0; k < nb; k++) {
        keel_cover *c = &w->covers[k];
        c->limit = keel_workload_cover_limit(w, c->nurse, c->cover, c->relief);
        int mine = w->max_patients[c->nurse];
        int theirs = c->cover >= 0 ? w->max_patients[c->cover] : 0;
        c->kept = planned && mine > 0 &&
                  (c->cover < 0 || (mine + theirs > c->limit && c->limit < (int)w->npeople));
        if (!c->kept)
            continue;
        w->nkept++;
        w->covered[c->nurse] = true;
        if (c->cover >= 0)
            w->covered[c->cover] = true;
    }
    free(order);
    return KEEL_OK;
}

void keel_workload_cover_times(const keel_workload *w, int *times, size_t *n)
{
    for (size_t k = 0; k < w->ncovers; k++) {
        if (!w->covers[k].kept)
            continue;
        times[(*n)++] = w->covers[k].start;
        times[(*n)++] = w->covers[k].end;
    }
}

void keel_workload_cover_moments(keel_workload *w)
{
    for (size_t k = 0; k < w->ncovers; k++) {
        keel_cover *c = &w->covers[k];
        int m = 0;
        while ((size_t)m + 1 < w->nmoments && w->moment_start[m + 1] <= c->start)
            m++;
        c->first_moment = m;
        while ((size_t)m < w->nmoments && w->moment_start[m] < c->end)
            m++;
        c->last_moment = m;
    }
}
