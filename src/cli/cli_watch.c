/*
** `unitgram draw LAYOUT -o OUT --watch`: draw, then redraw whenever the
** layout, its CSV or one of its glyph files changes.
**
** inotify watches the folders that hold those files, not the files: editors
** that save by writing a new file and renaming it over the old one replace
** the file's inode, and a watch on the old inode would go quiet. Events come
** in bursts (create, modify, close, rename), so a redraw waits until the
** folder has been quiet for DEBOUNCE_MS. A broken edit prints its error and
** leaves the last good picture in place (the writer is atomic and nothing is
** written on failure); the next good save draws again.
*/
#include <errno.h>
#include <limits.h>
#include <poll.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/inotify.h>
#include <unistd.h>

#include "cli.h"

#define DEBOUNCE_MS 150
#define POLL_MAX_MS 60000
#define MAX_FILES 64
#define EVENTS (IN_CLOSE_WRITE | IN_MOVED_TO | IN_CREATE | IN_MODIFY)

typedef struct {
    int wd;         /* watch on the file's folder */
    char *name;     /* the file's name inside that folder */
} watched;

typedef struct {
    int fd;
    watched files[MAX_FILES];
    size_t n;
} watcher;

static void forget_all(watcher *w)
{
    for (size_t i = 0; i < w->n; i++)
        free(w->files[i].name);
    w->n = 0;
}

/* Watch the folder of path for changes to its name. */
static void watch_file(watcher *w, const char *path)
{
    if (w->n == MAX_FILES)
        return;
    const char *slash = strrchr(path, '/');
    char dir[PATH_MAX];
    snprintf(dir, sizeof dir, "%.*s", slash ? (int)(slash - path) + (slash == path) : 1,
             slash ? path : ".");
    int wd = inotify_add_watch(w->fd, dir, EVENTS);
    if (wd < 0) {
        ug_error e = {.where = {path, 0, 0}};
        snprintf(e.msg, sizeof e.msg, "cannot watch its folder: %s", strerror(errno));
        cli_diag("warning", &e);
        return;
    }
    char *name = strdup(slash ? slash + 1 : path);
    if (name)
        w->files[w->n++] = (watched){wd, name};
}

/* The layout always; the CSV and glyph files from the last good load. */
static void watch_inputs(watcher *w, const char *layout, char **inputs)
{
    if (!inputs && w->n)
        return; /* the layout did not load: keep watching what we had */
    forget_all(w);
    watch_file(w, layout);
    for (size_t i = 1; inputs && inputs[i]; i++)
        watch_file(w, inputs[i]);
}

static bool relevant(const watcher *w, const struct inotify_event *ev)
{
    for (size_t i = 0; i < w->n; i++)
        if (w->files[i].wd == ev->wd && ev->len && !strcmp(w->files[i].name, ev->name))
            return true;
    return false;
}

/* Read what is pending; true when one of the events concerns a watched file. */
static bool drain(const watcher *w)
{
    char buf[8192] __attribute__((aligned(__alignof__(struct inotify_event))));
    bool hit = false;
    ssize_t got;
    while ((got = read(w->fd, buf, sizeof buf)) > 0)
        for (char *p = buf; p < buf + got;) {
            const struct inotify_event *ev = (const struct inotify_event *)p;
            hit = hit || relevant(w, ev);
            p += sizeof *ev + ev->len;
        }
    return hit;
}

/* Wait for a change to a watched file and for the burst to settle; false
** when the deadline (0: none) passes first. One poll waits at most
** POLL_MAX_MS and the loop asks again, so the milliseconds left of a long
** --watch-timeout are never forced into an int. */
static bool wait_change(const watcher *w, double deadline)
{
    struct pollfd pfd = {w->fd, POLLIN, 0};
    bool changed = false;
    for (;;) {
        int ms = changed ? DEBOUNCE_MS : -1;
        if (deadline > 0) {
            double left = (deadline - cli_now()) * 1000;
            if (left <= 0)
                return false;
            int cap = left < POLL_MAX_MS ? (int)left + 1 : POLL_MAX_MS;
            ms = ms < 0 || cap < ms ? cap : ms;
        }
        int r = poll(&pfd, 1, ms);
        if (r < 0 && errno != EINTR)
            return false;
        if (r == 0 && changed)
            return true;
        if (r > 0)
            changed = drain(w) || changed;
    }
}

static void note(const char *file, const char *msg)
{
    ug_error e = {0};
    e.where.file = file;
    snprintf(e.msg, sizeof e.msg, "%s", msg);
    cli_diag("note", &e);
}

int cli_watch(const cli_draw_opts *o)
{
    watcher w = {.fd = inotify_init1(IN_NONBLOCK | IN_CLOEXEC)};
    if (w.fd < 0) {
        fprintf(stderr, "unitgram draw: error: cannot watch files: %s\n", strerror(errno));
        return EXIT_OUTPUT;
    }
    double deadline = o->watch_timeout > 0 ? cli_now() + o->watch_timeout : 0;
    char **inputs = NULL;
    int rc = cli_draw_layout(o, &inputs);
    watch_inputs(&w, o->layout, inputs);
    free(inputs);
    note(o->layout, "watching for changes (Ctrl-C stops)");
    for (long redraws = 0; !o->watch_limit || redraws < o->watch_limit; redraws++) {
        if (!wait_change(&w, deadline))
            break;
        rc = cli_draw_layout(o, &inputs);
        watch_inputs(&w, o->layout, inputs);
        free(inputs);
        if (rc == EXIT_OK)
            note(o->out, "redrawn");
        else
            note(o->out, "not redrawn: the last good picture stays");
    }
    forget_all(&w);
    close(w.fd);
    return rc;
}
