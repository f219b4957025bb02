"""The README's quickstart runs as printed, and its two commands work as root and as a normal user.

The set-up and notebook commands are run as the README prints them: the
notebook command starts JupyterLab for real (as root, and as the unprivileged
user ``nobody`` when the tests run as root), and ``.ci/setup --dry-run`` on a
fresh copy of the set-up files shows what it would do for each kind of user.
"""

from __future__ import annotations

import doctest
import json
import os
import re
import secrets
import shlex
import shutil
import subprocess
import tempfile
import time
from pathlib import Path

import pytest
from _jupyterlab import free_port, get
from helpers import stop

ROOT = Path(__file__).resolve().parent.parent
README = ROOT / "README.md"


def test_quickstart_runs_as_printed():
    result = doctest.testfile(
        str(README),
        module_relative=False,
        optionflags=doctest.NORMALIZE_WHITESPACE | doctest.ELLIPSIS,
        verbose=False,
    )
    assert result.attempted >= 10, "the quickstart lost its examples"
    assert result.failed == 0


def test_ci_runs_the_test_command_readme_gives():
    commands = re.findall(r"```bash\n(.*?)```", README.read_text(), flags=re.S)
    test_lines = [line for block in commands for line in block.splitlines() if "pytest" in line]
    assert test_lines, "README names no test command"
    pytest_call = test_lines[0].split("&&")[-1].strip()
    assert pytest_call in (ROOT / ".ci" / "run").read_text()


def test_readme_carries_the_caution():
    text = " ".join(README.read_text().lower().replace(">", " ").split())
    assert "preliminary analysis" in text and "not for flight operations" in text


# ---------------------------------------------------------------------- the two commands, as root and not
def _bash_blocks() -> list[str]:
    return re.findall(r"```bash\n(.*?)```", README.read_text(), flags=re.S)


def _notebook_command() -> list[str]:
    """The README's notebook command: what follows ``.ci/setup &&`` on the line that opens JupyterLab."""
    lines = [line for block in _bash_blocks() for line in block.splitlines() if "jupyter lab" in line]
    assert lines, "README names no notebook command"
    setup, _, command = lines[0].partition("&&")
    assert setup.strip() == "bash .ci/setup", lines[0]
    return shlex.split(command)


def _as_nobody() -> list[str]:
    """The prefix that runs a command as the unprivileged user ``nobody`` (we are root).

    setpriv's own exec can still reach what root reaches; the command is started
    by a shell that already runs as ``nobody``, so every file it opens or runs
    is checked as that user's.
    """
    return ["setpriv", f"--reuid={NOBODY}", f"--regid={NOBODY}", "--clear-groups", "--",
            "/bin/sh", "-c", 'exec "$@"', "sh"]  # fmt: skip


NOBODY = 65534


def _users() -> list:
    as_root = os.geteuid() == 0
    return [
        pytest.param("this user", id="root" if as_root else "this-user"),
        pytest.param(
            "unprivileged",
            id="unprivileged",
            marks=pytest.mark.skipif(
                not as_root or not shutil.which("setpriv"), reason="needs root and setpriv"
            ),
        ),
    ]


@pytest.fixture
def folder(user):
    """A temporary folder the user of the test owns (pytest's own is closed to other users)."""
    path = Path(tempfile.mkdtemp(prefix="deltakit-readme-"))
    if user == "unprivileged":
        os.chown(path, NOBODY, NOBODY)
    try:
        yield path
    finally:
        shutil.rmtree(path, ignore_errors=True)


def _chown_tree(path: Path, owner: int | None) -> None:
    if owner is not None:
        for entry in [path, *path.rglob("*")]:
            os.chown(entry, owner, owner)


_SETTINGS = {"JUPYTER_CONFIG_DIR": "config", "JUPYTER_DATA_DIR": "data", "JUPYTER_RUNTIME_DIR": "runtime",
             "IPYTHONDIR": "ipython", "MPLCONFIGDIR": "mpl"}  # fmt: skip


def _private_home(folder: Path, owner: int | None) -> dict[str, str]:
    """Jupyter's settings in a temporary home (owned by ``owner``), leaving the user's own alone."""
    env = dict(os.environ)
    home = folder / "home"
    for var, sub in _SETTINGS.items():
        (home / sub).mkdir(parents=True, exist_ok=True)
        env[var] = str(home / sub)
    env["HOME"] = str(home)
    _chown_tree(home, owner)
    return env


@pytest.mark.slow
@pytest.mark.parametrize("user", _users())
def test_the_notebook_command_starts_jupyterlab_as_printed(user, folder):
    """README command 1 opens JupyterLab whether the analyst is root or not.

    jupyter_server refuses to run as root unless allowed; ``.ci/setup`` allows
    it, as root, in the environment's own configuration. The command is run as
    printed (plus the flags that keep the test on loopback with its own port
    and token) and must answer on its status API.
    """
    prefix: list[str] = []
    if user == "unprivileged":
        prefix = _as_nobody()
        probe = subprocess.run([*prefix, str(ROOT / ".venv/bin/python"), "-c", "pass"], capture_output=True)
        if probe.returncode != 0:  # e.g. a pyenv interpreter under /root (mode 700)
            pytest.skip(
                "the unprivileged user cannot run this .venv's interpreter: " + probe.stderr.decode()[-200:]
            )
    env = _private_home(folder, NOBODY if prefix else None)
    if prefix:  # a normal user's own search path, not root's
        env["PATH"] = "/usr/local/bin:/usr/bin:/bin"
    port, token = free_port(), secrets.token_hex(16)
    command = [*prefix, *_notebook_command(), "--no-browser", "--ServerApp.ip=127.0.0.1",
               f"--ServerApp.port={port}", "--ServerApp.port_retries=0", f"--IdentityProvider.token={token}",
               "--LabApp.news_url=None"]  # fmt: skip
    process = subprocess.Popen(command, cwd=ROOT, env=env, stdout=subprocess.PIPE, stderr=subprocess.STDOUT)
    try:
        deadline = time.monotonic() + 90
        while True:
            try:
                status = json.loads(get(f"http://127.0.0.1:{port}/api/status?token={token}"))
                break
            except OSError:
                if process.poll() is not None:
                    output = process.stdout.read().decode(errors="replace")[-2000:]
                    pytest.fail(f"`{' '.join(command)}` stopped (run bash .ci/setup first):\n{output}")
                assert time.monotonic() < deadline, "JupyterLab did not answer within 90 s"
                time.sleep(0.3)
        assert "started" in status
    finally:
        stop(process)


def _copy_of_the_setup(folder: Path, owner: int | None) -> Path:
    """A fresh clone's set-up files, in a folder the given user owns."""
    clone = folder / "clone"
    shutil.copytree(ROOT / ".ci", clone / ".ci")
    shutil.copy(ROOT / "pyproject.toml", clone / "pyproject.toml")
    _chown_tree(clone, owner)
    return clone


@pytest.mark.parametrize("user", _users())
def test_the_setup_plans_what_this_user_can_do(user, folder):
    """``.ci/setup --dry-run`` on a fresh clone: what it installs, or what this user lacks.

    As root it installs with apt-get and allows JupyterLab to run as root; as
    a normal user it installs nothing (no password-free sudo here) and names
    what is missing and which tests skip for it.
    """
    prefix = _as_nobody() if user == "unprivileged" else []
    clone = _copy_of_the_setup(folder, NOBODY if prefix else None)
    env = {"PATH": "/usr/local/bin:/usr/bin:/bin", "HOME": str(folder), "LANG": "C.UTF-8"}
    if not prefix:
        env["PATH"] = os.environ["PATH"]
    done = subprocess.run(
        [*prefix, "bash", str(clone / ".ci/setup"), "--dry-run"],
        cwd=clone, env=env, capture_output=True, text=True, timeout=60,
    )  # fmt: skip
    assert done.returncode == 0, done.stdout + done.stderr
    plan = done.stdout
    assert "would run: " in plan and "-m venv .venv" in plan and "pip install -q -e .[all]" in plan
    assert not (clone / ".venv").exists()  # a dry run changes nothing
    root = os.geteuid() == 0 and not prefix
    if root:
        assert "system packages: installed with apt-get as root" in plan
        assert "would allow JupyterLab in .venv to run as root" in plan
    else:
        assert "allow JupyterLab" not in plan  # allowing root is for root only
        can_sudo = "installed with sudo apt-get" in plan
        assert can_sudo or "cannot be installed here (not root, no password-free sudo)" in plan, plan
        if "missing" in plan:  # what a normal user lacks is named, with what it costs
            assert "the browser tests and the report tests skip without them" in plan


def test_the_setup_refuses_unknown_options():
    done = subprocess.run(
        ["bash", str(ROOT / ".ci/setup"), "--fast"], capture_output=True, text=True, timeout=30
    )
    assert done.returncode == 2 and "usage: bash .ci/setup [--dry-run]" in done.stderr
