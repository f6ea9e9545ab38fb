/*
** The layout stage's input reader: a layout or CSV file read whole within its
** limit (or served by the context's file hook), its text checked (valid UTF-8,
** no control characters), and paths joined to a layout's folder.
*/
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "context.h"
#include "layout_int.h"

/* ---- files and text ------------------------------------------------------ */

static ug_status too_large(const char *path, size_t max, ug_mark at, ug_error *err)
{
    return ug_fail(err, UG_ELIMIT, at, "'%s' is larger than the limit of %zu bytes "
                   "(raise it with --max-input-bytes)", path, max);
}

/* The host's file hook (ug_context_options.read_file) first: 1 when it
** served the file (or refused it, with the error raised), 0 for the disk. */
static int read_hooked(const char *path, size_t max, ug_mark at, char **text,
                       size_t *len, ug_status *rc, ug_error *err)
{
    const ug_context *c = ug_ctx();
    const char *data = NULL;
    size_t n = 0;
    int got = c->read_file ? c->read_file(c->read_ud, path, &data, &n) : 0;
    if (got == 0)
        return 0;
    if (got < 0 || (!data && n))
        *rc = ug_fail(err, UG_EIO, at, "cannot read '%s': refused by the host's reader", path);
    else if (n > max)
        *rc = too_large(path, max, at, err);
    else if (!(*text = ug_malloc(n + 1)))
        *rc = ug_fail(err, UG_ENOMEM, at, "out of memory");
    else {
        if (n)
            memcpy(*text, data, n);
        (*text)[n] = '\0';
        *len = n;
        *rc = UG_OK;
    }
    return 1;
}

ug_status layout_read_file(const char *path, size_t max, ug_mark at,
                           char **text, size_t *len, ug_error *err)
{
    *text = NULL;
    ug_status hooked;
    if (read_hooked(path, max, at, text, len, &hooked, err))
        return hooked;
    /* Non-blocking, so a FIFO is refused below instead of waiting for a writer. */
    int fd = open(path, O_RDONLY | O_NONBLOCK | O_CLOEXEC);
    FILE *f = fd < 0 ? NULL : fdopen(fd, "rb");
    if (!f) {
        int e = errno;
        if (fd >= 0)
            close(fd);
        return ug_fail(err, UG_EIO, at, "cannot read '%s': %s", path, strerror(e));
    }
    struct stat st;
    ug_status rc = UG_OK;
    char *buf = NULL;
    if (fstat(fileno(f), &st) != 0 || !S_ISREG(st.st_mode)) {
        rc = ug_fail(err, UG_EIO, at, "cannot read '%s': not a regular file", path);
        goto out;
    }
    if ((unsigned long long)st.st_size > max) {
        rc = too_large(path, max, at, err);
        goto out;
    }
    size_t size = (size_t)st.st_size;
    if (!(buf = ug_malloc(size + 1))) {
        rc = ug_fail(err, UG_ENOMEM, at, "out of memory");
        goto out;
    }
    if (fread(buf, 1, size, f) != size) {
        rc = ug_fail(err, UG_EIO, at, "cannot read '%s': short read", path);
        goto out;
    }
    buf[size] = '\0';
    *text = buf;
    *len = size;
    buf = NULL;
out:
    ug_free(buf);
    fclose(f);
    return rc;
}

static bool is_control(unsigned long cp)
{
    return cp < 0x20 || cp == 0x7F || (cp >= 0x80 && cp <= 0x9F);
}

ug_status layout_check_text(const char *s, size_t n, bool multiline, ug_mark at,
                            ug_error *err)
{
    const unsigned char *u = (const unsigned char *)s;
    for (size_t i = 0; i < n;) {
        unsigned long cp;
        size_t k = ug_utf8_decode(s + i, n - i, &cp);
        if (!k)
            return ug_fail(err, UG_EDATA, at, "not UTF-8: invalid byte 0x%02X",
                           u[i]);
        if (cp == '\n' && !multiline)
            return ug_fail(err, UG_ESCHEMA, at,
                           "a line break is not allowed here (only in "
                           "'description' and text panels)");
        if (is_control(cp) && cp != '\n')
            return ug_fail(err, UG_ESCHEMA, at,
                           "control character U+%04lX is not allowed in text", cp);
        i += k;
    }
    return UG_OK;
}

/* The whole file before libyaml sees it: UTF-8, and no control characters
** besides tab and line ends. The mark counts code points, as libyaml does. */
ug_status layout_scan_file(const char *text, size_t len, const char *file,
                           ug_error *err)
{
    const unsigned char *u = (const unsigned char *)text;
    ug_mark m = {file, 1, 1};
    size_t i = len >= 3 && !memcmp(text, "\xEF\xBB\xBF", 3) ? 3 : 0;
    while (i < len) {
        unsigned long cp;
        size_t k = ug_utf8_decode(text + i, len - i, &cp);
        if (!k)
            return ug_fail(err, UG_EDATA, m, "not UTF-8: invalid byte 0x%02X",
                           u[i]);
        if (is_control(cp) && cp != '\t' && cp != '\n' && cp != '\r')
            return ug_fail(err, UG_ESYNTAX, m,
                           "control character U+%04lX is not allowed", cp);
        bool crlf = cp == '\r' && i + 1 < len && u[i + 1] == '\n';
        if ((cp == '\n' || cp == '\r') && !crlf) {
            m.line++;
            m.column = 1;
        } else if (!crlf) {
            m.column++;
        }
        i += k;
    }
    return UG_OK;
}

char *layout_join(ug_arena *a, const char *dir, const char *rel)
{
    if (!dir || !*dir || rel[0] == '/')
        return ug_arena_strdup(a, rel);
    size_t n = strlen(dir) + strlen(rel) + 2;
    char *p = ug_arena_alloc(a, n);
    if (p)
        snprintf(p, n, "%s/%s", dir, rel);
    return p;
}

char *layout_dir_of(ug_arena *a, const char *path)
{
    const char *slash = strrchr(path, '/');
    if (!slash)
        return ug_arena_strdup(a, "");
    return ug_arena_strndup(a, path, slash == path ? 1 : (size_t)(slash - path));
}

