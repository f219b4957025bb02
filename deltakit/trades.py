"""Ready-made trade studies: the reductions an analyst asks of a sweep.

Each function builds a :func:`deltakit.sweep` over named axes and reduces it to
the answer, as labelled xarray objects (units in ``attrs``):

* :func:`best_burn_point`: where on each orbit a prograde burn adds the most
  orbital energy, and what choosing that point buys over the worst one.
* :func:`bielliptic_break_even`: where a bi-elliptic transfer beats the
  Hohmann transfer, over the radius ratios r2/r1 and rb/r1.
* :func:`propellant_grid`: the propellant a delta-v costs over a grid of
  vehicles (initial mass, exhaust velocity).

SI units throughout; delta-v is along the velocity (``dv < 0`` retrograde) as
in :func:`deltakit.burn_prograde`. Large grids stay lazy (dask) until
``.compute()``; pass ``chunks=`` to choose the block layout.

Each trade checks its inputs once, at the start, with the numeric layer's
rules and messages, and then sweeps a fused kernel: plain NumPy arithmetic
over the block, with no further checks, no result objects and no passes
that the answer does not need (``benchmarks/bench_sweep.py`` holds it
against a plain NumPy expression of the same maths).

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import finite, nonnegative, positive, require, scalar_or_array
from ._evaluate import on_arrays
from .sweeps import sweep
from .transfers import _tangent_burn

if TYPE_CHECKING:  # the `scale` extra; the sweep imports it at run time
    import xarray

__all__ = ["best_burn_point", "bielliptic_break_even", "prograde_energy_change", "propellant_grid"]

_FULL_TURN = np.linspace(0.0, 2.0 * np.pi, 360, endpoint=False)


# ---------------------------------------------------------------------- best burn point
def _speed_terms(rp: np.ndarray, ra: np.ndarray, mu: Any) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """``scale, slope, floor`` with the speed ``v = scale sqrt(slope cos^2(nu/2) + floor)``.

    On the ellipse of apsides ``rp, ra``: ``v^2 = mu/p (1 + 2 e cos nu + e^2) =
    mu/p ((1 - e)^2 + 4 e cos^2(nu/2))`` with ``1 - e = 2 rp/(rp + ra)``, that is
    ``v^2 = (2 mu/rp) ((ra - rp)/ra cos^2(nu/2) + (rp/ra) rp/(rp + ra))``. Every
    term is positive, so the speed keeps its digits at apoapsis of a very
    elongated orbit (where ``1 + 2 e cos nu + e^2`` would cancel), and every
    factor lies in [0, 1] but the scale ``sqrt(2 mu)/sqrt(rp)``, so no
    intermediate overflows or underflows where the speed itself fits a double.
    ``floor`` is NaN where ``ra < rp`` (no such orbit).
    """
    with np.errstate(all="ignore"):  # elements with ra < rp are NaN whatever they compute
        scale = np.sqrt(2.0 * mu) / np.sqrt(rp)
        slope = (ra - rp) / ra
        floor = np.where(ra >= rp, (rp / ra) * (rp / (rp + ra)), np.nan)
    return scale, slope, floor


def _energy_change_kernel(nu: Any, dv: Any, rp: Any, ra: Any, mu: Any) -> np.ndarray:
    """The fused kernel of :func:`prograde_energy_change` on checked inputs (an open grid).

    Parts that depend on fewer axes are computed on those axes only; the full
    grid sees seven passes: the bracket of the speed (two), its root, the scale,
    ``v + dv/2``, the product with ``dv``, and the NaN fill where the burn
    would stop the vehicle. An energy change beyond the float range is inf.
    """
    scale, slope, floor = _speed_terms(np.asarray(rp), np.asarray(ra), mu)
    half = np.cos(0.5 * np.asarray(nu))
    speed = np.asarray(slope * (half * half))  # 0-d inputs: an array still, for the in-place steps
    speed += floor
    np.sqrt(speed, out=speed)
    speed *= scale
    dv = np.asarray(dv)
    # v dv + dv^2/2 as (v + dv/2) dv: no cancellation while v + dv > 0
    with np.errstate(over="ignore"):  # the product overflows only where the energy change does
        gain = np.asarray(speed + 0.5 * dv)
        gain *= dv
    # dv = -v stops the vehicle (no orbit left); dv < -v reverses the motion, as in burn_prograde;
    # a NaN speed (no such orbit) stays NaN
    np.copyto(gain, np.nan, where=speed + dv == 0.0)
    return gain


def prograde_energy_change(nu: ArrayLike, dv: ArrayLike, rp: ArrayLike, ra: ArrayLike, mu: ArrayLike) -> Any:
    """Specific energy change of a prograde burn on the ellipse with apsides ``rp``, ``ra``.

    Equal to ``burn_prograde(Conic.from_apsides(rp, ra, mu), nu, dv).energy_change``
    but computes only the speed and the Oberth relation, so a grid of a billion
    cases stays cheap. Where ``ra < rp`` (no such orbit) or ``dv = -v`` (the
    burn would stop the vehicle) the element is NaN instead of an error, so a
    grid of rp x ra may overlap; ``dv < -v`` reverses the motion, as in
    ``burn_prograde``.

    Parameters
    ----------
    nu : array_like
        True anomaly of the burn point, rad.
    dv : array_like
        Delta-v along the velocity, m/s (negative: retrograde).
    rp, ra : array_like
        Periapsis and apoapsis radius, m (> 0).
    mu : array_like
        Gravitational parameter, m^3/s^2 (> 0).

    Returns
    -------
    ndarray or numpy scalar
        J/kg.

    Examples
    --------
    >>> from deltakit.trades import prograde_energy_change
    >>> round(float(prograde_energy_change(0.0, 100.0, 7000e3, 7000e3, 3.986004418e14)))
    759605
    >>> float(prograde_energy_change(0.0, 100.0, 9000e3, 7000e3, 3.986004418e14))
    nan
    """
    nu = finite(nu, "nu", "rad")
    dv = finite(dv, "dv", "m/s")
    rp = positive(rp, "rp", "m")
    ra = positive(ra, "ra", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    shape = np.broadcast_shapes(nu.shape, dv.shape, rp.shape, ra.shape, mu.shape)
    return scalar_or_array(np.broadcast_to(_energy_change_kernel(nu, dv, rp, ra, mu), shape))


def best_burn_point(
    rp: ArrayLike,
    ra: ArrayLike,
    dv: ArrayLike,
    mu: float,
    *,
    nu: ArrayLike | None = None,
    chunks: Any = None,
) -> xarray.Dataset:
    """Best burn point per orbit shape: argmax over ``nu`` of the energy change.

    Parameters
    ----------
    rp, ra : array_like, shape (n,) or scalar
        Periapsis and apoapsis radii of the orbits, m. Combinations with
        ``ra < rp`` are NaN.
    dv : array_like, shape (n,) or scalar
        Delta-v along the velocity, m/s (negative: retrograde).
    mu : float
        Gravitational parameter, m^3/s^2.
    nu : array_like, shape (n,), optional
        Burn points to search, rad; default one per degree over a full turn.
    chunks : optional
        Block layout for :func:`deltakit.sweep`; large grids go lazy by themselves.

    Returns
    -------
    xarray.Dataset
        Over the swept axes of ``rp``, ``ra``, ``dv``: ``nu_best`` (rad) where
        the energy change is largest, ``energy_change_best`` and
        ``energy_change_worst`` (J/kg), and ``burn_point_benefit`` (J/kg), what
        burning at the best point adds over the worst one: the value of choosing
        where to burn.

    Examples
    --------
    A prograde burn adds the most energy at periapsis, where the speed is highest:

    >>> from deltakit.trades import best_burn_point
    >>> best = best_burn_point([7000e3, 8000e3], 40000e3, 100.0, 3.986004418e14)
    >>> best["nu_best"].values.tolist()
    [0.0, 0.0]
    >>> best["nu_best"].attrs["units"]
    'rad'
    """
    nu = _FULL_TURN if nu is None else finite(nu, "nu", "rad")
    # Checked once here; each block then runs the fused kernel alone.
    dv, rp, ra = finite(dv, "dv", "m/s"), positive(rp, "rp", "m"), positive(ra, "ra", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    # nu last: the automatic block layout keeps trailing axes whole, so each
    # block holds whole nu rows and the reductions over nu stay inside blocks.
    grid = sweep(
        _energy_change_kernel,
        dv=dv,
        rp=rp,
        ra=ra,
        nu=nu,
        mu=float(mu) if mu.ndim == 0 else mu,
        chunks=chunks,
        name="energy_change",
        units={"energy_change": "J/kg"},
    )
    energy = grid["energy_change"]
    best = energy.max("nu")
    worst = energy.min("nu")
    # argmax per orbit shape; an all-NaN column (no such orbit) gives NaN, not an error.
    nu_best = energy.fillna(-np.inf).idxmax("nu").where(best.notnull())
    out = grid.drop_vars(["energy_change", "nu"]).assign(
        nu_best=nu_best.assign_attrs(units="rad", long_name="burn point of largest energy change"),
        energy_change_best=best.assign_attrs(units="J/kg", long_name="largest energy change over nu"),
        energy_change_worst=worst.assign_attrs(units="J/kg", long_name="smallest energy change over nu"),
        burn_point_benefit=(best - worst).assign_attrs(
            units="J/kg", long_name="energy change at the best burn point minus the worst"
        ),
    )
    out.attrs["trade"] = "best_burn_point"
    return out


# ---------------------------------------------------------------------- bi-elliptic break-even
def _advantage_kernel(m: Any, r2_ratio: Any, rb_ratio: Any) -> Any:
    # r1 = 1 and mu = 1: radii in units of r1, delta-v in units of the circular speed at r1.
    # Each burn is the transfers' own cancellation-free tangent burn.
    one = r2_ratio * 0.0 + 1.0  # 1 in the inputs' precision (extended on the redo of extremes)
    rb = m.where(rb_ratio >= m.maximum(one, r2_ratio), rb_ratio, np.nan)
    hohmann = _tangent_burn(m, one, one, r2_ratio, one) + _tangent_burn(m, r2_ratio, one, r2_ratio, one)
    bielliptic = _tangent_burn(m, one, one, rb, one) + _tangent_burn(m, rb, one, r2_ratio, one)
    return hohmann - (bielliptic + _tangent_burn(m, r2_ratio, rb, r2_ratio, one))


def _advantage(r2_ratio: np.ndarray, rb_ratio: np.ndarray) -> np.ndarray:
    """Hohmann total minus bi-elliptic total: the fused kernel on checked ratios.

    Ratios beyond 1e+-50 that over- or underflow are redone in extended
    precision (:func:`deltakit._evaluate.on_arrays`), so extremes give the
    right difference or NaN, never a warning.
    """
    return on_arrays(_advantage_kernel, *np.broadcast_arrays(r2_ratio, rb_ratio))


#: Differences in units of the circular speed at r1 below this are ties (round-off at rb = r2).
_TIE = 1e-12


def _break_even_rb(advantage: np.ndarray, rb: np.ndarray) -> np.ndarray:
    """Start of the winning tail along the last axis, linearly interpolated; NaN if none."""
    wins = advantage > _TIE
    valid = np.isfinite(advantage)
    # last grid point that loses; the tail after it wins (or ties at rb = r2)
    losing = valid & (advantage < -_TIE)  # ties (rb = r2, round-off) neither win nor lose
    n = rb.size
    last_lose = np.where(losing.any(axis=-1), n - 1 - np.argmax(losing[..., ::-1], axis=-1), -1)
    tail_wins = wins[..., -1]
    first_valid = np.argmax(valid, axis=-1)
    start = np.where(last_lose >= 0, last_lose + 1, first_valid)
    start = np.minimum(start, n - 1)
    lo = np.maximum(start - 1, 0)
    a_lo = np.take_along_axis(advantage, lo[..., None], -1)[..., 0]
    a_hi = np.take_along_axis(advantage, start[..., None], -1)[..., 0]
    with np.errstate(invalid="ignore", divide="ignore"):
        fraction = np.clip(a_lo / (a_lo - a_hi), 0.0, 1.0)
        crossing = rb[lo] + fraction * (rb[start] - rb[lo])
    crossing = np.where(last_lose >= 0, crossing, rb[first_valid])
    return np.where(tail_wins, crossing, np.nan)


def bielliptic_break_even(r2_ratio: ArrayLike, rb_ratio: ArrayLike, *, chunks: Any = None) -> xarray.Dataset:
    """Where a bi-elliptic transfer beats the Hohmann transfer, over r2/r1 and rb/r1.

    Between coplanar circular orbits of radii ``r1`` and ``r2 > r1``; the
    bi-elliptic transfer goes out to ``rb >= r2``. Both totals scale with the
    circular speed at ``r1``, so the trade depends on the two ratios only.

    Parameters
    ----------
    r2_ratio : array_like, shape (n,)
        Target radius over starting radius, r2/r1 (> 0, increasing).
    rb_ratio : array_like, shape (m,)
        Intermediate apoapsis radius over starting radius, rb/r1 (> 0);
        values below r2/r1 give NaN.

    Returns
    -------
    xarray.Dataset
        ``advantage`` (r2_ratio, rb_ratio): Hohmann total minus bi-elliptic
        total, in units of the circular speed at r1 (positive: bi-elliptic
        cheaper); ``bielliptic_wins`` (bool); ``rb_break_even`` (r2_ratio):
        the rb/r1 above which every bi-elliptic on the grid wins, NaN where
        none of the largest does; and two scalars read off the grid:
        ``ratio_some_win``, the smallest r2/r1 from which on some rb on the
        grid wins, and ``ratio_all_win``, the smallest r2/r1 from which on
        every rb > r2 wins. Their resolution is the grid step.

    Raises
    ------
    deltakit.DomainError
        If a ratio is not finite and > 0, or ``r2_ratio`` is not increasing.

    Examples
    --------
    >>> import numpy as np
    >>> from deltakit.trades import bielliptic_break_even
    >>> trade = bielliptic_break_even([10.0, 14.0, 20.0], np.geomspace(1.0, 1e6, 200))
    >>> trade["bielliptic_wins"].any("rb_ratio").values.tolist()
    [False, True, True]
    """
    r2_ratio = positive(r2_ratio, "r2_ratio")
    rb_ratio = positive(rb_ratio, "rb_ratio")
    if r2_ratio.ndim == 1 and r2_ratio.size > 1:
        require(r2_ratio[1:], np.diff(r2_ratio) <= 0.0, "r2_ratio", "increasing")
    grid = sweep(
        _advantage,
        r2_ratio=r2_ratio,
        rb_ratio=rb_ratio,
        chunks=chunks,
        name="advantage",
        units={"advantage": "1", "r2_ratio": "1", "rb_ratio": "1"},
    )
    advantage = grid["advantage"].assign_attrs(
        long_name="Hohmann total minus bi-elliptic total delta-v, in circular speeds at r1"
    )
    import xarray as xr  # the sweep above has already required it

    wins = (advantage > _TIE).assign_attrs(long_name="bi-elliptic cheaper than Hohmann")
    rows = advantage.chunk({"rb_ratio": -1}) if advantage.chunks else advantage  # whole rb rows per block
    rb_break_even = xr.apply_ufunc(
        _break_even_rb,
        rows,
        grid["rb_ratio"],
        input_core_dims=[["rb_ratio"], ["rb_ratio"]],
        dask="parallelized",
        output_dtypes=[float],
    ).assign_attrs(units="1", long_name="rb/r1 from which every bi-elliptic on the grid beats Hohmann")
    beyond_r2 = grid["rb_ratio"] > grid["r2_ratio"] * (1.0 + 1e-9)
    all_win = (wins | ~beyond_r2 | advantage.isnull()).all("rb_ratio") & beyond_r2.any("rb_ratio")
    some_win = wins.any("rb_ratio")
    r2 = grid["r2_ratio"]
    # Smallest ratio from which on the property holds for every larger ratio on the grid.
    ratio_some = r2.where(some_win & _holds_onward(some_win)).min()
    ratio_all = r2.where(all_win & _holds_onward(all_win)).min()
    out = xr.Dataset(
        {
            "advantage": advantage,
            "bielliptic_wins": wins,
            "rb_break_even": rb_break_even,
            "ratio_some_win": ratio_some.assign_attrs(
                units="1", long_name="smallest r2/r1 on the grid from which on some rb wins"
            ),
            "ratio_all_win": ratio_all.assign_attrs(
                units="1", long_name="smallest r2/r1 on the grid from which every rb > r2 wins"
            ),
        },
        attrs={**grid.attrs, "trade": "bielliptic_break_even"},
    )
    return out


def _holds_onward(flag: Any) -> Any:
    """True where ``flag`` holds at this r2/r1 and at every larger one on the grid."""
    reversed_flag = flag.isel(r2_ratio=slice(None, None, -1))
    return reversed_flag.cumprod("r2_ratio").astype(bool).isel(r2_ratio=slice(None, None, -1))


# ---------------------------------------------------------------------- propellant over vehicles
def _propellant_books(dv: np.ndarray, m0: np.ndarray, ve: np.ndarray) -> dict[str, Any]:
    """The fused kernel of :func:`propellant_grid` on checked inputs (rocket equation)."""
    ratio = dv / ve
    fraction = -np.expm1(-ratio)  # 1 - exp(-dv/ve), its digits kept for small delta-v
    return {"propellant": m0 * fraction, "final_mass": m0 * np.exp(-ratio), "propellant_fraction": fraction}


def propellant_grid(dv: ArrayLike, m0: ArrayLike, ve: ArrayLike, *, chunks: Any = None) -> xarray.Dataset:
    """Propellant a delta-v costs over a grid of vehicles (initial mass x exhaust velocity).

    Parameters
    ----------
    dv : array_like, shape (n,) or scalar
        Delta-v, m/s (>= 0); a 1-D array adds a ``dv`` dimension.
    m0 : array_like, shape (n,) or scalar
        Mass before the burn, kg (> 0).
    ve : array_like, shape (n,) or scalar
        Effective exhaust velocity, m/s (> 0).

    Returns
    -------
    xarray.Dataset
        ``propellant`` and ``final_mass`` (kg) and ``propellant_fraction``
        (of m0), over the swept axes.

    Examples
    --------
    >>> from deltakit.trades import propellant_grid
    >>> grid = propellant_grid(1500.0, [800.0, 1000.0], [3000.0, 3200.0])
    >>> grid["propellant"].round(1).values.tolist()
    [[314.8, 299.4], [393.5, 374.2]]
    """
    dv = nonnegative(dv, "dv", "m/s")
    m0 = positive(m0, "m0", "kg")
    ve = positive(ve, "ve", "m/s")
    grid = sweep(
        _propellant_books,
        dv=dv,
        m0=m0,
        ve=ve,
        chunks=chunks,
        units={"propellant": "kg", "final_mass": "kg", "propellant_fraction": "1"},
    )
    grid.attrs["trade"] = "propellant_grid"
    return grid
