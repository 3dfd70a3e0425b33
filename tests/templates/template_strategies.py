"""Hypothesis strategies over template parameters, shared by the template tests."""

from hypothesis import reject
from hypothesis import strategies as st

from coldseam.errors import InvalidSection
from coldseam.templates import build, get_template

#: Parameters whose InvalidSection is a cross-parameter rule: such draws are skipped; any
#: other InvalidSection fails the test. (The rules themselves: test_template_registry.py.)
CROSS_CHECKED = {
    "balcony": {"break_thickness"},
    "window_reveal": {"frame_offset", "reveal_insulation_thickness"},
    "ground_floor": {"foundation_depth", "perimeter_insulation_depth"},
    "window_installation": {"frame_offset"},
}

#: The climate's cross-parameter rules (θe below θi; a humidity class below saturation),
#: shared by every template.
CLIMATE_CROSS_CHECKED = {"outdoor_temperature", "humidity_class"}


def parameters(template_id: str) -> st.SearchStrategy[dict]:
    """Any combination of in-range values; materials as library default or a λ."""
    fields = {}
    for p in get_template(template_id).parameters:
        if p.kind == "number" and p.min_nonzero is not None:
            fields[p.name] = st.one_of(st.just(0.0), st.floats(p.min_nonzero, p.max))
        elif p.kind == "number":
            fields[p.name] = st.floats(p.min, p.max, allow_nan=False)
        elif p.kind == "integer":
            fields[p.name] = st.integers(int(p.min), int(p.max))
        elif p.kind == "choice":
            fields[p.name] = st.sampled_from(p.options)
        else:
            fields[p.name] = st.sampled_from([p.default, 0.04, 2.0])
    return st.fixed_dictionaries(fields)


def build_or_skip(template_id: str, params: dict) -> dict:
    try:
        return build(template_id, params)
    except InvalidSection as error:
        name = error.field.removeprefix("/parameters/")
        if name in CROSS_CHECKED.get(template_id, set()) | CLIMATE_CROSS_CHECKED:
            reject()
        raise
