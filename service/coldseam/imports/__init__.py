"""Importers that turn drawings into section models."""
