/*
** libFuzzer harness: the glyph sanitizer. Invariant: a loaded glyph's body
** never carries active content or references, whatever the file said.
*/
#define _POSIX_C_SOURCE 200809L
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "glyph.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static char lower(char c)
{
    return c >= 'A' && c <= 'Z' ? (char)(c - 'A' + 'a') : c;
}

/* A hand-written compare, not strncasecmp: libFuzzer hooks the library
** compares and would both slow every run and steer mutation towards the
** invariant's own needles. */
static bool has(const char *body, const char *needle)
{
    for (const char *p = body; *p; p++) {
        size_t i = 0;
        while (needle[i] && lower(p[i]) == needle[i])
            i++;
        if (!needle[i])
            return true;
    }
    return false;
}

/* " onload=" and the like: a space, "on", letters, "=". */
static bool has_event_attribute(const char *body)
{
    for (const char *p = body; (p = strstr(p, " on")) != NULL; p++) {
        const char *q = p + 3;
        while ((*q >= 'a' && *q <= 'z') || (*q >= 'A' && *q <= 'Z'))
            q++;
        if (q > p + 3 && *q == '=')
            return true;
    }
    return false;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static char dir[64];
    if (!dir[0]) {
        snprintf(dir, sizeof dir, "/tmp/ugfuzzglyphXXXXXX");
        if (!mkdtemp(dir))
            abort();
    }
    char path[96];
    snprintf(path, sizeof path, "%s/g.svg", dir);
    FILE *f = fopen(path, "wb");
    if (!f)
        abort();
    fwrite(data, 1, size, f);
    fclose(f);
    glyph_search search = {NULL, 0, dir};
    ug_glyph *g = NULL;
    ug_error err = {0};
    ug_mark where = {"fuzz.yaml", 1, 1};
    if (glyph_load("./g.svg", &search, where, &g, &err) == UG_OK) {
        const char *bad[] = {"<script", "href", "url(", "foreignobject", "<image",
                             "javascript:", "<style", "<!entity", "<use"};
        for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
            if (has(g->body, bad[i]))
                abort();
        if (has_event_attribute(g->body))
            abort();
    } else if (!err.msg[0]) {
        abort();
    }
    glyph_free(g);
    return 0;
}
