#!/usr/bin/env python3
"""Glyph library at chart size: each glyph must be legible at 10x10 px and
distinct there from every other glyph of its subject set. Renderings are
librsvg's (rsvg-convert), an independent renderer of the SVG files, not
unitgram's own code.

Usage: glyph_small.py GLYPH_DIR [--self-test]

Legible (common practice, no source): the 10x10 px rendering is not an almost
uniform blob. The standard deviation of its pixel coverage (alpha, 0..1) must
be at least CONTRAST_MIN: a two-tone image at the band's lowest ink fraction
(0.25) has 0.43, a solid square or an even grey well under 0.25.

Distinct (common practice, no source: compare downsampled masks, forgiving a
small misregistration): the glyph is rendered at 100x100 px and area-averaged
to 10x10 px, at every offset of up to SHIFT_MAX units of the 100-unit box in x
and y; the distance of two glyphs is the smallest mean absolute coverage
difference over those offsets (0 = identical). Two glyphs of one set must be
at least DISTINCT_MIN apart. --self-test shows the check can fail: a copy of
each glyph shifted by 2.5 units (between the offsets tried) must fall below
the threshold, and a solid square and a fine grating must fail the
legibility check. Calibrated on the 48 glyphs of the first library: shifted
copies at most 0.026, the closest pair of one set (person, older-person)
0.089, so the threshold sits between at 0.05.
"""
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from colour_areas import read_png  # noqa: E402

SIZE = 10
FINE = 100          # px of the fine rendering: one pixel per unit of the box
SHIFT_MAX = 3       # units; offsets -3..3 in x and y
DISTINCT_MIN = 0.05
CONTRAST_MIN = 0.25


def render(svg_path, png_path, size=SIZE):
    subprocess.run(['rsvg-convert', '-w', str(size), '-h', str(size), '-f', 'png',
                    '-o', png_path, svg_path], check=True)
    w, h, bpp, px = read_png(open(png_path, 'rb').read())
    assert (w, h, bpp) == (size, size, 4), (svg_path, w, h, bpp)
    return [px[i * 4 + 3] / 255.0 for i in range(w * h)]


def summed_area(alpha):
    """Summed-area table with a zero border, so block sums cost four reads."""
    n = FINE + 1
    t = [0.0] * (n * n)
    for y in range(FINE):
        row = 0.0
        for x in range(FINE):
            row += alpha[y * FINE + x]
            t[(y + 1) * n + x + 1] = t[y * n + x + 1] + row
    return t


def block(t, x0, y0, x1, y1):
    n = FINE + 1
    x0, y0 = max(0, min(FINE, x0)), max(0, min(FINE, y0))
    x1, y1 = max(0, min(FINE, x1)), max(0, min(FINE, y1))
    return t[y1 * n + x1] - t[y0 * n + x1] - t[y1 * n + x0] + t[y0 * n + x0]


def small(t, dx=0, dy=0):
    """The 10x10 area average of the fine rendering moved by (dx, dy) units."""
    k = FINE // SIZE
    return [block(t, x * k - dx, y * k - dy, (x + 1) * k - dx, (y + 1) * k - dy) / (k * k)
            for y in range(SIZE) for x in range(SIZE)]


def distance(ta, tb):
    a = small(ta)
    best = 9.0
    for dy in range(-SHIFT_MAX, SHIFT_MAX + 1):
        for dx in range(-SHIFT_MAX, SHIFT_MAX + 1):
            b = small(tb, dx, dy)
            best = min(best, sum(abs(p - q) for p, q in zip(a, b)) / len(a))
    return best


def legibility_problem(alpha):
    mean = sum(alpha) / len(alpha)
    sd = (sum((v - mean) ** 2 for v in alpha) / len(alpha)) ** 0.5
    if sd < CONTRAST_MIN:
        return 'coverage spread (standard deviation) %.3f, at least %.2f' % (sd, CONTRAST_MIN)
    return None


def read_subjects(index_path):
    """name -> subject, from the flat index the house schema writes."""
    subjects, cur = {}, None
    for line in open(index_path, encoding='utf-8'):
        m = re.match(r'^- name:\s*(\S+)\s*$', line)
        if m:
            cur = m.group(1)
            continue
        m = re.match(r'^  subject:\s*(\S+)\s*$', line)
        if m and cur:
            subjects[cur] = m.group(1)
    return subjects


def shifted_copy(svg_path, out_path, dx):
    text = open(svg_path, encoding='utf-8').read()
    body = re.sub(r'^.*?<svg[^>]*>', '', text, flags=re.S).rsplit('</svg>', 1)[0]
    open(out_path, 'w', encoding='utf-8').write(
        '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 100">'
        '<g transform="translate(%g,0)">%s</g></svg>' % (dx, body))


def self_test(gdir, tmp, alphas):
    """The checks can fail: a shifted copy is 'not distinct', a solid square
    and a fine grating are 'not legible'."""
    fails = []
    worst = 0.0
    for name in sorted(alphas):
        path = os.path.join(tmp, name + '-shift.svg')
        shifted_copy(os.path.join(gdir, name + ".svg"), path, 2.5)
        d = distance(alphas[name], summed_area(render(path, path + '.png', FINE)))
        worst = max(worst, d)
    if worst >= DISTINCT_MIN:
        fails.append('a copy shifted by 2.5 units is %.3f from its original, not below %.2f'
                     % (worst, DISTINCT_MIN))
    solid = os.path.join(tmp, 'solid.svg')
    open(solid, 'w').write('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 100">'
                           '<rect x="4" y="4" width="92" height="92"/></svg>')
    grating = os.path.join(tmp, 'grating.svg')
    open(grating, 'w').write('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 100">'
                             + ''.join('<rect x="%d" y="4" width="2.5" height="92"/>' % x
                                       for x in range(4, 96, 5)) + '</svg>')
    for probe in (solid, grating):
        if legibility_problem(render(probe, probe + '.png')) is None:
            fails.append('%s passed the legibility check' % os.path.basename(probe))
    print('self-test: largest shifted-copy distance %.3f (threshold %.2f)' % (worst, DISTINCT_MIN))
    return fails


def main():
    gdir = sys.argv[1]
    subjects = read_subjects(os.path.join(gdir, 'index.yaml'))
    names = sorted(f[:-4] for f in os.listdir(gdir) if f.endswith('.svg'))
    fails = []
    with tempfile.TemporaryDirectory() as tmp:
        alphas = {n: summed_area(render(os.path.join(gdir, n + '.svg'),
                                        os.path.join(tmp, n + '-fine.png'), FINE))
                  for n in names}
        for n in names:
            p = legibility_problem(render(os.path.join(gdir, n + '.svg'),
                                          os.path.join(tmp, n + '.png')))
            if p:
                fails.append('%s not legible at %d px: %s' % (n, SIZE, p))
            if n not in subjects:
                fails.append('%s has no subject in index.yaml' % n)
        closest = (9.0, None, None)
        for s in sorted(set(subjects.values())):
            members = [n for n in names if subjects.get(n) == s]
            for i, a in enumerate(members):
                for b in members[i + 1:]:
                    d = distance(alphas[a], alphas[b])
                    closest = min(closest, (d, a, b))
                    if d < DISTINCT_MIN:
                        fails.append('%s and %s (%s) differ by %.3f at %d px (at least %.2f)'
                                     % (a, b, s, d, SIZE, DISTINCT_MIN))
        print('glyphs: %d   closest pair in a set: %s / %s %.3f (threshold %.2f)'
              % (len(names), closest[1], closest[2], closest[0], DISTINCT_MIN))
        if '--self-test' in sys.argv:
            fails += self_test(gdir, tmp, alphas)
    for f in fails:
        print('FAIL ' + f)
    print('glyph_small: ' + ('FAILED' if fails else 'all passed'))
    return 1 if fails else 0


if __name__ == '__main__':
    sys.exit(main())
