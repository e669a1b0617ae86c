/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * main.c - the keel command.  Thin: parses arguments, calls the library,
 * prints problems, maps statuses to exit codes and checks that the output
 * was written.
 *
 * Exit codes: 0 success; 1 usage error; 2 bad input; 3 no valid assignment
 * exists; 4 internal or solver failure (including a failed write); 5 keel
 * audit wrote its report and some shift broke a rule.
 */
#include <errno.h>
#include <stdio.h>
#include <unistd.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "keel/keel.h"
#include "output.h"

enum {
    EXIT_USAGE = 1,
    EXIT_INPUT = 2,
    EXIT_INFEASIBLE = 3,
    EXIT_INTERNAL = 4,
    EXIT_AUDIT_BROKEN = 5, /* keel audit: the report was written and some shift broke a rule */
};

typedef struct options {
    const char *roster;
    const char *format;
    const char *output;
    const char *method;
    long time_limit_ms;
    bool explain;      /* --explain: a reason per patient */
    bool best_effort;  /* --best-effort: a labelled plan even when no valid one exists */
    bool names;        /* --names: patients' names on the html sheet (kept private) */
    bool deidentify;   /* --deidentify: no patient's name in any format */
    const char *type;  /* new, import: --type */
    const char *table; /* new, import: --table */
    const char *unit;  /* new, import: --unit */
    const char *shift; /* new, import: --shift */
    const char *base;  /* import: --roster, the roster the census joins */
    const char *map;   /* import: --map field=Header,... */
    const char **files; /* audit: every file named; assign: --history's (owned by main) */
    size_t nfiles;
    bool no_best;       /* audit: --no-best */
    bool merge;         /* audit: --merge, the files are partial results */
    long jobs;          /* audit: --jobs; 0: the number of cores */
    long min_shifts;    /* audit: --min-shifts; 0: the default */
    size_t shard, nshards; /* audit: --shard I/N; 0: no shard */
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
static int run_audit(const options *opt);
static int run_rebalance(const options *opt);

static const command commands[] = {
    {"assign", "balance the roster's patients across its nurses",
     "usage: keel assign ROSTER [--format text|yaml|json|html|csv|csv-nurses]\n"
     "                   [--method ilp|greedy] [--time-limit SECONDS] [--explain]\n"
     "                   [--best-effort] [--names | --deidentify] [-o FILE]\n"
     "                   [--history FILE...]\n"
     "\n"
     "Divides the roster's patients among its nurses so that the heaviest utilisation\n"
     "(load / capacity) is as low as possible, then lifts the lightest one, and reports\n"
     "each nurse's load, the imbalance, the proven bound and the gap.\n"
     "\n"
     "  -f, --format FMT       text (default), yaml (the roster with each patient's\n"
     "                         nurse filled in), json, html (the sheet to post: one\n"
     "                         page, patients by id, bed and room), csv (a row per\n"
     "                         patient) or csv-nurses (a row per nurse)\n"
     "  -m, --method NAME      ilp (default: exact search with GLPK) or greedy\n"
     "  -t, --time-limit SECS  limit for the whole solve (default 10); on time-out the\n"
     "                         best plan found is kept and reported as not proven\n"
     "  -e, --explain          say why each patient went to its nurse (text and json;\n"
     "                         the yaml plan is a roster and has no place for it)\n"
     "      --best-effort      when no valid assignment exists, also show the plan that\n"
     "                         breaks the fewest rules (by severity), labelled as such;\n"
     "                         the exit code stays 3\n"
     "      --history FILE...  past shifts (rosters with nurse: filled, as keel audit\n"
     "                         reads them; every file up to the next option): within\n"
     "                         the balance tolerance, heavier loads go to the nurses\n"
     "                         whose past utilisation was lower (docs/model.md)\n"
     "      --names            put patients' names on the html sheet (a sheet that\n"
     "                         stays private; the default shows id, bed and room)\n"
     "      --deidentify       leave patients' names out of every format (the yaml\n"
     "                         plan drops `name`)\n"
     "  -o, --output FILE      write to FILE (replaced atomically; never the roster).\n"
     "                         When no valid assignment exists, nothing is written to\n"
     "                         FILE unless --best-effort gives a labelled plan\n",
     run_assign},
    {"check", "validate a roster, show its workload, score its own plan",
     "usage: keel check ROSTER [--format text|json|html|csv|csv-nurses]\n"
     "                  [--time-limit SECONDS] [--names] [-o FILE]\n"
     "\n"
     "Validates the roster and shows the workload: care minutes per patient, capacity\n"
     "per nurse, totals and nurses needed at full utilisation.  When every patient\n"
     "already has a nurse, scores that plan: loads, imbalance, every rule it breaks,\n"
     "and the best heaviest utilisation that was possible.\n"
     "\n"
     "  -f, --format FMT       text (default), json, html (the plan as a sheet),\n"
     "                         csv (a row per patient) or csv-nurses (a row per nurse)\n"
     "  -t, --time-limit SECS  limit for finding the best possible (default 10)\n"
     "      --names            put patients' names on the html sheet (kept private)\n"
     "  -o, --output FILE      write to FILE (replaced atomically; never the roster)\n",
     run_check},
    {"rebalance", "fold in what changed mid-shift with the fewest hand-offs",
     "usage: keel rebalance ROSTER [--format text|yaml|json|html] [--at HH:MM]\n"
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
     "                         json (every option), yaml (the chosen option as the\n"
     "                         updated roster, which keel rebalance and keel check read)\n"
     "                         or html (the frontier as a chart, the moves and the\n"
     "                         chosen option's sheet to post)\n"
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
    {"audit", "look back at past shifts: rules broken, balance, who got the heaviest loads",
     "usage: keel audit FILE... [--format FMT] [--no-best] [--time-limit SECONDS]\n"
     "                  [--jobs N] [--min-shifts N] [--shard I/N] [-o FILE]\n"
     "       keel audit --merge PARTIAL... [--format FMT] [--min-shifts N] [-o FILE]\n"
     "\n"
     "Reads past shifts: rosters with each patient's nurse filled in, one or more per\n"
     "file (a YAML stream of documents).  Per shift: loads, utilisation, the imbalance,\n"
     "every rule broken, and the best heaviest utilisation the same rules allowed.  Per\n"
     "nurse over the period: shifts, mean and worst utilisation, and how often she had\n"
     "the heaviest load (and the most high-acuity patients, isolation patients, zones)\n"
     "against chance, with exact tail probabilities adjusted by Holm's procedure.\n"
     "These figures describe the assignments given, never a nurse's performance.\n"
     "\n"
     "  -f, --format FMT       text (default), json, html (a document with a chart of\n"
     "                         each nurse's heaviest loads against chance), csv (a row\n"
     "                         per shift),\n"
     "                         csv-nurse-shifts, csv-nurses, csv-nurse-groups or\n"
     "                         csv-violations\n"
     "      --no-best          do not solve for the best possible of each shift\n"
     "  -t, --time-limit SECS  limit for each shift's best-possible solve (default 10)\n"
     "  -j, --jobs N           solve N shifts at once (default: the number of cores)\n"
     "      --min-shifts N     shifts at stake before a nurse may be said to stand out\n"
     "                         (default 20)\n"
     "      --shard I/N        audit only shifts I, I+N, I+2N, ... (1 <= I <= N) and\n"
     "                         write a partial result for --merge\n"
     "      --merge            the files are the partial results of every shard: write\n"
     "                         the report a single run gives, byte for byte\n"
     "  -o, --output FILE      write to FILE (replaced atomically; never an input)\n"
     "\n"
     "Exit 0 when the report is written and no shift broke a rule, 5 when it is written\n"
     "and some shift broke one.\n",
     run_audit},
};

static const size_t ncommands = sizeof commands / sizeof commands[0];

/* keel help's own page: `keel help help`. */
static const char help_usage[] =
    "usage: keel help [COMMAND]\n"
    "\n"
    "Without a command, lists keel's commands, its exit codes and the caution.  With\n"
    "one (assign, check, rebalance, new, import, audit or help), shows that command's\n"
    "usage and every option; 'keel COMMAND --help' shows the same.\n";

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
            "exists,\n4 internal or solver failure, 5 keel audit found rules broken.\n\n%s\n",
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

/* A whole number from 1 to max, or 0 after saying why. */
static long parse_count(const command *cmd, const char *name, const char *text, long max)
{
    char *end;
    errno = 0;
    long v = strtol(text, &end, 10);
    if (errno || end == text || *end || v < 1 || v > max) {
        fprintf(stderr, "keel %s: %s: '%s' is not a whole number from 1 to %ld\nTry 'keel help %s'.\n",
                cmd->name, name, text, max, cmd->name);
        return 0;
    }
    return v;
}

/* keel audit's own options at argv[*i]: 0 when taken, an exit code on a
 * usage error, -1 when the argument is not one of them. */
static int parse_audit_option(const command *cmd, int argc, char **argv, int *i, options *opt)
{
    const char *arg = argv[*i], *value;
    size_t len;
    if (strcmp(arg, "--no-best") == 0) {
        opt->no_best = true;
        return 0;
    }
    if (strcmp(arg, "--merge") == 0) {
        opt->merge = true;
        return 0;
    }
    bool jobs = matches(arg, "-j", "--jobs", &len);
    bool min = !jobs && matches(arg, "--min-shifts", "--min-shifts", &len);
    bool shard = !jobs && !min && matches(arg, "--shard", "--shard", &len);
    if (!jobs && !min && !shard)
        return -1;
    value = option_value(argc, argv, i, arg, len);
    if (!value)
        return usage_error(cmd, "%s needs a value", arg);
    if (jobs)
        return (opt->jobs = parse_count(cmd, "--jobs", value, 1024)) ? 0 : EXIT_USAGE;
    if (min)
        return (opt->min_shifts = parse_count(cmd, "--min-shifts", value, 1000000)) ? 0
                                                                                    : EXIT_USAGE;
    unsigned long part, whole;
    char tail;
    if (sscanf(value, "%lu/%lu%c", &part, &whole, &tail) != 2 || part < 1 || whole < 1 ||
        part > whole || whole > 100000)
        return usage_error(cmd, "--shard: '%s' is not I/N with 1 <= I <= N (e.g. 2/8)", value);
    opt->shard = part;
    opt->nshards = whole;
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
    const char **files = opt->files;
    *opt = (options){.format = "text",
                     .files = files,
                     .max_handoffs = -1,
                     .handoffs = -1,
                     .min_gain = -1.0,
                     .at_minute = -1};
    for (int i = 0; i < argc; i++) {
        const char *arg = argv[i], *value;
        size_t len;
        if (strcmp(arg, "-h") == 0 || strcmp(arg, "--help") == 0) {
            *help = true;
            return 0;
        }
        bool solving = cmd->run == run_assign || cmd->run == run_check || cmd->run == run_audit ||
                       cmd->run == run_rebalance;
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
        if (cmd->run == run_assign && strcmp(arg, "--history") == 0) {
            /* Every file up to the next option. */
            size_t before = opt->nfiles;
            while (i + 1 < argc && !(argv[i + 1][0] == '-' && argv[i + 1][1] != '\0'))
                opt->files[opt->nfiles++] = argv[++i];
            if (opt->nfiles == before)
                return usage_error(cmd, "%s needs a file or more", arg);
            continue;
        }
        if (cmd->run == run_assign && strcmp(arg, "--best-effort") == 0) {
            opt->best_effort = true;
            continue;
        }
        if (solving && strcmp(arg, "--names") == 0) {
            opt->names = true;
            continue;
        }
        if (cmd->run == run_assign && strcmp(arg, "--deidentify") == 0) {
            opt->deidentify = true;
            continue;
        }
        if (cmd->run == run_audit) {
            int code = parse_audit_option(cmd, argc, argv, &i, opt);
            if (code < 0)
                goto file;
            if (code)
                return code;
            continue;
        }
    file:
        if (arg[0] == '-' && arg[1] != '\0')
            return usage_error(cmd, "unknown option '%s'", arg);
        if (cmd->run == run_audit) {
            opt->files[opt->nfiles++] = arg;
            continue;
        }
        if (cmd->run == run_new)
            return usage_error(cmd, "takes no file; '%s' is one too many", arg);
        if (opt->roster)
            return usage_error(cmd, "one file at a time; '%s' is one too many", arg);
        opt->roster = arg;
    }
    if (cmd->run == run_audit && opt->nfiles == 0)
        return usage_error(cmd, "%s",
                           opt->merge ? "which partial results? Give the file of every shard"
                                      : "which shifts? Give one roster file or more");
    if (cmd->run == run_audit && opt->merge && (opt->shard || opt->no_best || opt->jobs))
        return usage_error(cmd, "%s",
                           "--merge takes the shards' partial results as they are; --shard, "
                           "--no-best and --jobs belong to the runs that wrote them");
    if (cmd->run == run_audit)
        return 0;
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

/* Colour for a terminal only, and never with NO_COLOR set (any value). */
static bool colour_wanted(const options *opt)
{
    const char *no = getenv("NO_COLOR");
    return !opt->output && (!no || !*no) && isatty(fileno(stdout));
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
        return rc == KEEL_ERR_IO ? EXIT_INTERNAL : exit_code(rc); /* the output, not the input */
    if (written && strncmp(opt->format, "csv", 3) == 0)
        fprintf(stderr, "%s\n", KEEL_CAUTION); /* a CSV file has no place for it */
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

/* KEEL_SOLVER_MEMORY_MB: GLPK's memory limit per solve, in MiB (keel(1),
 * ENVIRONMENT); 0 (the default, 2048) when unset or not a whole number
 * above 0. */
static int solver_memory(void)
{
    const char *v = getenv("KEEL_SOLVER_MEMORY_MB");
    char *end;
    long mb = v ? strtol(v, &end, 10) : 0;
    return v && *v && !*end && mb > 0 && mb <= 1048576 ? (int)mb : 0;
}

static keel_status history_weights(const options *opt, const keel_roster *r, double **weight,
                                   keel_error *err);

/* keel assign plans the whole shift, so it would re-plan the past that a
 * record (patients[].record, written by keel rebalance --at) fixes: a
 * roster with one is refused, at the first record. */
static keel_status refuse_record(const keel_roster *r, keel_error *err)
{
    for (size_t p = 0; p < r->npatients; p++) {
        const keel_patient *pt = &r->patients[p];
        char key[64];
        if (pt->nrecord == 0)
            continue;
        snprintf(key, sizeof key, "patients[%zu].record", p);
        return keel_error_add(err, KEEL_ERR_INPUT, r->path, pt->record[0].mark.line,
                              pt->record[0].mark.column, key,
                              "keel assign plans the whole shift and would re-plan what the "
                              "record says happened; expected keel rebalance --at HH:MM for the "
                              "rest of the shift, or a roster without record");
    }
    return KEEL_OK;
}

static int run_assign(const options *opt)
{
    state s = {0};
    double *weight = NULL;
    keel_error_init(&s.err);
    keel_solve_options so = {.method = opt->method,
                             .time_limit_ms = opt->time_limit_ms,
                             .best_effort = opt->best_effort,
                             .solver_memory_mb = solver_memory()};
    if (cli_output_clobbers(opt->output, opt->roster))
        return EXIT_USAGE;
    for (size_t f = 0; f < opt->nfiles; f++)
        if (cli_output_clobbers(opt->output, opt->files[f]))
            return EXIT_USAGE;
    keel_status rc = load(&s, opt);
    if (!rc && !has_patients("assign", opt, s.roster)) {
        state_fini(&s);
        return EXIT_INPUT;
    }
    if (!rc)
        rc = refuse_record(s.roster, &s.err);
    if (!rc && opt->nfiles > 0)
        rc = history_weights(opt, s.roster, &weight, &s.err);
    so.history = weight;
    if (!rc)
        rc = keel_solve(s.roster, s.workload, &so, &s.solution, &s.err);
    free(weight);
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
                       .violations = s.solution->best_effort ? &s.violations : NULL,
                       .names = opt->names,
                       .deidentify = opt->deidentify,
                       .colour = colour_wanted(opt)};
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
    keel_solve_options so = {.time_limit_ms = opt->time_limit_ms,
                             .solver_memory_mb = solver_memory()};
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
                       .staffing = &s.staffing,
                       .names = opt->names,
                       .deidentify = opt->deidentify,
                       .colour = colour_wanted(opt)};
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
        return rc == KEEL_ERR_IO ? EXIT_INTERNAL : exit_code(rc); /* the output, not the input */
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

static bool known_audit_format(const char *format)
{
    for (size_t i = 0; i < keel_audit_nformats(); i++)
        if (strcmp(keel_audit_format_name(i), format) == 0)
            return true;
    return false;
}

/* The shifts an audit reads: every document of every file, in order. */
typedef struct audit_input {
    keel_roster **rosters;
    size_t *documents;
    size_t n;
} audit_input;

static void audit_input_fini(audit_input *in)
{
    for (size_t i = 0; i < in->n; i++)
        keel_roster_free(in->rosters[i]);
    free(in->rosters);
    free(in->documents);
}

/* Shifts audited a batch at a time, so that only a batch of rosters (and
 * the file being read) is in memory with the results: enough for every
 * thread to have work. */
enum { BATCH_PER_JOB = 64 };

/* Audits the batch in `in` into *shifts (grown), then frees its rosters. */
static keel_status audit_batch(audit_input *in, const keel_audit_options *ao,
                               keel_audit_shift **shifts, size_t *n, keel_error *err)
{
    keel_audit_shift *grown = realloc(*shifts, (*n + in->n + 1) * sizeof *grown);
    keel_status rc = grown ? KEEL_OK
                           : keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL,
                                            "out of memory");
    if (grown) {
        *shifts = grown;
        rc = keel_audit_shifts_compute(in->rosters, in->documents, in->n, *n, ao, *shifts + *n,
                                       err);
        *n += in->n;
    }
    audit_input_fini(in);
    *in = (audit_input){0};
    return rc;
}

/* Loads every file and audits its shifts, a batch at a time; after a
 * problem, loads the rest only to report theirs too. */
static keel_status audit_files(const options *opt, const keel_audit_options *ao,
                               keel_audit_shift **shifts, size_t *n, keel_error *err)
{
    audit_input in = {0};
    keel_status rc = KEEL_OK;
    for (size_t f = 0; f < opt->nfiles; f++) {
        keel_roster **rs = NULL;
        size_t k = 0;
        keel_status one = keel_roster_load_stream(opt->files[f], &rs, &k, err);
        if (one) {
            rc = rc == KEEL_ERR_NOMEM ? rc : one;
            continue;
        }
        keel_roster **grown = realloc(in.rosters, (in.n + k) * sizeof *grown);
        size_t *docs = grown ? realloc(in.documents, (in.n + k) * sizeof *docs) : NULL;
        if (grown)
            in.rosters = grown;
        if (docs)
            in.documents = docs;
        if (!grown || !docs) {
            for (size_t i = 0; i < k; i++)
                keel_roster_free(rs[i]);
            free(rs);
            audit_input_fini(&in);
            return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        }
        for (size_t i = 0; i < k; i++) {
            in.rosters[in.n] = rs[i];
            in.documents[in.n++] = i + 1;
        }
        free(rs);
        if (rc) {
            audit_input_fini(&in);
            in = (audit_input){0};
        } else if (in.n >= BATCH_PER_JOB * ao->jobs) {
            rc = audit_batch(&in, ao, shifts, n, err);
        }
    }
    if (!rc && in.n)
        rc = audit_batch(&in, ao, shifts, n, err);
    audit_input_fini(&in);
    return rc;
}

/* keel assign --history: audits the history files (no best-possible solve)
 * and gives each nurse of r her weight for fairness forward.  *weight is
 * the caller's to free. */
static keel_status history_weights(const options *opt, const keel_roster *r, double **weight,
                                   keel_error *err)
{
    keel_audit_options ao = {.no_best = true, .jobs = 1};
    keel_audit_shift *shifts = NULL;
    keel_audit *audit = NULL;
    size_t n = 0;
    keel_status rc = audit_files(opt, &ao, &shifts, &n, err);
    if (!rc) {
        rc = keel_audit_summarise(shifts, n, &ao, &audit, err);
        shifts = NULL; /* the audit owns them now */
    }
    for (size_t i = 0; shifts && i < n; i++)
        keel_audit_shift_fini(&shifts[i]);
    free(shifts);
    *weight = rc ? NULL : calloc(r->nnurses ? r->nnurses : 1, sizeof **weight);
    if (!rc && !*weight)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (!rc)
        keel_audit_history_weights(audit, r, *weight);
    keel_audit_free(audit);
    return rc;
}

typedef struct audit_out {
    const keel_audit *audit;          /* the report, or */
    const keel_audit_shift *shifts;   /* a shard's partial result */
    size_t nshifts;
    const keel_audit_options *options;
} audit_out;

static keel_status write_audit(const options *opt, void *ctx, FILE *out, keel_error *err)
{
    const audit_out *a = ctx;
    if (a->audit)
        return keel_audit_write(opt->format, a->audit, out, err);
    return keel_audit_partial_write(a->shifts, a->nshifts, a->options, out, err);
}

static int run_audit(const options *opt)
{
    keel_error err;
    keel_error_init(&err);
    keel_audit_shift *shifts = NULL;
    keel_audit *audit = NULL;
    size_t n = 0;
    long cores = sysconf(_SC_NPROCESSORS_ONLN);
    keel_audit_options ao = {.no_best = opt->no_best,
                             .time_limit_ms = opt->time_limit_ms,
                             .jobs = (size_t)(opt->jobs ? opt->jobs : cores > 0 ? cores : 1),
                             .shard = opt->shard,
                             .nshards = opt->nshards,
                             .min_shifts = (size_t)opt->min_shifts};
    for (size_t f = 0; f < opt->nfiles; f++)
        if (cli_output_clobbers(opt->output, opt->files[f]))
            return EXIT_USAGE;
    keel_status rc;
    if (opt->merge) {
        rc = keel_audit_partial_read((const char *const *)opt->files, opt->nfiles, &shifts, &n, &err);
    } else {
        rc = audit_files(opt, &ao, &shifts, &n, &err);
    }
    int code = 0;
    if (!rc && opt->shard) {
        audit_out a = {.shifts = shifts, .nshifts = n, .options = &ao};
        code = write_out(opt, NULL, write_audit, &a);
    } else if (!rc) {
        rc = keel_audit_summarise(shifts, n, &ao, &audit, &err);
        shifts = NULL; /* the audit owns them now */
    }
    if (rc) {
        print_problems(&err);
        code = exit_code(rc);
    } else if (audit) {
        audit_out a = {.audit = audit};
        code = write_out(opt, NULL, write_audit, &a);
        if (!code && strncmp(opt->format, "csv", 3) == 0)
            fprintf(stderr, "keel audit: %s\n%s\n", KEEL_AUDIT_NOTE, KEEL_CAUTION);
        if (!code && audit->nviolations)
            code = EXIT_AUDIT_BROKEN;
    }
    for (size_t i = 0; shifts && i < n; i++)
        keel_audit_shift_fini(&shifts[i]);
    free(shifts);
    keel_audit_free(audit);
    keel_error_fini(&err);
    return code;
}

/* Checks the options that depend on each other, then runs the command. */
static int run_command(const command *cmd, const options *opt)
{
    bool audit = cmd->run == run_audit;
    bool rebalance_format = strcmp(opt->format, "text") == 0 || strcmp(opt->format, "json") == 0 ||
                            strcmp(opt->format, "yaml") == 0 || strcmp(opt->format, "html") == 0;
    if (audit                           ? !known_audit_format(opt->format)
        : cmd->run == run_rebalance ? !rebalance_format
                                    : !known_format(opt->format) ||
                                          (cmd->run == run_check && strcmp(opt->format, "yaml") == 0))
        return usage_error(cmd, "unknown format '%s'", opt->format);
    if (opt->explain && strcmp(opt->format, "yaml") == 0)
        return usage_error(cmd, "%s",
                           "--explain does not go with --format yaml: the yaml plan is a roster, "
                           "with no place for reasons; use --format text or json");
    if (opt->names && (opt->deidentify || strcmp(opt->format, "html") != 0))
        return usage_error(cmd, "%s", "--names is for the html sheet, and not with --deidentify");
    if (opt->method && !known_method(opt->method))
        return usage_error(cmd, "unknown method '%s'; expected ilp or greedy", opt->method);
    return cmd->run(opt);
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
    options opt = {.files = calloc((size_t)argc, sizeof *opt.files)};
    bool help = false;
    if (!opt.files) {
        fputs("keel: out of memory\n", stderr);
        return EXIT_INTERNAL;
    }
    int code = parse_args(cmd, argc - 2, argv + 2, &opt, &help);
    if (!code && !help)
        code = run_command(cmd, &opt);
    else if (!code)
        code = print_help(cmd->usage);
    free(opt.files);
    return code;
}
