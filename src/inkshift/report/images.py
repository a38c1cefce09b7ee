"""The picture outputs of a proof, gathered in one place.

- :func:`heatmap_overlay` and :func:`scalar_map` (in :mod:`inkshift.report.heatmap`):
  full-resolution maps in the project's heat scale with one shared legend.
- :class:`Swatch`, :func:`side_by_side` and :func:`swatch_sheet` (in
  :mod:`inkshift.report.sheets`): previews and labelled swatch pairs.
- Full-size pictures written to PNG band by band, never held whole:
  :func:`heatmap_bands` (heat map), :func:`scalar_bands` (a map of values in
  the heat scale) and :func:`rgb_bands` (any RGB map, in
  :mod:`inkshift.report.sheets`) give the bands, :func:`write_png_bands` (in
  :mod:`inkshift.report.png`) writes them.

The other functions return Pillow images; callers save them with
:func:`inkshift.files.save_image_atomic`.
"""

from __future__ import annotations

from inkshift.report.heatmap import (
    HEAT_FLOOR_DELTA_E,
    HEAT_OPAQUE_DELTA_E,
    HEATMAP_VMAX_DEFAULT,
    heatmap_bands,
    heatmap_overlay,
    legend_strip,
    scalar_bands,
    scalar_map,
)
from inkshift.report.png import write_png_bands
from inkshift.report.sheets import Swatch, rgb_bands, side_by_side, swatch_sheet

__all__ = [
    "heatmap_overlay",
    "heatmap_bands",
    "rgb_bands",
    "write_png_bands",
    "scalar_map",
    "scalar_bands",
    "legend_strip",
    "Swatch",
    "side_by_side",
    "swatch_sheet",
    "HEAT_FLOOR_DELTA_E",
    "HEAT_OPAQUE_DELTA_E",
    "HEATMAP_VMAX_DEFAULT",
]
