/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * output.c - the CLI's output file: written to a temporary name beside the
 * target and renamed into place, so a reader never sees half a report and a
 * failed run leaves the old file as it was.  Never writes over the input.
 * The file gets the mode the umask gives a new file, as if opened directly.
 * A path that names something other than a regular file (a device, a pipe,
 * a symbolic link such as /dev/stdout) is written straight, through the
 * link: replacing it would put a file where the device or link was.
 */
#include "output.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

static bool same_file(const char *a, const char *b)
{
    struct stat sa, sb;
    if (stat(a, &sa) != 0 || stat(b, &sb) != 0)
        return false;
    return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}

bool cli_output_clobbers(const char *path, const char *input)
{
    if (!path || !input || strcmp(path, "-") == 0)
        return false;
    if (strcmp(path, input) != 0 && !same_file(path, input))
        return false;
    fprintf(stderr, "keel: %s: refusing to write over an input file; choose another output file\n",
            path);
    return true;
}

int cli_output_open(cli_output *o, const char *path, const char *input)
{
    *o = (cli_output){.stream = stdout};
    if (!path || strcmp(path, "-") == 0)
        return 0;
    if (input && (strcmp(path, input) == 0 || same_file(path, input))) {
        fprintf(stderr,
                "keel: %s: refusing to write over the input roster; choose another "
                "output file\n",
                path);
        return 1;
    }
    size_t len = strlen(path);
    struct stat st;
    if (lstat(path, &st) == 0 && !S_ISREG(st.st_mode)) {
        o->path = malloc(len + 1);
        o->stream = o->path ? fopen(path, "w") : NULL;
        if (!o->stream) {
            fprintf(stderr, "keel: %s: %s\n", path, o->path ? strerror(errno) : "out of memory");
            free(o->path);
            *o = (cli_output){0};
            return 4;
        }
        memcpy(o->path, path, len + 1);
        return 0;
    }
    o->path = malloc(len + 1);
    o->tmp_path = malloc(len + sizeof ".tmp-XXXXXX");
    if (!o->path || !o->tmp_path) {
        fprintf(stderr, "keel: out of memory\n");
        goto fail;
    }
    memcpy(o->path, path, len + 1);
    memcpy(o->tmp_path, path, len);
    memcpy(o->tmp_path + len, ".tmp-XXXXXX", sizeof ".tmp-XXXXXX");
    int fd = mkstemp(o->tmp_path);
    if (fd < 0) {
        fprintf(stderr, "keel: %s: cannot create a temporary file beside it: %s\n", path,
                strerror(errno));
        goto fail;
    }
    /* mkstemp() makes the file readable by its owner only; a posted plan is
     * for the unit's other accounts too, so it gets the mode any new file
     * gets: 0666 less the umask. */
    mode_t mask = umask(0);
    umask(mask);
    if (fchmod(fd, 0666 & ~mask) != 0) {
        fprintf(stderr, "keel: %s: %s\n", o->tmp_path, strerror(errno));
        close(fd);
        unlink(o->tmp_path);
        goto fail;
    }
    o->stream = fdopen(fd, "w");
    if (!o->stream) {
        fprintf(stderr, "keel: %s: %s\n", o->tmp_path, strerror(errno));
        close(fd);
        unlink(o->tmp_path);
        goto fail;
    }
    return 0;
fail:
    free(o->path);
    free(o->tmp_path);
    *o = (cli_output){0};
    return 4;
}

bool cli_output_close(cli_output *o, bool commit)
{
    bool ok = true;
    if (!o->stream)
        return false;
    if (fflush(o->stream) != 0 || ferror(o->stream) ||
        (o->tmp_path && fsync(fileno(o->stream)) != 0)) {
        fprintf(stderr, "keel: %s: write failed: %s\n",
                o->tmp_path ? o->tmp_path
                : o->path   ? o->path
                            : "standard output",
                strerror(errno));
        ok = false;
    }
    if (o->path && !o->tmp_path) {
        if (fclose(o->stream) != 0)
            ok = false;
    } else if (o->path) {
        if (fclose(o->stream) != 0)
            ok = false;
        if (ok && commit && rename(o->tmp_path, o->path) != 0) {
            fprintf(stderr, "keel: %s: %s\n", o->path, strerror(errno));
            ok = false;
        }
        if (!ok || !commit)
            unlink(o->tmp_path);
    }
    free(o->path);
    free(o->tmp_path);
    *o = (cli_output){0};
    return ok;
}
