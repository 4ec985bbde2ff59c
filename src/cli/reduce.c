/* reduce.c - `sedgrade reduce` and `sedgrade check`: collect records (files
 * or folders walked for *.csv), reduce them on a pool of threads, write the
 * per-test files and the batch summary, and map the outcome to an exit status. */
#define _XOPEN_SOURCE 700 /* realpath */
#define _DEFAULT_SOURCE    /* DT_REG: the file type readdir reports */
#include <dirent.h>
#include <csv.h>
#include <errno.h>
#include <getopt.h>
#include <limits.h>
#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "cli/cli.h"
#include "cli/progress.h"
#include "sedgrade/atomic.h"
#include "sedgrade/calibio.h"
#include "sedgrade/csvout.h"
#include "sedgrade/mc.h"
#include "sedgrade/plot.h"
#include "sedgrade/recordio.h"
#include "sedgrade/reduce.h"
#include "sedgrade/report.h"

#define OUT_POINTS 1u
#define OUT_SUMMARY 2u
#define OUT_CURVE 4u
#define MAX_DX 32
#define CURVE_POINTS_PER_DECADE 40 /* curve.csv resolution: fine enough to plot elsewhere */
#define WRITE_BUFFER_SIZE 65536    /* per-worker stream buffer: a per-test CSV goes out in one write */

struct reduce_cfg {
    const char *out_dir;
    const char *register_dir;
    const char *base_soil; /* --base-soil record, NULL without */
    struct sg_reduce_options opt;
    double dx[MAX_DX];
    unsigned outputs;
    bool plot[3]; /* indexed by enum sg_plot_format */
    bool report;
    size_t mc_draws;
    unsigned long seed;
    size_t jobs;
    bool quiet;
    bool batch_summary; /* summary.csv is written (more than one test, or --outputs none) */
};

/* The outcome of one record. */
enum job_status { JOB_OK = 0, JOB_QC_WARNING, JOB_QC_FAILED, JOB_REFUSED, JOB_IO_FAILED };

static const char *job_status_name(enum job_status s)
{
    switch (s) {
    case JOB_OK: return "ok";
    case JOB_QC_WARNING: return "qc_warning";
    case JOB_QC_FAILED: return "qc_failed";
    case JOB_REFUSED: return "refused";
    case JOB_IO_FAILED: return "io_failed";
    }
    return "";
}

struct job {
    char *path;
    enum job_status status;
    char id[SG_ID_MAX];
    size_t schema;   /* index into the batch's schema table */
    /* Summary values, '\x1f'-separated in the schema's order, kept in the
     * worker's spill file (struct batch) rather than in memory. */
    bool has_values;
    size_t spill;    /* which spill file */
    off_t spill_off; /* where in it */
    size_t spill_len;
};

/* Distinct lists of quantity names seen in the batch (usually one). */
struct schema_table {
    pthread_mutex_t lock;
    char **names; /* each a '\x1f'-separated list */
    size_t n, cap;
};

/* Test ids claimed by a written test, so two records with one id cannot
 * overwrite each other's files. The strings are the jobs' own (job->id,
 * job->path); an open-addressing hash table finds them in constant time. */
struct id_set {
    pthread_mutex_t lock;
    const char **ids;
    const char **owners;
    size_t n, cap;
    size_t *slots;  /* index + 1 into ids, 0 = empty; n_slots a power of two */
    size_t n_slots;
};

/* Most workers a batch runs (the -j limit). */
#define MAX_WORKERS 256

struct batch {
    const struct reduce_cfg *cfg;
    struct job *jobs;
    size_t n_jobs;
    atomic_size_t next;
    struct schema_table schemas;
    struct id_set ids;
    pthread_mutex_t stderr_lock;
    struct sg_progress progress; /* under stderr_lock */
    /* One anonymous temporary file per worker (in the output folder, unlinked
     * at once) holds the summary values of its tests until the batch summary
     * is written, so memory stays flat however large the archive. */
    FILE *spill[MAX_WORKERS];
    atomic_size_t n_spill;
};

/* ---- collecting input files ---- */

struct path_list {
    char **items;
    size_t n, cap;
};

static bool path_list_add(struct path_list *l, const char *path)
{
    if (l->n == l->cap) {
        size_t cap = l->cap ? 2 * l->cap : 64;
        char **p = realloc(l->items, cap * sizeof *p);
        if (p == NULL)
            return false;
        l->items = p;
        l->cap = cap;
    }
    l->items[l->n] = strdup(path);
    return l->items[l->n++] != NULL;
}

static void path_list_release(struct path_list *l)
{
    for (size_t i = 0; i < l->n; i++)
        free(l->items[i]);
    free(l->items);
    l->items = NULL;
    l->n = l->cap = 0;
}

/* A file or folder by device and inode: what every path to it shares
 * (symbolic links, hard links, "dir/x.csv" and "./dir/x.csv"). */
struct node_id {
    dev_t dev;
    ino_t ino;
};

static struct node_id node_of(const struct stat *st)
{
    return (struct node_id){st->st_dev, st->st_ino};
}

/* The files and folders already listed: an open-addressing hash set,
 * at most half full. */
struct node_set {
    struct node_id *slots;
    bool *used;
    size_t n, n_slots; /* n_slots a power of two */
};

static size_t node_hash(struct node_id id)
{
    /* splitmix64's finaliser (Steele, Lea, Flood 2014; public domain) */
    uint64_t h = (uint64_t)id.ino ^ ((uint64_t)id.dev * 0x9e3779b97f4a7c15u);
    h = (h ^ (h >> 30)) * 0xbf58476d1ce4e5b9u;
    h = (h ^ (h >> 27)) * 0x94d049bb133111ebu;
    return (size_t)(h ^ (h >> 31));
}

static size_t node_slot(const struct node_set *s, struct node_id id)
{
    const size_t mask = s->n_slots - 1;
    size_t i = node_hash(id) & mask;
    while (s->used[i] && !(s->slots[i].dev == id.dev && s->slots[i].ino == id.ino))
        i = (i + 1) & mask;
    return i;
}

/* Adds id; *added tells whether it was new. false when out of memory. */
static bool node_set_add(struct node_set *s, struct node_id id, bool *added)
{
    if (2 * (s->n + 1) > s->n_slots) {
        const size_t n_slots = s->n_slots ? 2 * s->n_slots : 256;
        struct node_set grown = {calloc(n_slots, sizeof *grown.slots), calloc(n_slots, sizeof *grown.used), 0,
                                 n_slots};
        if (grown.slots == NULL || grown.used == NULL) {
            free(grown.slots);
            free(grown.used);
            return false;
        }
        for (size_t i = 0; i < s->n_slots; i++)
            if (s->used[i]) {
                const size_t j = node_slot(&grown, s->slots[i]);
                grown.slots[j] = s->slots[i];
                grown.used[j] = true;
            }
        grown.n = s->n;
        free(s->slots);
        free(s->used);
        *s = grown;
    }
    const size_t i = node_slot(s, id);
    *added = !s->used[i];
    if (*added) {
        s->slots[i] = id;
        s->used[i] = true;
        s->n++;
    }
    return true;
}

static void node_set_release(struct node_set *s)
{
    free(s->slots);
    free(s->used);
    *s = (struct node_set){0};
}

/* What a walk over the command line's paths gathers. */
struct collection {
    struct path_list files; /* each record file once, in argument and then sorted folder order */
    struct node_set seen;   /* folders walked and files listed */
    bool has_skip;          /* skip: the output folder, never read as input */
    struct node_id skip;
    size_t problems;        /* unreadable folders or files, each reported */
    size_t repeats;         /* paths that led to a file or folder already listed */
};

/* Lists path (a file whose stat is st, or NULL when it cannot be read: the
 * reader then reports why) unless the same file is listed already. */
static bool add_file(struct collection *c, const char *path, const struct stat *st)
{
    bool added = true;
    if (st != NULL && !node_set_add(&c->seen, node_of(st), &added))
        return false;
    if (!added) {
        c->repeats++;
        return true;
    }
    return path_list_add(&c->files, path);
}

/* A folder entry while walking: its path and what stat found. */
struct entry {
    char *path;
    struct stat st;
};

static int cmp_entry(const void *a, const void *b)
{
    return strcmp(((const struct entry *)a)->path, ((const struct entry *)b)->path);
}

#define MAX_FOLDER_DEPTH 32

/* Walks dir (whose stat is dir_st) for *.csv, sorted and recursive; hidden
 * entries and the output folder are skipped. A folder reached again (a
 * symbolic link to a parent or to itself, or the same folder named twice)
 * is not walked again, so every file is listed once and a loop ends.
 * Unreadable folders are reported and counted. false when out of memory. */
static bool walk(struct collection *c, const char *dir, const struct stat *dir_st, int depth)
{
    const struct node_id id = node_of(dir_st);
    if (c->has_skip && id.dev == c->skip.dev && id.ino == c->skip.ino)
        return true;
    bool added = false;
    if (!node_set_add(&c->seen, id, &added))
        return false;
    if (!added) {
        c->repeats++;
        return true;
    }
    if (depth > MAX_FOLDER_DEPTH) {
        sg_cli_errorf("%s: folders nested too deeply (more than %d levels); skipped", dir, MAX_FOLDER_DEPTH);
        c->problems++;
        return true;
    }
    DIR *d = opendir(dir);
    if (d == NULL) {
        sg_cli_errorf("%s: cannot read folder: %s", dir, strerror(errno));
        c->problems++;
        return true;
    }
    struct entry *here = NULL;
    size_t n_here = 0, cap_here = 0;
    bool ok = true;
    const struct dirent *e;
    while (ok && (e = readdir(d)) != NULL) {
        if (e->d_name[0] == '.')
            continue;
#ifdef DT_REG
        /* a regular file the listing names as one is taken only as *.csv
         * (an archive folder holds thousands of other files) */
        if (e->d_type == DT_REG && !sg_cli_is_record_name(e->d_name))
            continue;
#endif
        char path[PATH_MAX];
        if (snprintf(path, sizeof path, "%s/%s", dir, e->d_name) >= (int)sizeof path)
            continue;
        /* the device and inode say whether this file or folder is listed
         * already; fstatat looks up one name in the open folder */
        struct stat st;
        if (fstatat(dirfd(d), e->d_name, &st, 0) != 0) {
            if (sg_cli_is_record_name(e->d_name)) {
                sg_cli_errorf("%s: cannot read: %s", path, strerror(errno));
                c->problems++;
            }
            continue;
        }
        if (!S_ISDIR(st.st_mode) && !sg_cli_is_record_name(e->d_name))
            continue;
        if (n_here == cap_here) {
            const size_t cap = cap_here ? 2 * cap_here : 64;
            struct entry *p = realloc(here, cap * sizeof *p);
            if (p == NULL) {
                ok = false;
                break;
            }
            here = p;
            cap_here = cap;
        }
        here[n_here].path = strdup(path);
        here[n_here].st = st;
        ok = here[n_here].path != NULL;
        n_here += ok;
    }
    closedir(d);
    if (n_here > 0)
        qsort(here, n_here, sizeof *here, cmp_entry);
    for (size_t i = 0; ok && i < n_here; i++) {
        if (S_ISDIR(here[i].st.st_mode))
            ok = walk(c, here[i].path, &here[i].st, depth + 1);
        else
            ok = add_file(c, here[i].path, &here[i].st);
    }
    for (size_t i = 0; i < n_here; i++)
        free(here[i].path);
    free(here);
    return ok;
}

/* Lists the record files of args (files, or folders walked), each file
 * once however many paths lead to it; skip_dir (may be NULL) is never
 * walked. false when out of memory. */
static bool collect(char **args, int n, const char *skip_dir, struct collection *c)
{
    struct stat st;
    if (skip_dir != NULL && stat(skip_dir, &st) == 0 && S_ISDIR(st.st_mode)) {
        c->has_skip = true;
        c->skip = node_of(&st);
    }
    for (int i = 0; i < n; i++) {
        bool ok;
        if (stat(args[i], &st) != 0)
            ok = add_file(c, args[i], NULL);
        else if (S_ISDIR(st.st_mode))
            ok = walk(c, args[i], &st, 0);
        else
            ok = add_file(c, args[i], &st);
        if (!ok)
            return false;
    }
    return true;
}

/* One short note when some paths were dropped as repeats. */
static void note_repeats(const struct collection *c)
{
    if (c->repeats > 0)
        sg_cli_errorf("note: %zu path%s led to a record or folder already listed (a repeated name, a link "
                      "or a folder loop); each record is read once",
                      c->repeats, c->repeats == 1 ? "" : "s");
}

static void collection_release(struct collection *c)
{
    path_list_release(&c->files);
    node_set_release(&c->seen);
}

/* ---- batch bookkeeping ---- */

static size_t schema_intern(struct schema_table *t, const char *names, bool *oom)
{
    pthread_mutex_lock(&t->lock);
    size_t i = 0;
    for (; i < t->n; i++)
        if (strcmp(t->names[i], names) == 0)
            break;
    if (i == t->n) {
        if (t->n == t->cap) {
            size_t cap = t->cap ? 2 * t->cap : 4;
            char **p = realloc(t->names, cap * sizeof *p);
            if (p == NULL) {
                *oom = true;
                pthread_mutex_unlock(&t->lock);
                return 0;
            }
            t->names = p;
            t->cap = cap;
        }
        t->names[t->n] = strdup(names);
        if (t->names[t->n] == NULL)
            *oom = true;
        else
            t->n++;
    }
    pthread_mutex_unlock(&t->lock);
    return i;
}

/* FNV-1a hash of a string (Fowler, Noll, Vo; public domain). */
static size_t hash_string(const char *str)
{
    uint64_t h = 14695981039346656037u;
    for (const unsigned char *c = (const unsigned char *)str; *c; c++) {
        h ^= *c;
        h *= 1099511628211u;
    }
    return (size_t)h;
}

/* The slot that holds id, or the empty slot where it would go. */
static size_t *id_slot(const struct id_set *s, const char *id)
{
    const size_t mask = s->n_slots - 1;
    size_t i = hash_string(id) & mask;
    while (s->slots[i] != 0 && strcmp(s->ids[s->slots[i] - 1], id) != 0)
        i = (i + 1) & mask;
    return &s->slots[i];
}

/* Keeps the table at most half full. false when out of memory. */
static bool id_reserve(struct id_set *s)
{
    if (2 * (s->n + 1) <= s->n_slots)
        return true;
    const size_t n_slots = s->n_slots ? 2 * s->n_slots : 1024;
    size_t *slots = calloc(n_slots, sizeof *slots);
    if (slots == NULL)
        return false;
    free(s->slots);
    s->slots = slots;
    s->n_slots = n_slots;
    for (size_t i = 0; i < s->n; i++)
        *id_slot(s, s->ids[i]) = i + 1;
    return true;
}

/* Claims id for path (both must outlive the set); false (with the owner)
 * when another record has it. Out of memory, the claim is not recorded. */
static bool id_claim(struct id_set *s, const char *id, const char *path, const char **owner)
{
    bool ok = true;
    pthread_mutex_lock(&s->lock);
    if (id_reserve(s)) {
        size_t *slot = id_slot(s, id);
        if (*slot != 0) {
            *owner = s->owners[*slot - 1];
            ok = false;
        } else {
            if (s->n == s->cap) {
                const size_t cap = s->cap ? 2 * s->cap : 256;
                const char **a = realloc(s->ids, cap * sizeof *a);
                if (a != NULL)
                    s->ids = a;
                const char **o = realloc(s->owners, cap * sizeof *o);
                if (o != NULL)
                    s->owners = o;
                if (a != NULL && o != NULL)
                    s->cap = cap;
            }
            if (s->n < s->cap) {
                s->ids[s->n] = id;
                s->owners[s->n] = path;
                *slot = ++s->n;
            }
        }
    }
    pthread_mutex_unlock(&s->lock);
    return ok;
}

static void id_set_release(struct id_set *s)
{
    free(s->ids);
    free(s->owners);
    free(s->slots);
    pthread_mutex_destroy(&s->lock);
}

/* Serialises the summary (names or values) joined by '\x1f' into *buf
 * (grown as needed, kept by the caller for the next record). Returns the
 * length, or (size_t)-1 when out of memory. */
static size_t join_quantities(const struct sg_result *res, bool names, char **buf, size_t *cap)
{
    size_t len = 0;
    for (size_t i = 0; i < res->n_quantities; i++) {
        const struct sg_quantity *q = &res->quantities[i];
        char num[32];
        const char *v = num;
        if (names)
            v = q->name;
        else if (!q->determined)
            v = "";
        else if (q->is_text)
            v = q->text;
        else
            sg_csvout_number(q->value, num, sizeof num);
        /* values go into the spill already quoted for CSV (the workers do it in
         * parallel; the batch summary then copies them) */
        const size_t vlen0 = strlen(v);
        const bool quote = !names && strpbrk(v, ",\"\r\n") != NULL;
        const size_t vlen = quote ? 2 * vlen0 + 2 : vlen0, need = len + vlen + 2;
        if (need > *cap) {
            size_t c = *cap ? *cap : 1024;
            while (c < need)
                c *= 2;
            char *p = realloc(*buf, c);
            if (p == NULL)
                return (size_t)-1;
            *buf = p;
            *cap = c;
        }
        if (i > 0)
            (*buf)[len++] = '\x1f';
        if (quote) {
            len += csv_write(*buf + len, vlen, v, vlen0);
        } else {
            memcpy(*buf + len, v, vlen);
            len += vlen;
        }
    }
    if (*cap == 0) {
        char *p = malloc(1);
        if (p == NULL)
            return (size_t)-1;
        *buf = p;
        *cap = 1;
    }
    (*buf)[len] = '\0';
    return len;
}

/* true when res's quantity names are, in order, the '\x1f'-joined names. */
static bool same_names(const struct sg_result *res, const char *names)
{
    const char *p = names;
    for (size_t i = 0; i < res->n_quantities; i++) {
        if (i > 0 && *p++ != '\x1f')
            return false;
        const char *n = res->quantities[i].name;
        while (*n != '\0' && *p == *n) {
            p++;
            n++;
        }
        if (*n != '\0')
            return false;
    }
    return *p == '\0';
}

/* ---- one record ---- */

typedef enum sg_status (*csv_writer)(FILE *fp, const struct sg_result *res, bool with_u, struct sg_error *err);

static enum sg_status write_curve(FILE *fp, const struct sg_result *res, bool with_u, struct sg_error *err)
{
    (void)with_u;
    return sg_csvout_curve(fp, res, CURVE_POINTS_PER_DECADE, err);
}

/* Writes one per-test CSV file atomically. iobuf (iobuf_size bytes, may be
 * NULL) is the calling worker's stream buffer, reused from file to file so a
 * small file goes out in one write. */
static enum sg_status write_csv(const char *dir, const char *id, const char *suffix, csv_writer fn,
                                const struct sg_result *res, bool with_u, char *iobuf, size_t iobuf_size,
                                struct sg_error *err)
{
    char path[PATH_MAX];
    if (snprintf(path, sizeof path, "%s/%s.%s", dir, id, suffix) >= (int)sizeof path)
        return sg_error_set(err, SG_EIO, 0, 0, "output path for '%s' is too long", id);
    struct sg_atomic_file f;
    enum sg_status st = sg_atomic_open(&f, path, err);
    if (st != SG_OK)
        return st;
    if (iobuf != NULL)
        (void)setvbuf(f.fp, iobuf, _IOFBF, iobuf_size);
    if ((st = fn(f.fp, res, with_u, err)) != SG_OK) {
        sg_atomic_abort(&f);
        char why[sizeof err->msg];
        (void)snprintf(why, sizeof why, "%s", err ? err->msg : "");
        return sg_error_set(err, st, 0, 0, "cannot write '%s': %s (nothing was written for this test)", path,
                            why);
    }
    return sg_atomic_commit(&f, err);
}

/* Removes the per-test files already written when a later one fails, so a
 * test is either complete on disk or absent. */
static void remove_outputs(const char *dir, const char *id)
{
    static const char *const suffixes[] = {"points.csv", "summary.csv", "curve.csv", "png", "svg", "pdf",
                                           "report.pdf"};
    for (size_t i = 0; i < sizeof suffixes / sizeof suffixes[0]; i++) {
        char path[PATH_MAX];
        if (snprintf(path, sizeof path, "%s/%s.%s", dir, id, suffixes[i]) < (int)sizeof path)
            (void)unlink(path);
    }
}

/* Whether dir holds the per-test file <id>.<suffix>. */
static bool has_output(const char *dir, const char *id, const char *suffix)
{
    char path[PATH_MAX];
    struct stat st;
    return snprintf(path, sizeof path, "%s/%s.%s", dir, id, suffix) < (int)sizeof path && stat(path, &st) == 0;
}

static enum sg_status write_outputs(const struct reduce_cfg *cfg, const struct sg_record *rec,
                                    const struct sg_result *res, char *iobuf, size_t iobuf_size,
                                    struct sg_error *err)
{
    const bool with_u = cfg->mc_draws > 0;
    enum sg_status st = SG_OK;
    if (st == SG_OK && (cfg->outputs & OUT_POINTS))
        st = write_csv(cfg->out_dir, rec->id, "points.csv", sg_csvout_points, res, with_u, iobuf, iobuf_size,
                       err);
    if (st == SG_OK && (cfg->outputs & OUT_SUMMARY))
        st = write_csv(cfg->out_dir, rec->id, "summary.csv", sg_csvout_summary, res, with_u, iobuf, iobuf_size,
                       err);
    if (st == SG_OK && (cfg->outputs & OUT_CURVE))
        st = write_csv(cfg->out_dir, rec->id, "curve.csv", write_curve, res, with_u, iobuf, iobuf_size, err);
    for (int f = SG_PLOT_PNG; st == SG_OK && f <= SG_PLOT_PDF; f++) {
        if (!cfg->plot[f])
            continue;
        char path[PATH_MAX];
        if (snprintf(path, sizeof path, "%s/%s.%s", cfg->out_dir, rec->id,
                     sg_plot_extension((enum sg_plot_format)f)) >= (int)sizeof path)
            st = sg_error_set(err, SG_EIO, 0, 0, "output path for '%s' is too long", rec->id);
        else
            st = sg_plot_write(res, rec, (enum sg_plot_format)f, path, err);
    }
    if (st == SG_OK && cfg->report) {
        char path[PATH_MAX];
        /* the report names for its cut tables only the files written beside it */
        char points[SG_ID_MAX + 16], findings[SG_ID_MAX + 16];
        (void)snprintf(points, sizeof points, "%s.points.csv", rec->id);
        (void)snprintf(findings, sizeof findings, "%s.summary.csv", rec->id);
        const struct sg_report_files files = {
            (cfg->outputs & OUT_POINTS) ? points : NULL,
            (cfg->outputs & OUT_SUMMARY) ? findings : cfg->batch_summary ? "summary.csv" : NULL};
        if (snprintf(path, sizeof path, "%s/%s.report.pdf", cfg->out_dir, rec->id) >= (int)sizeof path)
            st = sg_error_set(err, SG_EIO, 0, 0, "output path for '%s' is too long", rec->id);
        else
            st = sg_report_write_with(res, rec, &files, path, err);
    }
    if (st != SG_OK)
        remove_outputs(cfg->out_dir, rec->id);
    return st;
}

static void report_locked(struct batch *b, const char *file, const struct sg_error *err)
{
    pthread_mutex_lock(&b->stderr_lock);
    sg_progress_clear(&b->progress);
    sg_cli_report(file, err);
    pthread_mutex_unlock(&b->stderr_lock);
}

/* What one worker keeps from record to record: the summary schema it last
 * used (a private copy of the names, so they are not joined and looked up
 * again for every record), a buffer for joining, and its spill file. */
struct worker_state {
    char *iobuf; /* WRITE_BUFFER_SIZE bytes for the per-test files' streams (NULL: stdio's own) */
    char *schema_names;
    size_t schema;
    char *buf;
    size_t cap;
    FILE *spill;
    size_t spill_index;
    off_t spill_end;
    struct sg_calibio_cache cal; /* this worker's register cache (no locks) */
};

/* Opens the worker's spill file on first use. */
static enum sg_status spill_open(struct batch *b, struct worker_state *w, struct sg_error *err)
{
    if (w->spill != NULL)
        return SG_OK;
    const size_t i = atomic_fetch_add(&b->n_spill, 1);
    char path[PATH_MAX];
    if (i >= MAX_WORKERS ||
        snprintf(path, sizeof path, "%s/.sedgrade-batch.XXXXXX", b->cfg->out_dir) >= (int)sizeof path)
        return sg_error_set(err, SG_EIO, 0, 0, "cannot keep the batch summary values (output path too long)");
    const int fd = mkstemp(path);
    FILE *fp = fd >= 0 ? fdopen(fd, "w+") : NULL;
    if (fp == NULL) {
        const int e = errno;
        if (fd >= 0)
            (void)close(fd);
        (void)unlink(path);
        return sg_error_set(err, SG_EIO, 0, 0, "cannot create a temporary file in '%s': %s", b->cfg->out_dir,
                            strerror(e));
    }
    (void)unlink(path);
    b->spill[i] = fp;
    w->spill = fp;
    w->spill_index = i;
    w->spill_end = 0;
    return SG_OK;
}

/* Records the test's summary schema and spills its values. */
static enum sg_status keep_summary(struct batch *b, struct worker_state *w, struct job *job,
                                   const struct sg_result *res, struct sg_error *err)
{
    if (w->schema_names == NULL || !same_names(res, w->schema_names)) {
        if (join_quantities(res, true, &w->buf, &w->cap) == (size_t)-1)
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
        char *names = strdup(w->buf);
        bool oom = names == NULL;
        const size_t schema = oom ? 0 : schema_intern(&b->schemas, names, &oom);
        if (oom) {
            free(names);
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
        }
        free(w->schema_names);
        w->schema_names = names;
        w->schema = schema;
    }
    const size_t len = join_quantities(res, false, &w->buf, &w->cap);
    if (len == (size_t)-1)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    enum sg_status st = spill_open(b, w, err);
    if (st != SG_OK)
        return st;
    if (fwrite(w->buf, 1, len, w->spill) != len)
        return sg_error_set(err, SG_EIO, 0, 0, "cannot keep the batch summary values: %s", strerror(errno));
    job->schema = w->schema;
    job->spill = w->spill_index;
    job->spill_off = w->spill_end;
    job->spill_len = len;
    job->has_values = true;
    w->spill_end += (off_t)len;
    return SG_OK;
}

/* What reduce does with one record before its id is claimed and its files
 * written, and all that check does: read it (every problem the reader finds
 * into diags, which may be NULL), look its instruments up in the register
 * through cal, and reduce it. rec must be initialised; on failure err says
 * where and why, and *read_ok (may be NULL) whether the record itself was
 * read (the failure came later, from the register or the reduction). */
static enum sg_status prepare_record(const char *path, struct sg_calibio_cache *cal,
                                     const struct sg_reduce_options *opt, struct sg_record *rec,
                                     struct sg_constants *k, struct sg_result *res, struct sg_diag_list *diags,
                                     bool *read_ok, struct sg_error *err)
{
    enum sg_status st = sg_recordio_load(path, rec, diags, err);
    if (read_ok != NULL)
        *read_ok = st == SG_OK;
    if (st == SG_OK)
        st = sg_calibio_resolve_cached(cal, rec, k, err);
    if (st == SG_OK)
        st = sg_reduce(rec, k, opt, res, err);
    return st;
}

/* The refusal of a record whose test id owner's record has already. */
static enum sg_status refuse_duplicate_id(const struct sg_record *rec, const char *owner, struct sg_error *err)
{
    return sg_error_set(err, SG_EINVAL, rec->pos_id.line, rec->pos_id.col,
                        "test id '%s' is also used by '%s' (give each test its own id)", rec->id, owner);
}

static void run_job(struct batch *b, struct worker_state *w, struct job *job, struct sg_record *rec,
                    struct sg_result *res)
{
    const struct reduce_cfg *cfg = b->cfg;
    struct sg_error err;
    struct sg_constants k;
    sg_error_clear(&err);
    sg_record_init(rec);
    enum sg_status st = prepare_record(job->path, &w->cal, &cfg->opt, rec, &k, res, NULL, NULL, &err);
    if (st == SG_OK && cfg->mc_draws > 0) {
        const struct sg_mc_options mc = {cfg->mc_draws, cfg->seed,
                                         b->n_jobs == 1 ? (unsigned)cfg->jobs : 1u};
        st = sg_mc_run(rec, &k, &cfg->opt, &mc, res, &err);
    }
    (void)snprintf(job->id, sizeof job->id, "%s", rec->id);
    if (st == SG_OK) {
        const char *owner = NULL;
        if (!id_claim(&b->ids, job->id, job->path, &owner))
            st = refuse_duplicate_id(rec, owner, &err);
    }
    if (st == SG_OK)
        st = write_outputs(cfg, rec, res, w->iobuf, w->iobuf ? WRITE_BUFFER_SIZE : 0, &err);
    if (st != SG_OK) {
        report_locked(b, job->path, &err);
        job->status = st == SG_EIO ? JOB_IO_FAILED : JOB_REFUSED;
        sg_record_release(rec);
        return;
    }
    const enum sg_severity worst = sg_result_worst(res);
    job->status = worst == SG_SEVERITY_FAILURE ? JOB_QC_FAILED
                  : worst == SG_SEVERITY_WARNING ? JOB_QC_WARNING
                                                 : JOB_OK;
    if (!cfg->quiet && worst >= SG_SEVERITY_WARNING) {
        pthread_mutex_lock(&b->stderr_lock);
        sg_progress_clear(&b->progress);
        for (size_t i = 0; i < res->n_flags; i++) {
            const struct sg_flag *f = &res->flags[i];
            if (f->severity < SG_SEVERITY_WARNING)
                continue;
            if (f->line > 0)
                fprintf(stderr, "sedgrade: %s:%u: qc %s %s: %s\n", job->path, f->line,
                        sg_severity_name(f->severity), f->name, f->message);
            else
                fprintf(stderr, "sedgrade: %s: qc %s %s: %s\n", job->path, sg_severity_name(f->severity),
                        f->name, f->message);
        }
        pthread_mutex_unlock(&b->stderr_lock);
    }
    if (keep_summary(b, w, job, res, &err) != SG_OK) {
        report_locked(b, job->path, &err);
        job->status = JOB_IO_FAILED;
    }
    sg_record_release(rec);
}

/* A test this run refused keeps no results of an earlier run beside the
 * others: the per-test files named by its id are removed, and said. Done
 * after every worker, for ids no test of this run reduced (a duplicate id
 * refused here belongs to a test whose files are this run's), and only
 * when this run writes per-test files (not with --outputs none). */
static void remove_stale_results(const struct batch *b, const struct reduce_cfg *cfg)
{
    if (cfg->outputs == 0)
        return;
    for (size_t i = 0; i < b->n_jobs; i++) {
        const struct job *job = &b->jobs[i];
        if (job->status != JOB_REFUSED || !sg_record_id_is_file_name(job->id))
            continue;
        if (b->ids.n_slots > 0 && *id_slot(&b->ids, job->id) != 0)
            continue;
        if (!has_output(cfg->out_dir, job->id, "summary.csv") && !has_output(cfg->out_dir, job->id, "points.csv"))
            continue;
        remove_outputs(cfg->out_dir, job->id);
        if (!cfg->quiet)
            fprintf(stderr,
                    "sedgrade: %s: removed the earlier results of test %s from %s (this run refused the test; "
                    "they no longer match its record)\n",
                    job->path, job->id, cfg->out_dir);
    }
}

static void *worker(void *arg)
{
    struct batch *b = arg;
    struct sg_record rec;
    struct sg_result res;
    struct worker_state w = {0};
    w.iobuf = malloc(WRITE_BUFFER_SIZE);
    sg_calibio_cache_init(&w.cal, b->cfg->register_dir);
    sg_record_init(&rec);
    sg_result_init(&res);
    for (;;) {
        const size_t i = atomic_fetch_add(&b->next, 1);
        if (i >= b->n_jobs)
            break;
        run_job(b, &w, &b->jobs[i], &rec, &res);
        pthread_mutex_lock(&b->stderr_lock);
        sg_progress_step(&b->progress);
        pthread_mutex_unlock(&b->stderr_lock);
    }
    sg_result_release(&res);
    sg_record_release(&rec);
    free(w.schema_names);
    free(w.buf);
    free(w.iobuf);
    sg_calibio_cache_release(&w.cal);
    return NULL;
}

/* ---- batch summary ---- */

static int cmp_job(const void *a, const void *b)
{
    const struct job *x = a, *y = b;
    const int c = strcmp(x->id, y->id);
    return c != 0 ? c : strcmp(x->path, y->path);
}

/* Splits a '\x1f'-joined list in place into fields; returns the count. */
static size_t split_fields(char *s, char **fields, size_t max)
{
    size_t n = 0;
    if (s == NULL)
        return 0;
    for (char *p = s; n < max;) {
        fields[n++] = p;
        char *q = strchr(p, '\x1f');
        if (q == NULL)
            break;
        *q = '\0';
        p = q + 1;
    }
    return n;
}

#define MAX_COLUMNS 512

/* The quantities SPEC.md says every per-test summary holds, in its order:
 * columns of the batch summary even when no test could be reduced (all
 * refused, or a full disk), so scripts reading it find them. */
static const char *const always_columns[] = {
    "d10_mm",   "d15_mm",   "d30_mm",     "d50_mm",        "d60_mm",        "d85_mm",
    "cu",       "cc",       "clay_pct",   "silt_pct",      "sand_pct",      "gravel_pct",
    "fines_pct", "usda_sand_pct", "usda_silt_pct", "usda_clay_pct", "usda_texture"};

static enum sg_status write_batch_summary(struct batch *b, struct sg_error *err)
{
    /* Columns: the union of quantity names in order of first appearance.
     * col_of[s * MAX_COLUMNS + j] is 1 + the position of column j among the
     * fields of schema s (0: absent), worked out once per schema. */
    char *cols[MAX_COLUMNS];
    size_t n_cols = 0;
    const size_t n_schemas = b->schemas.n;
    size_t *col_of = calloc((n_schemas ? n_schemas : 1) * MAX_COLUMNS, sizeof *col_of);
    size_t *n_fields = calloc(n_schemas ? n_schemas : 1, sizeof *n_fields);
    bool *identity = calloc(n_schemas ? n_schemas : 1, sizeof *identity);
    size_t *order = NULL;
    char *vals[MAX_COLUMNS];
    char *buf = NULL;
    size_t cap = 0;
    enum sg_status st = SG_OK;
    if (col_of == NULL || n_fields == NULL || identity == NULL) {
        st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory writing the batch summary");
        goto cleanup;
    }
    /* Schemas are taken in the order the (id-sorted) tests first use them, not
     * in the order the worker threads happened to record them, so the columns
     * are the same from run to run. */
    order = calloc(n_schemas ? n_schemas : 1, sizeof *order);
    bool *seen = calloc(n_schemas ? n_schemas : 1, sizeof *seen);
    size_t n_order = 0;
    if (order == NULL || seen == NULL) {
        free(seen);
        st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory writing the batch summary");
        goto cleanup;
    }
    for (size_t i = 0; i < b->n_jobs; i++) {
        const struct job *job = &b->jobs[i];
        if (job->has_values && job->schema < n_schemas && !seen[job->schema]) {
            seen[job->schema] = true;
            order[n_order++] = job->schema;
        }
    }
    for (size_t s = 0; s < n_schemas; s++)
        if (!seen[s])
            order[n_order++] = s;
    free(seen);
    for (size_t k = 0; k < n_order; k++) {
        const size_t s = order[k];
        char *fields[MAX_COLUMNS];
        char *copy = strdup(b->schemas.names[s]);
        if (copy == NULL) {
            st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory writing the batch summary");
            goto cleanup;
        }
        const size_t nf = split_fields(copy, fields, MAX_COLUMNS);
        n_fields[s] = nf;
        for (size_t i = 0; i < nf; i++) {
            size_t j = 0;
            while (j < n_cols && strcmp(cols[j], fields[i]) != 0)
                j++;
            if (j == n_cols && n_cols < MAX_COLUMNS) {
                if ((cols[n_cols] = strdup(fields[i])) == NULL) {
                    free(copy);
                    st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory writing the batch summary");
                    goto cleanup;
                }
                n_cols++;
            }
            if (j < n_cols)
                col_of[s * MAX_COLUMNS + j] = i + 1;
        }
        free(copy);
    }
    for (size_t i = 0; i < sizeof always_columns / sizeof always_columns[0] && n_cols < MAX_COLUMNS; i++) {
        size_t j = 0;
        while (j < n_cols && strcmp(cols[j], always_columns[i]) != 0)
            j++;
        if (j == n_cols) {
            if ((cols[n_cols] = strdup(always_columns[i])) == NULL) {
                st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory writing the batch summary");
                goto cleanup;
            }
            n_cols++;
        }
    }
    /* a schema whose fields are the columns in order (the usual case: one
     * kind of record) has its spilled values copied as they are */
    for (size_t s = 0; s < n_schemas; s++) {
        identity[s] = n_fields[s] == n_cols;
        for (size_t j = 0; identity[s] && j < n_cols; j++)
            identity[s] = col_of[s * MAX_COLUMNS + j] == j + 1;
    }
    const size_t n_spill = atomic_load(&b->n_spill);
    for (size_t w = 0; w < n_spill && w < MAX_WORKERS; w++)
        if (b->spill[w] != NULL && fflush(b->spill[w]) != 0) {
            st = sg_error_set(err, SG_EIO, 0, 0, "cannot keep the batch summary values: %s", strerror(errno));
            goto cleanup;
        }
    char path[PATH_MAX];
    if (snprintf(path, sizeof path, "%s/summary.csv", b->cfg->out_dir) >= (int)sizeof path) {
        st = sg_error_set(err, SG_EIO, 0, 0, "output path is too long");
        goto cleanup;
    }
    struct sg_atomic_file f;
    if ((st = sg_atomic_open(&f, path, err)) != SG_OK)
        goto cleanup;
    struct sg_csvout_row *row = malloc(sizeof *row);
    if (row == NULL) {
        sg_atomic_abort(&f);
        st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory writing the batch summary");
        goto cleanup;
    }
    *row = (struct sg_csvout_row){.fp = f.fp, .n = 0};
    sg_csvout_field(row, "id", true);
    sg_csvout_field(row, "status", false);
    sg_csvout_field(row, "file", false);
    for (size_t j = 0; j < n_cols; j++)
        sg_csvout_field(row, cols[j], false);
    sg_csvout_end_row(row);
    for (size_t i = 0; i < b->n_jobs; i++) {
        const struct job *job = &b->jobs[i];
        sg_csvout_field(row, job->id, true);
        sg_csvout_field(row, job_status_name(job->status), false);
        sg_csvout_field(row, job->path, false);
        size_t nv = 0;
        if (job->has_values) {
            if (job->spill_len + 1 > cap) {
                char *p = realloc(buf, job->spill_len + 1);
                if (p == NULL) {
                    sg_atomic_abort(&f);
                    free(row);
                    st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory writing the batch summary");
                    goto cleanup;
                }
                buf = p;
                cap = job->spill_len + 1;
            }
            if (pread(fileno(b->spill[job->spill]), buf, job->spill_len, job->spill_off) !=
                (ssize_t)job->spill_len) {
                sg_atomic_abort(&f);
                free(row);
                st = sg_error_set(err, SG_EIO, 0, 0, "cannot read back the batch summary values: %s",
                                  strerror(errno ? errno : EIO));
                goto cleanup;
            }
            buf[job->spill_len] = '\0';
            if (job->schema < n_schemas && identity[job->schema]) {
                for (size_t k = 0; k < job->spill_len; k++)
                    if (buf[k] == '\x1f')
                        buf[k] = ',';
                if (n_cols > 0)
                    sg_csvout_raw_field(row, buf, job->spill_len, false);
                sg_csvout_end_row(row);
                continue;
            }
            nv = split_fields(buf, vals, MAX_COLUMNS);
        }
        const size_t *map = &col_of[job->schema * MAX_COLUMNS];
        for (size_t j = 0; j < n_cols; j++) {
            const size_t q = nv > 0 ? map[j] : 0;
            const char *v = q > 0 && q <= nv ? vals[q - 1] : ""; /* quoted by the worker */
            sg_csvout_raw_field(row, v, strlen(v), false);
        }
        sg_csvout_end_row(row);
    }
    sg_csvout_flush(row);
    free(row);
    st = sg_atomic_commit(&f, err);
cleanup:
    for (size_t j = 0; j < n_cols; j++)
        free(cols[j]);
    free(order);
    free(col_of);
    free(n_fields);
    free(identity);
    free(buf);
    return st;
}

/* ---- options ---- */

static const char reduce_help[] =
    "usage: sedgrade reduce [OPTIONS] FILE|DIR...\n"
    "\n"
    "Reduces test records (folders are walked for *.csv) into grading results.\n"
    "\n"
    "  -o, --out DIR            output folder (created; default ./out)\n"
    "      --calibration DIR    instrument calibration register (default ./calibration)\n"
    "      --interp METHOD      loglinear (default: linear in log10 D, as on semi-log paper)\n"
    "                           or monotone (GSL Steffen on log10 D)\n"
    "      --plot FORMAT        grading-curve picture: svg, png or pdf (repeatable)\n"
    "      --report             one-page PDF report per test (<id>.report.pdf)\n"
    "      --mc N               Monte Carlo uncertainty with N draws (JCGM 101)\n"
    "      --seed S             random seed for --mc (default 1)\n"
    "  -j, --jobs N             threads (default: the number of processors)\n"
    "      --outputs LIST       per-test files: points,summary,curve (default), or none\n"
    "                           for no per-test file and the batch summary.csv alone\n"
    "      --dx LIST            extra D-values to report, percent finer (e.g. 5,90,95)\n"
    "      --strict             QC warnings fail the test (exit 1)\n"
    "      --junction-gap PCT   sieve/sedimentation junction gap limit (default 5)\n"
    "      --base-soil FILE     Terzaghi filter screen of each test over the base soil of FILE\n"
    "  -q, --quiet              no QC lines or tally on stderr\n"
    "  -h, --help               this help\n"
    "\n"
    "exit status: 0 all good; 1 results written but a test failed a QC rule;\n"
    "2 bad input or usage (nothing written for that test); 3 I/O failure.\n";

/* --outputs: a comma-separated list of points, summary and curve, or none
 * alone (no per-test files: the batch summary.csv only). */
#define OUTPUTS_HINT "give points, summary and curve separated by commas, or none alone for the batch summary.csv"
static bool parse_outputs(const char *text, unsigned *out)
{
    if (text[0] == '\0') {
        sg_cli_errorf("option --outputs: the list is empty (" OUTPUTS_HINT ")");
        return false;
    }
    unsigned v = 0;
    bool none = false;
    size_t n_items = 0;
    for (const char *p = text;; p++) {
        const size_t len = strcspn(p, ",");
        if (len == 0) {
            sg_cli_errorf("option --outputs: '%s' has an empty item (" OUTPUTS_HINT ")", text);
            return false;
        }
        if (len == 6 && strncmp(p, "points", len) == 0)
            v |= OUT_POINTS;
        else if (len == 7 && strncmp(p, "summary", len) == 0)
            v |= OUT_SUMMARY;
        else if (len == 5 && strncmp(p, "curve", len) == 0)
            v |= OUT_CURVE;
        else if (len == 4 && strncmp(p, "none", len) == 0)
            none = true;
        else {
            sg_cli_errorf("option --outputs: '%.*s' is not points, summary, curve or none (" OUTPUTS_HINT ")",
                          (int)len, p);
            return false;
        }
        n_items++;
        p += len;
        if (*p == '\0')
            break;
    }
    if (none && n_items > 1) {
        sg_cli_errorf("option --outputs: '%s' combines none with other outputs (" OUTPUTS_HINT ")", text);
        return false;
    }
    *out = v;
    return true;
}

static bool parse_dx(const char *text, struct reduce_cfg *cfg)
{
    char buf[512];
    if (snprintf(buf, sizeof buf, "%s", text) >= (int)sizeof buf) {
        sg_cli_errorf("option --dx: list too long");
        return false;
    }
    size_t n = 0;
    for (char *save = NULL, *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        if (n == MAX_DX) {
            sg_cli_errorf("option --dx: at most %d values", MAX_DX);
            return false;
        }
        if (!sg_cli_parse_double("--dx", tok, 0.1, 99.9, &cfg->dx[n]))
            return false;
        n++;
    }
    cfg->opt.extra_dx = cfg->dx;
    cfg->opt.n_extra_dx = n;
    return true;
}

enum opt_id { OPT_CAL = 256, OPT_INTERP, OPT_PLOT, OPT_REPORT, OPT_MC, OPT_SEED, OPT_OUTPUTS, OPT_DX,
              OPT_STRICT, OPT_GAP, OPT_BASE };

/* Parses reduce's options; returns -1 to go on, else an exit status. */
static int parse_options(int argc, char **argv, struct reduce_cfg *cfg)
{
    static const struct option longopts[] = {
        {"out", required_argument, NULL, 'o'},       {"calibration", required_argument, NULL, OPT_CAL},
        {"interp", required_argument, NULL, OPT_INTERP}, {"plot", required_argument, NULL, OPT_PLOT},
        {"report", no_argument, NULL, OPT_REPORT},   {"mc", required_argument, NULL, OPT_MC},
        {"seed", required_argument, NULL, OPT_SEED}, {"jobs", required_argument, NULL, 'j'},
        {"outputs", required_argument, NULL, OPT_OUTPUTS}, {"dx", required_argument, NULL, OPT_DX},
        {"strict", no_argument, NULL, OPT_STRICT},   {"junction-gap", required_argument, NULL, OPT_GAP},
        {"quiet", no_argument, NULL, 'q'},           {"help", no_argument, NULL, 'h'},
        {"base-soil", required_argument, NULL, OPT_BASE}, {NULL, 0, NULL, 0}};
    long ncpu = sysconf(_SC_NPROCESSORS_ONLN);
    cfg->out_dir = "out";
    cfg->register_dir = "calibration";
    cfg->opt = sg_reduce_options_default();
    cfg->outputs = OUT_POINTS | OUT_SUMMARY | OUT_CURVE;
    cfg->seed = 1;
    cfg->jobs = ncpu > 0 ? (size_t)ncpu : 1;
    optind = 1;
    opterr = 0;
    int c;
    double d = 0.0;
    size_t z = 0;
    while ((c = getopt_long(argc, argv, ":o:j:qh", longopts, NULL)) != -1) {
        switch (c) {
        case 'o': cfg->out_dir = optarg; break;
        case OPT_CAL: cfg->register_dir = optarg; break;
        case OPT_INTERP:
            if (strcmp(optarg, "loglinear") == 0)
                cfg->opt.interp = SG_INTERP_LOGLINEAR;
            else if (strcmp(optarg, "monotone") == 0)
                cfg->opt.interp = SG_INTERP_MONOTONE;
            else {
                sg_cli_errorf("option --interp: '%s' is not loglinear or monotone", optarg);
                return SG_EXIT_INPUT;
            }
            break;
        case OPT_PLOT:
            if (strcmp(optarg, "png") == 0)
                cfg->plot[SG_PLOT_PNG] = true;
            else if (strcmp(optarg, "svg") == 0)
                cfg->plot[SG_PLOT_SVG] = true;
            else if (strcmp(optarg, "pdf") == 0)
                cfg->plot[SG_PLOT_PDF] = true;
            else {
                sg_cli_errorf("option --plot: '%s' is not svg, png or pdf", optarg);
                return SG_EXIT_INPUT;
            }
            break;
        case OPT_REPORT: cfg->report = true; break;
        case OPT_MC:
            if (!sg_cli_parse_size("--mc", optarg, 2, 10000000, &cfg->mc_draws))
                return SG_EXIT_INPUT;
            break;
        case OPT_SEED:
            if (!sg_cli_parse_size("--seed", optarg, 0, (size_t)ULONG_MAX, &z))
                return SG_EXIT_INPUT;
            cfg->seed = (unsigned long)z;
            break;
        case 'j':
            if (!sg_cli_parse_size("--jobs", optarg, 1, 256, &cfg->jobs))
                return SG_EXIT_INPUT;
            break;
        case OPT_OUTPUTS:
            if (!parse_outputs(optarg, &cfg->outputs))
                return SG_EXIT_INPUT;
            break;
        case OPT_DX:
            if (!parse_dx(optarg, cfg))
                return SG_EXIT_INPUT;
            break;
        case OPT_STRICT: cfg->opt.qc.strict = true; break;
        case OPT_GAP:
            if (!sg_cli_parse_double("--junction-gap", optarg, 0.0, 100.0, &d))
                return SG_EXIT_INPUT;
            cfg->opt.qc.junction_gap_max_pct = d;
            break;
        case OPT_BASE: cfg->base_soil = optarg; break;
        case 'q': cfg->quiet = true; break;
        case 'h': fputs(reduce_help, stdout); return SG_EXIT_OK;
        case ':': sg_cli_errorf("option %s needs a value (see 'sedgrade reduce --help')", argv[optind - 1]);
            return SG_EXIT_INPUT;
        default:
            sg_cli_errorf("unknown option '%s' (see 'sedgrade reduce --help')", argv[optind - 1]);
            return SG_EXIT_INPUT;
        }
    }
    if (optind >= argc) {
        sg_cli_errorf("no test records given (usage: sedgrade reduce [OPTIONS] FILE|DIR...)");
        return SG_EXIT_INPUT;
    }
    return -1;
}

/* --base-soil: reduces that record (register constants as for any test) and
 * puts its D15 and D85 into the options, for Terzaghi's filter screen. */
static int load_base_soil(struct reduce_cfg *cfg)
{
    struct sg_record rec;
    struct sg_result res;
    struct sg_constants k;
    struct sg_error err;
    sg_error_clear(&err);
    sg_record_init(&rec);
    sg_result_init(&res);
    enum sg_status st = sg_recordio_load(cfg->base_soil, &rec, NULL, &err);
    if (st == SG_OK)
        st = sg_calibio_resolve(cfg->register_dir, &rec, &k, &err);
    if (st == SG_OK)
        st = sg_reduce(&rec, &k, &cfg->opt, &res, &err);
    int rc = -1;
    if (st != SG_OK) {
        sg_cli_report(cfg->base_soil, &err);
        sg_cli_errorf("the base soil '%s' could not be reduced (fix it, or leave out --base-soil)", cfg->base_soil);
        rc = sg_cli_exit_for(st);
    } else {
        const struct sg_quantity *d15 = sg_result_quantity(&res, "d15_mm"), *d85 = sg_result_quantity(&res, "d85_mm");
        if (d85 == NULL || !d85->determined) {
            sg_cli_errorf("%s: the filter screen needs the base soil's D85, and its curve gives none (%s)",
                          cfg->base_soil, d85 != NULL ? d85->note : "no D85 row");
            rc = SG_EXIT_INPUT;
        } else {
            cfg->opt.has_base_soil = true;
            cfg->opt.base_d15_mm = d15 != NULL && d15->determined ? d15->value : (double)NAN;
            cfg->opt.base_d85_mm = d85->value;
            (void)snprintf(cfg->opt.base_soil_id, sizeof cfg->opt.base_soil_id, "%s", rec.id);
            const struct sg_quantity *qs = sg_result_quantity(&res, "qc_status");
            cfg->opt.base_soil_qc_failed = qs != NULL && qs->is_text && strcmp(qs->text, "failed") == 0;
            const struct sg_quantity *qf = sg_result_quantity(&res, "qc_flags");
            if (cfg->opt.base_soil_qc_failed)
                sg_cli_errorf("%s: warning: the base soil failed its own QC rules (%s); the filter screens "
                              "over it are flagged base_soil_qc",
                              cfg->base_soil, qf != NULL && qf->is_text ? qf->text : "see its QC flags");
        }
    }
    sg_result_release(&res);
    sg_record_release(&rec);
    return rc;
}

int sg_cli_reduce(int argc, char **argv)
{
    struct reduce_cfg cfg;
    memset(&cfg, 0, sizeof cfg);
    const int early = parse_options(argc, argv, &cfg);
    if (early >= 0)
        return early;
    /* Notes are read only from the per-test summary and the report: without
     * them (e.g. --outputs none for an archive) none is formatted. */
    cfg.opt.skip_notes = !(cfg.outputs & OUT_SUMMARY) && !cfg.report;
    if (cfg.base_soil != NULL) {
        const int rc = load_base_soil(&cfg);
        if (rc >= 0)
            return rc;
    }

    struct collection input = {0};
    if (!collect(argv + optind, argc - optind, cfg.out_dir, &input)) {
        sg_cli_errorf("out of memory listing the test records");
        collection_release(&input);
        return SG_EXIT_IO;
    }
    if (!cfg.quiet)
        note_repeats(&input);
    const struct path_list files = input.files;
    const size_t walk_problems = input.problems;
    cfg.batch_summary = files.n > 1 || cfg.outputs == 0;
    if (files.n == 0) {
        sg_cli_errorf("no test records (*.csv) found in the given paths");
        collection_release(&input);
        return SG_EXIT_INPUT;
    }
    struct sg_error err;
    if (sg_mkdir_p(cfg.out_dir, &err) != SG_OK) {
        sg_cli_report(NULL, &err);
        collection_release(&input);
        return SG_EXIT_IO;
    }
    if (cfg.plot[SG_PLOT_PNG] || cfg.plot[SG_PLOT_SVG] || cfg.plot[SG_PLOT_PDF] || cfg.report) {
        /* charts are still drawn with another face, but say so once */
        char family[128];
        if (sg_plot_font_check(family, sizeof family, &err) != SG_OK)
            sg_cli_errorf("warning: %s", err.msg);
    }

    struct batch b;
    memset(&b, 0, sizeof b);
    b.cfg = &cfg;
    b.n_jobs = files.n;
    b.jobs = calloc(files.n, sizeof *b.jobs);
    if (b.jobs == NULL) {
        sg_cli_errorf("out of memory for %zu test records", files.n);
        collection_release(&input);
        return SG_EXIT_IO;
    }
    for (size_t i = 0; i < files.n; i++)
        b.jobs[i].path = files.items[i];
    atomic_init(&b.next, 0);
    atomic_init(&b.n_spill, 0);
    pthread_mutex_init(&b.schemas.lock, NULL);
    pthread_mutex_init(&b.ids.lock, NULL);
    pthread_mutex_init(&b.stderr_lock, NULL);
    sg_progress_init(&b.progress, b.n_jobs, "reduced");

    size_t n_threads = cfg.jobs < files.n ? cfg.jobs : files.n;
    pthread_t *threads = calloc(n_threads, sizeof *threads);
    size_t started = 0;
    for (; threads != NULL && started + 1 < n_threads; started++)
        if (pthread_create(&threads[started], NULL, worker, &b) != 0)
            break;
    worker(&b); /* the main thread works too */
    for (size_t i = 0; i < started; i++)
        pthread_join(threads[i], NULL);
    free(threads);
    sg_progress_finish(&b.progress);

    remove_stale_results(&b, &cfg);
    size_t n_ok = 0, n_flagged = 0, n_failed_qc = 0, n_refused = 0, n_io = 0;
    for (size_t i = 0; i < b.n_jobs; i++) {
        switch (b.jobs[i].status) {
        case JOB_OK: n_ok++; break;
        case JOB_QC_WARNING: n_ok++; n_flagged++; break;
        case JOB_QC_FAILED: n_ok++; n_flagged++; n_failed_qc++; break;
        case JOB_REFUSED: n_refused++; break;
        case JOB_IO_FAILED: n_io++; break;
        }
    }
    if (cfg.opt.qc.strict)
        for (size_t i = 0; i < b.n_jobs; i++)
            if (b.jobs[i].status == JOB_QC_WARNING) {
                b.jobs[i].status = JOB_QC_FAILED;
                n_failed_qc++;
            }

    int rc = SG_EXIT_OK;
    /* the batch summary: for more than one test, and always with --outputs
     * none, where it is the only result file */
    if (cfg.batch_summary) {
        qsort(b.jobs, b.n_jobs, sizeof *b.jobs, cmp_job);
        if (write_batch_summary(&b, &err) != SG_OK) {
            sg_cli_report(NULL, &err);
            rc = SG_EXIT_IO;
        }
    }
    if (!cfg.quiet)
        fprintf(stderr, "sedgrade: %zu reduced (%zu QC-flagged, %zu QC-failed), %zu refused%s; results in %s\n",
                n_ok, n_flagged, n_failed_qc, n_refused + walk_problems,
                n_io ? ", some not written (I/O errors)" : "", cfg.out_dir);
    if (rc == SG_EXIT_OK)
        rc = n_io ? SG_EXIT_IO : (n_refused + walk_problems) ? SG_EXIT_INPUT : n_failed_qc ? SG_EXIT_QC : SG_EXIT_OK;

    for (size_t w = 0; w < atomic_load(&b.n_spill) && w < MAX_WORKERS; w++)
        if (b.spill[w] != NULL)
            (void)fclose(b.spill[w]);
    free(b.jobs);
    for (size_t i = 0; i < b.schemas.n; i++)
        free(b.schemas.names[i]);
    free(b.schemas.names);
    id_set_release(&b.ids);
    pthread_mutex_destroy(&b.schemas.lock);
    pthread_mutex_destroy(&b.stderr_lock);
    collection_release(&input);
    return rc;
}

/* ---- check ---- */

static const char check_help[] =
    "usage: sedgrade check [OPTIONS] FILE|DIR...\n"
    "\n"
    "Validates test records as reduce would, short of writing: each record is read,\n"
    "its instruments are looked up in the register and it is reduced (default\n"
    "reduction options). Lists every problem found (file:line:column) and every\n"
    "test id used by two records; writes nothing.\n"
    "\n"
    "      --calibration DIR    instrument calibration register (default ./calibration)\n"
    "  -h, --help               this help\n"
    "\n"
    "exit status: 0 every record is valid; 2 at least one problem; 3 I/O failure.\n";

int sg_cli_check(int argc, char **argv)
{
    static const struct option longopts[] = {{"calibration", required_argument, NULL, OPT_CAL},
                                             {"help", no_argument, NULL, 'h'},
                                             {NULL, 0, NULL, 0}};
    const char *register_dir = "calibration";
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":h", longopts, NULL)) != -1) {
        switch (c) {
        case OPT_CAL: register_dir = optarg; break;
        case 'h': fputs(check_help, stdout); return SG_EXIT_OK;
        case ':': sg_cli_errorf("option %s needs a value", argv[optind - 1]); return SG_EXIT_INPUT;
        default:
            sg_cli_errorf("unknown option '%s' (see 'sedgrade check --help')", argv[optind - 1]);
            return SG_EXIT_INPUT;
        }
    }
    if (optind >= argc) {
        sg_cli_errorf("no test records given (usage: sedgrade check FILE|DIR...)");
        return SG_EXIT_INPUT;
    }
    struct collection input = {0};
    if (!collect(argv + optind, argc - optind, NULL, &input)) {
        sg_cli_errorf("out of memory listing the test records");
        collection_release(&input);
        return SG_EXIT_IO;
    }
    note_repeats(&input);
    const struct path_list files = input.files;
    if (files.n == 0 && input.problems == 0) {
        sg_cli_errorf("no test records (*.csv) found in the given paths");
        collection_release(&input);
        return SG_EXIT_INPUT;
    }
    int rc = input.problems ? SG_EXIT_INPUT : SG_EXIT_OK;
    /* the ids of the records that passed, claimed as reduce claims them */
    char(*ids)[SG_ID_MAX] = calloc(files.n ? files.n : 1, sizeof *ids);
    struct id_set claimed = {0};
    if (ids == NULL) {
        sg_cli_errorf("out of memory for %zu test records", files.n);
        collection_release(&input);
        return SG_EXIT_IO;
    }
    pthread_mutex_init(&claimed.lock, NULL);
    const struct sg_reduce_options opt = sg_reduce_options_default();
    struct sg_calibio_cache cal;
    sg_calibio_cache_init(&cal, register_dir);
    struct sg_record rec;
    struct sg_result res;
    sg_result_init(&res);
    for (size_t i = 0; i < files.n; i++) {
        struct sg_diag_list diags = {0};
        struct sg_error err;
        struct sg_constants k;
        sg_error_clear(&err);
        sg_record_init(&rec);
        bool read_ok = false;
        enum sg_status st = prepare_record(files.items[i], &cal, &opt, &rec, &k, &res, &diags, &read_ok, &err);
        if (st == SG_OK) {
            const char *owner = NULL;
            (void)snprintf(ids[i], sizeof ids[i], "%s", rec.id);
            if (!id_claim(&claimed, ids[i], files.items[i], &owner))
                st = refuse_duplicate_id(&rec, owner, &err);
        }
        /* the reader lists its own problems; a refusal after reading is one more */
        if (st != SG_OK && (read_ok || diags.n == 0))
            (void)sg_diag_add(&diags, &err);
        for (size_t j = 0; j < diags.n; j++)
            sg_cli_report(files.items[i], &diags.items[j]);
        if (st == SG_OK)
            printf("%s: ok (%s, %zu rows)\n", files.items[i], rec.id,
                   rec.n_sieve + rec.n_fine_sieve + rec.n_readings + rec.n_pipettes);
        else {
            printf("%s: %zu problem%s\n", files.items[i], diags.n, diags.n == 1 ? "" : "s");
            const int e = sg_cli_exit_for(st);
            if (e > rc)
                rc = e;
        }
        sg_diag_release(&diags);
        sg_record_release(&rec);
    }
    sg_result_release(&res);
    id_set_release(&claimed);
    free(ids);
    sg_calibio_cache_release(&cal);
    collection_release(&input);
    return rc;
}
