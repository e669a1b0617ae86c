/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_loader.h - what the files of the roster loader share; internal to
 * src/roster*.c (other modules use roster_internal.h).
 *
 * The loader loads a roster file and checks it against the roster format
 * (docs/roster-format.md).  First stage of the pipeline: every later stage
 * may trust that a keel_roster is complete and consistent.  Its files, each
 * using only those before it (tests/structure/check_layers.py keeps it so):
 *
 *   roster_data.c    freeing a roster, the look-ups on it
 *   roster_report.c  problems, with line, column and key path
 *   roster_tree.c    the YAML read into a tree of nodes (the only yaml.h user)
 *   roster_words.c   scalar values and words: integers, times, one of a list
 *   roster_walk.c    a mapping checked against a table of keys
 *   roster_keys.c    the format's key tables and the parsers they name
 *   roster_clock.c   the nurses' and patients' own times against the shift
 *   roster_check.c   checks across the file, after the walk
 *   roster.c         load and parse: the loader's entry points
 *
 * Invariants: every problem in the file is reported, not only the first;
 * on any failure *out is NULL and nothing leaks; a value that fails its
 * check leaves its field absent, so later checks do not repeat the problem.
 */
#ifndef KEEL_ROSTER_LOADER_H
#define KEEL_ROSTER_LOADER_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"

#define ARRAY_LEN(a) (sizeof(a) / sizeof((a)[0]))

enum {
    MAX_PATH = 256, /* bytes of a key path in a message; longer ones are cut */
    MAX_SHOWN = 40, /* bytes of a file's text quoted back in a message */
    SHOWN_SIZE = MAX_SHOWN + 4,
    MINUTES_PER_DAY = 1440, /* the upper bound of every minutes figure */
};

typedef enum node_kind { NODE_SCALAR, NODE_SEQUENCE, NODE_MAPPING, NODE_ALIAS } node_kind;

/* One YAML node.  A mapping keeps keys and values alternately in items. */
typedef struct node {
    node_kind kind;
    keel_mark mark;
    bool quoted;  /* scalar in quotes or block style: text, never a number */
    char *text;   /* scalar text, NUL-terminated */
    size_t len;   /* scalar bytes as written; more than strlen(text) if it holds NUL */
    char *anchor; /* the anchor it defines, or an alias's target; keel rejects both */
    char *tag;    /* an explicit tag; keel rejects it */
    size_t nitems;
    size_t capacity;
    struct node **items;
} node;

typedef enum table_state { TABLE_ABSENT, TABLE_BROKEN, TABLE_READ } table_state;

/* Everything one load needs.  Problems go to err; nproblems counts them even
 * when err is NULL.  Once memory runs out nothing more is reported. */
typedef struct loader {
    const char *file;
    const char *text;
    size_t len;
    keel_error *err;
    size_t first_problem; /* index in err of this load's first problem */
    size_t nproblems;
    bool nomem;
    char path[MAX_PATH]; /* key path of the value being checked */
    size_t pathlen;
    keel_roster *roster;
    table_state acuity_table;
    table_state extra_table;
    size_t nexpected; /* expected_admissions, read apart until the walk ends */
    keel_patient
        *expected;  /* then appended to roster->patients (keel_roster_keys_merge_expected()) */
    size_t nlisted; /* roster->patients[0..nlisted) come from `patients` */
    const node *patient_list, *expected_list; /* for the checks after the walk */
} loader;

/* A table of keys: one row per key of a mapping, naming its parser. */
typedef struct key_rule key_rule;

/* Checks value and stores it into target as the rule says. */
typedef void (*parse_fn)(loader *ld, const node *value, void *target, const key_rule *rule);

struct key_rule {
    const char *name;
    parse_fn parse;
    size_t offset;        /* the field of target that the parser fills */
    size_t count_offset;  /* lists: the size_t that counts the entries */
    int min, max;         /* integers: the documented range */
    const key_rule *keys; /* nested mappings: their key table */
    size_t nkeys;
    const char *need;    /* required keys: why, for the "missing" message */
    const char *refused; /* a key of a sibling table that is not allowed here: why */
};

/* roster_report.c */

/* Records an input problem at mark `at`, keyed by the current path. */
void keel_roster_report_problem(loader *ld, keel_mark at, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

/* Copies s for a message into buf[SHOWN_SIZE], made safe to show; returns buf. */
const char *keel_roster_report_show(char *buf, const char *s);

/* The key path: push_key and push_index append ".key" and "[index]" and
 * return the old length, for pop_path; set_path sets list[index].key (key
 * may be NULL), for the checks that run after the walk. */
size_t keel_roster_report_push_key(loader *ld, const char *key);
size_t keel_roster_report_push_index(loader *ld, size_t index);
void keel_roster_report_pop_path(loader *ld, size_t old);
void keel_roster_report_set_path(loader *ld, const char *list, size_t index, const char *key);

/* roster_tree.c */

/* Reads the one document of ld->text into *root and reports every anchor,
 * alias, tag, placeholder and NUL in it.  False when there is no tree to
 * walk (an empty file, a syntax error, a second document, no memory); then
 * the problem is reported and *root is NULL.  Free the tree with
 * keel_roster_tree_free(). */
bool keel_roster_tree_read(loader *ld, node **root);
/* Reads every document of ld->text into (*roots)[0 .. *nroots), each
 * checked as keel_roster_tree_read() checks its one.  False when there is
 * nothing to walk (an empty stream, a syntax error, no memory): then the
 * problem is reported and *roots is NULL.  Free each tree with
 * keel_roster_tree_free() and the array with free(). */
bool keel_roster_tree_read_stream(loader *ld, node ***roots, size_t *nroots);
void keel_roster_tree_free(node *n);

/* The value of key in mapping map (the first, if given twice), or NULL. */
const node *keel_roster_tree_find(const node *map, const char *key);
bool keel_roster_tree_is_null(const node *n);
/* The placeholder keel new writes (KEEL_PLACEHOLDER), reported once by
 * keel_roster_tree_read() and by no typed reader. */
bool keel_roster_tree_is_placeholder(const node *n);

/* Writes a short description of what n is, for "found ...". */
const char *keel_roster_tree_describe(const node *n, char *buf, size_t size);
/* Reports "found <what n is>; expected <expected>" (not for an alias or the
 * placeholder, which are reported once already). */
void keel_roster_tree_report_type(loader *ld, const node *n, const char *expected);

/* roster_words.c */

/* A plain decimal integer (values beyond a billion saturate); false, not
 * reported, when n is not one. */
bool keel_roster_words_scan_int(const node *n, long *out);
/* An integer in [min, max] or a non-empty string (copied); reported and
 * false when n is not one. */
bool keel_roster_words_read_int(loader *ld, const node *n, int min, int max, int *out);
bool keel_roster_words_read_string(loader *ld, const node *n, char **out);
/* Minutes after midnight of "H:MM" or "HH:MM", or -1. */
int keel_roster_words_scan_clock(const char *s);
/* True when s is YYYY-MM-DD and names a day of the Gregorian calendar. */
bool keel_roster_words_is_date(const char *s);

/* Reads n, one of words[0..nwords), into *index; what names the word in
 * messages ("role"), of_nurse adds the message for unlicensed staff.
 * Reported and false when n is not one of the words. */
bool keel_roster_words_read_word(loader *ld, const node *n, const char *what,
                                 const char *const *words, size_t nwords, bool of_nurse,
                                 int *index);

/* roster_walk.c */

/* Checks that map is a mapping whose keys are in keys[0..nkeys), each at
 * most once, with every required key present; hands each value to its
 * parser with target. */
void keel_roster_walk_mapping(loader *ld, const node *map, const key_rule *keys, size_t nkeys,
                              void *target);
/* True when key can name something: a scalar with text (reported if not). */
bool keel_roster_walk_check_key(loader *ld, const node *key);

/* roster_keys.c */

/* Reads the file's top mapping into ld->roster: the walk. */
void keel_roster_keys_read(loader *ld, const node *root);
/* Appends the expected admissions to the roster's patients, after the walk. */
void keel_roster_keys_merge_expected(loader *ld);
/* The node of roster->patients[i], and the path patients[i].key or
 * expected_admissions[j].key (key may be NULL); after the merge. */
const node *keel_roster_keys_patient_node(const loader *ld, size_t i);
void keel_roster_keys_patient_path(loader *ld, size_t i, const char *key);

/* roster_clock.c */

/* Turns every nurse's and patient's own time into minutes after the
 * shift's start, reporting those that do not fit the shift. */
void keel_roster_clock_convert(loader *ld, const node *root);
/* Checks nurses[i]'s own times and minutes (item is its node), and
 * patients[i]'s arrival and departure. */
void keel_roster_clock_check_nurse(loader *ld, size_t i, const node *item);
void keel_roster_clock_check_patient(loader *ld, size_t i, const node *item);
/* Checks patients[i]'s record against her stay: contiguous from her
 * arrival, in time order, each stretch inside her stay. */
void keel_roster_clock_check_record(loader *ld, size_t i, const node *item);

/* roster_check.c */

/* Runs the steps after the walk on the filled roster: the merge of the
 * expected admissions, the clock, and the checks across the file. */
void keel_roster_check_file(loader *ld, const node *root);

#endif
