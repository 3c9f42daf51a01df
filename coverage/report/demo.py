"""`lobeplan demo`: the whole job on the shipped demo site."""
from __future__ import annotations

from importlib import resources
from pathlib import Path

from . import paths as _paths

HELP = "run the whole job on the shipped demo site (an invented scenario)"

__all__ = ["HELP", "site_path", "build", "format_text", "write_files"]


def site_path(args) -> Path:
    ref = resources.files("lobeplan.data").joinpath("demo/site.toml")
    return Path(str(ref))


def build(site, args) -> dict:
    return {"paths": _paths.build(site, args)}


def format_text(result: dict) -> str:
    return _paths.format_text(result["paths"])


def write_files(site, args, result, out_dir) -> list[Path]:
    from ..fileio import atomic_write_json

    return [atomic_write_json(Path(out_dir) / "paths.json", result["paths"])]
