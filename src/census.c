/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * census.c - reads a census CSV into roster patients; see keel/census.h.
 *
 * The reader splits the text into fields (RFC 4180), remembering where each
 * field starts; the header row says which column holds which field; each
 * later row becomes a patient, checked field by field and, when the roster
 * it joins is given, against that roster's scales.  Every problem in the
 * file is reported, in file order.
 */
#include "keel/census.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "roster_internal.h"
#include "workload_internal.h"

enum {
    MAX_LEVEL = 99,
    MAX_MINUTES = 1440,
    MAX_RATIO = 99,
};

/* The fields keel reads, in the order of the header comment. */
enum field {
    F_PATIENT,
    F_BED,
    F_ACUITY,
    F_CARE,
    F_NEEDS,
    F_ISOLATION,
    F_EXTRAS,
    F_RATIO,
    F_ROOM,
    F_ZONE,
    F_PREVIOUS,
    F_NAME,
    F_NURSE,
    NFIELDS
};

static const char *const field_names[NFIELDS] = {
    "patient", "bed",   "acuity", "care_minutes", "needs",          "isolation",
    "extras",  "ratio", "room",   "zone",         "previous_nurse", "name", "nurse"};

typedef struct cell {
    char *text;
    int line, column;
    bool too_long; /* cut at KEEL_MAX_TEXT bytes; said once the header is known */
} cell;

typedef struct row {
    cell *cells;
    size_t ncells;
    int line;
} row;

typedef struct reader {
    const char *name;
    const char *text;
    size_t len, pos;
    int line, column;
    keel_error *err;
    bool nomem;
    bool bad;
} reader;

static void problem(reader *rd, int line, int column, const char *key, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;

static void problem(reader *rd, int line, int column, const char *key, const char *fmt, ...)
{
    char msg[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    rd->bad = true;
    keel_error_add(rd->err, KEEL_ERR_INPUT, rd->name, line, column, key, "%s", msg);
    if (rd->err && rd->err->status == KEEL_ERR_NOMEM) /* the problem could not be kept */
        rd->nomem = true;
}

static int peek(const reader *rd)
{
    return rd->pos < rd->len ? (unsigned char)rd->text[rd->pos] : -1;
}

static void advance(reader *rd)
{
    char c = rd->text[rd->pos++];
    if (c == '\n') {
        rd->line++;
        rd->column = 1;
    } else if (((unsigned char)c & 0xC0) != 0x80) { /* count characters, not bytes */
        rd->column++;
    }
}

/* Reads one field; *end_of_row is set at a line break or the end. */
static bool read_cell(reader *rd, cell *out, bool *end_of_row)
{
    size_t cap = 16, n = 0;
    char *buf = keel_malloc(cap);
    if (!buf)
        return false;
    *out = (cell){.line = rd->line, .column = rd->column};
    bool quoted = peek(rd) == '"';
    if (quoted)
        advance(rd);
    for (;;) {
        int c = peek(rd);
        if (c < 0) {
            if (quoted)
                problem(rd, out->line, out->column, NULL,
                        "a quoted field is never closed; expected a closing '\"'");
            *end_of_row = true;
            break;
        }
        if (quoted && c == '"') {
            advance(rd);
            if (peek(rd) != '"') {
                quoted = false;
                continue;
            }
        } else if (!quoted && c == ',') {
            advance(rd);
            *end_of_row = false;
            break;
        } else if (!quoted && (c == '\n' || c == '\r')) {
            if (c == '\r')
                advance(rd);
            if (peek(rd) == '\n')
                advance(rd);
            *end_of_row = true;
            break;
        }
        if (n == KEEL_MAX_TEXT) {
            out->too_long = true;
            rd->bad = true;
            n++; /* the rest of the field is skipped */
        }
        if (n > KEEL_MAX_TEXT) {
            advance(rd);
            continue;
        }
        if (n + 2 > cap) {
            char *grown = keel_realloc(buf, cap *= 2);
            if (!grown) {
                free(buf);
                return false;
            }
            buf = grown;
        }
        buf[n++] = rd->text[rd->pos];
        advance(rd);
    }
    buf[n > KEEL_MAX_TEXT ? KEEL_MAX_TEXT : n] = '\0';
    out->text = buf;
    return true;
}

static void free_row(row *r)
{
    for (size_t i = 0; i < r->ncells; i++)
        free(r->cells[i].text);
    free(r->cells);
}

static void free_rows(row *rows, size_t nrows)
{
    for (size_t r = 0; r < nrows; r++)
        free_row(&rows[r]);
    free(rows);
}

static bool blank_row(const row *r)
{
    for (size_t i = 0; i < r->ncells; i++)
        if (r->cells[i].text[strspn(r->cells[i].text, " \t")] != '\0')
            return false;
    return true;
}

/* Splits the whole text into rows of cells; blank lines are skipped. */
static row *read_rows(reader *rd, size_t *nrows)
{
    row *rows = NULL;
    *nrows = 0;
    if (rd->len >= 3 && memcmp(rd->text, "\xEF\xBB\xBF", 3) == 0)
        rd->pos = 3; /* a byte-order mark, as some spreadsheets write */
    while (rd->pos < rd->len) {
        row r = {.line = rd->line};
        size_t cap = 0;
        bool end = false;
        while (!end) {
            if (r.ncells == KEEL_MAX_ITEMS) {
                problem(rd, r.line, 1, NULL, "more than %d fields in one row; keel reads at most %d",
                        KEEL_MAX_ITEMS, KEEL_MAX_ITEMS);
                free_row(&r);
                free_rows(rows, *nrows);
                *nrows = 0;
                return NULL;
            }
            if (r.ncells == cap) {
                cap = cap ? 2 * cap : 8;
                cell *grown = keel_reallocarray(r.cells, cap, sizeof *grown);
                if (!grown)
                    goto nomem;
                r.cells = grown;
            }
            if (!read_cell(rd, &r.cells[r.ncells], &end))
                goto nomem;
            r.ncells++;
        }
        if (blank_row(&r)) {
            free_row(&r);
            continue;
        }
        row *grown = keel_reallocarray(rows, *nrows + 1, sizeof *grown);
        if (!grown) {
            free_row(&r);
            goto nomem_rows;
        }
        rows = grown;
        rows[(*nrows)++] = r;
        if (*nrows > KEEL_MAX_ITEMS + 1) { /* the header and KEEL_MAX_ITEMS patients */
            problem(rd, r.line, 1, NULL,
                    "more than %d patients; keel reads a census of at most %d rows "
                    "(docs/census-format.md)",
                    KEEL_MAX_ITEMS, KEEL_MAX_ITEMS);
            free_rows(rows, *nrows);
            *nrows = 0;
            return NULL;
        }
        continue;
    nomem:
        free_row(&r);
    nomem_rows:
        rd->nomem = true;
        free_rows(rows, *nrows);
        *nrows = 0;
        return NULL;
    }
    return rows;
}

/* Trims spaces at both ends in place. */
static char *trim(char *s)
{
    s += strspn(s, " \t");
    size_t n = strlen(s);
    while (n > 0 && (s[n - 1] == ' ' || s[n - 1] == '\t'))
        s[--n] = '\0';
    return s;
}

/* Says each field cut at KEEL_MAX_TEXT bytes, under its column's header. */
static void say_long_fields(reader *rd, row *rows, size_t nrows)
{
    for (size_t r = 0; r < nrows; r++)
        for (size_t i = 0; i < rows[r].ncells; i++) {
            const cell *c = &rows[r].cells[i];
            if (!c->too_long)
                continue;
            const char *header = r > 0 && i < rows[0].ncells && !rows[0].cells[i].too_long
                                     ? trim(rows[0].cells[i].text)
                                     : NULL;
            problem(rd, c->line, c->column, header && *header ? header : NULL,
                    "a field longer than %d bytes, the most keel reads (docs/census-format.md)",
                    KEEL_MAX_TEXT);
        }
}

static bool same_ignoring_case(const char *a, const char *b)
{
    for (; *a && *b; a++, b++)
        if ((*a | 0x20) != (*b | 0x20))
            return false;
    return *a == *b;
}

/* Which header each field reads from: by default its own name; the mapping
 * "field=Header,..." changes that. */
static keel_status parse_map(const char *map, char **headers, keel_error *err)
{
    for (size_t f = 0; f < NFIELDS; f++)
        headers[f] = NULL;
    if (!map)
        return KEEL_OK;
    const char *p = map;
    while (*p) {
        const char *comma = strchr(p, ',');
        size_t len = comma ? (size_t)(comma - p) : strlen(p);
        const char *eq = memchr(p, '=', len);
        size_t f = NFIELDS;
        for (size_t i = 0; eq && i < NFIELDS; i++)
            if ((size_t)(eq - p) == strlen(field_names[i]) &&
                strncmp(p, field_names[i], (size_t)(eq - p)) == 0)
                f = i;
        if (!eq || f == NFIELDS || eq + 1 == p + len)
            return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                                  "--map: '%.*s' is not field=Header with a field of keel's "
                                  "(patient, bed, acuity, care_minutes, needs, isolation, extras, "
                                  "ratio, room, zone, previous_nurse, name, nurse)",
                                  (int)len, p);
        free(headers[f]);
        headers[f] = keel_strndup(eq + 1, (size_t)(p + len - eq - 1));
        if (!headers[f])
            return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        p += len + (comma ? 1 : 0);
    }
    return KEEL_OK;
}

static bool read_whole(reader *rd, const cell *c, const char *key, int min, int max, int *out)
{
    const char *s = trim(c->text);
    char *end;
    long v = strtol(s, &end, 10);
    if (*s == '\0' || *end != '\0' || v < min || v > max) {
        problem(rd, c->line, c->column, key, "'%s' is not a whole number from %d to %d", s, min,
                max);
        return false;
    }
    *out = (int)v;
    return true;
}

/* A list separated by ';' or spaces. */
static bool read_list(reader *rd, const cell *c, char ***items, size_t *n)
{
    char *s = c->text, *save = NULL;
    size_t cap = 0;
    *items = NULL;
    *n = 0;
    for (char *tok = strtok_r(s, "; \t", &save); tok; tok = strtok_r(NULL, "; \t", &save)) {
        if (*n == cap) {
            cap = cap ? 2 * cap : 4;
            char **grown = keel_reallocarray(*items, cap, sizeof *grown);
            if (!grown) {
                rd->nomem = true;
                return false;
            }
            *items = grown;
        }
        (*items)[*n] = keel_strdup(tok);
        if (!(*items)[*n]) {
            rd->nomem = true;
            return false;
        }
        (*n)++;
    }
    return true;
}

static char *copy_text(reader *rd, const cell *c)
{
    const char *s = trim(c->text);
    if (*s == '\0')
        return NULL;
    char *copy = keel_strdup(s);
    if (!copy)
        rd->nomem = true;
    return copy;
}

static void read_patient(reader *rd, const row *r, const int *col, keel_patient *p)
{
    *p = (keel_patient){.acuity = KEEL_ABSENT,
                        .care_minutes = KEEL_ABSENT,
                        .ratio = KEEL_ABSENT,
                        .arrives_at = KEEL_ABSENT,
                        .leaves_at = KEEL_ABSENT,
                        .mark = {r->line, 1}};
    const cell *at[NFIELDS];
    for (size_t f = 0; f < NFIELDS; f++)
        at[f] = col[f] >= 0 && (size_t)col[f] < r->ncells ? &r->cells[col[f]] : NULL;
    const cell *id = at[F_PATIENT];
    p->id = id ? copy_text(rd, id) : NULL;
    if (!p->id)
        problem(rd, r->line, id ? id->column : 1, "patient",
                "no patient id; every row needs the patient's id");
    if (at[F_BED])
        p->bed = copy_text(rd, at[F_BED]);
    if (at[F_NAME])
        p->name = copy_text(rd, at[F_NAME]);
    if (at[F_ROOM])
        p->room = copy_text(rd, at[F_ROOM]);
    if (at[F_ZONE])
        p->zone = copy_text(rd, at[F_ZONE]);
    if (at[F_PREVIOUS])
        p->previous_nurse = copy_text(rd, at[F_PREVIOUS]);
    if (at[F_NURSE])
        p->nurse = copy_text(rd, at[F_NURSE]);
    bool has_acuity = at[F_ACUITY] && *trim(at[F_ACUITY]->text);
    bool has_care = at[F_CARE] && *trim(at[F_CARE]->text);
    if (has_acuity)
        read_whole(rd, at[F_ACUITY], "acuity", 0, MAX_LEVEL, &p->acuity);
    if (has_care)
        read_whole(rd, at[F_CARE], "care_minutes", 0, MAX_MINUTES, &p->care_minutes);
    if (!has_acuity && !has_care)
        problem(rd, r->line, at[F_ACUITY] ? at[F_ACUITY]->column : 1, "acuity",
                "no acuity; every patient needs an acuity level or care minutes");
    if (at[F_NEEDS])
        read_list(rd, at[F_NEEDS], &p->needs, &p->nneeds);
    if (at[F_EXTRAS])
        read_list(rd, at[F_EXTRAS], &p->extras, &p->nextras);
    if (at[F_ISOLATION]) {
        const char *s = trim(at[F_ISOLATION]->text);
        bool known = *s == '\0' || same_ignoring_case(s, "none");
        for (int k = 1; k < KEEL_NISOLATION && !known; k++)
            if (same_ignoring_case(s, keel_isolation_name((keel_isolation)k))) {
                p->isolation = (keel_isolation)k;
                known = true;
            }
        if (!known)
            problem(rd, at[F_ISOLATION]->line, at[F_ISOLATION]->column, "isolation",
                    "unknown precaution '%s'; expected contact, droplet, airborne, protective or "
                    "an empty field",
                    s);
    }
    if (at[F_RATIO] && *trim(at[F_RATIO]->text)) {
        const char *s = trim(at[F_RATIO]->text);
        char *end;
        long n = s[0] == '1' && s[1] == ':' ? strtol(s + 2, &end, 10) : -1;
        if (n < 1 || n > MAX_RATIO || *end != '\0')
            problem(rd, at[F_RATIO]->line, at[F_RATIO]->column, "ratio",
                    "'%s' is not a ratio; expected one such as 1:2 (1:1 to 1:99)", s);
        else
            p->ratio = (int)n;
    }
}

/* The columns where a row's checked fields start (1 when absent). */
typedef struct columns {
    int acuity, extras, nurse;
} columns;

/* Says, through err, what of patient p the unit lacks: its acuity level
 * (reported at line:at.acuity), each of its extras (at line:at.extras) and
 * the nurse who had it (at line:at.nurse), who must be one of the unit's
 * nurses.  Returns KEEL_OK, KEEL_ERR_INPUT, or KEEL_ERR_NOMEM when any
 * problem could not be recorded. */
static keel_status check_scales(const char *file, const keel_patient *p, int line, columns at,
                                const keel_roster *unit, keel_error *err)
{
    keel_status rc = KEEL_OK;
    int acuity_column = at.acuity, extras_column = at.extras;
    if (p->acuity != KEEL_ABSENT && p->care_minutes == KEEL_ABSENT &&
        keel_roster_acuity_minutes(unit, p->acuity) == KEEL_ABSENT)
        rc = keel_error_add(err, KEEL_ERR_INPUT, file, line, acuity_column, "acuity",
                            "patient %s has acuity %d, which %s's policy.acuity_minutes "
                            "does not give; expected a level of the unit's scale",
                            p->id ? p->id : "without an id", p->acuity, unit->path);
    for (size_t k = 0; k < p->nextras; k++)
        if (keel_roster_extra_minutes(unit, p->extras[k]) == KEEL_ABSENT)
            rc = keel_error_add(err, KEEL_ERR_INPUT, file, line, extras_column, "extras",
                                "patient %s lists extra '%s', which %s's "
                                "policy.extra_minutes does not give",
                                p->id ? p->id : "without an id", p->extras[k], unit->path);
    if (p->nurse && keel_roster_find_nurse(unit, p->nurse) < 0)
        rc = keel_error_add(err, KEEL_ERR_INPUT, file, line, at.nurse, "nurse",
                            "patient %s has nurse '%s', who is not one of %s's nurses; "
                            "expected the id of a nurse on that roster",
                            p->id ? p->id : "without an id", p->nurse, unit->path);
    if (rc && err && err->status == KEEL_ERR_NOMEM) /* a problem could not be kept */
        rc = KEEL_ERR_NOMEM;
    return rc;
}

static keel_census *new_census(const char *name)
{
    keel_census *c = keel_calloc(1, sizeof *c);
    if (c && !(c->path = keel_strdup(name))) {
        free(c);
        c = NULL;
    }
    return c;
}

/* The column where row r's field in column index i starts; 1 when the row
 * has no such field. */
static int column_of(const row *r, int i)
{
    return i >= 0 && (size_t)i < r->ncells ? r->cells[i].column : 1;
}

/* True, after saying so, when the header is one column that holds ';': a
 * spreadsheet saved with ';' as its separator, as some locales do. */
static bool semicolon_separated(reader *rd, const row *header)
{
    if (header->ncells != 1 || !strchr(header->cells[0].text, ';'))
        return false;
    problem(rd, header->line, 1, NULL,
            "the header is one column holding ';': the file seems to use ';' as separator; keel "
            "reads commas (save the sheet as comma-separated CSV)");
    return true;
}

keel_status keel_census_parse_for(const char *name, const char *text, size_t len, const char *map,
                                  const keel_roster *unit, keel_census **out, keel_error *err)
{
    reader rd = {.name = name, .text = text, .len = len, .line = 1, .column = 1, .err = err};
    char *headers[NFIELDS];
    *out = NULL;
    keel_status rc = parse_map(map, headers, err);
    size_t nrows = 0;
    row *rows = NULL;
    keel_census *c = NULL;
    if (rc)
        goto done;
    rows = read_rows(&rd, &nrows);
    say_long_fields(&rd, rows, nrows);
    if (rd.nomem || (rd.bad && !rows)) /* out of memory, or past a limit (said) */
        goto done;
    if (nrows == 0) {
        problem(&rd, 1, 1, NULL,
                "no header row; expected a first line naming the columns, such as "
                "bed,patient,acuity,needs,isolation");
        goto done;
    }
    if (semicolon_separated(&rd, &rows[0]))
        goto done;
    int col[NFIELDS];
    for (size_t f = 0; f < NFIELDS; f++) {
        col[f] = -1;
        const char *want = headers[f] ? headers[f] : field_names[f];
        for (size_t i = 0; i < rows[0].ncells; i++) {
            if (!same_ignoring_case(trim(rows[0].cells[i].text), want))
                continue;
            if (col[f] >= 0)
                problem(&rd, rows[0].line, rows[0].cells[i].column, field_names[f],
                        "column '%s' is given twice (first in column %d); expected it once", want,
                        rows[0].cells[col[f]].column);
            else
                col[f] = (int)i;
        }
        if (headers[f] && col[f] < 0)
            problem(&rd, rows[0].line, 1, field_names[f],
                    "the mapping names column '%s', which the header does not have", want);
    }
    if (col[F_PATIENT] < 0)
        problem(&rd, rows[0].line, 1, "patient",
                "the header has no patient column; expected a column 'patient' (or --map "
                "patient=YourHeader)");
    if (col[F_ACUITY] < 0 && col[F_CARE] < 0)
        problem(&rd, rows[0].line, 1, "acuity",
                "the header has no acuity or care_minutes column; expected one of them");
    c = new_census(name);
    if (!c) {
        rd.nomem = true;
        goto done;
    }
    if (rd.bad)
        goto done;
    c->patients = keel_calloc(nrows, sizeof *c->patients);
    if (!c->patients) {
        rd.nomem = true;
        goto done;
    }
    for (size_t r = 1; r < nrows && !rd.nomem; r++) {
        keel_patient *p = &c->patients[c->npatients++];
        read_patient(&rd, &rows[r], col, p);
        if (unit) {
            columns at = {column_of(&rows[r], col[F_ACUITY]), column_of(&rows[r], col[F_EXTRAS]),
                          column_of(&rows[r], col[F_NURSE])};
            keel_status bad = check_scales(name, p, rows[r].line, at, unit, err);
            rd.bad = rd.bad || bad;
            rd.nomem = rd.nomem || bad == KEEL_ERR_NOMEM;
        }
        for (size_t q = 0; p->id && q + 1 < c->npatients; q++)
            if (c->patients[q].id && strcmp(c->patients[q].id, p->id) == 0) {
                problem(&rd, rows[r].line, rows[r].cells[col[F_PATIENT]].column, "patient",
                        "patient '%s' is already on line %d; expected each patient once", p->id,
                        c->patients[q].mark.line);
                break;
            }
    }
    if (c->npatients == 0 && !rd.bad)
        problem(&rd, rows[0].line, 1, NULL, "the census has no patients; expected a row each");
done:
    free_rows(rows, nrows);
    for (size_t f = 0; f < NFIELDS; f++)
        free(headers[f]);
    if (!rc && rd.nomem)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    else if (!rc && rd.bad)
        rc = KEEL_ERR_INPUT;
    if (rc)
        keel_census_free(c);
    else
        *out = c;
    return rc;
}

keel_status keel_census_parse(const char *name, const char *text, size_t len, const char *map,
                              keel_census **out, keel_error *err)
{
    return keel_census_parse_for(name, text, len, map, NULL, out, err);
}

keel_status keel_census_load_for(const char *path, const char *map, const keel_roster *unit,
                                 keel_census **out, keel_error *err)
{
    char *text = NULL;
    size_t len = 0;
    *out = NULL;
    keel_status rc = keel_roster_read_file(path, KEEL_MAX_FILE_BYTES, &text, &len, err);
    if (rc)
        return rc;
    rc = keel_census_parse_for(path, text, len, map, unit, out, err);
    free(text);
    return rc;
}

keel_status keel_census_load(const char *path, const char *map, keel_census **out, keel_error *err)
{
    return keel_census_load_for(path, map, NULL, out, err);
}

keel_status keel_census_into_roster(keel_census *c, keel_roster *r, keel_error *err)
{
    keel_status rc = KEEL_OK;
    for (size_t i = 0; i < c->npatients; i++) {
        keel_status bad = check_scales(c->path, &c->patients[i], c->patients[i].mark.line,
                                       (columns){1, 1, 1}, r, err);
        rc = rc ? rc : bad;
    }
    if (rc)
        return rc;
    for (size_t i = 0; i < r->npatients; i++)
        keel_roster_data_patient_fini(&r->patients[i]);
    free(r->patients);
    r->patients = c->patients;
    r->npatients = c->npatients;
    c->patients = NULL;
    c->npatients = 0;
    return KEEL_OK;
}

void keel_census_free(keel_census *c)
{
    if (!c)
        return;
    for (size_t i = 0; i < c->npatients; i++)
        keel_roster_data_patient_fini(&c->patients[i]);
    free(c->patients);
    free(c->path);
    free(c);
}
