/*
** Pack stage: model + allocation -> scene (every box placed, in px).
**
** The one rule that shapes everything here is Isotype's first rule (Neurath,
** International Picture Language, 1936): a larger count is shown by more
** symbols of one size, never by a bigger symbol. So the icon size is fixed by
** the layout for the whole chart and the canvas grows downwards to hold what
** the counts need; when a line of `columns` icons does not fit the width, the
** line wraps earlier rather than shrinking an icon.
**
** The page is a column of blocks, top to bottom, each starting below the
** lowest box of the one before: title and subtitle, the plot (bands of rows,
** or a grid of waffle panels), the key, the value statement, notes, source.
** Inside a block, text columns and icon areas are side by side and never
** share x; every text is wrapped to the width it is given. That is why boxes
** cannot overlap, and the tests check it on random layouts.
*/
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "glyph_cache.h"
#include "pack.h"
#include "phrase.h"
#include "resolve.h"
#include "text.h"

#define MARGIN PACK_MARGIN
/* Spaces at the default label size (style.type); they follow the labels,
** so a smaller type scale (a handout panel) is tighter all through. */
#define BLOCK_GAP 28.0 /* between title, plot, key and foot */
#define COL_GAP 16.0   /* between a text column and icons */
#define HOLDER_OF_NOTE (12.0 / 13.0) /* placeholder text beside notes */
#define DEFAULT_WIDTH 800.0

struct pack_frame {
    size_t ncats;
    double width, height, title_h, subtitle_h;
    double lw, tw;           /* rows: the text columns */
    long longest;            /* rows: the longest line any row fills */
    bool holders;            /* some row hides a count */
    double holder_w, holder_h;
    double band_h;           /* rows, one line of categories: the band */
    long *slots;             /* rows, one line: slots per category */
    bool *may_hide;          /* rows, one line: hidden in some row */
    double *cat_adv;         /* rows, a line each: top to the next one's top */
    double *side_h;          /* rows: the texts beside a category's icons */
    long cells;              /* waffle: the grid */
    double head_h;           /* waffle: group name and total */
    double foot_h;           /* value statement, notes, source */
    double *key_adv;         /* key entries */
    double key_w;            /* the widest key entry, unwrapped */
};

typedef struct {
    const ug_chart *c;
    const ug_allocation *a;
    ug_scene *s;
    ug_error *err;
    const ug_pack_options *opt; /* never NULL */
    ug_status st; /* first failure; later placing is skipped */
    size_t glyph_bytes; /* markup of the chart's distinct glyphs so far */
    size_t cap_icons, cap_texts, cap_holders, cap_rects, cap_swatches;
    double size, gap, pitch, left, right;
    double y; /* top of the next block */
    double type[UG_TYPE_COUNT]; /* the chart's type scale, px */
    double holder_px, block_gap, col_gap;
    double k; /* the labels' size to the default's: spaces follow it */
    /* hidden-count placeholder, one size for the chart whatever it says */
    bool holders;
    double holder_w, holder_h;
    pack_frame *frame; /* a batch's shared layout, or NULL */
    bool measuring;    /* filling the frame rather than reading it */
} packer;

/* A space of n px at the default labels, for this chart's labels: whole
** px, so what is placed after it stays on the pixel grid. */
static double space(const packer *p, double n) { return round(n * p->k); }

pack_frame *pack_frame_new(size_t ncats)
{
    pack_frame *f = ug_calloc(1, sizeof *f);
    size_t n = ncats ? ncats : 1;
    if (!f)
        return NULL;
    f->ncats = ncats;
    f->slots = ug_calloc(n, sizeof *f->slots);
    f->may_hide = ug_calloc(n, sizeof *f->may_hide);
    f->cat_adv = ug_calloc(n, sizeof *f->cat_adv);
    f->side_h = ug_calloc(n, sizeof *f->side_h);
    f->key_adv = ug_calloc(n, sizeof *f->key_adv);
    if (!f->slots || !f->may_hide || !f->cat_adv || !f->side_h || !f->key_adv) {
        pack_frame_free(f);
        return NULL;
    }
    return f;
}

void pack_frame_free(pack_frame *f)
{
    if (!f)
        return;
    ug_free(f->slots);
    ug_free(f->may_hide);
    ug_free(f->cat_adv);
    ug_free(f->side_h);
    ug_free(f->key_adv);
    ug_free(f);
}

/* The room a part of the chart takes: what it needs on its own, or in a
** batch the most any row needs (recorded while measuring). */
static double reserved(const packer *p, double *kept, double need)
{
    if (!kept)
        return need;
    if (p->measuring) {
        *kept = fmax(*kept, need);
        return need;
    }
    return fmax(*kept, need);
}

static long reserved_count(const packer *p, long *kept, long need)
{
    if (!kept)
        return need;
    if (p->measuring) {
        *kept = need > *kept ? need : *kept;
        return need;
    }
    return need > *kept ? need : *kept;
}

/* A size every chart of a batch shares (a text column, the canvas width):
** each row's own while measuring, then the largest of them whatever the row
** needs, so every row computes the same line length from the same inputs. */
static double shared(const packer *p, double *kept, double own)
{
    if (!kept)
        return own;
    if (p->measuring) {
        *kept = fmax(*kept, own);
        return own;
    }
    return *kept;
}

/* The frame's record of a part, or NULL outside a batch. */
#define KEPT(p, field) ((p)->frame ? &(p)->frame->field : NULL)

/* Packing in a batch's frame that measuring has filled: read it, never write. */
static bool framed(const packer *p) { return p->frame && !p->measuring; }

static void fail(packer *p, ug_status st)
{
    if (!p->st)
        p->st = ug_fail(p->err, st, ug_mark_file(p->c->path), "out of memory");
}

static void *push(packer *p, void **arr, size_t *n, size_t *cap, size_t elem)
{
    if (p->st)
        return NULL;
    if (*n == *cap) {
        size_t grown = *cap ? *cap * 2 : 64;
        void *g = ug_realloc(*arr, grown * elem);
        if (!g) {
            fail(p, UG_ENOMEM);
            return NULL;
        }
        *arr = g;
        *cap = grown;
    }
    void *slot = (char *)*arr + (*n)++ * elem;
    memset(slot, 0, elem);
    return slot;
}

#define PUSH(p, arr, n, cap) push((p), (void **)&(p)->s->arr, &(p)->s->n, &(p)->cap, \
                                  sizeof *(p)->s->arr)

static double content_width(const packer *p) { return p->right - p->left; }

/* ---- text ------------------------------------------------------------------ */

typedef struct {
    double w, h, line; /* widest line, block height, height of one line box */
} text_size;

/* Wrap s to `width` and, when place is true, add its lines with the first
** line box's top at `top`. Returns the block's size either way. */
static text_size put_text(packer *p, const char *s, double x, double top,
                          double width, double px, bool bold, scene_anchor an,
                          bool place)
{
    text_size ts = {0, 0, 0};
    char *clean = s && !p->st ? text_clean(s) : NULL;
    text_font f = {p->s->font, px, bold, p->c->style.font_mark};
    text_block b;
    if (!clean) {
        if (s && !p->st)
            fail(p, UG_ENOMEM);
        return ts;
    }
    if ((p->st = text_wrap(&f, clean, width, &b, p->err))) {
        ug_free(clean);
        return ts;
    }
    ts.line = b.ascent + b.descent;
    ts.w = b.width;
    ts.h = b.n ? ts.line + (double)(b.n - 1) * b.pitch : 0;
    for (size_t i = 0; place && i < b.n; i++) {
        if (!b.lines[i][0])
            continue;
        scene_text *t = PUSH(p, texts, ntexts, cap_texts);
        if (!t)
            break;
        *t = (scene_text){x, top + b.ascent + (double)i * b.pitch, b.px, b.widths[i],
                          b.ascent, b.descent, bold, an,
                          ug_arena_strdup(&p->s->arena, b.lines[i])};
        if (!t->text)
            fail(p, UG_ENOMEM);
    }
    text_block_free(&b);
    ug_free(clean);
    return ts;
}

/* Height of one line box at px (for centring text on a line of icons). */
static double line_box(packer *p, double px, bool bold)
{
    return put_text(p, "Ag", 0, 0, 0, px, bold, SCENE_START, false).line;
}

/* A text as a block of its own, spanning the content width; moves p->y by
** its height, or by what the frame reserves for it (kept may be NULL). */
static void put_block(packer *p, const char *s, double px, bool bold, double after,
                      double *kept)
{
    if (!s)
        return;
    text_size ts = put_text(p, s, p->left, p->y, content_width(p), px, bold,
                            SCENE_START, true);
    p->y += reserved(p, kept, ts.h) + after;
}

/* A string built in a buffer, placed, then dropped. */
static text_size put_buf(packer *p, ug_buf *b, double x, double top, double width,
                         double px, bool bold, scene_anchor an, bool place)
{
    ug_buf_add(b, "", 1);
    if (b->failed) {
        fail(p, UG_ENOMEM);
        ug_buf_free(b);
        return (text_size){0, 0, 0};
    }
    text_size ts = put_text(p, b->data, x, top, width, px, bold, an, place);
    ug_buf_free(b);
    return ts;
}

/* ---- icons ------------------------------------------------------------------ */

static void put_icon(packer *p, double x, double y, size_t cat, size_t group,
                     double fraction)
{
    scene_icon *ic = PUSH(p, icons, nicons, cap_icons);
    if (ic)
        *ic = (scene_icon){x, y, fraction, (unsigned)cat, (unsigned)group};
}

/* An unfilled waffle cell: a light outline, so the grid keeps its shape. */
static void put_empty(packer *p, double x, double y)
{
    scene_rect *r = PUSH(p, rects, nrects, cap_rects);
    if (r)
        *r = (scene_rect){x + 0.5, y + 0.5, p->size - 1, p->size - 1, {0xc4, 0xc4, 0xc4}};
}

/* The marked placeholder of a hidden count: dashed box plus its label. */
static void put_holder(packer *p, double x, double y, size_t cat, size_t group,
                       const char *label)
{
    scene_placeholder *h = PUSH(p, holders, nholders, cap_holders);
    if (!h)
        return;
    *h = (scene_placeholder){x, y, p->holder_w, p->holder_h, (unsigned)cat,
                             (unsigned)group};
    double lb = line_box(p, p->holder_px, false);
    put_text(p, label, x + p->holder_w / 2, y + (p->holder_h - lb) / 2, 0,
             p->holder_px, false, SCENE_MIDDLE, true);
}

/* Icons sit in the scene grouped by category (the SVG writer's <g> per
** category needs them so); a counting sort keeps each category's order. */
static void sort_icons(packer *p)
{
    ug_scene *s = p->s;
    size_t *start = ug_calloc(s->ncats + 1, sizeof *start);
    scene_icon *sorted = ug_malloc((s->nicons ? s->nicons : 1) * sizeof *sorted);
    if (!start || !sorted) {
        fail(p, UG_ENOMEM);
    } else {
        for (size_t i = 0; i < s->nicons; i++)
            start[s->icons[i].cat + 1]++;
        for (size_t k = 0; k < s->ncats; k++)
            start[k + 1] += start[k];
        for (size_t i = 0; i < s->nicons; i++)
            sorted[start[s->icons[i].cat]++] = s->icons[i];
        ug_free(s->icons);
        s->icons = sorted;
        p->cap_icons = s->nicons;
        sorted = NULL;
    }
    ug_free(start);
    ug_free(sorted);
}

/* ---- rows (isotype) ---------------------------------------------------------- */

/* An extra space after every `cluster` icons helps counting; grouping in
** fives or tens is common practice with no primary source (REFERENCES.md §6),
** and half an icon is our own choice of how wide that space is. */
static double slot_x(const packer *p, double x0, long k)
{
    double extra = p->c->cluster > 0 ? (double)(k / p->c->cluster) * p->size / 2 : 0;
    return x0 + (double)k * p->pitch + extra;
}

static long fit_columns(const packer *p, double x0, double avail)
{
    long want = alloc_default_columns(p->c), n = 1;
    while (n < want && slot_x(p, x0, n) + p->size - x0 <= avail)
        n++;
    if (n < want && p->c->cluster > 0 && n > p->c->cluster)
        n -= n % p->c->cluster; /* wrap at a cluster boundary */
    return n;
}

static const char *cat_label(const ug_chart *c, size_t i)
{
    return c->cats[i].label.text ? c->cats[i].label.text : c->cats[i].id;
}

typedef struct {
    double lw, tw;     /* left label column, right total column */
    double x0, avail;  /* icon area */
    double tx;         /* where the totals start: just past the longest line */
    long cols;
    double line_h;     /* one line of icons (a placeholder may be taller) */
    double band_gap;
    double cat_gap;    /* split: extra space between categories when one wraps */
} rows_frame;

static void right_text(packer *p, size_t g, size_t i, ug_buf *b)
{
    if (p->c->arrangement != UG_ARRANGE_SPLIT) {
        pack_group_phrase(p->a, g, b);
        return;
    }
    if (resolve_direct_labels(p->c)) {
        ug_buf_puts(b, cat_label(p->c, i));
        ug_buf_puts(b, phrase_text(pack_lang(p->c), PH_LABEL_SEP));
    }
    pack_category_cell(p->a, g, i, b);
}

/* The widest single word of s: a text column narrower than that would have
** to shrink the text or break the word. */
static double widest_word(packer *p, const char *s, bool bold)
{
    double w = 0;
    while (s && *s) {
        size_t n = strcspn(s, " ");
        char word[256];
        if (n && n < sizeof word) {
            memcpy(word, s, n);
            word[n] = '\0';
            w = fmax(w, put_text(p, word, 0, 0, 0, p->type[UG_TYPE_LABEL], bold,
                                 SCENE_START, false).w);
        }
        s += n + (s[n] == ' ');
    }
    return w;
}

static double widest_side(packer *p, bool left, double *word)
{
    const ug_chart *c = p->c;
    bool split = c->arrangement == UG_ARRANGE_SPLIT;
    double w = 0;
    for (size_t g = 0; g < chart_ngroups(c); g++)
        for (size_t i = 0; i < (split ? c->ncats : 1); i++) {
            ug_buf b;
            ug_buf_init(&b);
            if (!left)
                right_text(p, g, i, &b);
            else if (c->groups.n)
                ug_buf_puts(&b, c->groups.items[g].text);
            else if (split)
                ug_buf_puts(&b, cat_label(c, i));
            if (word && b.data) /* a ug_buf's text is always NUL-ended */
                *word = fmax(*word, widest_word(p, b.data, left));
            text_size ts = put_buf(p, &b, 0, 0, 0, p->type[UG_TYPE_LABEL], left, SCENE_START, false);
            w = fmax(w, ts.w);
        }
    return w;
}

static bool a_category_wraps(const packer *p, long cols);

static rows_frame rows_setup(packer *p)
{
    rows_frame f;
    double cw = content_width(p);
    /* the label column takes up to 30 % of the width, and more for a word
    ** that would not fit otherwise, while ten icons still fit on a line */
    double word = 0, labels = widest_side(p, true, &word);
    f.tw = shared(p, KEPT(p, tw), fmin(widest_side(p, false, NULL), 0.3 * cw));
    double spare = cw - 2 * p->col_gap - f.tw - 10 * p->pitch;
    f.lw = shared(p, KEPT(p, lw), fmin(labels, fmax(0.3 * cw, fmin(word, spare))));
    f.x0 = p->left + (f.lw > 0 ? f.lw + p->col_gap : 0);
    f.avail = p->right - (f.tw > 0 ? f.tw + p->col_gap : 0) - f.x0;
    f.cols = fit_columns(p, f.x0, f.avail);
    f.tx = fmax(slot_x(p, f.x0, f.cols - 1) + p->size, f.x0 + p->holder_w) + p->col_gap;
    f.line_h = fmax(p->size, p->holders ? p->holder_h : 0);
    f.band_gap = fmax(14, p->size * 0.75);
    /* a wrapped line must sit nearer its own category than the next one */
    bool split = p->c->arrangement == UG_ARRANGE_SPLIT;
    f.cat_gap = split && a_category_wraps(p, f.cols) ? fmax(p->gap, round(p->size * 0.5)) : 0;
    return f;
}

/* Slots a placeholder box takes on a line (at least one). */
static long holder_slots(const packer *p)
{
    long slots = (long)ceil((p->holder_w + p->gap) / p->pitch);
    return slots < 1 ? 1 : slots;
}

/* Slots the longest line could fill: `columns`, unless no group holds that
** many icons and placeholders (a line never needs more than its band). */
static long longest_line(const packer *p)
{
    long most = 0, slots_per_holder = holder_slots(p);
    for (size_t g = 0; g < chart_ngroups(p->c); g++) {
        long n = 0;
        for (size_t i = 0; i < p->c->ncats; i++) {
            const alloc_share *sh = alloc_at(p->a, g, i);
            n += alloc_hidden(sh) ? slots_per_holder : sh->icons + (sh->partial ? 1 : 0);
        }
        most = n > most ? n : most;
    }
    /* a line shorter than `columns` wraps at a cluster boundary (fit_columns) */
    long cl = p->c->cluster;
    if (cl > 0 && most % cl)
        most += cl - most % cl;
    return most < p->c->columns ? most : p->c->columns;
}

/* `columns` given by the layout is a promise about line length, so rows are
** never wrapped earlier: the canvas widens for it, or, when the width is
** fixed (the layout's `width`, a page's column), the chart is refused with
** the width it would need. */
static void honour_columns(packer *p)
{
    if (p->c->form != UG_FORM_ROWS || p->c->columns <= 0)
        return;
    long want = reserved_count(p, KEPT(p, longest), longest_line(p));
    for (int pass = 0; pass < 3 && !p->st; pass++) {
        rows_frame f = rows_setup(p);
        double short_by = slot_x(p, f.x0, want - 1) + p->size - f.x0 - f.avail;
        if (f.cols >= want || short_by <= 0)
            return;
        if (p->c->style.width > 0) {
            p->st = ug_fail(p->err, UG_ELIMIT, p->c->columns_mark,
                            "lines of %ld icons need a chart %.0f px wide, but it is "
                            "%.0f px wide (its width, or its column on a page); "
                            "allow more width or give at most 'columns: %ld'",
                            want, ceil(p->s->width + short_by), p->s->width, f.cols);
            return;
        }
        p->s->width = ceil(p->s->width + short_by);
        p->right = p->s->width - MARGIN;
    }
}

typedef struct {
    double top, floor; /* current line's top; lowest text bottom so far */
    long line, k;      /* lines begun before the current one; slots used on it */
    bool fresh;        /* nothing on the current line yet */
} rows_cursor;

/* The next line of icons. A category's own icons wrap straight under its
** line, close by, even beside a label of several lines (their column is the
** label's, not theirs); a line that brings side texts of its own (the next
** category, split) starts below the texts before it. */
static void new_line(const packer *p, const rows_frame *f, rows_cursor *cur,
                     bool has_texts)
{
    if (cur->fresh)
        return;
    cur->top = cur->top + f->line_h + p->gap;
    if (has_texts)
        cur->top = fmax(cur->top, ceil(cur->floor));
    cur->line++;
    cur->k = 0;
    cur->fresh = true;
}

/* Slots category i takes on its line: icons and a clipped last icon, or the
** placeholder of a hidden count. */
static long category_slots(const packer *p, size_t g, size_t i)
{
    const alloc_share *sh = alloc_at(p->a, g, i);
    return alloc_hidden(sh) ? holder_slots(p) : sh->icons + (sh->partial ? 1 : 0);
}

static bool a_category_wraps(const packer *p, long cols)
{
    for (size_t g = 0; g < chart_ngroups(p->c); g++)
        for (size_t i = 0; i < p->c->ncats; i++)
            if (category_slots(p, g, i) > cols)
                return true;
    return false;
}

/* Where category i starts on a line shared by all categories when each one
** before it takes the most slots it takes in any row of the batch, placed as
** rows_category places them (a placeholder never splits across lines); for
** i == ncats, where the last one's reserved slots end. */
static void reserved_start(const packer *p, const rows_frame *f, size_t i, long *line,
                           long *k)
{
    const pack_frame *fr = p->frame;
    long hs = holder_slots(p) < f->cols ? holder_slots(p) : f->cols;
    *line = 0;
    *k = 0;
    for (size_t j = 0; j <= i; j++) {
        if (j < fr->ncats && fr->may_hide[j] && *k > 0 && *k + hs > f->cols) {
            ++*line;
            *k = 0;
        }
        if (j == i)
            return;
        if (fr->slots[j] > 0) {
            long pos = *line * f->cols + *k + fr->slots[j];
            *line = (pos - 1) / f->cols;
            *k = (pos - 1) % f->cols + 1;
        }
    }
}

/* In a batch's frame, move to category i's own place on the shared line, so
** that a change in another category's count moves none of its icons. */
static void go_to_reserved(packer *p, const rows_frame *f, rows_cursor *cur, size_t g,
                           size_t i)
{
    if (p->measuring && i < p->c->ncats) {
        long n = category_slots(p, g, i);
        p->frame->slots[i] = n > p->frame->slots[i] ? n : p->frame->slots[i];
        p->frame->may_hide[i] |= alloc_hidden(alloc_at(p->a, g, i));
        return;
    }
    long line, k;
    reserved_start(p, f, i, &line, &k);
    while (cur->line < line) {
        cur->fresh = false;
        new_line(p, f, cur, false);
    }
    if (k > cur->k) {
        cur->k = k;
        cur->fresh = false;
    }
}

static void side_texts(packer *p, const rows_frame *f, rows_cursor *cur,
                       size_t g, size_t i, bool first)
{
    const ug_chart *c = p->c;
    bool split = c->arrangement == UG_ARRANGE_SPLIT;
    double lb = line_box(p, p->type[UG_TYPE_LABEL], false);
    double top = cur->top + (f->line_h - lb) / 2;
    text_size l = {0, 0, 0}, r = {0, 0, 0};
    if (first && c->groups.n)
        l = put_text(p, c->groups.items[g].text, p->left, top, f->lw, p->type[UG_TYPE_LABEL],
                     true, SCENE_START, true);
    else if (split && !c->groups.n)
        l = put_text(p, cat_label(c, i), p->left, top, f->lw, p->type[UG_TYPE_LABEL], false,
                     SCENE_START, true);
    if (first || split) {
        ug_buf b;
        ug_buf_init(&b);
        right_text(p, g, i, &b);
        r = put_buf(p, &b, f->tx, top, p->right - f->tx, p->type[UG_TYPE_LABEL], false, SCENE_START,
                    true);
    }
    /* the next line's text starts above its icons when text is taller */
    double h = reserved(p, p->frame ? &p->frame->side_h[i] : NULL, fmax(l.h, r.h));
    cur->floor = fmax(cur->floor, top + h + p->gap + fmax(0, (lb - f->line_h) / 2));
}

static void rows_category(packer *p, const rows_frame *f, rows_cursor *cur,
                          size_t g, size_t i)
{
    const alloc_share *sh = alloc_at(p->a, g, i);
    double dy = (f->line_h - p->size) / 2;
    if (alloc_hidden(sh)) {
        long slots = holder_slots(p);
        slots = slots > f->cols ? f->cols : slots;
        if (cur->k > 0 && cur->k + slots > f->cols)
            new_line(p, f, cur, false);
        ug_buf label;
        ug_buf_init(&label);
        pack_placeholder(p->a, sh->status, &label);
        ug_buf_add(&label, "", 1);
        if (label.failed)
            fail(p, UG_ENOMEM);
        else
            put_holder(p, slot_x(p, f->x0, cur->k),
                       cur->top + (f->line_h - p->holder_h) / 2, i, g, label.data);
        ug_buf_free(&label);
        cur->k += slots;
        cur->fresh = false;
        return;
    }
    long n = sh->icons + (sh->partial ? 1 : 0);
    for (long j = 0; j < n && !p->st; j++) {
        if (cur->k == f->cols)
            new_line(p, f, cur, false);
        double frac = j == sh->icons ? (double)sh->rem / (double)sh->quota_den : 1.0;
        put_icon(p, slot_x(p, f->x0, cur->k), cur->top + dy, i, g, frac);
        cur->k++;
        cur->fresh = false;
    }
}

/* The next category's line under `split`: in a batch's frame, as far below
** this one as the most lines this category takes in any row. */
static void next_category_line(packer *p, const rows_frame *f, rows_cursor *cur,
                               size_t i, double *cat_top)
{
    cur->fresh = false; /* an empty category still gets its line */
    new_line(p, f, cur, true);
    cur->top += f->cat_gap;
    double adv = reserved(p, p->frame ? &p->frame->cat_adv[i] : NULL,
                          cur->top - *cat_top);
    cur->top = *cat_top + adv;
    *cat_top = cur->top;
}

static void rows_band(packer *p, const rows_frame *f, size_t g)
{
    bool split = p->c->arrangement == UG_ARRANGE_SPLIT;
    double lb = line_box(p, p->type[UG_TYPE_LABEL], false);
    /* whole-pixel tops keep icon edges crisp when rendered */
    rows_cursor cur = {ceil(p->y + fmax(0, (lb - f->line_h) / 2)), p->y, 0, 0, true};
    double band_top = cur.top, cat_top = cur.top;
    for (size_t i = 0; i < p->c->ncats && !p->st; i++) {
        if (split && i > 0)
            next_category_line(p, f, &cur, i - 1, &cat_top);
        if (i == 0 || split)
            side_texts(p, f, &cur, g, i, i == 0);
        if (p->frame && !split)
            go_to_reserved(p, f, &cur, g, i);
        rows_category(p, f, &cur, g, i);
    }
    if (framed(p) && !split) /* the band holds every category's reserved slots */
        go_to_reserved(p, f, &cur, g, p->c->ncats);
    double end = fmax(cur.top + f->line_h + p->gap, cur.floor);
    if (split && p->c->ncats)
        end = cat_top + reserved(p, p->frame ? &p->frame->cat_adv[p->c->ncats - 1] : NULL,
                                 end - cat_top);
    else
        end = band_top + reserved(p, KEPT(p, band_h), end - band_top);
    p->y = end - p->gap + f->band_gap;
}

static void pack_rows(packer *p)
{
    rows_frame f = rows_setup(p);
    for (size_t g = 0; g < chart_ngroups(p->c) && !p->st; g++)
        rows_band(p, &f, g);
    p->y += p->block_gap - f.band_gap;
}

/* ---- waffle ------------------------------------------------------------------ */

typedef struct {
    long cols, rows, cells;  /* grid shared by every panel */
    double w, h, gap;        /* one panel; space between panels */
    size_t per_row;
} waffle_frame;

static waffle_frame waffle_setup(const packer *p)
{
    waffle_frame f;
    const ug_allocation *a = p->a;
    f.cols = alloc_default_columns(p->c);
    f.cells = a->rule.by_cells ? a->rule.cells : 0;
    for (size_t g = 0; !a->rule.by_cells && g < a->ngroups; g++)
        if (a->group_icons[g] > f.cells)
            f.cells = a->group_icons[g];
    f.cells = reserved_count(p, KEPT(p, cells), f.cells);
    f.rows = (f.cells + f.cols - 1) / f.cols;
    f.w = (double)f.cols * p->pitch - p->gap;
    f.h = f.rows ? (double)f.rows * p->pitch - p->gap : 0;
    f.gap = fmax(space(p, 40), 2 * p->size);
    double fit = floor((content_width(p) + f.gap) / (f.w + f.gap));
    f.per_row = fit < 1 ? 1 : (size_t)fit;
    return f;
}

/* Cell k of the fill order -> its column and row in the grid. */
static void cell_at(const ug_chart *c, const waffle_frame *f, long k, long *col,
                    long *row)
{
    if (c->fill == UG_FILL_BY_COLUMN) {
        *col = k / f->rows;
        *row = k % f->rows;
    } else {
        *row = k / f->cols;
        *col = k % f->cols;
        if (c->fill == UG_FILL_SNAKE && *row % 2 == 1)
            *col = f->cols - 1 - *col;
    }
    if (c->start == UG_START_BOTTOM_LEFT)
        *row = f->rows - 1 - *row;
}

/* Categories fill the grid one after another in key order. A hidden count's
** cells and the cells of an all-zero total are drawn as empty outlines: the
** grid keeps its shape and no colour stands for a number we must not show.
** An icon-value waffle whose last row is short leaves the rest blank. */
static void waffle_cells(packer *p, const waffle_frame *f, size_t g, double x0,
                         double y0)
{
    long k = 0, col, row;
    for (size_t i = 0; i < p->c->ncats && !p->st; i++) {
        const alloc_share *sh = alloc_at(p->a, g, i);
        for (long j = 0; j < sh->icons && !p->st; j++, k++) {
            cell_at(p->c, f, k, &col, &row);
            put_icon(p, x0 + (double)col * p->pitch, y0 + (double)row * p->pitch, i, g,
                     1.0);
        }
    }
    for (; p->a->rule.by_cells && k < f->cells && !p->st; k++) {
        cell_at(p->c, f, k, &col, &row);
        put_empty(p, x0 + (double)col * p->pitch, y0 + (double)row * p->pitch);
    }
}

static double panel_header(packer *p, const waffle_frame *f, size_t g, double x,
                           bool place)
{
    if (!p->c->groups.n)
        return 0;
    text_size l = put_text(p, p->c->groups.items[g].text, x, p->y, f->w, p->type[UG_TYPE_LABEL],
                           true, SCENE_START, place);
    ug_buf b;
    ug_buf_init(&b);
    pack_group_phrase(p->a, g, &b);
    text_size t = put_buf(p, &b, x, p->y + l.h + 4, f->w, p->type[UG_TYPE_NOTE], false,
                          SCENE_START, place);
    return l.h + 4 + t.h + space(p, 10);
}

static void pack_waffle(packer *p)
{
    waffle_frame f = waffle_setup(p);
    size_t n = chart_ngroups(p->c);
    for (size_t g0 = 0; g0 < n && !p->st; g0 += f.per_row) {
        p->y = ceil(p->y);
        size_t g1 = g0 + f.per_row < n ? g0 + f.per_row : n;
        double head = 0;
        for (size_t g = g0; g < g1; g++)
            head = fmax(head, ceil(panel_header(p, &f, g, 0, false)));
        head = reserved(p, KEPT(p, head_h), head);
        for (size_t g = g0; g < g1 && !p->st; g++) {
            double x = p->left + (double)(g - g0) * (f.w + f.gap);
            panel_header(p, &f, g, x, true);
            waffle_cells(p, &f, g, x, p->y + head);
        }
        p->y += head + f.h + (g1 < n ? f.gap * 0.75 : p->block_gap);
    }
}

/* ---- key, value statement, notes, source ---------------------------------------- */

/* " · 8 icons", said of the published counts when some are hidden. */
static void biprop_icons(const ug_allocation *a, size_t i, ug_buf *b)
{
    bool hidden = false;
    for (size_t g = 0; g < a->ngroups; g++)
        hidden = hidden || alloc_hidden(alloc_at(a, g, i));
    ug_buf_puts(b, phrase_text(pack_lang(a->chart), PH_DETAIL_SEP));
    pack_icon_count(a->chart, (ug_dec){(ug_i128)a->cat_icons[i] * UG_DEC_SCALE}, 0, b);
    if (hidden)
        ug_buf_puts(b, phrase_text(pack_lang(a->chart), PH_FOR_SHOWN));
}

static void key_detail(packer *p, size_t i, ug_buf *b)
{
    const ug_chart *c = p->c;
    pack_category_phrase(p->a, i, b);
    const alloc_share *sh = alloc_at(p->a, 0, i);
    if (p->a->cat_icons) { /* FORMAT.md §7: the category's own icons */
        biprop_icons(p->a, i, b);
        return;
    }
    if (c->groups.n || alloc_hidden(sh))
        return;
    ug_buf_puts(b, phrase_text(pack_lang(c), PH_DETAIL_SEP));
    pack_share_icons(c, sh, b);
}

/* One key entry: swatch, label, and its detail beside the label or, stacked,
** under it (a key beside the plot, where the width is short). */
static void key_entry(packer *p, size_t i, double lw, bool stacked)
{
    double lb = line_box(p, p->type[UG_TYPE_LABEL], true);
    double top = ceil(p->y + fmax(0, (lb - p->size) / 2));
    double text_top = top + (p->size - lb) / 2;
    double lx = p->left + p->size + space(p, 10), dx = stacked ? lx : lx + lw + space(p, 24);
    scene_icon *sw = PUSH(p, swatches, nswatches, cap_swatches);
    if (sw)
        *sw = (scene_icon){p->left, top, 1.0, (unsigned)i, 0};
    text_size l = put_text(p, cat_label(p->c, i), lx, text_top, lw, p->type[UG_TYPE_LABEL], true,
                           SCENE_START, true);
    ug_buf b;
    ug_buf_init(&b);
    key_detail(p, i, &b);
    double dtop = stacked ? text_top + l.h : text_top;
    text_size d = put_buf(p, &b, dx, dtop, p->right - dx, p->type[UG_TYPE_LABEL], false,
                          SCENE_START, true);
    if (stacked)
        d.h += l.h;
    double bottom = fmax(top + p->size, text_top + fmax(l.h, d.h));
    if (p->c->cats[i].note.text) {
        text_size nt = put_text(p, p->c->cats[i].note.text, lx, bottom + 4,
                                p->right - lx, p->type[UG_TYPE_NOTE], false, SCENE_START, true);
        bottom += 4 + nt.h;
    }
    p->y = top + reserved(p, p->frame ? &p->frame->key_adv[i] : NULL, bottom - top) + space(p, 12);
}

/* The key's width with nothing wrapped: swatch, widest label, widest detail. */
static double key_natural_width(packer *p, bool stacked)
{
    double lw = 0, detail = 0;
    for (size_t i = 0; i < p->c->ncats && !p->st; i++) {
        ug_buf b;
        ug_buf_init(&b);
        key_detail(p, i, &b);
        lw = fmax(lw, put_text(p, cat_label(p->c, i), 0, 0, 0, p->type[UG_TYPE_LABEL],
                               true, SCENE_START, false).w);
        detail = fmax(detail, put_buf(p, &b, 0, 0, 0, p->type[UG_TYPE_LABEL], false,
                                      SCENE_START, false).w);
    }
    return p->size + space(p, 10) + (stacked ? fmax(lw, detail) : lw + space(p, 24) + detail);
}

#define KEY_COLUMN_GAP 32.0 /* between columns of key entries */

/* Key entries side by side, as many as fit unwrapped (a long key then takes
** a few lines, not one line per entry); one column for a stacked key. A
** batch lays every row's key out for the widest entry any row has. */
static size_t key_columns(packer *p, bool stacked)
{
    if (stacked || p->c->ncats < 2)
        return 1;
    double gap = space(p, KEY_COLUMN_GAP);
    double one = shared(p, KEPT(p, key_w), key_natural_width(p, false));
    double fit = floor((content_width(p) + gap) / (one + gap));
    return fit < 1 ? 1 : fit > (double)p->c->ncats ? p->c->ncats : (size_t)fit;
}

static void pack_key(packer *p, bool stacked)
{
    size_t ncol = key_columns(p, stacked);
    double left = p->left, right = p->right, gap = space(p, KEY_COLUMN_GAP);
    double colw = floor((content_width(p) - (double)(ncol - 1) * gap) / (double)ncol);
    double lw = 0, lx = p->size + space(p, 10);
    for (size_t i = 0; i < p->c->ncats; i++)
        lw = fmax(lw, put_text(p, cat_label(p->c, i), 0, 0, 0, p->type[UG_TYPE_LABEL], true,
                               SCENE_START, false).w);
    /* side by side, a column is as wide as its widest entry unwrapped */
    lw = stacked ? colw - lx : ncol > 1 ? lw : fmin(lw, 0.45 * (colw - lx));
    for (size_t row = 0; row < p->c->ncats && !p->st; row += ncol) {
        double top = p->y, bottom = top;
        for (size_t c = 0; c < ncol && row + c < p->c->ncats; c++) {
            p->left = left + (double)c * (colw + gap);
            p->right = p->left + colw;
            p->y = top;
            key_entry(p, row + c, lw, stacked);
            bottom = fmax(bottom, p->y);
        }
        p->y = bottom;
    }
    p->left = left;
    p->right = right;
    p->y += space(p, 16);
}

/* How many of each kind of box the scene held when the plot began. */
typedef struct {
    size_t icons, texts, holders, rects;
} scene_counts;

static scene_counts count_boxes(const ug_scene *s)
{
    return (scene_counts){s->nicons, s->ntexts, s->nholders, s->nrects};
}

/* The right edge of everything placed since `from`. */
static double right_since(const ug_scene *s, scene_counts from)
{
    double r = 0, x0, y0, x1, y1;
    for (size_t i = from.icons; i < s->nicons; i++)
        r = fmax(r, s->icons[i].x + s->icon_size);
    for (size_t i = from.texts; i < s->ntexts; i++) {
        scene_text_box(&s->texts[i], &x0, &y0, &x1, &y1);
        r = fmax(r, x1);
    }
    for (size_t i = from.holders; i < s->nholders; i++)
        r = fmax(r, s->holders[i].x + s->holders[i].w);
    for (size_t i = from.rects; i < s->nrects; i++)
        r = fmax(r, s->rects[i].x + s->rects[i].w);
    return r;
}

/* The key beside the plot, its top at the plot's, when the plot leaves it
** room enough unwrapped (or `key-place: beside` asks for it and a third of
** the width is left); below it otherwise. A batch keeps it below, so every
** row's key entries stay where the others' are. */
static void place_key(packer *p, double plot_top, scene_counts plot)
{
    ug_key_place want = p->c->key_place;
    double x = ceil(right_since(p->s, plot) + 2 * p->col_gap);
    bool flat = x + key_natural_width(p, false) <= p->right;
    bool stacked = !flat && x + key_natural_width(p, true) <= p->right;
    if (want == UG_KEY_BESIDE && !flat && !stacked)
        stacked = p->right - x >= content_width(p) / 3;
    if (want == UG_KEY_BELOW || p->frame || (!flat && !stacked) || p->st) {
        pack_key(p, false);
        return;
    }
    double left = p->left, below = p->y;
    p->left = x;
    p->y = plot_top;
    pack_key(p, stacked);
    p->left = left;
    p->y = fmax(below, p->y);
}

static void pack_foot_texts(packer *p)
{
    ug_buf b;
    ug_buf_init(&b);
    pack_value_statement(p->c, p->a, true, &b);
    if (p->a->cat_icons) {
        ug_buf_puts(&b, ". ");
        pack_totals_note(p->a, &b);
        ug_buf_puts(&b, ".");
    }
    text_size ts = put_buf(p, &b, p->left, p->y, content_width(p), p->type[UG_TYPE_LABEL], true,
                           SCENE_START, true);
    p->y += ts.h + 14;
    ug_buf_init(&b);
    pack_disclosure_notes(p->a, &b);
    if (b.len || b.failed) {
        ts = put_buf(p, &b, p->left, p->y, content_width(p), p->type[UG_TYPE_NOTE], false,
                     SCENE_START, true);
        p->y += ts.h + 6;
    } else {
        ug_buf_free(&b);
    }
    for (size_t i = 0; i < p->c->notes.n; i++)
        put_block(p, p->c->notes.items[i].text, p->type[UG_TYPE_NOTE], false, 6, NULL);
    if (p->c->source.n) {
        ug_buf_init(&b);
        ug_buf_puts(&b, phrase_text(pack_lang(p->c), PH_SOURCE));
        for (size_t i = 0; i < p->c->source.n; i++)
            ug_buf_printf(&b, "%s%s", i ? "; " : "", p->c->source.items[i].text);
        ts = put_buf(p, &b, p->left, p->y + 4, content_width(p), p->type[UG_TYPE_NOTE], false,
                     SCENE_START, true);
        p->y += 4 + ts.h;
    }
}

/* The foot says what was hidden only in rows that hide something, so in a
** batch it takes the room of the longest one. */
static void pack_foot(packer *p)
{
    double top = p->y;
    pack_foot_texts(p);
    p->y = top + reserved(p, KEPT(p, foot_h), p->y - top);
}

/* ---- set-up -------------------------------------------------------------------- */

static scene_rgb rgb_of(ug_color c) { return (scene_rgb){c.r, c.g, c.b}; }

static bool isalnum_ascii(unsigned char ch)
{
    return (ch >= '0' && ch <= '9') || ((ch | 32) >= 'a' && (ch | 32) <= 'z');
}

/* An XML id from a category id. Distinct category ids must stay distinct
** ids ("a b", "a.b" and "a-b" once all became "cat-a-b"), so the mapping is
** one-to-one: ASCII letters, digits and '-' are kept and every other byte is
** written "_" and two lower-case hex digits, '_' included; "_n" and the
** index (never an escape: 'n' is no hex digit) stands for a missing id. */
static const char *safe_id(packer *p, size_t i)
{
    static const char hex[] = "0123456789abcdef";
    const char *id = p->c->cats[i].id ? p->c->cats[i].id : "";
    size_t n = strlen(id);
    char *out = ug_arena_alloc(&p->s->arena, 3 * n + 32);
    if (!out)
        return NULL;
    size_t o = (size_t)snprintf(out, 8, "cat-");
    for (size_t k = 0; k < n; k++) {
        unsigned char ch = (unsigned char)id[k];
        if (isalnum_ascii(ch) || ch == '-') {
            out[o++] = (char)ch;
            continue;
        }
        out[o++] = '_';
        out[o++] = hex[ch >> 4];
        out[o++] = hex[ch & 15];
    }
    if (n == 0)
        o += (size_t)snprintf(out + o, 24, "_n%zu", i);
    out[o] = '\0';
    return out;
}

static size_t glyph_index(packer *p, size_t i)
{
    const ug_category *cat = &p->c->cats[i];
    const char *ref = cat->glyph.text ? cat->glyph.text : "square";
    ug_scene *s = p->s;
    for (size_t k = 0; k < s->nglyphs; k++)
        if (strcmp(s->glyphs[k]->name, ref) == 0)
            return k;
    glyph_search search = {p->opt->glyph_dirs, p->opt->nglyph_dirs, p->c->dir};
    ug_glyph *g = NULL;
    ug_mark where = cat->glyph.text ? cat->glyph.mark : cat->mark;
    if ((p->st = glyph_cache_load(p->opt->glyph_cache, ref, &search, where, &g,
                                  p->err)))
        return 0;
    s->glyphs[s->nglyphs] = g;
    /* Each glyph is written once per document and drawn once per PNG or
    ** PDF, so what bounds the work is their markup together. */
    p->glyph_bytes += strlen(g->body);
    if (p->glyph_bytes > SCENE_MAX_GLYPH_BYTES)
        p->st = ug_fail(p->err, UG_ELIMIT, where,
                        "the chart's glyphs hold %zu bytes of drawing together with "
                        "'%s', over the limit of %u (4 MiB); use fewer or simpler "
                        "glyph files", p->glyph_bytes, ref, SCENE_MAX_GLYPH_BYTES);
    return s->nglyphs++;
}

static void setup_categories(packer *p)
{
    ug_scene *s = p->s;
    s->ncats = p->c->ncats;
    s->cats = ug_arena_alloc(&s->arena, (s->ncats + 1) * sizeof *s->cats);
    s->glyphs = ug_calloc(s->ncats + 1, sizeof *s->glyphs);
    if (!s->cats || !s->glyphs) {
        fail(p, UG_ENOMEM);
        return;
    }
    for (size_t i = 0; i < s->ncats && !p->st; i++) {
        scene_category *sc = &s->cats[i];
        sc->color = rgb_of(p->c->cats[i].color);
        sc->id = safe_id(p, i);
        sc->glyph = p->measuring ? 0 : glyph_index(p, i);
        ug_buf b;
        ug_buf_init(&b);
        ug_buf_printf(&b, "%s: ", cat_label(p->c, i));
        pack_category_phrase(p->a, i, &b);
        ug_buf_add(&b, "", 1);
        char *clean = b.failed ? NULL : text_clean(b.data);
        sc->title = clean ? ug_arena_strdup(&s->arena, clean) : NULL;
        ug_free(clean);
        ug_buf_free(&b);
        if (!sc->id || !sc->title)
            fail(p, UG_ENOMEM);
    }
}

/* One placeholder size for the chart, wide enough for either text, so that
** which cells are hidden moves nothing but those cells. */
static void setup_holder(packer *p)
{
    const pub_table *t = p->a->pub;
    if (framed(p)) {
        p->holders = p->frame->holders;
        p->holder_w = p->frame->holder_w;
        p->holder_h = p->frame->holder_h;
        return;
    }
    if (!t->nhidden)
        return;
    p->holders = true;
    const pub_status kinds[] = {PUB_SMALL, PUB_COMPLEMENT};
    for (size_t k = 0; k < 2; k++) {
        ug_buf label;
        ug_buf_init(&label);
        pack_placeholder(p->a, kinds[k], &label);
        ug_buf_add(&label, "", 1);
        if (label.failed) {
            fail(p, UG_ENOMEM);
            ug_buf_free(&label);
            return;
        }
        text_size ts = put_text(p, label.data, 0, 0, 0, p->holder_px, false, SCENE_START,
                                false);
        ug_buf_free(&label);
        p->holder_w = fmax(p->holder_w, ts.w + 12);
        p->holder_h = fmax(p->holder_h, fmax(p->size, ts.line + 8));
    }
    if (p->frame) {
        p->frame->holders = true;
        p->frame->holder_w = fmax(p->frame->holder_w, p->holder_w);
        p->frame->holder_h = fmax(p->frame->holder_h, p->holder_h);
    }
}

/* The canvas is style.width wide unless one icon line or one waffle panel
** needs more: the icon never shrinks, so the page widens instead. */
/* A right-to-left chart is the left-to-right one seen in a mirror
** (FORMAT.md §6): icons flow from the right, text and key are right-aligned.
** Only positions move, so every size and the order of icons stay; a text's
** anchor turns to the other side. A clipped last icon still shows its left
** part (svg.c clips from the left). */
static void mirror(ug_scene *s)
{
    static const scene_anchor other[] = {[SCENE_START] = SCENE_END,
                                         [SCENE_MIDDLE] = SCENE_MIDDLE,
                                         [SCENE_END] = SCENE_START};
    double w = s->width;
    s->rtl = true;
    for (size_t i = 0; i < s->ntexts; i++) {
        s->texts[i].x = w - s->texts[i].x;
        s->texts[i].anchor = other[s->texts[i].anchor];
    }
    for (size_t i = 0; i < s->nicons; i++)
        s->icons[i].x = w - s->icons[i].x - s->icon_size;
    for (size_t i = 0; i < s->nswatches; i++)
        s->swatches[i].x = w - s->swatches[i].x - s->icon_size;
    for (size_t i = 0; i < s->nholders; i++)
        s->holders[i].x = w - s->holders[i].x - s->holders[i].w;
    for (size_t i = 0; i < s->nrects; i++)
        s->rects[i].x = w - s->rects[i].x - s->rects[i].w;
}

/* Each form's pack function, by form (model.h: UG_CHART_FORMS). */
static void (*const pack_form[UG_FORM_COUNT])(packer *) = {
    [UG_FORM_ROWS] = pack_rows,
    [UG_FORM_WAFFLE] = pack_waffle,
};

static double canvas_width(const packer *p)
{
    double w = p->c->style.width > 0 ? p->c->style.width : DEFAULT_WIDTH;
    double need;
    if (p->c->form == UG_FORM_WAFFLE)
        need = (double)alloc_default_columns(p->c) * p->pitch - p->gap;
    else /* text columns take at most 55% of the width; one icon the rest */
        need = (p->size + 2 * p->col_gap + p->holder_w) / 0.45;
    return fmax(w, ceil(2 * MARGIN + need));
}

static void setup(packer *p)
{
    const ug_chart *c = p->c;
    ug_scene *s = p->s;
    /* every value here was resolved when the chart was made (src/resolve.c) */
    p->size = c->icon_size;
    p->gap = c->icon_gap;
    p->pitch = p->size + p->gap;
    s->icon_size = p->size;
    s->font = ug_arena_strdup(&s->arena, resolve_font(c));
    if (c->lang.text && !(s->lang = ug_arena_strdup(&s->arena, c->lang.text)))
        fail(p, UG_ENOMEM);
    s->background = rgb_of(c->style.background);
    s->ink = rgb_of(c->style.ink);
    char *title = text_clean(c->title.text ? c->title.text : "Unit chart");
    s->title = title ? ug_arena_strdup(&s->arena, title) : NULL;
    ug_free(title);
    if (!s->font || !s->title) {
        fail(p, UG_ENOMEM);
        return;
    }
    setup_holder(p);
    s->width = framed(p) ? p->frame->width : canvas_width(p);
    p->left = MARGIN;
    p->right = s->width - MARGIN;
    p->y = MARGIN;
    setup_categories(p);
    if (!p->st)
        honour_columns(p);
    if (p->frame && p->measuring)
        p->frame->width = fmax(p->frame->width, s->width);
}

static void set_desc(packer *p)
{
    char *d = NULL;
    if (p->st || p->measuring)
        return;
    if ((p->st = ug_chart_describe(p->c, p->a, &d, NULL, p->err)))
        return;
    char *clean = text_clean(d);
    p->s->desc = clean ? ug_arena_strdup(&p->s->arena, clean) : NULL;
    if (!p->s->desc)
        fail(p, UG_ENOMEM);
    ug_free(clean);
    ug_free(d);
}

ug_status ug_scene_pack(const ug_chart *c, const ug_allocation *a, ug_scene **out,
                        ug_error *err)
{
    ug_error_clear(err);
    return ug_scene_pack_with(c, a, NULL, out, err);
}

ug_status ug_scene_pack_with(const ug_chart *c, const ug_allocation *a,
                             const ug_pack_options *opt, ug_scene **out,
                             ug_error *err)
{
    ug_error_clear(err);
    return pack_scene(c, a, opt, NULL, false, out, err);
}

/* The type scale and the spaces that follow it. */
static void set_type(packer *p)
{
    static const double usual[UG_TYPE_COUNT] = RESOLVE_TYPE_PX;
    const double *t = p->c->style.type;
    for (size_t i = 0; i < UG_TYPE_COUNT; i++)
        p->type[i] = t[i] > 0 ? t[i] : usual[i]; /* a chart made by hand */
    p->k = p->type[UG_TYPE_LABEL] / usual[UG_TYPE_LABEL];
    p->holder_px = p->type[UG_TYPE_NOTE] * HOLDER_OF_NOTE;
    p->block_gap = space(p, BLOCK_GAP);
    p->col_gap = space(p, COL_GAP);
}

static void pack_head(packer *p)
{
    const ug_chart *c = p->c;
    if (!p->st && c->title.text)
        put_block(p, c->title.text, p->type[UG_TYPE_TITLE], true,
                  c->subtitle.text ? 6 : p->block_gap, KEPT(p, title_h));
    if (!p->st && c->subtitle.text)
        put_block(p, c->subtitle.text, p->type[UG_TYPE_SUBTITLE], false, p->block_gap,
                  KEPT(p, subtitle_h));
}

ug_status pack_scene(const ug_chart *c, const ug_allocation *a,
                     const ug_pack_options *opt, pack_frame *frame, bool measuring,
                     ug_scene **out, ug_error *err)
{
    static const ug_pack_options defaults = {0};
    *out = NULL;
    packer p;
    memset(&p, 0, sizeof p);
    p.c = c;
    p.a = a;
    p.err = err;
    p.opt = opt ? opt : &defaults;
    p.frame = frame;
    p.measuring = frame && measuring;
    if (!(p.s = ug_calloc(1, sizeof *p.s)))
        return ug_fail(err, UG_ENOMEM, ug_mark_file(c->path), "out of memory");
    set_type(&p);
    setup(&p);
    pack_head(&p);
    double plot_top = p.y;
    scene_counts plot = count_boxes(p.s);
    if (!p.st)
        pack_form[c->form < UG_FORM_COUNT ? c->form : UG_FORM_ROWS](&p);
    if (!p.st)
        place_key(&p, plot_top, plot);
    if (!p.st)
        pack_foot(&p);
    p.s->height = reserved(&p, KEPT(&p, height), ceil(p.y + MARGIN));
    if (!p.st)
        sort_icons(&p);
    if (!p.st && !strcmp(phrase_dir(pack_lang(c)), "rtl"))
        mirror(p.s);
    set_desc(&p);
    if (p.st) {
        ug_scene_free(p.s);
        return p.st;
    }
    *out = p.s;
    return UG_OK;
}

void ug_scene_free(ug_scene *s)
{
    if (!s)
        return;
    for (size_t i = 0; i < s->nglyphs; i++)
        glyph_free(s->glyphs[i]);
    ug_free(s->glyphs);
    ug_free(s->icons);
    ug_free(s->swatches);
    ug_free(s->texts);
    ug_free(s->holders);
    ug_free(s->rects);
    ug_arena_free(&s->arena);
    ug_free(s);
}

double ug_scene_width(const ug_scene *s) { return s->width; }
double ug_scene_height(const ug_scene *s) { return s->height; }
