/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_report.c - the roster loader's problems: each one recorded with the
 * file, its 1-based line and column and the key path of the value being
 * checked (patients[3].acuity), for the message shape
 * `file:line:column: key: what is wrong; what was expected`.
 *
 * Every problem in the file is recorded, not only the first; once memory
 * runs out nothing more is, and the load ends with KEEL_ERR_NOMEM.
 */
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "roster_loader.h"

/* Copies s for a message into buf[SHOWN_SIZE]: control characters become
 * '?', and text longer than MAX_SHOWN is cut (marked "...") between UTF-8
 * characters.  Returns buf. */
const char *keel_roster_report_show(char *buf, const char *s)
{
    size_t len = strlen(s), cut = len;
    if (len > MAX_SHOWN) {
        cut = MAX_SHOWN;
        while (cut > 0 && ((unsigned char)s[cut] & 0xC0) == 0x80)
            cut--;
    }
    for (size_t i = 0; i < cut; i++)
        buf[i] = ((unsigned char)s[i] < 0x20 || s[i] == 0x7F) ? '?' : s[i];
    strcpy(buf + cut, cut < len ? "..." : "");
    return buf;
}

static char *format_message(const char *fmt, va_list ap)
{
    va_list copy;
    va_copy(copy, ap);
    int len = vsnprintf(NULL, 0, fmt, copy);
    va_end(copy);
    char *message = len < 0 ? NULL : keel_malloc((size_t)len + 1);
    if (message)
        vsnprintf(message, (size_t)len + 1, fmt, ap);
    return message;
}

/* Records an input problem at mark `at`, keyed by the current path. */
void keel_roster_report_problem(loader *ld, keel_mark at, const char *fmt, ...)
{
    if (ld->nomem)
        return;
    ld->nproblems++;
    if (!ld->err)
        return;
    va_list ap;
    va_start(ap, fmt);
    char *message = format_message(fmt, ap);
    va_end(ap);
    size_t before = ld->err->nproblems;
    if (message)
        keel_error_add(ld->err, KEEL_ERR_INPUT, ld->file, at.line, at.column,
                       ld->pathlen ? ld->path : NULL, "%s", message);
    if (!message || ld->err->nproblems == before)
        ld->nomem = true;
    free(message);
}

/* Appends ".key" (or "key" at the top) to the path; returns the old length
 * for keel_roster_report_pop_path(). */
size_t keel_roster_report_push_key(loader *ld, const char *key)
{
    char shown[SHOWN_SIZE];
    size_t old = ld->pathlen;
    int n = snprintf(ld->path + old, MAX_PATH - old, "%s%s", old ? "." : "",
                     keel_roster_report_show(shown, key));
    ld->pathlen = n < 0 ? old : strlen(ld->path);
    return old;
}

size_t keel_roster_report_push_index(loader *ld, size_t index)
{
    size_t old = ld->pathlen;
    snprintf(ld->path + old, MAX_PATH - old, "[%zu]", index);
    ld->pathlen = strlen(ld->path);
    return old;
}

void keel_roster_report_pop_path(loader *ld, size_t old)
{
    ld->pathlen = old;
    ld->path[old] = '\0';
}

/* Sets the path to list[index].key (key may be NULL), for the checks that
 * run after the walk. */
void keel_roster_report_set_path(loader *ld, const char *list, size_t index, const char *key)
{
    keel_roster_report_pop_path(ld, 0);
    keel_roster_report_push_key(ld, list);
    keel_roster_report_push_index(ld, index);
    if (key)
        keel_roster_report_push_key(ld, key);
}
