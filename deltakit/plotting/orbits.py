"""Orbits, burns and transfers drawn to scale in the orbit plane.

Conventions: the central body sits at the origin, the reference direction is
+x, and an orbit is drawn as seen from the reference plane's pole (+z): in
inertial x, y (:meth:`deltakit.Conic.state` with ``frame="inertial"``). A
planar orbit (``inc = 0``) is drawn in its own plane and runs
counter-clockwise; a retrograde equatorial one (``inc = pi``) runs clockwise,
as it flies; an inclined orbit shows its projection on the reference plane
(for the orbit in space, see :mod:`deltakit.plotting.space`). Axes show km;
the functions take SI (m, m/s, rad) like the numeric layer. Each ``draw_*``
function returns a small record of the artists it made, and a matching
``update_*`` function moves those artists in place (``set_data``), so a panel
never rebuilds its figure for a slider step.
"""

from __future__ import annotations

from typing import Any, NamedTuple

import numpy as np
from matplotlib.axes import Axes
from matplotlib.lines import Line2D
from matplotlib.patches import Circle
from matplotlib.quiver import Quiver
from matplotlib.ticker import MaxNLocator

from .._checks import instance_of, positive
from ..burns import burn_at_angle
from ..conic import Conic, _plane_to_inertial
from ..errors import DomainError
from ..units import km
from ._style import COLOURS, style_axes

__all__ = [
    "BurnArtists",
    "ConicArtists",
    "TransferArtists",
    "burn_at_angle",
    "conic_points",
    "draw_burn",
    "draw_conic",
    "draw_transfer",
    "update_burn",
    "update_conic",
    "update_transfer",
]

#: How far an open orbit (or a very long ellipse) is drawn, in periapsis radii,
#: when the caller gives no ``r_max``.
OPEN_ORBIT_EXTENT = 5.0


class ConicArtists(NamedTuple):
    """What :func:`draw_conic` drew: the orbit line and the body disc (or None)."""

    orbit: Line2D
    body: Circle | None


class BurnArtists(NamedTuple):
    """What :func:`draw_burn` drew: burn marker, delta-v arrow, orbit after the burn."""

    marker: Line2D
    arrow: Quiver
    after: ConicArtists


class TransferArtists(NamedTuple):
    """What :func:`draw_transfer` drew: both circular orbits and the transfer arcs."""

    initial: Line2D
    final: Line2D
    hohmann: Line2D
    bielliptic: Line2D | None
    body: Circle | None


def _one(conic: Conic, name: str = "conic") -> Conic:
    instance_of(conic, Conic, name)
    if conic.shape != ():
        raise DomainError(f"`{name}` must be a single orbit to draw, got elements of shape {conic.shape}")
    return conic


def conic_points(conic: Conic, *, n: int = 361, r_max: float | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Points of one orbit seen from the reference pole, inertial x and y in km, as ``(x, y)``.

    An ellipse is drawn whole unless ``r_max`` (m) cuts it; a parabola or a
    hyperbola is drawn out to ``r_max`` (default five periapsis radii). NaN
    elements (an infeasible outcome) give NaN points, which draw nothing.

    Examples
    --------
    >>> from deltakit import Conic
    >>> x, y = conic_points(Conic.circular(7000e3, 3.986e14), n=5)
    >>> [round(float(v)) for v in x]
    [-7000, 0, 7000, 0, -7000]
    """
    conic = _one(conic)
    e, p, argp = float(conic.e), float(conic.p), float(conic.argp)
    if not np.isfinite([e, p, argp]).all():
        nan = np.full(n, np.nan)
        return nan, nan.copy()
    if r_max is None and e >= 1.0:
        r_max = OPEN_ORBIT_EXTENT * float(conic.rp)
    nu_max = np.pi
    if r_max is not None and e > 0.0:
        # radius <= r_max  <=>  cos(nu) >= (p / r_max - 1) / e
        nu_max = float(np.arccos(np.clip((p / r_max - 1.0) / e, -1.0, 1.0)))
    nu = np.linspace(-nu_max, nu_max, n)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = np.where(1.0 + e * np.cos(nu) > 0.0, p / (1.0 + e * np.cos(nu)), np.nan) / km
    return _seen_from_pole(conic, r * np.cos(nu + argp), r * np.sin(nu + argp))


def _seen_from_pole(conic: Conic, x: Any, y: Any) -> tuple[np.ndarray, np.ndarray]:
    """Components in the orbit plane's axes (:meth:`Conic.state`, ``"plane"``) as inertial x, y."""
    inc, raan = float(conic.inc), float(conic.raan)
    if inc == 0.0 and raan == 0.0:
        return np.asarray(x), np.asarray(y)  # the planar orbit: its plane is the reference plane
    inertial = _plane_to_inertial(np.asarray(inc), np.asarray(raan))(x, y)
    return inertial[..., 0], inertial[..., 1]


def _body_disc(ax: Axes, body_radius: float | None) -> Circle | None:
    if body_radius is None:
        return None
    radius = float(positive(body_radius, "body_radius", "m"))
    disc = Circle(
        (0.0, 0.0),
        radius / km,
        facecolor=COLOURS["body"],
        edgecolor=COLOURS["body_edge"],
        linewidth=0.8,
        zorder=1,
    )
    ax.add_patch(disc)
    return disc


def _plane_axes(ax: Axes) -> None:
    ax.set_aspect("equal", adjustable="datalim")
    # few ticks: six-digit km labels must not run into each other
    ax.xaxis.set_major_locator(MaxNLocator(nbins=4))
    ax.yaxis.set_major_locator(MaxNLocator(nbins=5))
    style_axes(ax, xlabel="x (km)", ylabel="y (km)")


def draw_conic(
    ax: Axes,
    conic: Conic,
    *,
    body_radius: float | None = None,
    r_max: float | None = None,
    n: int = 361,
    **kwargs: Any,
) -> ConicArtists:
    """Draw one orbit to scale around its central body at the origin.

    Parameters
    ----------
    ax : matplotlib Axes
    conic : Conic
        A single orbit (scalar elements).
    body_radius : float, optional
        Radius of the central body, m: drawn as a grey disc when given.
    r_max : float, optional
        Largest radius drawn, m (open orbits default to five periapsis radii).
    n : int
        Number of points along the orbit.
    **kwargs
        Passed to :meth:`Axes.plot` for the orbit line.

    Returns
    -------
    ConicArtists
        ``orbit`` (Line2D, data in km) and ``body`` (Circle or None).

    Examples
    --------
    >>> import matplotlib
    >>> from matplotlib.figure import Figure
    >>> from deltakit import Conic
    >>> from deltakit.constants import EARTH
    >>> ax = Figure().add_subplot()
    >>> art = draw_conic(ax, Conic.from_apsides(6778e3, 12000e3, EARTH.mu), body_radius=EARTH.radius)
    >>> round(float(art.orbit.get_xdata().max()))
    6778
    """
    x, y = conic_points(conic, n=n, r_max=r_max)
    kwargs.setdefault("color", COLOURS["before"])
    kwargs.setdefault("linewidth", 1.8)
    kwargs.setdefault("zorder", 3)
    (orbit,) = ax.plot(x, y, **kwargs)
    body = _body_disc(ax, body_radius)
    _plane_axes(ax)
    return ConicArtists(orbit, body)


def update_conic(
    artists: ConicArtists, conic: Conic, *, body_radius: float | None = None, r_max: float | None = None
) -> ConicArtists:
    """Move the artists of :func:`draw_conic` to another orbit, in place."""
    n = len(artists.orbit.get_xdata())
    artists.orbit.set_data(*conic_points(conic, n=n, r_max=r_max))
    if artists.body is not None and body_radius is not None:
        artists.body.set_radius(float(body_radius) / km)
    return artists


def _arrow_vector(
    conic: Conic, nu: float, dv: float, angle: float, length: float, reference: str = "velocity"
) -> tuple[float, float]:
    """Arrow (km) along the delta-v; its length grows with |dv| but is not to scale."""
    r_vec, v_vec = conic.state(nu)
    if reference == "transverse":
        out = r_vec / np.hypot(*r_vec)
        ahead = np.array([-out[1], out[0]])  # radial turned counter-clockwise: along the motion
    else:
        ahead = v_vec / np.hypot(*v_vec)
        out = np.array([ahead[1], -ahead[0]])  # velocity turned clockwise: the outward side
    direction = np.cos(angle) * ahead + np.sin(angle) * out
    sign = 1.0 if dv >= 0.0 else -1.0
    u, v = _seen_from_pole(conic, *(sign * length * direction))
    return float(u), float(v)


def _arrow_length(conic: Conic, nu: float, dv: float) -> float:
    # scaled to the orbit's size so the arrow reads on long ellipses too
    ra = float(conic.ra)
    size = 0.5 * (float(conic.rp) + ra) if np.isfinite(ra) else 2.0 * float(conic.rp)
    v = float(conic.speed(nu))
    return size / km * (0.25 + 0.35 * float(np.sqrt(min(1.0, abs(dv) / v)))) if dv else 0.0


def _after_extent(conic: Conic, nu: float, after_r_max: float | None = None) -> float:
    """Radius (m) out to which an orbit after a burn at ``nu`` is drawn (``after_r_max`` if given)."""
    if after_r_max is not None:
        return float(positive(after_r_max, "after_r_max", "m"))
    r = float(conic.radius(nu))
    ra = float(conic.ra)
    return max(3.0 * r, ra if np.isfinite(ra) else 0.0)


def draw_burn(
    ax: Axes,
    conic: Conic,
    nu: float,
    dv: float,
    *,
    angle: float = 0.0,
    reference: str = "velocity",
    show_after: bool = True,
    after_r_max: float | None = None,
    **kwargs: Any,
) -> BurnArtists:
    """Mark a burn on an orbit, draw its delta-v arrow and the orbit after it.

    Parameters
    ----------
    ax : matplotlib Axes
    conic : Conic
        The orbit before the burn (single orbit).
    nu : float
        True anomaly of the burn point, rad.
    dv : float
        Size of the burn, m/s (negative reverses the direction).
    angle : float
        Direction of the burn, rad, from the velocity towards the outward side
        (or from the transverse direction, see ``reference`` and
        :func:`burn_at_angle`).
    reference : {"velocity", "transverse"}
        What ``angle`` is measured from.
    show_after : bool
        Draw the orbit after the burn (amber, dashed).
    after_r_max : float, optional
        Largest radius (m) of the orbit after the burn that is drawn; by
        default three times the burn radius or its apoapsis, whichever is larger.
    **kwargs
        Passed to :meth:`Axes.plot` for the burn marker.

    Returns
    -------
    BurnArtists
        ``marker`` (Line2D at the burn point, km), ``arrow`` (Quiver: direction
        of the delta-v, length not to scale), ``after`` (ConicArtists).

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> from deltakit import Conic
    >>> ax = Figure().add_subplot()
    >>> art = draw_burn(ax, Conic.circular(7000e3, 3.986e14), 0.0, 300.0)
    >>> [round(float(v)) for v in art.marker.get_xydata()[0]]
    [7000, 0]
    """
    conic = _one(conic)
    nu, dv, angle = float(nu), float(dv), float(angle)
    x, y = (float(c) for c in _seen_from_pole(conic, *(conic.state(nu)[0] / km)))
    kwargs.setdefault("color", COLOURS["burn"])
    kwargs.setdefault("marker", "o")
    kwargs.setdefault("markersize", 7)
    kwargs.setdefault("zorder", 5)
    (marker,) = ax.plot([x], [y], linestyle="none", **kwargs)
    u, v = _arrow_vector(conic, nu, dv, angle, _arrow_length(conic, nu, dv), reference)
    arrow = ax.quiver(
        [x],
        [y],
        [u],
        [v],
        angles="xy",
        scale_units="xy",
        scale=1.0,
        color=COLOURS["burn"],
        width=0.008,
        headwidth=3.5,
        zorder=6,
    )
    after_line = draw_conic(
        ax,
        _after_conic(conic, nu, dv, angle, reference),
        r_max=_after_extent(conic, nu, after_r_max),
        color=COLOURS["after"],
        linestyle="--",
        linewidth=1.6,
        zorder=4,
    )
    after_line.orbit.set_visible(show_after)
    _plane_axes(ax)
    return BurnArtists(marker, arrow, after_line)


def _after_conic(conic: Conic, nu: float, dv: float, angle: float, reference: str = "velocity") -> Conic:
    if dv == 0.0:
        return conic
    return burn_at_angle(conic, nu, dv, angle, reference=reference).after


def update_burn(
    artists: BurnArtists,
    conic: Conic,
    nu: float,
    dv: float,
    *,
    angle: float = 0.0,
    reference: str = "velocity",
    after: Conic | None = None,
    after_r_max: float | None = None,
) -> BurnArtists:
    """Move the artists of :func:`draw_burn` in place.

    Pass ``after`` when the caller has already computed the orbit after the
    burn, so it is not computed twice; ``after_r_max`` as in :func:`draw_burn`.
    """
    conic = _one(conic)
    nu, dv, angle = float(nu), float(dv), float(angle)
    x, y = (float(c) for c in _seen_from_pole(conic, *(conic.state(nu)[0] / km)))
    artists.marker.set_data([x], [y])
    artists.arrow.set_offsets([[x, y]])
    u, v = _arrow_vector(conic, nu, dv, angle, _arrow_length(conic, nu, dv), reference)
    artists.arrow.set_UVC([u], [v])
    if after is None:
        after = _after_conic(conic, nu, dv, angle, reference)
    update_conic(artists.after, after, r_max=_after_extent(conic, nu, after_r_max))
    return artists


def _transfer_arcs(
    r1: float, r2: float, rb: float | None
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Hohmann half-ellipse and bi-elliptic pair of half-ellipses, km."""
    n = 181
    half = np.linspace(0.0, np.pi, n)

    def half_ellipse(r_start: float, r_end: float, start_angle: float) -> tuple[np.ndarray, np.ndarray]:
        # half an ellipse from an apsis at r_start (angle start_angle) to the other at r_end
        rp, ra = min(r_start, r_end), max(r_start, r_end)
        e = (ra - rp) / (ra + rp)
        nu = half if r_start <= r_end else half + np.pi
        r = rp * (1.0 + e) / (1.0 + e * np.cos(nu))
        theta = start_angle + half
        return r * np.cos(theta) / km, r * np.sin(theta) / km

    hx, hy = half_ellipse(r1, r2, 0.0)
    if rb is None:
        return hx, hy, np.array([]), np.array([])
    ax1, ay1 = half_ellipse(r1, rb, 0.0)
    ax2, ay2 = half_ellipse(rb, r2, np.pi)
    return hx, hy, np.concatenate([ax1, ax2]), np.concatenate([ay1, ay2])


def _circle(r: float) -> tuple[np.ndarray, np.ndarray]:
    t = np.linspace(0.0, 2.0 * np.pi, 241)
    return r * np.cos(t) / km, r * np.sin(t) / km


def draw_transfer(
    ax: Axes,
    r1: float,
    r2: float,
    *,
    rb: float | None = None,
    body_radius: float | None = None,
    **kwargs: Any,
) -> TransferArtists:
    """Draw two coplanar circular orbits and the transfer ellipses between them.

    The Hohmann transfer is the half-ellipse from ``r1`` (at +x) to ``r2``;
    with ``rb`` the bi-elliptic transfer goes out to ``rb`` on the far side and
    back down to ``r2``. Radii in m; the plot is in km.

    Parameters
    ----------
    ax : matplotlib Axes
    r1, r2 : float
        Initial and final circular orbit radii, m.
    rb : float, optional
        Intermediate (apoapsis) radius of a bi-elliptic transfer, m.
    body_radius : float, optional
        Radius of the central body, m.
    **kwargs
        Passed to :meth:`Axes.plot` for the Hohmann arc.

    Returns
    -------
    TransferArtists

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> art = draw_transfer(ax, 7000e3, 42164e3, rb=80000e3)
    >>> round(float(art.hohmann.get_xdata()[-1]))
    -42164
    """
    r1 = float(positive(r1, "r1", "m"))
    r2 = float(positive(r2, "r2", "m"))
    if rb is not None:
        rb = float(positive(rb, "rb", "m"))
    (initial,) = ax.plot(*_circle(r1), color=COLOURS["before"], linewidth=1.4, label="initial orbit")
    (final,) = ax.plot(*_circle(r2), color=COLOURS["reference"], linewidth=1.4, label="final orbit")
    hx, hy, bx, by = _transfer_arcs(r1, r2, rb)
    kwargs.setdefault("color", COLOURS["hohmann"])
    kwargs.setdefault("linewidth", 1.8)
    kwargs.setdefault("label", "Hohmann")
    (hohmann,) = ax.plot(hx, hy, **kwargs)
    bielliptic = None
    if rb is not None:
        (bielliptic,) = ax.plot(
            bx, by, color=COLOURS["bielliptic"], linestyle="--", linewidth=1.6, label="bi-elliptic"
        )
    body = _body_disc(ax, body_radius)
    _plane_axes(ax)
    return TransferArtists(initial, final, hohmann, bielliptic, body)


def update_transfer(
    artists: TransferArtists,
    r1: float,
    r2: float,
    *,
    rb: float | None = None,
    body_radius: float | None = None,
) -> TransferArtists:
    """Move the artists of :func:`draw_transfer` in place."""
    artists.initial.set_data(*_circle(float(r1)))
    artists.final.set_data(*_circle(float(r2)))
    hx, hy, bx, by = _transfer_arcs(float(r1), float(r2), None if rb is None else float(rb))
    artists.hohmann.set_data(hx, hy)
    if artists.bielliptic is not None:
        artists.bielliptic.set_data(bx, by)
    if artists.body is not None and body_radius is not None:
        artists.body.set_radius(float(body_radius) / km)
    return artists
