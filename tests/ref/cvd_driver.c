/*
** Reference driver for tests/ref/cvd_check.py: reads colours on stdin and
** prints what src/color.c makes of them, so an outside library can check the
** numbers. Modes (one input item per line, one output line per item):
**   sim   "r g b" (0-255)  -> "pr pg pb dr dg db tr tg tb" (protanopia,
**                             deuteranopia, tritanopia; 0-255)
**   lab   "r g b"          -> "L a b" (CIELAB, D65)
**   de00  "L a b L a b"    -> CIEDE2000
*/
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "color.h"

static int sim(void)
{
    int r, g, b;
    while (scanf("%d %d %d", &r, &g, &b) == 3) {
        ug_color c = color_rgb(r, g, b);
        for (int v = COLOR_VISION_PROTANOPIA; v <= COLOR_VISION_TRITANOPIA; v++) {
            ug_color s = color_simulate(c, (color_vision)v);
            printf("%s%d %d %d", v == COLOR_VISION_PROTANOPIA ? "" : " ", s.r, s.g,
                   s.b);
        }
        printf("\n");
    }
    return 0;
}

static int lab(void)
{
    int r, g, b;
    while (scanf("%d %d %d", &r, &g, &b) == 3) {
        ug_color c = color_rgb(r, g, b);
        color_lab l;
        ug_error err = {0};
        if (color_to_lab(&c, 1, &l, &err))
            return 1;
        printf("%.6f %.6f %.6f\n", l.L, l.a, l.b);
    }
    return 0;
}

static int de00(void)
{
    color_lab x, y;
    while (scanf("%lf %lf %lf %lf %lf %lf", &x.L, &x.a, &x.b, &y.L, &y.a, &y.b) == 6)
        printf("%.8f\n", color_delta_e00(x, y));
    return 0;
}

int main(int argc, char **argv)
{
    if (argc == 2 && !strcmp(argv[1], "sim"))
        return sim();
    if (argc == 2 && !strcmp(argv[1], "lab"))
        return lab();
    if (argc == 2 && !strcmp(argv[1], "de00"))
        return de00();
    fprintf(stderr, "usage: cvd_driver sim|lab|de00 < input\n");
    return 2;
}
