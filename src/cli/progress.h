/* progress.h - a progress line on stderr for long batches ("  reduced
 * 1234/10000"), shown only when stderr is a terminal, so logs and pipes
 * never see it.
 *
 * Not locked itself: call every function with the lock that serialises the
 * program's stderr held (the batch's), so the line and other messages do
 * not mix. Before printing any other message while a batch runs, call
 * sg_progress_clear() so the message starts on a clean line. */
#ifndef SEDGRADE_CLI_PROGRESS_H
#define SEDGRADE_CLI_PROGRESS_H

#include <stdbool.h>
#include <stddef.h>

/* The line appears only once a batch has run this long, s (a quick run
 * never flashes it), and is redrawn at most every SG_PROGRESS_PERIOD_S. */
#define SG_PROGRESS_DELAY_S 0.5
#define SG_PROGRESS_PERIOD_S 0.1

struct sg_progress {
    bool on;          /* stderr is a terminal and there is more than one item */
    bool shown;       /* a progress line is on the screen now */
    size_t done, total;
    const char *what; /* past participle: "reduced" */
    double start_s, last_s;
};

/* Starts counting total items; what must outlive p. */
void sg_progress_init(struct sg_progress *p, size_t total, const char *what);

/* Sets the count done (0..total) and redraws the line when due. */
void sg_progress_update(struct sg_progress *p, size_t done);

/* One more item done (sg_progress_update(p, done + 1)). */
void sg_progress_step(struct sg_progress *p);

/* Erases the line, if shown, so another message can be printed. */
void sg_progress_clear(struct sg_progress *p);

/* Erases the line at the end of the batch; p can be initialised again. */
void sg_progress_finish(struct sg_progress *p);

#endif
