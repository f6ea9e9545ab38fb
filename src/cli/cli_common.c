/*
** Helpers every command shares: diagnostics in the file:line:col form, exit
** codes, option reading, and loading a chart from a file or standard input.
*/
#define _XOPEN_SOURCE 700 /* sigaltstack, SA_ONSTACK, SIGTRAP: XSI (POSIX.1-2017) */
#include <stdarg.h>
#include <errno.h>
#include <math.h>
#include <signal.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "cli.h"

bool cli_color(void)
{
    const char *no = getenv("NO_COLOR"); /* https://no-color.org: any non-empty value */
    return !(no && *no) && isatty(STDERR_FILENO);
}

static const char *severity_color(const char *severity)
{
    if (!strcmp(severity, "error"))
        return "\033[1;31m";
    if (!strcmp(severity, "warning"))
        return "\033[1;35m";
    return "\033[1;36m";
}

void cli_put_visible(const char *s, FILE *to)
{
    char small[1024];
    size_t n = ug_text_visible(s, small, sizeof small);
    char *big = n < sizeof small ? NULL : malloc(n + 1);
    if (big)
        ug_text_visible(s, big, n + 1);
    fputs(big ? big : small, to); /* out of memory: the part that fits */
    free(big);
}

/* The file name and the message may both carry text from the layout (a
** label, a CSV field, a path), shown escaped so that it cannot drive the
** terminal or reorder the line. */
void cli_diag(const char *severity, const ug_error *err)
{
    bool color = cli_color();
    char at[32] = "";
    fputs(color ? "\033[1m" : "", stderr);
    cli_put_visible(err->where.file ? err->where.file : "unitgram", stderr);
    if (err->where.line)
        snprintf(at, sizeof at, ":%u:%u", err->where.line, err->where.column);
    fprintf(stderr, "%s:%s %s%s:%s ", at, color ? "\033[0m" : "",
            color ? severity_color(severity) : "", severity, color ? "\033[0m" : "");
    cli_put_visible(err->msg, stderr);
    fputc('\n', stderr);
}

void cli_report_error(const ug_error *err) { cli_diag("error", err); }

int cli_exit_for(const ug_error *err)
{
    (void)err; /* reading failed: the input is at fault; writers use EXIT_OUTPUT */
    return EXIT_INPUT;
}

/* The arguments it quotes come from the command line, which may hold a
** file name with any bytes in it: shown as cli_diag shows text. */
int cli_usage(const char *cmd, const char *fmt, ...)
{
    char msg[1024];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    fprintf(stderr, "unitgram %s: ", cmd);
    cli_put_visible(msg, stderr);
    fprintf(stderr, "\n(see 'unitgram %s --help')\n", cmd);
    return EXIT_USAGE;
}

bool cli_is_help(const char *arg) { return !strcmp(arg, "-h") || !strcmp(arg, "--help"); }

int cli_option(const char *cmd, int argc, char **argv, int *i, const char *lng,
               const char *shrt, const char **val)
{
    const char *a = argv[*i];
    size_t n = strlen(lng);
    bool is_long = !strncmp(a, lng, n) && (a[n] == '\0' || (val && a[n] == '='));
    bool is_short = shrt && !strcmp(a, shrt);
    if (!is_long && !is_short)
        return 0;
    if (!val)
        return 1;
    if (is_long && a[n] == '=') {
        *val = a + n + 1;
        return 1;
    }
    if (*i + 1 >= argc) {
        cli_usage(cmd, "%s needs a value", a);
        return -1;
    }
    *val = argv[++*i];
    return 1;
}

/* Digits, at most one point, an optional exponent: the only text handed to
** strtod, which would also take hex, "nan", "inf" and leading blanks. */
static bool decimal_text(const char *s, bool whole)
{
    static const char digits[] = "0123456789";
    const char *p = s + strspn(s, digits);
    bool mantissa = p > s;
    if (!whole && *p == '.') {
        const char *q = p + 1 + strspn(p + 1, digits);
        mantissa = mantissa || q > p + 1;
        p = q;
    }
    if (!whole && mantissa && (*p == 'e' || *p == 'E')) {
        p += 1 + (p[1] == '+' || p[1] == '-');
        size_t n = strspn(p, digits);
        if (!n)
            return false;
        p += n;
    }
    return mantissa && *p == '\0';
}

int cli_number_option(const char *cmd, int argc, char **argv, int *i,
                      const char *lng, double lo, double hi, bool whole,
                      double *out)
{
    const char *v = NULL;
    int m = cli_option(cmd, argc, argv, i, lng, NULL, &v);
    if (m <= 0)
        return m;
    double x = decimal_text(v, whole) ? strtod(v, NULL) : NAN;
    if (isfinite(x) && x >= lo && x <= hi) {
        *out = x;
        return 1;
    }
    cli_usage(cmd, "%s expects %s from %.15g to %.15g (found '%s')", lng,
              whole ? "a whole number" : "a number", lo, hi, v);
    return -1;
}

/* ---- the library's context: where the glyphs are ---- */

#ifndef UG_DATADIR
#define UG_DATADIR "/usr/local/share/unitgram/glyphs"
#endif

/* The glyphs/ folder of the source tree this binary was built in (build/unitgram
** -> ../glyphs, up to three folders up), so a build runs before it is
** installed; "" when there is none. Found once, before any thread starts. */
static char project_glyphs[4096];

static void find_project_glyphs(void)
{
    char exe[3000];
    ssize_t n = readlink("/proc/self/exe", exe, sizeof exe - 1);
    struct stat sb;
    for (int up = 0; n > 0 && up < 3; up++) {
        exe[n] = '\0';
        char *slash = strrchr(exe, '/');
        if (!slash)
            return;
        *slash = '\0';
        n = slash - exe;
        snprintf(project_glyphs, sizeof project_glyphs, "%s/../glyphs", exe);
        if (stat(project_glyphs, &sb) == 0 && S_ISDIR(sb.st_mode))
            return;
    }
    project_glyphs[0] = '\0';
}

ug_context *cli_new_context(void)
{
    const char *roots[] = {project_glyphs, UG_DATADIR};
    bool in_tree = project_glyphs[0] != '\0';
    ug_context_options o = {.size = sizeof o, .glyph_roots = roots + !in_tree,
                            .nglyph_roots = 1 + in_tree};
    ug_context *ctx = NULL;
    ug_error err;
    return ug_context_new(&o, &ctx, &err) == UG_OK ? ctx : NULL;
}

ug_context *cli_bind_context(void)
{
    find_project_glyphs();
    ug_context *ctx = cli_new_context();
    if (ctx)
        ug_context_use(ctx);
    else
        fputs("unitgram: out of memory\n", stderr);
    return ctx;
}

/* Set by --max-icons, --max-input-bytes and --max-panels; zeros are the
** library's defaults. */
static ug_limits limits;

/* A whole number from 1 to max with nothing after it. */
static bool parse_count(const char *s, size_t max, size_t *out)
{
    if (!s || *s < '0' || *s > '9')
        return false;
    char *end;
    errno = 0;
    unsigned long long v = strtoull(s, &end, 10);
    if (errno || *end || v == 0 || v > max)
        return false;
    *out = (size_t)v;
    return true;
}

int cli_limit_option(const char *cmd, int argc, char **argv, int *i)
{
    const struct {
        const char *name;
        size_t *value, max;
    } caps[] = {
        {"--max-icons", &limits.max_icons, UG_CEILING_ICONS},
        {"--max-input-bytes", &limits.max_file_bytes, SIZE_MAX},
        {"--max-panels", &limits.max_panels, UG_CEILING_PANELS},
    };
    for (size_t k = 0; k < sizeof caps / sizeof caps[0]; k++) {
        const char *v = NULL;
        int m = cli_option(cmd, argc, argv, i, caps[k].name, NULL, &v);
        if (m < 0)
            return -1;
        if (m == 0)
            continue;
        if (parse_count(v, caps[k].max, caps[k].value))
            return 1;
        if (caps[k].max == SIZE_MAX)
            cli_usage(cmd, "%s expects a whole number of at least 1 (found '%s')",
                      caps[k].name, v);
        else
            cli_usage(cmd, "%s expects a whole number from 1 to %zu (found '%s')",
                      caps[k].name, caps[k].max, v);
        return -1;
    }
    return 0;
}

const ug_limits *cli_limits(void)
{
    return &limits;
}

/* ---- option tables ---- */

const cli_opt *cli_find_option(const cli_command *c, const char *name)
{
    for (const cli_opt *o = c->opts; o->name; o++)
        if (!strcmp(o->name, name))
            return o;
    return NULL;
}

/* The value of option o at argv[*i], stored into the command's struct. */
static int take_option(const cli_command *c, const cli_opt *o, char *base, int argc,
                       char **argv, int *i)
{
    const char *v = NULL;
    double x = 0;
    int m;
    switch (o->kind) {
    case CLI_FLAG:
        return cli_option(c->name, argc, argv, i, o->name, o->shrt, NULL)
                   ? (*(bool *)(base + o->off) = true, 1) : 0;
    case CLI_TEXT:
        return cli_option(c->name, argc, argv, i, o->name, o->shrt,
                          (const char **)(void *)(base + o->off));
    case CLI_TEXTS:
        if ((m = cli_option(c->name, argc, argv, i, o->name, o->shrt, &v)) <= 0)
            return m;
        size_t *n = (size_t *)(void *)(base + o->count_off);
        if ((double)*n >= o->hi) {
            cli_usage(c->name, "at most %.0f %s", o->hi, o->name);
            return -1;
        }
        ((const char **)(void *)(base + o->off))[(*n)++] = v;
        return 1;
    case CLI_NUMBER:
        return cli_number_option(c->name, argc, argv, i, o->name, o->lo, o->hi, false,
                                 (double *)(void *)(base + o->off));
    case CLI_WHOLE:
        if ((m = cli_number_option(c->name, argc, argv, i, o->name, o->lo, o->hi, true,
                                   &x)) > 0)
            *(long *)(void *)(base + o->off) = (long)x;
        return m;
    case CLI_LIMITS:
        return cli_limit_option(c->name, argc, argv, i);
    }
    return 0;
}

int cli_parse(const cli_command *c, void *opts, int argc, char **argv, const char **args,
              size_t *nargs)
{
    *nargs = 0;
    for (int i = 1; i < argc; i++) {
        if (cli_is_help(argv[i])) {
            cli_help(c, stdout);
            return -1;
        }
        int m = 0;
        for (const cli_opt *o = c->opts; o->name && !m; o++)
            m = take_option(c, o, opts, argc, argv, &i);
        if (m < 0)
            return EXIT_USAGE;
        if (m)
            continue;
        const char *a = argv[i];
        if (a[0] == '-' && a[1])
            return cli_usage(c->name, "unknown option '%s'", a);
        if (*nargs == c->max_args)
            return c->max_args ? cli_usage(c->name, "one layout at a time (found '%s' too)", a)
                               : cli_usage(c->name, "unexpected argument '%s'", a);
        args[(*nargs)++] = a;
    }
    return 0;
}

/* "  -o, --output FILE     where to write" and its further lines at column 25. */
static void help_option(const cli_opt *o, FILE *to)
{
    if (o->kind == CLI_LIMITS) {
        fputs(CLI_LIMITS_HELP, to);
        return;
    }
    char left[64];
    snprintf(left, sizeof left, "%s%s%s%s%s", o->shrt ? o->shrt : "", o->shrt ? ", " : "",
             o->name, o->arg ? " " : "", o->arg ? o->arg : "");
    fprintf(to, "  %-22s", left);
    if (strlen(left) >= 22)
        fprintf(to, "\n%24s", "");
    for (const char *h = o->help; *h;) {
        size_t n = strcspn(h, "\n");
        fprintf(to, "%.*s\n", (int)n, h);
        h += n;
        if (*h == '\n' && *++h)
            fprintf(to, "%24s", "");
    }
}

void cli_help(const cli_command *c, FILE *to)
{
    fputs(c->about, to);
    fputs("\noptions:\n", to);
    for (const cli_opt *o = c->opts; o->name; o++)
        help_option(o, to);
    fputs("  -h, --help            show this help\n\n" CLI_EXIT_CODES, to);
}

/* Standard input, whole, into a malloc'd buffer. Reads at most one byte past
** the input limit: the loader then refuses the text as too large, and an
** endless stream costs no more than the limit. */
static char *read_stdin(size_t *len)
{
    size_t max = limits.max_file_bytes ? limits.max_file_bytes
                                       : (4u << 20); /* the library's default */
    size_t cap = 1 << 16, n = 0;
    char *buf = malloc(cap);
    for (size_t got; buf && n <= max && (got = fread(buf + n, 1, cap - n, stdin)) > 0;) {
        n += got;
        if (n == cap) {
            char *grown = cap < ((size_t)1 << 30) ? realloc(buf, cap *= 2) : NULL;
            if (!grown)
                free(buf);
            buf = grown;
        }
    }
    *len = n;
    return buf;
}

/* Standard input is read once, by the chart loader, so it is always a
** chart. A file that cannot be read or parsed counts as a chart too: loading
** it then reports why, in the same words. */
bool cli_is_page_file(const char *path)
{
    ug_layout_kind kind = UG_LAYOUT_CHART;
    ug_error err = {0};
    if (strcmp(path, "-"))
        ug_layout_detect(path, &limits, &kind, &err);
    return kind == UG_LAYOUT_PAGE;
}

int cli_load_chart(const char *path, ug_chart **out)
{
    ug_error err = {0};
    ug_status st;
    if (strcmp(path, "-") == 0) {
        size_t len = 0;
        char *text = read_stdin(&len);
        if (!text) {
            fprintf(stderr, "<stdin>: error: could not read standard input\n");
            return EXIT_INPUT;
        }
        st = ug_chart_load_string(text, len, "<stdin>", &limits, out, &err);
        free(text);
    } else {
        st = ug_chart_load(path, &limits, out, &err);
    }
    if (st) {
        cli_report_error(&err);
        return cli_exit_for(&err);
    }
    return EXIT_OK;
}

int cli_load_allocated(const char *path, ug_chart **chart, ug_allocation **alloc)
{
    *alloc = NULL;
    int rc = cli_load_chart(path, chart);
    if (rc)
        return rc;
    ug_error err = {0};
    if (ug_chart_allocate(*chart, alloc, &err)) {
        cli_report_error(&err);
        ug_chart_free(*chart);
        *chart = NULL;
        return cli_exit_for(&err);
    }
    return EXIT_OK;
}

static void print_finding(const ug_finding *f)
{
    ug_error diag = {0};
    diag.where = f->where;
    snprintf(diag.msg, sizeof diag.msg, "%s [%s]", f->message, f->rule);
    cli_diag(ug_severity_name(f->severity), &diag);
    if (f->fix) {
        snprintf(diag.msg, sizeof diag.msg, "fix: %s", f->fix);
        cli_diag("note", &diag);
    }
}

/* The findings of an audit that ran (st), or its error. */
static int audit_result(ug_status st, ug_findings *f, const ug_error *err, bool strict)
{
    if (st) {
        cli_report_error(err);
        return cli_exit_for(err);
    }
    return cli_print_findings(f, strict);
}

int cli_print_audit(const ug_chart *chart, const ug_pack_options *opt, bool strict)
{
    ug_error err = {0};
    ug_findings *f = NULL;
    ug_status st = ug_chart_audit_with(chart, opt, &f, &err);
    return audit_result(st, f, &err, strict);
}

int cli_print_audit_drawn(const ug_chart *chart, const ug_allocation *alloc,
                          const ug_scene *scene, bool strict)
{
    ug_error err = {0};
    ug_findings *f = NULL;
    ug_status st = ug_chart_audit_drawn(chart, alloc, scene, &f, &err);
    return audit_result(st, f, &err, strict);
}

int cli_print_findings(ug_findings *f, bool strict)
{
    for (size_t i = 0; i < ug_findings_count(f); i++)
        print_finding(ug_findings_at(f, i));
    bool failed = strict && ug_findings_count_severity(f, UG_SEVERITY_WARNING) > 0;
    ug_findings_free(f);
    return failed ? EXIT_AUDIT : EXIT_OK;
}

void cli_glyph_warnings(const ug_scene *scene, const ug_chart *chart)
{
    ug_error err = {0}, *w = NULL;
    size_t n = 0;
    if (ug_scene_glyph_warnings(scene, chart, &w, &n, &err)) {
        cli_report_error(&err);
        return;
    }
    for (size_t i = 0; i < n; i++)
        cli_diag("warning", &w[i]);
    free(w);
}

static const char *extension(const char *path)
{
    const char *slash = strrchr(path, '/');
    const char *dot = strrchr(slash ? slash : path, '.');
    return dot ? dot + 1 : "";
}

const char *cli_output_format(const char *out, const char *given)
{
    static const char *const known[] = {"svg", "png", "pdf", "html", "csv", NULL};
    const char *want = given ? given : strcmp(out, "-") ? extension(out) : "svg";
    for (size_t i = 0; known[i]; i++)
        if (!strcasecmp(want, known[i]))
            return known[i];
    if (given)
        cli_usage("draw", "unknown --format '%s' (svg, png, pdf, html or csv)", given);
    else
        cli_usage("draw", "cannot tell the format of '%s' from its extension: "
                          "name it .svg, .png, .pdf, .html or .csv, or give --format", out);
    return NULL;
}

double cli_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec / 1e9;
}

/* ---- stopping ----------------------------------------------------------------- */

/* Ctrl-C, TERM or HUP in the middle of a write (a batch, --watch) would leave
** the write's temporary file beside the output; so would a crash anywhere,
** pango's font threads included (out of memory inside fontconfig ends in
** SIGSEGV, GLib's g_error in SIGTRAP, g_malloc's in SIGABRT). The handler
** removes the temporaries and then dies of the same signal, so the caller
** still sees how it ended: only async-signal-safe calls (POSIX.1-2017 XSH
** 2.4.3), and for a fault the default action then runs at the faulting
** instruction again or at the re-raised signal on return. */
static const int stop_signals[] = {SIGINT, SIGTERM, SIGHUP};
/* SIGTRAP: GLib's g_error breaks into a debugger (G_BREAKPOINT) rather than
** abort() on Unix (GLib documentation, g_error). */
static const int fatal_signals[] = {SIGSEGV, SIGBUS, SIGABRT, SIGFPE, SIGILL, SIGTRAP,
                                    SIGSYS};
#define CAUGHT_MAX 10 /* both lists */

/* What each caught signal did before: the default action, except under a
** sanitizer, whose report then still follows our clean-up. */
static struct {
    int sig;
    struct sigaction action;
} before[CAUGHT_MAX];
static size_t ncaught;

static void stop_on_signal(int sig)
{
    ug_remove_partial_outputs();
    for (size_t i = 0; i < ncaught; i++)
        if (before[i].sig == sig)
            sigaction(sig, &before[i].action, NULL);
    raise(sig);
}

/* A stack overflow leaves no stack for a handler: it runs on its own
** (sigaltstack, POSIX.1-2017). Static, because under the memory shortage
** this is for, a malloc'd one might not be there. 64 KiB: unlinkat and
** raise need a few hundred bytes (common practice, no source). */
static void use_alternate_stack(void)
{
    static char stack[1 << 16];
    stack_t ss;
    memset(&ss, 0, sizeof ss);
    ss.ss_sp = stack;
    ss.ss_size = sizeof stack;
    sigaltstack(&ss, NULL);
}

static void catch_signal(int sig, int flags)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = stop_on_signal;
    sa.sa_flags = flags;
    sigemptyset(&sa.sa_mask);
    for (size_t k = 0; k < sizeof stop_signals / sizeof stop_signals[0]; k++)
        sigaddset(&sa.sa_mask, stop_signals[k]);
    /* A signal ignored by our parent (nohup) stays ignored. */
    struct sigaction old;
    if (ncaught == CAUGHT_MAX || sigaction(sig, NULL, &old) != 0 ||
        old.sa_handler == SIG_IGN)
        return;
    before[ncaught].sig = sig;
    before[ncaught++].action = old;
    sigaction(sig, &sa, NULL);
}

void cli_clean_up_on_signals(void)
{
    if (ncaught)
        return; /* once: a second time would record our own handler as "before" */
    use_alternate_stack();
    for (size_t i = 0; i < sizeof stop_signals / sizeof stop_signals[0]; i++)
        catch_signal(stop_signals[i], 0);
    for (size_t i = 0; i < sizeof fatal_signals / sizeof fatal_signals[0]; i++)
        catch_signal(fatal_signals[i], SA_ONSTACK);
    /* Over the file-size limit (ulimit -f) write(2) then fails with EFBIG,
    ** an output error like a full disk, instead of killing the process
    ** mid-write (POSIX.1-2017 XSH write(), setrlimit() RLIMIT_FSIZE). */
    signal(SIGXFSZ, SIG_IGN);
}
