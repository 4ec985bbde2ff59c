/* test_atomic.c - temp-and-rename writes: complete or absent, also when the
 * disk fills (fault injection with RLIMIT_FSIZE). */
#include <criterion/criterion.h>
#include <dirent.h>
#include <inttypes.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <unistd.h>

#include "sedgrade/atomic.h"

static char dir[] = "/tmp/sg-atomic-XXXXXX";

static void setup(void)
{
    cr_assert_not_null(mkdtemp(dir));
}

static size_t count_entries(const char *path)
{
    DIR *d = opendir(path);
    size_t n = 0;
    const struct dirent *e;
    while (d && (e = readdir(d)) != NULL)
        n += strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0;
    if (d)
        closedir(d);
    return n;
}

static void teardown(void)
{
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    (void)system(cmd);
}

TestSuite(atomic, .init = setup, .fini = teardown);

Test(atomic, commit_renames_into_place)
{
    char path[256];
    snprintf(path, sizeof path, "%s/a.csv", dir);
    struct sg_atomic_file f;
    cr_assert_eq(sg_atomic_open(&f, path, NULL), SG_OK);
    fputs("x,y\n1,2\n", f.fp);
    cr_assert_eq(access(path, F_OK), -1); /* not visible before commit */
    cr_assert_eq(sg_atomic_commit(&f, NULL), SG_OK);
    FILE *fp = fopen(path, "r");
    char buf[32] = "";
    cr_assert_not_null(fp);
    cr_assert_eq(fread(buf, 1, sizeof buf - 1, fp), 8u);
    fclose(fp);
    cr_assert_str_eq(buf, "x,y\n1,2\n");
    cr_assert_eq(count_entries(dir), 1u);
}

Test(atomic, abort_leaves_nothing)
{
    char path[256];
    snprintf(path, sizeof path, "%s/b.csv", dir);
    struct sg_atomic_file f;
    cr_assert_eq(sg_atomic_open(&f, path, NULL), SG_OK);
    fputs("partial", f.fp);
    sg_atomic_abort(&f);
    cr_assert_eq(count_entries(dir), 0u);
    sg_atomic_abort(&f); /* twice is harmless */
}

Test(atomic, disk_full_leaves_old_file_and_no_temp)
{
    /* Fault injection: a 4 KiB file-size limit makes the write fail as on a full disk (EFBIG). */
    char path[256];
    snprintf(path, sizeof path, "%s/c.csv", dir);
    FILE *old = fopen(path, "w");
    fputs("old\n", old);
    fclose(old);
    signal(SIGXFSZ, SIG_IGN);
    const struct rlimit lim = {4096, 4096};
    cr_assert_eq(setrlimit(RLIMIT_FSIZE, &lim), 0);
    struct sg_atomic_file f;
    struct sg_error err;
    cr_assert_eq(sg_atomic_open(&f, path, &err), SG_OK);
    for (int i = 0; i < 10000; i++)
        fputs("0123456789abcdef\n", f.fp);
    cr_assert_eq(sg_atomic_commit(&f, &err), SG_EIO);
    cr_assert(strstr(err.msg, "c.csv") != NULL, "%s", err.msg);
    cr_assert_eq(count_entries(dir), 1u); /* only the old file */
    FILE *fp = fopen(path, "r");
    char buf[16] = "";
    cr_assert_not_null(fp);
    cr_assert_not_null(fgets(buf, sizeof buf, fp));
    fclose(fp);
    cr_assert_str_eq(buf, "old\n");
}

Test(atomic, missing_folder_is_an_io_error)
{
    char path[256];
    snprintf(path, sizeof path, "%s/no/such/d.csv", dir);
    struct sg_atomic_file f;
    struct sg_error err;
    cr_assert_eq(sg_atomic_open(&f, path, &err), SG_EIO);
    cr_assert(strstr(err.msg, "d.csv") != NULL);
    sg_atomic_abort(&f);
}

Test(atomic, mkdir_p)
{
    char path[256];
    snprintf(path, sizeof path, "%s/x/y/z", dir);
    cr_assert_eq(sg_mkdir_p(path, NULL), SG_OK);
    cr_assert_eq(sg_mkdir_p(path, NULL), SG_OK);
    struct stat st;
    cr_assert_eq(stat(path, &st), 0);
    cr_assert(S_ISDIR(st.st_mode));
    /* a regular file in the way */
    char file[256];
    snprintf(file, sizeof file, "%s/f", dir);
    FILE *fp = fopen(file, "w");
    fclose(fp);
    snprintf(path, sizeof path, "%s/f/sub", dir);
    struct sg_error err;
    cr_assert_eq(sg_mkdir_p(path, &err), SG_EIO);
}

Test(atomic, new_file_mode_follows_the_umask)
{
    /* common practice: a new output file is 0666 less the umask, as cp or a shell redirection makes it */
    char path[256];
    snprintf(path, sizeof path, "%s/m.csv", dir);
    const mode_t old = umask(022);
    struct sg_atomic_file f;
    cr_assert_eq(sg_atomic_open(&f, path, NULL), SG_OK);
    fputs("x\n", f.fp);
    cr_assert_eq(sg_atomic_commit(&f, NULL), SG_OK);
    umask(027);
    char path2[256];
    snprintf(path2, sizeof path2, "%s/m2.csv", dir);
    cr_assert_eq(sg_atomic_open(&f, path2, NULL), SG_OK);
    cr_assert_eq(sg_atomic_commit(&f, NULL), SG_OK);
    umask(old);
    struct stat st;
    cr_assert_eq(stat(path, &st), 0);
    cr_assert_eq(st.st_mode & 0777, 0644, "mode %o", (unsigned)(st.st_mode & 0777));
    cr_assert_eq(stat(path2, &st), 0);
    cr_assert_eq(st.st_mode & 0777, 0640, "mode %o", (unsigned)(st.st_mode & 0777));
}

Test(atomic, leftover_temporary_file_is_neither_reused_nor_touched)
{
    /* A crashed run with the same process id left a file under the first hidden name that replacing an
     * existing file uses (and that systems without O_TMPFILE write to). */
    char path[256];
    snprintf(path, sizeof path, "%s/s.csv", dir);
    FILE *old = fopen(path, "w");
    cr_assert_not_null(old);
    fputs("old\n", old);
    fclose(old);
    struct sg_atomic_file f;
    char stale_name[512];
    snprintf(stale_name, sizeof stale_name, "%s/.s.csv.%ld.%" PRIxPTR ".0.tmp", dir, (long)getpid(),
             (uintptr_t)(void *)&f);
    FILE *stale = fopen(stale_name, "w");
    cr_assert_not_null(stale);
    fputs("stale\n", stale);
    fclose(stale);

    cr_assert_eq(sg_atomic_open(&f, path, NULL), SG_OK);
    fputs("new\n", f.fp);
    cr_assert_eq(sg_atomic_commit(&f, NULL), SG_OK);
    char buf[16] = "";
    FILE *fp = fopen(stale_name, "r");
    cr_assert_not_null(fp);
    cr_assert_not_null(fgets(buf, sizeof buf, fp));
    fclose(fp);
    cr_assert_str_eq(buf, "stale\n");
    fp = fopen(path, "r");
    cr_assert_not_null(fp);
    cr_assert_not_null(fgets(buf, sizeof buf, fp));
    fclose(fp);
    cr_assert_str_eq(buf, "new\n");
    cr_assert_eq(count_entries(dir), 2u); /* the result and the leftover, nothing else */
}
