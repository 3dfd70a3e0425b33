"""The picture's colour map is the page's: both against the shared samples, and entry by entry
against the page's own module run by node."""

import json
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest

from coldseam.reporting.colours import (
    EXTERIOR_COLOURS,
    INTERIOR_COLOURS,
    lut8,
    thermal_colour_map,
)

ROOT = Path(__file__).resolve().parents[2]
SHARED = json.loads((ROOT / "frontend" / "tests" / "shared-colours.json").read_text())


def test_the_picture_map_matches_the_shared_samples():
    lut = lut8()
    assert len(lut) == SHARED["lut_size"]
    for sample in SHARED["thermal"]:
        assert lut[sample["index"]].tolist() == sample["rgb"], sample["index"]


def test_the_matplotlib_map_draws_those_entries():
    cmap = thermal_colour_map()
    for sample in SHARED["thermal"]:
        rgb = np.round(np.array(cmap(sample["index"])[:3]) * 255).astype(int).tolist()
        assert rgb == sample["rgb"]


@pytest.mark.skipif(shutil.which("node") is None, reason="node runs the page's tests; not here")
def test_every_entry_equals_the_page_module():
    script = ("import('./frontend/js/lib/colormap.js').then((m) => "
              "console.log(JSON.stringify(Array.from(m.buildLut()))))")
    out = subprocess.run(["node", "-e", script], cwd=ROOT, capture_output=True, text=True,
                         check=True, timeout=60)
    page = np.array(json.loads(out.stdout)).reshape(-1, 3)
    assert np.array_equal(page, lut8())


def test_surfaces_have_the_page_colours():
    assert list(INTERIOR_COLOURS) == SHARED["surface_colours"]["interior"]
    assert list(EXTERIOR_COLOURS) == SHARED["surface_colours"]["exterior"]
