/* progress.c - the progress line of long batches, on a terminal only. */
#include "cli/progress.h"

#include <stdio.h>
#include <time.h>
#include <unistd.h>

static double now_s(void)
{
    struct timespec ts;
    if (clock_gettime(CLOCK_MONOTONIC, &ts) != 0)
        return 0.0;
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

void sg_progress_init(struct sg_progress *p, size_t total, const char *what)
{
    p->on = total > 1 && isatty(STDERR_FILENO) == 1;
    p->shown = false;
    p->done = 0;
    p->total = total;
    p->what = what;
    p->start_s = p->on ? now_s() : 0.0;
    p->last_s = 0.0;
}

void sg_progress_update(struct sg_progress *p, size_t done)
{
    p->done = done < p->total ? done : p->total;
    if (!p->on)
        return;
    const double t = now_s();
    if (t - p->start_s < SG_PROGRESS_DELAY_S)
        return;
    if (p->shown && t - p->last_s < SG_PROGRESS_PERIOD_S && p->done < p->total)
        return;
    /* \r back to the start of the line, ESC [ K erases what a longer line left */
    fprintf(stderr, "\r\033[K  %s %zu/%zu", p->what, p->done, p->total);
    fflush(stderr);
    p->shown = true;
    p->last_s = t;
}

void sg_progress_step(struct sg_progress *p)
{
    sg_progress_update(p, p->done + 1);
}

void sg_progress_clear(struct sg_progress *p)
{
    if (!p->shown)
        return;
    fputs("\r\033[K", stderr);
    fflush(stderr);
    p->shown = false;
}

void sg_progress_finish(struct sg_progress *p)
{
    sg_progress_clear(p);
    p->on = false;
}
