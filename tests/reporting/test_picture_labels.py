"""Labels of the picture: isotherm values carry their unit, and no label covers another —
on a real junction, where isotherms crowd at the slab edge."""

import itertools

import pytest
from matplotlib.text import Annotation, Text

from coldseam.reporting.picture import draw
from coldseam.schema import parse_request
from coldseam.templates import build
from coldseam.thermal.evaluate import evaluate


@pytest.fixture(scope="module")
def balcony_figure():
    evaluation = evaluate(parse_request(build("balcony")))
    figure = draw(evaluation.field, evaluation.result)
    return figure, figure.canvas.get_renderer()


def _labels(figure):
    ax = figure.axes[0]
    return [t for t in ax.texts if t.get_visible() and t.get_text()]


def test_isotherm_labels_carry_the_unit(balcony_figure):
    figure, _ = balcony_figure
    isotherms = [t for t in _labels(figure) if not isinstance(t, Annotation)]
    assert len(isotherms) >= 5
    assert all(t.get_text().endswith(" °C") for t in isotherms)


def test_no_label_covers_another(balcony_figure):
    figure, renderer = balcony_figure
    for t in _labels(figure):
        if isinstance(t, Annotation):
            t.update_positions(renderer)
    boxes = [(t.get_text(), Text.get_window_extent(t, renderer)) for t in _labels(figure)]
    for (a, box_a), (b, box_b) in itertools.combinations(boxes, 2):
        assert not box_a.overlaps(box_b), (a, b)


def test_both_minimum_marks_are_labelled_apart(balcony_figure):
    figure, renderer = balcony_figure
    marks = [t for t in _labels(figure) if isinstance(t, Annotation)]
    assert len(marks) == 2 and all("θsi,min" in t.get_text() for t in marks)
    for t in marks:
        t.update_positions(renderer)
    a, b = (Text.get_window_extent(t, renderer) for t in marks)
    assert not a.overlaps(b)
