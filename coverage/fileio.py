"""Atomic output: every file is written to a temporary name, then renamed.

A run stopped half-way therefore leaves either the old file or the new one,
never a partial one.
"""
from __future__ import annotations

import json
import os
import tempfile
from pathlib import Path
from typing import Any

from .errors import OutputError

__all__ = ["check_out_dir", "ensure_dir", "atomic_write_bytes", "atomic_write_text", "atomic_write_json",
           "atomic_savefig", "dumps_json"]


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
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
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


def atomic_savefig(fig: Any, path: str | os.PathLike[str], **kwargs: Any) -> Path:
    """Save a matplotlib figure atomically; the format follows the suffix."""
    import io

    target = Path(path)
    buf = io.BytesIO()
    fig.savefig(buf, format=target.suffix.lstrip(".").lower(), **kwargs)
    return atomic_write_bytes(target, buf.getvalue())
