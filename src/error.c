/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * error.c - the error value: a status and a list of positioned problems;
 * and the "did you mean" of a message (keel_error_suggest()).
 */
#include "keel/error.h"

#include <stdarg.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"

void keel_error_init(keel_error *err)
{
    err->status = KEEL_OK;
    err->nproblems = 0;
    err->problems = NULL;
}

void keel_error_fini(keel_error *err)
{
    if (!err)
        return;
    for (size_t i = 0; i < err->nproblems; i++) {
        free(err->problems[i].file);
        free(err->problems[i].key);
        free(err->problems[i].message);
    }
    free(err->problems);
    keel_error_init(err);
}

keel_status keel_error_add(keel_error *err, keel_status status, const char *file, int line,
                           int column, const char *key, const char *fmt, ...)
{
    if (!err)
        return status;
    if (err->status == KEEL_OK)
        err->status = status;

    char *message = NULL;
    va_list ap;
    va_start(ap, fmt);
    int len = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (len >= 0)
        message = keel_malloc((size_t)len + 1);
    if (message) {
        va_start(ap, fmt);
        vsnprintf(message, (size_t)len + 1, fmt, ap);
        va_end(ap);
    }
    keel_problem *grown =
        message ? keel_reallocarray(err->problems, err->nproblems + 1, sizeof *grown) : NULL;
    char *file_copy = file ? keel_strdup(file) : NULL;
    char *key_copy = key ? keel_strdup(key) : NULL;
    if (grown)
        err->problems = grown; /* the old array may be gone even if a copy below failed */
    if (!message || !grown || (file && !file_copy) || (key && !key_copy)) {
        free(message);
        free(file_copy);
        free(key_copy);
        err->status = KEEL_ERR_NOMEM;
        return status;
    }
    err->problems[err->nproblems++] = (keel_problem){
        .file = file_copy, .line = line, .column = column, .key = key_copy, .message = message};
    return status;
}

int keel_problem_format(const keel_problem *p, char *buf, size_t size)
{
    char where[64] = "";
    if (p->line > 0)
        snprintf(where, sizeof where, ":%d:%d", p->line, p->column);
    return snprintf(buf, size, "%s%s%s%s%s%s", p->file ? p->file : "", where, p->file ? ": " : "",
                    p->key ? p->key : "", p->key ? ": " : "", p->message ? p->message : "");
}

const char *keel_status_string(keel_status status)
{
    switch (status) {
    case KEEL_OK:
        return "success";
    case KEEL_ERR_USAGE:
        return "usage error";
    case KEEL_ERR_INPUT:
        return "bad input";
    case KEEL_ERR_IO:
        return "input/output error";
    case KEEL_ERR_NOMEM:
        return "out of memory";
    case KEEL_ERR_SOLVER:
        return "solver failure";
    }
    return "unknown status";
}

enum {
    MAX_SUGGEST = 64, /* longest word that gets a "did you mean" */
};

/* Optimal string alignment distance of a and b (both at most MAX_SUGGEST). */
static size_t edit_distance(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    size_t d[MAX_SUGGEST + 1][MAX_SUGGEST + 1];
    for (size_t i = 0; i <= la; i++)
        d[i][0] = i;
    for (size_t j = 0; j <= lb; j++)
        d[0][j] = j;
    for (size_t i = 1; i <= la; i++) {
        for (size_t j = 1; j <= lb; j++) {
            size_t best = d[i - 1][j - 1] + (a[i - 1] != b[j - 1]);
            if (d[i - 1][j] + 1 < best)
                best = d[i - 1][j] + 1;
            if (d[i][j - 1] + 1 < best)
                best = d[i][j - 1] + 1;
            if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1] &&
                d[i - 2][j - 2] + 1 < best)
                best = d[i - 2][j - 2] + 1;
            d[i][j] = best;
        }
    }
    return d[la][lb];
}

/* True when a and b are the same ASCII text, ignoring case. */
static bool same_ignoring_case(const char *a, const char *b)
{
    for (; *a && *b; a++, b++) {
        char x = *a >= 'A' && *a <= 'Z' ? (char)(*a - 'A' + 'a') : *a;
        char y = *b >= 'A' && *b <= 'Z' ? (char)(*b - 'A' + 'a') : *b;
        if (x != y)
            return false;
    }
    return *a == *b;
}

const char *keel_error_suggest(const char *word, const char *const *words, size_t nwords)
{
    if (!word)
        return NULL;
    for (size_t i = 0; i < nwords; i++)
        if (words[i] && same_ignoring_case(word, words[i]))
            return words[i];
    if (strlen(word) > MAX_SUGGEST)
        return NULL;
    const char *best = NULL;
    size_t best_distance = 3;
    for (size_t i = 0; i < nwords; i++) {
        if (!words[i] || strlen(words[i]) > MAX_SUGGEST)
            continue;
        size_t distance = edit_distance(word, words[i]);
        size_t longer = strlen(word) > strlen(words[i]) ? strlen(word) : strlen(words[i]);
        if (distance < best_distance && 3 * distance <= longer) {
            best = words[i];
            best_distance = distance;
        }
    }
    return best;
}
