/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_partial.c - a shard's partial result (keel audit --shard I/N) and
 * the merge of every shard's (--merge).  The file is text, one record a
 * line, fields separated by tabs:
 *
 *   keel-audit-partial 1 <I>/<N> <shifts of the whole audit> <best|no-best> <time limit ms>
 *   S <index> <source> <document> <date> <label> <weekday> ... one shift
 *   N <id> <counted> ...                                 each of its nurses
 *   V <rule> <message> <k> <patient>... <k> <nurse>... <k> <from> <to>...
 *
 * Figures are written as C99 hexadecimal floating point ("%a"), so reading
 * them back gives the same bits and the merged report is byte for byte the
 * report of a single run.  In text, '\\' '\t' '\n' '\r' are escaped with a
 * backslash and a missing text is "\-".
 */
#include <errno.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "audit_internal.h"
#include "keel/solve.h"
#include "roster_internal.h"

#define MAGIC "keel-audit-partial 1"

static void text(FILE *out, const char *s)
{
    fputc('\t', out);
    if (!s) {
        fputs("\\-", out);
        return;
    }
    for (; *s; s++) {
        switch (*s) {
        case '\\':
            fputs("\\\\", out);
            break;
        case '\t':
            fputs("\\t", out);
            break;
        case '\n':
            fputs("\\n", out);
            break;
        case '\r':
            fputs("\\r", out);
            break;
        default:
            fputc(*s, out);
        }
    }
}

static void ids(FILE *out, char *const *list, size_t n)
{
    fprintf(out, "\t%zu", n);
    for (size_t i = 0; i < n; i++)
        text(out, list[i]);
}

static void write_shift(FILE *out, const keel_audit_shift *s)
{
    fprintf(out, "S\t%zu", s->index);
    text(out, s->source);
    fprintf(out, "\t%zu", s->document);
    text(out, s->date);
    text(out, s->label);
    fprintf(out, "\t%d\t%zu\t%zu\t%zu\t%a\t%a\t%a\t%a\t%a\t%a\t%a\t%a\t%d", s->weekday,
            s->npatients, s->nunassigned, s->ncounted, s->max_utilisation, s->min_utilisation,
            s->mean_utilisation, s->spread, s->peak_to_mean, s->cv, s->jain, s->gini,
            s->best_known);
    text(out, s->best_status);
    fprintf(out, "\t%a\t%a\t%a\t%ld\t%ld", s->best_max_utilisation, s->best_bound, s->excess,
            s->continuity_kept, s->continuity_candidates);
    text(out, s->table_note);
    fprintf(out, "\t%zu\t%zu\n", s->nnurses, s->nviolations);
    for (size_t n = 0; n < s->nnurses; n++) {
        const keel_audit_nurse *an = &s->nurses[n];
        fputs("N", out);
        text(out, an->id);
        fprintf(out, "\t%d\t%d\t%d\t%d\t%a", an->counted, an->npatients, an->load_minutes,
                an->capacity_minutes, an->utilisation);
        for (int m = 0; m < KEEL_AUDIT_MEASURES; m++)
            fprintf(out, "\t%d\t%a", an->amount[m], an->share[m]);
        fputc('\n', out);
    }
    for (size_t v = 0; v < s->nviolations; v++) {
        const keel_audit_violation *vi = &s->violations[v];
        fputs("V", out);
        text(out, vi->rule);
        text(out, vi->message);
        ids(out, vi->patients, vi->npatients);
        ids(out, vi->nurses, vi->nnurses);
        fprintf(out, "\t%zu", vi->nintervals);
        for (size_t i = 0; i < vi->nintervals; i++) {
            text(out, vi->intervals[i].from);
            text(out, vi->intervals[i].to);
        }
        fputc('\n', out);
    }
}

keel_status keel_audit_partial_write(const keel_audit_shift *shifts, size_t n,
                                     const keel_audit_options *o, FILE *out, keel_error *err)
{
    (void)err;
    fprintf(out, MAGIC " %zu/%zu %zu %s %ld\n", o->shard ? o->shard : 1,
            o->nshards ? o->nshards : 1, n, o->no_best ? "no-best" : "best",
            o->time_limit_ms > 0 ? o->time_limit_ms : 0);
    for (size_t i = 0; i < n; i++)
        if (keel_audit_in_shard(o, i))
            write_shift(out, &shifts[i]);
    return KEEL_OK;
}

/* Reading: one line at a time, split at tabs in place. */
typedef struct reader {
    const char *path;
    int line;
    char *fields[256];
    size_t nfields, at;
    bool bad, nomem;
    keel_error *err;
} reader;

static void bad(reader *rd, const char *what)
{
    if (!rd->bad)
        keel_error_add(rd->err, KEEL_ERR_INPUT, rd->path, rd->line, 1, NULL,
                       "%s; expected a partial result written by keel audit --shard", what);
    rd->bad = true;
}

static const char *next(reader *rd)
{
    if (rd->at >= rd->nfields) {
        bad(rd, "the record ends too soon");
        return "";
    }
    return rd->fields[rd->at++];
}

/* A text field, unescaped into a new string; NULL for "\-". */
static char *take_text(reader *rd)
{
    const char *f = next(rd);
    if (strcmp(f, "\\-") == 0)
        return NULL;
    char *s = keel_malloc(strlen(f) + 1), *d = s;
    if (!s) {
        rd->nomem = true;
        return NULL;
    }
    for (; *f; f++) {
        if (*f != '\\') {
            *d++ = *f;
            continue;
        }
        f++;
        *d++ = *f == 't' ? '\t' : *f == 'n' ? '\n' : *f == 'r' ? '\r' : *f;
        if (!*f) {
            bad(rd, "a text ends in a lone backslash");
            break;
        }
    }
    *d = '\0';
    return s;
}

static long take_long(reader *rd)
{
    const char *f = next(rd);
    char *end;
    errno = 0;
    long v = strtol(f, &end, 10);
    if (errno || end == f || *end)
        bad(rd, "a count is not a whole number");
    return v;
}

static size_t take_size(reader *rd)
{
    long v = take_long(rd);
    if (v < 0)
        bad(rd, "a count is negative");
    return v < 0 ? 0 : (size_t)v;
}

static double take_double(reader *rd)
{
    const char *f = next(rd);
    char *end;
    double v = strtod(f, &end);
    if (end == f || *end)
        bad(rd, "a figure is not a number");
    return v;
}

/* The static name a best-possible status has. */
static const char *status_name(reader *rd, const char *s)
{
    for (int k = KEEL_SOLVE_OPTIMAL; s && k <= KEEL_SOLVE_INFEASIBLE; k++)
        if (strcmp(s, keel_solve_status_name((keel_solve_status)k)) == 0)
            return keel_solve_status_name((keel_solve_status)k);
    if (s && strcmp(s, "skipped") == 0)
        return "skipped";
    bad(rd, "unknown status of the best possible");
    return "skipped";
}

static void read_shift(reader *rd, keel_audit_shift *s)
{
    s->source = take_text(rd);
    s->document = take_size(rd);
    s->date = take_text(rd);
    s->label = take_text(rd);
    s->weekday = (int)take_long(rd);
    s->npatients = take_size(rd);
    s->nunassigned = take_size(rd);
    s->ncounted = take_size(rd);
    double *figures[] = {&s->max_utilisation,
                         &s->min_utilisation,
                         &s->mean_utilisation,
                         &s->spread,
                         &s->peak_to_mean,
                         &s->cv,
                         &s->jain,
                         &s->gini};
    for (size_t k = 0; k < sizeof figures / sizeof figures[0]; k++)
        *figures[k] = take_double(rd);
    s->best_known = take_long(rd) != 0;
    char *status = take_text(rd);
    s->best_status = status_name(rd, status);
    free(status);
    s->best_max_utilisation = take_double(rd);
    s->best_bound = take_double(rd);
    s->excess = take_double(rd);
    s->continuity_kept = take_long(rd);
    s->continuity_candidates = take_long(rd);
    s->table_note = take_text(rd);
}

static void read_nurse(reader *rd, keel_audit_nurse *an)
{
    an->id = take_text(rd);
    if (!an->id && !rd->nomem)
        bad(rd, "a nurse without an id");
    an->counted = take_long(rd) != 0;
    an->npatients = (int)take_long(rd);
    an->load_minutes = (int)take_long(rd);
    an->capacity_minutes = (int)take_long(rd);
    an->utilisation = take_double(rd);
    for (int m = 0; m < KEEL_AUDIT_MEASURES; m++) {
        an->amount[m] = (int)take_long(rd);
        an->share[m] = take_double(rd);
    }
}

static char **read_ids(reader *rd, size_t *n)
{
    *n = take_size(rd);
    if (*n > rd->nfields)
        bad(rd, "a list is longer than its record");
    if (rd->bad)
        return *n = 0, NULL;
    char **list = keel_calloc(*n ? *n : 1, sizeof *list);
    if (!list) {
        rd->nomem = true;
        *n = 0;
        return NULL;
    }
    for (size_t i = 0; i < *n; i++)
        list[i] = take_text(rd);
    return list;
}

static void read_violation(reader *rd, keel_audit_violation *v)
{
    v->rule = take_text(rd);
    v->message = take_text(rd);
    if ((!v->rule || !v->message) && !rd->nomem)
        bad(rd, "a broken rule without its name or message");
    v->patients = read_ids(rd, &v->npatients);
    v->nurses = read_ids(rd, &v->nnurses);
    size_t k = take_size(rd);
    if (k > rd->nfields)
        bad(rd, "a list is longer than its record");
    if (rd->bad || !k)
        return;
    v->intervals = keel_calloc(k, sizeof *v->intervals);
    if (!v->intervals) {
        rd->nomem = true;
        return;
    }
    v->nintervals = k;
    for (size_t i = 0; i < k; i++) {
        const char *from = next(rd), *to = next(rd);
        if (strlen(from) != 5 || strlen(to) != 5)
            bad(rd, "a time is not HH:MM");
        else {
            memcpy(v->intervals[i].from, from, 6);
            memcpy(v->intervals[i].to, to, 6);
        }
    }
}

/* Splits line into rd's fields at tabs; false when there are too many. */
static bool split(reader *rd, char *line)
{
    rd->nfields = 0;
    rd->at = 0;
    for (char *p = line;; p++) {
        char *tab = strchr(p, '\t');
        if (rd->nfields == sizeof rd->fields / sizeof rd->fields[0])
            return false;
        rd->fields[rd->nfields++] = p;
        if (!tab)
            return true;
        *tab = '\0';
        p = tab;
    }
}

typedef struct merge {
    keel_audit_shift *shifts;
    bool *have;
    size_t n, nshards;
    bool *shard_seen;
    char best[8];  /* "best" or "no-best", as the first partial says */
    long limit_ms; /* the first partial's time limit (0: the default) */
} merge;

/* Reads one partial file into the merge. */
static keel_status read_partial(const char *path, merge *mg, keel_error *err)
{
    char *data = NULL;
    size_t len = 0;
    keel_status rc = keel_roster_read_file(path, KEEL_MAX_STREAM_BYTES, &data, &len, err);
    if (rc)
        return rc;
    reader rd = {.path = path, .err = err};
    char *line = data, *end = data + len;
    keel_audit_shift *s = NULL;
    size_t nurses_left = 0, violations_left = 0;
    while (line < end && !rd.bad && !rd.nomem) {
        char *nl = memchr(line, '\n', (size_t)(end - line));
        if (!nl) {
            rd.line++;
            bad(&rd, "the last line has no end: the file is cut short");
            break;
        }
        *nl = '\0';
        rd.line++;
        if (rd.line == 1) {
            size_t part, whole, n;
            char tail, best[8];
            long limit;
            if (sscanf(line, MAGIC " %zu/%zu %zu %7s %ld%c", &part, &whole, &n, best, &limit,
                       &tail) != 5 ||
                part < 1 || part > whole || (strcmp(best, "best") && strcmp(best, "no-best"))) {
                bad(&rd, "the first line is not a partial result's");
            } else if (mg->shifts && (whole != mg->nshards || n != mg->n)) {
                bad(&rd, "this partial is of another audit (another number of shards or shifts)");
            } else if (mg->shifts && (strcmp(best, mg->best) != 0 || limit != mg->limit_ms)) {
                bad(&rd, "this partial was run with other options (--no-best or --time-limit) "
                         "than the first");
            } else {
                if (!mg->shifts) {
                    memcpy(mg->best, best, sizeof mg->best);
                    mg->limit_ms = limit;
                }
                if (!mg->shifts) {
                    mg->n = n;
                    mg->nshards = whole;
                    mg->shifts = keel_calloc(n ? n : 1, sizeof *mg->shifts);
                    mg->have = keel_calloc(n ? n : 1, sizeof *mg->have);
                    mg->shard_seen = keel_calloc(whole, sizeof *mg->shard_seen);
                    rd.nomem = !mg->shifts || !mg->have || !mg->shard_seen;
                }
                if (!rd.nomem && mg->shard_seen[part - 1])
                    bad(&rd, "this shard's partial is given twice");
                else if (!rd.nomem)
                    mg->shard_seen[part - 1] = true;
            }
        } else if (!split(&rd, line)) {
            bad(&rd, "a record with too many fields");
        } else if (strcmp(rd.fields[0], "S") == 0 && !nurses_left && !violations_left) {
            rd.at = 1;
            size_t index = take_size(&rd);
            if (!rd.bad && (index >= mg->n || mg->have[index])) {
                bad(&rd, "a shift outside the audit, or given twice");
            } else if (!rd.bad) {
                s = &mg->shifts[index];
                mg->have[index] = true;
                s->index = index;
                read_shift(&rd, s);
                s->nnurses = take_size(&rd);
                s->nviolations = take_size(&rd);
                nurses_left = s->nnurses;
                violations_left = s->nviolations;
                s->nurses = keel_calloc(s->nnurses ? s->nnurses : 1, sizeof *s->nurses);
                s->violations =
                    keel_calloc(s->nviolations ? s->nviolations : 1, sizeof *s->violations);
                if (!s->nurses || !s->violations) {
                    rd.nomem = true;
                    s->nnurses = s->nviolations = 0;
                }
            }
        } else if (strcmp(rd.fields[0], "N") == 0 && nurses_left) {
            rd.at = 1;
            read_nurse(&rd, &s->nurses[s->nnurses - nurses_left--]);
        } else if (strcmp(rd.fields[0], "V") == 0 && !nurses_left && violations_left) {
            rd.at = 1;
            read_violation(&rd, &s->violations[s->nviolations - violations_left--]);
        } else {
            bad(&rd, "a record out of place");
        }
        if (!rd.bad && rd.line > 1 && rd.at != rd.nfields)
            bad(&rd, "a record with fields left over");
        line = nl + 1;
    }
    if (!rd.bad && !rd.nomem && rd.line == 0)
        bad(&rd, "the file is empty");
    if (!rd.bad && !rd.nomem && (nurses_left || violations_left))
        bad(&rd, "the file ends inside a shift");
    free(data);
    if (rd.nomem)
        return keel_error_add(err, KEEL_ERR_NOMEM, path, 0, 0, NULL, "out of memory");
    return rd.bad ? KEEL_ERR_INPUT : KEEL_OK;
}

keel_status keel_audit_partial_read(const char *const *paths, size_t npaths,
                                    keel_audit_shift **shifts, size_t *n, keel_error *err)
{
    merge mg = {0};
    keel_status rc = KEEL_OK;
    *shifts = NULL;
    *n = 0;
    for (size_t i = 0; i < npaths && !rc; i++)
        rc = read_partial(paths[i], &mg, err);
    for (size_t k = 0; !rc && k < mg.nshards; k++)
        if (!mg.shard_seen[k])
            rc = keel_error_add(err, KEEL_ERR_INPUT, NULL, 0, 0, NULL,
                                "the partial result of shard %zu/%zu is missing; expected one "
                                "from every shard",
                                k + 1, mg.nshards);
    for (size_t i = 0; !rc && i < mg.n; i++)
        if (!mg.have[i])
            rc = keel_error_add(err, KEEL_ERR_INPUT, NULL, 0, 0, NULL,
                                "shift %zu is in no partial result; expected every shift once",
                                i + 1);
    free(mg.have);
    free(mg.shard_seen);
    if (rc) {
        for (size_t i = 0; i < mg.n; i++)
            keel_audit_shift_fini(&mg.shifts[i]);
        free(mg.shifts);
        return rc;
    }
    *shifts = mg.shifts;
    *n = mg.n;
    return KEEL_OK;
}
