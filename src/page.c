/*
** Page stage: a handout page (FORMAT.md §2) -> one scene the size of the
** sheet. Panels are laid on a column grid in reading order; the page title
** sits at the top and the sources of every panel are collected at the foot.
** Content too large for the sheet is shrunk to fit: icons and text of every
** panel by one factor, in steps, down to the page's legible floors (`fit:`),
** so panels that were drawn alike stay alike and a shared scale stays
** shared. Only when even the floors do not fit is it an error, saying which
** panel and by how much at those sizes. The audit notes any shrinking.
*/
#include <assert.h>
#include <math.h>
#include <string.h>

#include "pack.h"
#include "color.h"
#include "page.h"
#include "phrase.h"
#include "resolve.h"
#include "svg.h"
#include "text.h"

double page_span_width(const page_grid *g, long span)
{
    double inner = g->width - 2 * g->margin;
    double col = (inner - (double)(g->columns - 1) * g->gutter) / (double)g->columns;
    return col * (double)span + g->gutter * (double)(span - 1);
}

/* Finish a row: every panel in it starts at y; returns the next row's y. */
static double close_row(const page_grid *g, page_box *out, size_t from,
                        size_t to, double y)
{
    double tallest = 0;
    for (size_t i = from; i < to; i++)
        if (out[i].h > tallest)
            tallest = out[i].h;
    return y + tallest + g->gutter;
}

size_t page_place(const page_grid *g, const long *spans, const double *heights,
                  size_t n, page_box *out, double *over)
{
    double y = g->top;
    long used = 0;
    size_t row = 0;
    *over = 0;
    for (size_t i = 0; i < n; i++) {
        assert(spans[i] >= 1 && spans[i] <= g->columns);
        if (used + spans[i] > g->columns) {
            y = close_row(g, out, row, i, y);
            row = i;
            used = 0;
        }
        /* whole pixels, so icons drawn on whole pixels stay sharp at 96 dpi */
        out[i].x = round(g->margin + (double)used * (page_span_width(g, 1) + g->gutter));
        out[i].y = ceil(y);
        out[i].w = page_span_width(g, spans[i]);
        out[i].h = heights[i];
        used += spans[i];
    }
    /* the panel reaching lowest: its overrun is what the page lacks, so the
    ** message names one panel and one figure */
    size_t lowest = n;
    for (size_t i = 0; i < n; i++) {
        double past = out[i].y + out[i].h - g->bottom;
        if (past > 1e-9 && past > *over) {
            *over = past;
            lowest = i;
        }
    }
    return lowest;
}

/* ---- composing the page -------------------------------------------------- */

#define PAGE_GUTTER 16.0  /* between columns, rows and blocks */
#define FIT_STEP 0.05     /* each try is 5 % of the stated sizes smaller */

/* A chart's sizes as stated (after shared-scale), which fitting scales. */
typedef struct {
    double icon, gap, type[UG_TYPE_COUNT];
} panel_sizes;

typedef struct {
    const ug_page *p;
    page_result *r;
    ug_error *err;
    const char *font;
    ug_mark font_mark; /* where the font was named, for messages */
    scene_rgb ink, paper;
    page_grid g;
    ug_scene **scenes;    /* one per panel; NULL for text */
    text_block *texts;    /* one per panel; n == 0 for charts */
    text_block title, foot;
    long *spans;
    double *heights;
    page_box *boxes;
    page_box *crops;      /* the part of each chart's canvas shown */
    ug_buf desc;
    ug_pack_options pack; /* the caller's, always with a glyph cache */
    size_t glyph_bytes;   /* glyph markup in the panels so far */
    panel_sizes *stated;  /* one per panel */
    double fit;           /* this try's factor: 1 = as stated */
    bool at_floor;        /* this try is the smallest there is */
    bool misfit;          /* this try failed on width, not on a fault */
    double title_px, text_px, source_px; /* the page's own text, this try */
} composer;

static ug_status nomem(composer *k)
{
    return ug_fail(k->err, UG_ENOMEM, ug_mark_file(k->p->path), "out of memory");
}

static double mm(double px) { return px / PAGE_PX_PER_MM; }

/* The name a message uses for panel i: its chart file, or its number. */
static void panel_name(const ug_page *p, size_t i, char *buf, size_t size)
{
    const ug_panel *pn = &p->panels[i];
    if (pn->kind == UG_PANEL_CHART && pn->chart_file.text)
        snprintf(buf, size, "panel %zu (%s)", i + 1, pn->chart_file.text);
    else
        snprintf(buf, size, "panel %zu (%s)", i + 1,
                 pn->kind == UG_PANEL_TEXT ? "text" : "inline chart");
}

/* ---- shared scale -------------------------------------------------------- */

/* The icon value a chart would choose for itself (`icon-value: auto`). */
static ug_status own_value(const ug_chart *c, ug_dec *v, ug_error *err)
{
    ug_chart probe = *c; /* a shallow copy: only read, never freed */
    alloc_rule rule;
    probe.has_icon_value = true;
    probe.icon_value_auto = true;
    ug_status st = alloc_rule_for_chart(&probe, &rule, err);
    *v = rule.value;
    return st;
}

/* shared-scale: the loader has refused charts that state different values or
** sizes; here every chart takes the one stated, and when none is stated the
** largest value any chart would choose, so that every chart still fits. A
** waffle cut into `cells` shares of its own total has no icon value to share. */
static ug_status share_scale(composer *k)
{
    ug_chart *cs = k->r->charts;
    const ug_chart *value = NULL, *size = NULL;
    ug_dec v = {0};
    for (size_t i = 0; i < k->p->npanels; i++) {
        const ug_chart *c = k->p->panels[i].chart;
        if (!c)
            continue;
        if (c->form == UG_FORM_WAFFLE && c->has_cells)
            return ug_fail(k->err, UG_ESCHEMA, c->cells_mark,
                           "shared-scale: a waffle of %ld cells shows shares of its "
                           "own total, which cannot share one icon value with the "
                           "other charts; state icon-value instead of cells",
                           c->cells);
        if (c->has_icon_value && !c->icon_value_auto && !value)
            value = c;
        if (c->icon_mark.line && !size)
            size = c;
        ug_dec own;
        ug_status st = value ? UG_OK : own_value(c, &own, k->err);
        if (st)
            return st;
        if (!value && own.v > v.v)
            v = own;
    }
    if (value)
        v = value->icon_value;
    for (size_t i = 0; i < k->p->npanels; i++) {
        if (!k->p->panels[i].chart)
            continue;
        cs[i].has_icon_value = true;
        cs[i].icon_value_auto = false;
        cs[i].icon_value = v;
        if (size) {
            cs[i].icon_size = size->icon_size;
            cs[i].icon_gap = size->icon_gap;
        }
    }
    return UG_OK;
}

/* ---- panels ----------------------------------------------------------------- */

/* The box every mark of a scene lies in: the chart without its own margin,
** which on a page the gutters replace. */
static page_box content_box(const ug_scene *s)
{
    double x0 = s->width, y0 = s->height, x1 = 0, y1 = 0;
#define GROW(a, b, c, d) \
    (x0 = fmin(x0, a), y0 = fmin(y0, b), x1 = fmax(x1, c), y1 = fmax(y1, d))
    for (size_t i = 0; i < s->ntexts; i++) {
        double a, b, c, d;
        scene_text_box(&s->texts[i], &a, &b, &c, &d);
        GROW(a, b, c, d);
    }
    for (size_t i = 0; i < s->nicons; i++)
        GROW(s->icons[i].x, s->icons[i].y, s->icons[i].x + s->icon_size,
             s->icons[i].y + s->icon_size);
    for (size_t i = 0; i < s->nswatches; i++)
        GROW(s->swatches[i].x, s->swatches[i].y, s->swatches[i].x + s->icon_size,
             s->swatches[i].y + s->icon_size);
    for (size_t i = 0; i < s->nholders; i++)
        GROW(s->holders[i].x, s->holders[i].y, s->holders[i].x + s->holders[i].w,
             s->holders[i].y + s->holders[i].h);
    for (size_t i = 0; i < s->nrects; i++)
        GROW(s->rects[i].x, s->rects[i].y, s->rects[i].x + s->rects[i].w,
             s->rects[i].y + s->rects[i].h);
#undef GROW
    if (x1 <= x0 || y1 <= y0)
        return (page_box){0, 0, s->width, s->height};
    x0 = floor(x0), y0 = floor(y0);
    return (page_box){x0, y0, ceil(x1) - x0, ceil(y1) - y0};
}

/* Pack chart i for a column `room` px wide. The packer keeps a margin on
** each side of its canvas; the panel drops it, so a second pass widens the
** canvas by the two margins to let the content use the whole column. Should
** the content then outgrow the column, the first pass stands. */
static ug_status pack_panel(composer *k, size_t i, const ug_allocation *a,
                            double room, ug_scene **s)
{
    ug_chart *c = &k->r->charts[i];
    ug_scene *wide = NULL;
    c->style.width = room;
    ug_status st = ug_scene_pack_with(c, a, &k->pack, s, k->err);
    if (st == UG_ELIMIT && k->err->where.line == c->columns_mark.line &&
        k->err->where.column == c->columns_mark.column && c->columns_mark.line) {
        /* `columns` does not fit the canvas with its margins; the page drops
        ** them, so try the canvas whose content area is the column. */
        ug_error_clear(k->err);
        c->style.width = room + 2 * PACK_MARGIN;
        return ug_scene_pack_with(c, a, &k->pack, s, k->err);
    }
    if (st)
        return st;
    double spare = 2 * floor(content_box(*s).x);
    if (spare <= 0 || ug_scene_width(*s) > room + 0.5)
        return UG_OK;
    c->style.width = room + spare;
    if ((st = ug_scene_pack_with(c, a, &k->pack, &wide, k->err))) {
        ug_scene_free(*s); /* on failure the caller holds no scene */
        *s = NULL;
        return st;
    }
    if (content_box(wide).w > room + 0.5) {
        ug_scene_free(wide);
        return UG_OK;
    }
    ug_scene_free(*s);
    *s = wide;
    return UG_OK;
}

/* The page's description is its charts' descriptions, in reading order. */
static ug_status describe_panel(composer *k, const ug_chart *c,
                                const ug_allocation *a)
{
    char *d = NULL;
    ug_status st = ug_chart_describe(c, a, &d, NULL, k->err);
    if (st)
        return st;
    ug_buf_printf(&k->desc, "%s%s", k->desc.len ? " " : "", d);
    ug_free(d);
    return k->desc.failed ? nomem(k) : UG_OK;
}

/* What a failure says when fitting has run out of room to shrink. */
static const char *floor_note(const composer *k)
{
    if (!k->p->shrink)
        return " (fitting is off: fit: {shrink: false})";
    return k->at_floor && k->fit < 1 ? " even with every panel shrunk to the page's "
                                       "smallest icons and text (fit: min-icon, min-text)"
                                     : "";
}

static ug_status chart_panel(composer *k, size_t i)
{
    ug_chart *c = &k->r->charts[i];
    ug_scene *s = NULL;
    char name[160];
    /* whole px: a browser lays a nested <svg> out on whole pixels and would
    ** scale a chart whose canvas is a fraction wider than its slot */
    double room = floor(page_span_width(&k->g, k->spans[i]));
    /* a chart on a background of its own keeps a little of it around its
    ** content, or its text would touch the edge of the coloured box */
    const ug_color *bg = &c->style.background;
    double pad = bg->r != k->paper.r || bg->g != k->paper.g || bg->b != k->paper.b
                     ? ceil(PAGE_GUTTER / 2) : 0;
    room -= 2 * pad;
    ug_status st = pack_panel(k, i, k->r->allocs[k->r->alloc_of[i]], room, &s);
    if (st == UG_ELIMIT && c->columns_mark.line &&
        k->err->where.line == c->columns_mark.line)
        k->misfit = true; /* `columns` wider than the column: smaller icons may fit */
    if (st)
        return st;
    k->crops[i] = content_box(s);
    k->crops[i].x -= pad, k->crops[i].y -= pad;
    k->crops[i].w += 2 * pad, k->crops[i].h += 2 * pad;
    room += 2 * pad;
    k->heights[i] = k->crops[i].h;
    /* Every panel's SVG holds its glyphs again: bound them on the page as
    ** on one chart. */
    for (size_t g = 0; g < s->nglyphs; g++)
        k->glyph_bytes += strlen(s->glyphs[g]->body);
    if (k->glyph_bytes > SCENE_MAX_GLYPH_BYTES) {
        panel_name(k->p, i, name, sizeof name);
        st = ug_fail(k->err, UG_ELIMIT, k->p->panels[i].mark,
                     "with %s the page's charts hold %zu bytes of glyph drawing "
                     "together, over the limit of %u (4 MiB); use fewer or simpler "
                     "glyph files", name, k->glyph_bytes, SCENE_MAX_GLYPH_BYTES);
    } else if (k->crops[i].w > room + 0.5) {
        panel_name(k->p, i, name, sizeof name);
        k->misfit = true;
        st = ug_fail(k->err, UG_ELIMIT, k->p->panels[i].mark,
                     "%s needs %.1f mm of width but its column is %.1f mm wide%s; "
                     "give it a larger span, use fewer columns or smaller icons",
                     name, mm(k->crops[i].w), mm(room), floor_note(k));
    } else {
        k->scenes[i] = s;
        return UG_OK;
    }
    ug_scene_free(s);
    return st;
}

static double block_height(const text_block *t)
{
    return t->n ? t->ascent + t->descent + (double)(t->n - 1) * t->pitch : 0;
}

/* A text block is paragraphs separated by blank lines; a single line break
** is only where the source file wrapped, so it becomes a space and the
** paragraph is wrapped again to its column. */
static void join_lines(char *s)
{
    for (char *p = s; (p = strchr(p, '\n')); p++) {
        if (p[1] == '\n') {
            for (p++; p[1] == '\n'; p++)
                ;
            continue;
        }
        if (p[1] != '\0')
            *p = ' ';
    }
}

static ug_status text_panel(composer *k, size_t i)
{
    text_font f = {k->font, k->text_px, false, k->font_mark};
    char *clean = text_clean(k->p->panels[i].text.text ? k->p->panels[i].text.text : "");
    if (!clean)
        return nomem(k);
    join_lines(clean);
    ug_status st = text_wrap(&f, clean, page_span_width(&k->g, k->spans[i]),
                             &k->texts[i], k->err);
    ug_free(clean);
    k->heights[i] = block_height(&k->texts[i]);
    return st;
}

/* ---- title, foot and grid ------------------------------------------------------ */

static bool listed(const ug_buf *b, const char *line)
{
    size_t n = strlen(line);
    for (const char *at = b->data; at && (at = strstr(at, line)); at++)
        if ((at == b->data || at[-1] == '\n') && (at[n] == '\n' || at[n] == '\0'))
            return true;
    return false;
}

/* Each source as "Source: ..." in the page's language. */
static void add_sources(ug_buf *b, const ug_text_list *l, const char *prefix)
{
    for (size_t i = 0; i < l->n; i++) {
        char *line = NULL;
        size_t len = strlen(l->items[i].text) + strlen(prefix) + 1;
        if (!(line = ug_malloc(len))) {
            b->failed = true;
            return;
        }
        snprintf(line, len, "%s%s", prefix, l->items[i].text);
        if (!listed(b, line))
            ug_buf_printf(b, "%s%s", b->len ? "\n" : "", line);
        ug_free(line);
    }
}

/* Every source the page and its charts name, once each, one to a line. */
static ug_status foot(composer *k)
{
    ug_buf b;
    ug_buf_init(&b);
    const char *prefix = phrase_text(k->p->lang.text ? k->p->lang.text : "en", PH_SOURCE);
    add_sources(&b, &k->p->source, prefix);
    for (size_t i = 0; i < k->p->npanels; i++)
        if (k->p->panels[i].chart)
            add_sources(&b, &k->p->panels[i].chart->source, prefix);
    char *text, *clean;
    ug_status st = ug_buf_take(&b, &text, NULL, k->err);
    if (st)
        return st;
    clean = text_clean(text);
    ug_free(text);
    if (!clean)
        return ug_fail(k->err, UG_ENOMEM, ug_mark_file(k->p->path), "out of memory");
    text_font f = {k->font, k->source_px, false, k->font_mark};
    st = text_wrap(&f, clean, k->g.width - 2 * k->g.margin, &k->foot, k->err);
    ug_free(clean);
    return st;
}

static ug_status title(composer *k)
{
    text_font f = {k->font, k->title_px, true, k->font_mark};
    char *clean = text_clean(k->p->title.text ? k->p->title.text : "");
    if (!clean)
        return nomem(k);
    ug_status st = text_wrap(&f, clean, k->g.width - 2 * k->g.margin, &k->title,
                             k->err);
    ug_free(clean);
    return st;
}

static void set_grid(composer *k)
{
    const ug_page *p = k->p;
    k->g = (page_grid){p->width, p->height, p->margin, PAGE_GUTTER,
                       p->columns > 0 ? p->columns : 1, p->margin,
                       p->height - p->margin};
}

static void fit_header_and_foot(composer *k)
{
    double t = block_height(&k->title), f = block_height(&k->foot);
    k->g.top += t > 0 ? t + PAGE_GUTTER : 0;
    k->g.bottom -= f > 0 ? f + PAGE_GUTTER : 0;
}

/* ---- writing the page ------------------------------------------------------------ */

/* A text block's lines as scene text, top-left at (x, top). */
static void add_lines(ug_scene *sheet, const text_block *t, double x, double top,
                      bool bold)
{
    for (size_t i = 0; i < t->n; i++)
        if (t->lines[i][0])
            sheet->texts[sheet->ntexts++] = (scene_text){
                .x = x, .y = top + t->ascent + (double)i * t->pitch, .size = t->px,
                .bold = bold, .anchor = SCENE_START, .text = t->lines[i]};
}

static ug_status sheet_texts(composer *k, ug_scene *sheet)
{
    const text_block *blocks[] = {&k->title, &k->foot};
    size_t n = blocks[0]->n + blocks[1]->n;
    for (size_t i = 0; i < k->p->npanels; i++)
        n += k->texts[i].n;
    if (n && !(sheet->texts = ug_arena_alloc(&sheet->arena, n * sizeof *sheet->texts)))
        return nomem(k);
    add_lines(sheet, &k->title, k->g.margin, k->g.margin, true);
    for (size_t i = 0; i < k->p->npanels; i++)
        add_lines(sheet, &k->texts[i], k->boxes[i].x, k->boxes[i].y, false);
    add_lines(sheet, &k->foot, k->g.margin,
              k->g.height - k->g.margin - block_height(&k->foot), false);
    return UG_OK;
}

/* Each chart's scene placed in its box, cropped to its content. */
static ug_status sheet_children(composer *k, ug_scene *sheet)
{
    size_t n = k->p->npanels;
    if (!(sheet->children = ug_arena_alloc(&sheet->arena, (n ? n : 1) * sizeof(scene_child))))
        return nomem(k);
    for (size_t i = 0; i < n; i++) {
        if (!k->scenes[i])
            continue;
        scene_child *c = &sheet->children[sheet->nchildren++];
        *c = (scene_child){k->scenes[i], k->boxes[i].x, k->boxes[i].y, k->crops[i].x,
                           k->crops[i].y, k->crops[i].w, k->crops[i].h, ""};
        snprintf(c->id_prefix, sizeof c->id_prefix, "p%zu-", i + 1);
    }
    return UG_OK;
}

/* Text straight from the input, cleaned as the packer cleans a chart's. */
static const char *sheet_string(ug_scene *sheet, const char *s)
{
    char *clean = text_clean(s);
    const char *kept = clean ? ug_arena_strdup(&sheet->arena, clean) : NULL;
    ug_free(clean);
    return kept;
}

/* The sheet is a scene of its own: its text lines, and the charts' scenes as
** children, written by the one SVG writer (svg.c). */
static ug_status write_page(composer *k)
{
    const ug_page *p = k->p;
    ug_scene sheet;
    memset(&sheet, 0, sizeof sheet);
    sheet.sheet = true;
    sheet.width = k->g.width;
    sheet.height = k->g.height;
    /* stated in mm, so the sheet is exact whatever rounding the px carry */
    sheet.lang = p->lang.text; /* NULL: no xml:lang, as before */
    sheet.width_mm = mm(p->width);
    sheet.height_mm = mm(p->height);
    sheet.background = k->paper;
    sheet.ink = k->ink;
    sheet.font = sheet_string(&sheet, k->font);
    sheet.title = sheet_string(&sheet, p->title.text ? p->title.text : "Handout");
    sheet.desc = sheet_string(&sheet, k->r->desc);
    ug_status st = !sheet.font || !sheet.title || !sheet.desc ? nomem(k) : UG_OK;
    if (!st)
        st = sheet_texts(k, &sheet);
    if (!st)
        st = sheet_children(k, &sheet);
    if (!st)
        st = ug_scene_svg(&sheet, &k->r->svg, &k->r->len, k->err);
    ug_arena_free(&sheet.arena);
    return st;
}

/* ---- the stage ------------------------------------------------------------------ */

static ug_status overflow(composer *k, size_t i, double over)
{
    char name[160];
    panel_name(k->p, i, name, sizeof name);
    return ug_fail(k->err, UG_ELIMIT, k->p->panels[i].mark,
                   "the content does not fit on the page%s: %s reaches %.1f mm "
                   "below the room above the sources, so the page needs %.1f mm "
                   "more; use a larger page, more columns or fewer panels",
                   floor_note(k), name, mm(over), mm(over));
}

static ug_status set_up(composer *k)
{
    const ug_page *p = k->p;
    size_t n = p->npanels;
    const ug_chart *first = NULL;
    for (size_t i = 0; i < n && !first; i++)
        first = p->panels[i].chart;
    /* the sheet takes its first chart's (resolved) font and ink; a page of
    ** text alone takes the defaults a chart would have */
    ug_chart none = {.path = p->path, .lang = p->lang};
    resolve_defaults(&none);
    const ug_chart *look = first ? first : &none;
    k->font = resolve_font(look);
    k->font_mark = look->style.font_mark;
    /* the sheet is white paper: a dark-themed chart's light ink would vanish */
    ug_color ink = look->style.ink;
    if (color_contrast(ink, none.style.background) < COLOR_WCAG_TEXT)
        ink = none.style.ink;
    k->ink = (scene_rgb){ink.r, ink.g, ink.b};
    k->paper = (scene_rgb){none.style.background.r, none.style.background.g,
                           none.style.background.b};
    k->r->charts = ug_calloc(n, sizeof *k->r->charts);
    k->r->allocs = ug_calloc(n, sizeof *k->r->allocs);
    k->r->alloc_of = ug_calloc(n, sizeof *k->r->alloc_of);
    k->stated = ug_calloc(n, sizeof *k->stated);
    k->scenes = ug_calloc(n, sizeof *k->scenes);
    k->texts = ug_calloc(n, sizeof *k->texts);
    k->spans = ug_calloc(n, sizeof *k->spans);
    k->heights = ug_calloc(n, sizeof *k->heights);
    k->boxes = ug_calloc(n, sizeof *k->boxes);
    k->crops = ug_calloc(n, sizeof *k->crops);
    if (!k->r->charts || !k->r->allocs || !k->r->alloc_of || !k->stated || !k->scenes || !k->texts || !k->spans ||
        !k->heights || !k->boxes || !k->crops)
        return nomem(k);
    set_grid(k);
    for (size_t i = 0; i < n; i++) {
        k->spans[i] = p->panels[i].span < 1 ? 1 : p->panels[i].span;
        if (k->spans[i] > k->g.columns)
            k->spans[i] = k->g.columns; /* the loader refuses this; stay safe */
        if (p->panels[i].chart)
            k->r->charts[i] = *p->panels[i].chart;
    }
    return p->shared_scale ? share_scale(k) : UG_OK;
}

/* Each chart is allocated, and described, once: fitting changes sizes,
** never counts. Sources are collected at the foot of the page. */
static ug_status allocate_panels(composer *k)
{
    for (size_t i = 0; i < k->p->npanels; i++) {
        ug_chart *c = &k->r->charts[i];
        ug_status st;
        if (!k->p->panels[i].chart)
            continue;
        c->source.n = 0;
        k->r->alloc_of[i] = k->r->nallocs;
        if ((st = ug_chart_allocate(c, &k->r->allocs[k->r->nallocs], k->err)))
            return st;
        if ((st = describe_panel(k, c, k->r->allocs[k->r->nallocs++])))
            return st;
        k->stated[i].icon = c->icon_size;
        k->stated[i].gap = c->icon_gap;
        memcpy(k->stated[i].type, c->style.type, sizeof c->style.type);
    }
    return UG_OK;
}

/* A length at factor f, never below its floor nor above what was stated. */
static double shrunk(double stated, double f, double floor_px)
{
    return stated <= floor_px ? stated : fmax(floor_px, stated * f);
}

/* Icons on whole pixels, so they stay sharp at 96 dpi; the gap keeps its
** proportion to the icon. */
static void shrink_icon(ug_chart *c, const panel_sizes *st, double f, double floor_px)
{
    c->icon_size = st->icon <= floor_px ? st->icon : fmax(ceil(floor_px), floor(st->icon * f));
    c->icon_gap = st->gap > 0 ? fmax(1, round(st->gap * c->icon_size / st->icon)) : 0;
}

static void scale_page(composer *k, double f)
{
    const ug_page *p = k->p;
    k->fit = f;
    k->title_px = shrunk(p->type[UG_PAGE_TYPE_TITLE], f, p->min_text);
    k->text_px = shrunk(p->type[UG_PAGE_TYPE_TEXT], f, p->min_text);
    k->source_px = shrunk(p->type[UG_PAGE_TYPE_SOURCE], f, p->min_text);
    for (size_t i = 0; i < p->npanels; i++) {
        ug_chart *c = &k->r->charts[i];
        if (!p->panels[i].chart)
            continue;
        shrink_icon(c, &k->stated[i], f, p->min_icon);
        for (size_t t = 0; t < UG_TYPE_COUNT; t++)
            c->style.type[t] = shrunk(k->stated[i].type[t], f, p->min_text);
    }
}

/* The factor below which nothing gets smaller: every size at its floor. */
static double floor_factor(const composer *k)
{
    const ug_page *p = k->p;
    double f = 1;
    for (size_t t = 0; t < UG_PAGE_TYPE_COUNT; t++)
        if (p->type[t] > p->min_text)
            f = fmin(f, p->min_text / p->type[t]);
    for (size_t i = 0; i < p->npanels; i++) {
        const panel_sizes *st = &k->stated[i];
        if (!p->panels[i].chart)
            continue;
        if (st->icon > p->min_icon)
            f = fmin(f, ceil(p->min_icon) / st->icon);
        for (size_t t = 0; t < UG_TYPE_COUNT; t++)
            if (st->type[t] > p->min_text)
                f = fmin(f, p->min_text / st->type[t]);
    }
    return f;
}

/* What one try made, undone before the next. */
static void clear_try(composer *k)
{
    for (size_t i = 0; i < k->p->npanels; i++) {
        ug_scene_free(k->scenes[i]);
        k->scenes[i] = NULL;
        text_block_free(&k->texts[i]);
    }
    text_block_free(&k->title);
    text_block_free(&k->foot);
    k->glyph_bytes = 0;
    k->misfit = false;
    ug_error_clear(k->err);
}

/* One try at the current sizes: *bad gets the panel reaching lowest past
** the room, or npanels when everything fits. */
static ug_status lay_out(composer *k, size_t *bad, double *over)
{
    ug_status st;
    *bad = k->p->npanels;
    if ((st = title(k)) || (st = foot(k)))
        return st;
    set_grid(k);
    fit_header_and_foot(k);
    for (size_t i = 0; i < k->p->npanels; i++)
        if ((st = k->p->panels[i].chart ? chart_panel(k, i) : text_panel(k, i)))
            return st;
    *bad = page_place(&k->g, k->spans, k->heights, k->p->npanels, k->boxes, over);
    return UG_OK;
}

/* Tries the stated sizes, then each step smaller down to the floors; the
** first try that fits is the page. */
static ug_status fit_page(composer *k)
{
    double least = k->p->shrink ? floor_factor(k) : 1;
    for (int step = 0;; step++) {
        double f = fmax(least, 1.0 - FIT_STEP * step), over = 0;
        size_t bad;
        k->at_floor = f <= least;
        scale_page(k, f);
        ug_status st = lay_out(k, &bad, &over);
        if (!st && bad == k->p->npanels) {
            k->r->fit = f;
            return UG_OK;
        }
        if ((st && !k->misfit) || k->at_floor)
            return st ? st : overflow(k, bad, over);
        clear_try(k);
    }
}

static ug_status compose(composer *k)
{
    ug_status st;
    if ((st = set_up(k)) || (st = allocate_panels(k)) || (st = fit_page(k)))
        return st;
    if ((st = ug_buf_take(&k->desc, &k->r->desc, NULL, k->err)))
        return st;
    return write_page(k);
}

/* Every panel is packed twice and many name the same glyphs: one cache for
** the page loads each glyph once (the caller's, when it brings one). */
ug_status page_compose(const ug_page *page, const ug_pack_options *opt,
                       page_result *out, ug_error *err)
{
    composer k;
    memset(&k, 0, sizeof k);
    memset(out, 0, sizeof *out);
    k.p = page;
    k.r = out;
    k.err = err;
    if (opt)
        k.pack = *opt;
    ug_glyph_cache *own = NULL;
    if (!k.pack.glyph_cache && ug_glyph_cache_new(&own, err))
        return err->status;
    if (own)
        k.pack.glyph_cache = own;
    ug_status st = compose(&k);
    ug_glyph_cache_free(own);
    if (!st) { /* the scenes go with the result */
        out->scenes = k.scenes;
        out->npanels = page->npanels;
        k.scenes = NULL;
    }
    /* Each array is checked on its own: set_up may have made some of them
    ** and not the rest. */
    for (size_t i = 0; k.scenes && i < page->npanels; i++)
        ug_scene_free(k.scenes[i]);
    for (size_t i = 0; k.texts && i < page->npanels; i++)
        text_block_free(&k.texts[i]);
    ug_free(k.scenes);
    ug_free(k.texts);
    ug_free(k.spans);
    ug_free(k.heights);
    ug_free(k.boxes);
    ug_free(k.crops);
    ug_free(k.stated);
    text_block_free(&k.title);
    text_block_free(&k.foot);
    ug_buf_free(&k.desc);
    if (st)
        page_result_free(out);
    return st;
}

void page_result_free(page_result *r)
{
    if (!r)
        return;
    for (size_t i = 0; i < r->nallocs; i++)
        ug_allocation_free(r->allocs[i]);
    ug_free(r->allocs);
    ug_free(r->alloc_of);
    for (size_t i = 0; r->scenes && i < r->npanels; i++)
        ug_scene_free(r->scenes[i]);
    ug_free(r->scenes);
    ug_free(r->charts); /* shallow copies: their strings belong to the page */
    ug_free(r->svg);
    ug_free(r->desc);
    memset(r, 0, sizeof *r);
}

ug_status ug_page_draw(const ug_page *page, ug_output_format fmt, double dpi,
                       double scale, char **out, size_t *len, ug_error *err)
{
    ug_error_clear(err);
    return ug_page_draw_with(page, NULL, fmt, dpi, scale, out, len, err);
}

ug_status ug_page_compose(const ug_page *page, const ug_pack_options *opt,
                          ug_composed_page **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    ug_composed_page *cp = ug_calloc(1, sizeof *cp);
    if (!cp)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(page->path), "out of memory");
    ug_status st = page_compose(page, opt, &cp->r, err);
    if (st) {
        ug_free(cp);
        return st;
    }
    cp->page = page;
    if (opt) {
        cp->opt = *opt;
        cp->has_opt = true;
    }
    *out = cp;
    return UG_OK;
}

ug_status ug_composed_page_draw(const ug_composed_page *cp, ug_output_format fmt,
                                double dpi, double scale, char **out, size_t *len,
                                ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    const page_result *r = &cp->r;
    if (fmt == UG_OUT_CSV)
        return ug_table_csv((const ug_allocation *const *)r->allocs, r->nallocs, out, len,
                            err);
    if (fmt == UG_OUT_HTML)
        return ug_html_page(cp->page->title.text, r->svg, r->len, "",
                            (const ug_allocation *const *)r->allocs, r->nallocs, out, len,
                            err);
    return ug_render_svg(r->svg, r->len, fmt, dpi, scale, out, len, err);
}

void ug_composed_page_free(ug_composed_page *cp)
{
    if (!cp)
        return;
    page_result_free(&cp->r);
    ug_free(cp);
}

ug_status ug_page_draw_with(const ug_page *page, const ug_pack_options *opt,
                            ug_output_format fmt, double dpi, double scale, char **out,
                            size_t *len, ug_error *err)
{
    ug_composed_page *cp;
    *out = NULL;
    ug_status st = ug_page_compose(page, opt, &cp, err);
    if (!st)
        st = ug_composed_page_draw(cp, fmt, dpi, scale, out, len, err);
    ug_composed_page_free(cp);
    return st;
}

ug_status ug_page_describe(const ug_page *page, char **out, size_t *len,
                           ug_error *err)
{
    ug_error_clear(err);
    page_result r;
    *out = NULL;
    ug_status st = page_compose(page, NULL, &r, err);
    if (st)
        return st;
    *out = r.desc;
    if (len)
        *len = strlen(r.desc);
    r.desc = NULL;
    page_result_free(&r);
    return UG_OK;
}
