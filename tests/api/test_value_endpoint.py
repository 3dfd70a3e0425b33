"""The spreadsheet endpoint's conveniences: a decimal comma in numbers, and errors answered
200 with the ``error:`` line when asked (``errors=inline``)."""

from __future__ import annotations

from coldseam import DEFAULT_ENGINE

VALUE = "/api/v1/templates/wall_corner/value"


def test_a_decimal_comma_is_a_decimal_point(client_for):
    with client_for(engine=DEFAULT_ENGINE) as client:
        comma = client.get(VALUE, params={"quantity": "psi", "insulation_thickness": "160,5"})
        point = client.get(VALUE, params={"quantity": "psi", "insulation_thickness": "160.5"})
        whole = client.get(VALUE, params={"quantity": "psi", "insulation_thickness": "160"})
        csv = client.get(VALUE, params={"quantity": "psi,fRsi", "format": "csv",
                                        "insulation_thickness": "160,5"})
    assert comma.status_code == 200, comma.text
    assert comma.text == point.text != whole.text
    header, line = csv.text.splitlines()
    assert header == "insulation_thickness,psi,fRsi"
    assert line.split(",")[:2] == ["160.5", point.text]  # the CSV echoes the number read


def test_the_number_has_no_line_break_after_it(client_for):
    with client_for(engine=DEFAULT_ENGINE) as client:
        text = client.get(VALUE, params={"quantity": "L2D"}).text
    assert text == text.strip() and float(text) > 0


def test_errors_inline_answer_200_with_the_reason(client_for):
    with client_for(engine=DEFAULT_ENGINE) as client:
        plain = client.get(VALUE, params={"quantity": "psi", "insulation_thickness": "5"})
        inline = client.get(VALUE, params={"quantity": "psi", "insulation_thickness": "5",
                                           "errors": "inline"})
        unknown = client.get(VALUE, params={"quantity": "psy", "errors": "inline"})
        missing = client.get("/api/v1/templates/nope/value", params={"errors": "inline"})
    assert plain.status_code == 422
    assert inline.status_code == 200
    assert inline.headers["x-coldseam-status"] == "422"
    assert inline.text == plain.text
    assert inline.text.startswith("error: /parameters/insulation_thickness: insulation_thickness"
                                  " must be between")
    assert unknown.status_code == 200 and unknown.text.startswith("error: /quantity:")
    assert missing.status_code == 200 and missing.headers["x-coldseam-status"] == "404"
    assert missing.text.startswith("error: no template 'nope'")


def test_a_bad_errors_mode_is_named(client_for):
    with client_for(engine=DEFAULT_ENGINE) as client:
        answer = client.get(VALUE, params={"errors": "loud"})
    assert answer.status_code == 422
    assert answer.text.startswith("error: /query/errors")


def test_a_refused_key_keeps_its_401_even_inline(client_for):
    with client_for(engine=DEFAULT_ENGINE, api_keys="harrowgate-sheet-key") as client:
        refused = client.get(VALUE, params={"errors": "inline", "key": "wrong"})
        missing = client.get(VALUE, params={"errors": "inline"})
        bad = client.get(VALUE, params={"errors": "inline", "key": "harrowgate-sheet-key",
                                        "insulation_thickness": "5"})
    assert refused.status_code == 401 and refused.text.startswith("error: ")
    assert missing.status_code == 401
    assert bad.status_code == 200 and bad.headers["x-coldseam-status"] == "422"
