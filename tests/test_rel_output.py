"""All or nothing in --out: staging, signals, full disk, reruns, colliding file names."""
import errno
import json
import os
import signal
import subprocess
import sys
import time

import pytest

from helpers import MINIMAL
from lobeplan import fileio
from lobeplan.cli import _signals_held, main

TWO_BANDS = MINIMAL.replace("[[goal]]", '[[band]]\nname = "20 m"\nfreq_mhz = 14.1\n[[goal]]')


def _leftovers(parent):
    """Anything a run left beside --out: staging folders or temporary files."""
    return sorted(p.name for p in parent.iterdir()
                  if (".lobeplan-" in p.name and p.name != fileio.MANIFEST) or p.name.endswith(".part"))


def _fail_after_first_files(monkeypatch, exc):
    """plan.json and plan.csv are written, then the figures fail with ``exc``."""
    import lobeplan.report.map as map_mod

    def broken(site, plan, args, out_dir):
        fileio.atomic_write_text(out_dir / "map-40m.png", "half")
        raise exc

    monkeypatch.setattr(map_mod, "write_plan_figures", broken)


@pytest.mark.parametrize("exc, code, says", [
    (RuntimeError("boom"), 1, "internal error"),
    (KeyboardInterrupt(), 130, "interrupted; nothing was written to"),
    (OSError(errno.ENOSPC, "No space left on device"), 2, "No space left on device"),
])
def test_a_failed_run_leaves_nothing(write_site, tmp_path, capsys, monkeypatch, exc, code, says):
    site = write_site(MINIMAL)
    out = tmp_path / "res"
    _fail_after_first_files(monkeypatch, exc)
    assert main(["plan", str(site), "--out", str(out)]) == code
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and says in err and "Traceback" not in err
    assert f"nothing was written to {out}" in err
    assert not out.exists() and _leftovers(tmp_path) == []


def test_a_failed_run_keeps_the_earlier_results(write_site, tmp_path, capsys, monkeypatch):
    site = write_site(MINIMAL)
    out = tmp_path / "res"
    assert main(["paths", str(site), "--out", str(out)]) == 0
    before = {p.name: p.read_bytes() for p in out.iterdir()}
    _fail_after_first_files(monkeypatch, RuntimeError("boom"))
    assert main(["plan", str(site), "--out", str(out)]) == 1
    assert {p.name: p.read_bytes() for p in out.iterdir()} == before
    assert _leftovers(tmp_path) == [] and _leftovers(out) == []


def test_full_disk_while_writing_is_one_line_exit_2(write_site, tmp_path, capsys, monkeypatch):
    site = write_site(MINIMAL)
    calls = []

    def full(fd):
        calls.append(fd)
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    assert main(["paths", str(site), "--out", str(tmp_path / "res")]) == 2
    err = capsys.readouterr().err
    assert calls and err.count("\n") == 1 and "No space left on device" in err
    assert f"{tmp_path / 'res' / 'paths.json'}: cannot write" in err  # where the user looks, not the staging
    assert not (tmp_path / "res").exists() and _leftovers(tmp_path) == []


def test_a_folder_for_out_is_created_only_on_success(write_site, tmp_path, capsys, monkeypatch):
    site = write_site(MINIMAL)
    out = tmp_path / "a" / "b" / "res"
    _fail_after_first_files(monkeypatch, RuntimeError("boom"))
    assert main(["plan", str(site), "--out", str(out)]) == 1
    assert list(tmp_path.iterdir()) == [site]  # not even the parents a/b are left


def test_rerun_removes_its_own_stale_results_and_names_other_verbs(write_site, tmp_path, capsys, monkeypatch):
    import lobeplan.report.map as map_mod

    # stand-in figures: the file names are what matters here, not the drawing
    def figures(site, plan, args, out_dir):
        return [fileio.atomic_write_text(out_dir / map_mod.map_file_name(b.name), b.name) for b in site.bands]

    monkeypatch.setattr(map_mod, "write_plan_figures", figures)
    out = tmp_path / "res"
    assert main(["paths", str(write_site(MINIMAL)), "--out", str(out)]) == 0
    assert main(["plan", str(write_site(TWO_BANDS)), "--out", str(out)]) == 0
    assert (out / "map-20m.png").exists()
    capsys.readouterr()
    assert main(["plan", str(write_site(MINIMAL)), "--out", str(out)]) == 0
    text = capsys.readouterr().out
    assert not (out / "map-20m.png").exists()
    assert "removed from an earlier run (not written this time): map-20m.png" in text
    assert "left from an earlier run (lobeplan paths): paths.json" in text
    assert (out / "paths.json").exists()
    manifest = json.loads((out / fileio.MANIFEST).read_text())["files"]
    # plan also writes the hour-by-hour schedule: its CSV, the switch card and a figure per band,
    # the staking plan (issue 10) and the page
    assert manifest == {"paths.json": "paths", "plan.json": "plan", "plan.csv": "plan", "map-40m.png": "plan",
                        "schedule.csv": "plan", "switch-card.pdf": "plan", "switch-card.png": "plan",
                        "schedule-40m.png": "plan", "stakes.csv": "plan", "layout.png": "plan", "plan.html": "plan"}
    # a user's own file in the folder is neither removed nor named
    (out / "notes.txt").write_text("mine")
    assert main(["plan", str(write_site(MINIMAL)), "--out", str(out)]) == 0
    assert (out / "notes.txt").exists() and "notes.txt" not in capsys.readouterr().out


def test_json_mode_keeps_the_notes_off_stdout(write_site, tmp_path, capsys):
    out = tmp_path / "res"
    assert main(["paths", str(write_site(MINIMAL)), "--out", str(out)]) == 0
    capsys.readouterr()
    assert main(["needs", str(write_site(MINIMAL)), "--out", str(out), "--json"]) == 0
    cap = capsys.readouterr()
    json.loads(cap.out)
    assert "left from an earlier run (lobeplan paths): paths.json" in cap.err


def test_signals_wait_while_results_move_into_place():
    from lobeplan.cli import Terminated

    steps = []
    with pytest.raises(KeyboardInterrupt):
        with _signals_held():
            os.kill(os.getpid(), signal.SIGINT)
            time.sleep(0.05)
            steps.append("still moving")  # not stopped half-way
    assert steps == ["still moving"]
    with pytest.raises(Terminated):
        with _signals_held():
            os.kill(os.getpid(), signal.SIGTERM)
            time.sleep(0.05)
            steps.append("still moving")
    assert steps == ["still moving"] * 2
    assert signal.getsignal(signal.SIGINT) is signal.default_int_handler


def test_interrupt_after_the_move_says_the_results_are_there(write_site, tmp_path, capsys, monkeypatch):
    real = fileio.commit_staging

    def commit_then_interrupt(*a, **k):
        done = real(*a, **k)
        raise KeyboardInterrupt
    import lobeplan.fileio as f

    monkeypatch.setattr(f, "commit_staging", commit_then_interrupt)
    out = tmp_path / "res"
    assert main(["paths", str(write_site(MINIMAL)), "--out", str(out)]) == 130
    err = capsys.readouterr().err
    assert "after the results were moved into" in err and "paths.json" in err
    assert (out / "paths.json").exists()


@pytest.mark.parametrize("sig, code, says", [(signal.SIGTERM, 143, "terminated (SIGTERM)"),
                                             (signal.SIGINT, 130, "interrupted")])
def test_a_signal_while_writing_leaves_nothing(write_site, tmp_path, sig, code, says):
    # A real process, stopped while it writes into its staging folder. It
    # holds still after drawing its maps (and says so in a marker file), so
    # the signal lands there and not, on a loaded machine, in the final moves:
    # a signal in the moves is held until they are done, and the run then
    # rightly reports its files as written.
    site = write_site(MINIMAL)
    out = tmp_path / "res"
    mark = tmp_path / "maps-drawn"
    child = (
        "import pathlib, sys, time\n"
        "import lobeplan.report.map as m\n"
        "orig = m.write_plan_figures\n"
        "def held(*a, **k):\n"
        "    done = orig(*a, **k)\n"
        f"    pathlib.Path({str(mark)!r}).write_text('x')\n"
        "    time.sleep(120)\n"
        "    return done\n"
        "m.write_plan_figures = held\n"
        "from lobeplan.cli import main\n"
        f"sys.exit(main(['plan', {str(site)!r}, '--out', {str(out)!r}]))\n"
    )
    proc = subprocess.Popen([sys.executable, "-c", child],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, cwd=tmp_path,
                            env={**os.environ, "MPLBACKEND": "Agg"},
                            # a shell's background job starts with SIGINT ignored; a user's terminal does not
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    deadline = time.monotonic() + 120
    while not mark.exists() and proc.poll() is None and time.monotonic() < deadline:
        time.sleep(0.02)
    assert proc.poll() is None and _leftovers(tmp_path), "the run ended before it could be stopped"
    proc.send_signal(sig)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == code
    assert says in err and f"nothing was written to {out}" in err and "Traceback" not in err
    assert not out.exists() and _leftovers(tmp_path) == []


def test_an_out_folder_on_another_filesystem_is_staged_inside_it(tmp_path, monkeypatch):
    # a mount point: a rename from its parent would fail with EXDEV
    out = tmp_path / "usb"
    out.mkdir()
    monkeypatch.setattr(fileio, "_same_device", lambda parent, folder: False)
    staging = fileio.start_staging(out)
    assert staging.folder.parent == out and staging.folder.name.startswith(".lobeplan-staging-")
    fileio.atomic_write_text(staging.folder / "a.txt", "x")
    done = fileio.commit_staging(staging, [staging.folder / "a.txt"], "paths")
    assert sorted(p.name for p in out.iterdir()) == [fileio.MANIFEST, "a.txt"]
    assert [p.name for p in done.written] == ["a.txt"]


def test_an_edited_manifest_cannot_remove_files_elsewhere(write_site, tmp_path, capsys):
    out = tmp_path / "res"
    out.mkdir()
    victim = tmp_path / "keep.txt"
    victim.write_text("mine")
    (out / fileio.MANIFEST).write_text(json.dumps({"files": {"../keep.txt": "paths", str(victim): "paths"}}))
    assert main(["paths", str(write_site(MINIMAL)), "--out", str(out)]) == 0
    assert victim.read_text() == "mine"
    assert json.loads((out / fileio.MANIFEST).read_text())["files"] == {"paths.json": "paths"}
