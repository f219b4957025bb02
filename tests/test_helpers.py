"""The shared two-body reference itself: it must be right before it judges anything.

Checked against facts that hold for any two-body orbit (common practice): a
circular orbit returns to its start after 2 pi sqrt(r^3/mu) (Kepler's third
law), energy and angular momentum are conserved, and a planar orbit tilted
into 3-D behaves the same.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

pytest.importorskip("scipy")

from helpers import apsis_event, distance_event, propagate, specific_energy

from deltakit.constants import EARTH, MOON


@pytest.mark.parametrize("dimensions", [2, 3])
@pytest.mark.parametrize("body, radius", [(EARTH, 7000e3), (MOON, 1900e3)])
def test_a_circular_orbit_closes_after_keplers_period(dimensions, body, radius):
    speed = math.sqrt(body.mu / radius)
    period = 2.0 * math.pi * math.sqrt(radius**3 / body.mu)
    r0, v0 = np.zeros(dimensions), np.zeros(dimensions)
    r0[0], v0[1] = radius, speed
    if dimensions == 3:  # tilt the plane by 40 degrees about the first axis
        c, s = math.cos(0.7), math.sin(0.7)
        v0 = np.array([0.0, speed * c, speed * s])
    sol = propagate(r0, v0, body.mu, period)
    end = sol.y[:, -1]
    assert np.linalg.norm(end[:dimensions] - r0) < 1e-8 * radius
    assert np.linalg.norm(end[dimensions:] - v0) < 1e-8 * speed
    assert specific_energy(end[:dimensions], end[dimensions:], body.mu) == pytest.approx(
        -body.mu / (2.0 * radius), rel=1e-11
    )


def test_events_find_apoapsis_and_a_distance():
    rp, ra, mu = 7000e3, 20000e3, EARTH.mu
    a = 0.5 * (rp + ra)
    vp = math.sqrt(mu * (2.0 / rp - 1.0 / a))  # vis-viva
    sol = propagate([rp, 0.0], [0.0, vp], mu, math.pi * math.sqrt(a**3 / mu) * 1.2, events=apsis_event(-1.0))
    apoapsis = sol.y_events[0][0]
    assert math.hypot(*apoapsis[:2]) == pytest.approx(ra, rel=1e-10)
    out = propagate([rp, 0.0], [0.0, vp], mu, 1e6, events=distance_event(15000e3))
    assert math.hypot(*out.y_events[0][0][:2]) == pytest.approx(15000e3, rel=1e-12)
    assert out.t[-1] < 1e6  # the event ended the integration
