"""meshing"""
