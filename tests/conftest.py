import os
from pathlib import Path

import pytest
from hypothesis import settings

# Property tests explore new examples on a developer's machine; in CI they are repeatable.
settings.register_profile("ci", derandomize=True, deadline=None)
settings.register_profile("dev", deadline=None)
settings.load_profile("ci" if os.environ.get("CI") else "dev")

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = sorted((ROOT / "sample_homes").glob("*.yaml"))


@pytest.fixture
def sample_paths():
    return SAMPLES
