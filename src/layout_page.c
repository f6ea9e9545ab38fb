/*
** The layout stage for page files (FORMAT.md §2): the page's keys, and each
** panel's chart, inline or a chart file, loaded as layout.c loads one.
*/
#include <string.h>
#include <strings.h>

#include "layout_int.h"
#include "resolve.h"

/* ---- page files (FORMAT.md §2) ------------------------------------------- */

static const char *const orientations[] = {"portrait", "landscape", NULL};

/* ISO 216 (A3, A4, A5) in mm; US Letter and Legal in inches. */
static const struct {
    const char *name;
    double w, h, unit_px;
} paper[] = {
    {"A3", 297, 420, 96.0 / 25.4}, {"A4", 210, 297, 96.0 / 25.4},
    {"A5", 148, 210, 96.0 / 25.4}, {"letter", 8.5, 11, 96.0},
    {"legal", 8.5, 14, 96.0},
};

/* "200mm x 250mm": two lengths around an 'x'. */
static bool custom_size(const char *s, double *w, double *h)
{
    const char *x = strchr(s, 'x');
    if (!x)
        return false;
    size_t n = (size_t)(x - s);
    while (n && s[n - 1] == ' ')
        n--;
    const char *rest = x + 1;
    while (*rest == ' ')
        rest++;
    return layout_parse_length(s, n, w) && layout_parse_length(rest, strlen(rest), h) && *w > 0 &&
           *w <= LAYOUT_MAX_LENGTH_PX && *h <= LAYOUT_MAX_LENGTH_PX &&
           *h > 0;
}

static ug_status key_page_size(loader *l, void *base, const layout_node *v)
{
    ug_page *p = base;
    ug_status st = layout_read_text(l, v, false, &p->size);
    if (st)
        return st;
    for (size_t i = 0; i < sizeof paper / sizeof paper[0]; i++)
        if (!strcasecmp(v->text, paper[i].name)) {
            p->width = paper[i].w * paper[i].unit_px;
            p->height = paper[i].h * paper[i].unit_px;
            return UG_OK;
        }
    if (custom_size(v->text, &p->width, &p->height))
        return UG_OK;
    return ug_fail(l->err, UG_ESCHEMA, v->mark,
                   "'size' expects A3, A4, A5, letter, legal or \"WIDTH x HEIGHT\" "
                   "such as \"200mm x 250mm\" (found '%s')", v->text);
}

static ug_status key_panel_chart(loader *l, void *base, const layout_node *v)
{
    ug_panel *panel = base;
    ug_page *p = l->page;
    panel->kind = UG_PANEL_CHART;
    if (v->kind == LAYOUT_MAP) {
        if (!(panel->chart = layout_chart_new(p->path, p->dir, &p->limits)))
            return layout_nomem(l, v);
        return layout_chart_from_node(panel->chart, v, l->err);
    }
    ug_status st = layout_read_text(l, v, false, &panel->chart_file);
    if (st)
        return st;
    const char *path = layout_join(l->arena, p->dir, panel->chart_file.text);
    if (!path)
        return layout_nomem(l, v);
    return layout_chart_load_at(path, &p->limits, v->mark, &panel->chart, l->err);
}

static ug_status key_page_lang(loader *l, void *base, const layout_node *v)
{
    return layout_read_lang(l, v, &((ug_page *)base)->lang);
}

#define PG(f) offsetof(ug_page, f)
#define PN(f) offsetof(ug_panel, f)
static const key_rule panel_icon_keys[] = {
    {.name = "size", .kind = K_LENGTH, .off = PN(icon_size), .lo = 1},
    {.name = "gap", .kind = K_LENGTH, .off = PN(icon_gap)},
    {.name = NULL},
};

static const key_rule panel_keys[] = {
    {.name = "chart", .kind = K_FN, .fn = key_panel_chart},
    {.name = "text", .kind = K_MULTILINE, .off = PN(text)},
    {.name = "span", .kind = K_LONG, .off = PN(span), .lo = 1, .hi = 12},
    {.name = "icon", .kind = K_MAP, .sub = panel_icon_keys, .mark = PN(icon_mark)},
    {.name = "columns", .kind = K_LONG, .off = PN(columns), .lo = 1, .hi = 1000,
     .mark = PN(columns_mark)},
    {.name = NULL},
};

static ug_status read_panel(loader *l, ug_panel *panel, const layout_node *v)
{
    panel->mark = v->mark;
    panel->span = 1;
    panel->kind = UG_PANEL_TEXT;
    panel->icon_gap = -1; /* not given: 0 is a gap one may ask for */
    ug_status st = layout_walk_map(l, panel, v, panel_keys);
    if (st)
        return st;
    if (!panel->chart == !panel->text.text)
        return ug_fail(l->err, UG_ESCHEMA, v->mark,
                       "a panel holds either 'chart' or 'text' (one of them)");
    ug_mark own = panel->icon_mark.line ? panel->icon_mark : panel->columns_mark;
    if (!panel->chart && own.line)
        return ug_fail(l->err, UG_ESCHEMA, own,
                       "'%s' sets a chart's size, but this panel holds text",
                       panel->icon_mark.line ? "icon" : "columns");
    return UG_OK;
}

/* A printed page holds a handful of panels; each may load a chart file of up
** to the input limit, so the count bounds the memory one page file can ask for. */
static ug_status key_panels(loader *l, void *base, const layout_node *v)
{
    ug_page *p = base;
    ug_status st = layout_want_list(l, v, SIZE_MAX, "panels (chart: or text:)");
    if (st)
        return st;
    if (v->n > p->limits.max_panels)
        return ug_fail(l->err, UG_ELIMIT, v->mark, "%zu panels, more than the limit of %zu "
                       "(raise it with --max-panels)", v->n, p->limits.max_panels);
    if (!(p->panels = layout_arena_array(l->arena, v->n, sizeof *p->panels)))
        return layout_nomem(l, v);
    for (const layout_node *it = v->first; it; it = it->next) {
        /* counted before reading, so a half-read chart is freed with the page */
        st = read_panel(l, &p->panels[p->npanels++], it);
        if (st)
            return st;
    }
    return UG_OK;
}

static const key_rule page_box_keys[] = {
    {.name = "size", .kind = K_FN, .fn = key_page_size},
    {.name = "orientation", .kind = K_ENUM, .off = PG(orientation),
     .choices = orientations},
    {.name = "margin", .kind = K_LENGTH, .off = PG(margin)},
    {.name = "columns", .kind = K_LONG, .off = PG(columns), .lo = 1, .hi = 12},
    {.name = NULL},
};

#define ROLE(role, i) {.name = role, .kind = K_LENGTH, .off = (i) * sizeof(double), .lo = 1}
static const key_rule page_type_keys[] = {
    ROLE("title", UG_PAGE_TYPE_TITLE), ROLE("panel-title", UG_PAGE_TYPE_PANEL_TITLE),
    ROLE("subtitle", UG_PAGE_TYPE_SUBTITLE), ROLE("text", UG_PAGE_TYPE_TEXT),
    ROLE("label", UG_PAGE_TYPE_LABEL), ROLE("note", UG_PAGE_TYPE_NOTE),
    ROLE("source", UG_PAGE_TYPE_SOURCE), {.name = NULL},
};
#undef ROLE

static ug_status key_page_type(loader *l, void *base, const layout_node *v)
{
    ug_page *p = base;
    return layout_read_type_scale(l, v, page_type_keys, p->type, &p->type_mark);
}

static const key_rule fit_keys[] = {
    {.name = "shrink", .kind = K_BOOL, .off = PG(shrink)},
    {.name = "min-icon", .kind = K_LENGTH, .off = PG(min_icon), .lo = 1},
    {.name = "min-text", .kind = K_LENGTH, .off = PG(min_text), .lo = 1},
    {.name = NULL},
};

static const key_rule page_keys[] = {
    {.name = "page", .kind = K_MAP, .sub = page_box_keys, .mark = PG(page_mark)},
    {.name = "title", .kind = K_TEXT, .off = PG(title)},
    {.name = "source", .kind = K_LIST, .off = PG(source)},
    {.name = "lang", .kind = K_FN, .fn = key_page_lang},
    {.name = "number-format", .kind = K_ENUM, .off = PG(number_format),
     .mark = PG(number_format_mark), .choices = layout_number_formats},
    {.name = "panels", .kind = K_FN, .fn = key_panels, .mark = PG(panels_mark)},
    {.name = "shared-scale", .kind = K_BOOL, .off = PG(shared_scale),
     .mark = PG(shared_scale_mark)},
    {.name = "type", .kind = K_FN, .fn = key_page_type},
    {.name = "fit", .kind = K_MAP, .sub = fit_keys, .mark = PG(fit_mark)},
    {.name = NULL},
};

/* shared-scale: every chart that states an icon value or icon size states
** the same one as the first chart that does. */
static ug_status check_shared_scale(const ug_page *p, ug_error *err)
{
    const ug_chart *value = NULL, *size = NULL;
    for (size_t i = 0; i < p->npanels; i++) {
        const ug_chart *c = p->panels[i].chart;
        char a[48], b[48];
        if (!c)
            continue;
        if (c->has_icon_value && !c->icon_value_auto) {
            if (value && value->icon_value.v != c->icon_value.v)
                return ug_fail(err, UG_ESCHEMA, c->icon_value_mark,
                               "shared-scale: icon-value %s differs from %s stated "
                               "in %s:%u", ug_dec_format(c->icon_value, a),
                               ug_dec_format(value->icon_value, b), value->path,
                               value->icon_value_mark.line);
            value = value ? value : c;
        }
        if (c->icon_mark.line) {
            if (size && size->icon_size != c->icon_size)
                return ug_fail(err, UG_ESCHEMA, c->icon_mark,
                               "shared-scale: icon size %g differs from %g stated "
                               "in %s:%u", c->icon_size, size->icon_size, size->path,
                               size->icon_mark.line);
            size = size ? size : c;
        }
    }
    return UG_OK;
}

/* A panel's chart speaks the page's language and writes its numbers as the
** page does unless it says otherwise (a percent chart's shares are never
** compact), takes the page's type scale unless it states one, and the
** panel's icon size and line length over its own (the page owns its
** charts). */
static void adapt_chart(const ug_page *p, const ug_panel *pn, ug_chart *c)
{
    if (p->lang.text && !c->lang.text)
        c->lang = p->lang;
    if (p->number_format_mark.line && !c->number_format_mark.line && !chart_is_percent(c))
        c->number_format = p->number_format;
    if (!c->style.type_mark.line) {
        c->style.type[UG_TYPE_TITLE] = p->type[UG_PAGE_TYPE_PANEL_TITLE];
        c->style.type[UG_TYPE_SUBTITLE] = p->type[UG_PAGE_TYPE_SUBTITLE];
        c->style.type[UG_TYPE_LABEL] = p->type[UG_PAGE_TYPE_LABEL];
        c->style.type[UG_TYPE_NOTE] = p->type[UG_PAGE_TYPE_NOTE];
    }
    if (pn->icon_mark.line) {
        c->icon_size = pn->icon_size > 0 ? pn->icon_size : c->icon_size;
        c->icon_gap = pn->icon_gap >= 0 ? pn->icon_gap : c->icon_gap;
        c->icon_mark = pn->icon_mark;
    }
    if (pn->columns_mark.line) {
        c->columns = pn->columns;
        c->columns_mark = pn->columns_mark;
    }
}

static ug_status finish_page(ug_page *p, const layout_node *root, ug_error *err)
{
    if (!p->npanels)
        return ug_fail(err, UG_ESCHEMA, root->mark,
                       "missing 'panels': a page needs at least one panel");
    bool landscape = p->orientation == UG_ORIENT_LANDSCAPE;
    if ((landscape && p->width < p->height) || (!landscape && p->width > p->height)) {
        double t = p->width;
        p->width = p->height;
        p->height = t;
    }
    if (2 * p->margin >= p->width || 2 * p->margin >= p->height)
        return ug_fail(err, UG_ESCHEMA, p->page_mark,
                       "the margins leave no room on the page");
    for (size_t i = 0; i < p->npanels; i++)
        if (p->panels[i].span > p->columns)
            return ug_fail(err, UG_ESCHEMA, p->panels[i].mark,
                           "the panel spans %ld columns but the page has %ld",
                           p->panels[i].span, p->columns);
    for (size_t i = 0; i < p->npanels; i++)
        if (p->panels[i].chart)
            adapt_chart(p, &p->panels[i], p->panels[i].chart);
    if (p->shrink && p->fit_mark.line && p->min_text > p->type[UG_PAGE_TYPE_SOURCE] + 0.01)
        return ug_fail(err, UG_ESCHEMA, p->fit_mark,
                       "'min-text' (%gpx) is larger than the page's smallest text "
                       "(source, %gpx): shrinking could only make text larger",
                       p->min_text, p->type[UG_PAGE_TYPE_SOURCE]);
    return p->shared_scale ? check_shared_scale(p, err) : UG_OK;
}

static ug_page *page_new(const char *path, const ug_limits *limits)
{
    ug_page *p = ug_calloc(1, sizeof *p);
    if (!p)
        return NULL;
    p->path = ug_arena_strdup(&p->arena, path);
    p->dir = layout_dir_of(&p->arena, path);
    if (!p->path || !p->dir) {
        ug_page_free(p);
        return NULL;
    }
    layout_resolve_limits(&p->limits, limits);
    p->width = paper[1].w * paper[1].unit_px; /* A4 */
    p->height = paper[1].h * paper[1].unit_px;
    p->margin = 15 * 96.0 / 25.4;
    p->columns = 1;
    const double type[UG_PAGE_TYPE_COUNT] = RESOLVE_PAGE_TYPE_PX;
    memcpy(p->type, type, sizeof type);
    p->shrink = true;
    p->min_icon = RESOLVE_PAGE_MIN_ICON_PX;
    p->min_text = RESOLVE_PAGE_MIN_TEXT_PX;
    return p;
}

static ug_status fill_page(void *model, const layout_node *root, ug_error *err)
{
    ug_page *p = model;
    loader l;
    memset(&l, 0, sizeof l);
    l.arena = &p->arena;
    l.err = err;
    l.page = p;
    ug_status st = layout_refuse_foreign(root, page_keys, "page layout", err);
    if (!st)
        st = layout_walk_map(&l, p, root, page_keys);
    return st ? st : finish_page(p, root, err);
}

ug_status ug_page_load_string(const char *text, size_t len, const char *name,
                              const ug_limits *limits, ug_page **out, ug_error *err)
{
    ug_error_clear(err);
    *out = NULL;
    ug_page *p = page_new(name ? name : "<string>", limits);
    if (!p)
        return ug_fail(err, UG_ENOMEM, ug_mark_file(name), "out of memory");
    ug_status st = layout_from_text(p, fill_page, true, p->path, &p->limits, text, len, err);
    if (st) {
        ug_page_free(p);
        return st;
    }
    *out = p;
    return UG_OK;
}

ug_status ug_page_load(const char *path, const ug_limits *limits, ug_page **out,
                       ug_error *err)
{
    ug_error_clear(err);
    void *p = NULL;
    ug_status st = layout_load_path(path, limits, ug_mark_file(path), true, &p, err);
    *out = p;
    return st;
}

void ug_page_free(ug_page *page)
{
    if (!page)
        return;
    for (size_t i = 0; i < page->npanels; i++)
        ug_chart_free(page->panels[i].chart);
    ug_arena_free(&page->arena);
    ug_free(page);
}
