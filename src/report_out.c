/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_out.c - text the writers share the shape of: quoted strings (JSON
 * escapes, valid YAML too) and wrapped paragraphs.
 */
#include <stdio.h>
#include <string.h>

#include "report_internal.h"

void keel_report_out_quoted(FILE *out, const char *s)
{
    fputc('"', out);
    for (const unsigned char *c = (const unsigned char *)s; *c; c++) {
        switch (*c) {
        case '"':
            fputs("\\\"", out);
            break;
        case '\\':
            fputs("\\\\", out);
            break;
        case '\n':
            fputs("\\n", out);
            break;
        case '\t':
            fputs("\\t", out);
            break;
        case '\r':
            fputs("\\r", out);
            break;
        default:
            if (*c < 0x20)
                fprintf(out, "\\u%04x", *c);
            else
                fputc(*c, out);
        }
    }
    fputc('"', out);
}

void keel_report_out_wrapped(FILE *out, const char *indent, const char *text, size_t width)
{
    size_t room = width > strlen(indent) ? width - strlen(indent) : 1;
    while (*text) {
        while (*text == ' ')
            text++;
        if (!*text)
            break;
        size_t len = strlen(text), cut = len;
        if (len > room) {
            cut = room;
            /* Break at a space, but not before a lone "%". */
            while (cut > 0 && (text[cut] != ' ' || text[cut + 1] == '%'))
                cut--;
            if (cut == 0) /* one long word */
                for (cut = room; text[cut] && text[cut] != ' '; cut++)
                    ;
        }
        fprintf(out, "%s%.*s\n", indent, (int)cut, text);
        text += cut;
    }
}
