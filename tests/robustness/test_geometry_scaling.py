"""Geometry checks and the size plan on sections of thousands of vertices: indexed (STRtree,
k-d trees, positions along split segments) instead of every point against every segment, with
the same outcome as the plain checks, and work per vertex that stays flat as the section grows.
Times are in ``bench/geometry_checks.py``."""

from __future__ import annotations

import json

import numpy as np
import pytest
import shapely
from robust_support import REPO
from sections import wavy_wall

import coldseam.geometry.outline as outline
import coldseam.meshing.sizes as sizes
from coldseam.geometry.partition import build_partition
from coldseam.schema import parse_request
from coldseam.templates import build, list_templates
from coldseam.thermal.model import prepare


def _template_requests() -> list[dict]:
    ids = [t["id"] if isinstance(t, dict) else t.as_dict()["id"] for t in list_templates()]
    return [build(template, {}) for template in ids]


def _requests() -> list[dict]:
    case2 = json.loads((REPO / "examples" / "iso10211-case2.json").read_text())
    return [{"section": wavy_wall(300)}, {"section": wavy_wall(700)}, case2,
            *_template_requests()]


def test_a_section_of_5000_vertices_validates():
    request = parse_request({"section": wavy_wall(5000)})
    classified = prepare(request).classified
    # the wave's 4 999 segments and the 4 999 pieces of the split interior face are exposed
    assert sum(1 for b in classified.exposure.values() if b == 0) == 4999
    assert sum(1 for b in classified.exposure.values() if b == 1) == 4999
    assert all(face is not None for face in classified.probe_faces)
    assert len(classified.probe_faces) == 100


def _classified(request: dict, indexed: bool, monkeypatch) -> outline.Classified:
    with monkeypatch.context() as patch:
        if not indexed:
            patch.setattr(outline, "RingIndex", lambda partition: None)
        parsed = parse_request(request)
        return outline.classify(parsed.section, build_partition(parsed.section))


@pytest.mark.parametrize("request_index", range(len(_requests())))
def test_the_indexed_outline_checks_give_what_the_plain_ones_give(request_index, monkeypatch):
    request = _requests()[request_index]
    fast, plain = (_classified(request, indexed, monkeypatch) for indexed in (True, False))
    assert np.array_equal(fast.partition.points, plain.partition.points)
    assert [f.rings for f in fast.partition.faces] == [f.rings for f in plain.partition.faces]
    assert fast.exposure == plain.exposure and fast.adiabatic == plain.adiabatic
    assert fast.probe_points == plain.probe_points and fast.probe_faces == plain.probe_faces
    assert fast.symmetry == plain.symmetry


def test_paths_split_near_and_between_vertices_alike(monkeypatch):
    # path points a hair from vertices, a hair off the face, twice at one place, backwards
    section = wavy_wall(200)
    inner = section["boundaries"][1]["path"]
    section["boundaries"][1]["path"] = ([[1000 + 1e-9, y + 1e-9] for _, y in inner[::3]]
                                        + [[1000, 1234.5], [1000, 1234.5]] + inner[::-7])
    fast, plain = (_classified({"section": section}, indexed, monkeypatch)
                   for indexed in (True, False))
    assert np.array_equal(fast.partition.points, plain.partition.points)
    assert [f.rings for f in fast.partition.faces] == [f.rings for f in plain.partition.faces]
    assert fast.exposure == plain.exposure


def _sample_points(classified):
    part = classified.partition
    seg = np.array(list(part.segments()), int)
    t = np.linspace(0, 1, sizes.SAMPLES)
    a, b = part.points[seg[:, 0]], part.points[seg[:, 1]]
    xy = (a[:, None, :] + t[None, :, None] * (b - a)[:, None, :]).reshape(-1, 2)
    return part.points, seg, xy, np.repeat(seg, sizes.SAMPLES, axis=0)


@pytest.mark.parametrize("request_index", range(len(_requests())))
def test_indexed_local_feature_sizes_are_the_same_numbers(request_index):
    classified = prepare(parse_request(_requests()[request_index])).classified
    points, seg, xy, own = _sample_points(classified)
    assert np.array_equal(sizes._local_feature_size_indexed(points, seg, xy, own),
                          sizes._local_feature_size_all(points, seg, xy, own))
    junctions = sizes.junction_vertices(classified)
    vertex_xy, ends = points[junctions], np.column_stack([junctions, junctions])
    assert np.array_equal(sizes._local_feature_size_indexed(points, seg, vertex_xy, ends),
                          sizes._local_feature_size_all(points, seg, vertex_xy, ends))


def test_the_distance_test_to_a_path_through_its_pieces_is_the_plain_one():
    rng = np.random.default_rng(7)
    path = shapely.LineString(np.cumsum(rng.normal(size=(400, 2)), axis=0))
    points = shapely.points(rng.uniform(-20, 20, size=(5000, 2)))
    for tol in (1e-3, 0.1, 1.0):
        assert np.array_equal(outline._near_line(path, points, tol),
                              shapely.distance(path, points) <= tol)


def _work(n: int, monkeypatch) -> tuple[float, float]:
    """Pieces looked at per path point while the outline is split, and point-segment
    distances per sample point in the size plan's local feature sizes."""
    counts = {"pieces": 0, "split": 0, "pairs": 0, "samples": 0}
    pieces_near, pair_distances = outline.RingIndex._pieces_near, sizes._pair_distances
    indexed = sizes._local_feature_size_indexed

    def count_pieces(self, original, p, reach):
        found = pieces_near(self, original, p, reach)
        counts["pieces"] += len(found)
        return found

    def count_split(self, p, tol):
        counts["split"] += 1
        return split_at(self, p, tol)

    def count_pairs(xy, a, b, seg_array, own, row, seg):
        counts["pairs"] += len(row)
        return pair_distances(xy, a, b, seg_array, own, row, seg)

    def count_samples(points, seg_array, xy, own):
        counts["samples"] += len(xy)
        return indexed(points, seg_array, xy, own)

    split_at = outline.RingIndex.split_at
    with monkeypatch.context() as patch:
        patch.setattr(outline.RingIndex, "_pieces_near", count_pieces)
        patch.setattr(outline.RingIndex, "split_at", count_split)
        patch.setattr(sizes, "_pair_distances", count_pairs)
        patch.setattr(sizes, "_local_feature_size_indexed", count_samples)
        classified = prepare(parse_request({"section": wavy_wall(n)})).classified
        sizes._plan(classified, 1.0)
    return counts["pieces"] / counts["split"], counts["pairs"] / counts["samples"]


def test_the_work_per_vertex_stays_flat_as_the_section_grows(monkeypatch):
    # all pairs would make both grow fourfold from 1 000 to 4 000 vertices
    small, large = _work(1000, monkeypatch), _work(4000, monkeypatch)
    assert large[0] <= 1.5 * small[0], (small, large)
    assert large[1] <= 1.5 * small[1], (small, large)
