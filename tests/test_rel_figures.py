"""Figures are the same bytes from one run to the next (no random ids, no dates)."""
import pytest

from lobeplan.fileio import atomic_savefig


def _figure():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(figsize=(2, 2))
    ax.plot([0, 1, 2], [0, 1, 0])  # an axes clips its lines: the SVG gets a clip-path id
    ax.set_title("same")
    return fig, plt


@pytest.mark.parametrize("suffix", ["svg", "pdf", "png"])
def test_saving_twice_gives_the_same_bytes(tmp_path, suffix):
    fig, plt = _figure()
    try:
        a = atomic_savefig(fig, tmp_path / f"a.{suffix}").read_bytes()
        b = atomic_savefig(fig, tmp_path / f"b.{suffix}").read_bytes()
    finally:
        plt.close(fig)
    assert a == b
    if suffix == "svg":
        assert b"clip-path" in a and b"<dc:date>" not in a
    if suffix == "pdf":
        assert b"/CreationDate" not in a and b"/ModDate" not in a


def test_ci_profile_is_deterministic_and_without_a_database():
    # conftest.py loads "ci" when CI=true: the same examples on every run
    from hypothesis import settings

    ci = settings.get_profile("ci")
    assert ci.derandomize is True and ci.database is None
    dev = settings.get_profile("dev")
    assert dev.derandomize is False
    import os

    if os.environ.get("CI", "").lower() in ("true", "1", "yes") and not os.environ.get("HYPOTHESIS_PROFILE"):
        assert settings.default.derandomize is True and settings.default.database is None
