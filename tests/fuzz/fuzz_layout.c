/*
** libFuzzer harness: the layout loader and the allocator on arbitrary bytes.
** Invariant: either a clean error with a message, or a chart whose allocation
** adds up (every group's icons sum to its N).
*/
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_limits limits = {.max_icons = 20000};
    if (ug_chart_load_string((const char *)data, size, "fuzz.yaml", &limits, &chart, &err)) {
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
