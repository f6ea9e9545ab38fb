#!/usr/bin/python3
"""Check src/color.c against libraries we did not write.

Usage: /usr/bin/python3 tests/ref/cvd_check.py build/tests/ref/cvd_driver

- CVD simulation vs Debian's python3-colorspacious ("sRGB1+CVD", the Machado,
  Oliveira & Fernandes 2009 model; cvd_type protanomaly / deuteranomaly /
  tritanomaly at severity 100 are the dichromacies), clipped to [0, 1]:
  2,000 random colours per deficiency (fixed seed), within 1/255 per channel.
- sRGB -> CIELAB (D65) vs colorspacious ("sRGB1" -> "CIELab", D65 white):
  within 0.1 per coordinate (LittleCMS derives the sRGB matrix from the
  primaries' chromaticities, colorspacious uses the rounded standard matrix).
- CIEDE2000 of random Lab pairs vs python3-colormath 3.0.0 delta_e_cie2000,
  when that package is installed (optional): near pairs (the small
  differences the formula is meant for) within 5e-5, the precision of Sharma,
  Wu & Dalal's test data; far pairs within 1e-5 relative -- the two
  implementations part in the sixth significant figure when the hues are
  nearly opposite (mean-hue branch), beyond the formula's intended range.

Prints "N passed, N failed"; exits 1 when anything failed, 77 when
colorspacious is missing (the suite turns that into SKIP).
"""
import random
import subprocess
import sys

try:
    import numpy
    from colorspacious import cspace_convert
except ImportError:
    print("colorspacious not available")
    sys.exit(77)

SEED = 20090  # fixed, so a failure can be reproduced
N_CVD = 2000
N_LAB = 2000
N_DE = 2000
CVD_TYPES = ["protanomaly", "deuteranomaly", "tritanomaly"]  # severity 100


def run(driver, mode, lines):
    text = "".join(" ".join(str(x) for x in line) + "\n" for line in lines)
    out = subprocess.run([driver, mode], input=text, capture_output=True,
                         text=True, check=True).stdout
    return [[float(x) for x in row.split()] for row in out.splitlines()]


class Tally:
    def __init__(self):
        self.passed = 0
        self.failed = 0

    def check(self, ok, what):
        if ok:
            self.passed += 1
        else:
            self.failed += 1
            if self.failed <= 20:
                print("FAIL", what)


def random_colours(rng, n):
    # The corners and greys first: they catch clipping and row-sum mistakes.
    fixed = [(r, g, b) for r in (0, 255) for g in (0, 255) for b in (0, 255)]
    fixed += [(v, v, v) for v in (1, 10, 11, 128, 254)]
    return fixed + [tuple(rng.randrange(256) for _ in range(3))
                    for _ in range(n - len(fixed))]


def check_cvd(driver, rng, tally):
    colours = random_colours(rng, N_CVD)
    ours = run(driver, "sim", colours)
    assert len(ours) == len(colours)
    for k, cvd in enumerate(CVD_TYPES):
        space = {"name": "sRGB1+CVD", "cvd_type": cvd, "severity": 100}
        ref = numpy.clip(cspace_convert(numpy.array(colours) / 255.0, space,
                                        "sRGB1"), 0, 1)
        for rgb, mine, want in zip(colours, ours, ref):
            got = numpy.array(mine[3 * k:3 * k + 3]) / 255.0
            err = numpy.max(numpy.abs(got - want))
            tally.check(err <= 1 / 255 + 1e-9,
                        "%s %s: ours %s ref %s" % (cvd, rgb, got * 255, want * 255))


def check_lab(driver, rng, tally):
    colours = random_colours(rng, N_LAB)
    ours = run(driver, "lab", colours)
    ref = cspace_convert(numpy.array(colours) / 255.0, "sRGB1", "CIELab")
    for rgb, mine, want in zip(colours, ours, ref):
        err = numpy.max(numpy.abs(numpy.array(mine) - want))
        tally.check(err <= 0.1, "Lab %s: ours %s ref %s" % (rgb, mine, want))


def check_de00(driver, rng, tally):
    try:
        from colormath.color_objects import LabColor
        from colormath.color_diff import delta_e_cie2000
    except ImportError:
        print("colormath not available: CIEDE2000 cross-check skipped")
        return
    numpy.asscalar = lambda a: a.item()  # removed from numpy; colormath calls it

    def lab():
        return (rng.uniform(0, 100), rng.uniform(-100, 100), rng.uniform(-100, 100))

    def near(p):
        return (p[0] + rng.uniform(-10, 10), p[1] + rng.uniform(-10, 10),
                p[2] + rng.uniform(-10, 10))

    far = [lab() + lab() for _ in range(N_DE)]
    pairs = []
    for _ in range(N_DE):
        p = lab()
        pairs.append(p + near(p))
    # Near-neutral pairs on either side of the hue wrap (Sharma et al. 9-16).
    pairs += [(50, rng.uniform(-3, 3), rng.uniform(-0.01, 0.01),
               50, rng.uniform(-3, 3), rng.uniform(-0.01, 0.01)) for _ in range(200)]
    ours = run(driver, "de00", [["%.6f" % v for v in p] for p in pairs + far])
    for k, (p, mine) in enumerate(zip(pairs + far, ours)):
        p = [float("%.6f" % v) for v in p]
        want = delta_e_cie2000(LabColor(*p[:3]), LabColor(*p[3:]))
        tol = 5e-5 if k < len(pairs) else 1e-5 * want
        tally.check(abs(mine[0] - want) <= tol,
                    "dE00 %s: ours %.8f ref %.8f" % (p, mine[0], want))


def main():
    if len(sys.argv) != 2:
        print("usage: cvd_check.py DRIVER", file=sys.stderr)
        return 2
    rng = random.Random(SEED)
    tally = Tally()
    check_cvd(sys.argv[1], rng, tally)
    check_lab(sys.argv[1], rng, tally)
    check_de00(sys.argv[1], rng, tally)
    print("%d passed, %d failed" % (tally.passed, tally.failed))
    return 1 if tally.failed or not tally.passed else 0


if __name__ == "__main__":
    sys.exit(main())
