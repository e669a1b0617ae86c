/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * textbuf.h - text written into a caller's buffer, snprintf-style: len
 * counts every character the full text needs, even those that did not fit
 * (internal; for the library's functions that format into a buffer).
 */
#ifndef KEEL_TEXTBUF_H
#define KEEL_TEXTBUF_H

#include <stddef.h>

typedef struct keel_textbuf {
    char *buf; /* may be NULL when size is 0 */
    size_t size;
    size_t len;
} keel_textbuf;

/* Appends printf-formatted text; what does not fit is counted, not written. */
void keel_textbuf_put(keel_textbuf *t, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;

#endif
