"""Shared set-up for the real-browser tests: JupyterLab on loopback, Debian's Chromium.

What works on our machines is written down in ../shared/BROWSER-TESTS.md:
JupyterLab on 127.0.0.1 with a free port and a random token, temporary
config/data folders so the tests leave the user's settings alone, and
Playwright driving /usr/bin/chromium (it never downloads a browser here).

Without Chromium (or the browser named by ``DELTAKIT_CHROMIUM``) or Playwright a
browser test skips, unless ``DELTAKIT_REQUIRE_BROWSER=1`` (set by CI), where it fails.
"""

from __future__ import annotations

import json
import os
import secrets
import socket
import subprocess
import sys
import time
import urllib.request
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import pytest

CHROMIUM = Path(os.environ.get("DELTAKIT_CHROMIUM", "/usr/bin/chromium"))  # Debian's package
REQUIRE = os.environ.get("DELTAKIT_REQUIRE_BROWSER") == "1"

CHROMIUM_ARGS = [
    "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
    "--disable-background-networking", "--disable-component-update", "--disable-sync",
]  # fmt: skip


def require_browser() -> None:
    """Skip (or, with ``DELTAKIT_REQUIRE_BROWSER=1``, fail) when no browser can run."""
    reason = None
    if not CHROMIUM.exists():
        reason = f"{CHROMIUM} not found (apt-get install chromium)"
    else:
        try:
            import playwright.sync_api  # noqa: F401
        except ImportError:
            reason = "playwright is not installed (pip install playwright; no browser download needed)"
    if reason is None:
        return
    if REQUIRE:
        pytest.fail(f"DELTAKIT_REQUIRE_BROWSER=1 but the browser test cannot run: {reason}")
    pytest.skip(reason)


def free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def get(url: str, timeout: float = 2.0) -> bytes:
    with urllib.request.urlopen(url, timeout=timeout) as response:
        return response.read()


@contextmanager
def jupyterlab(root: Path, home: Path) -> Iterator[dict[str, Any]]:
    """Run JupyterLab serving ``root``, with its settings under ``home``; yield base, token, root, home."""
    env = dict(os.environ)
    for var, sub in [
        ("JUPYTER_CONFIG_DIR", "config"),
        ("JUPYTER_DATA_DIR", "data"),
        ("IPYTHONDIR", "ipython"),
        ("MPLCONFIGDIR", "mpl"),
        ("JUPYTER_RUNTIME_DIR", "runtime"),
    ]:
        (home / sub).mkdir(exist_ok=True)
        env[var] = str(home / sub)
    env.pop("MPLBACKEND", None)  # let the kernel use ipympl as the notebook asks
    env.pop("DELTAKIT_FIGURES", None)  # and let panels choose their figures as in a notebook
    # Keep the news and update pop-ups away; JupyterLab reads overrides from the
    # environment's share/jupyter/lab/settings, which we must not touch, so the
    # same settings go to the per-user settings folder of the temporary home.
    settings = home / "config" / "lab" / "user-settings" / "@jupyterlab" / "apputils-extension"
    settings.mkdir(parents=True, exist_ok=True)
    (settings / "notification.jupyterlab-settings").write_text(
        json.dumps({"fetchNews": "false", "checkForUpdates": False})
    )
    port, token = free_port(), secrets.token_hex(16)
    log = open(home / "lab.log", "wb")  # noqa: SIM115 (closed below)
    process = subprocess.Popen(
        [sys.executable, "-m", "jupyterlab", "--no-browser", "--allow-root",
         "--ServerApp.ip=127.0.0.1", f"--ServerApp.port={port}", "--ServerApp.port_retries=0",
         f"--IdentityProvider.token={token}", f"--ServerApp.root_dir={root}",
         "--LabApp.news_url=None", "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate"],
        env=env, stdout=log, stderr=subprocess.STDOUT, cwd=root,
    )  # fmt: skip
    base = f"http://127.0.0.1:{port}"
    try:
        deadline = time.monotonic() + 60
        while True:
            try:
                get(f"{base}/api/status?token={token}")
                break
            except OSError as err:
                if process.poll() is not None or time.monotonic() > deadline:
                    log = (home / "lab.log").read_text()[-3000:]
                    raise RuntimeError(f"JupyterLab did not start:\n{log}") from err
                time.sleep(0.3)
        yield {"base": base, "token": token, "root": root, "home": home}
    finally:
        process.terminate()
        try:
            process.wait(timeout=15)
        except subprocess.TimeoutExpired:
            process.kill()
            process.wait()
        log.close()


@contextmanager
def chromium(profile: Path, width: int = 1280, height: int = 1500) -> Iterator[Any]:
    """A headless Chromium page (Playwright, persistent context in ``profile``)."""
    from playwright.sync_api import sync_playwright

    with sync_playwright() as pw:
        context = pw.chromium.launch_persistent_context(
            user_data_dir=str(profile), executable_path=str(CHROMIUM), headless=True,
            args=CHROMIUM_ARGS, viewport={"width": width, "height": height},
        )  # fmt: skip
        try:
            page = context.new_page()
            page.set_default_timeout(60_000)
            yield page
        finally:
            context.close()
