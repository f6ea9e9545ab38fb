/*
** Batch stage internals (batch.c): the safe file-name part of a row name,
** shared with the tests.
*/
#ifndef UG_BATCH_H
#define UG_BATCH_H

#include "ug.h"

/* Write the slug of name (see ug_batch_slug) into buf (size >= 1); returns
** its length, 0 when nothing of the name is usable. At most size - 1 bytes. */
size_t batch_slug(const char *name, char *buf, size_t size);

#endif
