/* SPDX-License-Identifier: GPL-3.0-or-later */
/* finding_list.h - appending to a keel_findings list (internal). */
#ifndef KEEL_FINDING_LIST_H
#define KEEL_FINDING_LIST_H

#include "keel/error.h"
#include "keel/finding.h"

/* Appends a finding; copies the index arrays and takes ownership of message
 * (freed here on failure).  Returns KEEL_OK or KEEL_ERR_NOMEM. */
keel_status keel_findings_add(keel_findings *list, const char *rule, const size_t *patients,
                              size_t npatients, const size_t *nurses, size_t nnurses,
                              char *message);

#endif
