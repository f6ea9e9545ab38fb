/* The runner every Check test program ends with: bind a context whose glyph
** roots are the project's glyphs/ (test programs run from tests/), run the
** suite, exit 0 when every test passed. */
#ifndef UG_CHECK_RUN_H
#define UG_CHECK_RUN_H

#include <check.h>
#include <stdio.h>
#include <stdlib.h>

#include "unitgram.h"

/* The context a test thread draws with: glyphs from ../glyphs. */
static inline ug_context *check_context(void)
{
    const char *roots[] = {"../glyphs"};
    ug_context_options o = {.size = sizeof o, .glyph_roots = roots, .nglyph_roots = 1};
    ug_context *ctx = NULL;
    ug_error err;
    if (ug_context_new(&o, &ctx, &err) != UG_OK) {
        fprintf(stderr, "cannot make a context: %s\n", err.msg);
        exit(EXIT_FAILURE);
    }
    return ctx;
}

static inline int check_run(Suite *s)
{
    ug_context_use(check_context());
    SRunner *r = srunner_create(s);
    srunner_run_all(r, CK_NORMAL);
    int failed = srunner_ntests_failed(r);
    srunner_free(r);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}

#endif
