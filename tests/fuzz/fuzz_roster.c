/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * fuzz_roster.c - libFuzzer harness: any bytes as a roster.  The loader
 * must accept or refuse them (KEEL_OK or an error naming where), never
 * crash, leak, hang or read out of bounds; a roster it accepts must turn
 * into a workload (or a clean refusal) the same way.
 */
#include <stddef.h>
#include <stdint.h>

#include "keel/keel.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    keel_error err;
    keel_error_init(&err);
    keel_roster *r = NULL;
    if (keel_roster_parse("fuzz.yaml", (const char *)data, size, &r, &err) == KEEL_OK) {
        keel_workload *w = NULL;
        if (keel_workload_compute(r, &w, &err) == KEEL_OK)
            keel_workload_free(w);
        keel_roster_free(r);
    }
    keel_error_fini(&err);
    return 0;
}
