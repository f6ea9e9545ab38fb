/*
** The limit: the cheapest program that writes N icon placements as SVG <use>
** lines with printf. unitgram's SVG time is reported as a ratio to this.
*/
#include <stdio.h>
#include <stdlib.h>

int main(int argc, char **argv)
{
    long n = argc > 1 ? atol(argv[1]) : 1000;
    long columns = 1000;
    printf("<svg xmlns=\"http://www.w3.org/2000/svg\">\n");
    printf("<symbol id=\"s0\" viewBox=\"0 0 100 100\"><rect width=\"100\" height=\"100\"/></symbol>\n");
    for (long i = 0; i < n; i++)
        printf("<use href=\"#s0\" x=\"%.2f\" y=\"%.2f\"/>\n", (double)(i % columns) * 28.0,
               (double)(i / columns) * 28.0);
    printf("</svg>\n");
    return 0;
}
