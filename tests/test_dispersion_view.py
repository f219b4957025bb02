"""DispersionView: the panel's numbers are disperse's numbers; its report is written in one call, safely.

The references here are :func:`deltakit.disperse` itself, called with spreads
written out in the test (not taken from the panel), and NumPy's percentile
of the samples it returns; the report is read back as text.
"""

from __future__ import annotations

import html
import re

import numpy as np
import pytest

import deltakit as dk
from deltakit import Normal, demo
from deltakit.widgets import DispersionView


@pytest.fixture(scope="module")
def quillwort():
    return demo.QUILLWORT.budget()


@pytest.fixture(scope="module")
def view():
    return DispersionView()


def test_probability_of_closing_is_disperses_for_the_same_seed(quillwort):
    panel = DispersionView(budget=quillwort, dv_spread=0.02, isp_spread=3.0, dry_mass_spread=0.04, seed=77)
    ds = dk.disperse(
        quillwort,
        samples=2000,
        seed=77,
        dv=Normal(0.02, relative=True),
        isp=Normal(3.0),
        dry_mass=Normal(0.04, relative=True),
        stage_mass=Normal(0.04, relative=True),
    )
    assert panel.results["probability_closes"] == float(ds.probability_closes)
    assert 0.0 < panel.results["probability_closes"] < 1.0  # a case that can fail either way
    shown = html.unescape(panel.readouts.value)
    assert f"{100.0 * float(ds.probability_closes):.4g} %" in shown  # the readout shows that number
    panel.set(seed=78)
    again = dk.disperse(quillwort, samples=2000, seed=78, **panel.spreads())
    assert panel.results["probability_closes"] == float(again.probability_closes)


def test_percentiles_are_those_of_the_tank_shown(view):
    ds = view.dispersion
    tank = view.results["tank"]
    left = np.asarray(ds["propellant_margin"].sel(system=tank))
    for level in (1, 10, 50, 90):
        assert view.results[f"left_p{level}"] == pytest.approx(np.percentile(left, level), rel=1e-12)
    low = {
        s: float(np.percentile(ds["propellant_margin"].sel(system=s), 1)) for s in map(str, ds.system.values)
    }
    assert tank == min(low, key=low.get)  # "tightest tank": the lowest P1 of what is left
    assert view.results["tank_holds"] == pytest.approx(np.mean(left >= 0.0))


def test_choosing_a_tank_and_all_tanks(quillwort):
    panel = DispersionView(budget=quillwort, tank="lander engine")
    assert panel.results["tank"] == "lander engine" and panel.error == ""
    panel.set(tank="all tanks")
    ds = panel.dispersion
    total = np.asarray(ds["propellant_margin"].sum("system"))
    assert panel.results["left_p50"] == pytest.approx(np.percentile(total, 50), rel=1e-12)
    before = panel.values
    panel.set(tank="no such tank")
    assert "no such tank" in panel.error and "tank shown" in panel.error
    assert panel.values == before


@pytest.mark.parametrize(
    "bad, words",
    [
        ({"samples": 50.0}, "number of samples must be between 100"),
        ({"seed": -1.0}, "seed must be between 0"),
        ({"dv_spread": -0.01}, "delta-v spread must be between 0 and 100 %"),
        ({"isp_spread": 500.0}, "specific impulse spread must be between 0 and 100 s"),
    ],
)
def test_invalid_input_is_a_message_and_the_view_stays(view, bad, words):
    before = view.values, view.results, view.dispersion
    view.set(**bad)
    assert words in view.error
    assert (view.values, view.results) == before[:2] and view.dispersion is before[2]
    view.set(**before[0])
    assert view.error == ""


def test_a_budget_with_no_burn_or_no_dry_mass_is_refused_with_words():
    with pytest.raises(dk.DomainError, match="no burn to disperse"):
        DispersionView(budget=dk.Budget(1000.0, 3000.0, dry_mass=500.0).add_mass("dock", 10.0))
    with pytest.raises(dk.DomainError, match="no tank of this budget is tracked"):
        DispersionView(budget=dk.Budget(1000.0, 3000.0).add("burn", 500.0))
    with pytest.raises(dk.DomainError, match="`budget`"):
        DispersionView(budget={"format": "something else"})


def test_export_restores_the_budget_and_the_spreads(quillwort):
    panel = DispersionView(budget=quillwort, dv_spread=0.015, margins="bare delta-v")
    exported = panel.export()
    assert exported["panel"] == "DispersionView"
    other = DispersionView(budget=dk.Budget(1500.0, 3100.0, dry_mass=700.0).add("transfer", 2000.0))
    other.set(**exported["values"])
    assert other.budget == quillwort
    assert other.results == panel.results
    assert other.spreads()["margins"] is False


def test_the_report_in_one_call_holds_the_caution_and_the_budget(view, tmp_path):
    written = view.write_report(tmp_path / "quillwort", formats=("html",))
    text = written["html"].read_text(encoding="utf-8")
    assert "not for flight operations" in text
    assert view.budget.name in text
    assert "<script" not in text
    assert re.search(r"probab", text, re.IGNORECASE)
    assert text.count("data:image/png;base64,") >= 2  # the panel's figure and the report's dispersion figures


def test_the_report_refuses_to_overwrite_a_foreign_file(view, tmp_path):
    foreign = tmp_path / "notes.html"
    foreign.write_text("<p>someone's notes</p>", encoding="utf-8")
    with pytest.raises(dk.DomainError):
        view.write_report(tmp_path / "notes", formats=("html",))
    assert foreign.read_text(encoding="utf-8") == "<p>someone's notes</p>"
    view.set(path=str(tmp_path / "notes"))
    view.report_button.click()  # from the panel: a message, never an exception, the file untouched
    assert "report not written" in view.error
    assert foreign.read_text(encoding="utf-8") == "<p>someone's notes</p>"
    view.set(path=str(tmp_path / "fresh"))
    view.report_button.click()
    assert (tmp_path / "fresh.html").exists() and "wrote" in view.report_status.value


def test_figures_default_and_stressed(view, quillwort, artifacts):
    view.figure.savefig(artifacts / "dispersion_view_default.png")
    # stressed: a departure spread so large that it drives the spread alone
    panel = DispersionView(budget=quillwort, dv_spread=0.1, isp_spread=1.0, dry_mass_spread=0.005)
    assert panel.results["probability_closes"] < 0.6
    assert panel._order[0] == "dv: line 1 (departure burn)"  # one line dominating
    share = float(panel.dispersion.correlation.sel(cause=panel._order[0], target=panel.results["tank"]) ** 2)
    assert share > 0.8
    panel.figure.savefig(artifacts / "dispersion_view_one_line_dominates.png")
    # a budget that does not close as booked: the departure 150 m/s dearer empties the carrier engine
    short = dk.Budget.from_dict(quillwort.to_dict())
    short.update(0, dv=quillwort.lines[0].dv + 150.0)
    assert not short.closes
    broke = DispersionView(budget=short)
    assert broke.results["probability_closes"] < 0.2 and broke.results["left_p50"] < 0.0
    assert broke.results["tank"] == "carrier engine"
    broke.figure.savefig(artifacts / "dispersion_view_does_not_close.png")


def test_samples_and_seed_take_whole_numbers_and_say_so(quillwort):
    panel = DispersionView(budget=quillwort)
    panel.set(seed=2071.62)
    assert panel.error == "" and panel.values["seed"] == 2072.0
    assert "taken as 2072" in panel.adjusted["seed"]
    ds = dk.disperse(quillwort, samples=2000, seed=2072, **panel.spreads())
    assert panel.results["probability_closes"] == float(ds.probability_closes)
    panel.controls["samples"].value = 3000.4  # typed in the browser
    assert panel.controls["samples"].value == 3000.0 and panel.dispersion.sizes["sample"] == 3000
