/*
** Audit stage: model + allocation -> findings about honesty (vanished
** categories, rounding, totals), privacy (small counts, derivable cells) and
** accessibility (contrast, confusable colours, too many categories, missing
** title/source/unit). The public side is in unitgram.h (ug_chart_audit).
**
** Layout extension (FORMAT.md §1 `audit:`): besides a number, `small-count`
** accepts the name of a published agency rule -- `cms`, `cdc-wonder` or
** `nhs-hes` (REFERENCES.md §7) -- which the loader checks with
** resolve_small_count_preset and keeps in chart->audit.small_count_preset.
*/
#ifndef UG_AUDIT_H
#define UG_AUDIT_H

#include "color.h"
#include "model.h"

/* The limit on categories is common practice, no source; the colour
** threshold is unitgram's own choice (see audit.c). The tolerance and the
** small-count threshold a chart starts with are resolve.h's. */
#define AUDIT_MAX_CATEGORIES 7
#define AUDIT_MIN_DELTA_E COLOR_MIN_DELTA_E

/* Whether name is a rule audit.ignore may name. */
bool audit_rule_known(const char *name);
/* The rules in the order findings are reported: name and source; NULL when
** i is out of range. */
size_t audit_rule_count(void);
const char *audit_rule_name(size_t i);
const char *audit_rule_source(size_t i);

#endif
