/*
** A program that uses the installed library and nothing else: it includes
** <unitgram.h>, is built with `pkg-config --cflags --libs unitgram`, loads a
** layout and writes its SVG. tests/suite_install.sh builds and runs it
** against a temporary installation.
*/
#include <stdio.h>
#include <stdlib.h>

#include <unitgram.h>

int main(int argc, char **argv)
{
    if (argc != 3) {
        fprintf(stderr, "usage: %s LAYOUT OUT.svg\n", argv[0]);
        return 2;
    }
    ug_error err = {0};
    ug_chart *chart = NULL;
    ug_allocation *alloc = NULL;
    ug_scene *scene = NULL;
    char *svg = NULL, msg[2048];
    size_t len = 0;
    int rc = 0;
    if (ug_chart_load(argv[1], NULL, &chart, &err) ||
        ug_chart_allocate(chart, &alloc, &err) ||
        ug_scene_pack(chart, alloc, &scene, &err) ||
        ug_scene_svg(scene, &svg, &len, &err) ||
        ug_write_file_atomic(argv[2], svg, len, &err)) {
        fprintf(stderr, "%s\n", ug_error_format(&err, msg, sizeof msg));
        rc = 1;
    } else {
        printf("%s: %.0f x %.0f px\n", argv[2], ug_scene_width(scene),
               ug_scene_height(scene));
    }
    free(svg);
    ug_scene_free(scene);
    ug_allocation_free(alloc);
    ug_chart_free(chart);
    return rc;
}
