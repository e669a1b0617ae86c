/* SPDX-License-Identifier: GPL-3.0-or-later */
/* textbuf.c - snprintf-style appending into a caller's buffer; see textbuf.h. */
#include "textbuf.h"

#include <stdarg.h>
#include <stdio.h>

void keel_textbuf_put(keel_textbuf *t, const char *fmt, ...)
{
    va_list ap;
    size_t room = t->len < t->size ? t->size - t->len : 0;
    va_start(ap, fmt);
    int n = vsnprintf(room ? t->buf + t->len : NULL, room, fmt, ap);
    va_end(ap);
    if (n > 0)
        t->len += (size_t)n;
}
