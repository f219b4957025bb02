"""Dates to ephemeris time: UTC calendar dates as TDB seconds past J2000.

An ephemeris is a function of Barycentric Dynamical Time (TDB); analysts think
in UTC calendar dates. :func:`epoch` bridges the two with the IAU SOFA
routines as wrapped by ``pyerfa`` (the ``planets`` extra):

* UTC -> TAI: the leap seconds of ERFA's table (``eraDat``), so a date is
  placed exactly even across a leap second (``"2016-12-31T23:59:60.5"`` is a
  valid UTC instant);
* TAI -> TT: TT = TAI + 32.184 s (IAU 1991 Resolution A4);
* TT -> TDB: the periodic terms of ``eraDtdb`` (Fairhead and Bretagnon 1990
  series, about 1.7 ms peak), evaluated at the geocentre.

Conventions
-----------
* The result is TDB seconds past J2000.0 (2000-01-01 12:00:00 TDB, JD
  2451545.0 TDB), float64: a resolution of about 0.1 microsecond in this
  century.
* Dates after the last leap second of ERFA's table use its last offset
  (TAI - UTC = 37 s since 2017); none has been announced since. Dates before
  1960, when UTC was not yet defined, get ERFA's own extrapolation. ERFA's
  "dubious year" warnings for both are expected here and silenced.
* Text, ``datetime`` and ``numpy.datetime64`` are read as UTC unless
  ``scale`` says otherwise; a ``datetime`` with a time zone is converted to
  UTC first. Arrays keep their shape; a scalar gives a NumPy scalar.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import datetime as _dt
import re
import warnings
from typing import Any

import numpy as np

from ._checks import finite, scalar_or_array
from .errors import DomainError
from .units import is_quantity

__all__ = ["J2000_JD", "epoch", "require_planets_extra", "tdb_seconds", "to_datetime64"]

#: Julian date of the J2000.0 epoch (2000-01-01 12:00 TDB), days.
J2000_JD: float = 2451545.0

_DAY = 86_400.0
_SCALES = ("utc", "tt", "tdb")

_ISO = re.compile(
    r"^\s*(?P<year>[+-]?\d{4,})-(?P<month>\d{1,2})-(?P<day>\d{1,2})"
    r"(?:[T ](?P<hour>\d{1,2})(?::(?P<minute>\d{1,2})(?::(?P<second>\d{1,2}(?:\.\d*)?))?)?)?"
    r"\s*(?P<zone>Z|UTC|[+-]\d{2}:?\d{2})?\s*$",
    re.IGNORECASE,
)


def require_planets_extra(module: str) -> Any:
    """Import ``module`` of the ``planets`` extra, or an ImportError saying how to install it."""
    import importlib

    try:
        return importlib.import_module(module)
    except ImportError as err:
        raise ImportError(
            f"this needs {err.name or module}, part of deltakit's `planets` extra "
            '(jplephem, skyfield-data, pyerfa): pip install "deltakit[planets]"'
        ) from err


# ---------------------------------------------------------------------- calendar fields
def _fields_of_datetime64(values: np.ndarray, name: str) -> tuple[np.ndarray, ...]:
    """Year, month, day, hour, minute (ints) and seconds (float) of datetime64 values."""
    if np.isnat(values).any():
        raise DomainError(f"`{name}` holds NaT (not a time); give real dates")
    ns = values.astype("datetime64[ns]")
    days = ns.astype("datetime64[D]")
    months = days.astype("datetime64[M]")
    years = months.astype("datetime64[Y]")
    year = years.astype(np.int64) + 1970
    month = (months - years).astype(np.int64) + 1
    day = (days - months).astype(np.int64) + 1
    in_day = (ns - days).astype(np.int64)  # ns since midnight
    hour, rest = np.divmod(in_day, 3_600_000_000_000)
    minute, rest = np.divmod(rest, 60_000_000_000)
    second = rest / 1e9
    return year, month, day, hour, minute, second


def _fields_of_text(text: str, name: str) -> tuple[int, int, int, int, int, float, float]:
    """Calendar fields of one ISO 8601 date, and its zone offset in minutes (leap second 60 allowed)."""
    match = _ISO.match(text)
    if match is None:
        raise DomainError(
            f"`{name}` must be an ISO 8601 date such as '2028-11-10' or '2028-11-10T06:30:00', got {text!r}"
        )
    part = match.groupdict()
    zone = (part["zone"] or "").upper()
    offset = 0.0
    if zone and zone not in ("Z", "UTC"):
        sign = -1.0 if zone[0] == "-" else 1.0
        digits = zone[1:].replace(":", "")
        offset = sign * (int(digits[:2]) * 60 + int(digits[2:]))
    return (
        int(part["year"]),
        int(part["month"]),
        int(part["day"]),
        int(part["hour"] or 0),
        int(part["minute"] or 0),
        float(part["second"] or 0.0),
        offset,
    )


_NOT_DATES = "must be dates: ISO 8601 text, datetime, numpy.datetime64, or TDB seconds past J2000 as numbers"


def _fields_of_object(item: Any, name: str) -> tuple[int, int, int, int, int, float, float]:
    if isinstance(item, str):
        return _fields_of_text(item, name)
    if isinstance(item, _dt.datetime):
        if item.tzinfo is not None:
            item = item.astimezone(_dt.timezone.utc).replace(tzinfo=None)
        return (
            item.year,
            item.month,
            item.day,
            item.hour,
            item.minute,
            item.second + item.microsecond / 1e6,
            0,
        )
    if isinstance(item, _dt.date):
        return (item.year, item.month, item.day, 0, 0, 0.0, 0.0)
    if isinstance(item, np.datetime64):
        fields = _fields_of_datetime64(np.asarray(item), name)
        return (*(f.item() for f in fields), 0.0)  # type: ignore[return-value]
    shown = repr(item) if len(repr(item)) <= 60 else repr(item)[:57] + "..."
    raise DomainError(f"`{name}` {_NOT_DATES}; got {type(item).__name__} ({shown})")


def _calendar_fields(value: Any, name: str) -> tuple[tuple[np.ndarray, ...], np.ndarray, tuple[int, ...]]:
    """Calendar fields as arrays, the zone offsets (minutes) and the shape of ``value``."""
    array = np.asarray(value)
    if array.dtype.kind == "M":
        return _fields_of_datetime64(array, name), np.zeros(array.shape), array.shape
    if array.dtype.kind in "USO":
        flat = [_fields_of_object(item, name) for item in array.reshape(-1).tolist()]
        if not flat:
            columns = [np.zeros(0)] * 7
        else:
            columns = [np.asarray(column) for column in zip(*flat)]
        shaped = [column.reshape(array.shape) for column in columns]
        return tuple(shaped[:6]), shaped[6], array.shape
    what = f"an array of {array.dtype}" if array.ndim else f"{type(value).__name__} ({value!r})"
    raise DomainError(f"`{name}` {_NOT_DATES}; got {what}")


# ---------------------------------------------------------------------- public
def epoch(value: Any, scale: str = "utc") -> Any:
    """TDB seconds past J2000 of calendar dates.

    Parameters
    ----------
    value : str, datetime.datetime, datetime.date, numpy.datetime64, or array_like of them
        Dates. Text is ISO 8601 (``"2028-11-10"``, ``"2028-11-10T06:30:00"``,
        an optional ``Z`` or ``+hh:mm`` zone); a leap second (``...T23:59:60``)
        is allowed on a leap-second day. Plain numbers are taken as TDB seconds
        past J2000 already and returned unchanged (checked finite).
    scale : {"utc", "tt", "tdb"}, optional
        Time scale the dates are written in (default UTC).

    Returns
    -------
    numpy.float64 or ndarray of float64, shape of ``value``
        TDB seconds past J2000.0.

    Raises
    ------
    DomainError
        Text that is not an ISO date, a calendar field out of range (month 13,
        second 60 on a day without a leap second), NaT, or an unknown ``scale``.
    ImportError
        Without the ``planets`` extra (pyerfa).

    Examples
    --------
    J2000.0 is 2000-01-01 11:58:55.816 UTC (TT - UTC = 64.184 s then), give or
    take TDB - TT, a tenth of a millisecond that day:

    >>> from deltakit import epoch
    >>> abs(float(epoch("2000-01-01T11:58:55.816"))) < 2e-4
    True
    >>> round(float(epoch("2000-01-01T12:00:00", scale="tdb")), 9)
    0.0

    The leap second at the end of 2016 is one second long:

    >>> float(epoch("2017-01-01T00:00:00") - epoch("2016-12-31T23:59:59"))
    2.0
    """
    return tdb_seconds(value, "value", scale)


def tdb_seconds(value: Any, name: str, scale: str = "utc") -> Any:
    """:func:`epoch` for a parameter called ``name``: its errors name that parameter.

    Numbers (and time quantities, read in seconds) are TDB seconds past J2000
    already and come back checked finite; masked arrays are refused.

    Examples
    --------
    >>> from deltakit.timescales import tdb_seconds
    >>> float(tdb_seconds(86400.0, "departure"))
    86400.0
    """
    if scale not in _SCALES:
        raise DomainError(f"`scale` must be one of {_SCALES}, got {scale!r}")
    if is_quantity(value) or isinstance(value, np.ma.MaskedArray):  # seconds, or refused: never stripped
        return scalar_or_array(finite(value, name, "s"))
    array = np.asarray(value) if not isinstance(value, (_dt.date, str)) else None
    if array is not None and array.dtype.kind in "fiu" and not isinstance(value, np.datetime64):
        return scalar_or_array(finite(value, name, "s"))
    erfa = require_planets_extra("erfa")
    (year, month, day, hour, minute, second), offset, shape = _calendar_fields(value, name)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", erfa.ErfaWarning)  # "dubious year": see the module notes
        try:
            jd1, jd2 = erfa.dtf2d(scale.upper(), year, month, day, hour, minute, second)
        except erfa.ErfaError as err:
            raise DomainError(f"`{name}` holds a date that does not exist on the calendar ({err})") from None
        if any("end of day" in str(warning.message) for warning in caught):
            raise DomainError(
                f"`{name}` holds a time past the end of its day (second 60 exists only on a leap-second day)"
            )
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", erfa.ErfaWarning)
        jd2 = jd2 - offset / 1440.0
        if scale == "utc":
            jd1, jd2 = erfa.utctai(jd1, jd2)
            jd1, jd2 = erfa.taitt(jd1, jd2)
        if scale != "tdb":
            # TDB - TT at the geocentre; its argument (UT1 fraction of day) may be UTC's at this accuracy.
            tdb_minus_tt = erfa.dtdb(jd1, jd2, np.mod(jd2 + 0.5, 1.0), 0.0, 0.0, 0.0)
            jd2 = jd2 + tdb_minus_tt / _DAY
    seconds = (np.asarray(jd1) - J2000_JD) * _DAY + np.asarray(jd2) * _DAY
    return scalar_or_array(np.reshape(seconds, shape))


def to_datetime64(t: Any) -> Any:
    """UTC dates (numpy.datetime64, ms) of TDB seconds past J2000: the inverse of :func:`epoch`.

    Leap seconds themselves are not representable in ``numpy.datetime64``; an
    instant inside one is shown as the second before.

    Examples
    --------
    >>> from deltakit.timescales import epoch, to_datetime64
    >>> to_datetime64(epoch("2028-11-10T06:30:00"))
    np.datetime64('2028-11-10T06:30:00.000')
    """
    erfa = require_planets_extra("erfa")
    t = finite(t, "t", "s")
    jd1 = np.full(t.shape, J2000_JD)
    jd2 = t / _DAY
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", erfa.ErfaWarning)
        tt1, tt2 = jd1, jd2 - erfa.dtdb(jd1, jd2, np.mod(jd2 + 0.5, 1.0), 0.0, 0.0, 0.0) / _DAY
        tai1, tai2 = erfa.tttai(tt1, tt2)
        utc1, utc2 = erfa.taiutc(tai1, tai2)
        year, month, day, fields = erfa.d2dtf("UTC", 3, utc1, utc2)
    fields = np.asarray(fields)
    stamp = np.char.add(
        np.char.add(
            np.char.add(np.char.zfill(np.asarray(year).astype(str), 4), "-"),
            np.char.add(np.char.zfill(np.asarray(month).astype(str), 2), "-"),
        ),
        np.char.zfill(np.asarray(day).astype(str), 2),
    )
    dates = stamp.astype("datetime64[ms]")
    hour, minute, second, fraction = (fields[key].astype(np.int64) for key in ("h", "m", "s", "f"))
    second = np.minimum(second, 59)  # inside a leap second: the second before
    offset = ((hour * 60 + minute) * 60 + second) * 1000 + fraction
    return scalar_or_array(dates + offset.astype("timedelta64[ms]"))
