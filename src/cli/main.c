/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * main.c - the keel command.  Thin: parses arguments, calls the library,
 * prints problems, maps statuses to exit codes and checks that the output
 * was written.
 *
 * Exit codes: 0 success; 1 usage error; 2 bad input; 3 no valid assignment
 * exists; 4 internal or solver failure (including a failed write).
 */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "keel/keel.h"
#include "output.h"

enum {
    EXIT_USAGE = 1,
    EXIT_INPUT = 2,
    EXIT_INFEASIBLE = 3,
    EXIT_INTERNAL = 4,
};

typedef struct options {
    const char *roster;
    const char *format;
    const char *output;
    const char *method;
    long time_limit_ms;
    bool explain;      /* --explain: a reason per patient */
    bool best_effort;  /* --best-effort: a labelled plan even when no valid one exists */
    const char *type;  /* new, import: --type */
    const char *table; /* new, import: --table */
    const char *unit;  /* new, import: --unit */
    const char *shift; /* new, import: --shift */
    const char *base;  /* import: --roster, the roster the census joins */
    const char *map;   /* import: --map field=Header,... */
    int max_handoffs;  /* rebalance: --max-handoffs; -1: the default */
    int handoffs;      /* rebalance: --handoffs, the option to write; -1: the recommended */
    double min_gain;   /* rebalance: --min-gain; -1: the default */
    int at_minute;     /* rebalance: --at HH:MM, minutes after midnight; -1: none */
} options;

typedef struct command {
    const char *name;
    const char *summary;
    const char *usage;
    int (*run)(const options *opt);
} command;

static int run_assign(const options *opt);
static int run_check(const options *opt);
static int run_new(const options *opt);
static int run_import(const options *opt);
static int run_rebalance(const options *opt);

static const command commands[] = {
    {"assign", "balance the roster's patients across its nurses",
     "usage: keel assign ROSTER [--format text|yaml|json] [--method ilp|greedy]\n"
     "                   [--time-limit SECONDS] [--explain] [--best-effort] [-o FILE]\n"
     "\n"
     "Divides the roster's patients among its nurses so that the heaviest utilisation\n"
     "(load / capacity) is as low as possible, then lifts the lightest one, and reports\n"
     "each nurse's load, the imbalance, the proven bound and the gap.\n"
     "\n"
     "  -f, --format FMT       text (default), yaml (the roster with each patient's\n"
     "                         nurse filled in) or json\n"
     "  -m, --method NAME      ilp (default: exact search with GLPK) or greedy\n"
     "  -t, --time-limit SECS  limit for the whole solve (default 10); on time-out the\n"
     "                         best plan found is kept and reported as not proven\n"
     "  -e, --explain          say why each patient went to its nurse (text and json;\n"
     "                         the yaml plan is a roster and has no place for it)\n"
     "      --best-effort      when no valid assignment exists, also show the plan that\n"
     "                         breaks the fewest rules (by severity), labelled as such;\n"
     "                         the exit code stays 3\n"
     "  -o, --output FILE      write to FILE (replaced atomically; never the roster).\n"
     "                         When no valid assignment exists, nothing is written to\n"
     "                         FILE unless --best-effort gives a labelled plan\n",
     run_assign},
    {"check", "validate a roster, show its workload, score its own plan",
     "usage: keel check ROSTER [--format text|json] [--time-limit SECONDS] [-o FILE]\n"
     "\n"
     "Validates the roster and shows the workload: care minutes per patient, capacity\n"
     "per nurse, totals and nurses needed at full utilisation.  When every patient\n"
     "already has a nurse, scores that plan: loads, imbalance, every rule it breaks,\n"
     "and the best heaviest utilisation that was possible.\n"
     "\n"
     "  -f, --format FMT       text (default) or json\n"
     "  -t, --time-limit SECS  limit for finding the best possible (default 10)\n"
     "  -o, --output FILE      write to FILE (replaced atomically; never the roster)\n",
     run_check},
    {"rebalance", "fold in what changed mid-shift with the fewest hand-offs",
     "usage: keel rebalance ROSTER [--format text|yaml|json] [--at HH:MM]\n"
     "                      [--max-handoffs N] [--handoffs K] [--min-gain POINTS]\n"
     "                      [--time-limit SECONDS] [-o FILE]\n"
     "\n"
     "The roster is the current state: a patient with a nurse is with that nurse now,\n"
     "a patient without one is new.  For k = 0, 1, ... up to --max-handoffs, finds the\n"
     "best plan that moves at most k patients to another nurse (a swap counts two;\n"
     "placing a new patient is not a hand-off; a patient whose nurse is gone or may no\n"
     "longer keep the patient is a forced move, listed apart and not counted; locked\n"
     "patients never move), and recommends the fewest hand-offs whose heaviest\n"
     "utilisation is within --min-gain of the best option's.  Without --at, the\n"
     "roster's figures are taken as the work that remains.\n"
     "\n"
     "  -f, --format FMT       text (default: the frontier, the moves, the recommendation),\n"
     "                         json (every option) or yaml (the chosen option as the\n"
     "                         updated roster, which keel rebalance and keel check read)\n"
     "      --at HH:MM         the time of the rebalance: what happened before is fixed,\n"
     "                         care and capacity count from then on (the shift needs a\n"
     "                         start); the yaml output is the rest of the shift\n"
     "      --max-handoffs N   the largest k of the frontier (default 3)\n"
     "      --handoffs K       the option to write and detail (default: the recommended)\n"
     "      --min-gain POINTS  the least drop of the heaviest utilisation worth a hand-off\n"
     "                         (default 0.03)\n"
     "  -t, --time-limit SECS  limit for the whole frontier (default 10), shared equally by\n"
     "                         the options still to solve\n"
     "  -o, --output FILE      write to FILE (replaced atomically; never the roster).\n"
     "                         When the option has no plan, nothing is written to FILE\n",
     run_rebalance},
    {"new", "write a commented roster for a unit to fill in",
     "usage: keel new [--type UNIT-TYPE] [--table NAME] [--unit NAME] [--shift day|evening|night]\n"
     "                [-o FILE]\n"
     "\n"
     "Writes a roster template with comments.  Where only the unit knows the value (its\n"
     "acuity scale, limits, nurses) it writes " KEEL_PLACEHOLDER ", which keel refuses until it\n"
     "is replaced.  No staffing law applies unless you name a ratio table.\n"
     "\n"
     "  --type TYPE            unit type: icu, step-down, telemetry, med-surg, pediatrics,\n"
     "                         emergency, oncology, psychiatric, labor-delivery, postpartum,\n"
     "                         pacu, burn, nicu, other (default other)\n"
     "  --table NAME           a built-in ratio table: california or queensland\n"
     "  --unit NAME            the unit's name\n"
     "  --shift LABEL          day (07:00, default), evening (15:00) or night (19:00)\n"
     "  -o, --output FILE      write to FILE (replaced atomically)\n",
     run_new},
    {"import", "turn a census CSV into a roster",
     "usage: keel import CENSUS.csv [--roster BASE.yaml] [--map FIELD=HEADER,...]\n"
     "                   [--type TYPE] [--table NAME] [--unit NAME] [--shift LABEL] [-o FILE]\n"
     "\n"
     "Reads the census (columns bed, patient, acuity, needs, isolation, and more; see\n"
     "docs/census-format.md) and writes a roster: the unit, policy and nurses of BASE\n"
     "with the census's patients, or, without --roster, a template as keel new writes\n"
     "it with the census's patients in it.\n"
     "\n"
     "  --roster FILE          the roster whose unit, shift, policy and nurses to keep\n"
     "  --map SPEC             read fields from other columns: patient=MRN,acuity=Level\n"
     "  --type, --table, --unit, --shift   as for keel new (without --roster)\n"
     "  -o, --output FILE      write to FILE (replaced atomically; never an input)\n",
     run_import},
};

static const size_t ncommands = sizeof commands / sizeof commands[0];

/* keel help's own page: `keel help help`. */
static const char help_usage[] =
    "usage: keel help [COMMAND]\n"
    "\n"
    "Without a command, lists keel's commands, its exit codes and the caution.  With\n"
    "one (assign, check, rebalance, new, import or help), shows that command's usage\n"
    "and every option; 'keel COMMAND --help' shows the same.\n";

static void print_usage(FILE *out)
{
    fprintf(out, "usage: keel COMMAND [ARGS]\n\n"
                 "keel balances patient-to-nurse assignments on a hospital unit.\n\n"
                 "Commands:\n");
    for (size_t i = 0; i < ncommands; i++)
        fprintf(out, "  %-9s %s\n", commands[i].name, commands[i].summary);
    fprintf(out, "  %-9s %s\n", "help", "show help for a command");
    fprintf(out,
            "\nOptions: --help, --version\n"
            "Exit codes: 0 success, 1 usage error, 2 bad input, 3 no valid assignment "
            "exists,\n4 internal or solver failure.\n\n%s\n",
            KEEL_CAUTION);
}

/* A help page: the usage, then the caution, as every page keel shows ends. */
static int print_help(const char *usage)
{
    printf("%s\n%s\n", usage, KEEL_CAUTION);
    return fflush(stdout) == 0 && !ferror(stdout) ? 0 : EXIT_INTERNAL;
}

static const command *find_command(const char *name)
{
    for (size_t i = 0; i < ncommands; i++)
        if (strcmp(commands[i].name, name) == 0)
            return &commands[i];
    return NULL;
}

/* Says on stderr that there is no command name, with a "did you mean" when
 * name looks like a typo of one (help included); true when it suggested one. */
static bool say_no_command(const char *who, const char *name)
{
    const char *names[sizeof commands / sizeof commands[0] + 1];
    for (size_t i = 0; i < ncommands; i++)
        names[i] = commands[i].name;
    names[ncommands] = "help";
    const char *suggestion = keel_error_suggest(name, names, ncommands + 1);
    if (suggestion)
        fprintf(stderr, "%s: no command '%s'; did you mean '%s'?\n", who, name, suggestion);
    else
        fprintf(stderr, "%s: no command '%s'\n", who, name);
    return suggestion != NULL;
}

static int usage_error(const command *cmd, const char *fmt, const char *arg)
{
    fprintf(stderr, "keel %s: ", cmd->name);
    fprintf(stderr, fmt, arg);
    fprintf(stderr, "\nTry 'keel help %s'.\n", cmd->name);
    return EXIT_USAGE;
}

static void print_problems(const keel_error *err)
{
    for (size_t i = 0; i < err->nproblems; i++) {
        const keel_problem *p = &err->problems[i];
        char line[1024];
        keel_problem_format(p, line, sizeof line);
        fprintf(stderr, "%s%s\n", p->file ? "" : "keel: ", line);
    }
    if (err->nproblems == 0 && err->status)
        fprintf(stderr, "keel: %s\n", keel_status_string(err->status));
}

static int exit_code(keel_status status)
{
    switch (status) {
    case KEEL_OK:
        return 0;
    case KEEL_ERR_USAGE:
        return EXIT_USAGE;
    case KEEL_ERR_INPUT:
    case KEEL_ERR_IO:
        return EXIT_INPUT;
    case KEEL_ERR_NOMEM:
    case KEEL_ERR_SOLVER:
        return EXIT_INTERNAL;
    }
    return EXIT_INTERNAL;
}

/* The value of an option: "--opt=value", or the next argument. */
static const char *option_value(int argc, char **argv, int *i, const char *arg, size_t len)
{
    if (arg[len] == '=')
        return arg + len + 1;
    if (*i + 1 < argc)
        return argv[++*i];
    return NULL;
}

static bool matches(const char *arg, const char *shrt, const char *lng, size_t *len)
{
    size_t l = strlen(lng);
    if (strcmp(arg, shrt) == 0) {
        *len = strlen(shrt);
        return true;
    }
    if (strncmp(arg, lng, l) == 0 && (arg[l] == '\0' || arg[l] == '=')) {
        *len = l;
        return true;
    }
    return false;
}

static int parse_time_limit(const command *cmd, const char *text, long *ms)
{
    char *end;
    errno = 0;
    double secs = strtod(text, &end);
    if (errno || end == text || *end || !(secs > 0) || secs > 86400)
        return usage_error(cmd,
                           "--time-limit: '%s' is not a number of seconds between 0 and "
                           "86400",
                           text);
    *ms = (long)(secs * 1000.0 + 0.5);
    if (*ms < 1)
        *ms = 1;
    return 0;
}

/* --max-handoffs and --handoffs: a whole number 0..MOST_HANDOFFS; --min-gain:
 * utilisation points 0..1; --at: a time of day HH:MM. */
#define MOST_HANDOFFS 20

static int parse_rebalance_number(const command *cmd, const char *arg, const char *text,
                                  options *opt)
{
    char *end;
    errno = 0;
    if (strncmp(arg, "--at", 4) == 0) {
        int h = -1, mi = -1;
        char tail;
        if (strlen(text) != 5 || sscanf(text, "%2d:%2d%c", &h, &mi, &tail) != 2 || h < 0 ||
            h > 23 || mi < 0 || mi > 59)
            return usage_error(cmd, "--at: '%s' is not a time of day HH:MM", text);
        opt->at_minute = h * 60 + mi;
        return 0;
    }
    if (strncmp(arg, "--min-gain", 10) == 0) {
        double gain = strtod(text, &end);
        if (errno || end == text || *end || !(gain >= 0) || gain > 1)
            return usage_error(cmd, "--min-gain: '%s' is not a number of utilisation points "
                                    "between 0 and 1", text);
        opt->min_gain = gain;
        return 0;
    }
    long k = strtol(text, &end, 10);
    if (errno || end == text || *end || k < 0 || k > MOST_HANDOFFS)
        return usage_error(cmd,
                           strncmp(arg, "--max-handoffs", 14) == 0
                               ? "--max-handoffs: '%s' is not a whole number from 0 to 20"
                               : "--handoffs: '%s' is not a whole number from 0 to 20",
                           text);
    if (strncmp(arg, "--max-handoffs", 14) == 0)
        opt->max_handoffs = (int)k;
    else
        opt->handoffs = (int)k;
    return 0;
}

static int parse_args(const command *cmd, int argc, char **argv, options *opt, bool *help)
{
    *opt = (options){
        .format = "text", .max_handoffs = -1, .handoffs = -1, .min_gain = -1.0, .at_minute = -1};
    for (int i = 0; i < argc; i++) {
        const char *arg = argv[i], *value;
        size_t len;
        if (strcmp(arg, "-h") == 0 || strcmp(arg, "--help") == 0) {
            *help = true;
            return 0;
        }
        bool solving = cmd->run == run_assign || cmd->run == run_check || cmd->run == run_rebalance;
        bool writing = cmd->run == run_new || cmd->run == run_import;
        if (matches(arg, "-o", "--output", &len) ||
            (solving &&
             (matches(arg, "-f", "--format", &len) || matches(arg, "-t", "--time-limit", &len))) ||
            (cmd->run == run_assign && matches(arg, "-m", "--method", &len))) {
            value = option_value(argc, argv, &i, arg, len);
            if (!value)
                return usage_error(cmd, "%s needs a value", arg);
            char which = arg[1] == '-' ? arg[2] : arg[1];
            if (which == 'f')
                opt->format = value;
            else if (which == 'o')
                opt->output = value;
            else if (which == 'm')
                opt->method = value;
            else if (parse_time_limit(cmd, value, &opt->time_limit_ms))
                return EXIT_USAGE;
            continue;
        }
        const char **slot = NULL;
        if (writing && matches(arg, "--type", "--type", &len))
            slot = &opt->type;
        else if (writing && matches(arg, "--table", "--table", &len))
            slot = &opt->table;
        else if (writing && matches(arg, "--unit", "--unit", &len))
            slot = &opt->unit;
        else if (writing && matches(arg, "--shift", "--shift", &len))
            slot = &opt->shift;
        else if (cmd->run == run_import && matches(arg, "--roster", "--roster", &len))
            slot = &opt->base;
        else if (cmd->run == run_import && matches(arg, "--map", "--map", &len))
            slot = &opt->map;
        if (slot) {
            *slot = option_value(argc, argv, &i, arg, len);
            if (!*slot)
                return usage_error(cmd, "%s needs a value", arg);
            continue;
        }
        if (cmd->run == run_rebalance &&
            (matches(arg, "--max-handoffs", "--max-handoffs", &len) ||
             matches(arg, "--handoffs", "--handoffs", &len) ||
             matches(arg, "--min-gain", "--min-gain", &len) ||
             matches(arg, "--at", "--at", &len))) {
            value = option_value(argc, argv, &i, arg, len);
            if (!value)
                return usage_error(cmd, "%s needs a value", arg);
            if (parse_rebalance_number(cmd, arg, value, opt))
                return EXIT_USAGE;
            continue;
        }
        if (cmd->run == run_assign && (strcmp(arg, "-e") == 0 || strcmp(arg, "--explain") == 0)) {
            opt->explain = true;
            continue;
        }
        if (cmd->run == run_assign && strcmp(arg, "--best-effort") == 0) {
            opt->best_effort = true;
            continue;
        }
        if (arg[0] == '-' && arg[1] != '\0')
            return usage_error(cmd, "unknown option '%s'", arg);
        if (cmd->run == run_new)
            return usage_error(cmd, "takes no file; '%s' is one too many", arg);
        if (opt->roster)
            return usage_error(cmd, "one file at a time; '%s' is one too many", arg);
        opt->roster = arg;
    }
    if (!opt->roster && cmd->run == run_import)
        return usage_error(cmd, "%s", "which census? Give the census CSV file");
    if (!opt->roster && cmd->run != run_new)
        return usage_error(cmd, "%s", "which roster? Give the roster file");
    if (cmd->run == run_import && opt->base && (opt->type || opt->table || opt->unit || opt->shift))
        return usage_error(cmd, "%s",
                           "--type, --table, --unit and --shift are for a new roster; with "
                           "--roster, the base roster gives them");
    return 0;
}

/* Everything one run holds; released by state_fini(). */
/* How many of the next unplanned admissions the reports place in order. */
#define NEXT_ADMISSIONS 3

typedef struct state {
    keel_error err;
    keel_roster *roster;
    keel_workload *workload;
    keel_solution *solution;
    keel_metrics *metrics;
    keel_staffing staffing;
    keel_explanation *explanation;
    keel_course *course;
    int *plan;
    keel_findings violations;
} state;

static void state_fini(state *s)
{
    keel_findings_fini(&s->violations);
    keel_explanation_free(s->explanation);
    keel_course_free(s->course);
    free(s->plan);
    keel_metrics_free(s->metrics);
    keel_solution_free(s->solution);
    keel_workload_free(s->workload);
    keel_roster_free(s->roster);
    keel_error_fini(&s->err);
}

/* Loads the roster and derives its workload and staffing; a roster without
 * patients is loaded only (has_patients() says so). */
static keel_status load(state *s, const options *opt)
{
    keel_status rc = keel_roster_load(opt->roster, &s->roster, &s->err);
    if (!rc && s->roster->npatients == 0)
        return KEEL_OK;
    if (!rc)
        rc = keel_workload_compute(s->roster, &s->workload, &s->err);
    if (!rc)
        rc = keel_staffing_compute(s->roster, s->workload, &s->staffing, &s->err);
    return rc;
}

static bool to_file(const options *opt)
{
    return opt->output && strcmp(opt->output, "-") != 0;
}

/* A roster without patients is a unit's roster before keel import fills it:
 * valid, but with nothing to assign or score.  Says so on stderr and
 * returns false; true when the roster has patients. */
static bool has_patients(const char *command, const options *opt, const keel_roster *r)
{
    if (r->npatients > 0)
        return true;
    fprintf(stderr,
            "keel %s: %s: the roster is valid but has no patients, so there is nothing to %s; "
            "keel import CENSUS.csv --roster %s adds a census's patients\n",
            command, opt->roster, strcmp(command, "assign") == 0 ? "assign" : "score",
            opt->roster);
    if (to_file(opt))
        fprintf(stderr, "keel %s: nothing written to %s\n", command, opt->output);
    return false;
}

static int write_report(const options *opt, const keel_report *rep)
{
    cli_output out;
    keel_error err;
    keel_error_init(&err);
    int code = cli_output_open(&out, opt->output, opt->roster);
    if (code)
        return code;
    keel_status rc = keel_report_write(opt->format, rep, out.stream, &err);
    if (rc)
        print_problems(&err);
    keel_error_fini(&err);
    bool written = cli_output_close(&out, rc == KEEL_OK);
    if (rc)
        return exit_code(rc);
    return written ? 0 : EXIT_INTERNAL;
}

static bool known_format(const char *format)
{
    for (size_t i = 0; i < keel_report_nformats(); i++)
        if (strcmp(keel_report_format_name(i), format) == 0)
            return true;
    return false;
}

static bool known_method(const char *method)
{
    for (size_t i = 0; i < keel_solve_nmethods(); i++)
        if (strcmp(keel_solve_method_name(i), method) == 0)
            return true;
    return false;
}

static int run_assign(const options *opt)
{
    state s = {0};
    keel_error_init(&s.err);
    keel_solve_options so = {.method = opt->method,
                             .time_limit_ms = opt->time_limit_ms,
                             .best_effort = opt->best_effort};
    if (cli_output_clobbers(opt->output, opt->roster))
        return EXIT_USAGE;
    keel_status rc = load(&s, opt);
    if (!rc && !has_patients("assign", opt, s.roster)) {
        state_fini(&s);
        return EXIT_INPUT;
    }
    if (!rc)
        rc = keel_solve(s.roster, s.workload, &so, &s.solution, &s.err);
    if (!rc)
        rc = keel_metrics_compute(s.workload, s.solution->nurse_of, &s.metrics, &s.err);
    if (!rc && opt->explain && s.solution->status != KEEL_SOLVE_INFEASIBLE)
        rc = keel_explain(s.roster, s.workload, s.solution->nurse_of, &s.explanation, &s.err);
    if (!rc && s.solution->best_effort)
        rc = keel_plan_check(s.roster, s.workload, s.solution->nurse_of, &s.violations, &s.err);
    if (!rc && (s.solution->status != KEEL_SOLVE_INFEASIBLE || s.solution->best_effort))
        rc = keel_course_compute(s.roster, s.workload, s.solution->nurse_of, NEXT_ADMISSIONS,
                                 &s.course, &s.err);
    if (rc) {
        print_problems(&s.err);
        state_fini(&s);
        return exit_code(rc);
    }
    keel_report rep = {.kind = KEEL_REPORT_ASSIGN,
                       .roster = s.roster,
                       .workload = s.workload,
                       .nurse_of = s.solution->nurse_of,
                       .metrics = s.metrics,
                       .solution = s.solution,
                       .staffing = &s.staffing,
                       .explanation = s.explanation,
                       .course = s.course,
                       .violations = s.solution->best_effort ? &s.violations : NULL};
    bool infeasible = s.solution->status == KEEL_SOLVE_INFEASIBLE;
    bool best_effort = infeasible && s.solution->best_effort;
    if (infeasible) {
        fprintf(stderr, "keel assign: %s: no valid assignment exists\n", opt->roster);
        for (size_t i = 0; i < s.solution->diagnoses.n; i++)
            fprintf(stderr, "  [%s] %s\n", s.solution->diagnoses.items[i].rule,
                    s.solution->diagnoses.items[i].message);
        if (!best_effort)
            rep.nurse_of = NULL;
    }
    /* A file from -o is what gets posted: with no valid assignment it is
     * only ever a labelled best-effort plan, else nothing (the old file
     * stays as it was). */
    int code = 0;
    if (infeasible && !best_effort && to_file(opt))
        fprintf(stderr, "keel assign: no plan written to %s: no valid assignment exists\n",
                opt->output);
    else
        code = write_report(opt, &rep);
    if (best_effort && !code)
        fprintf(stderr,
                "keel assign: %s holds a BEST-EFFORT plan, not an assignment: it breaks %zu "
                "rule%s; tell the house supervisor before using any of it\n",
                to_file(opt) ? opt->output : "the report", s.violations.n,
                s.violations.n == 1 ? "" : "s");
    if (infeasible)
        fprintf(stderr, "%s\n", KEEL_CAUTION);
    state_fini(&s);
    if (code)
        return code;
    return infeasible ? EXIT_INFEASIBLE : 0;
}

static int run_check(const options *opt)
{
    state s = {0};
    keel_error_init(&s.err);
    keel_solve_options so = {.time_limit_ms = opt->time_limit_ms};
    keel_status rc = load(&s, opt);
    bool complete = false, partial = false;
    if (!rc && !has_patients("check", opt, s.roster)) {
        state_fini(&s);
        return 0;
    }
    if (!rc) {
        s.plan = calloc(keel_workload_nparts(s.workload) ? keel_workload_nparts(s.workload) : 1, sizeof *s.plan);
        if (!s.plan)
            rc = keel_error_add(&s.err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    if (!rc) {
        complete = keel_plan_from_roster(s.roster, s.workload, s.plan);
        for (size_t q = 0; q < keel_workload_nparts(s.workload); q++)
            partial = partial || s.plan[q] >= 0;
        rc = keel_metrics_compute(s.workload, complete ? s.plan : NULL, &s.metrics, &s.err);
    }
    if (!rc && complete)
        rc = keel_plan_check(s.roster, s.workload, s.plan, &s.violations, &s.err);
    if (!rc && complete)
        rc = keel_course_compute(s.roster, s.workload, s.plan, NEXT_ADMISSIONS, &s.course, &s.err);
    if (!rc)
        rc = keel_solve(s.roster, s.workload, &so, &s.solution, &s.err);
    if (rc) {
        print_problems(&s.err);
        state_fini(&s);
        return exit_code(rc);
    }
    if (partial && !complete)
        fprintf(stderr,
                "keel check: %s: some patients have no nurse yet; a plan is scored when "
                "every patient has one\n",
                opt->roster);
    keel_report rep = {.kind = KEEL_REPORT_CHECK,
                       .roster = s.roster,
                       .workload = s.workload,
                       .nurse_of = complete ? s.plan : NULL,
                       .metrics = s.metrics,
                       .solution = s.solution,
                       .violations = &s.violations,
                       .course = s.course,
                       .staffing = &s.staffing};
    bool infeasible = s.solution->status == KEEL_SOLVE_INFEASIBLE;
    int code = write_report(opt, &rep);
    state_fini(&s);
    if (code)
        return code;
    return infeasible ? EXIT_INFEASIBLE : 0;
}

/* The rebalance's report: each option's figures, the option to show. */
typedef struct rebalance_out {
    const keel_rebalance *rb;
    keel_metrics **metrics; /* [noptions] */
    size_t chosen;
    const keel_roster *roster;
    const keel_preview *preview;
} rebalance_out;

static keel_status write_rebalance(const options *opt, void *ctx, FILE *out, keel_error *err)
{
    const rebalance_out *ro = ctx;
    keel_rebalance_report rep = {.roster = ro->roster,
                                 .rebalance = ro->rb,
                                 .metrics = (const keel_metrics *const *)ro->metrics,
                                 .chosen = ro->chosen,
                                 .preview = ro->preview};
    return keel_report_rebalance_write(opt->format, &rep, out, err);
}

static int write_out(const options *opt, const char *input,
                     keel_status (*fn)(const options *opt, void *ctx, FILE *out, keel_error *err),
                     void *ctx);

/* No option of the frontier has a plan: says why on stderr.  Without a
 * budget (keel assign's solve of the same roster), either no assignment
 * keeps the rules (its diagnosis), or one does with more hand-offs. */
static keel_status why_no_plan(const options *opt, const keel_rebalance *rb, keel_error *err)
{
    keel_workload *w = NULL;
    keel_solution *s = NULL;
    keel_solve_options so = {.time_limit_ms = opt->time_limit_ms};
    keel_status rc = keel_workload_compute(rb->roster, &w, err);
    if (!rc)
        rc = keel_solve(rb->roster, w, &so, &s, err);
    if (!rc && s->status == KEEL_SOLVE_INFEASIBLE) {
        fprintf(stderr, "keel rebalance: %s: no valid assignment exists, whatever the hand-offs\n",
                opt->roster);
        for (size_t i = 0; i < s->diagnoses.n; i++)
            fprintf(stderr, "  [%s] %s\n", s->diagnoses.items[i].rule,
                    s->diagnoses.items[i].message);
    } else if (!rc) {
        fprintf(stderr,
                "keel rebalance: %s: no plan keeps every rule with at most %zu hand-off%s; "
                "one with more exists (try a larger --max-handoffs)\n",
                opt->roster, rb->noptions - 1, rb->noptions == 2 ? "" : "s");
    }
    keel_solution_free(s);
    keel_workload_free(w);
    return rc;
}

static int run_rebalance(const options *opt)
{
    keel_error err;
    keel_error_init(&err);
    keel_roster *roster = NULL;
    keel_rebalance *rb = NULL;
    keel_metrics **metrics = NULL;
    keel_preview *preview = NULL;
    int most = opt->max_handoffs >= 0 ? opt->max_handoffs : KEEL_REBALANCE_MAX_HANDOFFS;
    if (opt->handoffs > most)
        most = opt->handoffs; /* the frontier reaches the option asked for */
    keel_rebalance_options ro = {
        .time_limit_ms = opt->time_limit_ms,
        .max_handoffs = most,
        .min_gain = opt->min_gain,
        .at = opt->at_minute >= 0,
        .at_minute = opt->at_minute};
    if (cli_output_clobbers(opt->output, opt->roster))
        return EXIT_USAGE;
    keel_status rc = keel_roster_load(opt->roster, &roster, &err);
    if (!rc && !has_patients("rebalance", opt, roster)) {
        keel_roster_free(roster);
        keel_error_fini(&err);
        return EXIT_INPUT;
    }
    if (!rc)
        rc = keel_rebalance_run(roster, &ro, &rb, &err);
    if (!rc && !(metrics = calloc(rb->noptions, sizeof *metrics)))
        rc = keel_error_add(&err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    for (size_t k = 0; !rc && k < rb->noptions; k++)
        if (rb->options[k].found)
            rc = keel_metrics_compute(rb->workload, rb->options[k].solution->nurse_of,
                                      &metrics[k], &err);
    int code = 0;
    if (rc) {
        print_problems(&err);
        code = exit_code(rc);
        goto out;
    }
    size_t chosen = opt->handoffs >= 0 ? (size_t)opt->handoffs
                    : rb->recommended >= 0 ? (size_t)rb->recommended
                                           : 0;
    bool planless = !rb->options[chosen].found;
    if (rb->recommended < 0 && (rc = why_no_plan(opt, rb, &err))) {
        print_problems(&err);
        code = exit_code(rc);
        goto out;
    }
    if (!planless &&
        (rc = keel_preview_compute(rb->roster, rb->workload, rb->options[chosen].solution->nurse_of,
                                   &preview, &err))) {
        print_problems(&err);
        code = exit_code(rc);
        goto out;
    }
    if (planless && rb->recommended >= 0)
        fprintf(stderr, "keel rebalance: %s: option %zu has no plan that keeps every rule\n",
                opt->roster, chosen);
    rebalance_out out_ctx = {
        .rb = rb, .metrics = metrics, .chosen = chosen, .roster = rb->roster, .preview = preview};
    if (planless && (to_file(opt) || strcmp(opt->format, "yaml") == 0))
        fprintf(stderr, "keel rebalance: no plan written\n");
    else
        code = write_out(opt, opt->roster, write_rebalance, &out_ctx);
    if (planless)
        fprintf(stderr, "%s\n", KEEL_CAUTION);
    if (!code && planless)
        code = EXIT_INFEASIBLE;
out:
    for (size_t k = 0; metrics && k < rb->noptions; k++)
        keel_metrics_free(metrics[k]);
    free(metrics);
    keel_preview_free(preview);
    keel_rebalance_free(rb);
    keel_roster_free(roster);
    keel_error_fini(&err);
    return code;
}

/* Writes through fn to -o or stdout, atomically; never over input. */
static int write_out(const options *opt, const char *input,
                     keel_status (*fn)(const options *opt, void *ctx, FILE *out, keel_error *err),
                     void *ctx)
{
    cli_output out;
    keel_error err;
    keel_error_init(&err);
    int code = cli_output_open(&out, opt->output, input);
    if (code)
        return code;
    keel_status rc = fn(opt, ctx, out.stream, &err);
    if (rc)
        print_problems(&err);
    keel_error_fini(&err);
    bool written = cli_output_close(&out, rc == KEEL_OK);
    if (rc)
        return exit_code(rc);
    return written ? 0 : EXIT_INTERNAL;
}

static keel_status write_template(const options *opt, void *ctx, FILE *out, keel_error *err)
{
    keel_template_options t = {
        .unit_type = opt->type, .table = opt->table, .unit_name = opt->unit, .shift = opt->shift};
    return keel_template_write(&t, ctx, out, err);
}

static int run_new(const options *opt)
{
    return write_out(opt, opt->base, write_template, NULL);
}

static keel_status write_joined(const options *opt, void *ctx, FILE *out, keel_error *err)
{
    (void)opt;
    keel_report rep = {.kind = KEEL_REPORT_CHECK, .roster = ctx};
    return keel_report_write("yaml", &rep, out, err);
}

static int run_import(const options *opt)
{
    keel_error err;
    keel_error_init(&err);
    keel_census *census = NULL;
    keel_roster *base = NULL;
    /* The base roster first, so that each census row is checked against its
     * scales with the row's other problems: all of both files in one run. */
    keel_status rc_base = opt->base ? keel_roster_load(opt->base, &base, &err) : KEEL_OK;
    keel_status rc = keel_census_load_for(opt->roster, opt->map, base, &census, &err);
    if (!rc)
        rc = rc_base;
    if (!rc && base)
        rc = keel_census_into_roster(census, base, &err);
    int code = 0;
    if (rc) {
        print_problems(&err);
        code = exit_code(rc);
    } else if (cli_output_clobbers(opt->output, opt->roster)) {
        code = EXIT_USAGE;
    } else if (base) {
        code = write_out(opt, opt->base, write_joined, base);
    } else {
        code = write_out(opt, opt->roster, write_template, census);
    }
    keel_error_fini(&err);
    keel_roster_free(base);
    keel_census_free(census);
    return code;
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        print_usage(stderr);
        return EXIT_USAGE;
    }
    const char *name = argv[1];
    if (strcmp(name, "--help") == 0 || strcmp(name, "-h") == 0) {
        print_usage(stdout);
        return fflush(stdout) == 0 && !ferror(stdout) ? 0 : EXIT_INTERNAL;
    }
    if (strcmp(name, "--version") == 0) {
        printf("keel %s\n", keel_version());
        return fflush(stdout) == 0 && !ferror(stdout) ? 0 : EXIT_INTERNAL;
    }
    if (strcmp(name, "help") == 0) {
        const char *topic = argc > 2 ? argv[2] : NULL;
        if (topic && (strcmp(topic, "help") == 0 || strcmp(topic, "--help") == 0 ||
                      strcmp(topic, "-h") == 0))
            return print_help(help_usage);
        const command *cmd = topic ? find_command(topic) : NULL;
        if (topic && !cmd) {
            say_no_command("keel help", topic);
            return EXIT_USAGE;
        }
        if (cmd)
            return print_help(cmd->usage);
        print_usage(stdout);
        return fflush(stdout) == 0 && !ferror(stdout) ? 0 : EXIT_INTERNAL;
    }
    const command *cmd = find_command(name);
    if (!cmd) {
        if (say_no_command("keel", name))
            fputs("Try 'keel --help'.\n", stderr);
        else
            print_usage(stderr);
        return EXIT_USAGE;
    }
    options opt;
    bool help = false;
    int code = parse_args(cmd, argc - 2, argv + 2, &opt, &help);
    if (code)
        return code;
    if (help)
        return print_help(cmd->usage);
    if (!known_format(opt.format) || (cmd->run == run_check && strcmp(opt.format, "yaml") == 0))
        return usage_error(cmd, "unknown format '%s'", opt.format);
    if (opt.explain && strcmp(opt.format, "yaml") == 0)
        return usage_error(cmd, "%s",
                           "--explain does not go with --format yaml: the yaml plan is a roster, "
                           "with no place for reasons; use --format text or json");
    if (opt.method && !known_method(opt.method))
        return usage_error(cmd, "unknown method '%s'; expected ilp or greedy", opt.method);
    return cmd->run(&opt);
}
