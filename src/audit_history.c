/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_history.c - the audit fed forward: each nurse's weight for the
 * solver's fairness-forward stage (keel assign --history), from what the
 * audit summed up per nurse.  A nurse who was loaded more heavily over
 * the history weighs more, so the stage gives her the lighter load.
 */
#include <string.h>

#include "keel/audit.h"

void keel_audit_history_weights(const keel_audit *audit, const keel_roster *roster, double *weight)
{
    double sum = 0;
    size_t counted = 0;
    for (size_t k = 0; k < audit->npeople; k++) {
        sum += audit->people[k].mean_utilisation * (double)audit->people[k].counted_shifts;
        counted += audit->people[k].counted_shifts;
    }
    double unit = counted ? sum / (double)counted : 1.0;
    for (size_t i = 0; i < roster->nnurses; i++) {
        weight[i] = unit;
        for (size_t k = 0; k < audit->npeople; k++)
            if (audit->people[k].counted_shifts > 0 &&
                strcmp(audit->people[k].id, roster->nurses[i].id) == 0)
                weight[i] = audit->people[k].mean_utilisation;
    }
}
