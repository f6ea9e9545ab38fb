/* Tests for src/glyph.c, src/glyph_render.c, src/glyph_library.c: sanitizing
** a hostile corpus, confining file paths, fitting user glyphs into the unit
** box, inked area, the library listing and its contact sheet. */
#define _GNU_SOURCE /* mkdtemp, setenv */
#include <check.h>
#include <libxml/parser.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "glyph.h"
#include "check_run.h"

#define HOSTILE "data/glyphs/hostile"
#define SHAPES "data/glyphs/shapes"

static ug_mark here(void) { return ug_mark_file("test.yaml"); }

static ug_status load_in(const char *dir, const char *ref, ug_glyph **g, ug_error *err)
{
    glyph_search s = {NULL, 0, dir};
    ug_error_clear(err);
    return glyph_load(ref, &s, here(), g, err);
}

/* Nothing active may survive in a body, whatever the input was. */
static void assert_inert(const char *body)
{
    static const char *const banned[] = {"<script", "href", "url(", "foreignObject",
                                         "<image", "javascript:", "<use", "<style",
                                         "style=", "<a ", "<set", "<animate", "fill=",
                                         "stroke"};
    for (size_t i = 0; i < sizeof banned / sizeof *banned; i++)
        ck_assert_msg(!strcasestr(body, banned[i]), "body contains %s: %s", banned[i], body);
    for (const char *p = body; (p = strstr(p, " on")); p++)
        ck_assert_msg(0, "body has an on-attribute: %s", body);
}

/* ---- the hostile corpus ------------------------------------------------- */

typedef struct {
    const char *file;
    ug_status status;
    const char *expect; /* a line of g->removed, or a piece of the error */
} hostile_case;

static const hostile_case hostile[] = {
    {"script.svg", UG_OK, "element 'script'"},
    {"onload.svg", UG_OK, "attribute 'onclick'"},
    {"foreign-object.svg", UG_OK, "element 'foreignObject'"},
    {"use-external.svg", UG_OK, "element 'use'"},
    {"a-javascript.svg", UG_OK, "link 'a' (its drawing is kept)"},
    {"image-external.svg", UG_OK, "element 'image'"},
    {"style-import.svg", UG_OK, "element 'style' (with @import or url(): an external fetch)"},
    {"style-attribute.svg", UG_OK, "attribute 'clip-path' (it referred to url())"},
    {"attribute-injection.svg", UG_OK, "attribute 'transform' (it referred to url())"},
    {"xinclude.svg", UG_OK, "element 'xi:include'"},
    {"stylesheet-pi.svg", UG_OK, "processing instruction 'xml-stylesheet'"},
    {"animate-set.svg", UG_OK, "element 'animate'"},
    {"billion-laughs.svg", UG_ESCHEMA, "has a DTD"},
    {"xxe-passwd.svg", UG_ESCHEMA, "has a DTD"},
    {"xxe-external-dtd.svg", UG_ESCHEMA, "has a DTD"},
    {"xxe-parameter.svg", UG_ESCHEMA, "has a DTD"},
    {"deep-nesting.svg", UG_ELIMIT, "nests elements deeper than 32 levels"},
    {"many-elements.svg", UG_ELIMIT, "more than 5000 elements"},
    {"invalid-xml.svg", UG_ESYNTAX, "is not well-formed XML (line 2:"},
    {"non-utf8.svg", UG_ESYNTAX, "is not well-formed XML"},
    {"empty.svg", UG_ESYNTAX, "is empty"},
    {"no-drawing.svg", UG_ESCHEMA, "has no drawing left after sanitizing"},
    {"only-unfilled.svg", UG_ESCHEMA, "removed: unfilled element"},
    {"not-svg.svg", UG_ESCHEMA, "has no <svg> root element"},
    {"zero-size.svg", UG_ESCHEMA, "draws nothing with an area"},
};

static bool has_line(const ug_glyph *g, const char *line)
{
    for (size_t i = 0; i < g->nremoved; i++)
        if (strcmp(g->removed[i], line) == 0)
            return true;
    return false;
}

START_TEST(test_hostile_corpus)
{
    const hostile_case *c = &hostile[_i];
    char ref[200];
    snprintf(ref, sizeof ref, "./%s", c->file);
    ug_glyph *g = NULL;
    ug_error err;
    ug_status st = load_in(HOSTILE, ref, &g, &err);
    ck_assert_msg(st == c->status, "%s: status %d, expected %d (%s)", c->file, st,
                  c->status, err.msg);
    if (st) {
        ck_assert_ptr_null(g);
        ck_assert_msg(strstr(err.msg, c->expect), "%s: message '%s'", c->file, err.msg);
        ck_assert_str_eq(err.where.file, "test.yaml");
        return;
    }
    assert_inert(g->body);
    ck_assert_msg(has_line(g, c->expect), "%s: '%s' not among %zu removals", c->file,
                  c->expect, g->nremoved);
    ck_assert(g->ink > 0.5 && g->ink <= 1.0); /* the one 80 x 80 square survives */
    glyph_free(g);
}
END_TEST

/* Every removal a hostile file causes is listed (not only the first). */
START_TEST(test_all_removals_listed)
{
    ug_glyph *g = NULL;
    ug_error err;
    ck_assert_int_eq(load_in(HOSTILE, "onload.svg", &g, &err), UG_OK);
    static const char *const want[] = {"attribute 'onload'", "attribute 'onclick'",
                                       "attribute 'onmouseover'", "attribute 'onfocus'"};
    ck_assert_uint_eq(g->nremoved, 4);
    for (size_t i = 0; i < 4; i++)
        ck_assert_str_eq(g->removed[i], want[i]);
    glyph_free(g);
}
END_TEST

/* ---- paths that leave the layout's folder -------------------------------- */

static char tmp[256];

static void make_tmp(void)
{
    snprintf(tmp, sizeof tmp, "/tmp/ug-glyph-XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(tmp));
}

static void write_text(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    fclose(f);
}

static const char *square_svg =
    "<svg xmlns=\"http://www.w3.org/2000/svg\"><rect width=\"5\" height=\"5\"/></svg>";

typedef struct {
    const char *ref;
    ug_status status;
} escape_case;

/* Layout folder: TMP/lay. TMP/outside.svg and TMP/lay2/x.svg lie outside it. */
static const escape_case escapes[] = {
    {"in.svg", UG_OK},
    {"./sub/../in.svg", UG_OK},
    {"link-in.svg", UG_OK},
    {"../outside.svg", UG_ESCHEMA},
    {"sub/../../outside.svg", UG_ESCHEMA},
    {"link-out.svg", UG_ESCHEMA},
    {"dirlink/outside.svg", UG_ESCHEMA},
    {"../lay2/x.svg", UG_ESCHEMA}, /* same prefix, other folder */
    {"/etc/passwd", UG_ESCHEMA},
    {"missing.svg", UG_EIO},
};

START_TEST(test_path_escapes)
{
    char p[512], lay[300];
    make_tmp();
    snprintf(lay, sizeof lay, "%s/lay", tmp);
    mkdir(lay, 0755);
    snprintf(p, sizeof p, "%s/sub", lay), mkdir(p, 0755);
    snprintf(p, sizeof p, "%s/lay2", tmp), mkdir(p, 0755);
    snprintf(p, sizeof p, "%s/lay2/x.svg", tmp), write_text(p, square_svg);
    snprintf(p, sizeof p, "%s/in.svg", lay), write_text(p, square_svg);
    snprintf(p, sizeof p, "%s/outside.svg", tmp), write_text(p, square_svg);
    snprintf(p, sizeof p, "%s/link-out.svg", lay);
    ck_assert_int_eq(symlink("../outside.svg", p), 0);
    snprintf(p, sizeof p, "%s/link-in.svg", lay);
    ck_assert_int_eq(symlink("in.svg", p), 0);
    snprintf(p, sizeof p, "%s/dirlink", lay);
    ck_assert_int_eq(symlink("..", p), 0);
    for (size_t i = 0; i < sizeof escapes / sizeof *escapes; i++) {
        ug_glyph *g = NULL;
        ug_error err;
        ug_status st = load_in(lay, escapes[i].ref, &g, &err);
        ck_assert_msg(st == escapes[i].status, "%s: %d (%s)", escapes[i].ref, st, err.msg);
        if (st == UG_ESCHEMA)
            ck_assert_msg(strstr(err.msg, "is outside the layout's folder"), "%s", err.msg);
        glyph_free(g);
    }
    /* An absolute path inside the folder is fine. */
    ug_glyph *g = NULL;
    ug_error err;
    char real[4096];
    snprintf(p, sizeof p, "%s/in.svg", lay);
    ck_assert_ptr_nonnull(realpath(p, real));
    ck_assert_int_eq(load_in(lay, real, &g, &err), UG_OK);
    glyph_free(g);
}
END_TEST

/* The race the walk closes: lay/sub is real when the path is resolved, and a
** symlink to a folder outside by the time the file is opened. */
static char swap_lay[300];

static void swap_folder_for_link(const char *path)
{
    (void)path;
    char from[400], to[400];
    snprintf(from, sizeof from, "%s/sub", swap_lay);
    snprintf(to, sizeof to, "%s/away", swap_lay);
    ck_assert_int_eq(rename(from, to), 0);
    ck_assert_int_eq(symlink("../far", from), 0);
}

START_TEST(test_folder_swapped_after_resolving)
{
    char p[512];
    make_tmp();
    snprintf(swap_lay, sizeof swap_lay, "%s/lay", tmp);
    mkdir(swap_lay, 0755);
    snprintf(p, sizeof p, "%s/sub", swap_lay), mkdir(p, 0755);
    snprintf(p, sizeof p, "%s/sub/g.svg", swap_lay), write_text(p, square_svg);
    snprintf(p, sizeof p, "%s/far", tmp), mkdir(p, 0755);
    snprintf(p, sizeof p, "%s/far/g.svg", tmp), write_text(p, square_svg);
    glyph_resolved_hook = swap_folder_for_link;
    ug_glyph *g = NULL;
    ug_error err;
    ug_status st = load_in(swap_lay, "sub/g.svg", &g, &err);
    glyph_resolved_hook = NULL;
    ck_assert_msg(st == UG_ESCHEMA, "loaded through the swapped folder: %d (%s)", st, err.msg);
    ck_assert_msg(strstr(err.msg, "no longer inside"), "%s", err.msg);
    ck_assert_ptr_null(g);
}
END_TEST

START_TEST(test_huge_file)
{
    char p[512];
    make_tmp();
    snprintf(p, sizeof p, "%s/huge.svg", tmp);
    FILE *f = fopen(p, "w");
    ck_assert_ptr_nonnull(f);
    fputs("<svg xmlns=\"http://www.w3.org/2000/svg\">", f);
    for (int i = 0; i < 60000; i++)
        fputs("<rect width=\"1\" height=\"1\"/>", f); /* 28 bytes each: > 1 MiB */
    fputs("</svg>", f);
    fclose(f);
    ug_glyph *g = NULL;
    ug_error err;
    ck_assert_int_eq(load_in(tmp, "huge.svg", &g, &err), UG_ELIMIT);
    ck_assert_msg(strstr(err.msg, "larger than 1048576 bytes"), "%s", err.msg);
    /* a FIFO is not a regular file: refused without blocking */
    snprintf(p, sizeof p, "%s/fifo.svg", tmp);
    ck_assert_int_eq(mkfifo(p, 0644), 0);
    ck_assert_int_eq(load_in(tmp, "fifo.svg", &g, &err), UG_EIO);
    ck_assert_msg(strstr(err.msg, "not a regular file"), "%s", err.msg);
}
END_TEST

/* ---- primitives and inked area --------------------------------------------- */

/* A disc of radius 50 in a 100 x 100 box covers pi/4 of it (geometry, the area
** pi r^2); the inked area at 64 x 64 with coverage summing must agree. */
START_TEST(test_primitive_ink)
{
    ug_glyph *g = NULL;
    ug_error err;
    ck_assert_int_eq(load_in(".", "square", &g, &err), UG_OK);
    ck_assert_double_eq_tol(g->ink, 1.0, 1e-9);
    ck_assert_ptr_null(g->path);
    glyph_free(g);
    ck_assert_int_eq(load_in(".", "circle", &g, &err), UG_OK);
    ck_assert_double_eq_tol(g->ink, M_PI / 4, 0.003);
    glyph_free(g);
    ck_assert_int_eq(load_in(".", "rounded-square", &g, &err), UG_OK);
    /* square minus four corners of (1 - pi/4) r^2 with r = 18 */
    ck_assert_double_eq_tol(g->ink, 1 - 4 * (1 - M_PI / 4) * 0.18 * 0.18, 0.003);
    glyph_free(g);
}
END_TEST

/* An even-odd ring: 92^2 - 40^2 of 100^2, the hole must stay a hole. */
START_TEST(test_fill_rule_kept)
{
    ug_glyph *g = NULL;
    ug_error err;
    ck_assert_int_eq(load_in(SHAPES, "ring-evenodd.svg", &g, &err), UG_OK);
    ck_assert_double_eq_tol(g->ink, (92.0 * 92 - 40 * 40) / 10000, 0.004);
    ck_assert_uint_eq(g->nremoved, 0);
    glyph_free(g);
}
END_TEST

/* ---- normalisation: a user glyph sits like a library glyph ------------------ */

typedef struct {
    const char *user, *unit;
} pair_case;

static const pair_case pairs[] = {
    {"square-24.svg", "square-unit.svg"},      /* 0 0 24 24 viewBox */
    {"square-shifted.svg", "square-unit.svg"}, /* far outside its own viewport, scaled */
    {"triangle-24.svg", "triangle-unit.svg"},  /* polyline filled as a polygon */
    {"wide-px.svg", "wide-unit.svg"},          /* width/height in px, no viewBox */
    {"disc-offset.svg", "disc-unit.svg"},      /* tiny, at negative coordinates */
};

/* Tolerance (our choice): the two renderings may differ by at most 1% of
** the 4096 pixels' total coverage, and no pixel by more than a quarter. */
START_TEST(test_same_footprint)
{
    const pair_case *c = &pairs[_i];
    ug_glyph *a = NULL, *b = NULL;
    ug_error err;
    ck_assert_int_eq(load_in(SHAPES, c->user, &a, &err), UG_OK);
    ck_assert_int_eq(load_in(SHAPES, c->unit, &b, &err), UG_OK);
    unsigned char pa[64 * 64], pb[64 * 64];
    ck_assert_int_eq(glyph_rasterize(a->shape, 64, pa, here(), &err), UG_OK);
    ck_assert_int_eq(glyph_rasterize(b->shape, 64, pb, here(), &err), UG_OK);
    double diff = 0;
    int worst = 0;
    for (size_t i = 0; i < sizeof pa; i++) {
        int d = abs((int)pa[i] - (int)pb[i]);
        diff += d / 255.0;
        worst = d > worst ? d : worst;
    }
    ck_assert_msg(diff <= 0.01 * 4096 * b->ink && worst <= 64,
                  "%s vs %s: summed difference %.2f px, worst pixel %d", c->user, c->unit,
                  diff, worst);
    ck_assert_double_eq_tol(a->ink, b->ink, 0.01 * b->ink);
    glyph_free(a);
    glyph_free(b);
}
END_TEST

/* A staircase of n segments: h and v steps, an h when n - 1 is odd, the close. */
static void write_staircase(const char *path, int n)
{
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs("<svg xmlns=\"http://www.w3.org/2000/svg\"><path d=\"M0 0", f);
    for (int i = 0; i < n - 1; i++)
        fputs(i % 2 ? "v1" : "h1", f);
    fputs("Z\"/></svg>", f);
    fclose(f);
}

/* GLYPH_MAX_SEGMENTS lines and curves load; one more is refused, naming the
** file, the count and the limit. */
START_TEST(test_segment_limit)
{
    char dir[] = "/tmp/ug-segments-XXXXXX", path[100];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    ug_glyph *g = NULL;
    ug_error err;
    snprintf(path, sizeof path, "%s/at.svg", dir);
    write_staircase(path, GLYPH_MAX_SEGMENTS);
    ck_assert_int_eq(load_in(dir, "./at.svg", &g, &err), UG_OK);
    ck_assert_uint_eq(g->segments, GLYPH_MAX_SEGMENTS);
    ck_assert_uint_eq(glyph_shape_segments(g->shape), GLYPH_MAX_SEGMENTS);
    glyph_free(g);
    unlink(path);
    snprintf(path, sizeof path, "%s/over.svg", dir);
    write_staircase(path, GLYPH_MAX_SEGMENTS + 1);
    ck_assert_int_eq(load_in(dir, "./over.svg", &g, &err), UG_ELIMIT);
    char want[300];
    snprintf(want, sizeof want, "over.svg' has %d segments (lines and curves), more than %d",
             GLYPH_MAX_SEGMENTS + 1, GLYPH_MAX_SEGMENTS);
    ck_assert_msg(strstr(err.msg, want), "%s", err.msg);
    unlink(path);
    rmdir(dir);
}
END_TEST

/* Malformed geometry that passed the sanitizer's character check is refused
** with the file's name and the place in the attribute. */
START_TEST(test_malformed_path_named)
{
    char dir[] = "/tmp/ug-malformed-XXXXXX", path[100];
    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(path, sizeof path, "%s/bad.svg", dir);
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs("<svg xmlns=\"http://www.w3.org/2000/svg\"><path d=\"M0 0 L10 10 L\"/></svg>", f);
    fclose(f);
    ug_glyph *g = NULL;
    ug_error err;
    ck_assert_int_eq(load_in(dir, "./bad.svg", &g, &err), UG_ESYNTAX);
    ck_assert_msg(strstr(err.msg, "bad.svg': glyph attribute d=\"M0 0 L10 10 L\" is "
                                  "malformed at character 14: expected a number"),
                  "%s", err.msg);
    unlink(path);
    rmdir(dir);
}
END_TEST

/* The fitted drawing spans exactly the margin box on its longer side, centred. */
START_TEST(test_fitted_box)
{
    ug_glyph *g = NULL;
    ug_error err;
    double box[4];
    ck_assert_int_eq(load_in(SHAPES, "wide-px.svg", &g, &err), UG_OK);
    ck_assert_int_eq(glyph_measure(g->body, here(), box, &err), UG_OK);
    ck_assert_double_eq_tol(box[0], GLYPH_MARGIN, 0.01);
    ck_assert_double_eq_tol(box[2], 100 - 2 * GLYPH_MARGIN, 0.01);
    ck_assert_double_eq_tol(box[1] + box[3] / 2, 50, 0.01);
    ck_assert_double_eq_tol(box[3], box[2] / 2, 0.01); /* aspect ratio kept */
    glyph_free(g);
}
END_TEST

/* Running out of memory at any allocation fails cleanly (no crash or leak). */
START_TEST(test_allocation_failures)
{
    ug_glyph *g = NULL;
    ug_error err;
    for (long n = 0; n < 200; n++) {
        ug_mem_fail_after(n);
        ug_status st = load_in(HOSTILE, "script.svg", &g, &err);
        ug_mem_fail_after(-1);
        ck_assert_msg(st == UG_OK || st == UG_ENOMEM, "allocation %ld: %d %s", n, st,
                      err.msg);
        glyph_free(g);
        g = NULL;
        if (st == UG_OK)
            return;
    }
    ck_abort_msg("glyph_load never succeeded");
}
END_TEST

/* ---- the library ----------------------------------------------------------- */

static const char *const test_dirs[] = {"data/glyphs/lib-a", "data/glyphs/lib-b",
                                        "data/glyphs/noindex"};

static size_t find_name(const ug_glyph_library *lib, const char *name)
{
    for (size_t i = 0; i < ug_glyph_library_count(lib); i++)
        if (strcmp(ug_glyph_library_name(lib, i), name) == 0)
            return i;
    return (size_t)-1;
}

START_TEST(test_listing)
{
    ug_glyph_library *lib = NULL;
    ug_error err = {0};
    ck_assert_int_eq(ug_glyph_library_open(test_dirs, 3, &lib, &err), UG_OK);
    for (size_t i = 1; i < ug_glyph_library_count(lib); i++)
        ck_assert(strcmp(ug_glyph_library_name(lib, i - 1), ug_glyph_library_name(lib, i)) < 0);
    size_t dot = find_name(lib, "test-dot"), bar = find_name(lib, "test-bar");
    size_t cross = find_name(lib, "test-cross"), plain = find_name(lib, "test-plain");
    ck_assert(dot != (size_t)-1 && bar != (size_t)-1 && cross != (size_t)-1 &&
              plain != (size_t)-1);
    ck_assert_uint_eq(find_name(lib, "test-absent"), (size_t)-1);
    ck_assert_str_eq(ug_glyph_library_keywords(lib, dot), "circle, point");
    ck_assert_str_eq(ug_glyph_library_keywords(lib, bar), "dash");
    ck_assert_str_eq(ug_glyph_library_keywords(lib, plain), ""); /* no index there */
    ck_assert_str_eq(ug_glyph_library_folder(lib, dot), "data/glyphs/lib-a"); /* first wins */
    ck_assert_double_eq_tol(glyph_library_weight(lib, dot), 0.28, 1e-9);
    ck_assert_ptr_null(ug_glyph_library_name(lib, 100000));
    /* glyph_load agrees: test-dot is lib-a's circle, not lib-b's square */
    ug_glyph *g = NULL;
    glyph_search s = {test_dirs, 3, NULL};
    ck_assert_int_eq(glyph_load("test-dot", &s, here(), &g, &err), UG_OK);
    ck_assert_double_eq_tol(g->ink, M_PI * 0.09, 0.003);
    glyph_free(g);
    ug_glyph_library_free(lib);
}
END_TEST

/* UNITGRAM_GLYPH_PATH comes before --glyph-dir folders. */
START_TEST(test_env_before_extra_dirs)
{
    setenv("UNITGRAM_GLYPH_PATH", "/nonexistent:data/glyphs/lib-b", 1);
    ug_glyph *g = NULL;
    ug_error err = {0};
    glyph_search s = {test_dirs, 1, NULL};
    ck_assert_int_eq(glyph_load("test-dot", &s, here(), &g, &err), UG_OK);
    ck_assert_double_eq_tol(g->ink, 1.0, 1e-6); /* lib-b's full square */
    glyph_free(g);
    unsetenv("UNITGRAM_GLYPH_PATH");
}
END_TEST

START_TEST(test_bad_index)
{
    char p[512];
    make_tmp();
    snprintf(p, sizeof p, "%s/index.yaml", tmp);
    write_text(p, "- name: x\n  keywords: [a, b\n");
    const char *dirs[] = {tmp};
    ug_glyph_library *lib = NULL;
    ug_error err = {0};
    ck_assert_int_eq(ug_glyph_library_open(dirs, 1, &lib, &err), UG_ESYNTAX);
    ck_assert_uint_eq(err.where.line, 3);
    write_text(p, "glyphs: {}\n");
    ug_error_clear(&err);
    ck_assert_int_eq(ug_glyph_library_open(dirs, 1, &lib, &err), UG_ESCHEMA);
    ck_assert_uint_eq(err.where.line, 1);
    ck_assert_uint_eq(err.where.column, 1);
    ck_assert_ptr_null(lib);
    /* strtod(3) reads "nan", "inf" and hex floats; a weight is a plain share
    ** from 0 to 1 (the fuzzer's regress/glyph-index-weight-nan.yaml) */
    static const char *const weights[] = {"nan", "NaN", "inf", "-inf", "0x1p-2", "1.5", "-0.1",
                                          "1e-1"};
    char svg[512];
    snprintf(svg, sizeof svg, "%s/x.svg", tmp); /* an entry without a file is skipped */
    write_text(svg, "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 100 100\">"
                    "<rect width=\"50\" height=\"50\"/></svg>");
    write_text(p, "- {name: x, keywords: [a], weight: 0.25}\n");
    ug_error_clear(&err);
    ck_assert_int_eq(ug_glyph_library_open(dirs, 1, &lib, &err), UG_OK);
    ug_glyph_library_free(lib);
    lib = NULL;
    for (size_t k = 0; k < sizeof weights / sizeof *weights; k++) {
        char index[96];
        snprintf(index, sizeof index, "- {name: x, keywords: [a], weight: %s}\n", weights[k]);
        write_text(p, index);
        ug_error_clear(&err);
        ck_assert_msg(ug_glyph_library_open(dirs, 1, &lib, &err) != UG_OK, "weight %s accepted",
                      weights[k]);
        ck_assert_ptr_null(lib);
    }
}
END_TEST

static void assert_sheet(const ug_glyph_library *lib)
{
    char *svg = NULL, *again = NULL;
    size_t len = 0, len2 = 0;
    ug_error err = {0};
    ck_assert_int_eq(ug_glyph_library_sheet_svg(lib, &svg, &len, &err), UG_OK);
    ck_assert_int_eq(ug_glyph_library_sheet_svg(lib, &again, &len2, &err), UG_OK);
    ck_assert(len == len2 && memcmp(svg, again, len) == 0); /* deterministic */
    xmlDoc *doc = xmlReadMemory(svg, (int)len, "sheet.svg", NULL, XML_PARSE_NONET);
    ck_assert_msg(doc != NULL, "the contact sheet is not well-formed XML");
    xmlFreeDoc(doc);
    for (size_t i = 0; i < ug_glyph_library_count(lib); i++) {
        char want[200];
        const char *name = ug_glyph_library_name(lib, i);
        snprintf(want, sizeof want, "<symbol id=\"glyph-%s\"", name);
        ck_assert_msg(strstr(svg, want), "sheet lacks %s", name);
        snprintf(want, sizeof want, ">%s</text>", name);
        ck_assert_msg(strstr(svg, want), "sheet lacks the label of %s", name);
    }
    free(svg);
    free(again);
}

START_TEST(test_sheet_of_test_library)
{
    ug_glyph_library *lib = NULL;
    ug_error err = {0};
    ck_assert_int_eq(ug_glyph_library_open(test_dirs, 3, &lib, &err), UG_OK);
    assert_sheet(lib);
    ug_glyph_library_free(lib);
}
END_TEST

/* The shipped library (glyphs/ at the top of the project). The inked-area
** band and the +-0.01 tolerance on each glyph's index.yaml `weight` are the
** artist's (tests/suite_glyph_art.sh measures them its own way); our 64 x 64
** coverage must agree with both. */
/* Every library glyph is in one of the subject sets and has a description
** of one short line: what the sheet and the listing read out for it. */
static void assert_in_a_set(const ug_glyph_library *lib, size_t i)
{
    const char *name = ug_glyph_library_name(lib, i);
    const char *subject = ug_glyph_library_subject(lib, i);
    const char *desc = ug_glyph_library_description(lib, i);
    ck_assert_msg(subject, "%s has no subject", name);
    bool known = false;
    for (size_t k = 0; k < ug_glyph_subject_count(); k++)
        known = known || !strcmp(ug_glyph_subject_id(k), subject);
    ck_assert_msg(known, "%s: unknown subject %s", name, subject);
    ck_assert_msg(desc && *desc && strlen(desc) <= 80 && !strchr(desc, '\n'),
                  "%s: description '%s'", name, desc ? desc : "(none)");
}

/* One sheet per set: as many named cells as the set has glyphs, and an
** unknown set is refused. */
static void assert_subject_sheets(const ug_glyph_library *lib)
{
    ug_error err = {0};
    for (size_t k = 0; k < ug_glyph_subject_count(); k++) {
        const char *id = ug_glyph_subject_id(k);
        size_t want = 0;
        for (size_t i = 0; i < ug_glyph_library_count(lib); i++) {
            const char *subject = ug_glyph_library_subject(lib, i);
            want += subject && !strcmp(subject, id);
        }
        char *svg = NULL;
        size_t len = 0;
        ck_assert_int_eq(ug_glyph_library_subject_sheet_svg(lib, id, &svg, &len, &err), UG_OK);
        size_t cells = 0;
        for (const char *p = svg; (p = strstr(p, "<g role=\"img\"><title>")); p++)
            cells++;
        ck_assert_msg(cells == want, "%s: %zu cells for %zu glyphs", id, cells, want);
        ck_assert_ptr_nonnull(strstr(svg, ug_glyph_subject_title(k)));
        free(svg);
    }
    char *svg = (char *)1;
    size_t len = 0;
    ck_assert_int_eq(ug_glyph_library_subject_sheet_svg(lib, "no-such-set", &svg, &len, &err),
                     UG_ESCHEMA);
    ck_assert_ptr_null(svg);
    ck_assert_ptr_null(ug_glyph_subject_id(ug_glyph_subject_count()));
    bool square = false;
    for (size_t k = 0; k < ug_glyph_primitive_count(); k++)
        square = square || !strcmp(ug_glyph_primitive_name(k), "square");
    ck_assert(square);
}

START_TEST(test_project_library)
{
    struct stat sb;
    if (stat("../glyphs/index.yaml", &sb) != 0) {
        fprintf(stderr, "check_glyph: SKIP project library: ../glyphs/index.yaml is not "
                        "there yet (the art is merged separately)\n");
        return;
    }
    /* Named explicitly too, for a binary built outside build/ (sanitizers). */
    static const char *const project[] = {"../glyphs"};
    glyph_search s = {project, 1, NULL};
    ug_glyph_library *lib = NULL;
    ug_error err = {0};
    ck_assert_int_eq(ug_glyph_library_open(project, 1, &lib, &err), UG_OK);
    size_t n = 0;
    for (size_t i = 0; i < ug_glyph_library_count(lib); i++) {
        const char *name = ug_glyph_library_name(lib, i);
        if (strstr(ug_glyph_library_folder(lib, i), "/usr/"))
            continue; /* an installed copy, not this tree's */
        n++;
        ug_glyph *g = NULL;
        ck_assert_msg(glyph_load(name, &s, here(), &g, &err) == UG_OK, "%s: %s", name,
                      err.msg);
        ck_assert_msg(g->nremoved == 0, "%s: sanitizing removed %s", name, g->removed[0]);
        double box[4];
        ck_assert_int_eq(glyph_measure(g->body, here(), box, &err), UG_OK);
        ck_assert_msg(box[0] >= 0 && box[1] >= 0 && box[0] + box[2] <= 100 &&
                          box[1] + box[3] <= 100, "%s lies outside the unit box", name);
        double w = glyph_library_weight(lib, i);
        ck_assert_msg(w >= 0, "%s has no weight in index.yaml", name);
        ck_assert_msg(fabs(g->ink - w) <= 0.01, "%s: ink %.3f, index says %.2f", name,
                      g->ink, w);
        ck_assert_msg(g->ink >= GLYPH_BAND_LOW && g->ink <= GLYPH_BAND_HIGH,
                      "%s: ink %.3f outside the band", name, g->ink);
        assert_inert(g->body);
        glyph_free(g);
        assert_in_a_set(lib, i);
    }
    ck_assert_uint_gt(n, 0);
    assert_sheet(lib);
    assert_subject_sheets(lib);
    ug_glyph_library_free(lib);
}
END_TEST

static Suite *glyph_suite(void)
{
    Suite *s = suite_create("glyph");
    TCase *t = tcase_create("hostile");
    tcase_add_loop_test(t, test_hostile_corpus, 0, sizeof hostile / sizeof *hostile);
    tcase_add_test(t, test_all_removals_listed);
    tcase_add_test(t, test_path_escapes);
    tcase_add_test(t, test_folder_swapped_after_resolving);
    tcase_add_test(t, test_huge_file);
    tcase_add_test(t, test_allocation_failures);
    suite_add_tcase(s, t);
    t = tcase_create("geometry");
    tcase_add_test(t, test_primitive_ink);
    tcase_add_test(t, test_fill_rule_kept);
    tcase_add_loop_test(t, test_same_footprint, 0, sizeof pairs / sizeof *pairs);
    tcase_add_test(t, test_fitted_box);
    tcase_add_test(t, test_segment_limit);
    tcase_add_test(t, test_malformed_path_named);
    suite_add_tcase(s, t);
    t = tcase_create("library");
    tcase_set_timeout(t, 60);
    tcase_add_test(t, test_listing);
    tcase_add_test(t, test_env_before_extra_dirs);
    tcase_add_test(t, test_bad_index);
    tcase_add_test(t, test_sheet_of_test_library);
    tcase_add_test(t, test_project_library);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(glyph_suite());
}
