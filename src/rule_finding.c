/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_finding.c - the one way a rule's plan check reports what a nurse
 * holds: the parts she holds, as the roster's patients, with the words.
 */
#include <stdlib.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

keel_status keel_rule_finding_add(const keel_rule_plan *c, const char *rule, const size_t *mine,
                                  size_t k, size_t n, char *msg, keel_findings *out)
{
    size_t *who = keel_calloc(k, sizeof *who);
    if (!who) {
        free(msg);
        return KEEL_ERR_NOMEM;
    }
    for (size_t i = 0; i < k; i++)
        who[i] = (size_t)c->w->patient[mine[i]];
    keel_status rc = keel_findings_add(out, rule, who, k, &n, 1, msg);
    free(who);
    return rc;
}
