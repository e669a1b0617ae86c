/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/keel.h - the whole public API of libkeel in one include.
 *
 * Threads.  libkeel keeps no global state that its calls change: every
 * function works only on the objects passed to it.  Calls on different
 * objects may run in several threads at once (for example, one roster
 * loaded, solved and reported per thread); calls that share an object may
 * run at once only when all of them take it as const (several solves of one
 * keel_workload, say).  The error-reporting and findings objects are
 * per call, never shared.
 *
 * The integer-programming solver (GLPK) runs on a thread of keel's own for
 * each solve, with its own GLPK environment that is freed when the solve
 * ends, after a GLPK failure too: keel never touches the calling thread's
 * GLPK environment or terminal setting, so a program may use GLPK itself
 * alongside keel.  This needs a GLPK built with thread-local storage
 * (glp_config("TLS"), as Debian's is); with one built without it, keel's
 * solves take turns in one shared environment, still correct but one at a
 * time, and a GLPK failure frees that shared environment.  GLPK's cover
 * cuts keep working values in static storage, so the branch and bound of
 * solves that use them takes turns between threads (the time waited counts
 * against the waiting solve's limit); the rest of each solve runs at once.
 * A program that calls GLPK's own branch and bound with cover cuts on, in
 * another thread while keel solves, races with keel there.
 */
#ifndef KEEL_KEEL_H
#define KEEL_KEEL_H

#include "keel/api.h"

#include "keel/audit.h"
#include "keel/census.h"
#include "keel/course.h"
#include "keel/error.h"
#include "keel/explain.h"
#include "keel/finding.h"
#include "keel/law.h"
#include "keel/metrics.h"
#include "keel/nas.h"
#include "keel/plan.h"
#include "keel/preview.h"
#include "keel/rebalance.h"
#include "keel/report.h"
#include "keel/roster.h"
#include "keel/solve.h"
#include "keel/staffing.h"
#include "keel/template.h"
#include "keel/verdict.h"
#include "keel/workload.h"

/* The library's version, "MAJOR.MINOR.PATCH". */
KEEL_API const char *keel_version(void);

#endif
