import os
from pathlib import Path

import pytest

os.environ.setdefault("MPLBACKEND", "Agg")

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


