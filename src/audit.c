/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit.c - many past shifts (keel/audit.h): each computed on its own,
 * in threads when asked (a shift's result never depends on the others or
 * on the number of threads), optionally only a shard's share; then the
 * period summed up per nurse, per measure, and by weekday and label.
 */
#include <math.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "audit_internal.h"

bool keel_audit_in_shard(const keel_audit_options *o, size_t i)
{
    return o->shard == 0 || o->nshards == 0 || i % o->nshards == o->shard - 1;
}

/* The work the threads share: the next shift to take, under the lock. */
typedef struct pool {
    pthread_mutex_t lock;
    keel_roster *const *rosters;
    const size_t *documents;
    size_t n, next, first;
    const keel_audit_options *o;
    keel_audit_shift *shifts;
    keel_status *status; /* [n] */
    keel_error *errors;  /* [n] */
} pool;

static void *work(void *arg)
{
    pool *pl = arg;
    for (;;) {
        pthread_mutex_lock(&pl->lock);
        size_t i = pl->next;
        while (i < pl->n && !keel_audit_in_shard(pl->o, pl->first + i))
            i++;
        pl->next = i + 1;
        pthread_mutex_unlock(&pl->lock);
        if (i >= pl->n)
            return NULL;
        pl->status[i] = keel_audit_shift_compute(pl->rosters[i], pl->first + i, pl->documents[i],
                                                 pl->o, &pl->shifts[i], &pl->errors[i]);
    }
}

keel_status keel_audit_shifts_compute(keel_roster *const *rosters, const size_t *documents,
                                      size_t n, size_t first, const keel_audit_options *o,
                                      keel_audit_shift *shifts, keel_error *err)
{
    pool pl = {.rosters = rosters,
               .documents = documents,
               .n = n,
               .first = first,
               .o = o,
               .shifts = shifts};
    for (size_t i = 0; i < n; i++)
        shifts[i] = (keel_audit_shift){.index = first + i};
    pl.status = keel_calloc(n ? n : 1, sizeof *pl.status);
    pl.errors = keel_calloc(n ? n : 1, sizeof *pl.errors);
    size_t jobs = o->jobs > 1 ? o->jobs : 1;
    if (jobs > n)
        jobs = n ? n : 1;
    pthread_t *threads = keel_calloc(jobs, sizeof *threads);
    if (!pl.status || !pl.errors || !threads || pthread_mutex_init(&pl.lock, NULL) != 0) {
        free(pl.status);
        free(pl.errors);
        free(threads);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    size_t started = 0;
    for (; started + 1 < jobs; started++)
        if (pthread_create(&threads[started], NULL, work, &pl) != 0)
            break;
    work(&pl); /* this thread works too */
    for (size_t t = 0; t < started; t++)
        pthread_join(threads[t], NULL);
    pthread_mutex_destroy(&pl.lock);
    /* The problems of every shift, in input order, whatever thread found them. */
    keel_status rc = KEEL_OK;
    for (size_t i = 0; i < n; i++) {
        for (size_t k = 0; k < pl.errors[i].nproblems; k++) {
            const keel_problem *p = &pl.errors[i].problems[k];
            keel_error_add(err, pl.status[i], p->file, p->line, p->column, p->key, "%s",
                           p->message);
        }
        if (pl.status[i] && !rc)
            rc = pl.status[i];
        keel_error_fini(&pl.errors[i]);
    }
    free(pl.status);
    free(pl.errors);
    free(threads);
    return rc;
}

static int by_id(const void *a, const void *b)
{
    return strcmp(((const keel_audit_person *)a)->id, ((const keel_audit_person *)b)->id);
}

/* The person with this id, added when new; NULL when memory runs out.
 * people is kept in order of first appearance, sorted once at the end. */
static keel_audit_person *person(keel_audit *a, const char *id, size_t *cap)
{
    for (size_t i = 0; i < a->npeople; i++)
        if (strcmp(a->people[i].id, id) == 0)
            return &a->people[i];
    if (a->npeople == *cap) {
        *cap = *cap ? 2 * *cap : 16;
        keel_audit_person *grown = keel_reallocarray(a->people, *cap, sizeof *grown);
        if (!grown)
            return NULL;
        a->people = grown;
    }
    keel_audit_person *p = &a->people[a->npeople];
    *p = (keel_audit_person){.id = keel_strdup(id)};
    if (!p->id)
        return NULL;
    for (int m = 0; m < KEEL_AUDIT_MEASURES; m++)
        p->tally[m] = (keel_audit_tally){.whole = true, .p_value = -1, .p_adjusted = -1};
    a->npeople++;
    return p;
}

/* Chances of each at-stake shift she was counted on, per measure. */
typedef struct chances {
    size_t n, cap;
    double *p;
} chances;

static bool add_chance(chances *c, double p)
{
    if (c->n == c->cap) {
        c->cap = c->cap ? 2 * c->cap : 64;
        double *grown = keel_reallocarray(c->p, c->cap, sizeof *grown);
        if (!grown)
            return false;
        c->p = grown;
    }
    c->p[c->n++] = p;
    return true;
}

static bool at_stake(const keel_audit_shift *s, int m)
{
    for (size_t n = 0; n < s->nnurses; n++)
        if (s->nurses[n].share[m] > 0)
            return true;
    return false;
}

/* Sums each nurse's shifts; *ch gets her chances (people-major). */
static bool sum_people(keel_audit *a, chances **ch)
{
    size_t cap = 0;
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        for (size_t n = 0; n < s->nnurses; n++)
            if (!person(a, s->nurses[n].id, &cap))
                return false;
    }
    qsort(a->people, a->npeople, sizeof *a->people, by_id);
    *ch = keel_calloc((a->npeople ? a->npeople : 1) * KEEL_AUDIT_MEASURES, sizeof **ch);
    if (!*ch)
        return false;
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        a->nviolations += s->nviolations;
        for (size_t n = 0; n < s->nnurses; n++) {
            const keel_audit_nurse *an = &s->nurses[n];
            keel_audit_person key = {.id = an->id};
            keel_audit_person *p = bsearch(&key, a->people, a->npeople, sizeof key, by_id);
            p->shifts++;
            for (size_t v = 0; v < s->nviolations; v++)
                for (size_t k = 0; k < s->violations[v].nnurses; k++)
                    if (strcmp(s->violations[v].nurses[k], an->id) == 0) {
                        p->violations++;
                        break;
                    }
            if (!an->counted)
                continue;
            p->counted_shifts++;
            p->mean_utilisation += an->utilisation;
            if (p->counted_shifts == 1 || an->utilisation > p->worst_utilisation)
                p->worst_utilisation = an->utilisation;
            for (int m = 0; m < KEEL_AUDIT_MEASURES; m++) {
                if (!at_stake(s, m))
                    continue;
                keel_audit_tally *t = &p->tally[m];
                double chance = 1.0 / (double)s->ncounted;
                t->at_stake++;
                t->count += an->share[m];
                t->expected += chance;
                t->whole = t->whole && (an->share[m] == 0 || an->share[m] == 1);
                if (!add_chance(&(*ch)[(size_t)(p - a->people) * KEEL_AUDIT_MEASURES + (size_t)m],
                                chance))
                    return false;
            }
        }
    }
    for (size_t i = 0; i < a->npeople; i++)
        if (a->people[i].counted_shifts)
            a->people[i].mean_utilisation /= (double)a->people[i].counted_shifts;
    return true;
}

/* p-values, then Holm across the nurses tested, measure by measure. */
static bool test_people(keel_audit *a, chances *ch)
{
    double *p = keel_calloc(a->npeople ? a->npeople : 1, sizeof *p);
    double *adj = keel_calloc(a->npeople ? a->npeople : 1, sizeof *adj);
    size_t *who = keel_calloc(a->npeople ? a->npeople : 1, sizeof *who);
    bool ok = p && adj && who;
    for (int m = 0; ok && m < KEEL_AUDIT_MEASURES; m++) {
        size_t k = 0;
        for (size_t i = 0; ok && i < a->npeople; i++) {
            keel_audit_tally *t = &a->people[i].tally[m];
            const chances *c = &ch[i * KEEL_AUDIT_MEASURES + (size_t)m];
            if (!t->whole || t->at_stake == 0)
                continue;
            t->p_value = keel_audit_stats_tail(c->p, c->n, lround(t->count));
            ok = t->p_value >= 0;
            if (ok && t->at_stake >= a->min_shifts) {
                p[k] = t->p_value;
                who[k++] = i;
            }
        }
        ok = ok && keel_audit_stats_holm(p, k, adj);
        for (size_t j = 0; ok && j < k; j++) {
            keel_audit_tally *t = &a->people[who[j]].tally[m];
            t->p_adjusted = adj[j];
            t->stands_out = adj[j] <= a->alpha;
        }
    }
    free(p);
    free(adj);
    free(who);
    return ok;
}

static keel_audit_group *group(keel_audit *a, const char *by, const char *key, size_t *cap)
{
    for (size_t i = 0; i < a->ngroups; i++)
        if (strcmp(a->groups[i].by, by) == 0 && strcmp(a->groups[i].key, key) == 0)
            return &a->groups[i];
    if (a->ngroups == *cap) {
        *cap = *cap ? 2 * *cap : 16;
        keel_audit_group *grown = keel_reallocarray(a->groups, *cap, sizeof *grown);
        if (!grown)
            return NULL;
        a->groups = grown;
    }
    keel_audit_group *g = &a->groups[a->ngroups];
    *g = (keel_audit_group){.by = by, .key = keel_strdup(key)};
    if (!g->key)
        return NULL;
    a->ngroups++;
    return g;
}

static int group_order(const void *x, const void *y)
{
    const keel_audit_group *a = x, *b = y;
    if (strcmp(a->by, b->by) != 0)
        return strcmp(a->by, "weekday") == 0 ? -1 : 1;
    if (strcmp(a->by, "weekday") == 0) {
        static const char days[] = "MonTueWedThuFriSatSun";
        return (int)(strstr(days, a->key) - days) - (int)(strstr(days, b->key) - days);
    }
    return strcmp(a->key, b->key);
}

static bool sum_groups(keel_audit *a)
{
    size_t cap = 0;
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        const char *keys[2] = {s->weekday >= 0 ? keel_audit_stats_weekday_name(s->weekday) : NULL,
                               s->label};
        const char *bys[2] = {"weekday", "label"};
        for (int k = 0; k < 2; k++) {
            if (!keys[k])
                continue;
            keel_audit_group *g = group(a, bys[k], keys[k], &cap);
            if (!g)
                return false;
            g->shifts++;
            g->mean_max_utilisation += s->max_utilisation;
            g->mean_spread += s->spread;
            g->violations += s->nviolations;
            if (s->best_known) {
                g->best_known++;
                g->mean_excess += s->excess;
            }
        }
    }
    for (size_t i = 0; i < a->ngroups; i++) {
        keel_audit_group *g = &a->groups[i];
        g->mean_max_utilisation /= (double)g->shifts;
        g->mean_spread /= (double)g->shifts;
        if (g->best_known)
            g->mean_excess /= (double)g->best_known;
    }
    qsort(a->groups, a->ngroups, sizeof *a->groups, group_order);
    return true;
}

static size_t group_index(const keel_audit *a, const char *by, const char *key)
{
    for (size_t g = 0; g < a->ngroups; g++)
        if (strcmp(a->groups[g].by, by) == 0 && strcmp(a->groups[g].key, key) == 0)
            return g;
    return a->ngroups; /* not reached: every key has its group */
}

/* Each nurse's heaviest loads by weekday and by label. */
static bool sum_people_by_group(keel_audit *a)
{
    for (size_t i = 0; i < a->npeople; i++)
        if (!(a->people[i].by = keel_calloc(a->ngroups ? a->ngroups : 1, sizeof *a->people[i].by)))
            return false;
    for (size_t i = 0; i < a->nshifts; i++) {
        const keel_audit_shift *s = &a->shifts[i];
        size_t gs[2] = {a->ngroups, a->ngroups};
        if (s->weekday >= 0)
            gs[0] = group_index(a, "weekday", keel_audit_stats_weekday_name(s->weekday));
        if (s->label)
            gs[1] = group_index(a, "label", s->label);
        bool stake = at_stake(s, KEEL_AUDIT_HEAVIEST);
        for (size_t n = 0; n < s->nnurses; n++) {
            const keel_audit_nurse *an = &s->nurses[n];
            if (!an->counted)
                continue;
            keel_audit_person key = {.id = an->id};
            keel_audit_person *p = bsearch(&key, a->people, a->npeople, sizeof key, by_id);
            for (int k = 0; k < 2; k++) {
                if (gs[k] == a->ngroups)
                    continue;
                keel_audit_share *sh = &p->by[gs[k]];
                sh->shifts++;
                sh->heaviest += an->share[KEEL_AUDIT_HEAVIEST];
                sh->expected += stake ? 1.0 / (double)s->ncounted : 0.0;
            }
        }
    }
    return true;
}

keel_status keel_audit_summarise(keel_audit_shift *shifts, size_t n, const keel_audit_options *o,
                                 keel_audit **out, keel_error *err)
{
    keel_audit *a = keel_calloc(1, sizeof *a);
    chances *ch = NULL;
    *out = NULL;
    if (!a) {
        for (size_t i = 0; i < n; i++)
            keel_audit_shift_fini(&shifts[i]);
        free(shifts);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    a->shifts = shifts;
    a->nshifts = n;
    a->min_shifts = o && o->min_shifts ? o->min_shifts : KEEL_AUDIT_MIN_SHIFTS;
    a->alpha = KEEL_AUDIT_ALPHA;
    bool ok = sum_people(a, &ch) && test_people(a, ch) && sum_groups(a) && sum_people_by_group(a);
    for (size_t i = 0; ch && i < a->npeople * KEEL_AUDIT_MEASURES; i++)
        free(ch[i].p);
    free(ch);
    if (!ok) {
        keel_audit_free(a);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    *out = a;
    return KEEL_OK;
}

void keel_audit_free(keel_audit *a)
{
    if (!a)
        return;
    for (size_t i = 0; i < a->nshifts; i++)
        keel_audit_shift_fini(&a->shifts[i]);
    free(a->shifts);
    for (size_t i = 0; i < a->npeople; i++) {
        free(a->people[i].id);
        free(a->people[i].by);
    }
    free(a->people);
    for (size_t i = 0; i < a->ngroups; i++)
        free(a->groups[i].key);
    free(a->groups);
    free(a);
}
