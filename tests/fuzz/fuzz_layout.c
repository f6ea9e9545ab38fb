/*
** libFuzzer harness: the layout loader and the allocator on arbitrary bytes.
** Invariant: either a clean error with a message, or a chart whose allocation
** adds up (every group's icons sum to its N). And ug_layout_detect_string
** agrees with the loader: a text that loads as a chart is judged a chart.
*/
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void check_kind(const uint8_t *data, size_t size, const ug_limits *limits,
                       bool loaded)
{
    ug_error err = {0};
    ug_layout_kind kind = UG_LAYOUT_CHART;
    ug_status st = ug_layout_detect_string((const char *)data, size, "fuzz.yaml",
                                           limits, &kind, &err);
    if ((st && !err.msg[0]) || (loaded && (st || kind != UG_LAYOUT_CHART)))
        abort();
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_limits limits = {.max_icons = 20000};
    ug_status st = ug_chart_load_string((const char *)data, size, "fuzz.yaml", &limits,
                                        &chart, &err);
    check_kind(data, size, &limits, st == UG_OK);
    if (st) {
        if (!err.msg[0])
            abort(); /* a failure must say why */
        return 0;
    }
    ug_allocation *a = NULL;
    if (ug_chart_allocate(chart, &a, &err) == UG_OK) {
        for (size_t g = 0; g < a->ngroups; g++) {
            long sum = 0;
            for (size_t c = 0; c < a->ncats; c++)
                sum += alloc_at(a, g, c)->icons;
            if (!a->rule.partial && sum != a->group_icons[g])
                abort();
        }
        char *report = NULL;
        if (ug_allocation_report(a, UG_REPORT_JSON, &report, NULL, &err) == UG_OK)
            free(report);
    }
    ug_allocation_free(a);
    ug_chart_free(chart);
    return 0;
}
