"""What the plot-panel test on runs costs, printed as ratios measured side by side.

    python bench/bench_panel.py

A 3840 x 2160 stacked-bar chart on a grey plot panel (face #ebebeb, white grid,
no axes edge; the bars cover most of the panel, so its grey is under the 30 % a
panel is found by on area alone and the test on runs decides) is drawn here with
matplotlib from an invented palette, as PNG and as JPEG (quality 90). For each:
Pillow's open, decode and RGB conversion; the reading (:func:`palettecheck.read_image`);
and :func:`palettecheck.read.spans.span_measures` alone on the reader's runs, once
per grey the test looks at (the panel; a JPEG's grey too). Medians of interleaved
repeats, so every side sees the same machine load.
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

import numpy as np
from bench_scan import interleaved  # medians of interleaved repeats, as every bench here

PALETTE = ["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b"]  # invented
PANEL_STYLE = {
    "figure.facecolor": "#ffffff", "axes.facecolor": "#ebebeb", "axes.edgecolor": "#ebebeb",
    "axes.linewidth": 0.0, "axes.spines.left": False, "axes.spines.right": False,
    "axes.spines.top": False, "axes.spines.bottom": False, "axes.grid": True,
    "axes.axisbelow": True, "grid.color": "#ffffff", "grid.linewidth": 1.0,
}


def draw(folder: Path) -> list[Path]:
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    rng = np.random.default_rng(5)
    with matplotlib.rc_context(PANEL_STYLE):
        fig = Figure(figsize=(12.8, 7.2), dpi=300)
        ax = fig.add_subplot()
        bottom = np.zeros(12)
        for i, c in enumerate(PALETTE):
            v = rng.uniform(1, 4, 12)
            ax.bar(np.arange(12), v, bottom=bottom, color=c, label=f"Shift {i + 1}")
            bottom += v
        ax.legend()
        ax.set_title("Invented shift hours")
    paths = [folder / "panel.png", folder / "panel.jpg"]
    fig.savefig(paths[0])
    fig.savefig(paths[1], pil_kwargs={"quality": 90})
    return paths


def main() -> int:
    from PIL import Image

    import palettecheck
    from palettecheck.read.spans import span_measures

    with tempfile.TemporaryDirectory(prefix="bench-panel-") as tmp:
        for path in draw(Path(tmp)):
            reading = palettecheck.read_image(path)
            counts = palettecheck.read.raster.read_counts(path)
            # the panel's grey and the page, per distinct colour of the reader (as
            # extract sees them, up to the page's compression noise)
            rgb = counts.rgba[:, :3]
            member = np.abs(rgb - 235.0).max(axis=1) <= 4.0
            page = np.abs(rgb - 255.0).max(axis=1) <= 7.0

            def pillow():
                with Image.open(path) as im:
                    im.convert("RGB")

            t_pil, t_read, t_span = interleaved(
                [pillow, lambda: palettecheck.read_image(path),
                 lambda: span_measures(counts.scanlines, member, page)], 7)
            print(f"{path.suffix[1:].upper()} 3840x2160 bars on a grey panel: panels read {reading.panels}, "
                  f"grey data {[h for h, _ in reading.grey_data]}")
            print(f"  Pillow open+decode+RGB {t_pil * 1000:.0f} ms, reading {t_read * 1000:.0f} ms, "
                  f"one panel test on runs {t_span * 1000:.1f} ms")
            print(f"  ratio panel test / reading: {t_span / t_read:.3f}x; reading / Pillow decode: "
                  f"{t_read / t_pil:.2f}x")
    return 0


if __name__ == "__main__":
    sys.exit(main())
