/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_words.c - the roster's scalar values and words: integers, strings,
 * times of day and dates read from scalar nodes, and a word that must be one
 * of a list, with a "did you mean" for a word that is close to one
 * (keel_error_suggest()) and its own message for the titles of unlicensed staff.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "roster_loader.h"

/* Reads a plain decimal integer; values beyond a billion saturate, which
 * every range check rejects.  False when n is not an integer. */
bool keel_roster_words_scan_int(const node *n, long *out)
{
    if (n->kind != NODE_SCALAR || n->quoted)
        return false;
    const char *s = n->text;
    bool negative = *s == '-';
    if (*s == '-' || *s == '+')
        s++;
    if (!*s)
        return false;
    long value = 0;
    for (; *s; s++) {
        if (*s < '0' || *s > '9')
            return false;
        if (value < 1000000000L)
            value = value * 10 + (*s - '0');
    }
    *out = negative ? -value : value;
    return true;
}

/* Reads an integer in [min, max] into *out; reports and returns false if n
 * is not one. */
bool keel_roster_words_read_int(loader *ld, const node *n, int min, int max, int *out)
{
    long value;
    char shown[SHOWN_SIZE];
    if (!keel_roster_words_scan_int(n, &value)) {
        keel_roster_tree_report_type(ld, n, "an integer");
        return false;
    }
    if (value < min || value > max) {
        keel_roster_report_problem(ld, n->mark,
                                   "%s is out of range; expected an integer from %d to %d",
                                   keel_roster_report_show(shown, n->text), min, max);
        return false;
    }
    *out = (int)value;
    return true;
}

/* Copies a non-empty string into *out (NULL if n is not one, reported). */
bool keel_roster_words_read_string(loader *ld, const node *n, char **out)
{
    *out = NULL;
    if (n->kind != NODE_SCALAR || keel_roster_tree_is_null(n) ||
        keel_roster_tree_is_placeholder(n)) {
        keel_roster_tree_report_type(ld, n, "a string");
        return false;
    }
    if (n->text[0] == '\0') {
        keel_roster_report_problem(ld, n->mark,
                                   "found an empty string; expected a non-empty string");
        return false;
    }
    *out = keel_strdup(n->text);
    if (!*out)
        ld->nomem = true;
    return *out != NULL;
}

/* Minutes after midnight of "H:MM" or "HH:MM", or -1. */
int keel_roster_words_scan_clock(const char *s)
{
    size_t hour_digits = strspn(s, "0123456789");
    if (hour_digits < 1 || hour_digits > 2 || s[hour_digits] != ':')
        return -1;
    const char *m = s + hour_digits + 1;
    if (strspn(m, "0123456789") != 2 || m[2] != '\0')
        return -1;
    int hours = atoi(s), minutes = (m[0] - '0') * 10 + (m[1] - '0');
    if (hours > 23 || minutes > 59)
        return -1;
    return hours * 60 + minutes;
}

/* True when s is YYYY-MM-DD and names a day of the Gregorian calendar. */
bool keel_roster_words_is_date(const char *s)
{
    static const int days[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    if (strlen(s) != 10 || s[4] != '-' || s[7] != '-')
        return false;
    for (int i = 0; i < 10; i++)
        if (i != 4 && i != 7 && (s[i] < '0' || s[i] > '9'))
            return false;
    int year = atoi(s), month = atoi(s + 5), day = atoi(s + 8);
    bool leap = (year % 4 == 0 && year % 100 != 0) || year % 400 == 0; /* Gregorian */
    if (year < 1 || month < 1 || month > 12 || day < 1)
        return false;
    return day <= days[month - 1] + (month == 2 && leap);
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

/* Titles of unlicensed assistive staff, who take no assignment of their own
 * (common practice, no source).  Compared ignoring case; a title that
 * contains one of the stems also counts. */
static const char *const unlicensed_titles[] = {"cna", "uap", "pct", "hca", "sitter", "tech"};
static const char *const unlicensed_stems[] = {"assistant", "aide", "technician"};

static bool contains_ignoring_case(const char *text, const char *stem)
{
    size_t n = strlen(stem);
    for (; strlen(text) >= n; text++) {
        size_t i = 0;
        while (i < n && (text[i] | 0x20) == stem[i])
            i++;
        if (i == n)
            return true;
    }
    return false;
}

static bool names_unlicensed_staff(const char *word)
{
    for (size_t i = 0; i < ARRAY_LEN(unlicensed_titles); i++)
        if (same_ignoring_case(word, unlicensed_titles[i]))
            return true;
    for (size_t i = 0; i < ARRAY_LEN(unlicensed_stems); i++)
        if (contains_ignoring_case(word, unlicensed_stems[i]))
            return true;
    return false;
}

/* Writes words[0..nwords) as "a, b, c" into buf. */
static const char *join_words(char *buf, size_t size, const char *const *words, size_t nwords)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < nwords && used < size; i++) {
        snprintf(buf + used, size - used, "%s%s", i ? ", " : "", words[i]);
        used = strlen(buf);
    }
    return buf;
}

/* Reads n, which must be one of words[0..nwords), into *index.  what names
 * the word in messages ("role"); for nurses' roles and licences a word that
 * names unlicensed staff gets its own message.  Reports and returns false
 * when n is not one of the words. */
bool keel_roster_words_read_word(loader *ld, const node *n, const char *what,
                                 const char *const *words, size_t nwords, bool of_nurse, int *index)
{
    char shown[SHOWN_SIZE], names[256];
    if (keel_roster_tree_is_placeholder(n))
        return false;
    join_words(names, sizeof names, words, nwords);
    if (n->kind != NODE_SCALAR || keel_roster_tree_is_null(n) || n->text[0] == '\0') {
        char expected[sizeof names + 16];
        snprintf(expected, sizeof expected, "one of %s", names);
        keel_roster_tree_report_type(ld, n, expected);
        return false;
    }
    for (size_t i = 0; i < nwords; i++) {
        if (strcmp(n->text, words[i]) == 0) {
            *index = (int)i;
            return true;
        }
    }
    const char *suggestion = keel_error_suggest(n->text, words, nwords);
    if (of_nurse && names_unlicensed_staff(n->text))
        keel_roster_report_problem(
            ld, n->mark,
            "'%s' names unlicensed staff, who do not belong under nurses; expected one of %s",
            keel_roster_report_show(shown, n->text), names);
    else if (suggestion)
        keel_roster_report_problem(ld, n->mark,
                                   "unknown %s '%s'; did you mean '%s'? expected one of %s", what,
                                   keel_roster_report_show(shown, n->text), suggestion, names);
    else
        keel_roster_report_problem(ld, n->mark, "unknown %s '%s'; expected one of %s", what,
                                   keel_roster_report_show(shown, n->text), names);
    return false;
}
