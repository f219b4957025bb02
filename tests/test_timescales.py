"""UTC dates to TDB seconds, checked against pyerfa's tables and astropy's Time.

pyerfa wraps the IAU SOFA routines (leap seconds in eraDat, TDB - TT in
eraDtdb); astropy's Time reaches TDB through its own chain of scales, so it
checks our use of them independently.
"""

from __future__ import annotations

import datetime as dt
import warnings

import numpy as np
import pytest

erfa = pytest.importorskip("erfa")
from astropy.time import Time

from deltakit import DomainError, epoch
from deltakit.timescales import J2000_JD, to_datetime64


def _astropy_tdb_seconds(values):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", erfa.ErfaWarning)  # astropy's own "dubious year" for future dates
        tdb = Time(values, scale="utc").tdb
    return (tdb.jd1 - J2000_JD) * 86400.0 + tdb.jd2 * 86400.0


def test_agrees_with_astropy_time_over_the_ephemeris_span():
    dates = np.array(
        ["1962-03-04T05:06:07", "1972-07-01T00:00:00", "1999-12-31T23:59:59.5", "2017-01-01T00:00:00",
         "2028-11-10T06:30:00", "2053-10-01T00:00:00"],
        dtype="datetime64[ms]",
    )  # fmt: skip
    assert np.allclose(epoch(dates), _astropy_tdb_seconds(dates), rtol=0, atol=1e-6)


def test_leap_second_at_the_end_of_2016():
    # IERS Bulletin C 52: a positive leap second 2016-12-31T23:59:60 UTC;
    # TAI - UTC went from 36 s to 37 s (pyerfa's eraDat table says the same).
    assert erfa.dat(2016, 12, 31, 0.0) == 36.0 and erfa.dat(2017, 1, 1, 0.0) == 37.0
    before, inside, after = epoch(["2016-12-31T23:59:59", "2016-12-31T23:59:60.5", "2017-01-01T00:00:00"])
    assert after - before == pytest.approx(2.0, abs=1e-6)  # two SI seconds across the leap
    assert inside - before == pytest.approx(1.5, abs=1e-6)
    # a normal day has no second 60
    with pytest.raises(DomainError, match="end of its day"):
        epoch("2016-12-30T23:59:60")


def test_tdb_minus_tt_at_a_known_date_matches_erfa():
    # TDB - TT at 2028-11-10 00:00 TT from eraDtdb at the geocentre; its size is
    # below 1.7 ms at any date (Fairhead and Bretagnon 1990 series: 1.657 ms
    # annual term; common practice).
    tt1, tt2 = erfa.dtf2d("TT", 2028, 11, 10, 0, 0, 0.0)
    expected = erfa.dtdb(tt1, tt2, 0.5, 0.0, 0.0, 0.0)
    ours = epoch("2028-11-10T00:00:00", scale="tt") - epoch("2028-11-10T00:00:00", scale="tdb")
    assert ours == pytest.approx(expected, abs=1e-9)
    assert 0 < abs(ours) < 1.7e-3


def test_tt_minus_utc_is_32_184_plus_the_leap_seconds():
    # TT = TAI + 32.184 s (IAU 1991 Resolution A4); TAI - UTC = 37 s since 2017.
    difference = epoch("2030-01-01T00:00:00") - epoch("2030-01-01T00:00:00", scale="tt")
    assert difference == pytest.approx(69.184, abs=1e-6)  # float64 seconds near 1e9: 1e-7 s apart


@pytest.mark.parametrize(
    "value",
    [
        "2028-11-10T06:30:00",
        "2028-11-10T06:30:00Z",
        "2028-11-10 08:30:00+02:00",
        dt.datetime(2028, 11, 10, 6, 30),
        dt.datetime(2028, 11, 10, 1, 30, tzinfo=dt.timezone(dt.timedelta(hours=-5))),
        np.datetime64("2028-11-10T06:30"),
    ],
)
def test_every_kind_of_date_reads_the_same(value):
    assert epoch(value) == pytest.approx(float(epoch(np.datetime64("2028-11-10T06:30:00"))), abs=1e-6)


def test_arrays_keep_their_shape_and_round_trip():
    dates = np.datetime64("2026-01-01") + np.arange(6).reshape(2, 3) * np.timedelta64(100, "D")
    seconds = epoch(dates)
    assert seconds.shape == (2, 3)
    assert np.array_equal(to_datetime64(seconds), dates.astype("datetime64[ms]"))
    assert epoch(seconds) is not None and np.array_equal(epoch(seconds), seconds)  # numbers pass through


@pytest.mark.parametrize(
    "value, match",
    [
        ("10 Nov 2028", "ISO 8601"),
        ("2028-13-01", "does not exist"),
        (np.datetime64("NaT"), "NaT"),
        ([1.0, np.nan], "finite"),
        (object(), "must be dates"),
    ],
)
def test_bad_dates_are_refused(value, match):
    with pytest.raises(DomainError, match=match):
        epoch(value)


def test_unknown_scale_is_refused():
    with pytest.raises(DomainError, match="`scale`"):
        epoch("2028-01-01", scale="gps")
