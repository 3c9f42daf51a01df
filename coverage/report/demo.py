"""`lobeplan demo`: the whole job on the shipped demo site."""
from __future__ import annotations

from importlib import resources
from pathlib import Path

from . import needs as _needs
from . import paths as _paths
from . import plan as _plan

__all__ = ["add_arguments", "check_arguments", "site_path", "default_out", "build", "format_text", "write_files"]


def add_arguments(p) -> None:
    _plan.add_arguments(p)


def check_arguments(args) -> None:
    _plan.check_arguments(args)


def site_path(args) -> Path:
    ref = resources.files("lobeplan.data").joinpath("demo/site.toml")
    return Path(str(ref))


def default_out(args) -> str:
    # a folder of its own, so that a run inside the checkout never rewrites
    # the committed gallery in maps/ (that takes an explicit --out maps)
    return "lobeplan-demo"


def build(site, args) -> dict:
    plan = _plan.run_plan(site, bool(getattr(args, "json", False)))
    return {"paths": _paths.build(site, args),
            "needs": _needs.build_from_goal_bands(site, plan.goal_bands, plan.caveats),
            "plan": _plan.build_from_plan(site, plan)}


def format_text(result: dict) -> str:
    return "\n".join([_paths.format_text(result["paths"]), _needs.format_text(result["needs"]),
                      _plan.format_text(result["plan"])])


def write_files(site, args, result, out_dir) -> list[Path]:
    """paths.json, then everything of the plan: results, maps, panels, GeoJSON."""
    from ..fileio import atomic_write_json

    written = [atomic_write_json(Path(out_dir) / "paths.json", result["paths"]),
               atomic_write_json(Path(out_dir) / "needs.json", result["needs"])]
    return written + _plan.write_files(site, args, result["plan"], out_dir)
