"""Labels of the picture placed so that none covers another: the θsi,min marks first, then
one label per isotherm piece where it finds room ("12.5 °C", along the line).

Every placed label's box on the canvas (measured by the renderer, in pixels) is kept in
``Occupied``; a candidate position is taken only when its box, grown by a small gap, meets no
box placed before and lies inside the plot.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from matplotlib.text import Text
from matplotlib.transforms import Bbox

#: Gap kept between two labels, pixels.
GAP = 3.0
#: Where along an isotherm piece a label is tried, as fractions of its length.
SPOTS = (0.5, 0.35, 0.65, 0.2, 0.8, 0.1, 0.9)
#: Offsets (points) tried for a mark's label, nearest first, in eight directions.
MARK_OFFSETS = tuple((r * dx, r * dy) for r in (26, 40, 58, 80)
                     for dx, dy in ((1, 1), (-1, 1), (1, -1), (-1, -1), (1, 0), (-1, 0),
                                    (0, 1), (0, -1)))


@dataclass
class Occupied:
    """Boxes (pixels) already taken on the canvas, and the plot area labels must stay in."""

    area: Bbox
    boxes: list[Bbox] = field(default_factory=list)

    def free(self, box: Bbox) -> bool:
        grown = box.expanded(1.0, 1.0).padded(GAP)
        inside = (box.x0 >= self.area.x0 and box.x1 <= self.area.x1 and
                  box.y0 >= self.area.y0 and box.y1 <= self.area.y1)
        return inside and not any(grown.overlaps(other) for other in self.boxes)

    def take(self, box: Bbox) -> None:
        self.boxes.append(box)


def occupied_for(ax, renderer) -> Occupied:
    ax.apply_aspect()
    return Occupied(ax.get_window_extent(renderer))


def mark_point(ax, point, occupied: Occupied, size: float = 9.0) -> None:
    """Reserve the square around a marker at ``point`` (data units), ``size`` pixels."""
    x, y = ax.transData.transform(point)
    occupied.take(Bbox.from_bounds(x - size / 2, y - size / 2, size, size))


def place_mark_label(ax, point, text: str, occupied: Occupied, renderer, **style):
    """An annotation of ``point`` at the nearest offset where it covers no other label (the
    last offset tried when none is free)."""
    note = None
    for dx, dy in MARK_OFFSETS:
        if note is not None:
            note.remove()
        note = ax.annotate(text, xy=point, xytext=(dx, dy), textcoords="offset points",
                           ha="left" if dx > 0 else "right" if dx < 0 else "center",
                           va="bottom" if dy > 0 else "top" if dy < 0 else "center", **style)
        note.update_positions(renderer)  # place the text at its offset before measuring
        box = Text.get_window_extent(note, renderer)  # the text alone, not its leader line
        if occupied.free(box):
            break
    occupied.take(box)
    return note


def label_isotherms(ax, contour, occupied: Occupied, renderer, fontsize: float = 6.5) -> int:
    """A label on the longest piece of each isotherm where it is free, and on one more piece
    when that is long too (a quarter of the plot's diagonal); returns how many were placed."""
    placed = 0
    diagonal = math.hypot(occupied.area.width, occupied.area.height)
    for level, path in zip(contour.levels, contour.get_paths(), strict=False):
        text = f"{level:g} °C"
        pieces = sorted((p for p in path.to_polygons(closed_only=False) if len(p) >= 2),
                        key=lambda p: -_length(ax, p))
        on_level = 0
        for rank, piece in enumerate(pieces):
            if on_level == 2 or (rank > 0 and _length(ax, piece) < diagonal / 4):
                break
            if _place_on(ax, piece, text, occupied, renderer, fontsize):
                on_level += 1
        placed += on_level
    return placed


def _length(ax, piece: np.ndarray) -> float:
    return float(np.linalg.norm(np.diff(ax.transData.transform(piece), axis=0), axis=1).sum())


def _place_on(ax, piece: np.ndarray, text: str, occupied: Occupied, renderer,
              fontsize: float) -> bool:
    pixels = ax.transData.transform(piece)
    steps = np.linalg.norm(np.diff(pixels, axis=0), axis=1)
    total = float(steps.sum())
    if total < 4 * fontsize * len(text) * 0.3:
        return False  # too short to carry its label
    cumulative = np.concatenate([[0.0], np.cumsum(steps)])
    for spot in SPOTS:
        k = int(np.clip(np.searchsorted(cumulative, spot * total), 1, len(pixels) - 1))
        (x0, y0), (x1, y1) = pixels[k - 1], pixels[k]
        angle = math.degrees(math.atan2(y1 - y0, x1 - x0))
        angle = angle - 180 if angle > 90 else angle + 180 if angle < -90 else angle
        at = ax.transData.inverted().transform(((x0 + x1) / 2, (y0 + y1) / 2))
        label = ax.text(*at, text, fontsize=fontsize, rotation=angle, rotation_mode="anchor",
                        ha="center", va="center", zorder=5, color="0.05",
                        bbox={"boxstyle": "round,pad=0.15", "facecolor": "white",
                              "alpha": 0.75, "edgecolor": "none"})
        box = label.get_window_extent(renderer)
        if occupied.free(box):
            occupied.take(box)
            return True
        label.remove()
    return False
