"""Atomic output: every file is written to a temporary name, then renamed.

A run stopped half-way therefore leaves either the old file or the new one,
never a partial one. A whole run is staged the same way: its files go into
a staging folder beside ``--out`` and move into place only when all are
written (``start_staging``, ``commit_staging``, ``discard_staging``).
"""
from __future__ import annotations

import errno
import json
import os
import shutil
import tempfile
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .errors import OutputError

__all__ = ["check_out_dir", "ensure_dir", "atomic_write_bytes", "atomic_write_text", "atomic_write_json",
           "atomic_savefig", "dumps_json", "MANIFEST", "Staging", "Committed", "start_staging",
           "discard_staging", "commit_staging", "is_output_fault"]


def check_out_dir(path: str | os.PathLike[str]) -> Path:
    """Check that the output folder exists and is writable, or could be made.

    Nothing is created here, so that a run refused later leaves no trace.
    """
    out = Path(path)
    probe = out
    while not probe.exists():
        if probe.parent == probe:
            break
        probe = probe.parent
    if probe.exists() and not probe.is_dir():
        raise OutputError(f"--out: {out}: cannot be a folder, {probe} is a file")
    if probe == out and not os.access(out, os.W_OK):
        raise OutputError(f"--out: {out}: the folder is not writable")
    if probe != out and not os.access(probe, os.W_OK):
        raise OutputError(f"--out: {out}: cannot be created, {probe} is not writable")
    return out


def ensure_dir(path: str | os.PathLike[str]) -> Path:
    """Create the output folder (and parents); one clear error if impossible."""
    out = Path(path)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise OutputError(f"--out: {out}: cannot create the output folder ({exc.strerror or exc})") from None
    if not out.is_dir():
        raise OutputError(f"--out: {out}: is not a folder")
    if not os.access(out, os.W_OK):
        raise OutputError(f"--out: {out}: the folder is not writable")
    return out


def atomic_write_bytes(path: str | os.PathLike[str], data: bytes) -> Path:
    target = Path(path)
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=target.parent)
    except OSError as exc:
        raise OutputError(f"{target}: cannot write ({exc.strerror or exc})") from None
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
        os.replace(tmp, target)
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if is_output_fault(exc) and not isinstance(exc, OutputError):
            raise OutputError(f"{target}: cannot write ({exc.strerror or exc})") from None
        raise
    return target


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def atomic_write_text(path: str | os.PathLike[str], text: str) -> Path:
    return atomic_write_bytes(path, text.encode("utf-8"))


def dumps_json(obj: Any) -> str:
    """Strict JSON (no NaN, no Infinity), stable key order, trailing newline."""
    return json.dumps(obj, indent=2, allow_nan=False, ensure_ascii=False) + "\n"


def atomic_write_json(path: str | os.PathLike[str], obj: Any) -> Path:
    return atomic_write_text(path, dumps_json(obj))


# Metadata that would change from run to run: dates (PDF, SVG).
_NO_DATES = {"pdf": {"CreationDate": None, "ModDate": None}, "svg": {"Date": None}}


def atomic_savefig(fig: Any, path: str | os.PathLike[str], **kwargs: Any) -> Path:
    """Save a matplotlib figure atomically; the format follows the suffix.

    The bytes depend on the figure only: no dates in PDF or SVG metadata,
    and SVG element ids (clip paths) hashed with a fixed salt instead of a
    random one, so a rerun gives the same file.
    """
    import io

    import matplotlib

    target = Path(path)
    fmt = target.suffix.lstrip(".").lower()
    meta = {**_NO_DATES.get(fmt, {}), **(kwargs.pop("metadata", None) or {})}
    buf = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": "lobeplan"}):
        fig.savefig(buf, format=fmt, metadata=meta or None, **kwargs)
    return atomic_write_bytes(target, buf.getvalue())


# --------------------------------------------------------------------------
# A whole run's files, all or nothing


MANIFEST = ".lobeplan-files.json"
"""Kept in each output folder: which verb last wrote which file, so that a
rerun can remove its own results that it no longer writes."""

_OUTPUT_ERRNOS = {errno.ENOSPC, errno.EDQUOT, errno.EROFS, errno.EACCES, errno.EPERM, errno.EIO, errno.EFBIG,
                  errno.ENAMETOOLONG}


def is_output_fault(exc: BaseException) -> bool:
    """True for an OSError a full disk, quota or permission gives."""
    return isinstance(exc, OSError) and getattr(exc, "errno", None) in _OUTPUT_ERRNOS


@dataclass
class Staging:
    """The folder a run writes into before its results move to ``out``.

    ``folder`` sits beside ``out`` (same filesystem, so moving is a rename);
    if the parent is not writable or ``out`` is a mount point, inside ``out``
    as a hidden folder.
    ``created`` lists the folders made for it that did not exist before,
    deepest last, so that a failed run can remove them again.
    """

    out: Path
    folder: Path
    created: list[Path] = field(default_factory=list)
    moved: list[Path] = field(default_factory=list)


def _make_dirs(path: Path, created: list[Path]) -> None:
    missing = []
    probe = path
    while not probe.exists():
        missing.append(probe)
        if probe.parent == probe:
            break
        probe = probe.parent
    for d in reversed(missing):
        try:
            d.mkdir()
        except FileExistsError:
            continue
        except OSError as exc:
            raise OutputError(f"--out: {path}: cannot create the folder {d} ({exc.strerror or exc})") from None
        created.append(d)


def _same_device(parent: Path, out: Path) -> bool:
    """False when ``out`` is a mount point: a rename from its parent would fail (EXDEV)."""
    try:
        return not out.exists() or os.stat(parent).st_dev == os.stat(out).st_dev
    except OSError:
        return False


def start_staging(out_dir: str | os.PathLike[str]) -> Staging:
    """Make the staging folder for a run that writes into ``out_dir``."""
    out = Path(out_dir)
    full = Path(os.path.abspath(out))
    created: list[Path] = []
    parent = full.parent
    try:
        _make_dirs(parent, created)
        if os.access(parent, os.W_OK) and parent != full and _same_device(parent, full):
            folder = Path(tempfile.mkdtemp(prefix=f".{full.name}.lobeplan-", dir=parent))
        else:  # the parent is not ours to write: stage inside the folder itself
            _make_dirs(full, created)
            folder = Path(tempfile.mkdtemp(prefix=".lobeplan-staging-", dir=full))
    except OutputError:
        _remove_created(created)
        raise
    except OSError as exc:
        _remove_created(created)
        raise OutputError(f"--out: {out}: cannot make a staging folder ({exc.strerror or exc})") from None
    return Staging(out, folder, created)


def _remove_created(created: list[Path]) -> None:
    for d in reversed(created):
        try:
            d.rmdir()
        except OSError:
            pass


def discard_staging(staging: Staging) -> None:
    """Remove the staging folder and every folder made for it (a failed run)."""
    shutil.rmtree(staging.folder, ignore_errors=True)
    _remove_created(staging.created)


def _read_manifest(out: Path) -> dict[str, str]:
    try:
        data = json.loads((out / MANIFEST).read_text(encoding="utf-8"))
        files = data.get("files", {})
        if not isinstance(files, dict):
            return {}
        # plain names in the folder only: an edited manifest must not reach elsewhere
        return {str(k): str(v) for k, v in files.items()
                if str(k) == Path(str(k)).name and str(k) not in ("", ".", "..") and "\\" not in str(k)}
    except (OSError, ValueError, AttributeError):
        return {}


@dataclass(frozen=True)
class Committed:
    """What a finished run did in its output folder (paths as the user gave them)."""

    written: tuple[Path, ...]
    removed: tuple[str, ...]            # our own earlier results this run no longer writes
    left: tuple[tuple[str, str], ...]   # (file, verb) written by another verb earlier


def commit_staging(staging: Staging, files: list[Path], verb: str) -> Committed:
    """Move every staged file into ``out``, then tidy the earlier run's results.

    Each move is a rename on one filesystem; the caller blocks SIGINT and
    SIGTERM around this, so that a run is stopped either before its first
    move or after its last.
    """
    out = staging.out
    full = Path(os.path.abspath(out))
    rels = [Path(os.path.relpath(os.path.abspath(p), staging.folder)) for p in files]
    for rel in rels:
        if rel.parts[:1] == ("..",) or rel.is_absolute():
            raise RuntimeError(f"{rel}: a result file was written outside the staging folder")
    old = _read_manifest(full)
    try:
        _make_dirs(full, staging.created)
        for rel in rels:
            (full / rel).parent.mkdir(parents=True, exist_ok=True)
            os.replace(staging.folder / rel, full / rel)
            staging.moved.append(out / rel)
    except OSError as exc:
        done = ", ".join(p.name for p in staging.moved) or "none"
        raise OutputError(f"--out: {out}: moving the results into place failed ({exc.strerror or exc}); "
                          f"moved before the failure: {done}") from None
    new_names = {rel.as_posix() for rel in rels}
    removed, left = [], []
    for name, by in sorted(old.items()):
        if name in new_names or not (full / name).is_file():
            continue
        if by == verb:
            try:
                (full / name).unlink()
                removed.append(name)
            except OSError:
                left.append((name, by))
        else:
            left.append((name, by))
    manifest = {name: by for name, by in old.items() if (full / name).is_file()}
    manifest.update({name: verb for name in new_names})
    atomic_write_json(full / MANIFEST, {"files": dict(sorted(manifest.items()))})
    shutil.rmtree(staging.folder, ignore_errors=True)
    return Committed(tuple(staging.moved), tuple(removed), tuple(left))
