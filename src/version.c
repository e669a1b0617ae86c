/* SPDX-License-Identifier: GPL-3.0-or-later */
/* version.c - the library's version string. */
#include "keel/keel.h"
#include "keel_config.h"

const char *keel_version(void)
{
    return KEEL_VERSION;
}
