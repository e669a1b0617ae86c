/* SPDX-License-Identifier: GPL-3.0-or-later */
/* finding.c - the list of findings (diagnoses and violations). */
#include "keel/finding.h"

#include <stdlib.h>

void keel_findings_fini(keel_findings *list)
{
    if (!list)
        return;
    for (size_t i = 0; i < list->n; i++) {
        free(list->items[i].patients);
        free(list->items[i].nurses);
        free(list->items[i].message);
    }
    free(list->items);
    list->items = NULL;
    list->n = 0;
}

#include <string.h>

#include "alloc.h"
#include "finding_list.h"

static size_t *copy_indices(const size_t *src, size_t n)
{
    size_t *dst = keel_malloc((n ? n : 1) * sizeof *dst);
    if (dst && n)
        memcpy(dst, src, n * sizeof *dst);
    return dst;
}

keel_status keel_findings_add(keel_findings *list, const char *rule, const size_t *patients,
                              size_t npatients, const size_t *nurses, size_t nnurses, char *message)
{
    size_t *p = NULL, *n = NULL;
    keel_finding *grown = NULL;
    if (!message)
        goto nomem;
    p = copy_indices(patients, npatients);
    n = copy_indices(nurses, nnurses);
    if (!p || !n)
        goto nomem;
    grown = keel_reallocarray(list->items, list->n + 1, sizeof *grown);
    if (!grown)
        goto nomem;
    list->items = grown;
    list->items[list->n++] = (keel_finding){.rule = rule,
                                            .npatients = npatients,
                                            .patients = p,
                                            .nnurses = nnurses,
                                            .nurses = n,
                                            .message = message};
    return KEEL_OK;
nomem:
    free(p);
    free(n);
    free(message);
    return KEEL_ERR_NOMEM;
}
