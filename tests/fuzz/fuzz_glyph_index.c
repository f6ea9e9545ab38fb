/*
** libFuzzer harness: a glyph folder's index.yaml, read as the library reads
** every folder's (read_index: layout_read_file and layout_parse with the
** layout reader's guards), through glyph_library_open_path, the library's
** opening over a given search path: a fixed first folder standing in for the
** library, then the fuzzed one.
** Invariants, whatever the index says:
**   - a failure carries a message and names a place;
**   - a success lists exactly the glyphs the folders' files offer (an index
**     describes glyphs, it never adds or hides one), sorted, each once, each
**     a library name with its folder and keywords;
**   - a weight is "none" (-1) or a number from 0 to 1, never NaN;
**   - the index touches only its own folder's glyphs: every glyph of the
**     other folders keeps the keywords and weight it had without it.
*/
#define _POSIX_C_SOURCE 200809L
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "glyph.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* Glyph files (test data, one small square each). The fuzzed folder's for
** its index to describe; "book" is also in the first folder, which comes
** first on the search path and so shadows this one. */
static const char *const own_glyphs[] = {"fz-a", "fz-b", "fz-long-name-0", "book"};
static const char *const first_glyphs[] = {"book", "first-only"};
static const char first_index[] = "- {name: book, keywords: [reading], weight: 0.48}\n"
                                  "- {name: first-only, keywords: [x, y]}\n";

static char top[64], first[80], dir[80];

typedef struct {
    size_t n;
    char **names, **keywords;
    double *weights;
} snapshot;

static snapshot before; /* the library as it is with an empty index */

static void write_file(const char *in, const char *name, const void *data, size_t len)
{
    char path[160];
    snprintf(path, sizeof path, "%s/%s", in, name);
    FILE *f = fopen(path, "wb");
    if (!f || fwrite(data, 1, len, f) != len || fclose(f) != 0)
        abort();
}

static ug_glyph_library *open_library(ug_status *st, ug_error *err)
{
    const char *path[] = {first, dir, NULL};
    ug_glyph_library *lib = NULL;
    memset(err, 0, sizeof *err);
    *st = glyph_library_open_path(path, &lib, err);
    return lib;
}

static void take_snapshot(const ug_glyph_library *lib, snapshot *s)
{
    s->n = ug_glyph_library_count(lib);
    s->names = calloc(s->n, sizeof *s->names);
    s->keywords = calloc(s->n, sizeof *s->keywords);
    s->weights = calloc(s->n, sizeof *s->weights);
    if (!s->names || !s->keywords || !s->weights)
        abort();
    for (size_t i = 0; i < s->n; i++) {
        s->names[i] = strdup(ug_glyph_library_name(lib, i));
        s->keywords[i] = strdup(ug_glyph_library_keywords(lib, i));
        s->weights[i] = glyph_library_weight(lib, i);
        if (!s->names[i] || !s->keywords[i])
            abort();
    }
}

static void add_glyphs(const char *in, const char *const *names, size_t n)
{
    static const char square[] = "<svg xmlns=\"http://www.w3.org/2000/svg\" "
                                 "viewBox=\"0 0 100 100\"><path d=\"M20 20h60v60H20z\"/></svg>";
    char name[80];
    for (size_t i = 0; i < n; i++) {
        snprintf(name, sizeof name, "%s.svg", names[i]);
        write_file(in, name, square, sizeof square - 1);
    }
}

/* The folders live in /dev/shm (a tmpfs: four times the executions of /tmp
** on disk) and go when the fuzzer exits. */
static void clean_up(void)
{
    char path[160];
    for (size_t i = 0; i < sizeof own_glyphs / sizeof own_glyphs[0]; i++) {
        snprintf(path, sizeof path, "%s/%s.svg", dir, own_glyphs[i]);
        unlink(path);
    }
    for (size_t i = 0; i < sizeof first_glyphs / sizeof first_glyphs[0]; i++) {
        snprintf(path, sizeof path, "%s/%s.svg", first, first_glyphs[i]);
        unlink(path);
    }
    snprintf(path, sizeof path, "%s/index.yaml", dir);
    unlink(path);
    snprintf(path, sizeof path, "%s/index.yaml", first);
    unlink(path);
    rmdir(dir);
    rmdir(first);
    rmdir(top);
}

static void set_up(void)
{
    snprintf(top, sizeof top, "/dev/shm/ugfuzzindexXXXXXX");
    if (!mkdtemp(top))
        abort();
    snprintf(first, sizeof first, "%s/first", top);
    snprintf(dir, sizeof dir, "%s/fuzzed", top);
    if (mkdir(first, 0700) || mkdir(dir, 0700))
        abort();
    atexit(clean_up);
    add_glyphs(first, first_glyphs, sizeof first_glyphs / sizeof first_glyphs[0]);
    add_glyphs(dir, own_glyphs, sizeof own_glyphs / sizeof own_glyphs[0]);
    write_file(first, "index.yaml", first_index, sizeof first_index - 1);
    write_file(dir, "index.yaml", "", 0);
    ug_status st;
    ug_error err;
    ug_glyph_library *lib = open_library(&st, &err);
    if (st || ug_glyph_library_count(lib) != 5)
        abort();
    take_snapshot(lib, &before);
    ug_glyph_library_free(lib);
}

static bool weight_ok(double w)
{
    return w == -1 || (w >= 0 && w <= 1); /* false for NaN */
}

static void check_entry(const ug_glyph_library *lib, size_t i)
{
    const char *name = ug_glyph_library_name(lib, i);
    const char *folder = ug_glyph_library_folder(lib, i);
    const char *kw = ug_glyph_library_keywords(lib, i);
    double w = glyph_library_weight(lib, i);
    if (!name || !folder || !kw || !glyph_is_library_name(name) || !weight_ok(w))
        abort();
    if (strcmp(name, before.names[i]) != 0)
        abort(); /* the index added, hid or reordered a glyph */
    if (i && strcmp(ug_glyph_library_name(lib, i - 1), name) >= 0)
        abort();
    if (strcmp(folder, dir) != 0 &&
        (strcmp(kw, before.keywords[i]) != 0 || w != before.weights[i]))
        abort(); /* it changed a glyph of another folder */
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (!dir[0])
        set_up();
    write_file(dir, "index.yaml", data, size);
    ug_status st;
    ug_error err;
    ug_glyph_library *lib = open_library(&st, &err);
    if (st) {
        if (lib || !err.msg[0] || !err.where.file)
            abort();
        return 0;
    }
    if (ug_glyph_library_count(lib) != before.n)
        abort();
    for (size_t i = 0; i < before.n; i++)
        check_entry(lib, i);
    ug_glyph_library_free(lib);
    return 0;
}
