/*
** The message catalogs phrase.c reads (src/phrase_catalog.c); nothing else
** includes this but the test of their completeness (tests/check_phrase.c).
*/
#ifndef UG_PHRASE_INT_H
#define UG_PHRASE_INT_H

#include "phrase.h"

typedef struct {
    const char *lang;   /* ISO 639 language subtag */
    const char *script; /* ISO 15924 script it is written for; NULL: any */
    const char *text[PH_COUNT_OF_IDS]; /* NULL: the English message */
} phrase_catalog;

/* English first (the fallback), ended by a {NULL} entry. */
extern const phrase_catalog phrase_catalogs[];

#endif
