"""Write examples/demo-parapet.dxf: the parapet junction of the (invented) Harrowgate Lane
Library, a flat concrete roof meeting an externally insulated blockwork wall.

Coordinates in mm ($INSUNITS = 4): x from the outside face inwards, y upwards. Layers:
RENDER, MINERAL-WOOL, BLOCKWORK, CONCRETE (with a hatch over its outline), PIR, PLASTER,
TIMBER (a batten, placed as a block), SURF-EXT, SURF-INT-WALL, SURF-INT-CEILING, NOTES.
``examples/demo-parapet-layers.json`` holds a layer map for it. Run:

    PYTHONHASHSEED=0 python examples/make_demo_dxf.py

(the seed only keeps the bytes stable: ezdxf writes its CLASSES section in set order).
"""

from __future__ import annotations

import json
from pathlib import Path

import ezdxf

HERE = Path(__file__).parent
#: (layer, x0, y0, x1, y1) in mm, in drawing order: later outlines win where they overlap.
LAYERS = [
    ("RENDER", 0, 0, 15, 2900),
    ("MINERAL-WOOL", 15, 0, 155, 2900),
    ("BLOCKWORK", 155, 0, 355, 2000),
    ("CONCRETE", 155, 2000, 1700, 2250),
    ("BLOCKWORK", 155, 2250, 355, 2900),
    ("PIR", 355, 2250, 1700, 2410),
    ("PIR", 355, 2410, 415, 2900),
    ("PIR", 0, 2900, 415, 2960),
    ("PLASTER", 355, 0, 368, 2000),
    ("PLASTER", 368, 1987, 1700, 2000),
]
LAYER_MAP = {
    "RENDER": {"material": "render", "conductivity": 0.87},
    "MINERAL-WOOL": {"material": "mineral-wool", "conductivity": 0.035},
    "BLOCKWORK": {"material": "dense-block", "conductivity": 1.13},
    "CONCRETE": {"material": "reinforced-concrete", "conductivity": 2.3},
    "PIR": {"material": "pir", "conductivity": 0.022},
    "PLASTER": {"material": "gypsum-plaster", "conductivity": 0.4},
    "TIMBER": {"material": "softwood", "conductivity": 0.13, "order": 1},
    "SURF-EXT": {"environment": "outside", "temperature": -5, "side": "exterior",
                 "surface_resistance": 0.04},
    "SURF-INT-WALL": {"environment": "library", "temperature": 20, "side": "interior",
                      "surface_resistance": 0.13},
    "SURF-INT-CEILING": {"environment": "library", "temperature": 20, "side": "interior",
                         "surface_resistance": 0.10},
    "NOTES": {"ignore": True},
}


def rectangle(x0: float, y0: float, x1: float, y1: float) -> list[tuple[float, float]]:
    return [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]


def build() -> ezdxf.document.Drawing:
    doc = ezdxf.new("R2018", units=4)
    msp = doc.modelspace()
    for layer, *box in LAYERS:
        msp.add_lwpolyline(rectangle(*box), close=True, dxfattribs={"layer": layer})
        if layer == "CONCRETE":
            hatch = msp.add_hatch(color=8, dxfattribs={"layer": layer})
            hatch.paths.add_polyline_path(rectangle(*box), is_closed=True)
    batten = doc.blocks.new("BATTEN-50x38")
    batten.add_lwpolyline(rectangle(0, 0, 38, 50), close=True, dxfattribs={"layer": "0"})
    msp.add_blockref("BATTEN-50x38", (365, 2850), dxfattribs={"layer": "TIMBER"})
    msp.add_lwpolyline([(0, 0), (0, 2960), (415, 2960), (415, 2410), (1700, 2410)],
                       dxfattribs={"layer": "SURF-EXT"})
    msp.add_line((368, 0), (368, 1987), dxfattribs={"layer": "SURF-INT-WALL"})
    msp.add_line((368, 1987), (1700, 1987), dxfattribs={"layer": "SURF-INT-CEILING"})
    msp.add_text("Harrowgate Lane Library - parapet junction (demo, invented)", height=40,
                 dxfattribs={"layer": "NOTES", "insert": (0, 3100)})
    return doc


def main() -> None:
    ezdxf.options.write_fixed_meta_data_for_testing = True  # no dates or GUIDs: same bytes
    build().saveas(HERE / "demo-parapet.dxf")
    (HERE / "demo-parapet-layers.json").write_text(json.dumps(LAYER_MAP, indent=2) + "\n")


if __name__ == "__main__":
    main()
