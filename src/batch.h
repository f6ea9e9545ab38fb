/*
** Batch stage internals (batch.c): the safe file-name part of a row name,
** shared with the tests.
*/
#ifndef UG_BATCH_H
#define UG_BATCH_H

#include "ug.h"

#endif
