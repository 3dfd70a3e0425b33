"""The stored field: binary arrays, and the same JSON as the field's lists when asked for."""

import json
import zlib
from pathlib import Path

import numpy as np

from coldseam.api import fieldpack
from coldseam.api.store import Store, _compact
from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


def _evaluation():
    return evaluate(parse_request(json.loads((EXAMPLES / "thin-bridge.json").read_text())))


def test_the_stored_arrays_answer_the_same_json_as_the_lists():
    evaluation = _evaluation()
    assert isinstance(evaluation.arrays["triangles"], np.ndarray)
    packed = fieldpack.pack(evaluation.arrays)
    assert fieldpack.to_json(packed).decode() == _compact(evaluation.field)
    assert len(packed) < len(_compact(evaluation.field))
    back = fieldpack.unpack(packed)
    assert list(back) == list(evaluation.field)
    assert np.array_equal(back["points"], np.asarray(evaluation.field["points"]))


def test_a_field_stored_as_compressed_json_is_still_read():
    field = {"unit": "m", "points": [[0.0, 0.1]], "temperature": [19.5]}
    legacy = zlib.compress(_compact(field).encode(), 6)
    assert json.loads(fieldpack.to_json(legacy)) == field
    assert fieldpack.unpack(legacy) == field


def test_the_store_keeps_arrays_and_answers_json(tmp_path):
    evaluation = _evaluation()
    store = Store(tmp_path / "s.sqlite")
    store.queue("k", "id", "", "name", "{}")
    store.finish("k", evaluation.result, evaluation.arrays, None)
    assert json.loads(store.field("k")) == json.loads(_compact(evaluation.field))
    store.close()
