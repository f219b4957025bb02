"""Shared test set-up: hypothesis profiles and the artefact folder."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from hypothesis import HealthCheck, settings

settings.register_profile(
    "default", max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
# CI replays the same examples every run (a red CI then means a changed result,
# not an unlucky draw); local runs keep exploring new ones.
settings.register_profile("ci", parent=settings.get_profile("default"), derandomize=True, database=None)
settings.load_profile("ci" if os.environ.get("CI") else "default")

#: Screenshots, rendered LaTeX and saved figures land here for a person to look at.
ARTIFACTS = Path(
    os.environ.get("DELTAKIT_ARTIFACTS", Path(__file__).resolve().parent.parent / "test-artifacts")
)


@pytest.fixture(scope="session")
def artifacts() -> Path:
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    return ARTIFACTS
