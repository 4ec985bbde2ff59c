/* mc.c - Monte Carlo uncertainty (JCGM 101:2008): draws of the inputs, each
 * re-running sg_reduce, summarised as standard deviations, probabilistically
 * symmetric coverage intervals and class probabilities. */
#include "sedgrade/mc.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Most distinct classes counted per categorical quantity; more are counted
 * as "other" (the 12 USDA classes plus "not determined" fit). */
#define CAT_MAX 24

/* NAN is a float constant; -Wdouble-promotion wants it as a double. */
#define NO_VALUE ((double)NAN)

/* ---- budget ------------------------------------------------------------ */

static struct sg_mc_input pick(double record_u, double register_u, double default_u)
{
    if (record_u >= 0.0 && isfinite(record_u))
        return (struct sg_mc_input){record_u, SG_MC_FROM_RECORD};
    if (register_u > 0.0 && isfinite(register_u))
        return (struct sg_mc_input){register_u, SG_MC_FROM_REGISTER};
    return (struct sg_mc_input){default_u, SG_MC_FROM_DEFAULT};
}

void sg_mc_budget_resolve(const struct sg_record *rec, const struct sg_constants *k,
                          struct sg_mc_budget *b)
{
    struct sg_constants inline_k;
    if (k == NULL) {
        sg_constants_from_record(rec, &inline_k);
        k = &inline_k;
    }
    const struct sg_record_u *u = &rec->u;
    memset(b, 0, sizeof *b);
    /* the defaults in reading units are per division: the register's, else
     * one reading unit */
    const double div = k->scale_division > 0.0 && isfinite(k->scale_division) ? k->scale_division : 1.0;
    if (u->reading >= 0.0 && isfinite(u->reading)) {
        b->reading_half_width = 0.0;
        b->reading = (struct sg_mc_input){u->reading, SG_MC_FROM_RECORD};
    } else {
        b->reading_half_width = SG_MC_READING_RESOLUTION_HALF_WIDTH * div;
        b->reading = (struct sg_mc_input){SG_MC_U_READING_REPEAT * div, SG_MC_FROM_DEFAULT};
    }
    b->temp_c = pick(u->temp_c, 0.0, SG_MC_U_TEMP_C);
    b->elapsed_min = pick(u->elapsed_min, 0.0, SG_MC_U_ELAPSED_MIN);
    b->mass_g = pick(u->mass_g, 0.0, SG_MC_U_MASS_G);
    b->particle_density_mg_m3 = pick(u->particle_density_mg_m3, 0.0, SG_MC_U_PARTICLE_DENSITY_MG_M3);
    b->blank_row = pick(u->blank_reading, 0.0, SG_MC_U_BLANK * div);
    b->blank_test = pick(u->blank_reading, k->blank_u, SG_MC_U_BLANK * div);
    b->meniscus = pick(u->meniscus_correction, k->meniscus_u, SG_MC_U_MENISCUS * div);
    const bool have_cov = k->depth_cov[0] > 0.0 && isfinite(k->depth_cov[0]) && isfinite(k->depth_cov[1]) &&
                          isfinite(k->depth_cov[2]) && k->depth_cov[2] >= 0.0;
    if (u->depth_mm >= 0.0 && isfinite(u->depth_mm)) {
        b->depth_c0_mm = (struct sg_mc_input){u->depth_mm, SG_MC_FROM_RECORD};
    } else if (have_cov) {
        b->depth_c0_mm = (struct sg_mc_input){sqrt(k->depth_cov[0]), SG_MC_FROM_REGISTER};
        memcpy(b->depth_cov, k->depth_cov, sizeof b->depth_cov);
    } else {
        b->depth_c0_mm = (struct sg_mc_input){SG_MC_U_DEPTH_MM, SG_MC_FROM_DEFAULT};
    }
    b->pipette_volume_ml = pick(u->pipette_volume_ml, k->pipette_volume_u_ml, SG_MC_U_PIPETTE_VOLUME_ML);
    b->solids_g = pick(u->solids_g, 0.0, SG_MC_U_SOLIDS_G);
    b->sampling_depth_mm = pick(u->depth_mm, 0.0, SG_MC_U_DEPTH_MM);
}

const char *sg_mc_origin_name(enum sg_mc_origin o)
{
    switch (o) {
    case SG_MC_FROM_DEFAULT: return "default";
    case SG_MC_FROM_RECORD: return "record";
    case SG_MC_FROM_REGISTER: return "register";
    }
    return "";
}

bool sg_mc_coverage_indices(size_t m, double p, size_t *r, size_t *q)
{
    if (m < 2 || !(p > 0.0 && p < 1.0))
        return false;
    size_t qq = (size_t)floor(p * (double)m + 0.5);
    if (qq < 1)
        qq = 1;
    if (qq > m - 1)
        qq = m - 1;
    size_t rr = (m - qq) % 2 == 0 ? (m - qq) / 2 : (m - qq + 1) / 2;
    if (rr < 1)
        rr = 1;
    if (rr + qq > m)
        rr = m - qq;
    *r = rr;
    *q = qq;
    return true;
}

void sg_mc_detail_init(struct sg_mc_detail *d)
{
    memset(d, 0, sizeof *d);
}

void sg_mc_detail_release(struct sg_mc_detail *d)
{
    if (d == NULL)
        return;
    free(d->points);
    sg_mc_detail_init(d);
}

/* ---- accumulators -------------------------------------------------------- */

/* Count and the sums of the deviations d = x - shift and of d^2, shift
 * being the nominal value: sums of small deviations keep their precision
 * (no cancellation unless the mean is many standard deviations from the
 * nominal) and blocks combine by plain addition, always in block order. */
struct moments {
    double n, s1, s2;
};

static void moments_add(struct moments *m, double d)
{
    m->n += 1.0;
    m->s1 += d;
    m->s2 += d * d;
}

static void moments_merge(struct moments *a, const struct moments *b)
{
    a->n += b->n;
    a->s1 += b->s1;
    a->s2 += b->s2;
}

static double moments_mean(const struct moments *m, double shift)
{
    return m->n > 0.0 ? shift + m->s1 / m->n : NO_VALUE;
}

/* Standard deviation with the M - 1 divisor (JCGM 101 7.6). */
static double moments_sd(const struct moments *m)
{
    if (m->n < 2.0)
        return NO_VALUE;
    const double ss = m->s2 - m->s1 * m->s1 / m->n;
    return ss > 0.0 ? sqrt(ss / (m->n - 1.0)) : 0.0;
}

/* A superset of the k smallest values seen: the lower tail needed for the
 * order statistic y_(r) (the upper tail is kept as the smallest of -y).
 * Values below the threshold are appended; when the buffer is full it is
 * partitioned so that its first k entries are the k smallest, and the
 * threshold becomes the k-th smallest. The k smallest values (hence every
 * order statistic up to k) do not depend on the order of the additions. */
struct tail {
    double *v;
    size_t n, k, cap;
    double thresh;
};

/* Rearranges v[0..n) so that v[k] is the (k+1)-th smallest, with no larger
 * value before it and no smaller after it (Wirth's selection with a
 * median-of-three pivot: deterministic). */
static void select_kth(double *v, size_t n, size_t k)
{
    ptrdiff_t l = 0, m = (ptrdiff_t)n - 1;
    const ptrdiff_t kk = (ptrdiff_t)k;
    while (l < m) {
        const double a = v[l], b = v[l + (m - l) / 2], c = v[m];
        const double x = a < b ? (b < c ? b : (a < c ? c : a)) : (a < c ? a : (b < c ? c : b));
        ptrdiff_t i = l, j = m;
        do {
            while (v[i] < x)
                i++;
            while (x < v[j])
                j--;
            if (i <= j) {
                const double t = v[i];
                v[i] = v[j];
                v[j] = t;
                i++;
                j--;
            }
        } while (i <= j);
        if (j < kk)
            l = i;
        if (kk < i)
            m = j;
    }
}

static void tail_add(struct tail *t, double x)
{
    if (!(x < t->thresh))
        return;
    t->v[t->n++] = x;
    if (t->n == t->cap) {
        select_kth(t->v, t->n, t->k - 1);
        t->n = t->k;
        t->thresh = t->v[t->k - 1];
    }
}

/* Class counts of one categorical quantity. */
struct cat_table {
    size_t n;
    char text[CAT_MAX][SG_QTEXT_MAX];
    size_t count[CAT_MAX];
    size_t other;
};

static void cat_add(struct cat_table *t, const char *text, size_t count)
{
    for (size_t i = 0; i < t->n; i++)
        if (strcmp(t->text[i], text) == 0) {
            t->count[i] += count;
            return;
        }
    if (t->n == CAT_MAX) {
        t->other += count;
        return;
    }
    (void)snprintf(t->text[t->n], sizeof t->text[t->n], "%s", text);
    t->count[t->n++] = count;
}

/* ---- the run ------------------------------------------------------------- */

/* An address no row's name_src holds (no row is written from it): the
 * src of a followed quantity without a static name, so that match() needs
 * no test for NULL. */
static const struct sg_static_qname NOT_A_ROW_NAME = {""};

/* How a nominal quantity is followed through the draws: numeric (u and
 * interval), categorical (class counts), or not determined in the nominal
 * result (only how often, and as what, the draws determine it). */
enum qkind { Q_SKIP = 0, Q_NUMERIC, Q_CATEGORICAL, Q_UNDET };

struct plan {
    const struct sg_record *rec;
    struct sg_constants k0;
    struct sg_reduce_options opt; /* the caller's, with values_only set */
    struct sg_mc_budget b;
    double depth_l[3]; /* Cholesky factor of depth_cov: l11, l21, l22 */
    bool depth_bivariate;

    size_t m, n_blocks;
    unsigned long seed;

    /* layout of the nominal result */
    size_t n_quant;
    char (*names)[SG_QNAME_MAX]; /* [n_quant], zero after the text */
    /* the quantities followed through the draws (kind not Q_SKIP), in
     * nominal order, each with what a draw and the summary need */
    struct follow {
        size_t q;          /* nominal index */
        size_t j;          /* where a draw's result is expected to hold it */
        /* the nominal row's name_src when its name is still that static
         * name, else &NOT_A_ROW_NAME (then only names are compared) */
        const struct sg_static_qname *src;
        enum qkind kind;
        size_t slot;       /* value slot (Q_NUMERIC, Q_UNDET) */
        size_t cat;        /* class table (Q_CATEGORICAL, Q_UNDET) */
    } *follow;
    size_t n_follow;
    /* the same, Q_NUMERIC first (n_draw_num of them), for the draws: a
     * tight loop over the numeric ones, the others by kind */
    struct follow *draw_follow;
    size_t n_draw_num;
    /* slots: n_num numeric (with tails), n_und undetermined, then percent
     * finer and diameter of each point */
    size_t n_num, n_und, n_cat, n_pts, n_slots, pts0;
    double *shift;      /* [n_slots] nominal value subtracted before summing */

    /* shared outputs */
    struct moments *block_stats; /* [n_blocks][n_slots] */
    struct tail *lo, *hi;        /* [n_num] */
    pthread_mutex_t lock;
    atomic_size_t next_block;
};

struct worker {
    struct plan *p;
    pthread_t thread;
    enum sg_status status;
    struct sg_error err;
    struct cat_table *cats; /* [n_cat] */
    size_t failed;
    size_t first_failure_draw;
    char first_failure[sizeof ((struct sg_error *)0)->msg];
    /* candidates for the shared tails, gathered without the lock during a
     * block: tail t (2 s: lower tail of numeric slot s, 2 s + 1: upper) keeps
     * the values below thresh[t], a copy of that tail's threshold taken at
     * the end of the previous block (thresholds only fall, so a value at or
     * above the copy would be refused by the tail anyway) */
    double *cand;   /* [2 n_num][SG_MC_BLOCK_DRAWS] */
    size_t *n_cand; /* [2 n_num] */
    double *thresh; /* [2 n_num] */
};

static uint64_t splitmix64(uint64_t x)
{
    /* Steele, Lea, Flood (2014) SplitMix64 finaliser: a bijective mix so
     * that neighbouring block indices give unrelated seeds. */
    x += 0x9E3779B97F4A7C15ull;
    x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ull;
    x = (x ^ (x >> 27)) * 0x94D049BB133111EBull;
    return x ^ (x >> 31);
}

static unsigned long block_seed(unsigned long seed, size_t block)
{
    const uint64_t s = splitmix64(splitmix64((uint64_t)seed) ^ (uint64_t)block);
    /* gsl_rng_mt19937 uses the low 32 bits; 0 would select its default seed */
    const unsigned long out = (unsigned long)(s & 0xFFFFFFFFull);
    return out ? out : 1ul;
}

static double gauss(gsl_rng *g, double u)
{
    return u > 0.0 ? gsl_ran_gaussian_ziggurat(g, u) : 0.0;
}

/* A weighed mass: never below zero; a nominal 0 (an empty sieve) is known
 * exactly and is not varied, so the coarsest sieve stays at 100 % passing. */
static double mass(double nominal, gsl_rng *g, double u)
{
    if (nominal == 0.0)
        return 0.0;
    const double x = nominal + gauss(g, u);
    return x < 0.0 ? 0.0 : x;
}

/* Writes one draw of every uncertain input into r and k (private copies),
 * always from the nominal values, in a fixed order of random variates. */
static void perturb(const struct plan *p, struct sg_record *r, struct sg_constants *k, gsl_rng *g)
{
    const struct sg_record *r0 = p->rec;
    const struct sg_constants *k0 = &p->k0;
    const struct sg_mc_budget *b = &p->b;

    r->particle_density_mg_m3 = r0->particle_density_mg_m3 + gauss(g, b->particle_density_mg_m3.u);
    r->specimen_dry_mass_g = mass(r0->specimen_dry_mass_g, g, b->mass_g.u);
    if (r0->n_sieve > 0)
        r->sample_dry_mass_g = mass(r0->sample_dry_mass_g, g, b->mass_g.u);
    for (size_t i = 0; i < r0->n_sieve; i++)
        r->sieve[i].retained_g = mass(r0->sieve[i].retained_g, g, b->mass_g.u);
    for (size_t i = 0; i < r0->n_fine_sieve; i++)
        r->fine_sieve[i].retained_g = mass(r0->fine_sieve[i].retained_g, g, b->mass_g.u);
    if (r0->has_dispersant)
        r->dispersant_mass_g = mass(r0->dispersant_mass_g, g, b->mass_g.u);

    if (r0->method == SG_METHOD_HYDROMETER) {
        k->meniscus_correction = k0->meniscus_correction + gauss(g, b->meniscus.u);
        const double e_blank = gauss(g, b->blank_test.u);
        k->blank_const = k0->blank_const + e_blank;
        k->blank_c0 = k0->blank_c0 + e_blank;
        if (p->depth_bivariate) {
            const double z1 = gsl_ran_gaussian_ziggurat(g, 1.0);
            const double z2 = gsl_ran_gaussian_ziggurat(g, 1.0);
            k->depth_at_zero_mm = k0->depth_at_zero_mm + p->depth_l[0] * z1;
            k->depth_per_unit_mm = k0->depth_per_unit_mm + p->depth_l[1] * z1 + p->depth_l[2] * z2;
        } else {
            k->depth_at_zero_mm = k0->depth_at_zero_mm + gauss(g, b->depth_c0_mm.u);
        }
        for (size_t i = 0; i < r0->n_readings; i++) {
            const struct sg_reading_row *s = &r0->readings[i];
            struct sg_reading_row *d = &r->readings[i];
            double e = gauss(g, b->reading.u);
            if (b->reading_half_width > 0.0)
                e += gsl_ran_flat(g, -b->reading_half_width, b->reading_half_width);
            d->reading = s->reading + e;
            d->temp_c = s->temp_c + gauss(g, b->temp_c.u);
            d->elapsed_min = s->elapsed_min + gauss(g, b->elapsed_min.u);
            if (s->has_blank)
                d->blank_reading = s->blank_reading + gauss(g, b->blank_row.u);
        }
    } else if (r0->method == SG_METHOD_PIPETTE) {
        k->pipette_volume_ml = k0->pipette_volume_ml + gauss(g, b->pipette_volume_ml.u);
        for (size_t i = 0; i < r0->n_pipettes; i++) {
            const struct sg_pipette_row *s = &r0->pipettes[i];
            struct sg_pipette_row *d = &r->pipettes[i];
            d->temp_c = s->temp_c + gauss(g, b->temp_c.u);
            d->elapsed_min = s->elapsed_min + gauss(g, b->elapsed_min.u);
            d->depth_mm = s->depth_mm + gauss(g, b->sampling_depth_mm.u);
            d->solids_g = mass(s->solids_g, g, b->solids_g.u);
        }
    }
}

/* match() when the expected row is not the same static name: by name. */
static const struct sg_quantity *match_by_name(const struct plan *p, const struct sg_result *rs,
                                               const struct follow *f)
{
    if (f->j < rs->n_quantities) {
        /* names as whole arrays (the result zero-pads them, as calloc did
         * p->names): equal arrays are equal names */
        const struct sg_quantity *q = &rs->quantities[f->j];
        if (memcmp(q->name, p->names[f->q], sizeof p->names[f->q]) == 0)
            return q;
    }
    return sg_result_quantity(rs, p->names[f->q]);
}

/* The draw's quantity that corresponds to followed quantity f, rows and
 * n_rows being the draw's quantities (read once per draw by the caller). */
static inline const struct sg_quantity *match(const struct plan *p, const struct sg_result *rs,
                                              const struct sg_quantity *rows, size_t n_rows, const struct follow *f)
{
    /* the same static name array (result.h: name_src) is the same name */
    if (f->j < n_rows && rows[f->j].name_src == f->src) /* f->src never NULL */
        return &rows[f->j];
    return match_by_name(p, rs, f);
}

/* Adds one draw's value x of numeric slot s (finite) to the block's sums
 * and to the tail candidates. Its count is not kept here: during a block
 * bs[s].n counts the draws without a value (miss()), and the block's end
 * makes it the draws with one. */
static inline void take_num(const struct plan *p, struct worker *w, struct moments *bs, size_t s, double x)
{
    const double d = x - p->shift[s];
    bs[s].s1 += d;
    bs[s].s2 += d * d;
    const size_t tl = 2 * s, th = tl + 1;
    if (x < w->thresh[tl])
        w->cand[tl * SG_MC_BLOCK_DRAWS + w->n_cand[tl]++] = x;
    if (-x < w->thresh[th])
        w->cand[th * SG_MC_BLOCK_DRAWS + w->n_cand[th]++] = -x;
}

/* A draw without a value for a numeric or point slot (see take_num). */
static inline void miss(struct moments *bs, size_t s)
{
    bs[s].n += 1.0;
}

/* A point slot's value of a draw: summed when finite (no tails; counted
 * as take_num's), else missed. */
static inline void take_point(const struct plan *p, struct moments *bs, size_t s, double x)
{
    if (!isfinite(x)) {
        miss(bs, s);
        return;
    }
    const double d = x - p->shift[s];
    bs[s].s1 += d;
    bs[s].s2 += d * d;
}

/* Takes one successful draw's values into the block's sums and the tail
 * candidates, and counts its classes. True when the draw's points were
 * taken too (as many as the nominal result's). */
static bool extract(const struct plan *p, const struct sg_result *rs, struct worker *w, struct moments *bs)
{
    const struct follow *f = p->draw_follow, *const num_end = f + p->n_draw_num, *const end = f + p->n_follow;
    const struct sg_quantity *const rows = rs->quantities;
    const size_t n_rows = rs->n_quantities;
    for (; f < num_end; f++) {
        const struct sg_quantity *q = match(p, rs, rows, n_rows, f);
        if (q != NULL && q->determined && !q->is_text && isfinite(q->value))
            take_num(p, w, bs, f->slot, q->value);
        else
            miss(bs, f->slot);
    }
    struct cat_table *cats = w->cats;
    for (; f < end; f++) {
        const struct sg_quantity *q = match(p, rs, rows, n_rows, f);
        const bool det = q != NULL && q->determined;
        if (f->kind == Q_CATEGORICAL) {
            cat_add(&cats[f->cat], det ? q->text : "", 1);
        } else if (det) { /* Q_UNDET: counted where determined, shift 0 */
            const double x = q->is_text ? 0.0 : q->value;
            if (isfinite(x))
                moments_add(&bs[f->slot], x);
            if (q->is_text)
                cat_add(&cats[f->cat], q->text, 1);
        }
    }
    if (rs->n_points != p->n_pts)
        return false;
    for (size_t i = 0; i < p->n_pts; i++) {
        const size_t sp = p->pts0 + 2 * i, sd = sp + 1;
        take_point(p, bs, sp, rs->points[i].percent_finer);
        /* a diameter equal to the nominal one (every sieve's aperture) adds
         * a zero to sums that start at +0 and so are never -0 (a sum is -0
         * only when both terms are): it changes no bit, and it is counted
         * as a value (only misses are counted) */
        const double d = rs->points[i].diameter_mm;
        if (d != p->shift[sd])
            take_point(p, bs, sd, d);
    }
    return true;
}

static void *work(void *arg)
{
    struct worker *w = arg;
    struct plan *p = w->p;
    struct sg_record r;
    struct sg_constants k = p->k0;
    struct sg_result rs;
    sg_result_init(&rs);
    gsl_rng *g = gsl_rng_alloc(gsl_rng_mt19937);
    const bool copied = sg_record_copy(&r, p->rec) == SG_OK;
    if (g == NULL || !copied) {
        w->status = sg_error_set(&w->err, SG_ENOMEM, 0, 0, "out of memory for a Monte Carlo thread");
        goto cleanup;
    }
    for (size_t t = 0; t < 2 * p->n_num; t++)
        w->thresh[t] = (double)INFINITY;
    for (;;) {
        const size_t blk = atomic_fetch_add(&p->next_block, 1);
        if (blk >= p->n_blocks)
            break;
        gsl_rng_set(g, block_seed(p->seed, blk));
        const size_t first = blk * SG_MC_BLOCK_DRAWS;
        const size_t nd = p->m - first < SG_MC_BLOCK_DRAWS ? p->m - first : SG_MC_BLOCK_DRAWS;
        /* each slot sums its block's draws in draw order (moments of a
         * block do not depend on the thread that made it) */
        struct moments *bs = p->block_stats + blk * p->n_slots;
        for (size_t s = 0; s < p->n_slots; s++)
            bs[s] = (struct moments){0.0, 0.0, 0.0};
        for (size_t t = 0; t < 2 * p->n_num; t++)
            w->n_cand[t] = 0;
        size_t n_ok = 0, n_with_points = 0; /* draws taken, and with their points */
        for (size_t j = 0; j < nd; j++) {
            perturb(p, &r, &k, g);
            struct sg_error e;
            if (sg_reduce(&r, &k, &p->opt, &rs, &e) == SG_OK) {
                n_ok++;
                n_with_points += extract(p, &rs, w, bs);
                continue;
            }
            if (w->failed++ == 0 || first + j < w->first_failure_draw) {
                w->first_failure_draw = first + j;
                (void)snprintf(w->first_failure, sizeof w->first_failure, "%s", e.msg);
            }
        }
        /* numeric and point slots counted their misses (take_num): now
         * the values, exact integers as the sums of 1.0 were */
        for (size_t s = 0; s < p->n_num; s++)
            bs[s].n = (double)n_ok - bs[s].n;
        for (size_t s = p->pts0; s < p->n_slots; s++)
            bs[s].n = (double)n_with_points - bs[s].n;
        pthread_mutex_lock(&p->lock);
        for (size_t s = 0; s < p->n_num; s++) {
            const size_t tl = 2 * s, th = tl + 1;
            const double *cl = w->cand + tl * SG_MC_BLOCK_DRAWS, *ch = w->cand + th * SG_MC_BLOCK_DRAWS;
            for (size_t c = 0; c < w->n_cand[tl]; c++)
                tail_add(&p->lo[s], cl[c]);
            for (size_t c = 0; c < w->n_cand[th]; c++)
                tail_add(&p->hi[s], ch[c]);
            w->thresh[tl] = p->lo[s].thresh;
            w->thresh[th] = p->hi[s].thresh;
        }
        pthread_mutex_unlock(&p->lock);
    }
cleanup:
    if (copied)
        sg_record_release(&r);
    gsl_rng_free(g);
    sg_result_release(&rs);
    return NULL;
}

static bool is_class_row_quantity(const char *name)
{
    const char *list = SG_MC_CLASS_ROWS_FOR;
    const size_t n = strlen(name);
    for (const char *s = list; *s != '\0';) {
        const size_t len = strcspn(s, " ");
        if (len == n && strncmp(s, name, n) == 0)
            return true;
        s += len;
        while (*s == ' ')
            s++;
    }
    return false;
}

/* Appends text to q's note after "; ". When it does not fit whole, it is
 * cut after its last complete item (a class and its probability, up to
 * a "%, ") and ends in "...", so that a note never stops inside a word
 * or a number; the probability rows (usda_texture_p_...) keep every class.
 * Without room for even its first item the text is left out. */
static void note_append(struct sg_quantity *q, const char *text)
{
    static const char more[] = "...";
    const size_t used = strlen(q->note), size = sizeof q->note;
    const char *sep = used ? "; " : "";
    if (used + strlen(sep) >= size)
        return;
    const size_t room = size - 1 - used - strlen(sep); /* characters that fit */
    const size_t len = strlen(text);
    if (len <= room) {
        char *at = q->note + used;
        memcpy(at, sep, strlen(sep));
        memcpy(at + strlen(sep), text, len + 1);
        return;
    }
    size_t keep = 0; /* text[0..keep) ends with ", " */
    for (const char *c = strstr(text, ", "); c != NULL; c = strstr(c + 1, ", ")) {
        if (c == text || c[-1] != '%')
            continue; /* inside a class name ("not applicable, fine-grained") */
        const size_t end = (size_t)(c - text) + 2;
        if (end + strlen(more) > room)
            break;
        keep = end;
    }
    if (keep == 0)
        return;
    char *at = q->note + used;
    memcpy(at, sep, strlen(sep));
    memcpy(at + strlen(sep), text, keep);
    memcpy(at + strlen(sep) + keep, more, sizeof more); /* with its '\0' */
}

static const char *class_label(const char *text)
{
    return text[0] ? text : "not determined";
}

/* Orders class indices by count (descending), then by text. */
static void order_classes(const struct cat_table *t, size_t *idx)
{
    for (size_t i = 0; i < t->n; i++)
        idx[i] = i;
    for (size_t i = 1; i < t->n; i++) {
        const size_t v = idx[i];
        size_t j = i;
        while (j > 0 && (t->count[idx[j - 1]] < t->count[v] ||
                         (t->count[idx[j - 1]] == t->count[v] && strcmp(t->text[idx[j - 1]], t->text[v]) > 0))) {
            idx[j] = idx[j - 1];
            j--;
        }
        idx[j] = v;
    }
}

static void percent_text(char *buf, size_t size, double pct)
{
    if (pct > 0.0 && pct < 0.1)
        (void)snprintf(buf, size, "<0.1 %%");
    else
        (void)snprintf(buf, size, "%.1f %%", pct);
}

static void slug(char *dst, size_t size, const char *text)
{
    size_t n = 0;
    bool sep = false;
    for (const char *s = class_label(text); *s != '\0' && n + 1 < size; s++) {
        const unsigned char c = (unsigned char)*s;
        if ((c >= 'a' && c <= 'z') || (c >= '0' && c <= '9')) {
            if (sep && n > 0 && n + 2 < size)
                dst[n++] = '_';
            dst[n++] = (char)c;
            sep = false;
        } else if (c >= 'A' && c <= 'Z') {
            if (sep && n > 0 && n + 2 < size)
                dst[n++] = '_';
            dst[n++] = (char)(c - 'A' + 'a');
            sep = false;
        } else {
            sep = true;
        }
    }
    dst[n] = '\0';
}

/* The name of the row that holds the probability of class text of the
 * quantity qname: "<qname>_p_<slug of text>". */
static void class_row_name(char name[SG_QNAME_MAX], const char *qname, const char *text)
{
    char s[SG_QNAME_MAX];
    slug(s, sizeof s, text);
    (void)snprintf(name, SG_QNAME_MAX, "%.16s_p_%.20s", qname, s);
    for (size_t n = strlen(name); n > 0 && name[n - 1] == '_'; n--)
        name[n - 1] = '\0'; /* a slug cut after a separator */
}

bool sg_mc_class_probability(const struct sg_result *res, const char *quantity, const char *text, double *pct)
{
    char name[SG_QNAME_MAX];
    class_row_name(name, quantity, text);
    const struct sg_quantity *q = sg_result_quantity(res, name);
    if (q == NULL || !q->determined || q->is_text)
        return false;
    *pct = q->value;
    return true;
}

/* "Monte Carlo class probabilities: a 72.0 %, b 28.0 %" into buf. */
static void class_note(const struct cat_table *t, size_t *idx, size_t ok_draws, const char *lead, char *buf,
                       size_t size)
{
    order_classes(t, idx);
    int w = snprintf(buf, size, "%s", lead);
    size_t used = w > 0 ? (size_t)w : 0;
    for (size_t j = 0; j < t->n && used < size; j++) {
        char pct[24];
        percent_text(pct, sizeof pct, 100.0 * (double)t->count[idx[j]] / (double)ok_draws);
        w = snprintf(buf + used, size - used, "%s %s %s", j ? "," : "", class_label(t->text[idx[j]]), pct);
        used += w > 0 ? (size_t)w : 0;
    }
    if (t->other > 0 && used < size) {
        char pct[24];
        percent_text(pct, sizeof pct, 100.0 * (double)t->other / (double)ok_draws);
        (void)snprintf(buf + used, size - used, ", other %s", pct);
    }
}

/* Writes the statistics into res. Returns SG_OK or SG_ENOMEM (adding rows). */
static enum sg_status publish(struct plan *p, struct worker *ws, unsigned nw, struct sg_result *res,
                              struct sg_mc_detail *detail, size_t failed, const char *first_failure,
                              struct sg_error *err)
{
    const size_t ok_draws = p->m - failed;
    /* moments combined in block order: independent of the thread count */
    struct moments *tot = calloc(p->n_slots ? p->n_slots : 1, sizeof *tot);
    size_t *idx = malloc(CAT_MAX * sizeof *idx);
    struct cat_table *cats = calloc(p->n_cat ? p->n_cat : 1, sizeof *cats);
    if (tot == NULL || idx == NULL || cats == NULL) {
        free(tot);
        free(idx);
        free(cats);
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory summarising the Monte Carlo draws");
    }
    for (size_t blk = 0; blk < p->n_blocks; blk++)
        for (size_t s = 0; s < p->n_slots; s++)
            moments_merge(&tot[s], &p->block_stats[blk * p->n_slots + s]);
    for (unsigned t = 0; t < nw; t++)
        for (size_t c = 0; c < p->n_cat; c++) {
            for (size_t i = 0; i < ws[t].cats[c].n; i++)
                cat_add(&cats[c], ws[t].cats[c].text[i], ws[t].cats[c].count[i]);
            cats[c].other += ws[t].cats[c].other;
        }

    enum sg_status st = SG_OK;
    for (const struct follow *f = p->follow, *end = f + p->n_follow; f < end; f++) {
        struct sg_quantity *q = &res->quantities[f->q];
        char buf[4 * SG_QNOTE_MAX]; /* longer than a note: note_append cuts it */
        if (f->kind == Q_UNDET) {
            const size_t mq = (size_t)tot[f->slot].n;
            if (mq == 0)
                continue;
            char pct[24], lead[80];
            percent_text(pct, sizeof pct, 100.0 * (double)mq / (double)ok_draws);
            (void)snprintf(lead, sizeof lead, "Monte Carlo: determined in %s of draws", pct);
            if (cats[f->cat].n > 0) {
                strcat(lead, " as");
                class_note(&cats[f->cat], idx, ok_draws, lead, buf, sizeof buf);
            } else {
                (void)snprintf(buf, sizeof buf, "%s", lead);
            }
            note_append(q, buf);
        } else if (f->kind == Q_NUMERIC) {
            const size_t s = f->slot;
            const struct moments *m = &tot[s];
            const size_t mq = (size_t)m->n;
            if (mq < ok_draws &&
                (double)(ok_draws - mq) > SG_MC_UNDETERMINED_MAX_SHARE * (double)ok_draws) {
                /* the draws that cannot determine it lie to one side (a
                 * D-value beyond the curve's finest point, say): those that
                 * can are not a random sample of its distribution, and an
                 * interval from them can even miss the value itself */
                char pct[24];
                percent_text(pct, sizeof pct, 100.0 * (double)(ok_draws - mq) / (double)ok_draws);
                (void)snprintf(buf, sizeof buf,
                               "not determined in %s of draws: no u or 95 %% interval (the draws that determine "
                               "it are not a random sample of its distribution)",
                               pct);
                note_append(q, buf);
                continue;
            }
            size_t r = 0, qq = 0;
            if (!sg_mc_coverage_indices(mq, SG_MC_COVERAGE, &r, &qq))
                continue;
            const size_t sidx = mq - (r + qq) + 1;
            if (r > p->lo[s].n || sidx > p->hi[s].n)
                continue; /* cannot happen: the tails are sized for M */
            /* the two order statistics by selection, not a sort of the
             * whole tail (tens of thousands of values at 10^6 draws) */
            select_kth(p->lo[s].v, p->lo[s].n, r - 1);
            select_kth(p->hi[s].v, p->hi[s].n, sidx - 1);
            q->has_u = true;
            q->u = moments_sd(m);
            q->low95 = p->lo[s].v[r - 1];
            q->high95 = -p->hi[s].v[sidx - 1];
            if (mq < ok_draws) {
                char pct[24];
                percent_text(pct, sizeof pct, 100.0 * (double)(ok_draws - mq) / (double)ok_draws);
                (void)snprintf(buf, sizeof buf, "not determined in %s of draws (u and interval from the others)",
                               pct);
                note_append(q, buf);
            }
        } else if (f->kind == Q_CATEGORICAL) {
            char lead[80] = "Monte Carlo class probabilities:";
            if (failed > 0)
                (void)snprintf(lead, sizeof lead, "Monte Carlo class probabilities (of %zu accepted draws):",
                               ok_draws);
            class_note(&cats[f->cat], idx, ok_draws, lead, buf, sizeof buf);
            note_append(q, buf);
        }
    }
    /* numeric class-probability rows, after the notes (adding rows may move res->quantities) */
    for (const struct follow *f = p->follow, *end = f + p->n_follow; f < end && st == SG_OK; f++) {
        const char *qname = p->names[f->q];
        if (f->kind != Q_CATEGORICAL || !is_class_row_quantity(qname))
            continue;
        const struct cat_table *t = &cats[f->cat];
        order_classes(t, idx);
        for (size_t j = 0; j < t->n && st == SG_OK; j++) {
            char name[SG_QNAME_MAX], note[SG_QNOTE_MAX];
            class_row_name(name, qname, t->text[idx[j]]);
            (void)snprintf(note, sizeof note, "Monte Carlo probability of %s '%s' (percent of %zu draws)",
                           qname, class_label(t->text[idx[j]]), ok_draws);
            st = sg_result_add_value(res, name, "%", 100.0 * (double)t->count[idx[j]] / (double)ok_draws, note);
        }
    }
    for (size_t i = 0; i < p->n_pts; i++) {
        res->points[i].percent_finer_u = moments_sd(&tot[p->pts0 + 2 * i]);
    }
    if (st == SG_OK) {
        char note[SG_QNOTE_MAX];
        int w = snprintf(note, sizeof note,
                         "Monte Carlo trials (JCGM 101:2008), seed %lu; u = standard deviation of the draws, "
                         "low95/high95 = probabilistically symmetric 95 %% coverage interval; value = nominal",
                         p->seed);
        if (failed > 0 && w > 0 && (size_t)w < sizeof note) {
            char pct[24];
            percent_text(pct, sizeof pct, 100.0 * (double)failed / (double)p->m);
            w += snprintf(note + w, sizeof note - (size_t)w, "; %s refused", pct);
        }
        if (p->m < SG_MC_DRAWS_ADVISED && w > 0 && (size_t)w < sizeof note)
            (void)snprintf(note + w, sizeof note - (size_t)w,
                           "; fewer than %d draws: u and the intervals are rough (JCGM 101 7.2: M much larger "
                           "than 1/(1 - p); %d or more)",
                           SG_MC_DRAWS_ADVISED, SG_MC_DRAWS_ADVISED);
        st = sg_result_add_value(res, "mc_draws", "", (double)p->m, note);
    }
    if (st == SG_OK && failed > 0) {
        /* the refused draws are not a random subset (they are the ones the
         * inputs' tails pushed outside the reduction's validity), so the
         * statistics of the others are biased: worse with the share */
        const double share = 100.0 * (double)failed / (double)p->m;
        const enum sg_severity sev = share > SG_MC_REFUSED_FAILURE_PCT   ? SG_SEVERITY_FAILURE
                                     : share > SG_MC_REFUSED_WARNING_PCT ? SG_SEVERITY_WARNING
                                                                         : SG_SEVERITY_INFO;
        st = sg_result_add_flag(res, "mc_refused_draws", sev, 0,
                                "the reduction refused %.3g %% of the Monte Carlo draws (%zu of %zu; first: %s); the "
                                "uncertainties come from the %zu others%s",
                                share, failed, p->m, first_failure, ok_draws,
                                sev == SG_SEVERITY_FAILURE ? " and are not reliable (reduce the input uncertainties "
                                                             "u_* or extend the calibrated ranges)"
                                                           : "");
        /* qc_status and qc_flags were set before the draws: count this flag too */
        if (st == SG_OK && sg_result_quantity(res, "qc_status") != NULL)
            st = sg_qc_summarise(&p->opt.qc, res, err);
    }
    if (st == SG_OK && detail != NULL) {
        sg_mc_detail_release(detail);
        detail->points = calloc(p->n_pts ? p->n_pts : 1, sizeof *detail->points);
        if (detail->points == NULL) {
            st = SG_ENOMEM;
        } else {
            detail->draws = p->m;
            detail->failed = failed;
            (void)snprintf(detail->first_failure, sizeof detail->first_failure, "%s", first_failure);
            detail->n_points = p->n_pts;
            for (size_t i = 0; i < p->n_pts; i++) {
                const size_t sp = p->pts0 + 2 * i, sd = sp + 1;
                struct sg_mc_point_stats *o = &detail->points[i];
                o->n = (size_t)tot[sp].n;
                o->percent_finer_mean = moments_mean(&tot[sp], p->shift[sp]);
                o->percent_finer_u = moments_sd(&tot[sp]);
                o->diameter_mean_mm = moments_mean(&tot[sd], p->shift[sd]);
                o->diameter_u_mm = moments_sd(&tot[sd]);
            }
        }
    }
    free(tot);
    free(idx);
    free(cats);
    if (st != SG_OK)
        return sg_error_set(err, st, 0, 0, "out of memory adding the Monte Carlo results");
    return SG_OK;
}

static void plan_release(struct plan *p)
{
    free(p->names);
    free(p->shift);
    free(p->follow);
    free(p->draw_follow);
    free(p->block_stats);
    if (p->lo != NULL)
        for (size_t s = 0; s < p->n_num; s++)
            free(p->lo[s].v);
    if (p->hi != NULL)
        for (size_t s = 0; s < p->n_num; s++)
            free(p->hi[s].v);
    free(p->lo);
    free(p->hi);
}

static void plan_depth(struct plan *p)
{
    p->depth_bivariate = p->b.depth_c0_mm.origin == SG_MC_FROM_REGISTER;
    if (!p->depth_bivariate)
        return;
    /* Cholesky factor of [[v0, c], [c, v1]]; a covariance that is not
     * positive semi-definite by round-off is clipped to it. */
    const double v0 = p->b.depth_cov[0], c = p->b.depth_cov[1], v1 = p->b.depth_cov[2];
    const double l11 = sqrt(v0);
    const double l21 = c / l11;
    const double r = v1 - l21 * l21;
    p->depth_l[0] = l11;
    p->depth_l[1] = l21;
    p->depth_l[2] = r > 0.0 ? sqrt(r) : 0.0;
}

enum sg_status sg_mc_run_ex(const struct sg_record *rec, const struct sg_constants *k,
                            const struct sg_reduce_options *opt, const struct sg_mc_options *mc,
                            struct sg_result *res, struct sg_mc_detail *detail, struct sg_error *err)
{
    sg_error_clear(err);
    if (mc == NULL || mc->draws < 2)
        return sg_error_set(err, SG_EINVAL, 0, 0, "Monte Carlo needs at least 2 draws, got %zu (give --mc N, "
                                                  "N of 10000 or more; JCGM 101 suggests 1000000)",
                            mc ? mc->draws : (size_t)0);
    if (mc->draws > SG_MC_DRAWS_MAX)
        return sg_error_set(err, SG_ELIMIT, 0, 0, "%zu Monte Carlo draws exceed the limit of %u (use fewer draws)",
                            mc->draws, SG_MC_DRAWS_MAX);
    if (res->n_points == 0)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "no reduced points to propagate uncertainty through (reduce the record first)");

    const struct sg_reduce_options def_opt = sg_reduce_options_default();
    if (opt == NULL)
        opt = &def_opt;
    struct plan p;
    memset(&p, 0, sizeof p);
    p.rec = rec;
    if (k != NULL)
        p.k0 = *k;
    else
        sg_constants_from_record(rec, &p.k0);
    p.opt = *opt;
    p.opt.values_only = true;
    sg_mc_budget_resolve(rec, &p.k0, &p.b);
    plan_depth(&p);
    p.m = mc->draws;
    p.seed = mc->seed;
    p.n_blocks = (p.m + SG_MC_BLOCK_DRAWS - 1) / SG_MC_BLOCK_DRAWS;
    p.n_quant = res->n_quantities;
    p.n_pts = res->n_points;
    atomic_init(&p.next_block, 0);

    enum sg_status st = SG_OK;
    unsigned nw = mc->threads > 1 ? mc->threads : 1;
    if (nw > p.n_blocks)
        nw = (unsigned)p.n_blocks;
    struct worker *ws = calloc(nw, sizeof *ws);
    bool lock_ready = false;
    p.names = calloc(p.n_quant ? p.n_quant : 1, sizeof *p.names);
    p.follow = calloc(p.n_quant ? p.n_quant : 1, sizeof *p.follow);
    if (ws == NULL || p.names == NULL || p.follow == NULL)
        goto nomem;
    /* the layout of a draw's (values-only) result: quantities it does not
     * compute (QC status, calibration_used) get no uncertainty */
    struct sg_result layout;
    sg_result_init(&layout);
    st = sg_reduce(rec, &p.k0, &p.opt, &layout, err);
    for (size_t i = 0; st == SG_OK && i < p.n_quant; i++) {
        const struct sg_quantity *q = &res->quantities[i];
        (void)snprintf(p.names[i], sizeof p.names[i], "%s", q->name);
        const struct sg_quantity *dq = sg_result_quantity(&layout, q->name);
        if (dq == NULL || strcmp(q->name, "calibration_used") == 0)
            continue; /* Q_SKIP */
        struct follow *f = &p.follow[p.n_follow++];
        f->q = i;
        f->j = (size_t)(dq - layout.quantities);
        f->src = &NOT_A_ROW_NAME;
        if (q->name_src != NULL) {
            /* the static name as a row holds it (cut to SG_QNAME_MAX - 1) */
            char src_name[SG_QNAME_MAX];
            memcpy(src_name, q->name_src->s, sizeof src_name);
            src_name[SG_QNAME_MAX - 1] = '\0';
            if (memcmp(src_name, p.names[i], sizeof src_name) == 0)
                f->src = q->name_src;
        }
        if (!q->determined) {
            f->kind = Q_UNDET;
            f->cat = p.n_cat++;
            p.n_und++;
        } else if (q->is_text) {
            f->kind = Q_CATEGORICAL;
            f->cat = p.n_cat++;
        } else {
            f->kind = Q_NUMERIC;
            f->slot = p.n_num++;
        }
    }
    sg_result_release(&layout);
    if (st != SG_OK)
        goto cleanup;
    p.draw_follow = calloc(p.n_follow ? p.n_follow : 1, sizeof *p.draw_follow);
    if (p.draw_follow == NULL)
        goto nomem;
    p.pts0 = p.n_num + p.n_und;
    p.n_slots = p.pts0 + 2 * p.n_pts;
    p.shift = calloc(p.n_slots ? p.n_slots : 1, sizeof *p.shift);
    if (p.shift == NULL)
        goto nomem;
    for (size_t i = 0, u = p.n_num; i < p.n_follow; i++) {
        struct follow *f = &p.follow[i];
        if (f->kind == Q_UNDET)
            f->slot = u++; /* counted only: shift 0 */
        else if (f->kind == Q_NUMERIC)
            p.shift[f->slot] = res->quantities[f->q].value;
    }
    for (size_t i = 0; i < p.n_follow; i++) /* slots set: the numeric ones first */
        if (p.follow[i].kind == Q_NUMERIC)
            p.draw_follow[p.n_draw_num++] = p.follow[i];
    for (size_t i = 0, n = p.n_draw_num; i < p.n_follow; i++)
        if (p.follow[i].kind != Q_NUMERIC)
            p.draw_follow[n++] = p.follow[i];
    for (size_t i = 0; i < p.n_pts; i++) {
        const double pf = res->points[i].percent_finer, d = res->points[i].diameter_mm;
        p.shift[p.pts0 + 2 * i] = isfinite(pf) ? pf : 0.0;
        p.shift[p.pts0 + 2 * i + 1] = isfinite(d) ? d : 0.0;
    }
    p.block_stats = calloc(p.n_blocks * (p.n_slots ? p.n_slots : 1), sizeof *p.block_stats);
    p.lo = calloc(p.n_num ? p.n_num : 1, sizeof *p.lo);
    p.hi = calloc(p.n_num ? p.n_num : 1, sizeof *p.hi);
    if (p.block_stats == NULL || p.lo == NULL || p.hi == NULL)
        goto nomem;
    {
        size_t r = 1, q = 1;
        (void)sg_mc_coverage_indices(p.m, SG_MC_COVERAGE, &r, &q);
        const size_t s = p.m - (r + q) + 1;
        /* r(M_q) and M_q - (r + q) + 1 stay within r(M) + 1 for every M_q <= M */
        size_t keep = (r > s ? r : s) + 2;
        if (keep > p.m)
            keep = p.m;
        const size_t cap = keep + keep / 2 + 16;
        for (size_t i = 0; i < p.n_num; i++) {
            p.lo[i].v = malloc(cap * sizeof *p.lo[i].v);
            p.hi[i].v = malloc(cap * sizeof *p.hi[i].v);
            if (p.lo[i].v == NULL || p.hi[i].v == NULL)
                goto nomem;
            p.lo[i].k = p.hi[i].k = keep;
            p.lo[i].cap = p.hi[i].cap = cap;
            p.lo[i].thresh = p.hi[i].thresh = (double)INFINITY;
        }
    }
    for (unsigned t = 0; t < nw; t++) {
        ws[t].p = &p;
        ws[t].cats = calloc(p.n_cat ? p.n_cat : 1, sizeof *ws[t].cats);
        const size_t n_tails = p.n_num > 0 ? 2 * p.n_num : 1;
        ws[t].cand = malloc(n_tails * SG_MC_BLOCK_DRAWS * sizeof *ws[t].cand);
        ws[t].n_cand = calloc(n_tails, sizeof *ws[t].n_cand);
        ws[t].thresh = malloc(n_tails * sizeof *ws[t].thresh);
        if (ws[t].cats == NULL || ws[t].cand == NULL || ws[t].n_cand == NULL || ws[t].thresh == NULL)
            goto nomem;
    }
    if (pthread_mutex_init(&p.lock, NULL) != 0) {
        st = sg_error_set(err, SG_EIO, 0, 0, "cannot create a lock for the Monte Carlo threads");
        goto cleanup;
    }
    lock_ready = true;

    unsigned started = 0;
    for (unsigned t = 1; t < nw; t++) {
        if (pthread_create(&ws[t].thread, NULL, work, &ws[t]) != 0)
            break;
        started = t;
    }
    (void)work(&ws[0]);
    for (unsigned t = 1; t <= started; t++)
        pthread_join(ws[t].thread, NULL);
    /* threads that could not start leave their blocks to the others, but
     * the calling thread has already taken all that remained */
    size_t failed = 0, first_draw = (size_t)-1;
    const char *first_msg = "";
    for (unsigned t = 0; t < nw; t++) {
        if (ws[t].status != SG_OK && st == SG_OK) {
            st = ws[t].status;
            if (err != NULL)
                *err = ws[t].err;
        }
        failed += ws[t].failed;
        if (ws[t].failed > 0 && ws[t].first_failure_draw < first_draw) {
            first_draw = ws[t].first_failure_draw;
            first_msg = ws[t].first_failure;
        }
    }
    if (st == SG_OK && atomic_load(&p.next_block) < p.n_blocks)
        st = sg_error_set(err, SG_EIO, 0, 0, "Monte Carlo threads stopped before all draws were made");
    if (st == SG_OK && failed == p.m)
        st = sg_error_set(err, SG_EDOM, 0, 0,
                          "the reduction refused every Monte Carlo draw (first: %s; check the input "
                          "uncertainties u_*)",
                          first_msg);
    if (st == SG_OK)
        st = publish(&p, ws, nw, res, detail, failed, first_msg, err);
    goto cleanup;

nomem:
    st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory for %zu Monte Carlo draws (use fewer draws)", p.m);
cleanup:
    if (lock_ready)
        pthread_mutex_destroy(&p.lock);
    if (ws != NULL)
        for (unsigned t = 0; t < nw; t++) {
            free(ws[t].cats);
            free(ws[t].cand);
            free(ws[t].n_cand);
            free(ws[t].thresh);
        }
    free(ws);
    plan_release(&p);
    return st;
}

enum sg_status sg_mc_run(const struct sg_record *rec, const struct sg_constants *k,
                         const struct sg_reduce_options *opt, const struct sg_mc_options *mc,
                         struct sg_result *res, struct sg_error *err)
{
    return sg_mc_run_ex(rec, k, opt, mc, res, NULL, err);
}
