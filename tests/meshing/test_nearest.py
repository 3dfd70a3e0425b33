"""The numpy nearest-vertex searches give bit for bit what scipy's cKDTree gave (they replace
it to spare a cold start the scipy.spatial import), ties included."""

import numpy as np
import pytest
from scipy.spatial import cKDTree

from coldseam.meshing import sizes
from coldseam.thermal.cutoff import _nodes_at


def _graded_by_kd_tree(xy, vertex_xy, vertex_size, h_max, growth):
    """The former sizes._graded: min over the 8 nearest vertices by cKDTree."""
    k = min(8, len(vertex_size))
    dist, idx = cKDTree(vertex_xy).query(xy, k=k)
    dist, idx = dist.reshape(len(xy), k), idx.reshape(len(xy), k)
    return np.minimum(h_max, np.min(vertex_size[idx] + growth * dist, axis=1))


def _points(rng, count, scale, grid):
    xy = rng.uniform(-1.0, 1.0, (count, 2)) * scale
    # On a coarse grid, many points are equally far from several vertices.
    return np.round(xy / scale * grid) / grid * scale if grid else xy


@pytest.mark.parametrize("seed", range(6))
@pytest.mark.parametrize("vertices", [1, 3, 8, 9, 17, 32, 33, 60])
def test_graded_size_is_the_k_d_trees(seed, vertices):
    rng = np.random.default_rng(seed)
    scale = 10.0 ** rng.uniform(-3, 4)
    grid = 2 if seed % 2 else 0
    vertex_xy = _points(rng, vertices, scale, grid)
    xy = _points(rng, 5000 if seed == 0 else 400, 1.2 * scale, 2 * grid)
    vertex_size = np.round(rng.uniform(0.01, 0.3, vertices) * 20) / 20 * scale
    index = sizes.JunctionIndex(vertex_xy)
    got = sizes._graded(xy, index, vertex_size, 0.2 * scale, 0.5)
    expected = _graded_by_kd_tree(xy, vertex_xy, vertex_size, 0.2 * scale, 0.5)
    assert got.shape == expected.shape
    assert np.array_equal(got, expected)


def test_graded_size_of_no_points_is_empty():
    index = sizes.JunctionIndex(np.array([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]]))
    assert sizes._graded(np.empty((0, 2)), index, np.ones(3), 1.0, 0.5).shape == (0,)


def _nodes_by_kd_tree(dof_points, xy, extent):
    """The former cutoff._nodes_at."""
    dist, idx = cKDTree(dof_points).query(xy)
    return None if np.any(dist > 1e-6 * extent) else idx


@pytest.mark.parametrize("seed", range(20))
def test_nodes_at_points_are_the_k_d_trees(seed):
    rng = np.random.default_rng(seed)
    dof_points = rng.uniform(0.0, 3.0, (int(rng.integers(1, 3000)), 2))
    if seed % 3 == 0:  # repeated points: equally near
        dof_points = np.round(dof_points * 8) / 8
    xy = dof_points[rng.integers(0, len(dof_points), 4)]
    if seed % 2:
        xy = xy + rng.normal(0.0, 1e-6, xy.shape)  # some within 1e-6 · extent, some not
    got, expected = _nodes_at(dof_points, xy, 3.0), _nodes_by_kd_tree(dof_points, xy, 3.0)
    assert (got is None) == (expected is None)
    if got is not None:
        assert np.array_equal(got, expected)
