/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * template.c - the commented roster `keel new` writes; see keel/template.h.
 */
#include "keel/template.h"

#include <stdlib.h>
#include <string.h>

#include "keel/keel.h"
#include "report_internal.h"
#include "workload_internal.h"

#define FILL KEEL_PLACEHOLDER

typedef struct shift_default {
    const char *label;
    const char *start;
} shift_default;

/* Common shift starts (common practice, no source); every figure is the
 * unit's to change. */
static const shift_default shifts[] = {
    {"day", "07:00"},
    {"evening", "15:00"},
    {"night", "19:00"},
};

static bool known_type(const char *type)
{
    for (size_t i = 0; i < keel_unit_ntypes(); i++)
        if (strcmp(keel_unit_type(i), type) == 0)
            return true;
    return false;
}

/* The acuity levels the census uses, or 1-5 without a census. */
static void write_acuity(FILE *out, const keel_census *census)
{
    fputs("  acuity_minutes:          # care minutes per shift at each acuity level,\n"
          "                           # the unit's own figures\n",
          out);
    bool used[100] = {false}, any = false;
    for (size_t p = 0; census && p < census->npatients; p++) {
        int a = census->patients[p].acuity;
        if (a >= 0 && a < 100) {
            used[a] = true;
            any = true;
        }
    }
    for (int level = 0; level < 100; level++)
        if (any ? used[level] : level >= 1 && level <= 5)
            fprintf(out, "    %d: %s\n", level, FILL);
}

keel_status keel_template_write(const keel_template_options *o, const keel_census *census,
                                FILE *out, keel_error *err)
{
    const char *type = o->unit_type ? o->unit_type : "other";
    const char *label = o->shift ? o->shift : "day";
    const shift_default *shift = NULL;
    for (size_t i = 0; i < sizeof shifts / sizeof shifts[0]; i++)
        if (strcmp(shifts[i].label, label) == 0)
            shift = &shifts[i];
    if (!known_type(type))
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "unknown unit type '%s'; see docs/roster-format.md for the list",
                              type);
    if (!shift)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "unknown shift '%s'; expected day, evening or night", label);
    const keel_law_table *table = o->table ? keel_law_find(o->table) : NULL;
    if (o->table && !table)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "unknown ratio table '%s'; expected california or queensland",
                              o->table);
    char cite[KEEL_LAW_CITE_SIZE];
    keel_law_cite(table, cite, sizeof cite);
    if (table && !keel_law_covers(table, type))
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "the table %s has no entry for unit type '%s'", cite, type);

    fprintf(out, "# A keel roster for a %s unit, %s shift, written by `keel new`.\n", type, label);
    fprintf(out,
            "# Replace every %s with the unit's own value: keel refuses the roster\n"
            "# until each one is filled in.  keel ships no acuity scale and applies no\n"
            "# staffing law unless the roster names a ratio table.\n"
            "# %s\n",
            FILL, KEEL_CAUTION);
    fputs("version: 1\n\nunit:\n", out);
    if (o->unit_name) {
        fputs("  name: ", out);
        keel_report_out_quoted(out, o->unit_name);
        fputc('\n', out);
    } else {
        fprintf(out, "  name: %s                 # e.g. \"4 West\"\n", FILL);
    }
    fprintf(out, "  type: %s\n\n", type);
    fprintf(out,
            "shift:\n"
            "  label: %s\n"
            "  start: \"%s\"\n"
            "  minutes: 720             # the shift's length in minutes\n"
            "  break_minutes: %s   # each nurse's break, unless a nurse gives one; a nurse on\n"
            "                           # for under half the shift without her own takes none\n\n",
            label, shift->start, FILL);
    fputs("policy:\n", out);
    if (table) {
        int max = keel_law_nurse_max(table, type);
        fprintf(out, "  # %s", cite);
        if (max > 0)
            fprintf(out, ": at most %d patient%s per nurse", max, max == 1 ? "" : "s");
        if (table->note)
            fprintf(out, "\n  # %s", table->note);
        fprintf(out, "\n  ratio_table: %s\n", table->name);
    }
    fprintf(out, "  max_patients: %s    # the unit's own limit per nurse%s\n", FILL,
            table ? " (at most the table's)" : "");
    write_acuity(out, census);
    fprintf(out,
            "  extra_minutes:           # added for each extra a patient lists;\n"
            "                           # delete the ones the unit does not use\n"
            "    admission: %s\n"
            "    discharge: %s\n"
            "  roles:\n"
            "    charge: {max_patients: %s, duty_minutes: %s}\n"
            "  # high_acuity: {level: 4, max_per_nurse: 1}   # spread the sickest patients\n"
            "  # isolation_needs: {airborne: [n95]}\n"
            "  # max_zones: 2\n"
            "  # balance_tolerance: 0.05\n\n",
            FILL, FILL, FILL, FILL);
    /* Example times inside the shift, in whole hours after its start. */
    int h = atoi(shift->start);
    fprintf(
        out,
        "nurses:                     # one entry per nurse on the shift; ids must differ\n"
        "  - {id: %s, role: charge, skills: []}\n"
        "  - {id: %s, skills: []}\n"
        "  # - {id: N9, start: \"%02d:00\", end: \"%02d:00\"}   # on for part of the shift\n"
        "  # - {id: N8, breaks: [{at: \"%02d:00\", minutes: 30}], covers: N9}   # a break buddy\n"
        "  # - {id: R1, role: relief}   # covers breaks\n\n",
        FILL, FILL, (h + 4) % 24, (h + 12) % 24, (h + 5) % 24);
    if (census && census->npatients > 0) {
        fprintf(out, "# Patients from the census %s.\n", census->path);
        fputs("patients:\n", out);
        for (size_t p = 0; p < census->npatients; p++)
            keel_report_yaml_patient(out, NULL, &census->patients[p], census->patients[p].nurse);
    } else {
        fprintf(
            out,
            "patients:                   # or [] and: keel import census.csv --roster this-file\n"
            "  - {id: %s, bed: %s, acuity: %s, needs: []}\n"
            "  # leaves_at: \"%02d:00\" (a discharge), arrives_at: \"%02d:00\" (a transfer in)\n"
            "\n"
            "# expected_admissions:      # admissions the unit has been told of\n"
            "#   - {id: ADM-1, at: \"%02d:00\", acuity: 3}\n",
            FILL, FILL, FILL, (h + 4) % 24, (h + 7) % 24, (h + 8) % 24);
    }
    if (ferror(out))
        return keel_error_add(err, KEEL_ERR_IO, NULL, 0, 0, NULL, "cannot write the roster");
    return KEEL_OK;
}
