"""The package imports light and every public name resolves.

Each check runs in a fresh interpreter, so modules other tests loaded do not
hide what `import deltakit` itself pulls in.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

import deltakit

HEAVY = ("sympy", "ipywidgets", "matplotlib")
LAZY_SUBMODULES = {"symbolic", "widgets", "plotting"}
OPTIONAL = {"sweep"}  # needs the `scale` extra (xarray, dask)


def _fresh(code: str) -> dict:
    """Run ``code`` in a new interpreter; it prints one JSON value last."""
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=300)
    assert run.returncode == 0, run.stderr[-3000:]
    return json.loads(run.stdout.strip().splitlines()[-1])


def test_import_loads_no_heavy_module():
    loaded = _fresh(
        f"import sys, json, deltakit\nprint(json.dumps([m for m in {HEAVY!r} if m in sys.modules]))"
    )
    assert loaded == []


def test_numeric_layer_loads_no_heavy_module():
    # Touching every name of the numeric layer (all but the lazy submodules and
    # the optional sweep) must still keep sympy, ipywidgets and matplotlib out.
    names = [n for n in deltakit.__all__ if n not in LAZY_SUBMODULES | OPTIONAL]
    loaded = _fresh(
        "import sys, json, deltakit\n"
        f"for name in {names!r}: getattr(deltakit, name)\n"
        f"print(json.dumps([m for m in {HEAVY!r} if m in sys.modules]))"
    )
    assert loaded == []


def test_every_public_name_resolves():
    result = _fresh(
        "import json, deltakit\n"
        "out = {}\n"
        "for name in deltakit.__all__:\n"
        "    try:\n"
        "        value = getattr(deltakit, name)\n"
        "        out[name] = getattr(value, '__module__', None) or getattr(value, '__name__', '')\n"
        "    except Exception as err:\n"
        "        out[name] = 'FAILED: ' + repr(err)\n"
        "print(json.dumps(out))"
    )
    failed = {name: value for name, value in result.items() if str(value).startswith("FAILED")}
    assert failed == {}
    # Names are defined where the lazy map says (re-exports would hide a wrong map).
    for name, module in deltakit._NAMES.items():
        assert result[name] == f"deltakit.{module}", name


@pytest.mark.parametrize(
    "name",
    [
        "exhaust_velocity",
        "rocket_dv",
        "propellant_mass",
        "ejection_energy",
        "burn_energy",
        "EnergySplit",
        "propulsive_efficiency",
        "Budget",
    ],
)
def test_names_of_propulsion_and_budget(name):
    value = getattr(deltakit, name)
    assert value.__doc__, name
    if callable(value) and name != "EnergySplit":  # functions and Budget carry a runnable example
        assert ">>> " in value.__doc__, name
    assert name in dir(deltakit)


def test_unknown_name_is_an_attribute_error():
    with pytest.raises(AttributeError, match="no attribute 'hohman'"):
        deltakit.hohman  # noqa: B018


def test_domain_error_is_a_value_error():
    assert issubclass(deltakit.DomainError, ValueError)
    assert deltakit.__version__
