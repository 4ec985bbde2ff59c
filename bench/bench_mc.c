/* bench_mc.c - Monte Carlo throughput: one sg_reduce call, then 10 000 and
 * 1 000 000 draws (the JCGM 101 default) of a 12-reading hydrometer record
 * with a 10-sieve splice (the figure the targets are judged on), and the
 * same 12 readings without the sieves (the hydrometer part alone), timed
 * with clock_gettime(CLOCK_MONOTONIC): best and median of several runs
 * (5 of 10 000 draws, 3 of 1 000 000), since other work on the machine
 * only ever slows a run down.
 * Usage: bench_mc [threads [draws]] (threads default: the online
 * processors). Prints one "bench_mc: ..." line per figure; the targets are
 * 50 ms for 10 000 draws and 3 s for 1 000 000 draws on 2 cores, judged on
 * the best run. With draws, only one run of that many draws of the record
 * with sieves, and nothing else: for counting instructions per draw, e.g.
 * valgrind --tool=callgrind build/bench/bench_mc 1 20000 (DEVELOPERS.md).
 * Exit 0 unless a run fails. */
#include <gsl/gsl_errno.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "sedgrade/mc.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* A typical 152H-type test on the material passing 2 mm (benchmark input
 * built in code; the shape of a silty clay's readings, not a real test). */
static int build_record(struct sg_record *rec, bool with_sieves)
{
    static const double sieve[][2] = {{37.5, 0.0},  {20.0, 41.3}, {10.0, 77.9}, {6.3, 58.2},
                                      {2.0, 104.6}, {1.18, 55.0}, {0.6, 66.8},  {0.425, 35.1},
                                      {0.212, 90.2}, {0.063, 118.7}};
    static const double rows[][3] = {{0.5, 44.0, 20.8}, {1, 41.5, 20.8},   {2, 38.5, 20.9},
                                     {4, 35.5, 20.9},   {8, 33.0, 21.0},   {15, 30.5, 21.1},
                                     {30, 28.0, 21.2},  {60, 25.5, 21.4},  {120, 23.0, 21.6},
                                     {250, 20.5, 21.8}, {480, 18.5, 21.9}, {1440, 15.5, 21.5}};
    sg_record_init(rec);
    (void)snprintf(rec->id, sizeof rec->id, "bench-12");
    rec->pos_id = (struct sg_srcpos){1, 1};
    rec->method = SG_METHOD_HYDROMETER;
    rec->scale = SG_SCALE_G_PER_L;
    rec->particle_density_mg_m3 = 2.68;
    rec->pos_particle_density = (struct sg_srcpos){2, 1};
    rec->sample_dry_mass_g = 1712.5;
    rec->pos_sample_mass = (struct sg_srcpos){3, 1};
    rec->split_aperture_mm = 2.0;
    rec->pos_split_aperture = (struct sg_srcpos){4, 1};
    rec->specimen_dry_mass_g = 50.08;
    rec->pos_specimen_mass = (struct sg_srcpos){5, 1};
    rec->has_depth_line = true;
    rec->depth_line_mm[0] = 162.95; /* 152H-type line, METHODS.md 13.10 V2-A */
    rec->depth_line_mm[1] = -1.64;
    rec->pos_depth_line = (struct sg_srcpos){6, 1};
    rec->has_meniscus = true;
    rec->meniscus_correction = 1.0;
    rec->has_composite = true;
    rec->composite_correction = 5.0;
    unsigned line = 10;
    if (!with_sieves) /* the specimen is the whole sample: every particle passes the split sieve */
        rec->sample_dry_mass_g = rec->specimen_dry_mass_g;
    for (size_t i = 0; with_sieves && i < sizeof sieve / sizeof sieve[0]; i++) {
        struct sg_sieve_row s = {sieve[i][0], sieve[i][1], {line++, 1}};
        if (sg_record_add_sieve(rec, s) != SG_OK)
            return -1;
    }
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
        struct sg_reading_row r = {rows[i][0], rows[i][1], rows[i][2], false, 0.0, {line++, 1}, 0};
        if (sg_record_add_reading(rec, r) != SG_OK)
            return -1;
    }
    return 0;
}

static int run(const struct sg_record *rec, size_t draws, unsigned threads, double *seconds)
{
    struct sg_result res;
    struct sg_error err;
    sg_result_init(&res);
    if (sg_reduce(rec, NULL, NULL, &res, &err) != SG_OK) {
        fprintf(stderr, "bench_mc: reduction failed: %s\n", err.msg);
        sg_result_release(&res);
        return -1;
    }
    const struct sg_mc_options mc = {.draws = draws, .seed = 20261012ul, .threads = threads};
    const double t0 = now_s();
    const enum sg_status st = sg_mc_run(rec, NULL, NULL, &mc, &res, &err);
    *seconds = now_s() - t0;
    sg_result_release(&res);
    if (st != SG_OK) {
        fprintf(stderr, "bench_mc: Monte Carlo failed: %s\n", err.msg);
        return -1;
    }
    return 0;
}

static int by_value(const void *a, const void *b)
{
    const double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Times runs of draws; best and median seconds. */
static int timed(const struct sg_record *rec, size_t draws, unsigned threads, size_t runs, double *best,
                 double *median)
{
    double t[5];
    if (runs > sizeof t / sizeof t[0])
        runs = sizeof t / sizeof t[0];
    for (size_t i = 0; i < runs; i++)
        if (run(rec, draws, threads, &t[i]) != 0)
            return -1;
    qsort(t, runs, sizeof t[0], by_value);
    *best = t[0];
    *median = t[runs / 2];
    return 0;
}

/* The figures of one record; target says whether the targets are judged on it. */
static int bench_record(bool with_sieves, unsigned threads, bool target)
{
    struct sg_record rec;
    if (build_record(&rec, with_sieves) != 0) {
        fprintf(stderr, "bench_mc: out of memory\n");
        return 2;
    }
    const char *what = with_sieves ? "12 hydrometer readings + 10 sieves" : "12 hydrometer readings, no sieves";

    /* one reduction, the unit of work of every draw */
    struct sg_result res;
    struct sg_error err;
    sg_result_init(&res);
    const size_t reps = 20000;
    double t0 = now_s();
    for (size_t i = 0; i < reps; i++)
        if (sg_reduce(&rec, NULL, NULL, &res, &err) != SG_OK) {
            fprintf(stderr, "bench_mc: reduction failed: %s\n", err.msg);
            sg_result_release(&res);
            sg_record_release(&rec);
            return 1;
        }
    const double per_reduce = (now_s() - t0) / (double)reps;
    printf("bench_mc: record: %s (built in code), %zu points, %zu summary quantities\n", what, res.n_points,
           res.n_quantities);
    sg_result_release(&res);
    printf("bench_mc: sg_reduce: %.2f us per call (1 thread)\n", per_reduce * 1e6);

    int rc = 0;
    double best = 0.0, median = 0.0;
    if (timed(&rec, 10000, threads, 5, &best, &median) != 0)
        rc = 1;
    else
        printf("bench_mc: 10000 draws, %u threads: best %.1f ms, median %.1f ms of 5, %.0f draws/s%s\n", threads,
               best * 1e3, median * 1e3, 10000.0 / best,
               !target ? "" : best < 0.050 ? " (target < 50 ms: met)" : " (target < 50 ms: NOT met)");
    if (rc == 0 && timed(&rec, 1000000, threads, 3, &best, &median) != 0)
        rc = 1;
    else if (rc == 0)
        printf("bench_mc: 1000000 draws, %u threads: best %.3f s, median %.3f s of 3, %.0f draws/s%s\n", threads,
               best, median, 1e6 / best,
               !target ? "" : best < 3.0 ? " (target < 3 s: met)" : " (target < 3 s: NOT met)");
    sg_record_release(&rec);
    return rc;
}

int main(int argc, char **argv)
{
    gsl_set_error_handler_off();
    long ncpu = sysconf(_SC_NPROCESSORS_ONLN);
    unsigned threads = ncpu > 0 ? (unsigned)ncpu : 1u;
    if (argc > 1) {
        char *end = NULL;
        const unsigned long t = strtoul(argv[1], &end, 10);
        if (end == argv[1] || *end != '\0' || t < 1 || t > 256) {
            fprintf(stderr, "bench_mc: threads must be 1-256, got '%s'\n", argv[1]);
            return 2;
        }
        threads = (unsigned)t;
    }
    if (argc > 2) { /* one run, for a profiler */
        char *end = NULL;
        const unsigned long long n = strtoull(argv[2], &end, 10);
        if (end == argv[2] || *end != '\0' || n < 2 || n > 10000000ull) {
            fprintf(stderr, "bench_mc: draws must be 2-10000000, got '%s'\n", argv[2]);
            return 2;
        }
        struct sg_record rec;
        if (build_record(&rec, true) != 0) {
            fprintf(stderr, "bench_mc: out of memory\n");
            return 2;
        }
        double s = 0.0;
        const int rc = run(&rec, (size_t)n, threads, &s);
        if (rc == 0)
            printf("bench_mc: %llu draws, %u threads: %.3f s\n", n, threads, s);
        sg_record_release(&rec);
        return rc == 0 ? 0 : 1;
    }
    int rc = bench_record(true, threads, true);
    if (rc == 0)
        rc = bench_record(false, threads, false);
    return rc;
}
