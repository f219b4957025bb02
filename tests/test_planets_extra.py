"""The `planets` extra stays out of `import deltakit`, and its absence is explained."""

from __future__ import annotations

import json
import subprocess
import sys

EXTRA = ("jplephem", "erfa", "skyfield_data", "xarray", "dask")


def _run(code: str) -> dict:
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr[-3000:]
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_naming_the_planet_functions_loads_none_of_the_extra():
    names = [
        "epoch",
        "planet_state",
        "lambert",
        "LambertSolution",
        "transfer_map",
        "transfer_pair",
        "add_transfer",
    ]
    loaded = _run(
        "import sys, json, deltakit\n"
        f"for name in {names!r}: getattr(deltakit, name)\n"
        f"print(json.dumps([m for m in {EXTRA!r} if m in sys.modules]))"
    )
    assert loaded == []


def test_lambert_needs_no_extra_and_dates_name_the_extra_when_missing():
    out = _run(
        "import sys, json\n"
        "for m in ('erfa', 'jplephem', 'skyfield_data'): sys.modules[m] = None  # as if not installed\n"
        "import deltakit as dk\n"
        "v = dk.lambert([7e6, 0, 0], [0, 8e6, 0], 3000.0, 3.986e14).v1\n"
        "messages = []\n"
        "for call in (lambda: dk.epoch('2028-01-01'), lambda: dk.planet_state('Mars', 0.0)):\n"
        "    try:\n"
        "        call()\n"
        "    except ImportError as err:\n"
        "        messages.append(str(err))\n"
        "print(json.dumps({'finite': bool((v == v).all()), 'messages': messages}))"
    )
    assert out["finite"]
    assert len(out["messages"]) == 2
    assert all('pip install "deltakit[planets]"' in message for message in out["messages"])
