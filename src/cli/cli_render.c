/*
** Drawing one layout, the one path `draw`, `draw --watch` and (for the bytes
** of each row) `draw --each-row` share: a chart is loaded, allocated, packed,
** audited as drawn and written; a page file becomes a one-page handout. The
** output is rendered in memory and written atomically, so a failure leaves
** any earlier picture as it was.
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"


static ug_output_format format_of(const cli_draw_opts *o)
{
    ug_output_format f = UG_OUT_SVG;
    ug_output_format_parse(cli_output_format(o->out, o->format), &f);
    return f;
}

ug_status cli_chart_bytes(const ug_chart *chart, const ug_allocation *alloc,
                          const cli_draw_opts *o, char *svg, size_t len, char **out,
                          size_t *out_len, ug_error *err)
{
    ug_output_format f = format_of(o);
    char *desc = NULL;
    ug_status st = UG_OK;
    if (f == UG_OUT_SVG) {
        *out = svg, *out_len = len;
        return UG_OK;
    }
    if (f == UG_OUT_CSV) {
        const ug_allocation *allocs[1] = {alloc};
        st = ug_table_csv(allocs, 1, out, out_len, err);
    } else if (f == UG_OUT_HTML) {
        const ug_allocation *allocs[1] = {alloc};
        if (!(st = ug_chart_describe(chart, alloc, &desc, NULL, err)))
            st = ug_html_page(NULL, svg, len, desc, allocs, 1, out, out_len, err);
    } else {
        st = ug_render_svg(svg, len, f, o->dpi > 0 ? o->dpi : 96,
                           o->scale > 0 ? o->scale : 1, out, out_len, err);
    }
    free(desc);
    return st;
}

static int draw_page(const cli_draw_opts *o, char ***inputs)
{
    ug_error err = {0};
    ug_page *page = NULL;
    char *bytes = NULL;
    size_t len = 0;
    int rc = EXIT_OK;
    ug_findings *f = NULL;
    ug_composed_page *cp = NULL;
    /* composed once: the drawing and its audit read the same panels */
    ug_pack_options popt = {.glyph_dirs = o->glyph_dirs, .nglyph_dirs = o->nglyph_dirs};
    if (ug_page_load(o->layout, cli_limits(), &page, &err) ||
        ug_page_compose(page, &popt, &cp, &err) ||
        ug_composed_page_draw(cp, format_of(o), o->dpi > 0 ? o->dpi : 96,
                              o->scale > 0 ? o->scale : 1, &bytes, &len, &err) ||
        ug_composed_page_audit(cp, &f, &err)) {
        cli_report_error(&err);
        rc = cli_exit_for(&err);
    } else if ((rc = cli_print_findings(f, o->strict)) != EXIT_OK) {
        /* the audit stopped the drawing: nothing is written */
    } else if (ug_write_file_atomic(o->out, bytes, len, &err)) {
        cli_report_error(&err);
        rc = EXIT_OUTPUT;
    }
    if (inputs && page)
        *inputs = ug_page_inputs(page);
    free(bytes); /* the findings went with cli_print_findings */
    ug_composed_page_free(cp);
    ug_page_free(page);
    return rc;
}

static int draw_chart(const cli_draw_opts *o, char ***inputs)
{
    struct {
        ug_chart *chart;
        ug_allocation *alloc;
    } l;
    int rc = cli_load_allocated(o->layout, &l.chart, &l.alloc);
    if (rc)
        return rc;
    ug_error err = {0};
    ug_pack_options popt = {.glyph_dirs = o->glyph_dirs, .nglyph_dirs = o->nglyph_dirs};
    ug_scene *scene = NULL;
    char *svg = NULL, *bytes = NULL;
    size_t len = 0;
    if (ug_scene_pack_with(l.chart, l.alloc, &popt, &scene, &err) ||
        ug_scene_svg(scene, &svg, &len, &err) ||
        cli_chart_bytes(l.chart, l.alloc, o, svg, len, &bytes, &len, &err)) {
        cli_report_error(&err);
        rc = EXIT_INPUT;
    } else if (cli_glyph_warnings(scene, l.chart),
               (rc = cli_print_audit_drawn(l.chart, l.alloc, scene, o->strict)) == EXIT_OK) {
        if (ug_write_file_atomic(o->out, bytes, len, &err)) {
            cli_report_error(&err);
            rc = EXIT_OUTPUT;
        }
    }
    if (inputs)
        *inputs = ug_chart_inputs(l.chart, scene);
    if (bytes != svg)
        free(svg);
    free(bytes);
    ug_scene_free(scene);
    ug_allocation_free(l.alloc);
    ug_chart_free(l.chart);
    return rc;
}

int cli_draw_layout(const cli_draw_opts *o, char ***inputs)
{
    if (inputs)
        *inputs = NULL;
    return cli_is_page_file(o->layout) ? draw_page(o, inputs) : draw_chart(o, inputs);
}

