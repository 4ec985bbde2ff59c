/* atomic.c - temp-file-and-rename writes, the one place outputs are committed. */
#define _GNU_SOURCE /* O_TMPFILE (Linux); everything else is POSIX */
#include "sedgrade/atomic.h"

#include <errno.h>
#include <fcntl.h>
#include <inttypes.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* The hidden temporary name for f->path, try number attempt, into f->tmp
 * (open() checked the length). */
static void temp_name(struct sg_atomic_file *f, unsigned attempt)
{
    const char *slash = strrchr(f->path, '/');
    const size_t dirlen = slash ? (size_t)(slash - f->path) + 1 : 0;
    const int n = snprintf(f->tmp, sizeof f->tmp, "%.*s.%s.%ld.%" PRIxPTR ".%u.tmp", (int)dirlen, f->path,
                           f->path + dirlen, (long)getpid(), (uintptr_t)(void *)f, attempt);
    if (n < 0 || (size_t)n >= sizeof f->tmp)
        f->tmp[0] = '\0';
}

/* Creates the hidden temporary file for path under a name unique to this
 * process and this handle (its address: no two live handles share one),
 * with O_EXCL so it never takes over another file; a leftover of a crashed
 * run with the same process id only moves the counter on. The name goes to
 * f->tmp; returns the descriptor, or -1 with errno set. Mode 0666 less the
 * umask, as for any new file. */
static int create_named(struct sg_atomic_file *f, int flags)
{
    int fd = -1;
    for (unsigned attempt = 0; attempt < 100 && fd < 0; attempt++) {
        temp_name(f, attempt);
        fd = open(f->tmp, flags | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
        if (fd < 0 && errno != EEXIST)
            break;
    }
    if (fd < 0)
        f->tmp[0] = '\0';
    return fd;
}

/* An unnamed file in path's folder (Linux O_TMPFILE), or -1 where the
 * system or the file system has none. */
static int create_unnamed(const char *path)
{
#ifdef O_TMPFILE
    const char *slash = strrchr(path, '/');
    char dir[4096];
    if (slash == NULL)
        (void)snprintf(dir, sizeof dir, ".");
    else
        (void)snprintf(dir, sizeof dir, "%.*s", slash == path ? 1 : (int)(slash - path), path);
    return open(dir, O_TMPFILE | O_RDWR | O_CLOEXEC, 0666);
#else
    (void)path;
    return -1;
#endif
}

enum sg_status sg_atomic_open(struct sg_atomic_file *f, const char *path, struct sg_error *err)
{
    memset(f, 0, sizeof *f);
    if (strlen(path) + 64 >= sizeof f->tmp)
        return sg_error_set(err, SG_EIO, 0, 0, "'%s': path is too long", path);
    (void)snprintf(f->path, sizeof f->path, "%s", path);
    /* An unnamed file is linked under the final name when complete: one
     * change to the folder per file instead of a create and a rename (a
     * batch writes tens of thousands of files); else a named one. */
    int fd = create_unnamed(path);
    if (fd >= 0)
        f->unnamed = 1;
    else
        fd = create_named(f, O_WRONLY);
    if (fd < 0) {
        const int e = errno;
        return sg_error_set(err, SG_EIO, 0, 0, "cannot create a file next to '%s': %s (check the folder "
                                               "exists and is writable)",
                            path, strerror(e));
    }
    f->fp = fdopen(fd, "w");
    if (f->fp == NULL) {
        const int e = errno;
        (void)close(fd);
        if (f->tmp[0] != '\0')
            (void)unlink(f->tmp);
        f->tmp[0] = '\0';
        return sg_error_set(err, SG_EIO, 0, 0, "cannot write '%s': %s", path, strerror(e));
    }
    return SG_OK;
}

/* Copies the unnamed file fd into a new named temporary file (for systems
 * without /proc to link it by). Returns 0 or an errno value. */
static int copy_to_named(struct sg_atomic_file *f, int fd)
{
    const int out = create_named(f, O_WRONLY);
    if (out < 0)
        return errno;
    char buf[16384];
    off_t off = 0;
    int e = 0;
    for (;;) {
        const ssize_t n = pread(fd, buf, sizeof buf, off);
        if (n < 0) {
            e = errno;
            break;
        }
        if (n == 0)
            break;
        for (ssize_t done = 0; done < n;) {
            const ssize_t w = write(out, buf + done, (size_t)(n - done));
            if (w < 0) {
                e = errno;
                break;
            }
            done += w;
        }
        if (e != 0)
            break;
        off += n;
    }
    if (e == 0 && f->durable && fsync(out) != 0 && errno != EINVAL)
        e = errno;
    if (close(out) != 0 && e == 0)
        e = errno;
    return e;
}

/* Gives the complete unnamed file f->fp its final name. Returns 0 or an
 * errno value; a named temporary file made on the way is left in f->tmp. */
static int publish_unnamed(struct sg_atomic_file *f)
{
    const int fd = fileno(f->fp);
    char proc[64];
    (void)snprintf(proc, sizeof proc, "/proc/self/fd/%d", fd);
    if (linkat(AT_FDCWD, proc, AT_FDCWD, f->path, AT_SYMLINK_FOLLOW) == 0)
        return 0;
    if (errno == EEXIST) { /* replace the old file in one step: a named link, then a rename */
        for (unsigned attempt = 0; attempt < 100; attempt++) {
            temp_name(f, attempt);
            if (linkat(AT_FDCWD, proc, AT_FDCWD, f->tmp, AT_SYMLINK_FOLLOW) == 0)
                return rename(f->tmp, f->path) == 0 ? (f->tmp[0] = '\0', 0) : errno;
            if (errno != EEXIST)
                break;
        }
        f->tmp[0] = '\0';
        return errno;
    }
    /* no /proc to link by: copy into a named file and rename that */
    const int e = copy_to_named(f, fd);
    if (e != 0)
        return e;
    return rename(f->tmp, f->path) == 0 ? (f->tmp[0] = '\0', 0) : errno;
}

enum sg_status sg_atomic_commit(struct sg_atomic_file *f, struct sg_error *err)
{
    if (f->fp == NULL)
        return sg_error_set(err, SG_EIO, 0, 0, "'%s' was not opened for writing", f->path);
    int e = 0;
    if (ferror(f->fp) || fflush(f->fp) != 0)
        e = errno ? errno : EIO;
    if (e == 0 && f->durable && fsync(fileno(f->fp)) != 0 && errno != EINVAL)
        e = errno;
    if (e == 0 && f->unnamed)
        e = publish_unnamed(f);
    if (fclose(f->fp) != 0 && e == 0)
        e = errno ? errno : EIO;
    f->fp = NULL;
    if (e == 0 && !f->unnamed && rename(f->tmp, f->path) != 0)
        e = errno;
    if (e != 0) {
        if (f->tmp[0] != '\0')
            (void)unlink(f->tmp);
        f->tmp[0] = '\0';
        return sg_error_set(err, SG_EIO, 0, 0, "cannot write '%s': %s (nothing was written; free space or "
                                               "fix permissions and run again)",
                            f->path, strerror(e));
    }
    f->tmp[0] = '\0';
    return SG_OK;
}

void sg_atomic_abort(struct sg_atomic_file *f)
{
    if (f->fp != NULL) {
        (void)fclose(f->fp);
        f->fp = NULL;
    }
    if (f->tmp[0] != '\0') {
        (void)unlink(f->tmp);
        f->tmp[0] = '\0';
    }
}

enum sg_status sg_mkdir_p(const char *path, struct sg_error *err)
{
    char buf[4096];
    if (strlen(path) >= sizeof buf)
        return sg_error_set(err, SG_EIO, 0, 0, "'%s': path is too long", path);
    (void)snprintf(buf, sizeof buf, "%s", path);
    for (char *p = buf + 1;; p++) {
        const char c = *p;
        if (c == '/' || c == '\0') {
            *p = '\0';
            if (mkdir(buf, 0755) != 0 && errno != EEXIST)
                return sg_error_set(err, SG_EIO, 0, 0, "cannot create folder '%s': %s", buf, strerror(errno));
            *p = c;
            if (c == '\0')
                break;
        }
    }
    struct stat st;
    if (stat(path, &st) != 0 || !S_ISDIR(st.st_mode))
        return sg_error_set(err, SG_EIO, 0, 0, "'%s' is not a folder (choose another output folder)", path);
    return SG_OK;
}
