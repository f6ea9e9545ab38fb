#!/usr/bin/python3
"""Expected colour areas of a handout page, from its allocation.

usage: page_areas.py PAGE.svg PAGE.html
For every category drawn with the plain square glyph, prints "RRGGBB AREA":
(icons the web page's table lists, over all groups, plus the one key swatch)
times the chart's icon size squared, in CSS px at 96 per inch. The tables
are the allocation report; the SVG gives each category's colour and the
chart's icon size. Categories sharing a colour are summed; a colour also
used by a glyph of another shape is left out.
"""
import sys
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

SVG = "{http://www.w3.org/2000/svg}"


class Tables(HTMLParser):
    """Rows of every <table>: [table][row] = cells as text."""

    def __init__(self):
        super().__init__()
        self.tables, self.cell = [], None

    def handle_starttag(self, tag, attrs):
        if tag == "table":
            self.tables.append([])
        elif tag == "tr" and self.tables:
            self.tables[-1].append([])
        elif tag in ("td", "th"):
            self.cell = ""

    def handle_endtag(self, tag):
        if tag in ("td", "th") and self.cell is not None:
            self.tables[-1][-1].append(self.cell.strip())
            self.cell = None

    def handle_data(self, data):
        if self.cell is not None:
            self.cell += data


def charts(svg_path):
    """Per nested chart: icon size and {label: (colour, square?)}."""
    out = []
    for chart in ET.parse(svg_path).getroot().iter(SVG + "svg"):
        if chart.get("role") != "img":
            continue
        symbols = {s.get("id"): s for s in chart.iter(SVG + "symbol")}
        uses = {u.get("id"): u for u in chart.iter(SVG + "use") if u.get("id")}
        size = float(next(iter(uses.values())).get("width"))
        cats = {}
        for g in chart.iter(SVG + "g"):
            title = g.find(SVG + "title")
            first = g.find(SVG + "use")
            if g.get("fill") is None or title is None or first is None:
                continue
            sym = symbols[uses[first.get("href")[1:]].get("href")[1:]]
            body = list(sym)
            square = (len(body) == 1 and body[0].tag == SVG + "rect"
                      and body[0].get("width") == "100"
                      and body[0].get("height") == "100" and body[0].get("x") is None)
            cats[title.text.split(":")[0]] = (g.get("fill").lstrip("#"), square)
        out.append((size, cats))
    return out


def main():
    parser = Tables()
    parser.feed(open(sys.argv[2], encoding="utf-8").read())
    areas, other = {}, set()
    for (size, cats), table in zip(charts(sys.argv[1]), parser.tables):
        header = table[0]
        icons_at, label_at = header.index("Icons"), header.index("Category")
        seen = set()
        for row in table[1:]:
            colour, square = cats[row[label_at]]
            if not square:
                other.add(colour)
                continue
            n = float(row[icons_at]) + (0 if row[label_at] in seen else 1)
            seen.add(row[label_at])
            areas[colour] = areas.get(colour, 0.0) + n * size * size
    for colour, area in sorted(areas.items()):
        if colour not in other:  # a glyph of another shape shares it
            print(colour, round(area, 1))


main()
