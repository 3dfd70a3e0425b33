"""Coldseam's thermal colour map for the picture: the same table the page draws with.

The page defines the map in ``frontend/js/lib/colormap.js``: a path through OKLCH control
points, lightness rising from a deep blue-violet (cold) through teal and green to a pale straw
(warm), gamut-clipped at constant lightness and hue, resampled at equal OKLab arc length. This
module computes the same 256 entries with numpy (OKLab: B. Ottosson, "A perceptual color space
for image processing", 2020); ``tests/reporting/test_colours.py`` checks both against the
samples in ``frontend/tests/shared-colours.json``, which the page's node test checks too.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np
from matplotlib.colors import ListedColormap

#: Surface colours by side, as the page's (frontend/js/palette.js INTERIOR / EXTERIOR): ember
#: for interior surfaces, frost for exterior ones, one after the other per environment.
INTERIOR_COLOURS = ("#d0573a", "#b5432f", "#e07c50")
EXTERIOR_COLOURS = ("#2a6f97", "#3f8fb5", "#1f4f6e")

#: OKLCH control points [L, C, h°], as in colormap.js (CONTROL_LCH).
CONTROL_LCH = ((0.27, 0.10, 285), (0.42, 0.12, 255), (0.56, 0.10, 215), (0.68, 0.11, 170),
               (0.80, 0.13, 125), (0.93, 0.11, 95))
LUT_SIZE = 256
PER_SEGMENT = 64

_LAB_TO_LMS = np.array([[1.0, 0.3963377774, 0.2158037573], [1.0, -0.1055613458, -0.0638541728],
                        [1.0, -0.0894841775, -1.2914855480]])
_LMS_TO_RGB = np.array([[4.0767416621, -3.3077115913, 0.2309699292],
                        [-1.2684380046, 2.6097574011, -0.3413193965],
                        [-0.0041960863, -0.7034186147, 1.7076147010]])


def oklab_to_linear_srgb(lab: np.ndarray) -> np.ndarray:
    """OKLab (..., 3) to linear sRGB (may fall outside 0..1)."""
    return (np.asarray(lab, float) @ _LAB_TO_LMS.T) ** 3 @ _LMS_TO_RGB.T


def _in_gamut(lab) -> bool:
    rgb = oklab_to_linear_srgb(lab)
    return bool(np.all((rgb >= -1e-6) & (rgb <= 1 + 1e-6)))


def clip_to_gamut(lab: np.ndarray) -> np.ndarray:
    """Largest chroma at the same lightness and hue inside sRGB (30 bisection steps)."""
    if _in_gamut(lab):
        return np.asarray(lab, float)
    lo, hi = 0.0, 1.0
    for _ in range(30):
        mid = (lo + hi) / 2
        if _in_gamut([lab[0], lab[1] * mid, lab[2] * mid]):
            lo = mid
        else:
            hi = mid
    return np.array([lab[0], lab[1] * lo, lab[2] * lo])


def _lch_to_lab(lch) -> np.ndarray:
    light, chroma, hue = lch
    rad = np.radians(hue)
    return np.array([light, chroma * np.cos(rad), chroma * np.sin(rad)])


def _dense_path() -> np.ndarray:
    out = []
    for p, q in zip(CONTROL_LCH, CONTROL_LCH[1:], strict=False):
        dh = q[2] - p[2]
        dh = dh - 360 if dh > 180 else dh + 360 if dh < -180 else dh
        for i in range(PER_SEGMENT):
            t = i / PER_SEGMENT
            out.append(clip_to_gamut(_lch_to_lab((p[0] + (q[0] - p[0]) * t,
                                                  p[1] + (q[1] - p[1]) * t, p[2] + dh * t))))
    out.append(clip_to_gamut(_lch_to_lab(CONTROL_LCH[-1])))
    return np.array(out)


def lab_table(n: int = LUT_SIZE) -> np.ndarray:
    """(n, 3) OKLab colours at equal arc length along the path, cold first."""
    path = _dense_path()
    cum = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(path, axis=0), axis=1))])
    targets = cum[-1] * np.arange(n) / (n - 1)
    return np.column_stack([np.interp(targets, cum, path[:, k]) for k in range(3)])


def _gamma(c: np.ndarray) -> np.ndarray:
    c = np.clip(c, 0.0, 1.0)
    return np.where(c <= 0.0031308, 12.92 * c, 1.055 * c ** (1 / 2.4) - 0.055)


@lru_cache(maxsize=1)
def lut8() -> np.ndarray:
    """(256, 3) 8-bit sRGB entries of the map, as the page's ``buildLut``."""
    rgb = _gamma(oklab_to_linear_srgb(lab_table()))
    return np.round(255 * np.clip(rgb, 0, 1)).astype(int)


@lru_cache(maxsize=1)
def thermal_colour_map() -> ListedColormap:
    """The map as a matplotlib colour map (no global registration)."""
    return ListedColormap(lut8() / 255.0, name="coldseam-thermal")
