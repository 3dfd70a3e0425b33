"""Shared test setup: puts tests/ on sys.path (pytest does so for this conftest's folder),
so test modules can import the section builders in sections.py."""
