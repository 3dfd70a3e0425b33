"""Finite elements for steady 2D conduction: meshes, P1/P2 spaces, assembly, solvers.

Knows nothing of buildings: only triangles, conductivities and boundary conductances.
"""
