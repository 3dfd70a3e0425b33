"""Finite elements for 2D conduction (steady, harmonic and transient): meshes, P1/P2 spaces, assembly, solvers.

Knows nothing of buildings: only triangles, conductivities and boundary conductances.
"""
