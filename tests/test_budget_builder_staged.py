"""BudgetBuilder with a staged vehicle: built through its controls, it is notebook 10's budget.

The reference is the Quillwort budget built in code (:meth:`deltakit.demo.StagedLanding.budget`,
the budget notebook 10 reviews), compared field by field (``Budget.__eq__``
compares the whole saved layout) and by its final mass; the dispersion view
that follows the builder is checked against :func:`deltakit.disperse` run on
the builder's budget.
"""

from __future__ import annotations

import html

import pytest

import deltakit as dk
from deltakit import demo
from deltakit.margins import STUDY_POLICY
from deltakit.widgets import BudgetBuilder


@pytest.fixture(scope="module")
def quillwort():
    return demo.QUILLWORT.budget()


def _type(widget, value):
    widget.value = value  # as the browser sends a change


def _add_stage(builder, name, dry, maturity):
    form = builder.vehicle.stage_form
    _type(form["name"], name)
    _type(form["dry_mass"], dry)
    _type(form["maturity"], maturity)
    builder.vehicle.buttons["add_stage"].click()
    assert builder.error == "", builder.error


def _add_system(builder, name, isp, load, residual_percent=0.0, stage=None):
    form = builder.vehicle.system_form
    _type(form["name"], name)
    _type(form["isp"], isp)
    _type(form["propellant"], load)
    _type(form["residual"], residual_percent)
    _type(form["stage"], stage or "")  # "" is the drop-down's "none"
    builder.vehicle.buttons["add_system"].click()
    assert builder.error == "", builder.error


def _add_burn(builder, label, dv, category, system=None):
    _type(builder.form["label"], label)
    _type(builder.line_fields.kind, "burn")
    _type(builder.form["formula"], "number")
    _type(builder._param_widgets["number"]["dv"], dv)
    _type(builder.line_fields.system, system or "")
    _type(builder.line_fields.category, category or "")
    _type(builder.line_fields.from_policy, True)
    builder.buttons["add"].click()
    assert builder.error == "", builder.error


def _add_event(builder, label, kind, mass=0.0, stage=None):
    _type(builder.form["label"], label)
    _type(builder.line_fields.kind, kind)
    if kind == "drop_stage":
        _type(builder.line_fields.stage, stage)
    else:
        _type(builder.line_fields.mass, mass)
    builder.buttons["add"].click()
    assert builder.error == "", builder.error


def test_quillwort_built_through_the_controls_is_notebook_10s_budget(quillwort):
    q = demo.QUILLWORT
    dv = q.burns()
    builder = BudgetBuilder(lines=[])  # a new user starts from the empty Halyard vehicle
    _type(builder.controls["name"], f"{q.name} carrier and lander")
    _type(builder.controls["policy"], STUDY_POLICY.name)
    _type(builder.controls["dry_maturity"], "new design")
    # the vehicle will be the sum of its parts: no start mass, no engine of its own; the panel says what
    # these zeros stand for until the systems are there
    _type(builder.controls["m0"], 0.0)
    assert "sum of the masses" in builder.error
    _type(builder.controls["isp"], 0.0)
    assert "vehicle editor" in builder.error
    _type(builder.controls["dry_mass"], q.lander_dry + q.cargo)
    _add_stage(builder, "carrier", q.carrier_dry, "modified")
    _add_system(builder, "lander engine", q.lander_isp, q.lander_propellant, 100 * q.residual)
    _add_system(builder, "lander thrusters", q.lander_thruster_isp, q.lander_thruster_propellant)
    _add_system(builder, "carrier engine", q.carrier_isp, q.carrier_propellant, 100 * q.residual, "carrier")
    _add_system(
        builder, "carrier thrusters", q.carrier_thruster_isp, q.carrier_thruster_propellant, 0.0, "carrier"
    )
    _add_burn(builder, "departure burn", dv["departure"], "deterministic", "carrier engine")
    _add_burn(builder, "mid-course corrections", 18.0, "statistical", "carrier thrusters")
    _add_burn(builder, "capture into low orbit", dv["capture"], "deterministic", "carrier engine")
    _add_burn(builder, "carrier attitude control", 6.0, "attitude control", "carrier thrusters")
    _add_event(builder, "release the lander", "drop_stage", stage="carrier")
    _add_burn(builder, "de-orbit", dv["de-orbit"], "deterministic")
    _add_burn(builder, "powered descent", dv["powered descent"] * (1.0 + q.descent_loss), "deterministic")
    _add_burn(builder, "hover and touchdown", 45.0, "statistical")
    _add_burn(builder, "lander attitude control", 12.0, "attitude control", "lander thrusters")
    _add_event(builder, "unload the cargo", "jettison", mass=q.cargo)

    built = builder.budget
    assert [line.to_dict() for line in built.lines] == [line.to_dict() for line in quillwort.lines]
    assert float(built.final_mass) == float(quillwort.final_mass)
    assert built == quillwort  # systems, stages, policy, maturities: the whole saved layout
    assert builder.results["final_mass"] == float(quillwort.final_mass)
    # the tables show nominal, margin and total apart, per-system use, and the verdict
    tables = html.unescape(builder.tables.value)
    for header in ("dv (m/s)", "margin (m/s)", "dv with margin (m/s)", "used (kg)", "left (kg)"):
        assert header in tables
    assert "the budget closes" in tables


def test_a_budget_opens_as_it_is_and_round_trips_through_its_values(quillwort):
    builder = BudgetBuilder(budget=quillwort)
    assert builder.budget == quillwort and builder.error == ""
    fresh = BudgetBuilder()
    fresh.set(**builder.export()["values"])
    assert fresh.budget == quillwort and fresh.results == builder.results


def test_a_staged_budget_saves_and_loads(quillwort, tmp_path):
    path = tmp_path / "quillwort.json"
    builder = BudgetBuilder(budget=quillwort, path=str(path))
    builder.file_buttons["save"].click()
    assert dk.Budget.load(path) == quillwort
    fresh = BudgetBuilder(path=str(path))
    fresh.file_buttons["load"].click()
    assert fresh.error == "" and fresh.budget == quillwort


def test_a_tank_that_runs_dry_is_named_with_its_line(quillwort):
    builder = BudgetBuilder(budget=quillwort)
    lines = builder.values["lines"]
    lines[1] = {**lines[1], "params": {"dv": 400.0}}  # the corrections empty the carrier thrusters
    builder.set(lines=lines)
    assert builder.error == ""
    assert builder.results["first_dry_line"] == 2
    assert builder.results["systems"]["carrier thrusters"]["runs_dry_at_line"] == 2
    assert builder.results["shortfall"] > 0.0
    assert "First dry line: line 2" in html.unescape(builder.tables.value)


def test_bad_vehicle_edits_are_messages_and_change_nothing(quillwort):
    builder = BudgetBuilder(budget=quillwort)
    before = builder.values
    _type(builder.vehicle.system_form["isp"], -5.0)
    builder.vehicle.buttons["add_system"].click()
    assert "specific impulse must be > 0 s" in builder.error and builder.values == before
    builder.set(
        systems=[*before["systems"], {"name": "kick", "ve": 2900.0, "propellant": 10.0, "stage": "nowhere"}]
    )
    assert "system 5 (kick)" in builder.error and builder.values == before
    builder.controls["stages"].value = 0
    builder.vehicle.buttons["remove_stage"].click()  # systems sit on it and a line drops it
    assert "stage" in builder.error and builder.values == before


def test_the_dispersion_view_follows_the_builder(quillwort):
    builder = BudgetBuilder(budget=quillwort)
    view = builder.dispersion_view(seed=5)
    assert view.budget == quillwort
    lines = builder.values["lines"]
    lines[2] = {**lines[2], "params": {"dv": lines[2]["params"]["dv"] + 60.0}}  # a dearer capture
    builder.set(lines=lines)
    assert view.budget == builder.budget != quillwort
    ds = dk.disperse(builder.budget, samples=2000, seed=5, **view.spreads())
    assert view.results["probability_closes"] == float(ds.probability_closes)
    view.close()
    builder.set(lines=builder.values["lines"][:-1])  # a closed view is let go, never driven
    assert builder._followers == []
