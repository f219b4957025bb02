"""The error policy of DESIGN.md: nonsense input raises DomainError naming the
parameter, the rule and, for arrays, the count of bad elements; infeasible
outcomes are NaN in their elements only."""

from __future__ import annotations

import numpy as np
import pytest

import deltakit as dk
from deltakit._checks import (
    as_float,
    finite,
    finite_number,
    is_number,
    nonnegative,
    nonnegative_number,
    nonzero,
    nonzero_number,
    positive,
    positive_number,
    require,
    scalar_or_array,
)
from deltakit.constants import EARTH
from deltakit.errors import DomainError

MU = EARTH.mu


# One case per DomainError rule of DESIGN.md: (call with a scalar, call with an
# array holding `bad` bad elements out of `size`, parameter, rule text).
RULES = {
    "mu <= 0": (
        lambda: dk.circular_speed(7e6, 0.0),
        lambda: dk.circular_speed(7e6, [MU, -1.0, 0.0, MU, MU]),
        2,
        5,
        "mu",
        "> 0",
    ),
    "negative radius": (
        lambda: dk.escape_speed(-7e6, MU),
        lambda: dk.escape_speed([7e6, -1.0, 8e6], MU),
        1,
        3,
        "r",
        "> 0",
    ),
    "e < 0": (
        lambda: dk.Conic(7e6, -0.1, MU),
        lambda: dk.Conic(7e6, [0.1, -0.1, -0.2, -0.3], MU),
        3,
        4,
        "e",
        ">= 0",
    ),
    "final mass above initial mass": (
        lambda: dk.rocket_dv(3000.0, 100.0, 120.0),
        lambda: dk.rocket_dv(3000.0, 100.0, [120.0, 50.0, 101.0, 100.0]),
        2,
        4,
        "mf",
        "<= m0",
    ),
    "non-finite value": (
        lambda: dk.vis_viva(np.inf, 7e6, MU),
        lambda: dk.specific_energy(7e6, [1.0, np.nan, np.inf, -np.inf, 2.0, 3.0], MU),
        3,
        6,
        None,
        "finite",
    ),
}


@pytest.mark.parametrize("rule", sorted(RULES))
def test_scalar_rule_names_parameter_and_rule(rule):
    scalar_call, _, _, _, name, text = RULES[rule]
    with pytest.raises(dk.DomainError) as info:
        scalar_call()
    message = str(info.value)
    assert isinstance(info.value, ValueError)
    if name is not None:
        assert f"`{name}`" in message
    assert f"must be {text}" in message
    assert "elements" not in message  # a scalar has no count


@pytest.mark.parametrize("rule", sorted(RULES))
def test_array_rule_counts_bad_elements(rule):
    _, array_call, bad, size, name, text = RULES[rule]
    with pytest.raises(dk.DomainError) as info:
        array_call()
    message = str(info.value)
    if name is not None:
        assert f"`{name}`" in message
    assert f"must be {text}" in message
    assert f"{bad} of {size} elements" in message


def test_non_finite_names_the_parameter_for_every_function():
    assert "`v`" in _message(lambda: dk.specific_energy(7e6, np.nan, MU))
    assert "`r`" in _message(lambda: dk.vis_viva(np.inf, 7e6, MU))
    assert "`ve`" in _message(lambda: dk.rocket_dv(np.nan, 10.0, 5.0))


def _message(call) -> str:
    with pytest.raises(dk.DomainError) as info:
        call()
    return str(info.value)


def test_message_gives_units_and_first_bad_element():
    message = _message(lambda: dk.circular_speed([[7e6, 8e6], [9e6, -5.0]], MU))
    assert message == "`r` must be > 0 m: 1 of 4 elements break this rule (first at index (1, 1): -5.0 m)"


def test_infeasible_elements_are_nan_and_the_rest_untouched():
    # A point a hyperbola never reaches is an infeasible outcome, not an error.
    hyperbola = dk.Conic(7e6, 3.0, MU)
    nu = np.array([0.0, 3.0, 1.0])
    radius = hyperbola.radius(nu)
    assert np.isnan(radius[1])
    np.testing.assert_array_equal(radius[[0, 2]], [hyperbola.radius(0.0), hyperbola.radius(1.0)])


def test_helpers_directly():
    assert positive(2, "x").dtype == float
    assert nonnegative([0.0, 1.0], "x").tolist() == [0.0, 1.0]
    assert finite(-3.0, "x") == -3.0
    with pytest.raises(dk.DomainError, match="`x` must be >= 0 kg, got -1.0"):
        nonnegative(-1.0, "x", "kg")
    with pytest.raises(dk.DomainError, match="`x` must be a real number"):
        as_float("seven", "x")
    with pytest.raises(dk.DomainError, match="`speed` must be below light: 1 of 2"):
        require(np.array([1.0, 4e8]), np.array([False, True]), "speed", "below light")
    require(np.array([1.0]), np.array([False]), "speed", "below light")  # no error when nothing is bad
    # Broadcast bad masks are counted on the broadcast shape.
    with pytest.raises(dk.DomainError, match="3 of 3 elements"):
        require(np.array([1.0, 2.0, 3.0]), np.array(True), "x", "ok")


def test_scalar_or_array():
    assert isinstance(scalar_or_array(np.asarray(2.0)), np.floating)
    assert isinstance(scalar_or_array(np.array([2.0])), np.ndarray)
    assert isinstance(dk.circular_speed(7e6, MU), np.floating)


# ---------------------------------------------------------------------- the scalar fast path's helpers
@pytest.mark.parametrize("value", [7e6, 7, np.float64(7e6), 0.0, -3.5, 1e-50, 1e50, -1e50])
def test_is_number_takes_plain_numbers_in_the_band(value):
    assert is_number(value, 1.0)


@pytest.mark.parametrize(
    "value",
    [True, np.True_, np.float32(7.0), np.array(7.0), np.array([7.0]), "7000", None, 7 + 0j]
    + [1e300, 1e-300, -1e300, 1e51, 1e-51, np.nan, np.inf, 10**400],
)
def test_is_number_sends_everything_else_to_the_array_path(value):
    # Not a plain number, or beyond the band where plain-float formulas could
    # over- or underflow: the array path checks and handles it.
    assert not is_number(1.0, value)


@pytest.mark.parametrize("value", [-1.0, 0.0, -0.0, np.nan, np.inf, -np.inf, 10**400, -5])
@pytest.mark.parametrize(
    "fast, slow",
    [
        (finite_number, finite),
        (positive_number, positive),
        (nonnegative_number, nonnegative),
        (nonzero_number, nonzero),
    ],
)
def test_number_helpers_raise_the_array_paths_message(fast, slow, value):
    try:
        expected = slow(np.asarray(value), "x", "m")
    except DomainError as error:
        with pytest.raises(DomainError) as info:
            fast(value, "x", "m")
        assert str(info.value) == str(error)
    else:
        assert fast(value, "x", "m") == expected
        assert type(fast(value, "x", "m")) is float
