"""An orbit in space on a matplotlib 3-D Axes: the orbit, the reference plane, the line of nodes, periapsis.

Conventions: the central body sits at the origin; the reference plane is
z = 0 (the body's equator, or the ecliptic, as the orbit's elements are);
axes show km and the functions take SI like the numeric layer. The colours
are those of the planar figures (:mod:`deltakit.plotting._style`): the orbit
in slate, the burn points in raspberry, the reference in cool grey.
:func:`draw_conic_3d` returns a record of its artists and
:func:`update_conic_3d` moves them in place for another orbit, so a panel
never rebuilds its figure for a slider step.
"""

from __future__ import annotations

from typing import Any, NamedTuple

import numpy as np
from mpl_toolkits.mplot3d.art3d import Line3D, Poly3DCollection

from .._checks import positive
from ..conic import Conic
from ..units import km as KM  # display kilometres (the unit scales live in deltakit.units)
from ._style import COLOURS
from .orbits import OPEN_ORBIT_EXTENT, _one

__all__ = ["Conic3DArtists", "conic_points_3d", "draw_conic_3d", "update_conic_3d"]

#: The reference plane is drawn out to this many times the orbit's largest drawn radius.
PLANE_MARGIN = 1.15
#: The view holds this many times the largest radius: headroom, so that a small
#: change of the orbit does not rescale the picture.
VIEW_MARGIN = 1.3


class Conic3DArtists(NamedTuple):
    """What :func:`draw_conic_3d` drew."""

    orbit: Line3D
    plane: Poly3DCollection
    nodes: Line3D
    ascending: Line3D
    periapsis: Line3D
    body: Line3D | None


def conic_points_3d(
    conic: Conic, *, n: int = 361, r_max: float | None = None
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Points of one orbit in the inertial axes, km, as ``(x, y, z)``.

    An ellipse is drawn whole unless ``r_max`` (m) cuts it; a parabola or a
    hyperbola out to ``r_max`` (default five periapsis radii). NaN elements
    give NaN points, which draw nothing.

    Examples
    --------
    >>> from deltakit import Conic
    >>> x, y, z = conic_points_3d(Conic.circular(7000e3, 3.986e14, inc=1.5707963267948966), n=5)
    >>> [round(float(v)) for v in z]
    [0, -7000, 0, 7000, 0]
    """
    conic = _one(conic)
    e, p = float(conic.e), float(conic.p)
    if not np.isfinite([e, p, float(conic.argp), float(conic.inc), float(conic.raan)]).all():
        nan = np.full(n, np.nan)
        return nan, nan.copy(), nan.copy()
    if r_max is None and e >= 1.0:
        r_max = OPEN_ORBIT_EXTENT * float(conic.rp)
    nu_max = np.pi
    if r_max is not None and e > 0.0:
        nu_max = float(np.arccos(np.clip((p / r_max - 1.0) / e, -1.0, 1.0)))  # radius <= r_max
    r_vec, _ = conic.state(np.linspace(-nu_max, nu_max, n), "inertial")
    r_vec = r_vec / KM
    return r_vec[:, 0], r_vec[:, 1], r_vec[:, 2]


def _extent(x: np.ndarray, y: np.ndarray, z: np.ndarray) -> float:
    radius = np.sqrt(x * x + y * y + z * z)
    radius = radius[np.isfinite(radius)]
    return float(radius.max()) if radius.size else 1.0


def _plane_square(extent: float) -> list[np.ndarray]:
    half = PLANE_MARGIN * extent
    return [np.array([[-half, -half, 0.0], [half, -half, 0.0], [half, half, 0.0], [-half, half, 0.0]])]


def _node_line(conic: Conic, extent: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    raan = float(conic.raan)
    half = PLANE_MARGIN * extent
    line = np.array([-half, half])
    return line * np.cos(raan), line * np.sin(raan), np.zeros(2)


def _point(conic: Conic, nu: float) -> tuple[list[float], list[float], list[float]]:
    if not np.isfinite(nu):
        return [np.nan], [np.nan], [np.nan]
    r_vec, _ = conic.state(nu, "inertial")
    x, y, z = r_vec / KM
    return [float(x)], [float(y)], [float(z)]


def _body_circle(radius: float, n: int = 121) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    angle = np.linspace(0.0, 2.0 * np.pi, n)
    return radius / KM * np.cos(angle), radius / KM * np.sin(angle), np.zeros(n)


def _cube(ax: Any, extent: float) -> None:
    half = VIEW_MARGIN * extent
    ax.set_xlim(-half, half)
    ax.set_ylim(-half, half)
    ax.set_zlim(-half, half)
    ax.set_box_aspect((1.0, 1.0, 1.0))


def draw_conic_3d(
    ax: Any,
    conic: Conic,
    *,
    body_radius: float | None = None,
    r_max: float | None = None,
    n: int = 361,
    **kwargs: Any,
) -> Conic3DArtists:
    """Draw one orbit in space around its central body at the origin.

    Parameters
    ----------
    ax : matplotlib 3-D Axes
        Made with ``fig.add_subplot(projection="3d")``.
    conic : Conic
        A single orbit (scalar elements).
    body_radius : float, optional
        Radius of the central body, m: its equator is drawn as a grey circle.
    r_max : float, optional
        Largest radius drawn, m (open orbits default to five periapsis radii).
    n : int
        Number of points along the orbit.
    **kwargs
        Passed to ``ax.plot`` for the orbit line.

    Returns
    -------
    Conic3DArtists
        ``orbit`` (the path, km), ``plane`` (the reference plane, translucent),
        ``nodes`` (the line of nodes, dashed), ``ascending`` (a marker at the
        ascending node), ``periapsis`` (a marker) and ``body`` (or None).

    Examples
    --------
    >>> import numpy as np
    >>> from matplotlib.figure import Figure
    >>> from deltakit import Conic
    >>> from deltakit.constants import EARTH
    >>> ax = Figure().add_subplot(projection="3d")
    >>> orbit = Conic.from_apsides(6778e3, 12000e3, EARTH.mu, argp=0.5, inc=np.radians(51.6), raan=1.0)
    >>> art = draw_conic_3d(ax, orbit, body_radius=EARTH.radius)
    >>> round(float(np.max(art.orbit.get_data_3d()[2])))  # highest point above the equator, km
    6154
    """
    conic = _one(conic)
    x, y, z = conic_points_3d(conic, n=n, r_max=r_max)
    extent = _extent(x, y, z)
    kwargs.setdefault("color", COLOURS["before"])
    kwargs.setdefault("linewidth", 1.8)
    (orbit,) = ax.plot(x, y, z, **kwargs)
    plane = Poly3DCollection(
        _plane_square(extent), facecolor=COLOURS["reference"], edgecolor=COLOURS["grid"], alpha=0.12
    )
    ax.add_collection3d(plane)
    (nodes,) = ax.plot(*_node_line(conic, extent), color=COLOURS["reference"], linestyle="--", linewidth=1.0)
    (ascending,) = ax.plot(
        *_point(conic, float(conic.nodes[0])), marker="^", color=COLOURS["burn"], linestyle="none",
        markersize=7, label="ascending node",
    )  # fmt: skip
    (periapsis,) = ax.plot(
        *_point(conic, 0.0), marker="o", color=COLOURS["before"], linestyle="none", markersize=5,
        label="periapsis",
    )  # fmt: skip
    body = None
    if body_radius is not None:
        radius = float(positive(body_radius, "body_radius", "m"))
        (body,) = ax.plot(*_body_circle(radius), color=COLOURS["body_edge"], linewidth=1.0)
    _cube(ax, max(extent, float(body_radius or 0.0) / KM))
    ax.set_xlabel("x (km)")
    ax.set_ylabel("y (km)")
    ax.set_zlabel("z (km)")
    return Conic3DArtists(orbit, plane, nodes, ascending, periapsis, body)


def update_conic_3d(artists: Conic3DArtists, conic: Conic, *, r_max: float | None = None) -> Conic3DArtists:
    """Move the artists of :func:`draw_conic_3d` to another orbit, in place (no new artists).

    The view (and the reference plane with it) follows the new orbit only when
    the orbit would leave the plane or fill less than half of it, so small
    changes do not rescale the picture.
    """
    conic = _one(conic)
    x, y, z = conic_points_3d(conic, n=len(artists.orbit.get_data_3d()[0]), r_max=r_max)
    artists.orbit.set_data_3d(x, y, z)
    extent = _extent(x, y, z)
    ax = artists.orbit.axes
    shown = float(ax.get_xlim()[1]) / VIEW_MARGIN  # the radius the view was made for
    if extent > PLANE_MARGIN * shown or extent < 0.5 * shown:
        artists.plane.set_verts(_plane_square(extent))
        _cube(ax, extent)
    else:
        extent = shown
    artists.nodes.set_data_3d(*_node_line(conic, extent))
    artists.ascending.set_data_3d(*_point(conic, float(conic.nodes[0])))
    artists.periapsis.set_data_3d(*_point(conic, 0.0))
    return artists
