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


@pytest.fixture(autouse=True, scope="session")
def _private_cache_folder(tmp_path_factory):
    """Commands run by the tests keep their weather years in a folder of the test session, never
    in the user's cache folder."""
    folder = tmp_path_factory.mktemp("homeplan-cache")
    old = os.environ.get("HOMEPLAN_CACHE_DIR")
    os.environ["HOMEPLAN_CACHE_DIR"] = str(folder)
    yield folder
    if old is None:
        os.environ.pop("HOMEPLAN_CACHE_DIR", None)
    else:
        os.environ["HOMEPLAN_CACHE_DIR"] = old
