/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/roster.h - one unit, one shift: policy, nurses, patients and, when
 * known, who has whom.  First stage of the pipeline:
 *
 *   roster (load + validate) -> workload -> solve -> metrics -> report
 *
 * The roster owns every string in it (copied out of the parser).  A loaded
 * roster is valid: every reference resolves, every number is in its
 * documented range, ids are unique.  Integer fields that the file may leave
 * out hold KEEL_ABSENT when it does; the workload module applies defaults.
 * The format is documented in docs/roster-format.md.
 */
#ifndef KEEL_ROSTER_H
#define KEEL_ROSTER_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/law.h"

#ifdef __cplusplus
extern "C" {
#endif

/* What `keel new` writes where only the unit knows the value; the loader
 * refuses a roster that still has one (a problem at each). */
#define KEEL_PLACEHOLDER "FILL_IN"

/* The unit.type words, in their documented order. */
KEEL_API size_t keel_unit_ntypes(void);
KEEL_API const char *keel_unit_type(size_t i);

/* Value of an optional integer field that the roster does not give. */
#define KEEL_ABSENT (-1)

/* Limits on what keel reads (docs/roster-format.md, "Limits"), each
 * refused early with a problem at file:line:column: a whole house's census
 * is a few thousand patients, a year of one unit's shifts some 25 MB. */
#define KEEL_MAX_FILE_BYTES (16L * 1024 * 1024)    /* a roster or census file */
#define KEEL_MAX_STREAM_BYTES (256L * 1024 * 1024) /* a file of many shifts (keel audit) */
#define KEEL_MAX_ITEMS 20000 /* entries of one list: patients, nurses, census rows, ... */
#define KEEL_MAX_TEXT 1000  /* bytes of one value */
#define KEEL_MAX_DEPTH 16   /* nesting of lists and mappings (a roster needs 5) */

/* A 1-based position in the roster file; line 0 means "not from a file". */
typedef struct keel_mark {
    int line;
    int column;
} keel_mark;

/* A nurse's role on the shift (nurses[].role; default staff). */
typedef enum keel_role {
    KEEL_ROLE_STAFF,    /* takes a full assignment */
    KEEL_ROLE_CHARGE,   /* runs the shift; usually few or no patients, charge duty minutes */
    KEEL_ROLE_RESOURCE, /* kept free for admissions and rapid responses */
    KEEL_ROLE_FLOAT,    /* from another unit: staff rules, shown as such */
    KEEL_ROLE_ORIENTEE, /* works under a preceptor; shares the preceptor's assignment */
    KEEL_ROLE_RELIEF,   /* covers other nurses' breaks; no patients of her own by default */
} keel_role;

#define KEEL_NROLES 6

/* Name of a role as written in the roster ("staff", "charge", ...). */
KEEL_API const char *keel_role_name(keel_role role);

/* The nurse's licence (nurses[].licence; default rn). */
typedef enum keel_licence {
    KEEL_LICENCE_RN,  /* registered nurse */
    KEEL_LICENCE_LPN, /* licensed practical or vocational nurse */
} keel_licence;

/* A patient's isolation precautions (patients[].isolation; default none). */
typedef enum keel_isolation {
    KEEL_ISOLATION_NONE,
    KEEL_ISOLATION_CONTACT,
    KEEL_ISOLATION_DROPLET,
    KEEL_ISOLATION_AIRBORNE,
    KEEL_ISOLATION_PROTECTIVE, /* protects an immunocompromised patient */
} keel_isolation;

#define KEEL_NISOLATION 5

/* Name of a precaution as written in the roster ("contact", ...; "none"). */
KEEL_API const char *keel_isolation_name(keel_isolation isolation);

/* A timed break (nurses[].breaks[]).  Times on a roster are kept as
 * minutes after the shift's start (0 .. shift.minutes), read against the
 * shift so that a night shift crosses midnight. */
typedef struct keel_break {
    int at;         /* minutes after the shift's start */
    int minutes;    /* > 0 */
    keel_mark mark; /* where the break's mapping starts */
} keel_break;

/* Balance tolerance is kept exactly, in millionths of a utilisation point. */
#define KEEL_TOLERANCE_SCALE 1000000

/* What stage 1 balances (policy.balance). */
typedef enum keel_balance {
    KEEL_BALANCE_PEAK,    /* the heaviest utilisation (default) */
    KEEL_BALANCE_SQUARES, /* the sum of load^2 / capacity over the counted nurses */
} keel_balance;

/* Name of a balance as written in the roster ("peak", "squares"). */
KEEL_API const char *keel_balance_name(keel_balance balance);

typedef struct keel_nurse {
    char *id;   /* required, unique */
    char *name; /* NULL when absent */
    size_t nskills;
    char **skills;
    int max_patients;     /* KEEL_ABSENT: policy.max_patients applies */
    int min_patients;     /* KEEL_ABSENT: policy.min_patients applies */
    int minutes;          /* minutes on the unit; KEEL_ABSENT: shift.minutes */
    int break_minutes;    /* KEEL_ABSENT: shift.break_minutes */
    int duty_minutes;     /* fixed non-patient work; KEEL_ABSENT: the role's, else 0 */
    keel_role role;       /* KEEL_ROLE_STAFF when absent */
    keel_licence licence; /* KEEL_LICENCE_RN when absent */
    char *preceptor;      /* orientees only: id of the preceptor (required for them) */
    int start;            /* minutes after the shift's start when she comes on; KEEL_ABSENT: 0 */
    int end;              /* minutes after the shift's start when she leaves; KEEL_ABSENT: the
                             shift's end */
    size_t nbreaks;
    keel_break *breaks; /* timed breaks, in time order, inside [start, end), not overlapping */
    char *covers;       /* id of the nurse whose patients she holds during that nurse's
                           breaks (a break buddy), or NULL */
    keel_mark mark;     /* where the nurse's mapping starts */
} keel_nurse;

/* One stretch of a patient's record (patients[].record[]): who held her
 * over [from, to), in minutes after the shift's start. */
typedef struct keel_stretch {
    char *nurse;    /* id of a nurse of the roster (who may have left since) */
    int from;       /* minutes after the shift's start */
    int to;         /* > from */
    keel_mark mark; /* where the stretch's mapping starts */
} keel_stretch;

typedef struct keel_patient {
    char *id;         /* required, unique: the patient, not the bed */
    char *bed;        /* NULL when absent */
    char *name;       /* NULL when absent; hidden in de-identified output */
    int acuity;       /* KEEL_ABSENT when not given */
    int care_minutes; /* explicit figure; KEEL_ABSENT when not given */
    size_t nextras;
    char **extras; /* names of policy.extra_minutes entries */
    size_t nneeds;
    char **needs; /* competencies the nurse must have, every one */
    char *nurse;  /* id of the nurse who has this patient, or NULL */
    bool lock;    /* keep `nurse` (a locked patient always has one) */
    bool sitter;  /* has a 1:1 sitter (shown on the sheet; no nurse time assumed) */
    size_t navoid;
    char **avoid;             /* ids of nurses who must not have this patient */
    int ratio;                /* N of "1:N": most patients of this patient's nurse; KEEL_ABSENT */
    keel_isolation isolation; /* KEEL_ISOLATION_NONE when absent */
    char *room;               /* NULL when absent */
    char *zone;               /* NULL when absent; a group of rooms */
    char *previous_nurse;     /* the previous shift's nurse (may be off this roster), or NULL */
    size_t nnas;
    char **nas;     /* Nursing Activities Score item codes ("1b", "4a", ...), valid (keel/nas.h) */
    int arrives_at; /* minutes after the shift's start; KEEL_ABSENT: here at the start */
    int leaves_at;  /* minutes after the shift's start; KEEL_ABSENT: stays past the end */
    bool expected;  /* listed under expected_admissions (then arrives_at is its `at`) */
    size_t nhandoffs;
    char **handoffs; /* ids of the nurses who take the patient over, in order, each when
                        the nurse before leaves (a planned hand-off) */
    size_t nrecord;
    keel_stretch *record; /* who held her before the last rebalance, in time order, without
                             gaps from her arrival; `nurse` and `handoffs` hold from the
                             end of the last stretch on */
    keel_mark mark;       /* where the patient's mapping starts */
} keel_patient;

typedef struct keel_acuity_level {
    int level;
    int minutes; /* care minutes per shift at this level */
} keel_acuity_level;

/* Defaults for every nurse of one role (policy.roles.<role>). */
typedef struct keel_role_policy {
    int max_patients; /* KEEL_ABSENT when not given */
    int duty_minutes; /* KEEL_ABSENT when not given */
    int max_acuity;   /* the highest acuity level the role's nurses take; KEEL_ABSENT: any */
} keel_role_policy;

typedef struct keel_extra {
    char *name;
    int minutes;
} keel_extra;

typedef struct keel_roster {
    char *path; /* the file name used in messages */

    struct {
        char *name; /* NULL when absent */
        char *type; /* NULL when absent; one of the documented unit types */
    } unit;

    struct {
        char *label;       /* NULL when absent */
        char *date;        /* "YYYY-MM-DD" or NULL */
        int start_minute;  /* minutes after midnight, KEEL_ABSENT if no start */
        int minutes;       /* length of the shift, required */
        int break_minutes; /* KEEL_ABSENT: 0 */
    } shift;

    struct {
        int max_patients; /* KEEL_ABSENT: no unit-wide limit */
        size_t nacuity;
        keel_acuity_level *acuity_minutes; /* sorted by level, unique */
        size_t nextras;
        keel_extra *extra_minutes;           /* in file order, unique names */
        keel_role_policy roles[KEEL_NROLES]; /* indexed by keel_role; KEEL_ABSENT fields */
        const keel_law_table *ratio_table;   /* built-in, not owned; NULL when absent */
        struct {
            int level;         /* acuity at or above which a patient is high-acuity */
            int max_per_nurse; /* KEEL_ABSENT (both) when policy.high_acuity is absent */
        } high_acuity;
        bool isolation_separation; /* true unless the roster says false */
        size_t nisolation_needs[KEEL_NISOLATION];
        char **isolation_needs[KEEL_NISOLATION]; /* competencies each precaution needs */
        int max_zones;                           /* KEEL_ABSENT: no limit */
        int balance_tolerance;                   /* in 1/KEEL_TOLERANCE_SCALE; KEEL_ABSENT: 0.05 */
        int min_patients;     /* fewest patients per counted nurse; KEEL_ABSENT: 0 */
        int max_utilisation;  /* hard cap, in 1/KEEL_TOLERANCE_SCALE; KEEL_ABSENT: none */
        keel_balance balance; /* KEEL_BALANCE_PEAK when absent */
    } policy;

    size_t nnurses;
    keel_nurse *nurses;
    size_t npatients;
    keel_patient *patients; /* patients, then the expected admissions (expected = true) */
    bool clock;             /* some nurse or patient has a time of its own */
} keel_roster;

/* Reads and validates the roster file at path.  On success *out is a new
 * roster: the caller owns it; free it with keel_roster_free().  Statuses:
 * KEEL_OK; KEEL_ERR_IO (cannot read: one problem naming the file);
 * KEEL_ERR_INPUT (every schema and syntax problem found in the file, each
 * with line, column and key path; *out is NULL); KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_roster_load(const char *path, keel_roster **out, keel_error *err);

/* Like keel_roster_load() but reads len bytes of YAML from text; name is
 * used in messages as the file name. */
KEEL_API keel_status keel_roster_parse(const char *name, const char *text, size_t len, keel_roster **out,
                              keel_error *err);

/* Reads a file that holds one roster or several, as a YAML stream of
 * documents (separated by `---`), each a roster of its own (a unit's
 * shifts kept in one file, for keel audit).  On success *out is a new array
 * of *nout rosters in file order, each named path in messages: the caller
 * owns them; free each with keel_roster_free() and the array with free().
 * Every problem of every document is reported, each at its line and column
 * in the file.  Statuses as for keel_roster_load(); on failure *out is NULL
 * and *nout 0. */
KEEL_API keel_status keel_roster_load_stream(const char *path, keel_roster ***out, size_t *nout,
                                             keel_error *err);

/* Like keel_roster_load_stream() but reads len bytes of YAML from text. */
KEEL_API keel_status keel_roster_parse_stream(const char *name, const char *text, size_t len,
                                              keel_roster ***out, size_t *nout, keel_error *err);

/* Frees the roster and everything it owns.  NULL-safe. */
KEEL_API void keel_roster_free(keel_roster *roster);

/* Index of the nurse with this id, or -1.  Borrowed strings only. */
KEEL_API int keel_roster_find_nurse(const keel_roster *roster, const char *id);

/* Minutes of an acuity level in policy.acuity_minutes, or KEEL_ABSENT. */
KEEL_API int keel_roster_acuity_minutes(const keel_roster *roster, int level);

/* Minutes of a named extra in policy.extra_minutes, or KEEL_ABSENT. */
KEEL_API int keel_roster_extra_minutes(const keel_roster *roster, const char *name);

/* True when the nurse has the named competency in skills. */
KEEL_API bool keel_nurse_has_skill(const keel_nurse *nurse, const char *skill);

#ifdef __cplusplus
}
#endif
#endif
