/*
** Glyph geometry (see glyph_shape.h).
**
** Sources for the grammar and the geometry:
**   - path data: SVG 1.1 §8.3 (commands, implicit repeats after a command's
**     first argument group, M followed by pairs meaning L) and its BNF in
**     §8.3.9, which SVG 2 "Paths" §9.3.9 keeps (arc flags are one character,
**     so "a1 1 0 00 1 1" needs no separator between them);
**   - basic shapes: SVG 1.1 §9 (rect §9.2 with the rx/ry rules, circle §9.3,
**     ellipse §9.4, polygon §9.7); a radius left out takes the other one
**     (SVG 2 §10.4, rx/ry "auto"), a zero or negative size draws nothing;
**   - transforms: SVG 1.1 §7.6 (matrix, translate, scale, rotate with an
**     optional centre, skewX, skewY); functions may follow each other without
**     a separator, as CSS Transforms 1 §7.1 allows;
**   - arcs: the endpoint-to-centre conversion of SVG 1.1 Appendix F.6.5, the
**     out-of-range radii rules of F.6.6, then one cubic per quarter turn or
**     less (the control distance 4/3 tan(dθ/4) of the circle's tangent).
** Everything is stored transformed: an affine map of a Bézier is the Bézier
** of the mapped control points, so bounds taken here are exact for what the
** shape holds.
*/
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "glyph_shape.h"

#define UG_PI 3.14159265358979323846

enum { OP_MOVE, OP_LINE, OP_CUBIC, OP_CLOSE };

typedef struct {
    double a, b, c, d, e, f; /* x' = a x + c y + e, y' = b x + d y + f */
} affine;

typedef struct {
    size_t op0, op1; /* its ops: [op0, op1) */
    size_t pt0;      /* index of its first point */
    bool evenodd;
} element;

struct glyph_shape {
    unsigned char *ops;
    size_t nops, capops;
    double *xy; /* points, x then y */
    size_t npts, cappts;
    element *els;
    size_t nels, capels;
    size_t segments;
};

static const affine identity = {1, 0, 0, 1, 0, 0};

static affine compose(affine m, affine n) /* m after n */
{
    return (affine){m.a * n.a + m.c * n.b, m.b * n.a + m.d * n.b,
                    m.a * n.c + m.c * n.d, m.b * n.c + m.d * n.d,
                    m.a * n.e + m.c * n.f + m.e, m.b * n.e + m.d * n.f + m.f};
}

/* ---- storage ---------------------------------------------------------------- */

static bool grow(void **p, size_t *cap, size_t need, size_t size)
{
    if (need <= *cap)
        return true;
    size_t n = *cap ? *cap : 16;
    while (n < need)
        n *= 2;
    void *q = ug_realloc(*p, n * size);
    if (!q)
        return false;
    *p = q;
    *cap = n;
    return true;
}

void glyph_shape_free(glyph_shape *s)
{
    if (!s)
        return;
    ug_free(s->ops);
    ug_free(s->xy);
    ug_free(s->els);
    ug_free(s);
}

static void *dup_block(const void *p, size_t n, bool *ok)
{
    if (!n)
        return NULL;
    void *q = ug_malloc(n);
    if (q)
        memcpy(q, p, n);
    *ok = *ok && q;
    return q;
}

glyph_shape *glyph_shape_copy(const glyph_shape *s)
{
    glyph_shape *c = ug_calloc(1, sizeof *c);
    if (!c)
        return NULL;
    bool ok = true;
    *c = *s;
    c->ops = dup_block(s->ops, s->nops, &ok);
    c->xy = dup_block(s->xy, s->npts * 2 * sizeof *s->xy, &ok);
    c->els = dup_block(s->els, s->nels * sizeof *s->els, &ok);
    c->capops = s->nops;
    c->cappts = s->npts;
    c->capels = s->nels;
    if (!ok) {
        glyph_shape_free(c);
        return NULL;
    }
    return c;
}

size_t glyph_shape_segments(const glyph_shape *s)
{
    return s->segments;
}

/* ---- the parse state ---------------------------------------------------------- */

typedef struct {
    glyph_shape *s;
    affine m;          /* the element's current transform */
    bool nomem;        /* storage failed */
    bool overflow;     /* a transformed coordinate was not finite */
    double x, y;       /* current point, in the element's own units */
    double sx, sy;     /* start of the current subpath */
    bool need_move;    /* the next drawing starts a subpath at (x, y) */
} builder;

static void emit(builder *b, int op, const double *pts, int n)
{
    glyph_shape *s = b->s;
    if (b->nomem || !grow((void **)&s->ops, &s->capops, s->nops + 1, 1) ||
        !grow((void **)&s->xy, &s->cappts, s->npts + (size_t)n, 2 * sizeof *s->xy)) {
        b->nomem = true;
        return;
    }
    s->ops[s->nops++] = (unsigned char)op;
    for (int i = 0; i < n; i++) {
        double x = pts[2 * i], y = pts[2 * i + 1];
        double tx = b->m.a * x + b->m.c * y + b->m.e, ty = b->m.b * x + b->m.d * y + b->m.f;
        if (!isfinite(tx) || !isfinite(ty))
            b->overflow = true;
        s->xy[2 * s->npts] = tx;
        s->xy[2 * s->npts + 1] = ty;
        s->npts++;
    }
    s->segments += op != OP_MOVE;
}

static void move_to(builder *b, double x, double y)
{
    double p[2] = {x, y};
    emit(b, OP_MOVE, p, 1);
    b->x = b->sx = x;
    b->y = b->sy = y;
    b->need_move = false;
}

/* After a closepath, drawing goes on from the subpath's start (SVG 1.1 §8.3.3). */
static void start_if_needed(builder *b)
{
    if (b->need_move)
        move_to(b, b->x, b->y);
}

static void line_to(builder *b, double x, double y)
{
    start_if_needed(b);
    double p[2] = {x, y};
    emit(b, OP_LINE, p, 1);
    b->x = x;
    b->y = y;
}

static void cubic_to(builder *b, double x1, double y1, double x2, double y2, double x,
                     double y)
{
    start_if_needed(b);
    double p[6] = {x1, y1, x2, y2, x, y};
    emit(b, OP_CUBIC, p, 3);
    b->x = x;
    b->y = y;
}

static void close_path(builder *b)
{
    if (b->need_move)
        return; /* nothing drawn since the last close */
    emit(b, OP_CLOSE, NULL, 0);
    b->x = b->sx;
    b->y = b->sy;
    b->need_move = true;
}

static double vector_angle(double ux, double uy, double vx, double vy)
{
    return atan2(ux * vy - uy * vx, ux * vx + uy * vy);
}

/* SVG 1.1 F.6.5 (endpoint to centre), radii per F.6.6, then cubics. */
static void arc_to(builder *b, double rx, double ry, double phi_deg, bool large, bool sweep,
                   double x2, double y2)
{
    double x1 = b->x, y1 = b->y;
    if (x1 == x2 && y1 == y2)
        return; /* F.6.2: the arc is omitted */
    rx = fabs(rx);
    ry = fabs(ry);
    if (rx == 0 || ry == 0) {
        line_to(b, x2, y2);
        return;
    }
    double phi = fmod(phi_deg, 360) * UG_PI / 180, cp = cos(phi), sp = sin(phi);
    double hx = (x1 - x2) / 2, hy = (y1 - y2) / 2;
    double x1p = cp * hx + sp * hy, y1p = -sp * hx + cp * hy;
    double lambda = (x1p * x1p) / (rx * rx) + (y1p * y1p) / (ry * ry);
    if (lambda > 1) {
        rx *= sqrt(lambda);
        ry *= sqrt(lambda);
    }
    double num = rx * rx * ry * ry - rx * rx * y1p * y1p - ry * ry * x1p * x1p;
    double den = rx * rx * y1p * y1p + ry * ry * x1p * x1p;
    double coef = den > 0 && num > 0 ? sqrt(num / den) : 0;
    if (large == sweep)
        coef = -coef;
    double cxp = coef * rx * y1p / ry, cyp = -coef * ry * x1p / rx;
    double cx = cp * cxp - sp * cyp + (x1 + x2) / 2, cy = sp * cxp + cp * cyp + (y1 + y2) / 2;
    double ux = (x1p - cxp) / rx, uy = (y1p - cyp) / ry;
    double vx = (-x1p - cxp) / rx, vy = (-y1p - cyp) / ry;
    double theta = vector_angle(1, 0, ux, uy), dtheta = vector_angle(ux, uy, vx, vy);
    if (!sweep && dtheta > 0)
        dtheta -= 2 * UG_PI;
    else if (sweep && dtheta < 0)
        dtheta += 2 * UG_PI;
    /* The small slack keeps an exact quarter turn one cubic despite rounding. */
    int n = (int)ceil(fabs(dtheta) / (UG_PI / 2) - 1e-9);
    if (n < 1)
        n = 1;
    double step = dtheta / n, k = 4.0 / 3.0 * tan(step / 4);
    for (int i = 0; i < n; i++) {
        double t1 = theta + i * step, t2 = t1 + step;
        double c1 = cos(t1), s1 = sin(t1), c2 = cos(t2), s2 = sin(t2);
        double u[6] = {c1 - k * s1, s1 + k * c1, c2 + k * s2, s2 - k * c2, c2, s2};
        double p[6];
        for (int j = 0; j < 3; j++) {
            double ex = rx * u[2 * j], ey = ry * u[2 * j + 1];
            p[2 * j] = cx + cp * ex - sp * ey;
            p[2 * j + 1] = cy + sp * ex + cp * ey;
        }
        if (i == n - 1) { /* land exactly on the endpoint */
            p[4] = x2;
            p[5] = y2;
        }
        cubic_to(b, p[0], p[1], p[2], p[3], p[4], p[5]);
    }
}

/* ---- scanning numbers ------------------------------------------------------------ */

static bool is_digit(char c)
{
    return c >= '0' && c <= '9';
}

const char *glyph_number(const char *p, const char *end, double *v)
{
    const char *q = p;
    if (q < end && (*q == '+' || *q == '-'))
        q++;
    const char *digits = q;
    while (q < end && is_digit(*q))
        q++;
    bool whole = q > digits, fraction = false;
    if (q < end && *q == '.') {
        const char *f = ++q;
        while (q < end && is_digit(*q))
            q++;
        fraction = q > f;
    }
    if (!whole && !fraction)
        return NULL;
    if (q < end && (*q == 'e' || *q == 'E')) { /* an exponent only with digits */
        const char *e = q + 1;
        if (e < end && (*e == '+' || *e == '-'))
            e++;
        if (e < end && is_digit(*e)) {
            while (e < end && is_digit(*e))
                e++;
            q = e;
        }
    }
    char buf[401];
    size_t n = (size_t)(q - p);
    if (n >= sizeof buf)
        return NULL;
    memcpy(buf, p, n);
    buf[n] = '\0';
    char *stop;
    *v = strtod(buf, &stop);
    return stop == buf + n && isfinite(*v) ? q : NULL;
}

typedef struct {
    const char *p, *end, *start;
    const char *what; /* what the scan expected when it failed */
} scan;

static bool is_wsp(char c)
{
    return c == ' ' || c == '\t' || c == '\n' || c == '\r';
}

static void skip_wsp(scan *c)
{
    while (c->p < c->end && is_wsp(*c->p))
        c->p++;
}

/* comma-wsp?: spaces, at most one comma, spaces. */
static void comma_wsp(scan *c)
{
    skip_wsp(c);
    if (c->p < c->end && *c->p == ',') {
        c->p++;
        skip_wsp(c);
    }
}

static bool fail_scan(scan *c, const char *what)
{
    c->what = what;
    return false;
}

static bool number(scan *c, double *v)
{
    const char *q = glyph_number(c->p, c->end, v);
    if (!q)
        return fail_scan(c, "a number");
    c->p = q;
    return true;
}

/* n numbers, comma-wsp? between them. */
static bool numbers(scan *c, double *v, int n)
{
    for (int i = 0; i < n; i++) {
        if (i)
            comma_wsp(c);
        if (!number(c, &v[i]))
            return false;
    }
    return true;
}

static bool flag(scan *c, bool *v)
{
    if (c->p < c->end && (*c->p == '0' || *c->p == '1')) {
        *v = *c->p++ == '1';
        return true;
    }
    return fail_scan(c, "an arc flag (0 or 1)");
}

static bool starts_number(const scan *c)
{
    return c->p < c->end && (is_digit(*c->p) || *c->p == '.' || *c->p == '-' || *c->p == '+');
}

/* ---- path data ------------------------------------------------------------------- */

typedef struct {
    char prev;           /* the previous command, upper case */
    double cx, cy;       /* its last control point, for S and T */
} path_state;

static int arg_count(char cmd)
{
    switch (cmd) {
    case 'M': case 'L': case 'T': return 2;
    case 'H': case 'V': return 1;
    case 'C': return 6;
    case 'S': case 'Q': return 4;
    case 'A': return 7;
    default: return 0;
    }
}

/* rx ry rotation comma-wsp large comma-wsp? sweep comma-wsp? x y (§8.3.9). */
static bool arc_args(scan *c, double *v, bool *large, bool *sweep)
{
    if (!numbers(c, v, 3))
        return false;
    comma_wsp(c);
    if (!flag(c, large))
        return false;
    comma_wsp(c);
    if (!flag(c, sweep))
        return false;
    comma_wsp(c);
    return numbers(c, v + 3, 2);
}

static void reflect(const builder *b, const path_state *ps, char want1, char want2,
                    double *x, double *y)
{
    if (ps->prev == want1 || ps->prev == want2) {
        *x = 2 * b->x - ps->cx;
        *y = 2 * b->y - ps->cy;
    } else {
        *x = b->x;
        *y = b->y;
    }
}

/* One argument group of command cmd (upper case; rel for the lower-case form). */
static void path_command(builder *b, path_state *ps, char cmd, bool rel, double *v,
                         bool large, bool sweep)
{
    double ox = rel ? b->x : 0, oy = rel ? b->y : 0;
    double x0 = b->x, y0 = b->y, c1x, c1y;
    switch (cmd) {
    case 'M': move_to(b, v[0] + ox, v[1] + oy); break;
    case 'L': line_to(b, v[0] + ox, v[1] + oy); break;
    case 'H': line_to(b, v[0] + ox, b->y); break;
    case 'V': line_to(b, b->x, v[0] + oy); break;
    case 'C':
        cubic_to(b, v[0] + ox, v[1] + oy, v[2] + ox, v[3] + oy, v[4] + ox, v[5] + oy);
        ps->cx = v[2] + ox;
        ps->cy = v[3] + oy;
        break;
    case 'S':
        reflect(b, ps, 'C', 'S', &c1x, &c1y);
        cubic_to(b, c1x, c1y, v[0] + ox, v[1] + oy, v[2] + ox, v[3] + oy);
        ps->cx = v[0] + ox;
        ps->cy = v[1] + oy;
        break;
    case 'Q': case 'T': {
        double qx = v[0] + ox, qy = v[1] + oy, x, y;
        if (cmd == 'T') {
            reflect(b, ps, 'Q', 'T', &qx, &qy);
            x = v[0] + ox;
            y = v[1] + oy;
        } else {
            x = v[2] + ox;
            y = v[3] + oy;
        }
        /* Degree elevation: the same curve as a cubic, exactly. */
        cubic_to(b, x0 + 2.0 / 3 * (qx - x0), y0 + 2.0 / 3 * (qy - y0),
                 x + 2.0 / 3 * (qx - x), y + 2.0 / 3 * (qy - y), x, y);
        ps->cx = qx;
        ps->cy = qy;
        break;
    }
    case 'A': arc_to(b, v[0], v[1], v[2], large, sweep, v[3] + ox, v[4] + oy); break;
    default: break;
    }
    ps->prev = cmd;
}

static char upper(char c)
{
    return c >= 'a' && c <= 'z' ? (char)(c - 'a' + 'A') : c;
}

static bool parse_path(builder *b, scan *c)
{
    path_state ps = {0, 0, 0};
    b->x = b->y = b->sx = b->sy = 0;
    b->need_move = true;
    skip_wsp(c);
    if (c->p < c->end && upper(*c->p) != 'M')
        return fail_scan(c, "a moveto (M or m) first");
    while (c->p < c->end) {
        char letter = *c->p, cmd = upper(letter);
        if (!strchr("MLHVCSQTAZ", cmd) || letter == '\0')
            return fail_scan(c, "a path command");
        c->p++;
        skip_wsp(c);
        if (cmd == 'Z') {
            close_path(b);
            ps.prev = 'Z';
            continue;
        }
        bool rel = letter != cmd;
        do {
            double v[7];
            bool large = false, sweep = false;
            if (!(cmd == 'A' ? arc_args(c, v, &large, &sweep) : numbers(c, v, arg_count(cmd))))
                return false;
            path_command(b, &ps, cmd, rel, v, large, sweep);
            if (cmd == 'M') /* pairs after a moveto are linetos */
                cmd = 'L';
            const char *before = c->p;
            comma_wsp(c);
            if (!starts_number(c) && memchr(before, ',', (size_t)(c->p - before)))
                return fail_scan(c, "a number after the comma");
        } while (starts_number(c));
    }
    return !b->nomem;
}

/* ---- the basic shapes (SVG 1.1 §9) ---------------------------------------------- */

enum { A_X, A_Y, A_W, A_H, A_RX, A_RY, A_CX, A_CY, A_R, A_NLEN };

static const char *const length_names[A_NLEN] = {"x", "y", "width", "height", "rx",
                                                 "ry", "cx", "cy", "r"};

typedef struct {
    const char *v[A_NLEN + 4], *e[A_NLEN + 4]; /* value spans, NULL when absent */
} attrs;

enum { A_D = A_NLEN, A_POINTS, A_TRANSFORM, A_FILL_RULE };

static void rect_shape(builder *b, const double *L, const bool *has)
{
    double x = L[A_X], y = L[A_Y], w = L[A_W], h = L[A_H];
    if (!(w > 0 && h > 0))
        return; /* §9.2: zero disables rendering */
    double rx = has[A_RX] && L[A_RX] >= 0 ? L[A_RX] : -1;
    double ry = has[A_RY] && L[A_RY] >= 0 ? L[A_RY] : -1;
    if (rx < 0)
        rx = ry < 0 ? 0 : ry;
    if (ry < 0)
        ry = rx;
    rx = fmin(rx, w / 2);
    ry = fmin(ry, h / 2);
    b->need_move = true;
    move_to(b, x + rx, y);
    line_to(b, x + w - rx, y);
    if (rx > 0 && ry > 0)
        arc_to(b, rx, ry, 0, false, true, x + w, y + ry);
    line_to(b, x + w, y + h - ry);
    if (rx > 0 && ry > 0)
        arc_to(b, rx, ry, 0, false, true, x + w - rx, y + h);
    line_to(b, x + rx, y + h);
    if (rx > 0 && ry > 0)
        arc_to(b, rx, ry, 0, false, true, x, y + h - ry);
    line_to(b, x, y + ry);
    if (rx > 0 && ry > 0)
        arc_to(b, rx, ry, 0, false, true, x + rx, y);
    close_path(b);
}

static void ellipse_shape(builder *b, double cx, double cy, double rx, double ry)
{
    if (!(rx > 0 && ry > 0))
        return;
    move_to(b, cx + rx, cy);
    arc_to(b, rx, ry, 0, false, true, cx, cy + ry);
    arc_to(b, rx, ry, 0, false, true, cx - rx, cy);
    arc_to(b, rx, ry, 0, false, true, cx, cy - ry);
    arc_to(b, rx, ry, 0, false, true, cx + rx, cy);
    close_path(b);
}

static bool parse_points(builder *b, scan *c)
{
    skip_wsp(c);
    bool first = true;
    while (c->p < c->end) {
        double v[2];
        if (!numbers(c, v, 2))
            return false;
        if (first)
            move_to(b, v[0], v[1]);
        else
            line_to(b, v[0], v[1]);
        first = false;
        comma_wsp(c);
    }
    if (!first)
        close_path(b);
    return true;
}

/* ---- transforms (SVG 1.1 §7.6) --------------------------------------------------- */

static bool transform_function(scan *c, affine *t)
{
    static const struct {
        const char *name;
        int min, max;
    } funcs[] = {{"matrix", 6, 6}, {"translate", 1, 2}, {"scale", 1, 2},
                 {"rotate", 1, 3}, {"skewX", 1, 1},     {"skewY", 1, 1}};
    size_t k = 0, len = 0;
    while (c->p + len < c->end && ((c->p[len] | 0x20) >= 'a' && (c->p[len] | 0x20) <= 'z'))
        len++;
    while (k < sizeof funcs / sizeof *funcs &&
           !(strlen(funcs[k].name) == len && strncmp(funcs[k].name, c->p, len) == 0))
        k++;
    if (k == sizeof funcs / sizeof *funcs)
        return fail_scan(c, "a transform function");
    c->p += len;
    skip_wsp(c);
    if (c->p >= c->end || *c->p != '(')
        return fail_scan(c, "'('");
    c->p++;
    skip_wsp(c);
    double v[6];
    int n = 0;
    while (n < funcs[k].max && starts_number(c)) {
        if (!number(c, &v[n++]))
            return false;
        comma_wsp(c);
    }
    if (n < funcs[k].min || (k == 3 && n == 2) || c->p >= c->end || *c->p != ')')
        return fail_scan(c, "the function's arguments and ')'");
    c->p++;
    double r = v[0] * UG_PI / 180;
    switch (k) {
    case 0: *t = (affine){v[0], v[1], v[2], v[3], v[4], v[5]}; break;
    case 1: *t = (affine){1, 0, 0, 1, v[0], n > 1 ? v[1] : 0}; break;
    case 2: *t = (affine){v[0], 0, 0, n > 1 ? v[1] : v[0], 0, 0}; break;
    case 3: {
        affine rot = {cos(r), sin(r), -sin(r), cos(r), 0, 0};
        if (n == 3)
            rot = compose(compose((affine){1, 0, 0, 1, v[1], v[2]}, rot),
                          (affine){1, 0, 0, 1, -v[1], -v[2]});
        *t = rot;
        break;
    }
    case 4: *t = (affine){1, 0, tan(r), 1, 0, 0}; break;
    default: *t = (affine){1, tan(r), 0, 1, 0, 0}; break;
    }
    return true;
}

static bool parse_transform(scan *c, affine *out)
{
    *out = identity;
    skip_wsp(c);
    while (c->p < c->end) {
        affine t;
        if (!transform_function(c, &t))
            return false;
        *out = compose(*out, t);
        comma_wsp(c);
    }
    return true;
}

/* ---- the markup ---------------------------------------------------------------------- */

#define MAX_NESTING 80 /* the sanitizer's 32 levels, plus the fitting wrappers */

typedef struct {
    affine m;
    bool evenodd;
    bool leaf; /* a shape written with an end tag: no children */
    char name[10];
} frame;

typedef struct {
    const char *markup;
    ug_mark where;
    ug_error *err;
    builder b;
    frame stack[MAX_NESTING];
    int depth;
} reader;

static ug_status markup_error(reader *r, const char *at, const char *what)
{
    return ug_fail(r->err, UG_ESYNTAX, r->where,
                   "glyph markup is malformed at character %zu: expected %s",
                   (size_t)(at - r->markup) + 1, what);
}

static ug_status value_error(reader *r, const char *attr, const scan *c)
{
    size_t shown = (size_t)(c->end - c->start);
    return ug_fail(r->err, UG_ESYNTAX, r->where,
                   "glyph attribute %s=\"%.*s%s\" is malformed at character %zu: "
                   "expected %s", attr, (int)(shown > 40 ? 40 : shown), c->start,
                   shown > 40 ? "..." : "", (size_t)(c->p - c->start) + 1,
                   c->what ? c->what : "the end of the value");
}

static bool is_name_char(char c)
{
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '-' || c == ':';
}

static size_t name_length(const char *p)
{
    size_t n = 0;
    while (is_name_char(p[n]))
        n++;
    return n;
}

static int attr_index(const char *name, size_t n)
{
    static const char *const others[] = {"d", "points", "transform", "fill-rule"};
    for (int i = 0; i < A_NLEN; i++)
        if (strlen(length_names[i]) == n && strncmp(length_names[i], name, n) == 0)
            return i;
    for (int i = 0; i < 4; i++)
        if (strlen(others[i]) == n && strncmp(others[i], name, n) == 0)
            return A_NLEN + i;
    if (n == 9 && strncmp(name, "clip-rule", 9) == 0)
        return -2; /* kept by the sanitizer, but there are no clip paths to use it */
    return -1;
}

/* Attributes up to '>' or '/>'; *p is left after it, *closed set for '/>'. */
static ug_status read_attributes(reader *r, const char **pp, attrs *a, bool *closed)
{
    const char *p = *pp;
    memset(a, 0, sizeof *a);
    for (;;) {
        while (is_wsp(*p))
            p++;
        if (*p == '>' || (p[0] == '/' && p[1] == '>')) {
            *closed = *p == '/';
            *pp = p + 1 + *closed;
            return UG_OK;
        }
        size_t n = name_length(p);
        int k = n ? attr_index(p, n) : -1;
        if (k == -1)
            return markup_error(r, p, "a geometry attribute, '>' or '/>'");
        p += n;
        while (is_wsp(*p))
            p++;
        if (*p != '=')
            return markup_error(r, p, "'='");
        p++;
        while (is_wsp(*p))
            p++;
        char quote = *p;
        if (quote != '"' && quote != '\'')
            return markup_error(r, p, "a quoted value");
        const char *v = ++p;
        while (*p && *p != quote && *p != '<' && *p != '&')
            p++;
        if (*p != quote)
            return markup_error(r, p, "the value's closing quote (no entities)");
        if (k >= 0) {
            a->v[k] = v;
            a->e[k] = p;
        }
        p++;
    }
}

static ug_status length_values(reader *r, const attrs *a, double *L, bool *has)
{
    for (int i = 0; i < A_NLEN; i++) {
        L[i] = 0;
        has[i] = a->v[i] != NULL;
        if (!has[i])
            continue;
        scan c = {a->v[i], a->e[i], a->v[i], NULL};
        skip_wsp(&c);
        if (!number(&c, &L[i]))
            return value_error(r, length_names[i], &c);
        if (c.end - c.p >= 2 && c.p[0] == 'p' && c.p[1] == 'x')
            c.p += 2;
        skip_wsp(&c);
        if (c.p != c.end)
            return value_error(r, length_names[i], &c);
    }
    return UG_OK;
}

static bool new_element(reader *r, bool evenodd)
{
    glyph_shape *s = r->b.s;
    if (!grow((void **)&s->els, &s->capels, s->nels + 1, sizeof *s->els)) {
        r->b.nomem = true;
        return false;
    }
    s->els[s->nels++] = (element){s->nops, s->nops, s->npts, evenodd};
    return true;
}

static ug_status draw_element(reader *r, const char *name, size_t n, const attrs *a,
                              bool evenodd)
{
    double L[A_NLEN];
    bool has[A_NLEN];
    ug_status st = length_values(r, a, L, has);
    if (st)
        return st;
    if (!new_element(r, evenodd))
        return UG_OK; /* nomem is reported by the caller */
    builder *b = &r->b;
    b->need_move = true;
    b->x = b->y = 0;
    bool ok = true;
    scan c = {NULL, NULL, NULL, NULL};
    const char *attr = "d";
    if (n == 4 && !strncmp(name, "path", 4) && a->v[A_D]) {
        c = (scan){a->v[A_D], a->e[A_D], a->v[A_D], NULL};
        ok = parse_path(b, &c);
    } else if ((n == 7 && !strncmp(name, "polygon", 7)) ||
               (n == 8 && !strncmp(name, "polyline", 8))) {
        attr = "points";
        if (a->v[A_POINTS]) {
            c = (scan){a->v[A_POINTS], a->e[A_POINTS], a->v[A_POINTS], NULL};
            ok = parse_points(b, &c);
        }
    } else if (n == 4 && !strncmp(name, "rect", 4)) {
        rect_shape(b, L, has);
    } else if (n == 6 && !strncmp(name, "circle", 6)) {
        ellipse_shape(b, L[A_CX], L[A_CY], L[A_R], L[A_R]);
    } else if (n == 7 && !strncmp(name, "ellipse", 7)) {
        double rx = has[A_RX] ? L[A_RX] : L[A_RY], ry = has[A_RY] ? L[A_RY] : L[A_RX];
        ellipse_shape(b, L[A_CX], L[A_CY], rx, ry);
    }
    r->b.s->els[r->b.s->nels - 1].op1 = r->b.s->nops;
    if (!ok && !b->nomem)
        return value_error(r, attr, &c);
    return UG_OK;
}

static bool known_element(const char *name, size_t n)
{
    static const char *const names[] = {"g", "path", "circle", "ellipse",
                                        "rect", "polygon", "polyline"};
    for (size_t i = 0; i < sizeof names / sizeof *names; i++)
        if (strlen(names[i]) == n && strncmp(names[i], name, n) == 0)
            return true;
    return false;
}

/* The element's own transform and fill rule on top of its parent's. */
static ug_status element_state(reader *r, const attrs *a, frame *f)
{
    if (a->v[A_TRANSFORM]) {
        scan c = {a->v[A_TRANSFORM], a->e[A_TRANSFORM], a->v[A_TRANSFORM], NULL};
        affine t;
        if (!parse_transform(&c, &t))
            return value_error(r, "transform", &c);
        f->m = compose(f->m, t);
    }
    if (a->v[A_FILL_RULE]) {
        size_t n = (size_t)(a->e[A_FILL_RULE] - a->v[A_FILL_RULE]);
        if (n == 7 && !strncmp(a->v[A_FILL_RULE], "evenodd", 7))
            f->evenodd = true;
        else if (n == 7 && !strncmp(a->v[A_FILL_RULE], "nonzero", 7))
            f->evenodd = false;
        else if (!(n == 7 && !strncmp(a->v[A_FILL_RULE], "inherit", 7)))
            return markup_error(r, a->v[A_FILL_RULE], "nonzero or evenodd");
    }
    return UG_OK;
}

static ug_status start_tag(reader *r, const char **pp)
{
    const char *p = *pp + 1, *name = p;
    size_t n = name_length(p);
    if (!known_element(name, n))
        return markup_error(r, name, "g, path, circle, ellipse, rect or polygon");
    frame *parent = &r->stack[r->depth];
    if (parent->leaf)
        return markup_error(r, name, "no children inside a shape");
    p += n;
    attrs a;
    bool closed = false;
    ug_status st = read_attributes(r, &p, &a, &closed);
    frame f = *parent;
    f.leaf = !(n == 1 && *name == 'g');
    memcpy(f.name, name, n);
    f.name[n] = '\0';
    if (!st)
        st = element_state(r, &a, &f);
    r->b.m = f.m;
    if (!st && f.leaf)
        st = draw_element(r, name, n, &a, f.evenodd);
    if (!st && !closed) {
        if (r->depth + 1 >= MAX_NESTING)
            return ug_fail(r->err, UG_ELIMIT, r->where,
                           "glyph markup nests elements deeper than %d levels",
                           MAX_NESTING - 1);
        r->stack[++r->depth] = f;
    }
    *pp = p;
    return st;
}

static ug_status end_tag(reader *r, const char **pp)
{
    const char *p = *pp + 2;
    size_t n = name_length(p);
    if (r->depth == 0 || strlen(r->stack[r->depth].name) != n ||
        strncmp(r->stack[r->depth].name, p, n) != 0)
        return markup_error(r, p, "the end tag of the open element");
    p += n;
    while (is_wsp(*p))
        p++;
    if (*p != '>')
        return markup_error(r, p, "'>'");
    r->depth--;
    *pp = p + 1;
    return UG_OK;
}

static ug_status read_markup(reader *r)
{
    const char *p = r->markup;
    ug_status st = UG_OK;
    while (!st && !r->b.nomem) {
        while (is_wsp(*p))
            p++;
        if (!*p)
            break;
        if (*p != '<')
            st = markup_error(r, p, "an element ('<')");
        else if (p[1] == '/')
            st = end_tag(r, &p);
        else
            st = start_tag(r, &p);
    }
    if (!st && !r->b.nomem && r->depth)
        st = markup_error(r, p, "the end tag of every open element");
    return st;
}

ug_status glyph_shape_parse(const char *markup, ug_mark where, glyph_shape **out,
                            ug_error *err)
{
    *out = NULL;
    reader *r = ug_calloc(1, sizeof *r); /* the nesting stack is large for a C stack frame */
    glyph_shape *s = ug_calloc(1, sizeof *s);
    if (!r || !s) {
        ug_free(r);
        ug_free(s);
        return ug_fail(err, UG_ENOMEM, where, "out of memory");
    }
    r->markup = markup;
    r->where = where;
    r->err = err;
    r->b.s = s;
    r->stack[0].m = identity;
    ug_status st = read_markup(r);
    if (!st && r->b.nomem)
        st = ug_fail(err, UG_ENOMEM, where, "out of memory");
    else if (!st && r->b.overflow)
        st = ug_fail(err, UG_ESYNTAX, where,
                     "glyph markup has coordinates too large to compute with");
    ug_free(r);
    if (st) {
        glyph_shape_free(s);
        return st;
    }
    *out = s;
    return UG_OK;
}

/* ---- bounds ---------------------------------------------------------------------- */

typedef struct {
    double x0, y0, x1, y1;
} extent;

static void include(extent *e, double x, double y)
{
    e->x0 = fmin(e->x0, x);
    e->y0 = fmin(e->y0, y);
    e->x1 = fmax(e->x1, x);
    e->y1 = fmax(e->y1, y);
}

/* Roots in (0, 1) of the cubic's derivative along one axis:
** B'(t)/3 = A t^2 + B t + C with A = a - 2b + c, B = 2(b - a), C = a for the
** control-point differences a = p1 - p0, b = p2 - p1, c = p3 - p2. */
static int extremes(double p0, double p1, double p2, double p3, double t[2])
{
    if (p1 >= fmin(p0, p3) && p1 <= fmax(p0, p3) && p2 >= fmin(p0, p3) &&
        p2 <= fmax(p0, p3))
        return 0; /* the hull lies between the ends: they are the extremes */
    double a = p1 - p0, b = p2 - p1, c = p3 - p2;
    double A = a - 2 * b + c, B = 2 * (b - a), C = a;
    int n = 0;
    double scale = fabs(a) + fabs(b) + fabs(c);
    if (fabs(A) <= 1e-12 * scale) {
        if (B != 0)
            t[n++] = -C / B;
    } else {
        double disc = B * B - 4 * A * C;
        if (disc < 0)
            disc = 0; /* a double root rounded below zero */
        double q = -0.5 * (B + copysign(sqrt(disc), B));
        t[n++] = q / A;
        if (q != 0)
            t[n++] = C / q;
    }
    int k = 0;
    for (int i = 0; i < n; i++)
        if (t[i] > 0 && t[i] < 1)
            t[k++] = t[i];
    return k;
}

static double bezier(double p0, double p1, double p2, double p3, double t)
{
    double u = 1 - t;
    return u * u * u * p0 + 3 * u * u * t * p1 + 3 * u * t * t * p2 + t * t * t * p3;
}

static void include_cubic(extent *e, const double *p /* 4 points */)
{
    double t[2];
    for (int axis = 0; axis < 2; axis++) {
        int n = extremes(p[axis], p[2 + axis], p[4 + axis], p[6 + axis], t);
        for (int i = 0; i < n; i++) {
            double x = bezier(p[0], p[2], p[4], p[6], t[i]);
            double y = bezier(p[1], p[3], p[5], p[7], t[i]);
            include(e, x, y);
        }
    }
    include(e, p[6], p[7]);
}

/* A subpath whose every point (control points too) lies on one line encloses
** no area, so filling it inks nothing: it is left out of the extent, as the
** fill extents librsvg reports leave it out. */
static bool encloses_area(const double *pts, size_t n)
{
    size_t far = 0;
    double best = 0;
    for (size_t i = 1; i < n; i++) {
        double dx = pts[2 * i] - pts[0], dy = pts[2 * i + 1] - pts[1];
        if (dx * dx + dy * dy > best) {
            best = dx * dx + dy * dy;
            far = i;
        }
    }
    if (best == 0)
        return false;
    double ux = pts[2 * far] - pts[0], uy = pts[2 * far + 1] - pts[1];
    for (size_t i = 1; i < n; i++) {
        double cross = ux * (pts[2 * i + 1] - pts[1]) - uy * (pts[2 * i] - pts[0]);
        if (fabs(cross) > 1e-12 * best)
            return true;
    }
    return false;
}

static size_t points_of(unsigned char op)
{
    return op == OP_CUBIC ? 3 : op == OP_CLOSE ? 0 : 1;
}

/* The extent of the subpath starting at op i (a moveto) into *e; returns
** the op after it. Within a subpath each op starts where the previous point
** stored ends (a closepath ends it), so a cubic's four points are adjacent. */
static size_t subpath_extent(const glyph_shape *s, size_t i, size_t end, size_t *pt,
                             extent *e)
{
    size_t first = *pt, k = first + 1, j = i + 1;
    for (; j < end && s->ops[j] != OP_MOVE; j++)
        k += points_of(s->ops[j]);
    *pt = k;
    if (!encloses_area(s->xy + 2 * first, k - first))
        return j;
    include(e, s->xy[2 * first], s->xy[2 * first + 1]);
    for (size_t op = i + 1, q = first + 1; op < j; q += points_of(s->ops[op++]))
        if (s->ops[op] == OP_LINE)
            include(e, s->xy[2 * q], s->xy[2 * q + 1]);
        else if (s->ops[op] == OP_CUBIC)
            include_cubic(e, s->xy + 2 * (q - 1));
    return j;
}

void glyph_shape_bounds(const glyph_shape *s, double box[4])
{
    extent e = {INFINITY, INFINITY, -INFINITY, -INFINITY};
    for (size_t k = 0; k < s->nels; k++) {
        const element *el = &s->els[k];
        size_t pt = el->pt0;
        for (size_t i = el->op0; i < el->op1;)
            i = subpath_extent(s, i, el->op1, &pt, &e);
    }
    if (e.x0 > e.x1) {
        box[0] = box[1] = box[2] = box[3] = 0;
        return;
    }
    box[0] = e.x0;
    box[1] = e.y0;
    box[2] = e.x1 - e.x0;
    box[3] = e.y1 - e.y0;
}

/* ---- drawing --------------------------------------------------------------------- */

void glyph_shape_draw(const glyph_shape *s, cairo_t *cr)
{
    for (size_t k = 0; k < s->nels; k++) {
        const element *el = &s->els[k];
        const double *p = s->xy + 2 * el->pt0;
        cairo_new_path(cr);
        for (size_t i = el->op0; i < el->op1; i++) {
            switch (s->ops[i]) {
            case OP_MOVE: cairo_move_to(cr, p[0], p[1]); break;
            case OP_LINE: cairo_line_to(cr, p[0], p[1]); break;
            case OP_CUBIC: cairo_curve_to(cr, p[0], p[1], p[2], p[3], p[4], p[5]); break;
            default: cairo_close_path(cr); break;
            }
            p += 2 * points_of(s->ops[i]);
        }
        cairo_set_fill_rule(cr, el->evenodd ? CAIRO_FILL_RULE_EVEN_ODD
                                            : CAIRO_FILL_RULE_WINDING);
        cairo_fill(cr);
    }
}
