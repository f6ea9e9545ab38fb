"""The yardstick for `make bench`: the README's 100-cell waffle
(layouts/pantry.yaml) drawn to PNG by a short script on a general plotting
library (Debian's python3-matplotlib, Agg backend) - the few lines an analyst
would otherwise write. Same cells (largest remainder over 100), colours,
title, subtitle, key and pixel size as `unitgram draw pantry.yaml -o x.png`;
no glyph shapes (squares), so the comparison flatters the script.

Usage: waffle_plot.py LAYOUT OUT.png WIDTH HEIGHT
"""
import sys

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import yaml  # noqa: E402
from matplotlib.patches import Rectangle  # noqa: E402

layout_path, out, width, height = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
with open(layout_path) as f:
    layout = yaml.safe_load(f)
cats = layout["categories"]
cells, cols = layout.get("cells", 100), layout.get("columns", 10)
total = sum(c["count"] for c in cats)
quota = [cells * c["count"] / total for c in cats]
got = [int(q) for q in quota]
for i in sorted(range(len(cats)), key=lambda i: got[i] - quota[i])[: cells - sum(got)]:
    got[i] += 1

fig = plt.figure(figsize=(width / 100, height / 100), dpi=100)
ax = fig.add_axes([0, 0, 1, 1])
ax.set_xlim(0, width)
ax.set_ylim(height, 0)
ax.axis("off")
ax.text(40, 50, layout["title"], fontsize=16, weight="bold")
ax.text(40, 80, layout["subtitle"], fontsize=11)
k = 0
for c, n in zip(cats, got):
    for _ in range(n):
        ax.add_patch(Rectangle((40 + k % cols * 28, 110 + k // cols * 28), 24, 24,
                               color=c["color"]))
        k += 1
for j, (c, n) in enumerate(zip(cats, got)):
    y = 420 + j * 30
    ax.add_patch(Rectangle((40, y), 20, 20, color=c["color"]))
    ax.text(70, y + 15, f'{c["label"]}: {c["count"]} households', fontsize=11)
ax.text(40, height - 30, "Source: " + layout["source"], fontsize=9)
fig.savefig(out)
