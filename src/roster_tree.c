/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_tree.c - the roster file as a tree of nodes: libyaml's event stream
 * turned into a small owned tree (scalar, sequence, mapping) that keeps each
 * node's 1-based position and whether a scalar was quoted, and the questions
 * the other steps ask of a node (a key's value, null, the placeholder, what
 * it is in words).
 *
 * keel reads plain YAML: anchors, aliases and tags are reported, never
 * expanded.  libyaml's 0-based marks become keel's 1-based ones here, once.
 * This is the only file of keel that includes yaml.h.
 */
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <yaml.h>

#include "alloc.h"
#include "roster_loader.h"


void keel_roster_tree_free(node *n)
{
    if (!n)
        return;
    for (size_t i = 0; i < n->nitems; i++)
        keel_roster_tree_free(n->items[i]);
    free(n->items);
    free(n->text);
    free(n->anchor);
    free(n->tag);
    free(n);
}

/* The value of key in mapping map (the first, if given twice), or NULL. */
const node *keel_roster_tree_find(const node *map, const char *key)
{
    if (!map || map->kind != NODE_MAPPING)
        return NULL;
    for (size_t i = 0; i + 1 < map->nitems; i += 2) {
        const node *k = map->items[i];
        if (k->kind == NODE_SCALAR && strcmp(k->text, key) == 0)
            return map->items[i + 1];
    }
    return NULL;
}

bool keel_roster_tree_is_null(const node *n)
{
    static const char *const nulls[] = {"", "~", "null", "Null", "NULL"};
    if (n->kind != NODE_SCALAR || n->quoted)
        return false;
    for (size_t i = 0; i < ARRAY_LEN(nulls); i++)
        if (strcmp(n->text, nulls[i]) == 0)
            return true;
    return false;
}

/* The placeholder `keel new` writes where only the unit knows the value;
 * reported once, by check_plain_yaml(), and by no typed reader. */
bool keel_roster_tree_is_placeholder(const node *n)
{
    return n->kind == NODE_SCALAR && !n->quoted && strcmp(n->text, KEEL_PLACEHOLDER) == 0;
}

/* Writes a short description of what node n is, for "found ...". */
const char *keel_roster_tree_describe(const node *n, char *buf, size_t size)
{
    char shown[SHOWN_SIZE];
    if (n->kind == NODE_SEQUENCE)
        snprintf(buf, size, "a sequence");
    else if (n->kind == NODE_MAPPING)
        snprintf(buf, size, "a mapping");
    else if (keel_roster_tree_is_null(n))
        snprintf(buf, size, "no value");
    else if (n->quoted)
        snprintf(buf, size, "the string \"%s\"", keel_roster_report_show(shown, n->text));
    else
        snprintf(buf, size, "'%s'", keel_roster_report_show(shown, n->text));
    return buf;
}

/* Reports that n is not what was expected.  Aliases are reported once, by
 * check_plain_yaml(), and not again here. */
void keel_roster_tree_report_type(loader *ld, const node *n, const char *expected)
{
    char what[SHOWN_SIZE + 16];
    if (n->kind != NODE_ALIAS && !keel_roster_tree_is_placeholder(n))
        keel_roster_report_problem(ld, n->mark, "found %s; expected %s",
                                   keel_roster_tree_describe(n, what, sizeof what), expected);
}

/* libyaml's 0-based mark as keel's 1-based one: the one place they differ. */
static keel_mark mark_of(yaml_mark_t m)
{
    return (keel_mark){.line = m.line < INT_MAX ? (int)m.line + 1 : INT_MAX,
                       .column = m.column < INT_MAX ? (int)m.column + 1 : INT_MAX};
}

/* The mark of byte offset in the text, for reader errors that give no mark.
 * Columns count characters, as libyaml's marks do. */
static keel_mark mark_at_offset(const loader *ld, size_t offset)
{
    keel_mark at = {.line = 1, .column = 1};
    for (size_t i = 0; i < offset && i < ld->len; i++) {
        if (ld->text[i] == '\n') {
            at.line++;
            at.column = 1;
        } else if (((unsigned char)ld->text[i] & 0xC0) != 0x80) {
            at.column++;
        }
    }
    return at;
}

static void report_parser_error(loader *ld, const yaml_parser_t *parser)
{
    const char *problem = parser->problem ? parser->problem : "unknown problem";
    if (parser->error == YAML_MEMORY_ERROR) {
        ld->nomem = true;
    } else if (parser->error == YAML_READER_ERROR) {
        keel_mark at = mark_at_offset(ld, parser->problem_offset);
        if (parser->problem_value >= 0)
            keel_roster_report_problem(
                ld, at, "cannot read the text: %s (byte 0x%02X); expected UTF-8 text", problem,
                (unsigned)parser->problem_value);
        else
            keel_roster_report_problem(ld, at, "cannot read the text: %s; expected UTF-8 text",
                                       problem);
    } else if (parser->context) {
        keel_roster_report_problem(ld, mark_of(parser->problem_mark),
                                   "YAML syntax error: %s (%s on line %d)", problem,
                                   parser->context, mark_of(parser->context_mark).line);
    } else {
        keel_roster_report_problem(ld, mark_of(parser->problem_mark), "YAML syntax error: %s",
                                   problem);
    }
}

/* Parses the next event; on a syntax error reports it and returns false. */
static bool next_event(loader *ld, yaml_parser_t *parser, yaml_event_t *event)
{
    if (yaml_parser_parse(parser, event))
        return true;
    report_parser_error(ld, parser);
    return false;
}

/* Keeps the anchor and tag of a node's event, to be reported with their
 * key paths by check_plain_yaml(). */
static bool keep_anchor_and_tag(loader *ld, node *n, const yaml_event_t *event)
{
    const yaml_char_t *anchor = NULL, *tag = NULL;
    if (event->type == YAML_SCALAR_EVENT) {
        anchor = event->data.scalar.anchor;
        tag = event->data.scalar.tag;
    } else if (event->type == YAML_SEQUENCE_START_EVENT) {
        anchor = event->data.sequence_start.anchor;
        tag = event->data.sequence_start.tag;
    } else if (event->type == YAML_MAPPING_START_EVENT) {
        anchor = event->data.mapping_start.anchor;
        tag = event->data.mapping_start.tag;
    } else if (event->type == YAML_ALIAS_EVENT) {
        anchor = event->data.alias.anchor;
    }
    n->anchor = keel_strdup((const char *)anchor);
    n->tag = keel_strdup((const char *)tag);
    if ((anchor && !n->anchor) || (tag && !n->tag))
        ld->nomem = true;
    return !ld->nomem;
}

static bool fill_scalar(loader *ld, node *n, const yaml_event_t *event)
{
    const char *value = (const char *)event->data.scalar.value;
    size_t length = event->data.scalar.length;
    if (length > KEEL_MAX_TEXT) {
        keel_roster_report_problem(ld, n->mark,
                                   "a value of %zu bytes; keel reads values of at most %d bytes",
                                   length, KEEL_MAX_TEXT);
        return false;
    }
    n->kind = NODE_SCALAR;
    n->quoted = event->data.scalar.style != YAML_PLAIN_SCALAR_STYLE;
    n->text = keel_strndup(value, length);
    n->len = length;
    if (!n->text)
        ld->nomem = true;
    return n->text != NULL;
}

static bool add_child(loader *ld, node *parent, node *child)
{
    if (parent->nitems == parent->capacity) {
        size_t capacity = parent->capacity ? 2 * parent->capacity : 8;
        node **grown = keel_reallocarray(parent->items, capacity, sizeof *grown);
        if (!grown) {
            ld->nomem = true;
            return false;
        }
        parent->items = grown;
        parent->capacity = capacity;
    }
    parent->items[parent->nitems++] = child;
    return true;
}

static bool read_node(loader *ld, yaml_parser_t *parser, yaml_event_t *event, int depth,
                      node **out);

/* Reads the children of a sequence or mapping up to its end event. */
static bool read_children(loader *ld, yaml_parser_t *parser, node *n, int depth)
{
    if (depth >= KEEL_MAX_DEPTH) {
        keel_roster_report_problem(ld, n->mark,
                                   "nesting deeper than %d levels; a roster needs at most 5",
                                   KEEL_MAX_DEPTH);
        return false;
    }
    for (;;) {
        yaml_event_t event;
        node *child;
        if (!next_event(ld, parser, &event))
            return false;
        if (event.type == YAML_SEQUENCE_END_EVENT || event.type == YAML_MAPPING_END_EVENT) {
            yaml_event_delete(&event);
            return true;
        }
        /* A list's entries, or a mapping's keys and values. */
        size_t most = n->kind == NODE_MAPPING ? 2 * (size_t)KEEL_MAX_ITEMS : KEEL_MAX_ITEMS;
        if (n->nitems >= most) {
            keel_roster_report_problem(ld, mark_of(event.start_mark),
                                       "more than %d entries in one %s; keel reads at most %d "
                                       "(patients, nurses, keys) per list or mapping",
                                       KEEL_MAX_ITEMS,
                                       n->kind == NODE_MAPPING ? "mapping" : "list",
                                       KEEL_MAX_ITEMS);
            yaml_event_delete(&event);
            return false;
        }
        /* The key path of what is read, for the problems of the limits: a
         * mapping's value under its key, a list's entry at its index. */
        size_t old = ld->pathlen;
        if (n->kind == NODE_SEQUENCE)
            keel_roster_report_push_index(ld, n->nitems);
        else if (n->nitems % 2 == 1 && n->items[n->nitems - 1]->kind == NODE_SCALAR)
            keel_roster_report_push_key(ld, n->items[n->nitems - 1]->text);
        bool ok = read_node(ld, parser, &event, depth + 1, &child);
        keel_roster_report_pop_path(ld, old);
        if (!ok)
            return false;
        if (!add_child(ld, n, child)) {
            keel_roster_tree_free(child);
            return false;
        }
    }
}

/* Builds the node that starts with event (consumed) and everything in it. */
static bool read_node(loader *ld, yaml_parser_t *parser, yaml_event_t *event, int depth, node **out)
{
    bool ok = true;
    node *n = keel_calloc(1, sizeof *n);
    *out = NULL;
    if (!n) {
        ld->nomem = true;
        yaml_event_delete(event);
        return false;
    }
    n->mark = mark_of(event->start_mark);
    ok = keep_anchor_and_tag(ld, n, event);
    if (!ok)
        n->kind = NODE_ALIAS;
    else if (event->type == YAML_SCALAR_EVENT)
        ok = fill_scalar(ld, n, event);
    else if (event->type == YAML_SEQUENCE_START_EVENT)
        n->kind = NODE_SEQUENCE;
    else if (event->type == YAML_MAPPING_START_EVENT)
        n->kind = NODE_MAPPING;
    else
        n->kind = NODE_ALIAS;
    yaml_event_delete(event);
    if (ok && (n->kind == NODE_SEQUENCE || n->kind == NODE_MAPPING))
        ok = read_children(ld, parser, n, depth);
    if (!ok) {
        keel_roster_tree_free(n);
        return false;
    }
    *out = n;
    return true;
}

/* Reads the one document of the file into *root.  An empty file, a syntax
 * error or a second document is reported and ends the load. */
static bool read_document(loader *ld, yaml_parser_t *parser, node **root)
{
    yaml_event_t event;
    *root = NULL;
    if (!next_event(ld, parser, &event)) /* stream start */
        return false;
    yaml_event_delete(&event);
    if (!next_event(ld, parser, &event))
        return false;
    if (event.type == YAML_STREAM_END_EVENT) {
        yaml_event_delete(&event);
        keel_roster_report_problem(ld, (keel_mark){1, 1},
                                   "the file is empty or only comments; expected a roster "
                                   "with shift, nurses and patients");
        return false;
    }
    yaml_event_delete(&event); /* document start */
    if (!next_event(ld, parser, &event) || !read_node(ld, parser, &event, 1, root))
        return false;
    if (!next_event(ld, parser, &event)) /* document end */
        goto fail;
    yaml_event_delete(&event);
    if (!next_event(ld, parser, &event))
        goto fail;
    if (event.type == YAML_DOCUMENT_START_EVENT) {
        keel_roster_report_problem(
            ld, mark_of(event.start_mark),
            "a second YAML document starts here; expected one roster per file");
        yaml_event_delete(&event);
        goto fail;
    }
    yaml_event_delete(&event);
    return true;
fail:
    keel_roster_tree_free(*root);
    *root = NULL;
    return false;
}

/* Reads the documents of a stream, after its start event, into a new array. */
static bool read_documents(loader *ld, yaml_parser_t *parser, node ***roots, size_t *nroots)
{
    yaml_event_t event;
    size_t cap = 0;
    for (;;) {
        if (!next_event(ld, parser, &event))
            return false;
        if (event.type == YAML_STREAM_END_EVENT) {
            yaml_event_delete(&event);
            return true;
        }
        yaml_event_delete(&event); /* document start */
        if (*nroots == cap) {
            cap = cap ? 2 * cap : 8;
            node **grown = keel_reallocarray(*roots, cap, sizeof *grown);
            if (!grown) {
                ld->nomem = true;
                return false;
            }
            *roots = grown;
        }
        node *root = NULL;
        if (!next_event(ld, parser, &event) || !read_node(ld, parser, &event, 1, &root))
            return false;
        (*roots)[(*nroots)++] = root;
        if (!next_event(ld, parser, &event)) /* document end */
            return false;
        yaml_event_delete(&event);
    }
}

/* Reports every anchor, alias and tag in the tree, the placeholder of keel new
 * and text that holds a NUL: keel reads plain YAML only, so that each value
 * is written where it applies. */
static void check_plain_yaml(loader *ld, const node *n)
{
    char shown[SHOWN_SIZE];
    if (keel_roster_tree_is_placeholder(n))
        keel_roster_report_problem(
            ld, n->mark, "%s is a placeholder from keel new; put the unit's own value here",
            KEEL_PLACEHOLDER);
    if (n->kind == NODE_ALIAS)
        keel_roster_report_problem(ld, n->mark,
                                   "alias '*%s' is not supported; write the value out in full",
                                   keel_roster_report_show(shown, n->anchor));
    else if (n->anchor)
        keel_roster_report_problem(ld, n->mark,
                                   "anchor '&%s' is not supported; write each value out in full",
                                   keel_roster_report_show(shown, n->anchor));
    if (n->tag)
        keel_roster_report_problem(
            ld, n->mark, "tag '%s' is not supported; remove it (quotes make a value text)",
            keel_roster_report_show(shown, n->tag));
    if (n->kind == NODE_SCALAR && strlen(n->text) != n->len)
        keel_roster_report_problem(ld, n->mark,
                                   "text with a NUL character; expected text without one");
    for (size_t i = 0; i < n->nitems; i++) {
        size_t old = ld->pathlen;
        if (n->kind == NODE_SEQUENCE)
            keel_roster_report_push_index(ld, i);
        else if (i % 2 == 1)
            keel_roster_report_push_key(
                ld, n->items[i - 1]->kind == NODE_SCALAR ? n->items[i - 1]->text : "?");
        check_plain_yaml(ld, n->items[i]);
        keel_roster_report_pop_path(ld, old);
    }
}

/* Reads text into *root and reports what keel does not read in it. */
bool keel_roster_tree_read(loader *ld, node **root)
{
    yaml_parser_t parser;
    *root = NULL;
    if (!yaml_parser_initialize(&parser)) {
        ld->nomem = true;
        return false;
    }
    yaml_parser_set_input_string(&parser, (const unsigned char *)(ld->text ? ld->text : ""),
                                 ld->len);
    bool ok = read_document(ld, &parser, root);
    yaml_parser_delete(&parser);
    if (ok)
        check_plain_yaml(ld, *root);
    return ok;
}

bool keel_roster_tree_read_stream(loader *ld, node ***roots, size_t *nroots)
{
    yaml_parser_t parser;
    yaml_event_t event;
    *roots = NULL;
    *nroots = 0;
    if (!yaml_parser_initialize(&parser)) {
        ld->nomem = true;
        return false;
    }
    yaml_parser_set_input_string(&parser, (const unsigned char *)(ld->text ? ld->text : ""),
                                 ld->len);
    bool ok = next_event(ld, &parser, &event); /* stream start */
    if (ok) {
        yaml_event_delete(&event);
        ok = read_documents(ld, &parser, roots, nroots);
    }
    yaml_parser_delete(&parser);
    if (ok && *nroots == 0) {
        keel_roster_report_problem(ld, (keel_mark){1, 1},
                                   "the file is empty or only comments; expected one roster "
                                   "or more, as YAML documents");
        ok = false;
    }
    for (size_t i = 0; ok && i < *nroots; i++)
        check_plain_yaml(ld, (*roots)[i]);
    if (!ok) {
        for (size_t i = 0; i < *nroots; i++)
            keel_roster_tree_free((*roots)[i]);
        free(*roots);
        *roots = NULL;
        *nroots = 0;
    }
    return ok;
}
