/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * fuzz_census.c - libFuzzer harness: any bytes as a census CSV, read on
 * its own and against a small unit roster, then joined to it.  Every
 * outcome is a census or errors naming the row and column; never a crash,
 * a leak or a read out of bounds.
 */
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include "keel/census.h"
#include "keel/keel.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static const char UNIT[] = "version: 1\n"
                           "unit: {name: \"Fuzz ward (invented)\", type: med-surg}\n"
                           "shift: {label: day, start: \"07:00\", minutes: 720}\n"
                           "policy:\n"
                           "  acuity_minutes: {1: 60, 2: 90, 3: 120}\n"
                           "  extra_minutes: {admission: 60}\n"
                           "nurses: [{id: N1, skills: [tele]}, {id: N2}]\n"
                           "patients: []\n";

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    keel_error err;
    keel_error_init(&err);
    keel_census *c = NULL;
    if (keel_census_parse("fuzz.csv", (const char *)data, size, NULL, &c, &err) == KEEL_OK)
        keel_census_free(c);
    keel_error_fini(&err);

    keel_error_init(&err);
    keel_roster *unit = NULL;
    if (keel_roster_parse("unit.yaml", UNIT, strlen(UNIT), &unit, &err) == KEEL_OK) {
        c = NULL;
        if (keel_census_parse_for("fuzz.csv", (const char *)data, size, NULL, unit, &c, &err) ==
            KEEL_OK) {
            keel_census_into_roster(c, unit, &err);
            keel_census_free(c);
        }
        keel_roster_free(unit);
    }
    keel_error_fini(&err);
    return 0;
}
