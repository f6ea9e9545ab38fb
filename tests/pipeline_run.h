/*
** The whole pipeline on one layout text, for tests that only care whether it
** runs and how it fails: load, allocate, report, describe, pack, SVG, then
** whatever `more` does with the result. Everything made is freed; the first
** failing status is returned and err says why.
*/
#ifndef UG_TEST_PIPELINE_RUN_H
#define UG_TEST_PIPELINE_RUN_H

#include <string.h>

#include "ug.h"

/* Further stages run on a chart that drew; NULL for none. */
typedef ug_status (*pipeline_more)(const ug_chart *chart, const ug_allocation *a,
                                   const ug_scene *scene, const char *svg, size_t svg_len,
                                   const char *desc, ug_error *err);

static ug_status pipeline_run(const char *text, size_t len, const char *name,
                              const ug_limits *lim, pipeline_more more, ug_error *err)
{
    ug_chart *chart = NULL;
    ug_allocation *a = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL, *report = NULL, *desc = NULL;
    size_t svg_len = 0;
    memset(err, 0, sizeof *err);
    ug_status st = ug_chart_load_string(text, len, name, lim, &chart, err);
    if (!st)
        st = ug_chart_allocate(chart, &a, err);
    if (!st)
        st = ug_allocation_report(a, UG_REPORT_JSON, &report, NULL, err);
    if (!st)
        st = ug_chart_describe(chart, a, &desc, NULL, err);
    if (!st)
        st = ug_scene_pack(chart, a, &scene, err);
    if (!st)
        st = ug_scene_svg(scene, &svg, &svg_len, err);
    if (!st && more)
        st = more(chart, a, scene, svg, svg_len, desc, err);
    ug_free(svg);
    ug_free(desc);
    ug_free(report);
    ug_scene_free(scene);
    ug_allocation_free(a);
    ug_chart_free(chart);
    return st;
}

#endif
