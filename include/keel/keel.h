/* SPDX-License-Identifier: GPL-3.0-or-later */
/* keel/keel.h - the whole public API of libkeel in one include. */
#ifndef KEEL_KEEL_H
#define KEEL_KEEL_H

#include "keel/census.h"
#include "keel/course.h"
#include "keel/error.h"
#include "keel/explain.h"
#include "keel/finding.h"
#include "keel/law.h"
#include "keel/metrics.h"
#include "keel/nas.h"
#include "keel/plan.h"
#include "keel/report.h"
#include "keel/roster.h"
#include "keel/solve.h"
#include "keel/staffing.h"
#include "keel/template.h"
#include "keel/workload.h"

/* The library's version, "MAJOR.MINOR.PATCH". */
const char *keel_version(void);

#endif
