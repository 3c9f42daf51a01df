"""The console front: parses, calls, prints. No physics here.

Each verb lives in a module of ``lobeplan.report`` (listed in ``VERBS``
with its ``--help`` line) that provides

- ``add_arguments(parser)``: the verb's own options (optional);
- ``build(site, args) -> dict``: the JSON-ready result (strict JSON);
- ``format_text(result) -> str``: the table a person reads;
- ``write_files(site, args, result, out_dir) -> list[Path]`` (optional):
  files for ``--out``, each written atomically; without it ``--out`` gets
  ``<verb>.json``.
"""
from __future__ import annotations

import argparse
import importlib
import sys
from pathlib import Path
from typing import Sequence

from .errors import LobeplanError

__all__ = ["main"]

# verb -> (module, one line for --help). Only the chosen verb's module is
# imported, so a quick verb does not pay for the maps' or the optimiser's imports.
VERBS = {
    "demo": ("lobeplan.report.demo", "run the whole job on the shipped demo site (an invented scenario); "
             "writes to ./maps"),
    "plan": ("lobeplan.report.plan", "rank baseline bearings and spacings against the goals; "
             "per-goal switch states, maps and results"),
    "paths": ("lobeplan.report.paths", "bearings and distances (short and long path) to every goal region"),
    "needs": ("lobeplan.report.needs", "takeoff angles each band needs to reach each goal, and the hours "
              "it is open"),
    "pattern": ("lobeplan.report.pattern", "every switch state against the goals: gain and advantage toward "
                "each, lobes, front-to-back, beam width, RDF; figures and gain grids with --out"),
    "feed": ("lobeplan.report.feed", "coupled impedances, true element currents, feed-point impedances, "
             "line design and match"),
    "map": ("lobeplan.report.map", "azimuthal-equidistant map per band with the lobes and goals"),
    "exposure": ("lobeplan.report.exposure", "RF exposure distances (far-field estimate, US limits) with "
                 "the cautions that go with them"),
}


class _Parser(argparse.ArgumentParser):
    """argparse that reports one line and exit status 2 (its own convention)."""

    def error(self, message: str) -> None:  # noqa: D401
        self.exit(2, f"lobeplan: error: {message}\n")


def _chosen_verb(argv: list[str]) -> str | None:
    for arg in argv:
        if not arg.startswith("-"):
            return arg if arg in VERBS else None
    return None


def _build_parser(verb: str | None) -> tuple[argparse.ArgumentParser, object | None]:
    parser = _Parser(prog="lobeplan", description="Plan a phased array of HF verticals "
                     "against the regions you want to reach.")
    parser.add_argument("--debug", action="store_true", help="show the traceback of an internal error")
    sub = parser.add_subparsers(dest="verb", metavar="VERB", parser_class=_Parser)
    sub.required = True
    chosen = None
    for name, (module, help_text) in VERBS.items():
        p = sub.add_parser(name, help=help_text, description=help_text)
        if name != "demo":
            p.add_argument("site", metavar="SITE.toml", help="the site file")
        p.add_argument("--json", action="store_true", help="machine-readable result on stdout, nothing else there")
        p.add_argument("--out", metavar="DIR", default=None, help="write result files into DIR")
        p.add_argument("--debug", action="store_true", help="show the traceback of an internal error")
        if name == verb:
            chosen = importlib.import_module(module)
            if hasattr(chosen, "add_arguments"):
                chosen.add_arguments(p)
    return parser, chosen


def _run(args: argparse.Namespace, mod: object) -> int:
    from .fileio import atomic_write_json, check_out_dir, dumps_json, ensure_dir
    from .site import load

    if hasattr(mod, "site_path"):
        site_path = mod.site_path(args)
    else:
        site_path = Path(args.site)
    if hasattr(mod, "check_arguments"):
        mod.check_arguments(args)
    out_dir = getattr(args, "out", None)
    if out_dir is None and hasattr(mod, "default_out"):
        out_dir = mod.default_out(args)
    if out_dir is not None:
        check_out_dir(out_dir)  # refuse before any work is done, create nothing yet
    site = load(site_path)
    result = mod.build(site, args)
    text = dumps_json(result) if args.json else mod.format_text(result)
    written = []
    if out_dir is not None:
        folder = ensure_dir(out_dir)
        if hasattr(mod, "write_files"):
            written = mod.write_files(site, args, result, folder)
        else:  # every verb honours --out: at least its result as JSON
            written = [atomic_write_json(folder / f"{args.verb}.json", result)]
    sys.stdout.write(text if text.endswith("\n") else text + "\n")
    if written and not args.json:
        sys.stdout.write("".join(f"wrote {p}\n" for p in written))
    return 0


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    argv = list(sys.argv[1:] if argv is None else argv)
    debug = "--debug" in argv
    try:
        parser, module = _build_parser(_chosen_verb(argv))
        args = parser.parse_args(argv)
        return _run(args, module)
    except SystemExit as exc:  # argparse: --help or a usage error
        return int(exc.code or 0) if isinstance(exc.code, int) else 2
    except LobeplanError as exc:
        sys.stderr.write(f"lobeplan: {exc}\n")
        return 2
    except KeyboardInterrupt:
        sys.stderr.write("lobeplan: interrupted; no partial files were left\n")
        return 130
    except BrokenPipeError:
        return 1
    except Exception as exc:  # an internal error: still one line unless asked
        if debug:
            raise
        first = str(exc).splitlines()[0] if str(exc) else ""
        sys.stderr.write(f"lobeplan: internal error: {type(exc).__name__}: {first} "
                         "(rerun with --debug for the traceback)\n")
        return 1
