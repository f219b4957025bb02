"""A vectorised adaptive Runge-Kutta integrator: many independent cases in lock-step.

Each case (a column of ``y``) has its own time, step size and end time; every
iteration takes one step of the explicit Runge-Kutta pair of order 8 with
error estimators of orders 5 and 3 (Dormand and Prince, as given in Hairer,
Norsett and Wanner, Solving Ordinary Differential Equations I, 2nd ed.,
Section II.10; the coefficients below are those distributed with SciPy's
``DOP853``, BSD licence) for all unfinished cases at once. Cases that have
reached their end time drop out of the arrays, so a long case does not make
the short ones pay. The Python loop runs over steps, never over cases.

The step-size rule is the usual one: accept when the scaled error norm is
at most 1, then scale the step by ``0.9 err^(-1/8)`` within [0.2, 10].

Notice for the tableau: the numbers were taken from SciPy
(scipy/integrate/_ivp/dop853_coefficients.py), Copyright (c) 2001-2002
Enthought, Inc. and 2003 onwards SciPy Developers, distributed under the
BSD 3-Clause licence, which permits this use provided the notice is kept.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

import numpy as np

__all__ = ["integrate"]

_SAFETY, _MIN_FACTOR, _MAX_FACTOR = 0.9, 0.2, 10.0
_ORDER = 8

# ------------------------------------------------------------------ the tableau
C = np.array(
    [
        0.0,
        0.05260015195876773,
        0.0789002279381516,
        0.1183503419072274,
        0.2816496580927726,
        0.3333333333333333,
        0.25,
        0.3076923076923077,
        0.6512820512820513,
        0.6,
        0.8571428571428571,
        1.0,
    ]
)
A = np.zeros((12, 12))
A[1, 0] = 0.05260015195876773
A[2, 0] = 0.0197250569845379
A[2, 1] = 0.0591751709536137
A[3, 0] = 0.02958758547680685
A[3, 2] = 0.08876275643042054
A[4, 0] = 0.2413651341592667
A[4, 2] = -0.8845494793282861
A[4, 3] = 0.924834003261792
A[5, 0] = 0.037037037037037035
A[5, 3] = 0.17082860872947386
A[5, 4] = 0.12546768756682242
A[6, 0] = 0.037109375
A[6, 3] = 0.17025221101954405
A[6, 4] = 0.06021653898045596
A[6, 5] = -0.017578125
A[7, 0] = 0.03709200011850479
A[7, 3] = 0.17038392571223998
A[7, 4] = 0.10726203044637328
A[7, 5] = -0.015319437748624402
A[7, 6] = 0.008273789163814023
A[8, 0] = 0.6241109587160757
A[8, 3] = -3.3608926294469414
A[8, 4] = -0.868219346841726
A[8, 5] = 27.59209969944671
A[8, 6] = 20.154067550477894
A[8, 7] = -43.48988418106996
A[9, 0] = 0.47766253643826434
A[9, 3] = -2.4881146199716677
A[9, 4] = -0.590290826836843
A[9, 5] = 21.230051448181193
A[9, 6] = 15.279233632882423
A[9, 7] = -33.28821096898486
A[9, 8] = -0.020331201708508627
A[10, 0] = -0.9371424300859873
A[10, 3] = 5.186372428844064
A[10, 4] = 1.0914373489967295
A[10, 5] = -8.149787010746927
A[10, 6] = -18.52006565999696
A[10, 7] = 22.739487099350505
A[10, 8] = 2.4936055526796523
A[10, 9] = -3.0467644718982196
A[11, 0] = 2.273310147516538
A[11, 3] = -10.53449546673725
A[11, 4] = -2.0008720582248625
A[11, 5] = -17.9589318631188
A[11, 6] = 27.94888452941996
A[11, 7] = -2.8589982771350235
A[11, 8] = -8.87285693353063
A[11, 9] = 12.360567175794303
A[11, 10] = 0.6433927460157636
B = np.array(
    [
        0.054293734116568765,
        0.0,
        0.0,
        0.0,
        0.0,
        4.450312892752409,
        1.8915178993145003,
        -5.801203960010585,
        0.3111643669578199,
        -0.1521609496625161,
        0.20136540080403034,
        0.04471061572777259,
    ]
)
E3 = np.array(
    [
        -0.18980075407240762,
        0.0,
        0.0,
        0.0,
        0.0,
        4.450312892752409,
        1.8915178993145003,
        -5.801203960010585,
        -0.4226823213237919,
        -0.1521609496625161,
        0.20136540080403034,
        0.02265179219836082,
    ]
)
E5 = np.array(
    [
        0.01312004499419488,
        0.0,
        0.0,
        0.0,
        0.0,
        -1.2251564463762044,
        -0.4957589496572502,
        1.6643771824549864,
        -0.35032884874997366,
        0.3341791187130175,
        0.08192320648511571,
        -0.022355307863886294,
    ]
)


def integrate(
    rhs: Callable[..., np.ndarray],
    y0: np.ndarray,
    t_end: np.ndarray,
    params: Sequence[np.ndarray] = (),
    rtol: float = 1e-12,
    atol: float = 1e-12,
    first_step: float = 0.01,
    max_steps: int = 100_000,
) -> tuple[np.ndarray, np.ndarray]:
    """Integrate ``dy/dt = rhs(t, y, *params)`` from t = 0 to ``t_end`` for every case.

    Parameters
    ----------
    rhs : callable
        ``rhs(t, y, *params)`` with ``t`` shape (n,), ``y`` shape (d, n) and each
        parameter shape (n,); returns shape (d, n). It is called on the
        unfinished cases only, with their parameters.
    y0 : ndarray, shape (d, n)
        Initial states; make them of order 1 (the tolerances are absolute and
        relative to the state).
    t_end : ndarray, shape (n,)
        End times (>= 0).
    params : sequence of ndarray, each shape (n,)
        Per-case constants handed to ``rhs``.

    Returns
    -------
    y : ndarray, shape (d, n)
        States at ``t_end``; NaN for a case whose step size collapsed or that
        used up ``max_steps``.
    steps : ndarray, shape (n,)
        Accepted steps per case.

    Examples
    --------
    Harmonic oscillators of two frequencies, a quarter period each:

    >>> import numpy as np
    >>> from deltakit._rk853 import integrate
    >>> w = np.array([1.0, 3.0])
    >>> y, _ = integrate(lambda t, y, w: np.stack([y[1], -w * w * y[0]]),
    ...                  np.array([[1.0, 1.0], [0.0, 0.0]]), np.pi / 2 / w, (w,))
    >>> np.allclose(y[0], 0.0, atol=1e-10) and np.allclose(y[1], -w)
    True
    """
    y0 = np.array(y0, dtype=float)
    d, n = y0.shape
    t_end = np.broadcast_to(np.asarray(t_end, float), (n,))
    params = [np.broadcast_to(np.asarray(p), (n,)) for p in params]
    result = np.full((d, n), np.nan)
    steps = np.zeros(n, dtype=int)

    idx = np.flatnonzero(np.isfinite(y0).all(axis=0) & np.isfinite(t_end))
    done_now = t_end[idx] <= 0.0
    result[:, idx[done_now]] = y0[:, idx[done_now]]
    idx = idx[~done_now]
    if idx.size == 0:
        return result, steps

    y = y0[:, idx]
    t = np.zeros(idx.size)
    end = t_end[idx]
    p = [q[idx] for q in params]
    h = np.minimum(np.full(idx.size, first_step), end)
    count = np.zeros(idx.size, dtype=int)
    K = np.empty((12, d, idx.size))
    K[0] = rhs(t, y, *p)

    for _ in range(max_steps):
        remaining = end - t
        last = h >= remaining
        h = np.where(last, remaining, h)
        flat = K.reshape(12, -1)  # a view (K is contiguous): each weighted sum of stages is one dot
        shape = y.shape
        for i in range(1, 12):
            stage = y + h * np.dot(A[i, :i], flat[:i]).reshape(shape)
            K[i] = rhs(t + C[i] * h, stage, *p)
        y_new = y + h * np.dot(B, flat).reshape(shape)
        scale = atol + rtol * np.maximum(np.abs(y), np.abs(y_new))
        # the step times the stage combinations first: rates of 1e300 over steps of
        # 1e-300 are errors of order 1, not an overflow
        with np.errstate(over="ignore", invalid="ignore"):
            err5 = h * np.dot(E5, flat).reshape(shape) / scale
            err3 = h * np.dot(E3, flat).reshape(shape) / scale
            err5_2 = np.sum(err5 * err5, axis=0)
            err3_2 = np.sum(err3 * err3, axis=0)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            error = err5_2 / np.sqrt((err5_2 + 0.01 * err3_2) * d)
        error = np.where(err5_2 + err3_2 == 0.0, 0.0, error)
        accept = error <= 1.0  # False for NaN: a step into a singularity is retried smaller
        with np.errstate(divide="ignore", over="ignore"):
            factor = np.clip(_SAFETY * error ** (-1.0 / _ORDER), _MIN_FACTOR, _MAX_FACTOR)
        factor = np.where(np.isnan(error), _MIN_FACTOR, factor)
        factor = np.where(accept, factor, np.minimum(factor, 1.0))

        t = np.where(accept, np.where(last, end, t + h), t)
        y = np.where(accept, y_new, y)
        count += accept
        h = h * factor
        finished = accept & last
        collapsed = ~accept & (h <= 1e-14 * np.maximum(end, 1e-300))
        leaving = finished | collapsed
        if leaving.any():
            result[:, idx[finished]] = y[:, finished]
            steps[idx[leaving]] = count[leaving]
            keep = ~leaving
            idx, y, t, end, h, count = idx[keep], y[:, keep], t[keep], end[keep], h[keep], count[keep]
            p = [q[keep] for q in p]
            K = np.ascontiguousarray(K[:, :, keep])  # so that K.reshape below is a view
            accept = accept[keep]
            if idx.size == 0:
                break
        # first stage of the next step: f at the new point (accepted) or the old one (kept)
        if accept.all():
            K[0] = rhs(t, y, *p)
        elif accept.any():
            K[0][:, accept] = rhs(t[accept], y[:, accept], *[q[accept] for q in p])
    else:
        steps[idx] = count  # ran out of steps: these stay NaN
    return result, steps
