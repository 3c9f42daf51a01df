import os
from pathlib import Path

import pytest
from hypothesis import settings

os.environ.setdefault("MPLBACKEND", "Agg")

# Property tests: in CI (CI=true) the same examples every run -- a fixed
# derivation of the examples from each test (derandomize) and no example
# database -- so a green run stays green; locally, fresh examples each run
# and a database that replays failures. A failure found locally is pinned
# with @example beside the test. HYPOTHESIS_PROFILE overrides the choice.
# (Profiles start from hypothesis' "default", never from whatever it picked
# up from the environment.)
settings.register_profile("ci", parent=settings.get_profile("default"), derandomize=True, database=None,
                          print_blob=True)
settings.register_profile("dev", parent=settings.get_profile("default"), print_blob=True)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE")
                      or ("ci" if os.environ.get("CI", "").lower() in ("true", "1", "yes") else "dev"))

DEMO = Path(__file__).resolve().parent.parent / "data" / "demo" / "site.toml"


@pytest.fixture
def demo_path() -> Path:
    return DEMO


@pytest.fixture
def write_site(tmp_path):
    """Write a site file from text and return its path."""

    def write(text: str, name: str = "site.toml") -> Path:
        p = tmp_path / name
        p.write_text(text)
        return p

    return write


