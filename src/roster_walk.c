/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_walk.c - the mapping walker: checks a mapping against a table of
 * keys (key_rule, one row per key naming its parser), so that a new key is
 * one new row.  Unknown keys (with a "did you mean"), keys given twice and
 * missing required keys are reported here; each value goes to the parser
 * its row names (roster_keys.c).
 */
#include <assert.h>
#include <string.h>

#include "roster_loader.h"

enum {
    MAX_KEYS = 24, /* rows in one key table */
};

/* The valid key closest to word, when it is close enough to be a typo. */
static const char *suggest_key(const char *word, const key_rule *keys, size_t nkeys)
{
    const char *names[MAX_KEYS];
    size_t nnames = 0;
    assert(nkeys <= MAX_KEYS);
    for (size_t i = 0; i < nkeys; i++)
        if (!keys[i].refused)
            names[nnames++] = keys[i].name;
    return keel_error_suggest(word, names, nnames);
}

static void report_unknown_key(loader *ld, const node *key, const key_rule *keys, size_t nkeys)
{
    const char *suggestion = suggest_key(key->text, keys, nkeys);
    char names[MAX_KEYS * 20] = "";
    if (suggestion) {
        keel_roster_report_problem(ld, key->mark, "unknown key; did you mean '%s'?", suggestion);
        return;
    }
    for (size_t i = 0; i < nkeys; i++) {
        if (keys[i].refused)
            continue;
        strcat(names, names[0] ? ", " : "");
        strcat(names, keys[i].name);
    }
    keel_roster_report_problem(ld, key->mark, "unknown key; expected one of %s", names);
}

/* True when key can name something: a scalar with text (reported if not). */
bool keel_roster_walk_check_key(loader *ld, const node *key)
{
    char what[SHOWN_SIZE + 16];
    if (key->kind == NODE_SCALAR && !keel_roster_tree_is_null(key) && key->text[0] != '\0')
        return true;
    if (key->kind != NODE_ALIAS)
        keel_roster_report_problem(ld, key->mark, "found %s as a key; expected a name",
                                   keel_roster_tree_describe(key, what, sizeof what));
    return false;
}

/* Checks that map is a mapping whose keys are in the table, each at most
 * once, with every required key present; hands each value to its parser. */
void keel_roster_walk_mapping(loader *ld, const node *map, const key_rule *keys, size_t nkeys,
                              void *target)
{
    const node *seen[MAX_KEYS] = {NULL};
    assert(nkeys <= MAX_KEYS);
    if (map->kind != NODE_MAPPING) {
        keel_roster_tree_report_type(ld, map, "a mapping");
        return;
    }
    for (size_t i = 0; i + 1 < map->nitems; i += 2) {
        const node *key = map->items[i], *value = map->items[i + 1];
        const key_rule *rule = NULL;
        if (!keel_roster_walk_check_key(ld, key))
            continue;
        for (size_t r = 0; r < nkeys && !rule; r++)
            if (strcmp(keys[r].name, key->text) == 0)
                rule = &keys[r];
        size_t old = keel_roster_report_push_key(ld, key->text);
        if (!rule) {
            report_unknown_key(ld, key, keys, nkeys);
        } else if (rule->refused) {
            keel_roster_report_problem(ld, key->mark, "%s", rule->refused);
        } else if (seen[rule - keys]) {
            keel_roster_report_problem(ld, key->mark,
                                       "given twice (first on line %d); expected each key once",
                                       seen[rule - keys]->mark.line);
        } else {
            seen[rule - keys] = key;
            rule->parse(ld, value, target, rule);
        }
        keel_roster_report_pop_path(ld, old);
    }
    for (size_t r = 0; r < nkeys; r++) {
        if (keys[r].need && !seen[r]) {
            size_t old = keel_roster_report_push_key(ld, keys[r].name);
            keel_roster_report_problem(ld, map->mark, "missing; %s", keys[r].need);
            keel_roster_report_pop_path(ld, old);
        }
    }
}
