/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster.c - the roster module's entry points: load and parse a roster
 * file (freeing a roster and the look-ups on one are in roster_data.c).
 *
 * Loading is the first stage of the pipeline; the loader's steps are in
 * roster_*.c (roster_loader.h lists them): read the YAML into a tree of
 * nodes, walk it against the format's key tables, then check across the
 * file.  On any failure *out is NULL and nothing leaks; the problems of one
 * load come back in file order.
 */
#include "keel/roster.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "alloc.h"
#include "roster_internal.h"
#include "roster_loader.h"

static keel_roster *new_roster(const char *name)
{
    keel_roster *r = keel_calloc(1, sizeof *r);
    if (!r)
        return NULL;
    r->shift.start_minute = KEEL_ABSENT;
    r->shift.minutes = KEEL_ABSENT;
    r->shift.break_minutes = KEEL_ABSENT;
    r->policy.max_patients = KEEL_ABSENT;
    for (size_t i = 0; i < KEEL_NROLES; i++)
        r->policy.roles[i] = (keel_role_policy){KEEL_ABSENT, KEEL_ABSENT, KEEL_ABSENT};
    r->policy.high_acuity.level = KEEL_ABSENT;
    r->policy.high_acuity.max_per_nurse = KEEL_ABSENT;
    r->policy.isolation_separation = true;
    r->policy.max_zones = KEEL_ABSENT;
    r->policy.balance_tolerance = KEEL_ABSENT;
    r->policy.min_patients = KEEL_ABSENT;
    r->policy.max_utilisation = KEEL_ABSENT;
    r->path = keel_strdup(name);
    if (!r->path) {
        free(r);
        return NULL;
    }
    return r;
}


/* Puts this load's problems in file order (line, then column), keeping the
 * order of problems at the same place. */
static bool comes_after(const keel_problem *a, const keel_problem *b)
{
    return a->line > b->line || (a->line == b->line && a->column > b->column);
}

static void sort_problems(loader *ld)
{
    keel_problem *p = ld->err ? ld->err->problems : NULL;
    for (size_t i = ld->first_problem + 1; p && i < ld->err->nproblems; i++) {
        keel_problem moved = p[i];
        size_t j = i;
        for (; j > ld->first_problem && comes_after(&p[j - 1], &moved); j--)
            p[j] = p[j - 1];
        p[j] = moved;
    }
}

/* Turns the loader's outcome into a status; hands over or frees roster. */
static keel_status finish(loader *ld, keel_roster *roster, keel_roster **out)
{
    if (ld->nomem) {
        keel_roster_free(roster);
        return keel_error_add(ld->err, KEEL_ERR_NOMEM, ld->file, 0, 0, NULL, "out of memory");
    }
    if (ld->nproblems) {
        sort_problems(ld);
        keel_roster_free(roster);
        return KEEL_ERR_INPUT;
    }
    *out = roster;
    return KEEL_OK;
}

keel_status keel_roster_parse(const char *name, const char *text, size_t len, keel_roster **out,
                              keel_error *err)
{
    loader ld = {.file = name,
                 .text = text,
                 .len = len,
                 .err = err,
                 .first_problem = err ? err->nproblems : 0};
    node *root = NULL;
    if (!out || !name || (!text && len))
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "keel_roster_parse: out, name and text are required");
    *out = NULL;
    if (len > (size_t)KEEL_MAX_FILE_BYTES)
        return keel_error_add(err, KEEL_ERR_INPUT, name, 1, 1, NULL,
                              "the roster is larger than %ld MiB, the most keel reads "
                              "(docs/roster-format.md, \"Limits\")",
                              KEEL_MAX_FILE_BYTES / (1024 * 1024));
    ld.roster = new_roster(name);
    if (!ld.roster) {
        ld.nomem = true;
        return finish(&ld, ld.roster, out);
    }
    if (keel_roster_tree_read(&ld, &root)) {
        keel_roster_keys_read(&ld, root);
        keel_roster_check_file(&ld, root);
    }
    keel_roster_tree_free(root);
    return finish(&ld, ld.roster, out);
}

/* Walks one document's tree into a new roster: *out, or problems. */
static keel_status parse_document(loader *base, const node *root, keel_roster **out)
{
    loader ld = {.file = base->file,
                 .text = base->text,
                 .len = base->len,
                 .err = base->err,
                 .first_problem = base->err ? base->err->nproblems : 0};
    *out = NULL;
    ld.roster = new_roster(base->file);
    if (!ld.roster) {
        ld.nomem = true;
        return finish(&ld, ld.roster, out);
    }
    keel_roster_keys_read(&ld, root);
    keel_roster_check_file(&ld, root);
    return finish(&ld, ld.roster, out);
}

keel_status keel_roster_parse_stream(const char *name, const char *text, size_t len,
                                     keel_roster ***out, size_t *nout, keel_error *err)
{
    if (!out || !nout || !name || (!text && len))
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "keel_roster_parse_stream: out, nout, name and text are required");
    loader ld = {.file = name,
                 .text = text,
                 .len = len,
                 .err = err,
                 .first_problem = err ? err->nproblems : 0};
    node **roots = NULL;
    size_t nroots = 0;
    *out = NULL;
    *nout = 0;
    if (!keel_roster_tree_read_stream(&ld, &roots, &nroots)) {
        if (ld.nomem)
            return keel_error_add(err, KEEL_ERR_NOMEM, name, 0, 0, NULL, "out of memory");
        sort_problems(&ld);
        return KEEL_ERR_INPUT;
    }
    keel_roster **rosters = keel_calloc(nroots, sizeof *rosters);
    keel_status rc = rosters ? KEEL_OK
                             : keel_error_add(err, KEEL_ERR_NOMEM, name, 0, 0, NULL,
                                              "out of memory");
    for (size_t i = 0; rosters && i < nroots && rc != KEEL_ERR_NOMEM; i++) {
        keel_status one = parse_document(&ld, roots[i], &rosters[i]);
        rc = rc ? rc : one;
        rc = one == KEEL_ERR_NOMEM ? one : rc;
    }
    for (size_t i = 0; i < nroots; i++)
        keel_roster_tree_free(roots[i]);
    free(roots);
    if (rc) {
        for (size_t i = 0; rosters && i < nroots; i++)
            keel_roster_free(rosters[i]);
        free(rosters);
        return rc;
    }
    *out = rosters;
    *nout = nroots;
    return KEEL_OK;
}

keel_status keel_roster_load_stream(const char *path, keel_roster ***out, size_t *nout,
                                    keel_error *err)
{
    char *text = NULL;
    size_t len = 0;
    if (!out || !nout || !path)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "keel_roster_load_stream: out, nout and path are required");
    *out = NULL;
    *nout = 0;
    keel_status rc = keel_roster_read_file(path, KEEL_MAX_STREAM_BYTES, &text, &len, err);
    if (rc)
        return rc;
    rc = keel_roster_parse_stream(path, text, len, out, nout, err);
    free(text);
    return rc;
}

/* Reads the whole file at path into a new buffer. */
/* "the file is larger than 16 MiB ..." at file:1:1. */
static keel_status too_large(const char *path, long max, FILE *f, char *buf, keel_error *err)
{
    free(buf);
    fclose(f);
    return keel_error_add(err, KEEL_ERR_INPUT, path, 1, 1, NULL,
                          "the file is larger than %ld MiB, the most keel reads (docs/"
                          "roster-format.md, \"Limits\"); expected one unit's roster or census",
                          max / (1024 * 1024));
}

keel_status keel_roster_read_file(const char *path, long max, char **text, size_t *len,
                                  keel_error *err)
{
    size_t capacity = 0, used = 0;
    char *buf = NULL;
    FILE *f = fopen(path, "rb");
    if (!f)
        return keel_error_add(err, KEEL_ERR_IO, path, 0, 0, NULL, "cannot open: %s",
                              strerror(errno));
    /* A regular file's size says it at once; a pipe is counted as it comes. */
    struct stat st;
    if (fstat(fileno(f), &st) == 0 && S_ISREG(st.st_mode) && st.st_size > max)
        return too_large(path, max, f, buf, err);
    for (size_t got = 1; got > 0; used += got) {
        if (used > (size_t)max)
            return too_large(path, max, f, buf, err);
        char *grown = used < capacity ? buf : keel_realloc(buf, capacity = 2 * capacity + 4096);
        if (!grown) {
            free(buf);
            fclose(f);
            return keel_error_add(err, KEEL_ERR_NOMEM, path, 0, 0, NULL, "out of memory");
        }
        buf = grown;
        got = fread(buf + used, 1, capacity - used, f);
    }
    if (ferror(f)) {
        int saved = errno;
        free(buf);
        fclose(f);
        return keel_error_add(err, KEEL_ERR_IO, path, 0, 0, NULL, "cannot read: %s",
                              strerror(saved));
    }
    fclose(f);
    *text = buf;
    *len = used;
    return KEEL_OK;
}

keel_status keel_roster_load(const char *path, keel_roster **out, keel_error *err)
{
    char *text = NULL;
    size_t len = 0;
    if (!out || !path)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "keel_roster_load: out and path are required");
    *out = NULL;
    keel_status rc = keel_roster_read_file(path, KEEL_MAX_FILE_BYTES, &text, &len, err);
    if (rc)
        return rc;
    rc = keel_roster_parse(path, text, len, out, err);
    free(text);
    return rc;
}
