/* SPDX-License-Identifier: GPL-3.0-or-later */
/* roster_internal.h - pieces of the roster module other modules share
 * (internal; the loader's own files share roster_loader.h). */
#ifndef KEEL_ROSTER_INTERNAL_H
#define KEEL_ROSTER_INTERNAL_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"

/* roster.c: reads the whole file at path into a new buffer *text of *len
 * bytes.  Statuses: KEEL_OK, KEEL_ERR_IO (one problem naming the file),
 * KEEL_ERR_NOMEM. */
keel_status keel_roster_read_file(const char *path, long max, char **text, size_t *len,
                                  keel_error *err);

/* roster_clock.c: writes the clock time `offset` minutes after the shift's
 * start as "HH:MM" (or "+N min" when the shift has no start) into buf. */
#define KEEL_TIME_SIZE 16
void keel_roster_clock_text(const keel_roster *r, int offset, char buf[KEEL_TIME_SIZE]);

/* roster_copy.c: a deep copy of the roster (the ratio table stays
 * borrowed), or NULL when memory ran out; free it with keel_roster_free().
 * keel_roster_copy_patient() copies one patient into *to, which then owns
 * its own strings (false when memory ran out: *to holds what was copied,
 * for keel_roster_data_patient_fini()). */
keel_roster *keel_roster_copy(const keel_roster *from);
bool keel_roster_copy_patient(keel_patient *to, const keel_patient *from);

/* roster_data.c: frees everything a patient owns (not the patient itself). */
void keel_roster_data_patient_fini(keel_patient *p);

#endif
