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
# A thorough local run explores many more examples (HYPOTHESIS_PROFILE=thorough):
# property tests must stay green there too, so their references must be well
# conditioned, not merely lucky on a few hundred draws.
settings.register_profile("thorough", parent=settings.get_profile("default"), max_examples=5000)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE") or ("ci" if os.environ.get("CI") else "default"))

#: Screenshots, rendered LaTeX and saved figures land here for a person to look at.
ARTIFACTS = Path(
    os.environ.get("DELTAKIT_ARTIFACTS", Path(__file__).resolve().parent.parent / "test-artifacts")
)


@pytest.fixture(scope="session")
def artifacts() -> Path:
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    return ARTIFACTS
