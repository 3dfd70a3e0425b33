"""DXF drawings are read in a separate process under the memory limit and a time limit."""

from __future__ import annotations

import pickle

import fake_engines
import pytest

from coldseam.api.imports import DrawingReader
from coldseam.errors import InvalidSection, LimitExceeded


def test_typed_errors_keep_their_field_across_processes():
    error = pickle.loads(pickle.dumps(InvalidSection("open polyline", "/layer_map/WALL")))
    assert (type(error), error.message, error.field) == (InvalidSection, "open polyline",
                                                         "/layer_map/WALL")
    reader = DrawingReader(512, function=fake_engines.drawing_refused)
    try:
        with pytest.raises(InvalidSection) as caught:
            reader.read(b"0\nEOF\n", None, None)
        assert caught.value.field == "/layer_map/WALL"
    finally:
        reader.close()


def test_a_drawing_over_the_memory_limit_is_a_413_and_the_next_one_is_read():
    reader = DrawingReader(512, function=fake_engines.drawing_needing_a_terabyte)
    try:
        with pytest.raises(LimitExceeded) as caught:
            reader.read(b"x", None, None)
        assert caught.value.field == "/file" and "512 MiB" in caught.value.message
        reader.function = fake_engines.drawing_read
        assert reader.read(b"abc", None, None)["bytes"] == 3
    finally:
        reader.close()


def test_a_drawing_over_the_time_limit_is_stopped_and_its_process_replaced():
    reader = DrawingReader(512, timeout=2.0, function=fake_engines.drawing_never_finishing)
    try:
        with pytest.raises(LimitExceeded) as caught:
            reader.read(b"x", None, None)
        assert "longer than 2 s" in caught.value.message
        reader.function = fake_engines.drawing_read
        first = reader.read(b"abcd", None, None)
        assert first["bytes"] == 4
    finally:
        reader.close()
