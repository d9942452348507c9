from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = sorted((ROOT / "sample_homes").glob("*.yaml"))


@pytest.fixture
def sample_paths():
    return SAMPLES
