/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_name.c - the rules of the design's list that are names only, with
 * no test and no rows of their own: a patient limit the ratio table sets
 * is reported as law_limit, and any count broken at one moment of the
 * clock as moment_limit (rule_limit.c, rule_ratio.c).
 */
#include "rule.h"

const keel_rule keel_rule_law_limit = {
    .name = "law_limit",
    .staffing = true,
    .scope = KEEL_SCOPE_NAME,
    .severity = 80, /* the patient limit's soft rows weigh a limit the ratio table sets at this */
};
const keel_rule keel_rule_moment_limit = {
    .name = "moment_limit",
    .staffing = true,
    .scope = KEEL_SCOPE_NAME,
};
