/*
** The whole pipeline on one layout text, for tests that only care whether it
** runs and how it fails: load, allocate, (report and describe,) pack, SVG.
** Everything made is freed; the first failing status is returned and err
** says why.
*/
#ifndef UG_TEST_PIPELINE_RUN_H
#define UG_TEST_PIPELINE_RUN_H

#include <string.h>

#include "ug.h"

static ug_status pipeline_run(const char *text, size_t len, const char *name,
                              const ug_limits *lim, bool texts, ug_error *err)
{
    ug_chart *chart = NULL;
    ug_allocation *a = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL, *report = NULL, *desc = NULL;
    memset(err, 0, sizeof *err);
    ug_status st = ug_chart_load_string(text, len, name, lim, &chart, err);
    if (!st)
        st = ug_chart_allocate(chart, &a, err);
    if (!st && texts)
        st = ug_allocation_report(a, UG_REPORT_JSON, &report, NULL, err);
    if (!st && texts)
        st = ug_chart_describe(chart, a, &desc, NULL, err);
    if (!st)
        st = ug_scene_pack(chart, a, &scene, err);
    if (!st)
        st = ug_scene_svg(scene, &svg, NULL, err);
    ug_free(svg);
    ug_free(desc);
    ug_free(report);
    ug_scene_free(scene);
    ug_allocation_free(a);
    ug_chart_free(chart);
    return st;
}

#endif
