/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * roster_check.c - the checks that need the whole file, run after the walk
 * on the filled roster: unique ids, references to nurses, the acuity scale
 * and the extras the policy defines, the items of the NAS, and limits that
 * depend on the shift or on the selected ratio table.  Also orders the steps
 * after the walk (keel_roster_check_file()).
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "keel/nas.h"
#include "roster_loader.h"
#include "sort.h"

/* The shift's break must leave time for patients. */
static void check_shift_break(loader *ld, const node *root)
{
    const keel_roster *r = ld->roster;
    if (r->shift.minutes == KEEL_ABSENT || r->shift.break_minutes == KEEL_ABSENT ||
        r->shift.break_minutes < r->shift.minutes)
        return;
    keel_roster_report_pop_path(ld, 0);
    keel_roster_report_push_key(ld, "shift");
    keel_roster_report_push_key(ld, "break_minutes");
    keel_roster_report_problem(
        ld, keel_roster_tree_find(keel_roster_tree_find(root, "shift"), "break_minutes")->mark,
        "a %d-minute break leaves no time in a %d-minute shift; expected less than %d",
        r->shift.break_minutes, r->shift.minutes, r->shift.minutes);
}

/* A break buddy is another nurse of the roster. */
static void check_covers(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_nurse *n = &r->nurses[i];
    const node *given = keel_roster_tree_find(item, "covers");
    char shown[SHOWN_SIZE];
    if (!n->covers)
        return;
    int k = keel_roster_find_nurse(r, n->covers);
    keel_roster_report_set_path(ld, "nurses", i, "covers");
    if (k < 0)
        keel_roster_report_problem(ld, given->mark, "no nurse '%s' on this roster",
                                   keel_roster_report_show(shown, n->covers));
    else if ((size_t)k == i || (n->id && strcmp(n->id, n->covers) == 0))
        keel_roster_report_problem(
            ld, given->mark,
            "'%s' is this nurse's own id; expected the id of another nurse, whose patients "
            "this nurse holds during that nurse's breaks",
            keel_roster_report_show(shown, n->covers));
}

/* Planned hand-offs follow the patient's nurse: each names a nurse of the
 * roster other than the one just before it. */
static void check_handoffs(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const node *list = keel_roster_tree_find(item, "handoffs");
    char shown[SHOWN_SIZE];
    if (p->nhandoffs == 0)
        return;
    if (!keel_roster_tree_find(item, "nurse")) {
        keel_roster_keys_patient_path(ld, i, "handoffs");
        keel_roster_report_problem(
            ld, list->mark,
            "hand-offs without a nurse; expected nurse: the id of the nurse who has the "
            "patient first");
        return;
    }
    for (size_t k = 0; k < p->nhandoffs; k++) {
        const char *id = p->handoffs[k], *before = k ? p->handoffs[k - 1] : p->nurse;
        if (!id)
            continue;
        keel_roster_keys_patient_path(ld, i, "handoffs");
        keel_roster_report_push_index(ld, k);
        if (r->nnurses && keel_roster_find_nurse(r, id) < 0)
            keel_roster_report_problem(ld, list->items[k]->mark, "no nurse '%s' on this roster",
                                       keel_roster_report_show(shown, id));
        else if (before && strcmp(before, id) == 0 && k == 0)
            keel_roster_report_problem(
                ld, list->items[k]->mark,
                "'%s' is the patient's nurse already; expected a hand-off to another nurse",
                keel_roster_report_show(shown, id));
        else if (before && strcmp(before, id) == 0)
            keel_roster_report_problem(
                ld, list->items[k]->mark,
                "'%s' already has the patient from handoffs[%zu]; expected a hand-off to "
                "another nurse",
                keel_roster_report_show(shown, id), k - 1);
    }
}

/* A record names nurses of the roster (who may have left since), and the
 * patient has a nurse from the end of it. */
static void check_record(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const node *list = keel_roster_tree_find(item, "record");
    char shown[SHOWN_SIZE];
    if (p->nrecord == 0)
        return;
    if (!keel_roster_tree_find(item, "nurse")) {
        keel_roster_keys_patient_path(ld, i, "record");
        keel_roster_report_problem(
            ld, list->mark,
            "a record without a nurse; expected nurse: the id of the nurse who has the "
            "patient from the end of the record");
    }
    for (size_t k = 0; k < p->nrecord; k++) {
        const char *id = p->record[k].nurse;
        if (!id || r->nnurses == 0 || keel_roster_find_nurse(r, id) >= 0)
            continue;
        keel_roster_keys_patient_path(ld, i, "record");
        keel_roster_report_push_index(ld, k);
        keel_roster_report_push_key(ld, "nurse");
        keel_roster_report_problem(
            ld, keel_roster_tree_find(list->items[k], "nurse")->mark,
            "no nurse '%s' on this roster; expected a nurse of the shift (one who has left "
            "stays on the roster with her end)",
            keel_roster_report_show(shown, id));
    }
    keel_roster_clock_check_record(ld, i, item);
}

/* The id of a list entry as a later entry may repeat it: a scalar with a
 * value; NULL for none. */
static const node *given_id(const node *item)
{
    const node *id = keel_roster_tree_find(item, "id");
    return id && id->kind == NODE_SCALAR && !keel_roster_tree_is_null(id) ? id : NULL;
}

/* For the n ids of a list (ids[i] from given_id()), the earliest entry
 * with the same id (*first[i]; i when none earlier), found by one sort
 * (keelSortFirstSame()).  The caller frees *first.  False when memory ran
 * out (ld->nomem is then set and *first is NULL). */
static bool find_first_ids(loader *ld, const node *const *ids, size_t n, size_t **first)
{
    const char **texts = keel_malloc((n ? n : 1) * sizeof *texts);
    *first = keel_malloc((n ? n : 1) * sizeof **first);
    for (size_t i = 0; texts && i < n; i++)
        texts[i] = ids[i] ? ids[i]->text : NULL;
    bool ok = texts && *first && keelSortFirstSame(texts, n, *first);
    free(texts);
    if (!ok) {
        free(*first);
        *first = NULL;
        ld->nomem = true;
    }
    return ok;
}

/* Reports entry i's id when an earlier entry has it (first[i] < i, from
 * find_first_ids()); the caller has set the path. */
static void report_repeated_id(loader *ld, const node *const *ids, const size_t *first, size_t i,
                               const char *what)
{
    char shown[SHOWN_SIZE];
    keel_roster_report_problem(
        ld, ids[i]->mark, "%s id '%s' is already used on line %d; expected a unique id", what,
        keel_roster_report_show(shown, ids[i]->text), ids[first[i]]->mark.line);
}

/* Entry i repeats an earlier entry's id (an id left to the unit, the
 * placeholder, is reported elsewhere). */
static bool repeats_id(const node *const *ids, const size_t *first, size_t i)
{
    return first && first[i] < i && !keel_roster_tree_is_placeholder(ids[i]);
}

/* True when the nurse's role is known: absent (staff) or read without a
 * problem.  A role already reported is not reported again through its
 * preceptor. */
static bool role_is_known(const keel_nurse *n, const node *item)
{
    const node *role = keel_roster_tree_find(item, "role");
    return !role || (role->kind == NODE_SCALAR && strcmp(role->text, keel_role_name(n->role)) == 0);
}

/* An orientee works under a preceptor: another nurse on the roster who is
 * not an orientee.  Nobody else has a preceptor. */
static void check_preceptor(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_nurse *n = &r->nurses[i];
    const node *given = keel_roster_tree_find(item, "preceptor");
    char shown[SHOWN_SIZE];
    if (!role_is_known(n, item))
        return;
    keel_roster_report_set_path(ld, "nurses", i, "preceptor");
    if (n->role == KEEL_ROLE_ORIENTEE && !given) {
        keel_roster_report_problem(
            ld, item->mark,
            "missing; an orientee needs a preceptor, the id of a nurse on this roster who "
            "is not an orientee");
        return;
    }
    if (!n->preceptor)
        return;
    int k = keel_roster_find_nurse(r, n->preceptor);
    if (n->role != KEEL_ROLE_ORIENTEE)
        keel_roster_report_problem(
            ld, given->mark,
            "a preceptor is given but the role is %s; expected role: orientee, or no "
            "preceptor",
            keel_role_name(n->role));
    else if (k < 0)
        keel_roster_report_problem(ld, given->mark, "no nurse '%s' on this roster",
                                   keel_roster_report_show(shown, n->preceptor));
    else if ((size_t)k == i || (n->id && strcmp(n->id, n->preceptor) == 0))
        keel_roster_report_problem(
            ld, given->mark,
            "'%s' is this nurse's own id; expected the id of another nurse who is not an "
            "orientee",
            keel_roster_report_show(shown, n->preceptor));
    else if (r->nurses[k].role == KEEL_ROLE_ORIENTEE)
        keel_roster_report_problem(
            ld, given->mark,
            "nurse '%s' is an orientee too; expected a preceptor who is not an orientee",
            keel_roster_report_show(shown, n->preceptor));
}

static void check_nurses(loader *ld, const node *list)
{
    size_t n = ld->roster->nnurses, *first = NULL;
    const node **ids = keel_calloc(n, sizeof *ids);
    if (!ids)
        ld->nomem = true;
    for (size_t i = 0; ids && i < n; i++)
        ids[i] = given_id(list->items[i]);
    if (ids)
        find_first_ids(ld, ids, n, &first);
    for (size_t i = 0; i < n; i++) {
        if (list->items[i]->kind != NODE_MAPPING)
            continue;
        if (repeats_id(ids, first, i)) {
            keel_roster_report_set_path(ld, "nurses", i, "id");
            report_repeated_id(ld, ids, first, i, "nurse");
        }
        keel_roster_clock_check_nurse(ld, i, list->items[i]);
        check_preceptor(ld, i, list->items[i]);
        check_covers(ld, i, list->items[i]);
    }
    free(ids);
    free(first);
}

/* Writes the levels of policy.acuity_minutes as ranges, like "1-5" or "1-3, 5". */
static void format_levels(const keel_roster *r, char *buf, size_t size)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < r->policy.nacuity && used < size; i++) {
        size_t last = i;
        while (last + 1 < r->policy.nacuity &&
               r->policy.acuity_minutes[last + 1].level == r->policy.acuity_minutes[last].level + 1)
            last++;
        int first_level = r->policy.acuity_minutes[i].level;
        int last_level = r->policy.acuity_minutes[last].level;
        if (last == i)
            snprintf(buf + used, size - used, "%s%d", used ? ", " : "", first_level);
        else
            snprintf(buf + used, size - used, "%s%d-%d", used ? ", " : "", first_level, last_level);
        used = strlen(buf);
        i = last;
    }
}

static void check_acuity(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    char levels[128];
    if (p->acuity == KEEL_ABSENT || ld->acuity_table != TABLE_READ || r->policy.nacuity == 0)
        return;
    for (size_t k = 0; k < r->policy.nacuity; k++)
        if (r->policy.acuity_minutes[k].level == p->acuity)
            return;
    format_levels(r, levels, sizeof levels);
    keel_roster_keys_patient_path(ld, i, "acuity");
    keel_roster_report_problem(ld, keel_roster_tree_find(item, "acuity")->mark,
                               "level %d is not in policy.acuity_minutes (%s)", p->acuity, levels);
}

/* Each entry of patients[i].nas is an item code of the instrument, each
 * item scored once and one level per item. */
static void check_nas(loader *ld, size_t i, const node *item)
{
    const keel_patient *p = &ld->roster->patients[i];
    const node *list = keel_roster_tree_find(item, "nas");
    keel_nas_sheet sheet;
    char message[256];
    if (!list || list->kind != NODE_SEQUENCE || p->nnas == 0)
        return;
    keel_nas_sheet_init(&sheet);
    for (size_t k = 0; k < p->nnas; k++) {
        size_t earlier = k;
        keel_nas_problem problem = keel_nas_sheet_add(&sheet, p->nas[k], &earlier);
        /* A repeated code is reported by the list reader already. */
        if (problem == KEEL_NAS_OK || problem == KEEL_NAS_DUPLICATE || !p->nas[k])
            continue;
        keel_nas_problem_format(problem, p->nas[k], p->nas[earlier], message, sizeof message);
        keel_roster_keys_patient_path(ld, i, "nas");
        keel_roster_report_push_index(ld, k);
        keel_roster_report_problem(ld, list->items[k]->mark, "%s", message);
    }
}

static bool has_extra(const keel_roster *r, const char *name)
{
    for (size_t k = 0; k < r->policy.nextras; k++)
        if (strcmp(r->policy.extra_minutes[k].name, name) == 0)
            return true;
    return false;
}

static void check_extras(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const node *list = keel_roster_tree_find(item, "extras");
    char shown[SHOWN_SIZE], names[256] = "";
    if (ld->extra_table == TABLE_BROKEN)
        return;
    for (size_t k = 0; k < r->policy.nextras; k++) {
        const char *name = r->policy.extra_minutes[k].name;
        if (strlen(names) + strlen(name) + 8 < sizeof names)
            strcat(strcat(names, k ? ", " : ""), name);
    }
    for (size_t e = 0; e < p->nextras; e++) {
        if (!p->extras[e] || has_extra(r, p->extras[e]))
            continue;
        keel_roster_keys_patient_path(ld, i, "extras");
        keel_roster_report_push_index(ld, e);
        if (r->policy.nextras == 0)
            keel_roster_report_problem(
                ld, list->items[e]->mark,
                "unknown extra '%s'; expected a name from policy.extra_minutes, which has none",
                keel_roster_report_show(shown, p->extras[e]));
        else
            keel_roster_report_problem(ld, list->items[e]->mark,
                                       "unknown extra '%s'; expected one of %s",
                                       keel_roster_report_show(shown, p->extras[e]), names);
    }
}

static void check_patient_nurse(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    char shown[SHOWN_SIZE];
    if (!p->nurse || r->nnurses == 0 || keel_roster_find_nurse(r, p->nurse) >= 0)
        return;
    keel_roster_keys_patient_path(ld, i, "nurse");
    keel_roster_report_problem(ld, keel_roster_tree_find(item, "nurse")->mark,
                               "no nurse '%s' on this roster",
                               keel_roster_report_show(shown, p->nurse));
}

/* A locked patient keeps the nurse it names. */
static void check_lock(loader *ld, size_t i, const node *item)
{
    if (!ld->roster->patients[i].lock || keel_roster_tree_find(item, "nurse"))
        return;
    keel_roster_keys_patient_path(ld, i, "lock");
    keel_roster_report_problem(
        ld, keel_roster_tree_find(item, "lock")->mark,
        "lock: true without a nurse; a locked patient needs nurse: the id of the nurse who "
        "keeps the patient");
}

/* Every nurse a patient avoids is on the roster, and a locked patient is
 * not locked to one of them.  (An unlocked patient's nurse on its avoid
 * list is a plan that breaks a rule: keel check reports it.) */
static void check_avoid(loader *ld, size_t i, const node *item)
{
    const keel_roster *r = ld->roster;
    const keel_patient *p = &r->patients[i];
    const node *list = keel_roster_tree_find(item, "avoid");
    char shown[SHOWN_SIZE];
    for (size_t a = 0; a < p->navoid; a++) {
        if (!p->avoid[a])
            continue;
        if (keel_roster_find_nurse(r, p->avoid[a]) < 0) {
            keel_roster_keys_patient_path(ld, i, "avoid");
            keel_roster_report_push_index(ld, a);
            keel_roster_report_problem(ld, list->items[a]->mark, "no nurse '%s' on this roster",
                                       keel_roster_report_show(shown, p->avoid[a]));
        } else if (p->lock && p->nurse && strcmp(p->nurse, p->avoid[a]) == 0) {
            keel_roster_keys_patient_path(ld, i, "nurse");
            keel_roster_report_problem(
                ld, keel_roster_tree_find(item, "nurse")->mark,
                "the patient is locked to '%s', who is on its avoid list (avoid[%zu] on line "
                "%d); expected a nurse the patient does not avoid",
                keel_roster_report_show(shown, p->nurse), a, list->items[a]->mark.line);
        }
    }
}

/* The id of roster->patients[i] differs from those before it, across the
 * patients and the expected admissions. */
static void check_patients(loader *ld)
{
    size_t n = ld->roster->npatients, *first = NULL;
    const node **ids = keel_calloc(n, sizeof *ids);
    if (!ids)
        ld->nomem = true;
    for (size_t i = 0; ids && i < n; i++)
        ids[i] = given_id(keel_roster_keys_patient_node(ld, i));
    if (ids)
        find_first_ids(ld, ids, n, &first);
    for (size_t i = 0; i < n; i++) {
        const node *item = keel_roster_keys_patient_node(ld, i);
        if (item->kind != NODE_MAPPING)
            continue;
        if (repeats_id(ids, first, i)) {
            keel_roster_keys_patient_path(ld, i, "id");
            report_repeated_id(ld, ids, first, i, "patient");
        }
        if (!keel_roster_tree_find(item, "acuity") &&
            !keel_roster_tree_find(item, "care_minutes") && !keel_roster_tree_find(item, "nas")) {
            keel_roster_keys_patient_path(ld, i, "acuity");
            keel_roster_report_problem(ld, item->mark,
                                       "missing; every patient needs acuity, care_minutes or nas");
        }
        check_acuity(ld, i, item);
        check_nas(ld, i, item);
        check_extras(ld, i, item);
        check_patient_nurse(ld, i, item);
        check_lock(ld, i, item);
        if (ld->roster->nnurses)
            check_avoid(ld, i, item);
        keel_roster_clock_check_patient(ld, i, item);
        check_handoffs(ld, i, item);
        check_record(ld, i, item);
    }
    free(ids);
    free(first);
}

/* Patients that give an acuity level need the policy's scale: keel has none
 * of its own.  Reported once, where policy.acuity_minutes would go. */
static void check_acuity_scale(loader *ld, const node *root)
{
    const keel_roster *r = ld->roster;
    const node *policy = keel_roster_tree_find(root, "policy");
    if (ld->acuity_table != TABLE_ABSENT)
        return;
    for (size_t i = 0; i < r->npatients; i++) {
        if (r->patients[i].acuity == KEEL_ABSENT)
            continue;
        keel_roster_keys_patient_path(ld, i, NULL);
        char entry[MAX_PATH];
        snprintf(entry, sizeof entry, "%s", ld->path);
        keel_roster_report_pop_path(ld, 0);
        keel_roster_report_push_key(ld, "policy");
        keel_roster_report_push_key(ld, "acuity_minutes");
        keel_roster_report_problem(
            ld, policy ? policy->mark : root->mark,
            "missing, but %s on line %d gives an acuity level; expected care minutes per "
            "level, as keel has no acuity scale of its own",
            entry,
            keel_roster_tree_find(keel_roster_keys_patient_node(ld, i), "acuity")->mark.line);
        return;
    }
}

/* A limit of value at node at (key path already set) must not be looser
 * than the selected table's per-nurse maximum. */
static void check_not_looser(loader *ld, const node *at, int value, const char *what)
{
    const keel_roster *r = ld->roster;
    const keel_law_table *t = r->policy.ratio_table;
    int law = keel_law_nurse_max(t, r->unit.type);
    char table[KEEL_LAW_CITE_SIZE];
    if (law < 0 || value == KEEL_ABSENT || value <= law)
        return;
    keel_law_cite(t, table, sizeof table);
    keel_roster_report_problem(
        ld, at->mark, "%s%d is looser than the limit of 1:%d for %s in %s; expected at most %d",
        what, value, law, r->unit.type, table, law);
}

/* policy.ratio_table needs a unit type it covers (and, for a table that
 * tells shifts apart, the shift's start); no limit in the roster may be
 * looser than the table's. */
static void check_ratio_table(loader *ld, const node *root)
{
    const keel_roster *r = ld->roster;
    const keel_law_table *t = r->policy.ratio_table;
    const node *policy = keel_roster_tree_find(root, "policy");
    char covered[256] = "", table[KEEL_LAW_CITE_SIZE];
    if (!t)
        return;
    keel_law_cite(t, table, sizeof table);
    for (size_t i = 0, used = 0; i < t->nentries && used < sizeof covered; i++) {
        if (strstr(covered, t->entries[i].unit_type))
            continue;
        snprintf(covered + used, sizeof covered - used, "%s%s", used ? ", " : "",
                 t->entries[i].unit_type);
        used = strlen(covered);
    }
    keel_roster_report_pop_path(ld, 0);
    keel_roster_report_push_key(ld, "policy");
    keel_roster_report_push_key(ld, "ratio_table");
    const node *at = keel_roster_tree_find(policy, "ratio_table");
    if (!r->unit.type) {
        keel_roster_report_problem(
            ld, at->mark,
            "the table %s needs unit.type to know which entry applies; expected unit.type, "
            "one of %s",
            table, covered);
        return;
    }
    if (!keel_law_covers(t, r->unit.type)) {
        keel_roster_report_problem(
            ld, at->mark,
            "the table %s has no entry for unit type '%s'; expected a unit of type %s, or no "
            "ratio_table",
            table, r->unit.type, covered);
        return;
    }
    if (t->classes && r->shift.start_minute == KEEL_ABSENT)
        keel_roster_report_problem(
            ld, at->mark,
            "the table %s differs by shift (%s); expected shift.start to tell which applies", table,
            t->classes);
    if (r->policy.max_patients != KEEL_ABSENT) {
        keel_roster_report_pop_path(ld, 0);
        keel_roster_report_push_key(ld, "policy");
        keel_roster_report_push_key(ld, "max_patients");
        check_not_looser(ld, keel_roster_tree_find(policy, "max_patients"), r->policy.max_patients,
                         "max_patients ");
    }
    const node *roles = keel_roster_tree_find(policy, "roles");
    for (size_t i = 0; roles && roles->kind == NODE_MAPPING && i + 1 < roles->nitems; i += 2) {
        const node *key = roles->items[i],
                   *limit = keel_roster_tree_find(roles->items[i + 1], "max_patients");
        long value;
        if (!limit || !keel_roster_words_scan_int(limit, &value) || key->kind != NODE_SCALAR)
            continue;
        keel_roster_report_pop_path(ld, 0);
        keel_roster_report_push_key(ld, "policy");
        keel_roster_report_push_key(ld, "roles");
        keel_roster_report_push_key(ld, key->text);
        keel_roster_report_push_key(ld, "max_patients");
        check_not_looser(ld, limit, (int)value, "max_patients ");
    }
    const node *nurses = keel_roster_tree_find(root, "nurses");
    for (size_t i = 0; i < r->nnurses; i++) {
        if (r->nurses[i].max_patients == KEEL_ABSENT)
            continue;
        keel_roster_report_set_path(ld, "nurses", i, "max_patients");
        check_not_looser(ld, keel_roster_tree_find(nurses->items[i], "max_patients"),
                         r->nurses[i].max_patients, "max_patients ");
    }
    for (size_t i = 0; i < r->npatients; i++) {
        if (r->patients[i].ratio == KEEL_ABSENT)
            continue;
        keel_roster_keys_patient_path(ld, i, "ratio");
        check_not_looser(ld, keel_roster_tree_find(keel_roster_keys_patient_node(ld, i), "ratio"),
                         r->patients[i].ratio, "ratio 1:");
    }
}

/* The steps after the walk: the merge of the expected admissions, the
 * clock, then the checks across the file. */
void keel_roster_check_file(loader *ld, const node *root)
{
    const node *nurses = keel_roster_tree_find(root, "nurses");
    const node *policy = keel_roster_tree_find(root, "policy");
    if (policy && policy->kind != NODE_MAPPING) {
        ld->acuity_table = TABLE_BROKEN;
        ld->extra_table = TABLE_BROKEN;
    }
    ld->patient_list = keel_roster_tree_find(root, "patients");
    ld->expected_list = keel_roster_tree_find(root, "expected_admissions");
    keel_roster_keys_merge_expected(ld);
    keel_roster_clock_convert(ld, root);
    check_shift_break(ld, root);
    if (ld->roster->nnurses)
        check_nurses(ld, nurses);
    if (ld->roster->npatients) {
        check_patients(ld);
        check_acuity_scale(ld, root);
    }
    check_ratio_table(ld, root);
    keel_roster_report_pop_path(ld, 0);
}
