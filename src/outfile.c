/*
** Every file unitgram writes goes through here, so that a failure, a signal or
** a hostile file system never loses the previous output or writes elsewhere:
**   - the bytes go to a temporary file in the target's folder, then rename(2)
**     puts them in place, so readers see the old picture or the new, never
**     half of one. The temporary name has a fixed length (a target name of 250
**     characters still leaves room) and is created O_EXCL | O_NOFOLLOW.
**   - temporaries in flight are listed where a signal handler can reach them:
**     ug_remove_partial_outputs() is async-signal-safe, so a CLI stopped by
**     Ctrl-C, TERM or HUP, or killed by a crash in any thread, leaves no
**     temporary file beside its outputs (pango matches fonts in threads of
**     its own, which may still run, and crash when memory runs out, while
**     an output is written).
**   - an existing device or FIFO is written in place (renaming over /dev/null
**     would replace the device node); a FIFO that nothing reads is refused at
**     once instead of blocking forever.
**   - ug_write_file_beneath walks the folders below a root with O_NOFOLLOW,
**     so a folder swapped for a symlink cannot lead a batch outside its root.
*/
#define _POSIX_C_SOURCE 200809L
#include <errno.h>
#include <fcntl.h>
#include <signal.h>
#include <stdatomic.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "ug.h"

/* ---- temporaries in flight --------------------------------------------------- */

enum { SLOT_FREE, SLOT_CLAIMED, SLOT_LIVE };
#define PENDING_MAX 64 /* more concurrent writes than this go unlisted */
#define TEMP_NAME_MAX 40

typedef struct {
    atomic_int state;
    int dirfd;
    char name[TEMP_NAME_MAX];
} pending_slot;

static pending_slot pending[PENDING_MAX];
static atomic_uint temp_serial;

void ug_remove_partial_outputs(void)
{
    for (size_t i = 0; i < PENDING_MAX; i++)
        if (atomic_load(&pending[i].state) == SLOT_LIVE)
            unlinkat(pending[i].dirfd, pending[i].name, 0);
}

static pending_slot *claim_slot(void)
{
    for (size_t i = 0; i < PENDING_MAX; i++) {
        int want = SLOT_FREE;
        if (atomic_compare_exchange_strong(&pending[i].state, &want, SLOT_CLAIMED))
            return &pending[i];
    }
    return NULL;
}

/* A slot turns live or free with the signals that stop the CLI held back, so
** a handler never sees a temporary that exists but is not listed. */
static void hold_signals(sigset_t *saved)
{
    sigset_t stop;
    sigemptyset(&stop);
    sigaddset(&stop, SIGINT);
    sigaddset(&stop, SIGTERM);
    sigaddset(&stop, SIGHUP);
    pthread_sigmask(SIG_BLOCK, &stop, saved);
}

static void release_signals(const sigset_t *saved)
{
    pthread_sigmask(SIG_SETMASK, saved, NULL);
}

static void mark_slot(pending_slot *s, int state)
{
    if (s)
        atomic_store(&s->state, state);
}

/* ---- writing ------------------------------------------------------------------ */

static ug_status write_all(int fd, const void *data, size_t len)
{
    const char *p = data;
    while (len) {
        ssize_t n = write(fd, p, len);
        if (n < 0 && errno == EINTR)
            continue;
        if (n <= 0)
            return UG_EIO;
        p += n;
        len -= (size_t)n;
    }
    return UG_OK;
}

static ug_status write_stdout(const void *data, size_t len, ug_error *err)
{
    if (fwrite(data, 1, len, stdout) != len || fflush(stdout) != 0)
        return ug_fail(err, UG_EIO, ug_mark_file("<stdout>"),
                       "could not write to standard output: %s", strerror(errno));
    return UG_OK;
}

static ug_status output_error(const char *shown, int e, ug_error *err)
{
    return ug_fail(err, UG_EIO, ug_mark_file(shown), "cannot write output: %s",
                   strerror(e ? e : EIO));
}

/* A device, FIFO or socket already at base is written in place; a folder is
** refused. *done stays false for a regular file, a symlink not followed, or
** nothing there. */
static ug_status write_special(int dirfd, const char *base, const char *shown,
                               bool follow, const void *data, size_t len, bool *done,
                               ug_error *err)
{
    struct stat sb;
    *done = false;
    if (fstatat(dirfd, base, &sb, follow ? 0 : AT_SYMLINK_NOFOLLOW) != 0 ||
        S_ISREG(sb.st_mode) || S_ISLNK(sb.st_mode))
        return UG_OK;
    *done = true;
    if (S_ISDIR(sb.st_mode))
        return ug_fail(err, UG_EIO, ug_mark_file(shown),
                       "cannot write output: it is a folder");
    int fd = openat(dirfd, base, O_WRONLY | O_NONBLOCK | O_NOCTTY | O_CLOEXEC |
                                     (follow ? 0 : O_NOFOLLOW));
    if (fd < 0 && errno == ENXIO)
        return ug_fail(err, UG_EIO, ug_mark_file(shown),
                       "cannot write output: it is a named pipe or socket that "
                       "nothing is reading (unitgram does not wait for a reader)");
    if (fd < 0)
        return output_error(shown, errno, err);
    /* A reader is there: from now on wait for it like any pipe writer. */
    fcntl(fd, F_SETFL, fcntl(fd, F_GETFL) & ~O_NONBLOCK);
    bool ok = write_all(fd, data, len) == UG_OK;
    int saved = errno;
    if (close(fd) != 0 && ok) {
        ok = false;
        saved = errno;
    }
    return ok ? UG_OK : output_error(shown, saved, err);
}

/* A new temporary file in dirfd, listed in slot s (when there is one). */
static int create_temp(int dirfd, pending_slot *s, char *name)
{
    for (int tries = 0; tries < 100; tries++) {
        unsigned serial = atomic_fetch_add(&temp_serial, 1u);
        snprintf(name, TEMP_NAME_MAX, ".unitgram-tmp-%ld-%u", (long)getpid(), serial);
        if (s) {
            memcpy(s->name, name, TEMP_NAME_MAX);
            s->dirfd = dirfd;
        }
        sigset_t saved;
        hold_signals(&saved);
        /* Listed before it exists: a crash in another thread (pango's font
        ** threads), which no signal mask here holds back, must never find
        ** the file there but not listed. Removing a name not yet created
        ** does nothing. */
        mark_slot(s, SLOT_LIVE);
        /* 0666 under the umask: a chart is a document meant to be shared. */
        int fd = openat(dirfd, name, O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC,
                        0666);
        int e = errno;
        if (fd < 0)
            mark_slot(s, SLOT_CLAIMED);
        release_signals(&saved);
        if (fd >= 0 || e != EEXIST) {
            errno = e;
            return fd;
        }
    }
    errno = EEXIST;
    return -1;
}

/* Where a temporary ends up: renamed over base, or linked to base so that
** anything already there (a dangling symlink included) stays and *existed is
** set. File systems without hard links get a new file written in place,
** still exclusively. */
typedef struct {
    bool replace;
    int *existed;
} placing;

static int write_new_in_place(int dirfd, const char *base, const void *data, size_t len)
{
    int fd = openat(dirfd, base, O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_NONBLOCK |
                                     O_CLOEXEC, 0666);
    if (fd < 0)
        return errno;
    int e = write_all(fd, data, len) == UG_OK && fsync(fd) == 0 ? 0 : errno ? errno : EIO;
    if (close(fd) != 0 && !e)
        e = errno;
    if (e)
        unlinkat(dirfd, base, 0);
    return e;
}

/* The temporary name put in place at base; 0 or an errno value. */
static int place(int dirfd, const char *name, const char *base, const void *data,
                 size_t len, placing how)
{
    if (how.replace)
        return renameat(dirfd, name, dirfd, base) == 0 ? 0 : errno;
    int e = linkat(dirfd, name, dirfd, base, 0) == 0 ? 0 : errno;
    unlinkat(dirfd, name, 0);
    if (e == EPERM || e == EOPNOTSUPP)
        e = write_new_in_place(dirfd, base, data, len);
    if (e == EEXIST && how.existed)
        *how.existed = 1;
    return e;
}

static ug_status write_through_temp(int dirfd, const char *base, const char *shown,
                                    const void *data, size_t len, bool sync,
                                    placing how, ug_error *err)
{
    char name[TEMP_NAME_MAX];
    pending_slot *s = claim_slot();
    int fd = create_temp(dirfd, s, name);
    if (fd < 0) {
        int e = errno;
        mark_slot(s, SLOT_FREE);
        return ug_fail(err, UG_EIO, ug_mark_file(shown), "cannot create output: %s",
                       strerror(e));
    }
    int saved = 0;
    bool ok = write_all(fd, data, len) == UG_OK && (!sync || fsync(fd) == 0);
    if (!ok)
        saved = errno;
    if (close(fd) != 0 && ok) {
        ok = false;
        saved = errno;
    }
    sigset_t held;
    hold_signals(&held);
    if (ok && (saved = place(dirfd, name, base, data, len, how)) != 0)
        ok = false;
    if (!ok)
        unlinkat(dirfd, name, 0);
    mark_slot(s, SLOT_FREE);
    release_signals(&held);
    if (!ok && saved == EEXIST && !how.replace)
        return ug_fail(err, UG_EIO, ug_mark_file(shown),
                       "cannot create output: something is there already");
    return ok ? UG_OK : output_error(shown, saved, err);
}

static ug_status write_at(int dirfd, const char *base, const char *shown, bool follow,
                          const void *data, size_t len, bool sync, ug_error *err)
{
    bool done;
    ug_status st = write_special(dirfd, base, shown, follow, data, len, &done, err);
    if (done)
        return st;
    return write_through_temp(dirfd, base, shown, data, len, sync, (placing){true, NULL},
                              err);
}

/* The folder part of path, opened; *base points into path. -1 on failure. */
static int open_parent(const char *path, const char **base)
{
    const char *slash = strrchr(path, '/');
    *base = slash ? slash + 1 : path;
    if (!slash)
        return open(".", O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    size_t n = slash == path ? 1 : (size_t)(slash - path);
    char *dir = ug_strndup(path, n);
    if (!dir) {
        errno = ENOMEM;
        return -1;
    }
    int fd = open(dir, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    ug_free(dir);
    return fd;
}

ug_status ug_write_file_atomic(const char *path, const void *data, size_t len,
                               ug_error *err)
{
    ug_error_clear(err);
    return ug_write_file_atomic_sync(path, data, len, true, err);
}

/* Symlinks at path are followed when they lead to a device or FIFO (so
** -o /dev/stdout works) and otherwise replaced, never written through. */
ug_status ug_write_file_atomic_sync(const char *path, const void *data, size_t len,
                                    int sync, ug_error *err)
{
    ug_error_clear(err);
    if (strcmp(path, "-") == 0)
        return write_stdout(data, len, err);
    const char *base;
    int dirfd = open_parent(path, &base);
    if (dirfd < 0)
        return ug_fail(err, UG_EIO, ug_mark_file(path), "cannot create output: %s",
                       strerror(errno));
    ug_status st = *base ? write_at(dirfd, base, path, true, data, len, sync, err)
                         : ug_fail(err, UG_EIO, ug_mark_file(path),
                                   "cannot write output: the name ends in '/'");
    close(dirfd);
    return st;
}

/* Nothing at path is looked at first: the kernel decides, at linkat(2), that
** something is there, so no other process can slip a file (or a FIFO to
** block on) into a gap between a look and the write. */
ug_status ug_write_file_new(const char *path, const void *data, size_t len,
                            int *existed, ug_error *err)
{
    ug_error_clear(err);
    if (existed)
        *existed = 0;
    const char *base;
    int dirfd = open_parent(path, &base);
    if (dirfd < 0)
        return ug_fail(err, UG_EIO, ug_mark_file(path), "cannot create output: %s",
                       strerror(errno));
    ug_status st = *base ? write_through_temp(dirfd, base, path, data, len, true,
                                              (placing){false, existed}, err)
                         : ug_fail(err, UG_EIO, ug_mark_file(path),
                                   "cannot write output: the name ends in '/'");
    close(dirfd);
    return st;
}

/* ---- confined folders ------------------------------------------------------------- */

/* dirfd and comp opened as a folder, comp made first when make_dirs; dirfd
** is closed either way. A symlink (ELOOP) or a file (ENOTDIR) stops it. */
static int step_into(int dirfd, const char *comp, bool make_dirs)
{
    int fd = -1;
    if (!make_dirs || mkdirat(dirfd, comp, 0777) == 0 || errno == EEXIST)
        fd = openat(dirfd, comp, O_RDONLY | O_DIRECTORY | O_NOFOLLOW | O_CLOEXEC);
    int e = errno;
    close(dirfd);
    errno = e;
    return fd;
}

int ug_open_beneath(int dirfd, const char *rel, int flags, bool make_dirs)
{
    int fd = dup(dirfd);
    const char *p = rel;
    for (const char *slash; fd >= 0 && (slash = strchr(p, '/')); p = slash + 1) {
        size_t n = (size_t)(slash - p);
        char comp[256];
        if (n == 0 || (n == 1 && *p == '.'))
            continue;
        if (n >= sizeof comp || (n == 2 && p[0] == '.' && p[1] == '.')) {
            close(fd);
            errno = n >= sizeof comp ? ENAMETOOLONG : EACCES;
            return -1;
        }
        memcpy(comp, p, n);
        comp[n] = '\0';
        fd = step_into(fd, comp, make_dirs);
    }
    if (fd < 0 || !*p)
        return fd;
    if (!strcmp(p, "..")) {
        close(fd);
        errno = EACCES;
        return -1;
    }
    int last = openat(fd, p, flags | O_NOFOLLOW | O_CLOEXEC);
    int e = errno;
    close(fd);
    errno = e;
    return last;
}

static bool has_dotdot(const char *rel)
{
    for (const char *p = rel; (p = strstr(p, "..")); p += 2)
        if ((p == rel || p[-1] == '/') && (p[2] == '/' || !p[2]))
            return true;
    return false;
}

static ug_status folder_error(const char *root, const char *dirs, int e, ug_error *err)
{
    if (e == ELOOP || e == ENOTDIR)
        return ug_fail(err, UG_EIO, ug_mark_file(root),
                       "'%s/%s' leads through a symbolic link or a file: output stays "
                       "inside '%s' and never follows a link out of it", root, dirs, root);
    return ug_fail(err, UG_EIO, ug_mark_file(root), "cannot create folder '%s/%s': %s",
                   root, dirs, strerror(e));
}

static ug_status write_into(int rootfd, const char *root, const char *rel,
                            const char *dirs, const void *data, size_t len, int sync,
                            ug_error *err)
{
    int dirfd = ug_open_beneath(rootfd, dirs, O_RDONLY | O_DIRECTORY, true);
    if (dirfd < 0)
        return folder_error(root, dirs, errno, err);
    size_t n = strlen(root) + strlen(rel) + 2;
    char *shown = ug_malloc(n);
    if (shown)
        snprintf(shown, n, "%s/%s", root, rel);
    const char *base = rel + strlen(dirs);
    ug_status st = write_at(dirfd, base, shown ? shown : rel, false, data, len, sync, err);
    ug_free(shown);
    close(dirfd);
    return st;
}

ug_status ug_write_file_beneath(const char *root, const char *rel, const void *data,
                                size_t len, int sync, ug_error *err)
{
    ug_error_clear(err);
    const char *slash = strrchr(rel, '/');
    const char *base = slash ? slash + 1 : rel;
    if (has_dotdot(rel) || !*base || !strcmp(base, "."))
        return ug_fail(err, UG_EIO, ug_mark_file(root),
                       "'%s' does not name a file inside '%s'", rel, root);
    int rootfd = open(*root ? root : ".", O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (rootfd < 0)
        return ug_fail(err, UG_EIO, ug_mark_file(root), "cannot open output folder: %s",
                       strerror(errno));
    char *dirs = ug_strndup(rel, slash ? (size_t)(slash - rel + 1) : 0);
    ug_status st = dirs ? write_into(rootfd, root, rel, dirs, data, len, sync, err)
                        : ug_fail(err, UG_ENOMEM, ug_mark_file(root), "out of memory");
    ug_free(dirs);
    close(rootfd);
    return st;
}
