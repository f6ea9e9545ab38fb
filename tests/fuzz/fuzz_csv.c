/*
** libFuzzer harness: the CSV reader. The fuzz input becomes the CSV file of a
** fixed layout (long and wide tables alternate on the first byte), since the
** reader is reached through the layout's data: key like a user reaches it.
*/
#define _POSIX_C_SOURCE 200809L
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "unitgram.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static const char wide[] =
    "title: t\nsource: s\nunit-label: u\nform: rows\nicon-value: 1\n"
    "data: {file: fuzz.csv, group-column: g}\n"
    "categories:\n  - {label: A, column: a}\n  - {label: B, column: b}\n";
static const char long_form[] =
    "title: t\nsource: s\nunit-label: u\nform: rows\nicon-value: 1\n"
    "data: {file: fuzz.csv, category-column: c, count-column: n}\n"
    "categories:\n  - {label: A, column: a}\n  - {label: B, column: b}\n";

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static char dir[64];
    if (!dir[0]) {
        snprintf(dir, sizeof dir, "/tmp/ugfuzzcsvXXXXXX");
        if (!mkdtemp(dir))
            abort();
    }
    char csv[96], yaml[96];
    snprintf(csv, sizeof csv, "%s/fuzz.csv", dir);
    snprintf(yaml, sizeof yaml, "%s/fuzz.yaml", dir);
    FILE *f = fopen(csv, "wb");
    if (!f)
        abort();
    fwrite(data, 1, size, f);
    fclose(f);
    const char *layout = size && (data[0] & 1) ? long_form : wide;
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_limits limits = {.max_icons = 20000};
    ug_status st = ug_chart_load_string(layout, strlen(layout), yaml, &limits, &chart, &err);
    if (st && !err.msg[0])
        abort();
    ug_chart_free(chart);
    return 0;
}
