/* The runner every Check test program ends with: run the suite, exit 0 when
** every test passed. */
#ifndef UG_CHECK_RUN_H
#define UG_CHECK_RUN_H

#include <check.h>
#include <stdlib.h>

static inline int check_run(Suite *s)
{
    SRunner *r = srunner_create(s);
    srunner_run_all(r, CK_NORMAL);
    int failed = srunner_ntests_failed(r);
    srunner_free(r);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}

#endif
