/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * report_out.c - text the writers share the shape of: quoted strings (JSON
 * escapes, valid YAML too), wrapped paragraphs, and the parts of an HTML
 * page (escapes, the one stylesheet, the footer with the caution, a chart
 * of bars as inline SVG with text labels).
 */
#include <stdio.h>
#include <string.h>

#include "keel/keel.h"

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

void keel_report_out_csv(FILE *out, const char *s, bool last)
{
    if (s && strpbrk(s, ",\"\r\n")) {
        fputc('"', out);
        for (; *s; s++) {
            if (*s == '"')
                fputc('"', out);
            fputc(*s, out);
        }
        fputc('"', out);
    } else if (s) {
        fputs(s, out);
    }
    fputs(last ? "\r\n" : ",", out);
}

void keel_report_out_html(FILE *out, const char *s)
{
    for (; s && *s; s++) {
        switch (*s) {
        case '&':
            fputs("&amp;", out);
            break;
        case '<':
            fputs("&lt;", out);
            break;
        case '>':
            fputs("&gt;", out);
            break;
        case '"':
            fputs("&quot;", out);
            break;
        default:
            fputc(*s, out);
        }
    }
}

/* One stylesheet for every page: greys and text, a print layout that fits
 * an assignment on one landscape A4 sheet; .details does not print. */
static const char STYLE[] =
    "body{font-family:'DejaVu Sans',Arial,sans-serif;color:#1d1d1d;margin:1.2em;"
    "font-size:10.5pt}\n"
    "h1{font-size:14pt;margin:0 0 .2em}h2{font-size:11pt;margin:.7em 0 .3em;"
    "border-bottom:1px solid #888}\n"
    ".top{display:flex;flex-wrap:wrap;gap:1.5em;align-items:flex-start}"
    ".top>div{flex:1 1 24em}\n"
    ".sub{color:#444;margin:0 0 .4em}.verdict{border:2px solid #333;padding:.3em .5em;"
    "margin:.4em 0;font-weight:bold}\n"
    ".banner{border:3px double #000;padding:.4em;font-weight:bold;background:#eee}\n"
    ".nurses{display:flex;flex-wrap:wrap;gap:.4em}\n"
    ".nurse{border:1px solid #777;padding:.2em .3em;flex:1 1 30%;min-width:17em;"
    "break-inside:avoid}\n"
    ".nurse h3{font-size:10pt;margin:0 0 .2em}.nurse h3 span{font-weight:normal}"
    ".over{font-weight:bold;text-decoration:underline}\n"
    "table{border-collapse:collapse;width:100%}td,th{text-align:left;padding:0 4px;"
    "vertical-align:top;font-size:9pt}\n"
    "th{border-bottom:1px solid #999}.num{text-align:right}\n"
    "ul.cols{columns:3;margin:0;padding-left:1.2em;font-size:9pt}\n"
    "svg text{font-size:11px;fill:#1d1d1d}.bar{fill:#9aa5b1;stroke:#333}"
    ".bar.overload{fill:url(#hatch);stroke:#000;stroke-width:2}\n"
    "footer{margin-top:.8em;border-top:1px solid #888;font-size:9pt}"
    "footer p{margin:.2em 0}\n"
    "@page{size:A4 landscape;margin:7mm}\n"
    "@media print{body{margin:0;font-size:8pt}td,th,ul.cols{font-size:7pt}"
    "h1{font-size:12pt}h2{font-size:9pt;margin:.3em 0 .1em}.nurse h3{font-size:8pt}"
    "footer{font-size:7pt}.details{display:none}}\n";

void keel_report_out_html_head(FILE *out, const char *title)
{
    fputs("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>", out);
    keel_report_out_html(out, title);
    fprintf(out, "</title>\n<style>\n%s</style>\n</head>\n<body>\n", STYLE);
}

void keel_report_out_html_foot(FILE *out, const keel_law_table *t)
{
    fputs("<footer>\n<p><b>", out);
    keel_report_out_html(out, KEEL_CAUTION);
    fputs("</b></p>\n", out);
    if (t) {
        char cite[KEEL_LAW_CITE_SIZE];
        keel_law_cite(t, cite, sizeof cite);
        fputs("<p>Ratio table: ", out);
        keel_report_out_html(out, cite);
        fputs("</p>\n", out);
    }
    fprintf(out, "<p>Made by keel %s.</p>\n</footer>\n</body>\n</html>\n", keel_version());
}

void keel_report_out_html_chart(FILE *out, const char *title, const keel_html_bar *bars,
                                size_t nbars, const keel_html_line *lines, size_t nlines,
                                double top)
{
    const int left = 90, width = 420, row = 18;
    int height = (int)nbars * row + 30, y = 4;
    double scale = top > 0 ? width / top : 1;
    fprintf(out, "<svg role=\"img\" aria-label=\"");
    keel_report_out_html(out, title);
    fprintf(out, "\" width=\"%d\" height=\"%d\" viewBox=\"0 0 %d %d\">\n", left + width + 240,
            height, left + width + 240, height);
    fputs("<defs><pattern id=\"hatch\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
          "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#fff\"/>"
          "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" stroke=\"#000\" stroke-width=\"3\"/>"
          "</pattern></defs>\n",
          out);
    for (size_t i = 0; i < nbars; i++, y += row) {
        const keel_html_bar *b = &bars[i];
        double len = b->value > 0 ? b->value * scale : 0;
        fprintf(out, "<text x=\"%d\" y=\"%d\" text-anchor=\"end\">", left - 6, y + 12);
        keel_report_out_html(out, b->label);
        fprintf(out,
                "</text><rect class=\"bar%s\" x=\"%d\" y=\"%d\" width=\"%.1f\" "
                "height=\"%d\"/>",
                b->hatched ? " overload" : "", left, y, len, row - 4);
        if (b->mark >= 0)
            fprintf(out,
                    "<line x1=\"%.1f\" y1=\"%d\" x2=\"%.1f\" y2=\"%d\" stroke=\"#000\" "
                    "stroke-width=\"2\"/>",
                    left + b->mark * scale, y - 1, left + b->mark * scale, y + row - 3);
        fprintf(out, "<text x=\"%.1f\" y=\"%d\">", left + len + 4, y + 12);
        keel_report_out_html(out, b->text);
        fputs("</text>\n", out);
    }
    for (size_t i = 0; i < nlines; i++) {
        double x = left + lines[i].at * scale;
        fprintf(out,
                "<line x1=\"%.1f\" y1=\"0\" x2=\"%.1f\" y2=\"%d\" stroke=\"#000\" "
                "stroke-dasharray=\"%s\"/><text x=\"%.1f\" y=\"%d\"%s>",
                x, x, y, lines[i].dotted ? "1 2" : "4 3", lines[i].dotted ? x - 3 : x + 3, y + 14,
                lines[i].dotted ? " text-anchor=\"end\"" : "");
        keel_report_out_html(out, lines[i].label);
        fputs("</text>\n", out);
    }
    fputs("</svg>\n", out);
}
