"""The console front: parses, calls, prints. No physics here.

Each verb lives in a module of ``lobeplan.report`` (listed in ``VERBS``
with its ``--help`` line) that provides

- ``add_arguments(parser)``: the verb's own options (optional);
- ``build(site, args) -> dict``: the JSON-ready result (strict JSON);
- ``format_text(result) -> str``: the table a person reads;
- ``SITE_SECTIONS`` (optional): the site-file tables the verb needs, when
  not all of [station], [array], [[band]] and [[goal]];
- ``write_files(site, args, result, out_dir) -> list[Path]`` (optional):
  files for ``--out``, each written atomically; without it ``--out`` gets
  ``<verb>.json``.

``out_dir`` is a staging folder beside ``--out``: the files move into place
only when every one is written, and a failure, Ctrl-C or SIGTERM removes the
staging folder, so a run leaves all its results or none. Each output folder
keeps a small manifest (``.lobeplan-files.json``) of which verb wrote what,
so that a rerun removes its own results it no longer writes and names those
another verb left.
"""
from __future__ import annotations

import argparse
import contextlib
import importlib
import signal
import sys
import threading
from pathlib import Path
from typing import Sequence

from .errors import LobeplanError, OutputError

__all__ = ["main"]

# verb -> (module, one line for --help). Only the chosen verb's module is
# imported, so a quick verb does not pay for the maps' or the optimiser's imports.
VERBS = {
    "demo": ("lobeplan.report.demo", "run the whole job on the shipped demo site (an invented scenario); "
             "writes to ./lobeplan-demo"),
    "plan": ("lobeplan.report.plan", "rank baseline bearings and spacings against the goals; "
             "per-goal switch states, maps and results"),
    "schedule": ("lobeplan.report.schedule", "which switch state to use on each band, month and UT hour; "
                 "switch card and schedule figures"),
    "paths": ("lobeplan.report.paths", "bearings and distances (short and long path) to every goal region"),
    "needs": ("lobeplan.report.needs", "takeoff angles each band needs to reach each goal, and the hours "
              "it is open"),
    "pattern": ("lobeplan.report.pattern", "every switch state against the goals: gain and advantage toward "
                "each, lobes, front-to-back, beam width, RDF; figures and gain grids with --out"),
    "feed": ("lobeplan.report.feed", "coupled impedances, true element currents, feed-point impedances, "
             "line design and match"),
    "map": ("lobeplan.report.map", "azimuthal-equidistant map per band with the lobes and goals; writes to "
            "./lobeplan-maps without --out"),
    "exposure": ("lobeplan.report.exposure", "RF exposure distances (far-field estimate, US limits) with "
                 "the cautions that go with them"),
    "regions": ("lobeplan.report.regions", "country and continent names, codes and areas that match a text; "
                "with --site, their bearings and distances"),
}

# verbs that take no site file as their first argument
_NO_SITE = ("demo", "regions")


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
        if name not in _NO_SITE:
            p.add_argument("site", metavar="SITE.toml", help="the site file")
        p.add_argument("--json", action="store_true", help="machine-readable result on stdout, nothing else there")
        p.add_argument("--out", metavar="DIR", default=None, help="write result files into DIR")
        p.add_argument("--debug", action="store_true", help="show the traceback of an internal error")
        if name == verb:
            chosen = importlib.import_module(module)
            if hasattr(chosen, "add_arguments"):
                chosen.add_arguments(p)
    return parser, chosen


class Terminated(BaseException):
    """SIGTERM, raised where the run is so that its staged files are removed."""


def _on_sigterm(signum, frame) -> None:
    raise Terminated()


@contextlib.contextmanager
def _signals_held():
    """Hold SIGINT and SIGTERM back while results move into place.

    A signal that arrives meanwhile is noted and acted on when the block
    ends, so a run stops either before its first file moves or after its
    last. (Python-level handlers, not a thread signal mask: numerical
    libraries run threads of their own that the kernel may deliver to.)
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    received: list[int] = []
    held = (signal.SIGINT, signal.SIGTERM)
    old = {s: signal.signal(s, lambda signum, frame: received.append(signum)) for s in held}
    try:
        yield
    finally:
        for s, handler in old.items():
            signal.signal(s, handler)
    if signal.SIGTERM in received:
        raise Terminated()
    if received:
        raise KeyboardInterrupt()


def _run(args: argparse.Namespace, mod: object, state: dict) -> int:
    from .fileio import (atomic_write_json, check_out_dir, commit_staging, discard_staging, dumps_json,
                         is_output_fault, start_staging)
    from .site import SECTIONS, load

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
    site = None if site_path is None else load(site_path, getattr(mod, "SITE_SECTIONS", SECTIONS))
    result = mod.build(site, args)
    text = dumps_json(result) if args.json else mod.format_text(result)
    done = None
    if out_dir is not None:
        state["out"] = out_dir
        staging = None
        try:
            # held while the folder is made: a signal between its making and
            # this try would leave it behind
            with _signals_held():
                staging = start_staging(out_dir)
            if hasattr(mod, "write_files"):
                staged = mod.write_files(site, args, result, staging.folder)
            else:  # every verb honours --out: at least its result as JSON
                staged = [atomic_write_json(staging.folder / f"{args.verb}.json", result)]
            with _signals_held():
                try:
                    done = commit_staging(staging, list(staged), args.verb)
                finally:
                    state["moved"] = list(staging.moved)
        except BaseException as exc:
            if staging is not None:
                discard_staging(staging)
            if is_output_fault(exc) and not isinstance(exc, LobeplanError):
                raise OutputError(f"--out: {out_dir}: cannot write ({exc.strerror or exc})") from None
            if isinstance(exc, OutputError) and staging is not None and str(staging.folder) in str(exc):
                # name the file where the user will look for it, not the staging folder
                where = Path(out_dir)
                raise OutputError(str(exc).replace(str(staging.folder), str(where).rstrip("/") or "/")) from None
            raise
    sys.stdout.write(text if text.endswith("\n") else text + "\n")
    if done is not None:
        notes = []
        if done.removed:
            notes.append(f"removed from an earlier run (not written this time): {', '.join(done.removed)}\n")
        for verb in dict.fromkeys(by for _, by in done.left):
            names = ", ".join(name for name, by in done.left if by == verb)
            notes.append(f"left from an earlier run (lobeplan {verb}): {names}\n")
        if args.json:
            sys.stderr.write("".join(f"lobeplan: {n}" for n in notes))
        else:
            sys.stdout.write("".join(f"wrote {p}\n" for p in done.written) + "".join(notes))
    return 0


def _stopped(what: str, state: dict) -> str:
    """The truthful end of a stopped run: what it left in --out."""
    out, moved = state.get("out"), state.get("moved")
    if moved:
        return (f"lobeplan: {what} after the results were moved into {out}: "
                + ", ".join(p.name for p in moved) + "\n")
    if out is not None:
        return f"lobeplan: {what}; nothing was written to {out}\n"
    return f"lobeplan: {what}; no files were written\n"


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    argv = list(sys.argv[1:] if argv is None else argv)
    debug = "--debug" in argv
    state: dict = {}
    old_term = None
    if threading.current_thread() is threading.main_thread():
        old_term = signal.signal(signal.SIGTERM, _on_sigterm)
    try:
        parser, module = _build_parser(_chosen_verb(argv))
        args = parser.parse_args(argv)
        return _run(args, module, state)
    except SystemExit as exc:  # argparse: --help or a usage error
        return int(exc.code or 0) if isinstance(exc.code, int) else 2
    except LobeplanError as exc:
        where = state.get("out")
        tail = f"; nothing was written to {where}" if where is not None and not state.get("moved") else ""
        sys.stderr.write(f"lobeplan: {exc}{tail}\n")
        return 2
    except KeyboardInterrupt:
        sys.stderr.write(_stopped("interrupted", state))
        return 130
    except Terminated:
        sys.stderr.write(_stopped("terminated (SIGTERM)", state))
        return 143
    except BrokenPipeError:
        return 1
    except Exception as exc:  # an internal error: still one line unless asked
        if debug:
            raise
        first = str(exc).splitlines()[0] if str(exc) else ""
        where = state.get("out")
        tail = f"; nothing was written to {where}" if where is not None and not state.get("moved") else ""
        sys.stderr.write(f"lobeplan: internal error: {type(exc).__name__}: {first}{tail} "
                         "(rerun with --debug for the traceback; please report it)\n")
        return 1
    finally:
        if old_term is not None:
            signal.signal(signal.SIGTERM, old_term)
