"""Triangle meshes as frozen dataclasses of numpy arrays, and their uniform refinement."""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np


@dataclass(frozen=True)
class Mesh:
    """A conforming linear triangle mesh.

    points: (N, 2) coordinates in metres.
    triangles: (E, 3) node indices, counter-clockwise.
    material: (E,) index of each triangle's material.
    boundary_edges: (B, 2) node indices of the exposed boundary edges.
    boundary_group: (B,) index of the exposed boundary (group) each edge belongs to.
    """

    points: np.ndarray
    triangles: np.ndarray
    material: np.ndarray
    boundary_edges: np.ndarray
    boundary_group: np.ndarray

    def __post_init__(self) -> None:
        if self.points.ndim != 2 or self.points.shape[1] != 2:
            raise ValueError("points must be (N, 2)")
        if self.triangles.ndim != 2 or self.triangles.shape[1] != 3:
            raise ValueError("triangles must be (E, 3)")
        if len(self.material) != len(self.triangles):
            raise ValueError("one material index per triangle")
        if len(self.boundary_group) != len(self.boundary_edges):
            raise ValueError("one group per boundary edge")
        if len(self.triangles) and (self.triangles.min() < 0 or
                                    self.triangles.max() >= len(self.points)):
            raise ValueError("triangle node index out of range")
        if np.any(signed_areas(self.points, self.triangles) <= 0):
            raise ValueError("triangles must be counter-clockwise with positive area")
        for array in (self.points, self.triangles, self.material,
                      self.boundary_edges, self.boundary_group):
            array.setflags(write=False)

    @property
    def nodes(self) -> int:
        return len(self.points)

    @property
    def elements(self) -> int:
        return len(self.triangles)

    @cached_property
    def sides(self) -> tuple[np.ndarray, np.ndarray]:
        """``unique_edges(triangles)``, computed once per mesh."""
        return unique_edges(self.triangles)


def signed_areas(points: np.ndarray, triangles: np.ndarray) -> np.ndarray:
    """Signed area of each triangle (positive when counter-clockwise), m²."""
    p0, p1, p2 = (points[triangles[:, k]] for k in range(3))
    d1, d2 = p1 - p0, p2 - p0
    return 0.5 * (d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0])


def unique_edges(triangles: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Edges of a triangulation: (M, 2) sorted node pairs and the (E, 3) edge of each side.

    Side k of a triangle joins its local nodes (k, k+1 mod 3)... ordered as
    (0-1, 1-2, 2-0).
    """
    sides = np.stack([triangles[:, [0, 1]], triangles[:, [1, 2]], triangles[:, [2, 0]]], axis=1)
    flat = np.sort(sides.reshape(-1, 2), axis=1).astype(np.int64)
    n = int(flat.max(initial=0)) + 1
    # One int64 key per pair: a 1-D unique is several times faster than unique(axis=0) and
    # sorts the same way (lexicographically by lower, then higher node).
    keys, inverse = np.unique(flat[:, 0] * n + flat[:, 1], return_inverse=True)
    edges = np.column_stack([keys // n, keys % n]).astype(triangles.dtype)
    return edges, inverse.reshape(-1, 3)


def edge_lookup(edges: np.ndarray, pairs: np.ndarray) -> np.ndarray:
    """Index in ``edges`` (sorted unique pairs) of each node pair in ``pairs``."""
    n = int(max(edges.max(initial=0), pairs.max(initial=0))) + 1
    keys = edges[:, 0].astype(np.int64) * n + edges[:, 1]
    sorted_pairs = np.sort(pairs, axis=1)
    wanted = sorted_pairs[:, 0].astype(np.int64) * n + sorted_pairs[:, 1]
    index = np.searchsorted(keys, wanted)
    if len(wanted) and (np.any(index >= len(keys)) or np.any(keys[np.minimum(index, len(keys) - 1)] != wanted)):
        raise ValueError("a boundary edge is not an edge of the triangulation")
    return index


def refine_uniform(mesh: Mesh) -> Mesh:
    """Split every triangle into four through its edge midpoints (boundaries are straight).

    Existing nodes keep their indices; midpoints are appended, so nodes embedded for probes
    stay where they were.
    """
    edges, tri_edges = unique_edges(mesh.triangles)
    n = mesh.nodes
    midpoints = 0.5 * (mesh.points[edges[:, 0]] + mesh.points[edges[:, 1]])
    points = np.vstack([mesh.points, midpoints])
    a, b, c = mesh.triangles.T
    ab, bc, ca = (tri_edges[:, k] + n for k in range(3))
    triangles = np.concatenate([
        np.stack([a, ab, ca], axis=1), np.stack([ab, b, bc], axis=1),
        np.stack([ca, bc, c], axis=1), np.stack([ab, bc, ca], axis=1),
    ])
    material = np.tile(mesh.material, 4)
    mid = edge_lookup(edges, mesh.boundary_edges) + n
    boundary_edges = np.concatenate([
        np.stack([mesh.boundary_edges[:, 0], mid], axis=1),
        np.stack([mid, mesh.boundary_edges[:, 1]], axis=1),
    ])
    boundary_group = np.tile(mesh.boundary_group, 2)
    return Mesh(points, triangles, material, boundary_edges, boundary_group)
