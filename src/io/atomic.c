/* atomic.c - temp-file-and-rename writes, the one place outputs are committed. */
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

enum sg_status sg_atomic_open(struct sg_atomic_file *f, const char *path, struct sg_error *err)
{
    memset(f, 0, sizeof *f);
    if (strlen(path) + 64 >= sizeof f->tmp)
        return sg_error_set(err, SG_EIO, 0, 0, "'%s': path is too long", path);
    (void)snprintf(f->path, sizeof f->path, "%s", path);
    const char *slash = strrchr(path, '/');
    const size_t dirlen = slash ? (size_t)(slash - path) + 1 : 0;
    /* A hidden name unique to this process and this open (the handle's
     * address: no two live handles share one), created with O_EXCL so it
     * never takes over another file; a leftover of a crashed run with the
     * same process id only moves the counter on. One system call, where
     * mkstemp and a chmod to the usual permissions took three: a batch
     * writes tens of thousands of files. The mode is 0666 less the umask,
     * as for any new file. */
    int fd = -1, e = 0;
    for (unsigned attempt = 0; attempt < 100 && fd < 0; attempt++) {
        (void)snprintf(f->tmp, sizeof f->tmp, "%.*s.%s.%ld.%" PRIxPTR ".%u.tmp", (int)dirlen, path, path + dirlen,
                       (long)getpid(), (uintptr_t)(void *)f, attempt);
        fd = open(f->tmp, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
        e = errno;
        if (fd < 0 && e != EEXIST)
            break;
    }
    if (fd < 0) {
        f->tmp[0] = '\0';
        return sg_error_set(err, SG_EIO, 0, 0, "cannot create a file next to '%s': %s (check the folder "
                                               "exists and is writable)",
                            path, strerror(e));
    }
    f->fp = fdopen(fd, "w");
    if (f->fp == NULL) {
        e = errno;
        (void)close(fd);
        (void)unlink(f->tmp);
        f->tmp[0] = '\0';
        return sg_error_set(err, SG_EIO, 0, 0, "cannot write '%s': %s", path, strerror(e));
    }
    return SG_OK;
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
    if (fclose(f->fp) != 0 && e == 0)
        e = errno ? errno : EIO;
    f->fp = NULL;
    if (e == 0 && rename(f->tmp, f->path) != 0)
        e = errno;
    if (e != 0) {
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
