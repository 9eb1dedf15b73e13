"""Every error names its file and field, and builtins still catch it."""

from __future__ import annotations

import pytest

from motorlib import errors


def test_tree_and_builtins() -> None:
    for cls in (errors.CurveSyntaxError, errors.SchemaValidationError, errors.CurveDataError, errors.CsvFormatError):
        assert issubclass(cls, errors.CurveError) and issubclass(cls, ValueError)
        assert issubclass(cls, errors.MotorlibError)
    assert issubclass(errors.DesignationError, ValueError) and issubclass(errors.QuantityError, ValueError)


def test_message_layout() -> None:
    assert str(errors.CurveError("a.xml", "bad", field="samples", line=7)) == "a.xml:7: samples: bad"
    assert str(errors.CurveError("a.xml", "bad")) == "a.xml: bad"
    problem = errors.Problem("time-not-increasing", "time_s", "sample 3 ...", 2, 12)
    err = errors.CurveDataError("a.xml", [problem, problem])
    assert str(err) == "a.xml:12: time_s: sample 3 ... (and 1 more problem(s))"
    with pytest.raises(ValueError, match="problems"):
        errors.CurveDataError("a.xml", [])


def test_every_error_pickles_with_its_attributes() -> None:
    # Worker processes (scatter --workers) send errors back pickled; issue 12.
    import pickle

    from motorlib.errors import (CurveDataError, CurveSyntaxError, DesignationError, MotorNotFoundError, Problem,
                                 QuantityError, SimulationInputError)

    for error in (SimulationInputError("a.toml", "launch.rail_length", "too long"),
                  CurveDataError("f.xml", [Problem("time-order", "time_s", "must increase", index=3)]),
                  QuantityError("--ballast", "no unit"), DesignationError("C6", 1, "a digit"),
                  CurveSyntaxError("f.xml", "not XML", field="motor", line=4), MotorNotFoundError("F99")):
        copy = pickle.loads(pickle.dumps(error))
        assert type(copy) is type(error) and str(copy) == str(error) and copy.__dict__ == error.__dict__
