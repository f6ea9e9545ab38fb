/*
** The layout stage, second half: counts from a CSV file (FORMAT.md §1,
** "Counts from a CSV file") into the chart model. libcsv does the quoting
** (commas and line breaks inside quoted fields); this file finds the columns,
** matches groups and categories and reads every count exactly.
**
** Marks in CSV errors: the file is the CSV as resolved from the layout's
** folder, the line is the 1-based physical line where the record starts (a
** quoted field may run over several lines), and the column is the 1-based
** FIELD NUMBER, not a character position.
**
** Two shapes are read. Wide: one row per group, one count column per category
** (its `column:`, defaulting to its id). Long: one row per count, with a
** category column (matching a category's column, id or label) and a count
** column. A group column, when named, says which group a row belongs to.
*/
#include <csv.h>
#include <string.h>

#include "layout.h"

typedef struct {
    char **f;        /* fields, NUL-ended */
    size_t n;
    unsigned line;   /* physical line where the record starts */
} row;

typedef struct {
    ug_chart *c;
    ug_error *err;
    ug_status st;
    const char *file;
    ug_arena tmp;               /* every field; freed when the file is read */
    row *rows;
    size_t nrows, cap;
    char **cur;                 /* fields of the record being read */
    size_t ncur, capcur;
    unsigned line, rec_line;
    bool at_start;
} reader;

static ug_mark at(const reader *r, unsigned line, size_t field)
{
    ug_mark m = {r->file, line, (unsigned)field};
    return m;
}

static ug_status nomem(reader *r)
{
    return ug_fail(r->err, UG_ENOMEM, ug_mark_file(r->file), "out of memory");
}

static void on_field(void *s, size_t len, void *data)
{
    reader *r = data;
    if (r->st)
        return;
    const char *text = s ? s : "";
    ug_mark m = at(r, r->rec_line, r->ncur + 1);
    if (len > UG_MAX_STRING) {
        r->st = ug_fail(r->err, UG_ELIMIT, m, "a field longer than the limit of %d "
                        "bytes", UG_MAX_STRING);
        return;
    }
    /* line breaks are fine in a quoted field; group names are checked again */
    if ((r->st = layout_check_text(text, s ? len : 0, true, m, r->err)))
        return;
    if (r->ncur == r->capcur) {
        size_t cap = r->capcur ? 2 * r->capcur : 16;
        char **grown = ug_realloc(r->cur, cap * sizeof *grown);
        if (!grown) {
            r->st = nomem(r);
            return;
        }
        r->cur = grown;
        r->capcur = cap;
    }
    if (!(r->cur[r->ncur++] = ug_arena_strndup(&r->tmp, text, s ? len : 0)))
        r->st = nomem(r);
}

static void on_record(int c, void *data)
{
    reader *r = data;
    (void)c;
    r->at_start = true;
    if (r->st)
        return;
    if (r->nrows == r->cap) {
        size_t cap = r->cap ? 2 * r->cap : 64;
        row *grown = ug_realloc(r->rows, cap * sizeof *grown);
        if (!grown) {
            r->st = nomem(r);
            return;
        }
        r->rows = grown;
        r->cap = cap;
    }
    row *w = &r->rows[r->nrows];
    w->f = ug_arena_alloc(&r->tmp, (r->ncur ? r->ncur : 1) * sizeof *w->f);
    if (!w->f) {
        r->st = nomem(r);
        return;
    }
    memcpy(w->f, r->cur, r->ncur * sizeof *w->f);
    w->n = r->ncur;
    w->line = r->rec_line;
    r->nrows++;
    r->ncur = 0;
}

/* Semicolon when the header line holds more semicolons than commas outside
** quotes (a common export in locales with a decimal comma). */
static unsigned char detect_delim(const char *s, size_t n)
{
    size_t commas = 0, semis = 0;
    bool quoted = false;
    for (size_t i = 0; i < n && s[i] != '\n' && s[i] != '\r'; i++) {
        if (s[i] == '"')
            quoted = !quoted;
        else if (!quoted)
            commas += s[i] == ',', semis += s[i] == ';';
    }
    return semis > commas ? ';' : ',';
}

static void *csv_realloc(void *p, size_t n) { return ug_realloc(p, n); }

/* Feed one byte at a time so each record knows the physical line it starts
** on; libcsv reports neither lines nor offsets. */
static ug_status parse_csv(reader *r, const char *text, size_t len)
{
    struct csv_parser p;
    if (csv_init(&p, CSV_STRICT | CSV_APPEND_NULL | CSV_STRICT_FINI) != 0)
        return nomem(r);
    csv_set_realloc_func(&p, csv_realloc);
    csv_set_free_func(&p, ug_free);
    csv_set_delim(&p, detect_delim(text, len));
    r->line = 1;
    r->at_start = true;
    for (size_t i = 0; i < len && !r->st; i++) {
        if (r->at_start && text[i] != '\n' && text[i] != '\r') {
            r->rec_line = r->line;
            r->at_start = false;
        }
        if (csv_parse(&p, text + i, 1, on_field, on_record, r) != 1 && !r->st)
            r->st = csv_error(&p) == CSV_ENOMEM ? nomem(r) : ug_fail(r->err, UG_ESYNTAX, at(r, r->rec_line, r->ncur + 1),
                            "CSV syntax error: %s (line %u, field %zu)",
                            csv_strerror(csv_error(&p)), r->line, r->ncur + 1);
        r->line += text[i] == '\n';
    }
    if (!r->st && csv_fini(&p, on_field, on_record, r) != 0 && !r->st)
        r->st = ug_fail(r->err, UG_ESYNTAX, at(r, r->rec_line, r->ncur + 1),
                        "CSV syntax error: a quoted field is not closed");
    csv_free(&p);
    return r->st;
}

/* ---- columns ------------------------------------------------------------- */

/* Whether header field f names the column: as written, or (for a category
** whose column defaults to its id) when its slug is the id, so "Niños" and
** "niños" both find the category labelled Niños (id "ninos"). */
static bool names_column(const char *f, const char *name, bool by_slug)
{
    if (!strcmp(f, name))
        return true;
    char buf[256];
    return by_slug && strlen(f) < sizeof buf - 2 && ug_slug(f, buf, sizeof buf) &&
           !strcmp(buf, name);
}

/* The index of the header field `name`; blames `where` (in the layout). */
static ug_status find_column(reader *r, const char *name, bool by_slug, ug_mark where,
                             size_t *out)
{
    const row *h = &r->rows[0];
    size_t found = h->n;
    for (size_t i = 0; i < h->n; i++) {
        if (!names_column(h->f[i], name, by_slug))
            continue;
        if (found < h->n)
            return ug_fail(r->err, UG_EDATA, at(r, h->line, i + 1),
                           "column '%s' appears twice in the header", name);
        found = i;
    }
    if (found == h->n)
        return ug_fail(r->err, UG_EDATA, where, "%s has no column '%s'", r->file, name);
    *out = found;
    return UG_OK;
}

static ug_status check_widths(reader *r)
{
    for (size_t i = 1; i < r->nrows; i++)
        if (r->rows[i].n != r->rows[0].n)
            return ug_fail(r->err, UG_EDATA, at(r, r->rows[i].line, r->rows[i].n),
                           "this row has %zu field%s but the header has %zu",
                           r->rows[i].n, r->rows[i].n == 1 ? "" : "s", r->rows[0].n);
    if (r->nrows < 2)
        return ug_fail(r->err, UG_EDATA, at(r, r->rows[0].line, 1),
                       "the CSV has a header but no rows of counts");
    return UG_OK;
}

/* ---- groups -------------------------------------------------------------- */

static long group_index(const ug_text_list *groups, const char *name)
{
    for (size_t g = 0; g < groups->n; g++)
        if (!strcmp(groups->items[g].text, name))
            return (long)g;
    return -1;
}

/* The groups the CSV names, in file order, each once. */
static ug_status csv_groups(reader *r, size_t gi, ug_text_list *out)
{
    out->items = ug_arena_alloc(&r->tmp, r->nrows * sizeof *out->items);
    if (!out->items)
        return nomem(r);
    for (size_t i = 1; i < r->nrows; i++) {
        const char *name = r->rows[i].f[gi];
        ug_mark m = at(r, r->rows[i].line, gi + 1);
        ug_status st = layout_check_text(name, strlen(name), false, m, r->err);
        if (st)
            return st;
        if (group_index(out, name) >= 0)
            continue;
        if (out->n == UG_MAX_GROUPS)
            return ug_fail(r->err, UG_ELIMIT, at(r, r->rows[i].line, gi + 1),
                           "more than %d groups (the limit)", UG_MAX_GROUPS);
        out->items[out->n].text = name;
        out->items[out->n++].mark = m;
    }
    return UG_OK;
}

/* `rows:` keeps the last N groups, or the named ones, in file order; the
** rest of the file is no error (a history file gains a row a quarter). */
static ug_status select_rows(reader *r, ug_text_list *found)
{
    const ug_data_spec *d = &r->c->data;
    if (d->rows_last) {
        if ((size_t)d->rows_last > found->n)
            return ug_fail(r->err, UG_EDATA, d->rows_mark,
                           "'rows: last %ld' asks for more rows than %s holds (%zu)",
                           d->rows_last, r->file, found->n);
        size_t skip = found->n - (size_t)d->rows_last;
        memmove(found->items, found->items + skip, (size_t)d->rows_last * sizeof *found->items);
        found->n = (size_t)d->rows_last;
        return UG_OK;
    }
    if (!d->rows_names.n)
        return UG_OK;
    for (size_t k = 0; k < d->rows_names.n; k++)
        if (group_index(found, d->rows_names.items[k].text) < 0)
            return ug_fail(r->err, UG_EDATA, d->rows_names.items[k].mark,
                           "row '%s' is not in %s", d->rows_names.items[k].text, r->file);
    size_t kept = 0;
    for (size_t g = 0; g < found->n; g++)
        if (group_index(&d->rows_names, found->items[g].text) >= 0)
            found->items[kept++] = found->items[g];
    found->n = kept;
    return UG_OK;
}

/* With groups in the layout the CSV must name exactly those; without, the
** CSV's groups become the chart's (copied into the chart's arena). */
static ug_status match_groups(reader *r, const ug_text_list *found)
{
    ug_chart *c = r->c;
    if (!c->groups.n) {
        c->groups.items = ug_arena_alloc(&c->arena, found->n * sizeof *found->items);
        if (!c->groups.items)
            return nomem(r);
        for (size_t g = 0; g < found->n; g++) {
            c->groups.items[g].mark = found->items[g].mark;
            if (!(c->groups.items[g].text = ug_arena_strdup(&c->arena,
                                                            found->items[g].text)))
                return nomem(r);
        }
        c->groups.n = found->n;
        c->groups.mark = c->data.group_column.mark;
        return UG_OK;
    }
    for (size_t g = 0; g < found->n; g++)
        if (group_index(&c->groups, found->items[g].text) < 0)
            return ug_fail(r->err, UG_EDATA, found->items[g].mark,
                           "group '%s' is not one of the groups the layout lists",
                           found->items[g].text);
    for (size_t g = 0; g < c->groups.n; g++)
        if (group_index(found, c->groups.items[g].text) < 0)
            return ug_fail(r->err, UG_EDATA, c->groups.items[g].mark,
                           "group '%s' has no row in %s", c->groups.items[g].text,
                           r->file);
    return UG_OK;
}

/* ---- counts -------------------------------------------------------------- */

static ug_status alloc_counts(reader *r)
{
    ug_chart *c = r->c;
    size_t ng = chart_ngroups(c);
    for (size_t i = 0; i < c->ncats; i++) {
        c->cats[i].counts = ug_arena_alloc(&c->arena, ng * sizeof(ug_dec));
        c->cats[i].count_marks = ug_arena_alloc(&c->arena, ng * sizeof(ug_mark));
        if (!c->cats[i].counts || !c->cats[i].count_marks)
            return nomem(r);
        if (c->data.hidden_marks.n
            && !(c->cats[i].withheld = ug_arena_alloc(&c->arena, ng * sizeof(bool))))
            return nomem(r);
    }
    return UG_OK;
}

/* A cell the source withheld ("*", "<10", ...): compared after trimming
** spaces, since spreadsheets pad them. */
static bool is_hidden_mark(const ug_text_list *marks, const char *field)
{
    size_t n = strlen(field);
    while (n && field[n - 1] == ' ')
        n--;
    while (n && *field == ' ')
        field++, n--;
    for (size_t k = 0; k < marks->n; k++)
        if (strlen(marks->items[k].text) == n && !memcmp(marks->items[k].text, field, n))
            return true;
    return false;
}

/* Read one count cell into category i, group g, refusing a second one. */
/* A bad count is quoted back only when it looks like a try at a number
** ("12a", "1,200", "-3"): a field of other text may be from a file that is
** not the counts at all (a password list), and stays out of the message. */
static bool number_like(const char *f)
{
    size_t n = 0, digits = 0, other = 0;
    for (; f[n]; n++) {
        digits += f[n] >= '0' && f[n] <= '9';
        other += !strchr("0123456789.,+-eE% _'", f[n]);
    }
    return n <= 24 && digits > 0 && other <= 2;
}

static ug_status put_count(reader *r, size_t i, size_t g, const row *w, size_t field)
{
    ug_category *cat = &r->c->cats[i];
    ug_mark m = at(r, w->line, field + 1);
    if (cat->count_marks[g].line)
        return ug_fail(r->err, UG_EDATA, m,
                       "a second count for category '%s'%s%s%s (first on line %u)",
                       cat->id, r->c->groups.n ? " in group '" : "",
                       r->c->groups.n ? r->c->groups.items[g].text : "",
                       r->c->groups.n ? "'" : "", cat->count_marks[g].line);
    cat->count_marks[g] = m;
    if (is_hidden_mark(&r->c->data.hidden_marks, w->f[field])) {
        cat->withheld[g] = true;
        cat->counts[g] = (ug_dec){0};
        return UG_OK;
    }
    ug_dec_result res = ug_dec_parse(w->f[field], strlen(w->f[field]), &cat->counts[g]);
    if (res != UG_DEC_OK && number_like(w->f[field]))
        return ug_fail(r->err, UG_EDATA, m, "%s (found '%s')", ug_dec_result_text(res),
                       w->f[field]);
    if (res != UG_DEC_OK)
        return ug_fail(r->err, UG_EDATA, m, "%s (found %zu bytes of other text, not shown: "
                       "is this the counts file?)", ug_dec_result_text(res),
                       strlen(w->f[field]));
    return UG_OK;
}

/* The group row w counts for; SIZE_MAX for a row `rows:` left out. */
static size_t row_group(reader *r, const row *w, bool grouped, size_t gi)
{
    if (!grouped)
        return 0;
    long g = group_index(&r->c->groups, w->f[gi]);
    return g < 0 ? SIZE_MAX : (size_t)g;
}

static ug_status read_wide(reader *r, bool grouped, size_t gi)
{
    ug_chart *c = r->c;
    size_t *col = ug_calloc(c->ncats, sizeof *col);
    ug_status st = col ? UG_OK : nomem(r);
    for (size_t i = 0; !st && i < c->ncats; i++)
        st = find_column(r, c->cats[i].column.text, c->cats[i].column.text == c->cats[i].id,
                         c->cats[i].column.mark, &col[i]);
    if (!st && !grouped && r->nrows > 2)
        st = ug_fail(r->err, UG_EDATA, at(r, r->rows[2].line, 1),
                     "without 'group-column' the CSV holds one row of counts");
    for (size_t k = 1; !st && k < r->nrows; k++) {
        size_t g = row_group(r, &r->rows[k], grouped, gi);
        for (size_t i = 0; !st && g != SIZE_MAX && i < c->ncats; i++)
            st = put_count(r, i, g, &r->rows[k], col[i]);
    }
    ug_free(col);
    return st;
}

static long match_category(const ug_chart *c, const char *v)
{
    for (size_t i = 0; i < c->ncats; i++)
        if (!strcmp(c->cats[i].column.text, v) || !strcmp(c->cats[i].id, v) ||
            !strcmp(c->cats[i].label.text, v))
            return (long)i;
    return -1;
}

static ug_status check_complete(reader *r)
{
    const ug_chart *c = r->c;
    for (size_t i = 0; i < c->ncats; i++)
        for (size_t g = 0; g < chart_ngroups(c); g++)
            if (!c->cats[i].count_marks[g].line)
                return ug_fail(r->err, UG_EDATA, ug_mark_file(r->file),
                               "no count for category '%s'%s%s%s", c->cats[i].id,
                               c->groups.n ? " in group '" : "",
                               c->groups.n ? c->groups.items[g].text : "",
                               c->groups.n ? "'" : "");
    return UG_OK;
}

static ug_status read_long(reader *r, bool grouped, size_t gi)
{
    const ug_data_spec *d = &r->c->data;
    size_t ci, ni;
    ug_status st = find_column(r, d->category_column.text, false, d->category_column.mark, &ci);
    if (!st)
        st = find_column(r, d->count_column.text, false, d->count_column.mark, &ni);
    for (size_t k = 1; !st && k < r->nrows; k++) {
        const row *w = &r->rows[k];
        size_t g = row_group(r, w, grouped, gi);
        if (g == SIZE_MAX)
            continue;
        long i = match_category(r->c, w->f[ci]);
        if (i < 0)
            return ug_fail(r->err, UG_EDATA, at(r, w->line, ci + 1),
                           "category '%s' is not in the layout (it must match a "
                           "category's column, id or label)", w->f[ci]);
        st = put_count(r, (size_t)i, g, w, ni);
    }
    return st ? st : check_complete(r);
}

static ug_status read_table(reader *r)
{
    ug_chart *c = r->c;
    const ug_data_spec *d = &c->data;
    bool grouped = d->group_column.text != NULL;
    size_t gi = 0;
    ug_text_list found = {0};
    ug_status st = check_widths(r);
    if (!st && grouped)
        st = find_column(r, d->group_column.text, false, d->group_column.mark, &gi);
    if (!st && grouped)
        st = csv_groups(r, gi, &found);
    if (!st && grouped)
        st = select_rows(r, &found);
    if (!st && grouped)
        st = match_groups(r, &found);
    if (!st)
        st = alloc_counts(r);
    if (!st && d->category_column.text)
        return read_long(r, grouped, gi);
    if (!st)
        return read_wide(r, grouped, gi);
    return st;
}

/* The whole of the chart's CSV file parsed into r's rows; `from` is where
** the file was named, for a file that cannot be read. */
static ug_status read_csv_file(reader *r, const ug_chart *c, ug_mark from)
{
    r->file = c->data.file;
    char *text = NULL;
    size_t len;
    ug_status st = layout_read_file(r->file, c->limits.max_file_bytes, from, &text, &len,
                                    r->err);
    if (st)
        return st;
    size_t bom = len >= 3 && !memcmp(text, "\xEF\xBB\xBF", 3) ? 3 : 0;
    st = parse_csv(r, text + bom, len - bom);
    if (!st && r->nrows == 0)
        st = ug_fail(r->err, UG_EDATA, ug_mark_file(r->file), "the CSV file is empty");
    ug_free(text);
    return st;
}

static void reader_free(reader *r)
{
    ug_free(r->rows);
    ug_free(r->cur);
    ug_arena_free(&r->tmp);
}

ug_status data_load(ug_chart *c, ug_error *err)
{
    reader r;
    memset(&r, 0, sizeof r);
    r.c = c;
    r.err = err;
    ug_status st = read_csv_file(&r, c, c->data.file_text.mark);
    if (!st)
        st = read_table(&r);
    reader_free(&r);
    return st;
}

ug_status data_first_header(ug_chart *c, ug_error *err)
{
    reader r;
    memset(&r, 0, sizeof r);
    r.err = err;
    ug_mark whole = ug_mark_file(c->data.file);
    ug_status st = read_csv_file(&r, c, whole);
    const char *first = !st && r.rows[0].n ? r.rows[0].f[0] : "";
    if (!st && !(c->data.group_column.text = ug_arena_strdup(&c->arena, first)))
        st = ug_fail(err, UG_ENOMEM, whole, "out of memory");
    c->data.group_column.mark = whole;
    reader_free(&r);
    return st;
}
