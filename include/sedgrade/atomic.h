/* atomic.h - write a file so that it appears complete or not at all: the
 * content goes to a temporary file in the same folder (an unnamed one where
 * Linux offers O_TMPFILE, else a hidden named one), is flushed to disk and
 * only then given the final name (linked, or renamed over an old file). A
 * failed write leaves nothing behind. */
#ifndef SEDGRADE_ATOMIC_H
#define SEDGRADE_ATOMIC_H

#include <stdio.h>

#include "sedgrade/error.h"

struct sg_atomic_file {
    FILE *fp;          /* write here between open and commit */
    char path[4096];   /* final name */
    char tmp[4096];    /* temporary name in the same folder */
    int durable;       /* set non-zero after open to fsync before the rename (register
                          history); results skip it: a crash leaves the old file or none */
    int unnamed;       /* fp is an unnamed file (O_TMPFILE), linked under path on commit */
};

/* Creates a temporary file next to path and opens it for writing (fp).
 * SG_EIO with the path and the system's reason on failure. */
enum sg_status sg_atomic_open(struct sg_atomic_file *f, const char *path, struct sg_error *err);

/* Flushes, (if durable) syncs and closes the temporary file and renames it to the final
 * name. On any failure (including an earlier write error on fp, e.g. a full
 * disk) the temporary file is removed, nothing is left at path that was not
 * there before, and SG_EIO is returned. */
enum sg_status sg_atomic_commit(struct sg_atomic_file *f, struct sg_error *err);

/* Closes and removes the temporary file. Safe after a failed open or commit. */
void sg_atomic_abort(struct sg_atomic_file *f);

/* Creates a folder and its parents (like mkdir -p). SG_EIO on failure. */
enum sg_status sg_mkdir_p(const char *path, struct sg_error *err);

#endif
