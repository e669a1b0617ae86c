/* SPDX-License-Identifier: GPL-3.0-or-later */
/* output.h - where the CLI writes a report: stdout, or a file replaced atomically. */
#ifndef KEEL_CLI_OUTPUT_H
#define KEEL_CLI_OUTPUT_H

#include <stdbool.h>
#include <stdio.h>

typedef struct cli_output {
    FILE *stream;
    char *path;     /* final name, or NULL for stdout */
    char *tmp_path; /* temporary name written first; NULL when writing straight to path */
} cli_output;

/* Opens the output: stdout when path is NULL or "-"; path itself when it
 * names something that is not a regular file (a device, a pipe, a symbolic
 * link); else a
 * temporary file beside path.  Returns 0, or an exit code after saying why
 * on stderr: 1 for a path that is the same file as the input roster, 4 when
 * the file cannot be created. */
int cli_output_open(cli_output *o, const char *path, const char *input);

/* True (and says so on stderr) when writing path would replace input. */
bool cli_output_clobbers(const char *path, const char *input);

/* Flushes and checks the stream; for a file, flushes it to the disk and
 * renames the temporary file over path (commit true) or removes it (commit
 * false).  Returns false, after saying why on stderr, when anything failed
 * (a full disk, a closed standard output): the old file is left as it was. */
bool cli_output_close(cli_output *o, bool commit);

#endif
