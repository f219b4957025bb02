"""Budget: arithmetic against the rocket equation, editing, tables and files.

The demo mission here is invented: the "Tamsin" relay tug (masses, engines,
arrival speed and orbits are ours) around Mars with the cited constants of
deltakit.constants.
"""

from __future__ import annotations

import csv
import dataclasses
import html
import io
import json
import os
import re
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st

import deltakit as dk
from deltakit import _files as files_module
from deltakit.budget import FORMAT, VERSION, Budget, BudgetLine
from deltakit.constants import MARS

# Invented demo vehicle: a small Mars relay tug.
TAMSIN_WET = 1450.0  # kg
TAMSIN_DRY = 610.0  # kg
MAIN_VE = dk.exhaust_velocity(321.0)  # bipropellant main engine, invented Isp
TRIM_VE = dk.exhaust_velocity(226.0)  # monopropellant thrusters, invented Isp
PARKING = MARS.radius + 400e3  # periapsis of the capture orbit
RELAY = MARS.radius + 17000e3  # first relay slot, circular
SECOND_SLOT = RELAY + 3000e3  # second relay slot, circular
ARRIVAL_VINF = 2650.0  # invented arrival excess speed, m/s


def circularise_at_relay() -> float:
    """Apoapsis burn from the capture ellipse onto the relay circle, m/s."""
    capture_orbit = dk.Conic.from_apsides(PARKING, RELAY, MARS.mu)
    return float(dk.circular_speed(RELAY, MARS.mu) - capture_orbit.speed(np.pi))


def tamsin() -> Budget:
    """The invented mission: cruise trim, capture, circularise, change slot, upkeep."""
    return (
        Budget(TAMSIN_WET, MAIN_VE, name="Tamsin relay tug", dry_mass=TAMSIN_DRY)
        .add("cruise trim", 30.0, ve=TRIM_VE, margin=0.25)
        .add("Mars capture", dk.capture_burn(PARKING, ARRIVAL_VINF, MARS.mu, ra=RELAY), margin=0.05)
        .add("circularise at relay", circularise_at_relay(), margin=0.05)
        .add("move to second slot", dk.hohmann(RELAY, SECOND_SLOT, MARS.mu), margin=0.03)
        .add("station keeping", 45.0, ve=TRIM_VE, margin=0.5)
    )


# ---------------------------------------------------------------------- arithmetic
def test_two_burns_against_curtis_example_6_1():
    # Curtis, Orbital Mechanics for Engineering Students (3rd ed.), Example 6.1
    # (values from memory): perigee burn 1.7225 km/s and apogee burn
    # 1.3297 km/s, a 2000 kg spacecraft with Isp 300 s burns 1291 kg in total.
    b = Budget(2000.0, dk.exhaust_velocity(300.0)).add("perigee burn A", 1722.5).add("apogee kick B", 1329.7)
    assert b.total_dv == pytest.approx(3052.2, abs=1e-9)
    assert b.propellant == pytest.approx(1291.0, abs=1.0)
    np.testing.assert_allclose(b.propellant_per_line.sum(), b.propellant, rtol=1e-12)


def test_demo_mission_line_by_line():
    b = tamsin()
    capture = dk.capture_burn(PARKING, ARRIVAL_VINF, MARS.mu, ra=RELAY)
    hohmann = dk.hohmann(RELAY, SECOND_SLOT, MARS.mu)
    expected_dv = [
        30.0 * 1.25,
        capture * 1.05,
        circularise_at_relay() * 1.05,
        hohmann.total * 1.03,
        45.0 * 1.5,
    ]
    np.testing.assert_allclose(b.dv_with_margin, expected_dv, rtol=1e-15)
    np.testing.assert_allclose(b.line_ve, [TRIM_VE, MAIN_VE, MAIN_VE, MAIN_VE, TRIM_VE], rtol=0)
    assert b.total_dv == pytest.approx(sum(expected_dv), rel=1e-15)
    # Propellant line after line by the rocket equation (propellant_mass with
    # the mass before each line), looped here on purpose as the reference.
    mass = TAMSIN_WET
    for i, (dv, ve) in enumerate(zip(expected_dv, b.line_ve)):
        burned = dk.propellant_mass(dv, ve, m0=mass)
        assert b.mass_before[i] == pytest.approx(mass, rel=1e-12)
        assert b.propellant_per_line[i] == pytest.approx(burned, rel=1e-9)
        mass -= burned
        assert b.mass_after[i] == pytest.approx(mass, rel=1e-12)
    assert b.final_mass == pytest.approx(mass, rel=1e-12)
    assert b.propellant == pytest.approx(TAMSIN_WET - mass, rel=1e-12)
    assert b.propellant_left == pytest.approx(mass - TAMSIN_DRY, rel=1e-12)
    assert b.first_infeasible is None
    for value in (b.total_dv, b.propellant, b.final_mass, b.propellant_left):
        assert isinstance(value, np.floating)


def test_transfer_line_remembers_its_source():
    b = tamsin()
    line = b.lines[3]
    transfer = dk.hohmann(RELAY, SECOND_SLOT, MARS.mu)
    assert line.source["kind"] == "transfer"
    assert line.source["type"] == "Transfer"
    np.testing.assert_allclose(line.source["burns"], [float(x) for x in transfer.burns], rtol=0)
    assert line.source["duration"] == pytest.approx(float(transfer.duration), rel=0)
    assert line.dv == float(transfer.total)
    assert b.lines[0].source == {"kind": "number"}


def test_duck_typed_transfer_counts_with_its_total():
    class Fake:
        burns = (100.0, 50.0)
        total = 150.0

    b = Budget(100.0, 3000.0).add("fake", Fake())
    assert b.lines[0].dv == 150.0
    assert b.lines[0].source["type"] == "Fake"
    assert b.lines[0].source["duration"] is None


@given(
    dvs=st.lists(st.floats(0.0, 3000.0), min_size=1, max_size=8),
    ve=st.floats(500.0, 5000.0),
    m0=st.floats(1.0, 1e5),
)
def test_same_engine_budget_equals_one_burn_of_the_total(dvs, ve, m0):
    # Rocket equation: with one exhaust velocity, mass ratios multiply, so the
    # lines cost what one burn of the summed delta-v costs (common practice).
    b = Budget(m0, ve)
    for i, dv in enumerate(dvs):
        b.add(f"line {i}", dv)
    assert b.propellant == pytest.approx(dk.propellant_mass(sum(dvs), ve, m0=m0), rel=1e-9, abs=1e-12 * m0)
    assert np.all(np.diff(np.concatenate(([m0], b.mass_after))) <= 0)


def test_empty_budget():
    b = Budget(500.0, 3000.0)
    assert (b.total_dv, b.propellant, b.final_mass) == (0.0, 0.0, 500.0)
    assert b.mass_after.shape == (0,) and b.mass_before.shape == (0,)
    assert b.to_frame().shape[0] == 0


def test_infeasible_line_gives_nan_downstream():
    # The load of 840 kg cannot buy a 6 km/s burn; the line that runs dry and
    # every later line are NaN; earlier lines keep their numbers.
    b = tamsin().insert(2, "oversized burn", 6000.0)
    assert b.first_infeasible == 2
    assert np.all(np.isfinite(b.mass_after[:2]))
    assert np.all(np.isnan(b.mass_after[2:]))
    assert np.all(np.isnan(b.propellant_per_line[2:]))
    assert np.isfinite(b.mass_before[2]) and np.all(np.isnan(b.mass_before[3:]))
    assert np.isnan(b.propellant) and np.isnan(b.final_mass) and np.isnan(b.propellant_left)
    assert np.isfinite(b.total_dv)
    assert "tank dry" in b.to_markdown()
    assert "runs dry at line 3 (oversized burn)" in b.to_markdown()
    # Removing the line restores the budget.
    assert b.remove(2) == tamsin()


def test_spending_exactly_the_load_is_feasible():
    ve = 3000.0
    dv = ve * np.log(1000.0 / 400.0)
    b = Budget(1000.0, ve, dry_mass=400.0).add("all", dv)
    assert b.first_infeasible is None
    assert b.final_mass == pytest.approx(400.0, rel=1e-12)


# ---------------------------------------------------------------------- editing
def test_editing_for_a_panel():
    b = tamsin()
    labels = lambda: [line.label for line in b.lines]  # noqa: E731
    assert b.move(4, 0) is b
    move = "move to second slot"
    assert labels() == ["station keeping", "cruise trim", "Mars capture", "circularise at relay", move]
    b.move(0, -1)
    assert labels() == ["cruise trim", "Mars capture", "circularise at relay", move, "station keeping"]
    b.update(1, margin=0.1)
    assert b.lines[1].margin == 0.1 and b.lines[1].source == {"kind": "number"}
    b.update(3, label="to slot 2")
    assert b.lines[3].source["kind"] == "transfer"  # a label edit keeps where dv came from
    b.update(3, dv=100.0)
    assert b.lines[3].source == {"kind": "number"} and b.lines[3].dv == 100.0
    b.replace(0, "trim", 12.0, ve=2000.0)
    assert b.lines[0] == BudgetLine("trim", 12.0, 2000.0, 0.0)
    b.remove(-1)
    assert len(b) == 4
    b.clear()
    assert len(b) == 0


def test_lines_are_read_only():
    b = tamsin()
    assert isinstance(b.lines, tuple)
    with pytest.raises(AttributeError):
        b.lines = ()
    with pytest.raises(dataclasses.FrozenInstanceError):
        b.lines[0].dv = 1.0  # frozen dataclass


def test_settings_can_be_changed():
    b = tamsin()
    before = float(b.propellant)
    b.m0 = 1600.0
    assert b.propellant > before
    b.ve = 4000.0
    assert b.line_ve[1] == 4000.0 and b.line_ve[0] == TRIM_VE


@pytest.mark.parametrize(
    "call, name",
    [
        (lambda b: b.add("x", -1.0), "dv_or_transfer"),
        (lambda b: b.add("x", np.nan), "dv_or_transfer"),
        (lambda b: b.add("x", [1.0, 2.0]), "dv_or_transfer"),
        (lambda b: b.add("x", dk.hohmann([7e6, 8e6], 9e6, 3.986e14)), "dv_or_transfer"),
        (lambda b: b.add("x", dk.bielliptic(7e6, 9e6, 8e6, 3.986e14)), "dv_or_transfer"),
        (lambda b: b.add("x", 1.0, margin=-0.1), "margin"),
        (lambda b: b.add("x", 1.0, ve=0.0), "ve"),
        (lambda b: b.add(3, 1.0), "label"),
        (lambda b: b.add("x", "12"), "dv_or_transfer"),
        (lambda b: b.add("x", True), "dv_or_transfer"),
        (lambda b: b.remove(10), "index"),
        (lambda b: b.move(0, 10), "new_index"),
        (lambda b: b.update(0, thrust=3.0), "update"),
        (lambda b: setattr(b, "m0", 0.0), "m0"),
        (lambda b: setattr(b, "m0", 500.0), "m0"),  # below the dry mass
        (lambda b: setattr(b, "dry_mass", 2000.0), "dry_mass"),
    ],
)
def test_bad_input_names_the_parameter(call, name):
    with pytest.raises(dk.DomainError, match=f"`{name}`"):
        call(tamsin())


def test_bad_constructor_input():
    with pytest.raises(dk.DomainError, match="`m0`"):
        Budget(-1.0, 3000.0)
    with pytest.raises(dk.DomainError, match="`ve`"):
        Budget(100.0, np.inf)
    with pytest.raises(dk.DomainError, match="`dry_mass`"):
        Budget(100.0, 3000.0, dry_mass=100.0)


# ---------------------------------------------------------------------- tables
def test_frame_has_units_in_headers_and_the_numbers():
    b = tamsin()
    frame = b.to_frame()
    assert frame.index.name == "line" and list(frame.index) == [1, 2, 3, 4, 5]
    numeric = [c for c in frame.columns if frame[c].dtype.kind == "f"]
    assert len(numeric) == 9
    for column in numeric:
        assert re.search(r"\((m/s|kg|% of dv)\)$", column), column
    np.testing.assert_allclose(frame["dv with margin (m/s)"], b.dv_with_margin, rtol=0)
    np.testing.assert_allclose(frame["mass after (kg)"], b.mass_after, rtol=0)
    # Nominal, margin and total are separate columns, and the margin says its convention.
    np.testing.assert_allclose(frame["margin (% of dv)"], [25.0, 5.0, 5.0, 3.0, 50.0], rtol=1e-12)
    np.testing.assert_allclose(
        frame["dv (m/s)"] + frame["margin (m/s)"], frame["dv with margin (m/s)"], rtol=1e-15
    )
    # A typed line says it was entered (not "number"); a transfer names its type and burns.
    assert list(frame["source"]) == ["entered", "entered", "entered", "Transfer (2 burns)", "entered"]
    assert "fractions" in frame.attrs["convention"]


def _markdown_cells(line: str) -> list[str]:
    """Split a pipe-table row; a backslash escapes the next character, entities are decoded."""
    cells, cell, chars = [], "", iter(line.strip())
    for ch in chars:
        if ch == "\\":
            cell += next(chars)
        elif ch == "|":
            cells.append(html.unescape(cell.strip()))
            cell = ""
        else:
            cell += ch
    return cells[1:]  # drop the empty text before the leading pipe


def _first_table(text: str) -> list[str]:
    """The rows of the first pipe table of a Markdown text."""
    rows = []
    for line in text.splitlines():
        if line.startswith("|"):
            rows.append(line)
        elif rows:
            break
    return rows


@given(st.text(st.characters(blacklist_categories=("Cs", "Cc", "Zl", "Zp")), min_size=1, max_size=20))
def test_markdown_labels_survive_any_text(label):
    label = label.strip()
    b = Budget(100.0, 3000.0).add(label, 10.0)
    table = _first_table(b.to_markdown())
    assert _markdown_cells(table[2])[1] == label


def test_markdown_parses_back():
    b = tamsin().add("odd | label", 1.0)
    text = b.to_markdown()
    lines = text.splitlines()
    assert lines[0] == "**Tamsin relay tug**"
    table = _first_table(text)
    header = _markdown_cells(table[0])
    assert header[0] == "line" and "propellant (kg)" in header
    assert re.fullmatch(r"\|(:?-{3,}:?\|)+", table[1])
    rows = [dict(zip(header, _markdown_cells(line))) for line in table[2:]]
    assert len(rows) == len(b) + 1
    for row, line, after, dv in zip(rows, b.lines, b.mass_after, b.dv_with_margin):
        assert row["label"] == line.label
        assert float(row["dv with margin (m/s)"]) == pytest.approx(dv, abs=0.05)
        assert float(row["mass after (kg)"]) == pytest.approx(after, abs=0.005)
    total = rows[-1]
    assert total["label"] == "**total**"
    assert float(total["propellant (kg)"]) == pytest.approx(b.propellant, abs=0.005)
    assert float(total["dv with margin (m/s)"]) == pytest.approx(b.total_dv, abs=0.05)


def _latex_cells(line: str) -> list[str]:
    body = line.strip().removesuffix(r"\\").strip()
    cells = re.split(r"(?<!\\)&", body)
    unescape = {
        r"\&": "&",
        r"\%": "%",
        r"\_": "_",
        r"\#": "#",
        r"\$": "$",
        r"\{": "{",
        r"\}": "}",
        r"\textless{}": "<",
        r"\textgreater{}": ">",
    }
    out = []
    for cell in cells:
        cell = cell.strip()
        for escaped, plain in unescape.items():
            cell = cell.replace(escaped, plain)
        out.append(cell)
    return out


def test_latex_parses_back():
    b = tamsin().add("trim_2 & 5% #1 {x}", 1.0)
    text = b.to_latex()
    first = text.split(r"\end{tabular}")[0]
    rows = [line for line in first.splitlines() if line.endswith(r"\\")]
    header = _latex_cells(rows[0])
    assert header[:3] == ["line", "label", "source"]
    parsed = [dict(zip(header, _latex_cells(r))) for r in rows[1:]]
    assert parsed[-2]["label"] == "trim_2 & 5% #1 {x}"
    assert parsed[-1]["label"] == "total"
    for row, after in zip(parsed, b.mass_after):
        assert float(row["mass after (kg)"]) == pytest.approx(after, abs=0.005)
    assert text.count(r"\begin{tabular}") == 2  # the lines, then the propulsion system
    assert text.count(r"\begin{table}") == 2 and text.rstrip().endswith(r"\end{table}")
    assert r"\caption{Tamsin relay tug: delta-v budget" in text


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex not installed")
def test_latex_compiles(tmp_path, artifacts):
    b = (
        tamsin()
        .add("trim_2 & 5% #1 {x} ~^\\", 1.0)
        .add("\u0394v 5\u00b0 \u00b1 1 \u00b5s \u2192 \u2248", 2.0)
    )
    document = "\\documentclass{article}\n\\usepackage[margin=1cm,landscape]{geometry}\n\\begin{document}\n"
    document += "\\scriptsize\n" + b.to_latex() + "\n\\end{document}\n"
    (tmp_path / "budget.tex").write_text(document)
    run = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "budget.tex"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert run.returncode == 0, run.stdout[-2000:]
    shutil.copy(tmp_path / "budget.pdf", artifacts / "budget_table.pdf")


def test_csv_parses_back(tmp_path):
    b = tamsin()
    path = b.to_csv(tmp_path / "tamsin.csv")
    assert path == tmp_path / "tamsin.csv"
    assert path.read_text() == b.to_csv()  # without a path, the text (as pandas does)
    with open(path, newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert [r["label"] for r in rows] == [line.label for line in b.lines]
    np.testing.assert_allclose([float(r["propellant (kg)"]) for r in rows], b.propellant_per_line, rtol=1e-12)
    frame = pd.read_csv(path, index_col="line", keep_default_na=False)
    pd.testing.assert_frame_equal(frame, b.to_frame(), check_exact=False, rtol=1e-12, check_index_type=False)
    assert [p.name for p in tmp_path.iterdir()] == ["tamsin.csv"]


# ---------------------------------------------------------------------- files
def test_save_load_round_trip(tmp_path):
    b = tamsin()
    path = b.save(tmp_path / "tamsin.json")
    data = json.loads(path.read_text())
    assert data["format"] == FORMAT and data["version"] == VERSION
    assert data["m0_kg"] == TAMSIN_WET and data["dry_mass_kg"] == TAMSIN_DRY
    loaded = Budget.load(path)
    assert loaded == b
    assert loaded.lines == b.lines
    np.testing.assert_array_equal(loaded.mass_after, b.mass_after)
    # Overwriting our own budget file is allowed.
    b.add("extra", 5.0).save(path)
    assert len(Budget.load(path)) == 6


def test_saved_file_has_ordinary_permissions(tmp_path):
    path = tamsin().save(tmp_path / "tamsin.json")
    umask = os.umask(0)
    os.umask(umask)
    assert path.stat().st_mode & 0o777 == 0o666 & ~umask


def _damaged(good: bytes) -> dict[str, tuple[bytes, str]]:
    data = json.loads(good)
    newer = dict(data, version=VERSION + 1)
    foreign = {"panel": "PropellantTrade", "version": 1, "values": {}, "results": {}}
    negative = dict(data, m0_kg=-5.0)
    missing = {k: v for k, v in data.items() if k != "lines"}
    bad_line = dict(data, lines=[dict(data["lines"][0], margin="lots")])
    text_mass = dict(data, m0_kg="1450")
    return {
        "garbage": (b"\x00\x01not json at all", "corrupt|not UTF-8|not a deltakit"),
        "truncated": (good[: len(good) // 2], "corrupt or truncated"),
        "empty": (b"", "corrupt or truncated"),
        "foreign": (json.dumps(foreign).encode(), "not a deltakit budget"),
        "list": (b"[1, 2, 3]", "not a deltakit budget"),
        "newer": (json.dumps(newer).encode(), "newer deltakit"),
        "negative mass": (json.dumps(negative).encode(), "damaged.*`m0`"),
        "missing lines": (json.dumps(missing).encode(), "damaged.*'lines'"),
        "bad margin": (json.dumps(bad_line).encode(), "damaged.*`margin`"),
        "mass as text": (json.dumps(text_mass).encode(), "damaged.*`m0`"),
    }


@pytest.mark.parametrize("case", list(_damaged(json.dumps(tamsin().to_dict()).encode())))
def test_load_refuses_bad_files_and_leaves_them_untouched(tmp_path, case):
    good = tamsin().save(tmp_path / "good.json").read_bytes()
    content, message = _damaged(good)[case]
    path = tmp_path / f"{case}.json"
    path.write_bytes(content)
    stat = path.stat()
    with pytest.raises(dk.DomainError, match=message) as info:
        Budget.load(path)
    assert str(path) in str(info.value)
    assert isinstance(info.value, ValueError)
    assert path.read_bytes() == content
    assert path.stat().st_mtime_ns == stat.st_mtime_ns


def test_save_refuses_to_overwrite_other_files(tmp_path):
    b = tamsin()
    for name, content in [
        ("notes.txt", b"mission notes, do not lose\n"),
        ("other.json", json.dumps({"format": "someone.else", "version": 1}).encode()),
        ("newer.json", json.dumps(dict(b.to_dict(), version=VERSION + 1)).encode()),
    ]:
        path = tmp_path / name
        path.write_bytes(content)
        with pytest.raises(dk.DomainError, match="refusing to overwrite"):
            b.save(path)
        assert path.read_bytes() == content
    assert sorted(p.name for p in tmp_path.iterdir()) == ["newer.json", "notes.txt", "other.json"]


def test_load_missing_file_raises_file_not_found(tmp_path):
    with pytest.raises(FileNotFoundError):
        Budget.load(tmp_path / "absent.json")


def test_failed_write_keeps_the_old_file(tmp_path, monkeypatch):
    path = tamsin().save(tmp_path / "tamsin.json")
    before = path.read_bytes()

    def fail(*args, **kwargs):  # the new file is written whole, then the rename fails
        raise OSError("disk full (simulated)")

    monkeypatch.setattr(files_module.os, "replace", fail)
    with pytest.raises(OSError, match="simulated"):
        tamsin().add("more", 10.0).save(path)
    assert path.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["tamsin.json"]
    monkeypatch.undo()
    assert Budget.load(path) == tamsin()


def test_failed_first_write_leaves_nothing(tmp_path, monkeypatch):
    monkeypatch.setattr(files_module.os, "fsync", lambda *a, **k: (_ for _ in ()).throw(KeyboardInterrupt))
    with pytest.raises(KeyboardInterrupt):
        tamsin().save(tmp_path / "new.json")
    assert list(tmp_path.iterdir()) == []


def test_repr_and_markdown_hook():
    b = tamsin()
    assert "Tamsin relay tug" in repr(b) and "m/s" in repr(b) and "kg" in repr(b)
    assert b._repr_markdown_() == b.to_markdown()
    assert len(_first_table(io.StringIO(b.to_markdown()).read())) == len(b) + 3  # header, rule, lines, total


line_strategy = st.tuples(
    st.text(max_size=30),
    st.floats(0.0, 1e4),
    st.one_of(st.none(), st.floats(100.0, 1e5)),
    st.floats(0.0, 1.0),
)


@given(
    m0=st.floats(1.0, 1e6),
    ve=st.floats(100.0, 1e5),
    name=st.text(max_size=30),
    lines=st.lists(line_strategy, max_size=6),
)
def test_any_budget_round_trips_through_a_file(m0, ve, name, lines):
    import tempfile

    b = Budget(m0, ve, name=name)
    for label, dv, line_ve, margin in lines:
        b.add(label, dv, ve=line_ve, margin=margin)
    with tempfile.TemporaryDirectory() as folder:
        path = b.save(Path(folder) / "b.json")
        loaded = Budget.load(path)
        assert os.listdir(folder) == ["b.json"]
    assert loaded == b
    np.testing.assert_array_equal(loaded.mass_after, b.mass_after)
    assert loaded.name == name and loaded.lines == b.lines
