"""The numeric tables of an output profile, computed from a printing condition.

:func:`profile_tables` evaluates the forward model on the A2B device grid, the
inverse with each rendering intent on the B2A CIELAB grid, and the gamut tag,
and returns them as plain float arrays for the ICC writer
(:mod:`inkshift.icc.write`). All CIELAB in the tables is media-relative D50.

* A2B0, A2B1 and A2B2 are the same colorimetric table (the forward model): the
  profile describes what the press prints, whatever intent made the device values.
* B2A1 (relative colorimetric), B2A0 (perceptual) and B2A2 (saturation) follow
  :mod:`inkshift.printing.gamut_mapping` and :mod:`inkshift.printing.separation`;
  absolute colorimetric is served by B2A1 through the media white point.
* gamt is 0 where the relative-colorimetric inverse reproduces the node within
  :data:`GAMUT_TOLERANCE_DE00`, else 1.

Deterministic: no random numbers are used, so rebuilding gives identical arrays.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from inkshift.color.convert import D50_XYZ, lab_to_xyz
from inkshift.icc.encoding import legacy16_lab_grid
from inkshift.icc.intent import Intent
from inkshift.icc.write import ProfileTables
from inkshift.printing.conditions import Condition
from inkshift.printing.gamut_mapping import clip_to_gamut, in_gamut, map_intent, printer_gamut_boundary
from inkshift.printing.neugebauer import HalftoneModel, device_to_lab, halftone_model
from inkshift.printing.separation import print_black, separate

__all__ = ["GAMUT_TOLERANCE_DE00", "GBD_MARGIN_CHROMA", "GRAY_A2B_POINTS", "ProfileTables", "profile_tables", "relative_colorimetric"]

GAMUT_TOLERANCE_DE00 = 1.0
"""CIEDE2000 within which a colour counts as reproducible (in gamut): about one just noticeable
difference under good viewing (common practice)."""
GBD_MARGIN_CHROMA = 4.0
"""Chroma by which a colour may lie outside the boundary descriptor and still be tried by the
solver: larger than the descriptor's binning error (checked in tests/test_separation.py)."""
GRAY_A2B_POINTS = 256
"""Entries of the one-dimensional A2B table of a one-ink condition."""


def relative_colorimetric(model: HalftoneModel, lab: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Return device values for media-relative CIELAB by the relative intent, and the in-gamut test.

    Each colour near or inside the gamut boundary descriptor is first separated as it is; where the result misses it by more than
    :data:`GAMUT_TOLERANCE_DE00`, the colour is out of gamut, is clipped onto the gamut
    boundary (hue-preserving minimum CIEDE2000) and separated again.

    Returns
    -------
    (device, out_of_gamut)
        Device values ``(..., k)`` and a boolean array ``(...)``.
    """
    lab = np.asarray(lab, dtype=np.float64)
    shape = lab.shape[:-1]
    flat = lab.reshape(-1, 3)
    gbd = printer_gamut_boundary(model)
    # Only colours near or inside the boundary descriptor can be reproducible; the rest are
    # out of gamut without asking the solver.
    out = ~in_gamut(gbd, flat, GBD_MARGIN_CHROMA)
    near = np.nonzero(~out)[0]
    device = np.empty((len(flat), model.n_inks))
    if near.size:
        first = separate(model, flat[near])
        device[near] = first.device
        out[near] = first.delta_e > GAMUT_TOLERANCE_DE00
    if out.any():
        device[out] = separate(model, clip_to_gamut(gbd, flat[out])).device
    return device.reshape(shape + (model.n_inks,)), out.reshape(shape)


def _device_grid(points: int, n_inks: int) -> NDArray[np.float64]:
    axis = np.linspace(0.0, 1.0, points)
    return np.stack(np.meshgrid(*([axis] * n_inks), indexing="ij"), axis=-1)


def profile_tables(condition: Condition, *, a2b_points: int = 17, b2a_points: int = 33) -> ProfileTables:
    """Compute the A2B, B2A and gamut tables of a condition's output profile.

    Parameters
    ----------
    condition
        A validated printing condition.
    a2b_points
        Grid nodes per device axis of the A2B tables (CMYK); a one-ink condition uses
        :data:`GRAY_A2B_POINTS`.
    b2a_points
        Grid nodes per CIELAB axis of the B2A and gamut tables, at the lut16 legacy
        encoding's nodes (:func:`inkshift.icc.encoding.legacy16_lab_grid`).
    """
    model = halftone_model(condition)
    k = model.n_inks
    points = GRAY_A2B_POINTS if k == 1 else a2b_points
    a2b_table = device_to_lab(model, _device_grid(points, k))
    a2b = {int(i): a2b_table for i in (Intent.PERCEPTUAL, Intent.RELATIVE, Intent.SATURATION)}

    grid = legacy16_lab_grid(b2a_points)
    flat = grid.reshape(-1, 3)
    gbd = printer_gamut_boundary(model)
    rel_device, out = relative_colorimetric(model, flat)
    b2a = {int(Intent.RELATIVE): rel_device}
    for intent in (Intent.PERCEPTUAL, Intent.SATURATION):
        b2a[int(intent)] = separate(model, map_intent(gbd, flat, intent)).device
    shape = grid.shape[:-1]
    b2a = {i: np.clip(t, 0.0, 1.0).reshape(shape + (k,)) for i, t in sorted(b2a.items())}

    black_rel = lab_to_xyz(print_black(model)[1])
    return ProfileTables(
        description=condition.description,
        copyright=f"{condition.licence}; built by inkshift from the printing condition '{condition.name}'",
        color_space="GRAY" if k == 1 else "CMYK",
        media_white_xyz=model.paper_xyz.copy(),
        media_black_xyz=black_rel * model.paper_xyz / D50_XYZ,
        a2b=a2b,
        b2a=b2a,
        gamut=out.astype(np.float64).reshape(shape + (1,)),
    )
