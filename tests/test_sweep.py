"""deltakit.sweep: labelled grids equal the NumPy broadcast, lazily, on a cluster, saved.

The reference for every sweep is the same function called by hand on an open
grid (``np.ix_`` shapes): a sweep must give exactly those numbers, element for
element, whether it is evaluated eagerly, block by block with dask, or on a
dask.distributed cluster.
"""

from __future__ import annotations

import functools
import json
import os
import shutil
import signal
import subprocess
import sys

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

xr = pytest.importorskip("xarray")
da = pytest.importorskip("dask.array")

import deltakit as dk
import deltakit.sweeps as sweep_module
from deltakit import DomainError
from deltakit.constants import EARTH, MARS
from deltakit.sweeps import KNOWN_UNITS, open_sweep, save_sweep

MU = EARTH.mu
R1 = np.linspace(6700e3, 9000e3, 7)
R2 = np.geomspace(10000e3, 400000e3, 5)
NU = np.linspace(0.0, 2.0 * np.pi, 24, endpoint=False)
DV = np.array([-300.0, -20.0, 0.0, 50.0, 400.0])


def orbit_energy(nu, dv, rp, ra, mu):
    """An analyst's own function built from the numeric layer."""
    return dk.burn_prograde(dk.Conic.from_apsides(rp, ra, mu), nu, dv).energy_change


def assert_same(a, b):
    """Element for element, NaN where NaN."""
    np.testing.assert_array_equal(np.asarray(a), np.asarray(b))


# ---------------------------------------------------------------------- equals the broadcast
def test_transfer_fields_equal_the_broadcast_and_carry_units():
    ds = dk.sweep(dk.hohmann, r1=R1, r2=R2, mu=MU)
    direct = dk.hohmann(R1[:, None], R2[None, :], MU)
    assert set(ds.data_vars) == {"burn_1", "burn_2", "total", "duration"}
    assert ds["total"].dims == ("r1", "r2")
    assert_same(ds["burn_1"], direct.burns[0])
    assert_same(ds["burn_2"], direct.burns[1])
    assert_same(ds["total"], direct.total)
    assert_same(ds["duration"], direct.duration)
    # units from the Transfer field metadata and the table of parameter names
    assert ds["burn_2"].attrs["units"] == "m/s"
    assert ds["duration"].attrs["units"] == "s"
    assert ds["r1"].attrs["units"] == "m"
    assert ds["mu"].attrs["units"] == "m^3/s^2"
    assert float(ds["mu"]) == MU  # the fixed value stays in the dataset


def test_nested_result_and_fixed_object():
    """burn_prograde over nu x dv on one orbit: nested Conic fields get prefixes."""
    gto = dk.Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu)
    ds = dk.sweep(dk.burn_prograde, fixed={"conic": gto}, nu=NU, dv=DV)
    direct = dk.burn_prograde(gto, NU[:, None], DV[None, :])
    for name in ("after_rp", "after_e", "after_argp", "energy_change", "nu_after"):
        assert name in ds
    assert_same(ds["after_e"], direct.after.e)
    assert_same(ds["after_argp"], direct.after.argp)
    assert_same(ds["energy_change"], direct.energy_change)
    assert ds["energy_change"].attrs["units"] == "J/kg"
    assert ds["after_rp"].attrs["units"] == "m"
    assert "Conic" in ds.attrs["fixed"]
    # the `nu` and `dv` fields would collide with the axes: they are renamed, not lost
    assert_same(ds["dv_out"], np.broadcast_to(np.abs(DV), (NU.size, DV.size)))


def test_plain_array_dict_and_tuple_results():
    plain = dk.sweep(dk.propellant_mass, dv=[100.0, 900.0], ve=[2900.0, 3100.0, 4400.0], m0=1500.0)
    assert_same(
        plain["propellant_mass"],
        dk.propellant_mass(np.array([100.0, 900.0])[:, None], np.array([2900.0, 3100.0, 4400.0]), m0=1500.0),
    )
    assert plain["propellant_mass"].attrs["units"] == "kg"

    def books(dv, ve):
        return {"fraction": -np.expm1(-dv / ve), "ratio": np.exp(dv / ve)}

    as_dict = dk.sweep(books, dv=[100.0, 900.0], ve=[3000.0], units={"fraction": "1"})
    assert set(as_dict.data_vars) == {"fraction", "ratio"}
    assert as_dict["fraction"].attrs == {"units": "1"}
    assert "units" not in as_dict["ratio"].attrs

    conic = dk.Conic.from_apsides(7000e3, 20000e3, MU)
    as_tuple = dk.sweep(lambda nu: conic.velocity(nu), nu=NU, name="velocity")
    radial, transverse = conic.velocity(NU)
    assert_same(as_tuple["velocity_1"], radial)
    assert_same(as_tuple["velocity_2"], transverse)


def test_partial_with_scalar_results_broadcasts_over_the_grid():
    """A field that does not depend on an axis is spread over it (no meshgrid by the caller)."""
    ds = dk.sweep(functools.partial(dk.hohmann, mu=MARS.mu), r1=[MARS.radius + 300e3], r2=[2e7, 3e7])
    assert ds["total"].shape == (1, 2)
    assert ds.attrs["function"] == "deltakit.transfers.hohmann"
    assert float(ds["mu"]) == MARS.mu  # the partial's keyword is kept like a fixed value


@given(
    sizes=st.lists(st.integers(1, 6), min_size=4, max_size=4),
    dv_span=st.floats(-500.0, 2000.0),
    seed=st.integers(0, 2**32 - 1),
)
@settings(max_examples=60)
def test_any_grid_equals_the_open_grid_broadcast(sizes, dv_span, seed):
    rng = np.random.default_rng(seed)
    nu = rng.uniform(-np.pi, np.pi, sizes[0])
    dv = np.linspace(-abs(dv_span) / 4, dv_span, sizes[1])
    rp = rng.uniform(6600e3, 9000e3, sizes[2])
    ra = rng.uniform(9000e3, 50000e3, sizes[3])
    ds = dk.sweep(orbit_energy, nu=nu, dv=dv, rp=rp, ra=ra, mu=MU)
    grid = np.ix_(nu, dv, rp, ra)
    assert_same(ds["orbit_energy"], orbit_energy(*grid, MU))
    assert list(ds.dims) == ["nu", "dv", "rp", "ra"]


# ---------------------------------------------------------------------- lazy, chunked
@pytest.mark.parametrize("chunks", ["auto", 7, 100, {"nu": 5, "ra": 2}, {"rp": -1, "nu": 24}])
def test_chunked_equals_eager(chunks):
    axes = {"nu": NU, "dv": DV, "rp": R1, "ra": np.geomspace(9500e3, 60000e3, 6)}
    eager = dk.sweep(orbit_energy, mu=MU, **axes)
    lazy = dk.sweep(orbit_energy, mu=MU, chunks=chunks, **axes)
    assert isinstance(lazy["orbit_energy"].data, da.Array)
    assert isinstance(eager["orbit_energy"].data, np.ndarray)
    assert_same(lazy["orbit_energy"].compute(), eager["orbit_energy"])
    # reductions are the same too (computed block by block)
    assert_same(lazy["orbit_energy"].max("nu").compute(), eager["orbit_energy"].max("nu"))
    assert lazy["orbit_energy"].attrs == eager["orbit_energy"].attrs


def test_multi_field_lazy_sweep_computes_each_block_once():
    calls = []

    def counted(r1, r2):
        calls.append(np.size(r1) * np.size(r2))
        return dk.hohmann(r1, r2, MU)

    lazy = dk.sweep(counted, r1=R1, r2=R2, chunks={"r1": 4})
    calls.clear()
    computed = lazy.compute()
    eager = dk.sweep(functools.partial(dk.hohmann, mu=MU), r1=R1, r2=R2)
    for name in ("burn_1", "burn_2", "total", "duration"):
        assert_same(computed[name], eager[name])
    assert len(calls) == 2  # two blocks, four fields: one call per block


def test_large_grid_goes_lazy_by_itself(monkeypatch):
    monkeypatch.setattr(sweep_module, "EAGER_LIMIT", 100)
    ds = dk.sweep(dk.hohmann, r1=R1, r2=np.geomspace(1e7, 1e9, 20), mu=MU)
    assert isinstance(ds["total"].data, da.Array)
    forced = dk.sweep(dk.hohmann, r1=R1, r2=np.geomspace(1e7, 1e9, 20), mu=MU, chunks=False)
    assert isinstance(forced["total"].data, np.ndarray)
    assert_same(ds["total"].compute(), forced["total"])


def test_a_ten_billion_case_sweep_is_built_without_computing_it():
    """Building the sweep costs nothing; one element computes one small block."""
    n = 320  # 320**4 = 1.05e10 cases, 84 GB if it were materialised
    axes = {
        "nu": np.linspace(0, 2 * np.pi, n, endpoint=False),
        "dv": np.linspace(1.0, 1000.0, n),
        "rp": np.linspace(6600e3, 8000e3, n),
        "ra": np.linspace(8000e3, 60000e3, n),
    }
    ds = dk.sweep(orbit_energy, mu=MU, **axes)
    assert ds["orbit_energy"].size > 10**10
    assert np.prod(ds["orbit_energy"].data.chunksize) <= sweep_module._BLOCK_CASES  # bounded blocks
    one = ds["orbit_energy"].isel(nu=17, dv=200, rp=3, ra=n - 1).compute()
    expected = orbit_energy(axes["nu"][17], axes["dv"][200], axes["rp"][3], axes["ra"][n - 1], MU)
    assert float(one) == pytest.approx(float(expected), rel=1e-15)


def test_a_sweep_far_beyond_memory_is_built_in_bounded_memory():
    """9e12 cases (72 TB if materialised) under a 2 GiB address-space limit, in a fresh process.

    Building the sweep must take a few seconds and little memory (the graph
    is made on demand, in blocks grown so the task count stays bounded), and
    one element computes one block.
    """
    script = """
import resource, time
resource.setrlimit(resource.RLIMIT_AS, (2 * 1024**3, 2 * 1024**3))
import numpy as np, deltakit as dk
import deltakit.sweeps as sweeps
from deltakit.trades import prograde_energy_change
start = time.perf_counter()
n = 1733  # n**4 = 9.02e12 cases
axes = dict(nu=np.linspace(0, 6.28, n), dv=np.linspace(1, 1000, n),
            rp=np.linspace(6.6e6, 8e6, n), ra=np.linspace(8e6, 6e7, n))
ds = dk.sweep(prograde_energy_change, mu=3.986004418e14, name="energy_change", **axes)
built = time.perf_counter() - start
data = ds["energy_change"].data
one = float(ds["energy_change"].isel(nu=17, dv=200, rp=3, ra=n - 1).compute())
expected = float(prograde_energy_change(axes["nu"][17], axes["dv"][200], axes["rp"][3], axes["ra"][n - 1],
                                        3.986004418e14))
print(data.size, data.npartitions, np.prod([max(c) for c in data.chunks]), built, one, expected)
"""
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr[-3000:]
    size, blocks, block_cases, built, one, expected = (float(x) for x in done.stdout.split())
    assert size > 9e12
    # grown blocks: some 6e5 tasks of up to 2^24 cases, not 9e6 of 2^20
    assert sweep_module._BLOCK_CASES < block_cases <= sweep_module._LARGEST_BLOCK
    assert blocks <= 1.25 * size / sweep_module._LARGEST_BLOCK
    assert built < 30.0, f"building the sweep took {built:.1f} s"
    assert one == expected


def test_the_docstring_states_the_block_sizes_the_code_uses():
    doc = " ".join(dk.sweep.__doc__.split())
    for constant in (sweep_module._BLOCK_CASES, sweep_module._LARGEST_BLOCK, sweep_module._MAX_BLOCKS):
        assert f"2^{constant.bit_length() - 1}" in doc


def test_block_size_grows_only_for_huge_grids():
    assert sweep_module._auto_block_cases(10**6) == sweep_module._BLOCK_CASES
    assert sweep_module._auto_block_cases(10**10) == sweep_module._BLOCK_CASES
    grown = sweep_module._auto_block_cases(10**12)
    assert sweep_module._BLOCK_CASES < grown <= sweep_module._LARGEST_BLOCK
    assert 10**12 / grown <= sweep_module._MAX_BLOCKS
    assert sweep_module._auto_block_cases(10**15) == sweep_module._LARGEST_BLOCK


# ---------------------------------------------------------------------- axes apart from options
def test_axes_named_like_options_go_in_the_mapping():
    """An axis called `units` (or `name`, `chunks`, `fixed`) is given in the axes mapping."""

    def cost(units, name, dv):  # an analyst's function whose parameters collide with sweep's options
        return dv * units + name

    ds = dk.sweep(cost, {"units": [1.0, 2.0], "name": [0.0, 10.0]}, dv=[5.0, 7.0], units={"dv": "m/s"})
    assert ds["cost"].dims == ("units", "name", "dv")
    grid = np.ix_([1.0, 2.0], [0.0, 10.0], [5.0, 7.0])
    assert_same(ds["cost"], cost(*grid))
    assert ds["dv"].attrs["units"] == "m/s"  # `units=` as a keyword is still the option
    # fixed values by the mapping too (0-d), and option keywords keep their meaning
    fixed = dk.sweep(cost, {"units": 3.0, "name": [1.0]}, dv=[2.0], name="price")
    assert float(fixed["price"][0, 0]) == 7.0 and float(fixed["units"]) == 3.0


def test_an_option_keyword_that_the_function_also_takes_is_refused():
    def cost(units, dv):
        return dv * units

    with pytest.raises(TypeError, match=r"`units=` is sweep's own option.*sweep\(f, \{'units': \.\.\.\}\)"):
        dk.sweep(cost, dv=[1.0, 2.0], units={"dv": "m/s"})
    with pytest.raises(TypeError, match="axis `dv` given both in the mapping and as a keyword"):
        dk.sweep(cost, {"dv": [1.0]}, dv=[2.0], fixed={"units": 1.0})
    # given in `fixed`, the parameter is no longer ambiguous
    ds = dk.sweep(cost, dv=[1.0, 2.0], fixed={"units": 3.0}, units={"dv": "m/s"})
    assert ds["cost"].values.tolist() == [3.0, 6.0]


def test_existing_keyword_calls_keep_working():
    ds = dk.sweep(dk.hohmann, r1=R1, r2=R2, mu=MU, chunks=False, name="ignored", units={"total": "m/s"})
    assert_same(ds["total"], dk.hohmann(R1[:, None], R2[None, :], MU).total)


# ---------------------------------------------------------------------- on a cluster
@pytest.mark.slow
def test_local_cluster_run_equals_local_run():
    distributed = pytest.importorskip("dask.distributed")
    axes = {"nu": NU, "dv": DV, "rp": R1, "ra": np.geomspace(9500e3, 60000e3, 6)}
    local = dk.sweep(orbit_energy, mu=MU, chunks={"rp": 2}, **axes)
    expected = local["orbit_energy"].max("nu").compute(scheduler="sync")
    with (
        distributed.LocalCluster(
            n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None, memory_limit="1GiB"
        ) as cluster,
        distributed.Client(cluster) as client,
    ):
        on_cluster = dk.sweep(orbit_energy, mu=MU, chunks={"rp": 2}, **axes)
        with distributed.get_task_stream(client) as stream:
            result = on_cluster["orbit_energy"].max("nu").compute()  # the active Client picks it up
    workers_used = {task["worker"] for task in stream.data}
    assert len(workers_used) == 2  # both worker processes evaluated blocks
    assert_same(result, expected)


# ---------------------------------------------------------------------- bad input
def test_errors_name_the_parameter():
    with pytest.raises(TypeError, match="`rx` is not a keyword parameter of hohmann"):
        dk.sweep(dk.hohmann, r1=R1, rx=R2, mu=MU)
    with pytest.raises(DomainError, match="sweep axis `r2` must be 1-D"):
        dk.sweep(dk.hohmann, r1=R1, r2=np.ones((2, 2)), mu=MU)
    with pytest.raises(DomainError, match="sweep axis `r2` must have at least one value"):
        dk.sweep(dk.hohmann, r1=R1, r2=[], mu=MU)
    with pytest.raises(TypeError, match="at least one 1-D axis"):
        dk.sweep(dk.hohmann, r1=7e6, r2=8e6, mu=MU)
    with pytest.raises(TypeError, match="`mu` given both"):
        dk.sweep(dk.hohmann, r1=R1, r2=R2, mu=MU, fixed={"mu": MU})
    with pytest.raises(ValueError, match="`chunks` names \\['rr'\\]"):
        dk.sweep(dk.hohmann, r1=R1, r2=R2, mu=MU, chunks={"rr": 2})
    with pytest.raises(ValueError, match="`chunks` must be"):
        dk.sweep(dk.hohmann, r1=R1, r2=R2, mu=MU, chunks=-3)
    # the function's own domain checks reach the analyst, naming its parameter
    with pytest.raises(DomainError, match="`r2` must be > 0"):
        dk.sweep(dk.hohmann, r1=R1, r2=[-1.0, 2e7], mu=MU)


def test_known_units_cover_the_design_vocabulary():
    for name in ("nu", "dv", "rp", "ra", "r1", "r2", "rb", "mu", "ve", "isp", "m0", "mf", "thrust", "vinf"):
        assert name in KNOWN_UNITS


def test_importing_the_modules_keeps_dk_sweep_the_function():
    """The module is `deltakit.sweeps`, so importing it never shadows `deltakit.sweep`."""
    import deltakit.trades  # noqa: F401  (imports the module deltakit.sweeps)

    assert callable(dk.sweep) and dk.sweep is sweep_module.sweep
    ds = dk.sweep(dk.circular_speed, r=[7e6], mu=MU)
    assert float(ds["circular_speed"][0]) == pytest.approx(float(dk.circular_speed(7e6, MU)))


# ---------------------------------------------------------------------- save and reopen
def assert_only_the_sweep(path):
    """Beside a saved sweep: its link, the one version it points to, and the save lock."""
    version = os.readlink(path)
    assert version.startswith(f".{path.name}.") and version.endswith(".v")
    expected = {path.name, version, f".{path.name}.save.lock"}
    assert {p.name for p in path.parent.iterdir()} == expected


def test_round_trip_keeps_values_coords_and_attrs(tmp_path):
    gto = dk.Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu)
    ds = dk.sweep(dk.burn_prograde, fixed={"conic": gto}, nu=NU, dv=DV)
    path = save_sweep(ds, tmp_path / "burns.zarr")
    back = open_sweep(path)
    xr.testing.assert_identical(back, ds)
    assert back["energy_change"].attrs["units"] == "J/kg"
    assert back["nu"].attrs["units"] == "rad"
    assert_only_the_sweep(path)  # no temporary left behind


def test_lazy_sweep_streams_to_disk_and_reopens_lazily(tmp_path):
    lazy = dk.sweep(
        orbit_energy, nu=NU, dv=DV, rp=R1, ra=np.geomspace(9500e3, 60000e3, 6), mu=MU, chunks={"rp": 3}
    )
    path = save_sweep(lazy, tmp_path / "grid.zarr")
    back = open_sweep(path, chunks={})
    assert isinstance(back["orbit_energy"].data, da.Array)
    xr.testing.assert_identical(back.compute(), lazy.compute())
    back.close()


def test_bool_and_nan_survive(tmp_path):
    ds = dk.sweep(dk.bielliptic, r1=[7e6], r2=[7e7, 1e8], rb=[5e7, 2e8], mu=MU)
    ds["cheaper"] = ds["total"] < 4000.0
    assert np.isnan(ds["total"].values).any()
    back = open_sweep(save_sweep(ds, tmp_path / "b.zarr"))
    xr.testing.assert_identical(back, ds)
    assert back["cheaper"].dtype == bool


def test_overwrites_a_sweep_but_refuses_anything_else(tmp_path):
    first = dk.sweep(dk.circular_speed, r=[7e6, 8e6], mu=MU)
    second = dk.sweep(dk.circular_speed, r=[9e6], mu=MU)
    path = tmp_path / "s.zarr"
    save_sweep(first, path)
    save_sweep(second, path)
    xr.testing.assert_identical(open_sweep(path), second)
    assert_only_the_sweep(path)

    notes = tmp_path / "notes.zarr"
    notes.write_text("an analyst's notes")
    with pytest.raises(DomainError, match="refusing to overwrite .*not a deltakit sweep"):
        save_sweep(first, notes)
    assert notes.read_text() == "an analyst's notes"

    foreign = tmp_path / "foreign.zarr"
    xr.Dataset({"x": ("i", [1.0, 2.0])}).to_zarr(foreign, consolidated=False)
    with pytest.raises(DomainError, match="not a deltakit sweep"):
        save_sweep(first, foreign)
    with pytest.raises(DomainError, match="not a deltakit sweep"):
        open_sweep(foreign)
    assert xr.open_zarr(foreign, consolidated=False)["x"].values.tolist() == [1.0, 2.0]

    with pytest.raises(DomainError, match="`dataset` must be a deltakit sweep"):
        save_sweep(xr.Dataset({"x": ("i", [1.0])}), tmp_path / "new.zarr")


def test_failed_save_leaves_the_old_sweep(tmp_path, monkeypatch):
    old = dk.sweep(dk.circular_speed, r=[7e6, 8e6], mu=MU)
    path = save_sweep(old, tmp_path / "s.zarr")

    def broken(self, *args, **kwargs):
        raise OSError("disk full")

    monkeypatch.setattr(xr.Dataset, "to_zarr", broken)
    with pytest.raises(OSError, match="disk full"):
        save_sweep(dk.sweep(dk.circular_speed, r=[9e6], mu=MU), path)
    monkeypatch.undo()
    xr.testing.assert_identical(open_sweep(path), old)
    assert_only_the_sweep(path)


# ---------------------------------------------------------------------- killed and concurrent saves
# A child process saves a sweep and stops itself (SIGSTOP) at a chosen moment
# of the save, inside the real code path; the test then kills it with SIGKILL
# there (or lets it go on). Nothing is mocked: the child's save really dies at
# that instant, and the test opens whatever it left, as the next session would.
_SAVING_CHILD = r"""
import os, signal, sys
import numpy as np
import deltakit as dk
import deltakit._folders as folders
import xarray as xr

path, stage, size = sys.argv[1], sys.argv[2], int(sys.argv[3])
ds = dk.sweep(dk.circular_speed, r=np.linspace(7e6, 9e6, size), mu=3.986004418e14)

def pause():
    os.kill(os.getpid(), signal.SIGSTOP)

swap, to_zarr = folders._swap_link, xr.Dataset.to_zarr
if stage == "before-swap":     # the new version complete, the old one still at the path
    folders._swap_link = lambda link, target: (pause(), swap(link, target))
elif stage == "after-swap":    # the new version at the path, the old one not yet removed
    folders._swap_link = lambda link, target: (swap(link, target), pause())
elif stage == "while-writing":  # the new version half written
    def writing(self, store, **kwargs):
        to_zarr(self, store, **kwargs)
        pause()
    xr.Dataset.to_zarr = writing
dk.save_sweep(ds, path)
print("saved", flush=True)
"""


def _sweep_of(size):
    return dk.sweep(dk.circular_speed, r=np.linspace(7e6, 9e6, size), mu=MU)


def _saving_child(path, stage, size):
    """A child saving ``_sweep_of(size)`` at ``path``, stopped at ``stage`` (or running, stage "none")."""
    child = subprocess.Popen(
        [sys.executable, "-c", _SAVING_CHILD, str(path), stage, str(size)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    if stage != "none":
        _, status = os.waitpid(child.pid, os.WUNTRACED)
        assert os.WIFSTOPPED(status), f"the child did not stop at {stage}: {child.stderr.read()[-2000:]}"
    return child


def _kill(child):
    child.send_signal(signal.SIGKILL)
    child.wait(timeout=30)
    assert child.returncode == -signal.SIGKILL


def _old_style_sweep(dataset, path):
    """A sweep saved as a plain folder at the path, as deltakit saved them before versioned links."""
    dataset.to_zarr(path, mode="w", consolidated=False, write_empty_chunks=True)


@pytest.mark.parametrize("legacy", [False, True], ids=["versioned", "old-style folder"])
@pytest.mark.parametrize(
    "stage, survivor", [("while-writing", "old"), ("before-swap", "old"), ("after-swap", "new")]
)
def test_a_save_killed_at_any_moment_leaves_a_complete_sweep(tmp_path, stage, survivor, legacy):
    path = tmp_path / "s.zarr"
    old, new = _sweep_of(3), _sweep_of(5)
    if legacy:
        _old_style_sweep(old, path)
    else:
        save_sweep(old, path)
    child = _saving_child(path, stage, 5)
    _kill(child)
    # at the instant of the kill, a complete sweep opens at the path: old or new
    assert path.exists()
    expected = old if survivor == "old" else new
    xr.testing.assert_identical(xr.open_zarr(path, consolidated=False).load(), expected)
    # the next open removes what the killed save left beside it
    left = {p.name for p in tmp_path.iterdir()} - {"s.zarr", ".s.zarr.save.lock"}
    assert left, "the kill left nothing to clean: the child was not stopped inside the save"
    xr.testing.assert_identical(open_sweep(path), expected)
    if path.is_symlink():
        assert_only_the_sweep(path)
    else:  # the old-style folder, untouched by the killed save
        assert {p.name for p in tmp_path.iterdir()} == {"s.zarr", ".s.zarr.save.lock"}
    # and the next save works as usual
    save_sweep(new, path)
    xr.testing.assert_identical(open_sweep(path), new)
    assert_only_the_sweep(path)


def test_a_lost_link_is_restored_to_the_newest_complete_version(tmp_path):
    # Where the system cannot swap a folder for a link in one step, converting
    # an old-style folder moves it to a version first; a kill right then leaves
    # no sweep at the path. The next open puts back the newest complete version.
    path = tmp_path / "s.zarr"
    old, new = _sweep_of(3), _sweep_of(4)
    save_sweep(old, path)
    older = tmp_path / os.readlink(path)
    save_sweep(new, path)
    newest = tmp_path / os.readlink(path)
    shutil.copytree(newest, tmp_path / ".s.zarr.0000000000000001.1.abcd.v")  # an older complete version
    path.unlink()
    assert not path.exists() and not older.exists()
    with pytest.warns(UserWarning, match="interrupted; the newest complete version"):
        back = open_sweep(path)
    xr.testing.assert_identical(back, new)
    assert_only_the_sweep(path)


def test_an_older_deltakits_set_aside_sweep_is_recovered(tmp_path):
    # deltakit before versioned links moved the old sweep to .NAME.*.old/sweep
    # and was killed before it renamed the new one into place.
    path = tmp_path / "s.zarr"
    old = _sweep_of(3)
    aside = tmp_path / ".s.zarr.k2j4h1.old"
    aside.mkdir()
    _old_style_sweep(old, aside / "sweep")
    (tmp_path / ".s.zarr.x81b2c.tmp").mkdir()  # its unfinished new store
    with pytest.warns(UserWarning, match="interrupted"):
        xr.testing.assert_identical(open_sweep(path), old)
    assert {p.name for p in tmp_path.iterdir()} == {"s.zarr", ".s.zarr.save.lock"}


def test_two_saves_at_once_run_one_after_the_other(tmp_path):
    path = tmp_path / "s.zarr"
    old = _sweep_of(2)
    save_sweep(old, path)
    first = _saving_child(path, "before-swap", 3)  # holds the lock, stopped
    second = _saving_child(path, "none", 4)
    try:
        with pytest.raises(subprocess.TimeoutExpired):
            second.wait(timeout=3.0)  # waits for the lock
        # meanwhile readers see the old sweep, and leave the running save's files alone
        xr.testing.assert_identical(open_sweep(path), old)
        assert len([p for p in tmp_path.iterdir() if p.name.endswith(".v")]) == 2
    finally:
        first.send_signal(signal.SIGCONT)
    assert first.wait(timeout=60) == 0 and first.stdout.read().strip() == "saved"
    assert second.wait(timeout=60) == 0 and second.stdout.read().strip() == "saved"
    xr.testing.assert_identical(open_sweep(path), _sweep_of(4))
    assert_only_the_sweep(path)


@pytest.mark.slow
def test_saves_killed_at_random_moments_always_leave_a_sweep(tmp_path):
    rng = np.random.default_rng(5)
    path = tmp_path / "s.zarr"
    sizes = {3, 5}
    save_sweep(_sweep_of(3), path)
    for round_number in range(12):
        size = 5 if round_number % 2 else 3
        child = _saving_child(path, "none", size)
        try:
            child.wait(timeout=rng.uniform(0.3, 3.0))
        except subprocess.TimeoutExpired:
            _kill(child)
        back = xr.open_zarr(path, consolidated=False).load()  # a complete sweep, whatever the moment
        assert back["r"].size in sizes
        xr.testing.assert_identical(back, _sweep_of(back["r"].size))
    open_sweep(path)
    assert_only_the_sweep(path)


def test_a_link_of_the_users_own_is_followed_and_kept(tmp_path):
    data = tmp_path / "data"
    data.mkdir()
    users = tmp_path / "latest.zarr"
    users.symlink_to(data / "run.zarr")
    save_sweep(_sweep_of(3), users)
    save_sweep(_sweep_of(4), users)
    assert os.readlink(users) == str(data / "run.zarr")  # the user's link is left as it was
    assert_only_the_sweep(data / "run.zarr")
    xr.testing.assert_identical(open_sweep(users), _sweep_of(4))


def test_corrupt_or_newer_store_is_refused_untouched(tmp_path):
    ds = dk.sweep(dk.circular_speed, r=np.linspace(7e6, 9e6, 50), mu=MU)
    path = save_sweep(ds, tmp_path / "s.zarr")
    meta = path / "zarr.json"
    content = json.loads(meta.read_text())
    content["attributes"]["deltakit_sweep"] = 99
    meta.write_text(json.dumps(content))
    with pytest.raises(DomainError, match="format version 99"):
        open_sweep(path)

    path2 = save_sweep(ds, tmp_path / "t.zarr")
    (path2 / "zarr.json").write_text("{ truncated")
    before = (path2 / "zarr.json").read_bytes()
    with pytest.raises(DomainError, match="not a readable Zarr store"):
        open_sweep(path2)
    assert (path2 / "zarr.json").read_bytes() == before

    # a lost chunk would otherwise read back as fill values: refused instead
    path3 = save_sweep(ds, tmp_path / "u.zarr")
    shutil.rmtree(path3 / "circular_speed" / "c")
    with pytest.raises(DomainError, match="corrupt: chunks missing in circular_speed"):
        open_sweep(path3)

    # a damaged chunk does not decode
    path4 = save_sweep(ds, tmp_path / "v.zarr")
    chunk_files = [p for p in (path4 / "circular_speed" / "c").rglob("*") if p.is_file()]
    chunk_files[0].write_bytes(b"garbage" * 3)
    with pytest.raises(DomainError, match="corrupt"):
        open_sweep(path4)

    with pytest.raises(FileNotFoundError):
        open_sweep(tmp_path / "missing.zarr")


def test_units_for_coordinates_and_unknown_names():
    def cost(throttle, dv):
        return dv / throttle

    ds = dk.sweep(cost, throttle=[0.5, 1.0], dv=[10.0, 20.0], units={"throttle": "1", "cost": "m/s"})
    assert ds["throttle"].attrs == {"units": "1"}
    assert ds["dv"].attrs == {"units": "m/s"}  # from the table of known parameter names
    assert ds["cost"].attrs == {"units": "m/s"}
    bare = dk.sweep(cost, throttle=[0.5, 1.0], dv=[10.0])
    assert "units" not in bare["throttle"].attrs and "units" not in bare["cost"].attrs


def test_missing_scale_extra_gives_a_clear_message(monkeypatch):
    monkeypatch.setitem(__import__("sys").modules, "xarray", None)
    with pytest.raises(ImportError, match=r"deltakit\[scale\]"):
        dk.sweep(dk.circular_speed, r=[7e6], mu=MU)


@pytest.mark.slow
def test_reducing_a_lazy_sweep_keeps_memory_bounded():
    """2.5e8 cases (2 GB if materialised) reduced over nu in a fresh process: peak RSS well below."""
    script = """
import resource, numpy as np, deltakit as dk
from deltakit.trades import prograde_energy_change
axes = dict(dv=np.linspace(5, 500, 20), rp=np.linspace(6.7e6, 8e6, 100),
            ra=np.linspace(8e6, 4e7, 500), nu=np.linspace(0, 6.28, 250))
ds = dk.sweep(prograde_energy_change, mu=3.986004418e14, name="energy_change", **axes)
best = ds["energy_change"].max("nu").compute()
assert best.shape == (20, 100, 500) and np.isfinite(best.values).all()
# this process's own peak (VmHWM): ru_maxrss would also hold the parent's peak, which Linux carries
# across the fork and exec that started this interpreter (a test suite's 1 GB read as the sweep's)
print(next(int(line.split()[1]) for line in open("/proc/self/status") if line.startswith("VmHWM")) * 1024)
"""
    done = subprocess.run(
        [sys.executable, "-c", script], capture_output=True, text=True, timeout=600, check=True
    )
    peak = int(done.stdout.split()[-1])
    assert peak < 1024**3, f"peak RSS {peak / 1024**2:.0f} MiB for a 2 GB grid"
