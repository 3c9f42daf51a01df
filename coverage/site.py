"""Site file (TOML) -> frozen dataclasses; all validation lives here.

Every problem raises :class:`lobeplan.errors.SiteError` naming the file, the
key path (``goal[2].region``), the value and what is expected. User units
(MHz, the file's lists) are converted to the core's units here, once.
"""
from __future__ import annotations

import difflib
import math
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .antenna.layout import layout_positions_m
from .antenna.model import (GROUND_CLASSES, USES, ArrayOption, ArraySpec, Feed, ForegroundSector, Ground,
                            Radials, State)
from .errors import SiteError
from .geo import locator as _locator
from .geo.station import Station
from .plan.model import Orientation
from .propagation.model import PropagationSettings

__all__ = ["Band", "Goal", "Site", "load", "loads", "MapSettings", "height_caveats", "SECTIONS", "mesh_caveats", "radial_caveats",
           "element_caveats", "SHORT_WAVELENGTHS"]

_REQUIRED = object()
LAYOUTS = ("single", "pair", "line", "square", "custom")
PATHS = ("short", "long", "both")
MODELS = ("geometry", "climatology")
# PyIRI's magnetic-field coefficients run out after 2030 (issue 4, measured).
YEAR_RANGE = (1958, 2030)
# The exposure table covers 0.3-300 MHz (safety.py); above 60 MHz is not HF
FREQ_RANGE_MHZ = (0.3, 60.0)
# Work bounds: every loop over what a file lists has one (issue 16); a
# 100,000-character station name took 37 s to draw
MAX_SITE_BYTES = 1_000_000
MAX_NAME_CHARS = 80
MAX_TEXT_CHARS = 1000
MAX_COUNTS = {"band": 20, "goal": 200, "state": 32, "option": 20, "avoid": 20, "positions_m": 16,
              "hours_utc": 24, "allowed_orientation_deg": 36}


@dataclass(frozen=True, slots=True)
class Band:
    name: str
    freq_hz: float
    edges_hz: tuple[float, float] | None = None  # for SWR; None: +-1.5 %

    @property
    def freq_mhz(self) -> float:
        return self.freq_hz / 1e6


@dataclass(frozen=True, slots=True)
class Goal:
    """A region to serve. ``bands`` None means every band of the site.

    ``path`` is "short" or "long" ("both" in the file becomes two goals).
    ``key`` is the key path of the goal in the site file, for messages.
    """

    name: str
    region: str
    weight: float
    bands: tuple[str, ...] | None
    path: str
    clip: tuple[float, float, float, float] | None
    avoid: tuple[str, ...]
    avoid_weight: float
    key: str


@dataclass(frozen=True, slots=True)
class MapSettings:
    """How maps and the GeoJSON export are drawn."""

    lobe_peak_km: float = 10000.0   # great-circle length of a lobe at its peak gain
    lobe_floor_db: float = 20.0     # a lobe shows this many dB below its peak
    ring_step_km: float = 2500.0


@dataclass(frozen=True, slots=True)
class Site:
    file: str            # path of the site file, for messages
    base_dir: str        # folder relative file: regions resolve against
    station: Station
    array: ArraySpec
    orientation: Orientation
    bands: tuple[Band, ...]
    goals: tuple[Goal, ...]
    propagation: PropagationSettings
    map: MapSettings = MapSettings()

    def band(self, name: str) -> Band:
        for b in self.bands:
            if b.name == name:
                return b
        raise KeyError(name)

    def goal_bands(self, goal: Goal) -> tuple[Band, ...]:
        if goal.bands is None:
            return self.bands
        return tuple(b for b in self.bands if b.name in goal.bands)


# --------------------------------------------------------------------------


class _Reader:
    """Typed access to one TOML document with messages that name the key."""

    def __init__(self, file: str) -> None:
        self.file = file

    def fail(self, key: str, reason: str) -> SiteError:
        return SiteError(self.file, key, reason)

    def table(self, value: Any, key: str, allowed: tuple[str, ...]) -> dict[str, Any]:
        if not isinstance(value, dict):
            raise self.fail(key, f"expected a table, got {_show(value)}")
        for k in value:
            if k not in allowed:
                close = difflib.get_close_matches(k, allowed, n=1, cutoff=0.5)
                hint = f"; did you mean {close[0]!r}?" if close else f"; expected one of {', '.join(allowed)}"
                raise self.fail(_join(key, k), f"unknown key {k!r}{hint}")
        return value

    def tables(self, value: Any, key: str) -> list[dict[str, Any]]:
        if isinstance(value, dict):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            raise self.fail(key, f"expected an array of tables ([[{key}]]), got {_show(value)}")
        self.at_most(value, key)
        return value

    def at_most(self, value: list, key: str) -> None:
        """Refuse more entries than the bound of this kind of list."""
        limit = MAX_COUNTS.get(key.rsplit(".", 1)[-1].split("[")[0])
        if limit is not None and len(value) > limit:
            raise self.fail(key, f"has {len(value)} entries; expected at most {limit}")

    def number(self, t: dict, name: str, key: str, default: Any = _REQUIRED, *, lo: float | None = None,
               hi: float | None = None, lo_open: bool = False, hi_open: bool = False,
               integer: bool = False, what: str = "") -> Any:
        k = _join(key, name)
        if name not in t:
            if default is _REQUIRED:
                raise self.fail(k, f"missing; expected {what or 'a number'}")
            return default
        return self.check_number(t[name], k, lo=lo, hi=hi, lo_open=lo_open, hi_open=hi_open,
                                 integer=integer, what=what)

    def check_number(self, v: Any, k: str, *, lo: float | None = None, hi: float | None = None,
                     lo_open: bool = False, hi_open: bool = False, integer: bool = False,
                     what: str = "") -> Any:
        expect = what or _range_text(lo, hi, lo_open, hi_open, integer)
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            raise self.fail(k, f"{_show(v)} is not a number; expected {expect}")
        if integer and not (isinstance(v, int) or (isinstance(v, float) and v.is_integer())):
            raise self.fail(k, f"{_show(v)} is not a whole number; expected {expect}")
        if isinstance(v, int) and abs(v) > 2**53:  # beyond exact floats (and float() overflows past 1e308)
            raise self.fail(k, f"a {len(str(abs(v)))}-digit number is too large; expected {expect}")
        if not math.isfinite(v):
            raise self.fail(k, f"{_show(v)} is not a finite number; expected {expect}")
        if lo is not None and (v < lo or (lo_open and v == lo)):
            raise self.fail(k, f"{_show(v)} is out of range; expected {expect}")
        if hi is not None and (v > hi or (hi_open and v == hi)):
            raise self.fail(k, f"{_show(v)} is out of range; expected {expect}")
        return int(v) if integer else float(v)

    def string(self, t: dict, name: str, key: str, default: Any = _REQUIRED,
               choices: tuple[str, ...] | None = None) -> Any:
        k = _join(key, name)
        if name not in t:
            if default is _REQUIRED:
                raise self.fail(k, "missing; expected " + (f"one of {', '.join(choices)}" if choices else "a string"))
            return default
        v = t[name]
        if not isinstance(v, str) or (not v.strip()):
            raise self.fail(k, f"{_show(v)} is not a non-empty string")
        limit = MAX_NAME_CHARS if name == "name" else MAX_TEXT_CHARS
        if len(v) > limit:
            raise self.fail(k, f"is {len(v)} characters long; expected at most {limit}")
        if choices is not None and v not in choices:
            close = difflib.get_close_matches(v, choices, n=1, cutoff=0.5)
            hint = f"; did you mean {close[0]!r}?" if close else ""
            raise self.fail(k, f"{v!r} is not one of {', '.join(choices)}{hint}")
        return v

    def number_list(self, t: dict, name: str, key: str, default: Any = _REQUIRED, *, length: int | None = None,
                    why: str = "", **limits: Any) -> Any:
        k = _join(key, name)
        if name not in t:
            if default is _REQUIRED:
                raise self.fail(k, "missing; expected a list of numbers")
            return default
        v = t[name]
        if not isinstance(v, list) or not v:
            raise self.fail(k, f"{_show(v)} is not a non-empty list of numbers")
        if length is not None and len(v) != length:
            raise self.fail(k, f"has {len(v)} values; expected {length}" + (f" ({why})" if why else ""))
        return tuple(self.check_number(x, f"{k}[{i + 1}]", **limits) for i, x in enumerate(v))


def _and(items: list[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def _join(key: str, name: str) -> str:
    return f"{key}.{name}" if key else name


def _show(v: Any) -> str:
    if isinstance(v, str):
        return repr(v)
    if isinstance(v, dict):
        return "a table"
    if isinstance(v, list):
        return "an empty list" if not v else "a list"
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float) and not math.isfinite(v):
        return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf")
    if isinstance(v, int) and abs(v) > 10**30:  # keep the message one readable line
        return f"a {len(str(abs(v)))}-digit number"
    return repr(v)


def _range_text(lo, hi, lo_open, hi_open, integer) -> str:
    kind = "a whole number" if integer else "a number"
    if lo is not None and hi is not None:
        return f"{kind} {'>' if lo_open else '>='} {lo:g} and {'<' if hi_open else '<='} {hi:g}"
    if lo is not None:
        return f"{kind} {'>' if lo_open else '>='} {lo:g}"
    if hi is not None:
        return f"{kind} {'<' if hi_open else '<='} {hi:g}"
    return kind


# --------------------------------------------------------------------------


def _check_regular_file(p: Path, file: str) -> None:
    """Refuse a FIFO, socket or device before opening it (a FIFO blocks the read)."""
    import stat

    mode = p.stat().st_mode  # FileNotFoundError goes to the caller
    if stat.S_ISDIR(mode) or stat.S_ISREG(mode):
        return
    kind = ("a named pipe (FIFO)" if stat.S_ISFIFO(mode) else "a device" if stat.S_ISCHR(mode) or stat.S_ISBLK(mode)
            else "a socket" if stat.S_ISSOCK(mode) else "not a regular file")
    raise SiteError(file, "", f"is {kind}; expected a TOML site file")


SECTIONS = ("station", "array", "band", "goal")
"""The tables a site file needs for every verb; a verb may need fewer."""


def load(path: str | Path, sections: tuple[str, ...] = SECTIONS) -> Site:
    """Read and validate a site file.

    ``sections`` are the tables the caller needs; ``paths`` needs only
    [station] and [[goal]], ``needs`` also [[band]]. A section given is
    always checked, needed or not.
    """
    p = Path(path)
    file = str(path)
    try:
        _check_regular_file(p, file)
        with p.open("rb") as fh:
            raw = fh.read(MAX_SITE_BYTES + 1)
        if len(raw) > MAX_SITE_BYTES:
            raise SiteError(file, "", f"is larger than {MAX_SITE_BYTES // 1000} kB; a site file is a short "
                            "TOML text (put large regions in a file: region)")
    except FileNotFoundError:
        raise SiteError(file, "", "no such file") from None
    except IsADirectoryError:
        raise SiteError(file, "", "is a folder, expected a TOML site file") from None
    except OSError as exc:
        raise SiteError(file, "", f"cannot be read ({exc.strerror or exc})") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise SiteError(file, "", "is not UTF-8 text; expected a TOML site file") from None
    return loads(text, file=file, base_dir=str(p.resolve().parent), sections=sections)


_TOP = ("station", "array", "feed", "band", "goal", "propagation", "map")
_STATION = ("name", "locator", "lat", "lon")
_ARRAY = ("height_m", "radius_m", "layout", "spacing_m", "elements", "positions_m", "orientation_deg",
          "orientation_step_deg", "allowed_orientation_deg", "ground", "ground_loss_ohm", "state", "option",
          "use", "rdf_elevation_deg", "radials", "foreground", "design_band", "forced_bands", "junction_m",
          "line_slack_m")
_RADIALS = ("count", "length_m", "depth_m", "height_m", "wire_diameter_mm")
_FOREGROUND = ("bearing_deg", "from_m", "ground")
_OPTION = ("name", "layout", "spacing_m", "elements", "positions_m", "state", "use", "design_band", "forced_bands",
           "junction_m")
_STATE = ("name", "phase_deg", "amplitude", "line_m", "design_band", "forced_bands")
_NETWORK_KEYS = ("design_band", "forced_bands")
_FEED = ("z0_ohm", "velocity_factor", "loss_db_per_100m_at_10mhz")
_BAND = ("name", "freq_mhz", "edges_mhz")
_GOAL = ("name", "region", "weight", "bands", "path", "clip", "avoid", "avoid_weight")
_PROP = ("model", "month", "year", "solar_flux", "sunspot_number", "hours_utc", "min_elevation_deg",
         "points_per_goal", "f2_height_km", "e_height_km", "seed", "absorption_limit_db", "fof2_maps", "extra_hop_loss_db",
         "months", "closed_share")
_MAP = ("lobe_peak_km", "lobe_floor_db", "ring_step_km")


def loads(text: str, file: str = "<site>", base_dir: str = ".",
          sections: tuple[str, ...] = SECTIONS) -> Site:
    """Validate a site file given as text (``file`` names it in messages)."""
    text = text.removeprefix("\ufeff")  # a byte-order mark some editors write
    if "\x00" in text:
        raise SiteError(file, "", "holds binary data; expected a TOML site file")
    if not text.strip():
        raise SiteError(file, "", "is empty; expected a TOML site file with [station], [array], "
                        "[[band]] and [[goal]]")
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise SiteError(file, "", f"TOML syntax error: {exc}") from None
    except RecursionError:
        raise SiteError(file, "", "arrays or tables are nested too deeply to read; a site file nests "
                        "at most a few levels") from None
    except ValueError as exc:  # e.g. an integer of more than 4300 digits
        raise SiteError(file, "", f"cannot be read: {str(exc).split(':')[0]}; expected numbers of "
                        "ordinary size") from None
    r = _Reader(file)
    r.table(doc, "", _TOP)
    needed = [s for s in ("station", "array", "band", "goal") if s in sections]
    for section in needed:
        if section not in doc:
            raise r.fail(section, "missing; a site file needs " + _and(
                [f"[[{s}]]" if s in ("band", "goal") else f"[{s}]" for s in needed]))
    station = _station(r, doc["station"])
    if "array" in doc:
        array, orientation = _array(r, doc["array"], doc.get("feed", {}))
    else:  # only for verbs that do not use it (paths, needs)
        array, orientation = None, Orientation(None, 1.0, ())
    bands = _bands(r, doc["band"]) if "band" in doc else ()
    _check_band_files(r, bands)
    if array is not None and "band" in doc:
        _check_receive_only(r, array, doc["band"])
    if array is not None and bands:
        array = _resolve_networks(r, doc["array"], array, bands)
    goals = _goals(r, doc["goal"], bands)
    if array is not None:
        _check_height(r, array, bands)
        _check_radials(r, array, bands)
    prop = _propagation(r, doc.get("propagation", {}))
    map_settings = _map(r, doc.get("map", {}))
    return Site(file, base_dir, station, array, orientation, bands, goals, prop, map_settings)


# The moment method is checked from 0.1 to 0.75 wavelength (issue 3) and
# converges to 1.2; above this it is not used.
MAX_HEIGHT_WAVELENGTHS = 1.25


def _check_height(r: _Reader, array: ArraySpec, bands: tuple[Band, ...]) -> None:
    for i, b in enumerate(bands):
        h = array.height_m * b.freq_hz / 299_792_458.0
        if h > MAX_HEIGHT_WAVELENGTHS:
            raise r.fail("array.height_m", f"{array.height_m:g} m is {h:.2f} wavelength on band "
                         f"{b.name!r} ({b.freq_mhz:g} MHz); the element model holds up to "
                         f"{MAX_HEIGHT_WAVELENGTHS:g} wavelength")


# elevated radials are wires in the moment method, checked up to this length
MAX_ELEVATED_WAVELENGTHS = 1.0


def _check_radials(r: _Reader, array: ArraySpec, bands: tuple[Band, ...]) -> None:
    rad = array.radials
    if rad is None or rad.buried:
        return
    for b in bands:
        x = rad.length_m * b.freq_hz / 299_792_458.0
        if x > MAX_ELEVATED_WAVELENGTHS:
            raise r.fail("array.radials.length_m", f"{rad.length_m:g} m is {x:.2f} wavelength on band {b.name!r}; "
                         f"elevated radials are modelled up to {MAX_ELEVATED_WAVELENGTHS:g} wavelength")
    from .antenna.elevated import SEGMENT_LIMIT, segment_count

    for b in bands:
        for o in array.options:
            n = segment_count(array.height_m, rad.count, rad.length_m, o.positions_m, b.freq_hz, 20.0)
            if n > SEGMENT_LIMIT:
                raise r.fail("array.radials.count", f"{rad.count} elevated radials of {rad.length_m:g} m on each "
                             f"of the {o.n_elements} elements of option {o.name!r} make {n} wire segments on band "
                             f"{b.name!r}, more than the {SEGMENT_LIMIT} the moment method solves here; expected "
                             "fewer or shorter radials")
    if rad.wire_diameter_mm * 1e-3 * 10.0 >= rad.length_m:
        raise r.fail("array.radials.wire_diameter_mm", f"{rad.wire_diameter_mm:g} mm is too fat for "
                     f"{rad.length_m:g} m radials; expected a thin wire")


def _check_receive_only(r: _Reader, array: ArraySpec, band_tables: Any) -> None:
    """Refuse transmit-only keys when no option transmits (issue 14).

    Band edges serve only the SWR of the transmit match; a receive option
    gets no match, so on a site whose options all receive they would be
    silently ignored.
    """
    if not all(o.receive for o in array.options):
        return
    for i, t in enumerate(r.tables(band_tables, "band")):
        if "edges_mhz" in t:
            raise r.fail(f"band[{i + 1}].edges_mhz", "band edges serve only the SWR of a transmit match, and "
                         "every option of this site has use = \"receive\"; drop edges_mhz or add a "
                         "transmit option")


def height_caveats(site: "Site") -> tuple[str, ...]:
    """Plain sentences for bands where the element model is least sure."""
    out = []
    for b in site.bands:
        h = site.array.height_m * b.freq_hz / 299_792_458.0
        if 0.42 <= h <= 0.58 or 0.92 <= h <= 1.08:
            out.append(f"On {b.name} the elements are {h:.2f} wavelength tall, near an anti-resonance: the base "
                       "impedance (and so the currents of fed states, the line design and the match) is uncertain "
                       "by tens of percent; forced-current patterns are not affected as much.")
        elif h < 0.1 and all(o.receive for o in site.array.options):
            continue  # short receiving elements: directivity does not hang on their impedance
        elif h > 0.75 or h < 0.1:
            out.append(f"On {b.name} the elements are {h:.2f} wavelength tall, outside the 0.1-0.75 wavelength "
                       "range the element model is checked over.")
    return tuple(out)


def _band_ref(r: _Reader, v: Any, key: str, band_names: tuple[str, ...]) -> str:
    if not isinstance(v, str) or v not in band_names:
        close = difflib.get_close_matches(v, band_names, n=1, cutoff=0.5) if isinstance(v, str) else []
        hint = f" (did you mean {close[0]!r}?)" if close else ""
        raise r.fail(key, f"{_show(v)} is not a band of this site{hint}; the bands are "
                     + ", ".join(repr(n) for n in band_names))
    return v


def _network_keys(r: _Reader, t: dict, key: str, band_names: tuple[str, ...], inherited: dict) -> dict:
    """design_band and forced_bands of one level (array, option, state), over the inherited ones."""
    out = dict(inherited)
    if "design_band" in t:
        out["design_band"] = _band_ref(r, t["design_band"], _join(key, "design_band"), band_names)
    if "forced_bands" in t:
        v = t["forced_bands"]
        k = _join(key, "forced_bands")
        if isinstance(v, str):
            v = [v]
        if not isinstance(v, list):
            raise r.fail(k, f"{_show(v)} is not a list of band names")
        out["forced_bands"] = tuple(dict.fromkeys(_band_ref(r, b, f"{k}[{j + 1}]", band_names)
                                                  for j, b in enumerate(v)))
    return out


def default_design_band(height_m: float, bands) -> "Band":
    """The band on which the elements are nearest a quarter wave tall."""
    return min(bands, key=lambda b: abs(height_m * b.freq_hz / 299_792_458.0 - 0.25))


def _resolve_networks(r: _Reader, t: dict, array: ArraySpec, bands: tuple[Band, ...]) -> ArraySpec:
    """Put design and forced bands (in Hz) on every forced state; check that
    fed lines reach their elements from the junction."""
    from dataclasses import replace

    names = tuple(b.name for b in bands)
    freq = {b.name: b.freq_hz for b in bands}
    top = _network_keys(r, t, "array", names, {"design_band": default_design_band(array.height_m, bands).name,
                                                "forced_bands": ()})
    blocks = r.tables(t["option"], "array.option") if "option" in t else None
    options = []
    for oi, option in enumerate(array.options):
        if blocks is not None:
            ot, okey = blocks[oi], f"array.option[{oi + 1}]"
        else:
            ot, okey = {}, "array"
        level = _network_keys(r, ot, okey, names, top)
        raw_states = ot.get("state", t.get("state", [])) if blocks is not None else t.get("state", [])
        raw_states = raw_states if isinstance(raw_states, list) else [raw_states]
        skey = _join(okey if blocks is not None else "array", "state")
        states = []
        for si, state in enumerate(option.states):
            st = raw_states[si] if si < len(raw_states) else {}
            k = f"{skey}[{si + 1}]"
            if state.is_fed:
                for name in _NETWORK_KEYS:
                    if name in st:
                        raise r.fail(_join(k, name), "does not apply to a line_m state (its lines are the "
                                     "network); give it to phase_deg states")
                _check_reach(r, option, state, k)
                states.append(state)
                continue
            own = _network_keys(r, st, k, names, level)   # checked for one vertical too
            if option.n_elements == 1:   # no network: its base current is the state
                states.append(state)
                continue
            states.append(replace(state, design_band=own["design_band"],
                                  design_freq_hz=freq[own["design_band"]],
                                  forced_freqs_hz=tuple(freq[b] for b in own["forced_bands"])))
        options.append(replace(option, states=tuple(states)))
    return replace(array, options=tuple(options))


def _check_reach(r: _Reader, option: ArrayOption, state: State, key: str) -> None:
    jx, jy = option.junction_point_m
    for i, ((x, y), length) in enumerate(zip(option.positions_m, state.line_m)):
        run = math.hypot(x - jx, y - jy)
        if length < run - 1e-9:
            raise r.fail(f"{key}.line_m[{i + 1}]", f"{length:g} m cannot reach element {i + 1}, which stands "
                         f"{run:.2f} m from the junction; expected at least {run:.2f} m (or move junction_m)")


def _junction(r: _Reader, t: dict, key: str) -> tuple[float, float] | None:
    if "junction_m" not in t:
        return None
    x, y = r.number_list(t, "junction_m", key, length=2, why="[along, across] in metres", lo=-1000.0, hi=1000.0,
                         what="metres from element 1, -1000 to 1000")
    return (x, y)


SHORT_WAVELENGTHS = 0.15   # under this an element is "short": a base coil is the usual remedy


def element_caveats(site: "Site") -> tuple[str, ...]:
    """Short elements: the base-loading coil that resonates one, and its loss at a stated Q."""
    from .antenna.feed import COIL_Q, loading_coil
    from .antenna.pattern import element_impedance_ohm
    from .antenna.radials import ground_loss

    out = []
    a = site.array
    if a is None or all(o.receive for o in a.options):
        return ()  # receive elements may be short: they need no coil and no match
    for b in site.bands:
        h = a.height_m * b.freq_hz / 299_792_458.0
        if h >= SHORT_WAVELENGTHS:
            continue
        z = element_impedance_ohm(a, b.freq_hz)
        base_loss = float(ground_loss(a, a.options[0], b.freq_hz).ohm[0])
        coil = loading_coil(z, base_loss, b.freq_hz)
        text = (f"On {b.name} the elements are {h:.2f} wavelength tall (short): each base is about "
                f"{z.real:.1f}{z.imag:+.0f}j ohm")
        if coil is not None:
            text += (f"; a base coil of {coil.inductance_uh:.1f} uH resonates it, and at a coil Q of {COIL_Q:g} "
                     f"it adds {coil.loss_ohm:.1f} ohm, so with the {base_loss:.2g} ohm ground loss only "
                     f"{100 * coil.efficiency:.0f} % of the power is radiated (before ground losses in the far "
                     "field). A match straight to the bare base would need extreme parts.")
        out.append(text)
    return tuple(out)


def radial_caveats(site: "Site") -> tuple[str, ...]:
    """Elevated radials lower than the soil's image depth on some band: the wire model's limit."""
    import math

    from .antenna.ground import complex_permittivity

    a = site.array
    if a is None or a.radials is None or a.radials.buried or a.ground.perfect:
        return ()
    low = []
    for b in site.bands:
        e = complex_permittivity(a.ground, b.freq_hz)
        depth = abs(1.0 / (2j * math.pi * b.freq_hz / 299_792_458.0 * (e - 1.0 + 0j) ** 0.5))
        if a.radials.height_m < depth:
            low.append(f"{b.name} ({depth:.2g} m)")
    if not low:
        return ()
    return (f"The elevated radials ({a.radials.height_m:g} m up) are lower than the depth of the soil's complex "
            f"image (|1/gamma|, gamma its propagation constant) on "
            f"{', '.join(low)}: there the soil shares their return current through the capacitance between "
            "them, which the wire model (the soil seen only by its reflection) leaves out, so their loss is "
            "less certain; radials lying on the ground are better given as buried (depth_m).",)


def _names(items) -> str:
    items = list(items)
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def mesh_caveats(site: "Site") -> tuple[str, ...]:
    """Bands where the element mesh could not converge Z11 to 1 % by doubling."""
    from .antenna.mom import MESH_TOLERANCE, converged_mesh

    out = []
    a = site.array
    if a is not None and a.radials is not None and not a.radials.buried:
        from .antenna.elevated import SEGMENT_BUDGET, array_mesh, elevated_mesh

        r = a.radials
        wire = 0.5e-3 * r.wire_diameter_mm
        moving = []
        for b in site.bands:
            e = elevated_mesh(a.height_m, a.radius_m, r.height_m, r.count, r.length_m, wire, b.freq_hz, a.ground)
            for o in a.options:
                pw = array_mesh(a.height_m, a.radius_m, r.height_m, r.count, r.length_m, wire, o.positions_m,
                                b.freq_hz, a.ground)
                if pw < e.per_wavelength:
                    out.append(f"On {b.name} the wires of option {o.name!r} are meshed at {pw:g} segments per "
                               f"wavelength, coarser than one element's {e.per_wavelength:g}, to keep the solution "
                               f"within {SEGMENT_BUDGET} segments: its base impedances, and so the as-built "
                               "currents and the match, are less certain.")
            if not e.converged:
                moving.append((b.name, e))
        if moving:
            out.append(f"On {_names(n for n, _ in moving)} the base impedance of an element on its elevated radials "
                       f"still moves {_names(f'{100 * e.change:.1f} %' for _, e in moving)} per doubling of the "
                       f"segments at the finest mesh used ({moving[0][1].per_wavelength:g} per wavelength; wanted "
                       f"under {100 * MESH_TOLERANCE:g} %): the feed gap's capacitance matters here, so the real "
                       "base insulator's few pF shift the match and the as-built currents.")
        return tuple(out)
    for b in site.bands:
        m = converged_mesh(site.array.height_m, site.array.radius_m, b.freq_hz)
        if not m.converged:
            out.append(f"On {b.name} the base impedance still moves {100 * m.change:.1f} % per doubling of the "
                       f"segments at the finest mesh the thin-wire model allows ({m.n_node} segments, four radii "
                       f"each; wanted under {100 * MESH_TOLERANCE:g} %): the feed gap's capacitance matters here, "
                       "so the real base insulator's few pF shift the match and the as-built currents.")
    return tuple(out)


def _station(r: _Reader, t: Any) -> Station:
    t = r.table(t, "station", _STATION)
    name = r.string(t, "name", "station", default="station")
    has_loc = "locator" in t
    has_ll = "lat" in t or "lon" in t
    if has_loc and has_ll:
        raise r.fail("station", "give either locator or lat/lon, not both")
    if has_loc:
        loc = r.string(t, "locator", "station")
        try:
            lat, lon = _locator.locator_to_latlon(loc)
        except ValueError:
            raise r.fail("station.locator", f"{loc!r} is not a Maidenhead locator; {_locator_problem(loc)}"
                         ) from None
        return Station(name, lat, lon, loc[:4].upper() + loc[4:6].lower() + loc[6:])
    if not has_ll:
        raise r.fail("station", "no position; give locator = \"AB12cd\" or lat and lon in degrees")
    lat = r.number(t, "lat", "station", lo=-90.0, hi=90.0, lo_open=True, hi_open=True,
                   what="a latitude in degrees between -90 and 90 (at a pole bearings are undefined)")
    lon = r.number(t, "lon", "station", lo=-180.0, hi=180.0, what="a longitude in degrees, -180 to 180")
    return Station(name, lat, lon, _locator.latlon_to_locator(lat, lon, 6))


_LOCATOR_PAIRS = (("A", "R", "letters A to R"), ("0", "9", "digits 0 to 9"), ("A", "X", "letters A to X"),
                  ("0", "9", "digits 0 to 9"))


def _locator_problem(loc: str) -> str:
    """What is wrong with a locator: its length, or the first bad character."""
    text = loc.strip().upper()
    if len(text) not in (2, 4, 6, 8):
        return f"it has {len(text)} characters; expected 2, 4, 6 or 8 such as 'IN93' or 'IN93nk'"
    for i, c in enumerate(text):
        lo, hi, what = _LOCATOR_PAIRS[i // 2]
        if not lo <= c <= hi:
            return (f"character {i + 1} ({loc.strip()[i]!r}) must be one of the {what} "
                    "(pairs: field A-R, square 0-9, subsquare A-X, extended 0-9)")
    return "expected 2, 4, 6 or 8 characters such as 'IN93' or 'IN93nk'"


def _ground(r: _Reader, v: Any, key: str = "array.ground") -> Ground:
    if isinstance(v, str):
        if v not in GROUND_CLASSES:
            names = tuple(GROUND_CLASSES)
            close = difflib.get_close_matches(v, names, n=1, cutoff=0.5)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise r.fail(key, f"unknown ground class {v!r}{hint}; expected one of {', '.join(names)} "
                         "or {eps_r = ..., sigma_s_m = ...}")
        return GROUND_CLASSES[v]
    t = r.table(v, key, ("eps_r", "sigma_s_m"))
    eps = r.number(t, "eps_r", key, lo=1.0, hi=100.0, what="a relative permittivity from 1 to 100")
    sig = r.number(t, "sigma_s_m", key, lo=0.0, hi=10.0, what="a conductivity in S/m from 0 to 10")
    if eps == 1.0 and sig == 0.0:
        # the Fresnel coefficient is 0/0 at grazing incidence: no ground at all
        raise r.fail(key, "{eps_r = 1, sigma_s_m = 0} is empty space, not a ground; expected eps_r above 1 "
                     "or sigma_s_m above 0 (dry sand is about eps_r = 3, ITU-R P.527)")
    return Ground(f"eps_r {eps:g}, {sig:g} S/m", eps, sig)


_LAYOUT_KEYS = {"single": (), "pair": ("spacing_m",), "square": ("spacing_m",),
                "line": ("spacing_m", "elements"), "custom": ("positions_m",)}


def _positions(r: _Reader, t: dict, key: str, layout: str, spacing: float | None, radius: float) -> tuple:
    pts = _layout_points(r, t, key, layout, spacing)
    # thin-wire model: elements must stand many radii apart (10 radii, a
    # common rule for the thin-wire kernel)
    for i in range(len(pts)):
        for j in range(i):
            if math.dist(pts[i], pts[j]) < 10.0 * radius:
                name = "positions_m" if layout == "custom" else "spacing_m"
                raise r.fail(_join(key, name), f"elements {j + 1} and {i + 1} stand "
                             f"{math.dist(pts[i], pts[j]):.3g} m apart; the thin-wire model needs at least "
                             f"10 element radii ({10 * radius:.3g} m)")
    return pts


def _layout_points(r: _Reader, t: dict, key: str, layout: str, spacing: float | None) -> tuple:
    for name in ("spacing_m", "elements", "positions_m"):
        if name in t and name not in _LAYOUT_KEYS[layout]:
            raise r.fail(_join(key, name), f"does not apply to the {layout} layout; "
                         + (f"it takes {', '.join(_LAYOUT_KEYS[layout])}" if _LAYOUT_KEYS[layout]
                            else "it has one element and no spacing"))
    if layout == "custom":
        k = _join(key, "positions_m")
        if "positions_m" not in t:
            raise r.fail(k, "missing; a custom layout needs positions_m = [[along, across], ...] in metres")
        v = t["positions_m"]
        if not isinstance(v, list) or len(v) < 1:
            raise r.fail(k, f"{_show(v)} is not a list of [along, across] pairs")
        r.at_most(v, k)
        pts = []
        for i, p in enumerate(v):
            if not isinstance(p, list) or len(p) != 2:
                raise r.fail(f"{k}[{i + 1}]", f"{_show(p)} is not an [along, across] pair in metres")
            pts.append(tuple(r.check_number(x, f"{k}[{i + 1}]", lo=-1000.0, hi=1000.0) for x in p))
        return layout_positions_m("custom", custom_m=pts)
    n = None
    if layout == "line":
        n = r.number(t, "elements", key, lo=2, hi=16, integer=True,
                     what="a whole number of elements from 2 to 16")
    return layout_positions_m(layout, spacing, n)


def _states(r: _Reader, v: Any, key: str, n: int, layout: str) -> tuple[State, ...]:
    why = f"one per element of the {layout} layout"
    states = []
    names = set()
    for i, t in enumerate(r.tables(v, key)):
        k = f"{key}[{i + 1}]"
        r.table(t, k, _STATE)
        name = r.string(t, "name", k, default=f"state {i + 1}")
        if name in names:
            raise r.fail(_join(k, "name"), f"{name!r} is used twice; state names must differ")
        names.add(name)
        has_phase = "phase_deg" in t or "amplitude" in t
        if has_phase == ("line_m" in t):
            raise r.fail(k, "give either phase_deg (with optional amplitude) or line_m, exactly one")
        if "line_m" in t:
            lines = r.number_list(t, "line_m", k, length=n, why=why, lo=0.0, hi=1000.0,
                                  what="a line length in metres from 0 to 1000")
            states.append(State(name, line_m=lines))
            continue
        phase = r.number_list(t, "phase_deg", k, default=tuple(0.0 for _ in range(n)), length=n, why=why,
                              lo=-720.0, hi=720.0, what="a phase in degrees from -720 to 720")
        amp = r.number_list(t, "amplitude", k, default=tuple(1.0 for _ in range(n)), length=n, why=why,
                            lo=0.0, hi=100.0, what="a relative amplitude from 0 to 100")
        if not any(a > 0 for a in amp):
            raise r.fail(_join(k, "amplitude"), "all amplitudes are zero; at least one element must be driven")
        weak = [i for i, a in enumerate(amp) if a < _MIN_AMPLITUDE_RATIO * max(amp)]
        if weak:
            raise r.fail(_join(k, f"amplitude[{weak[0] + 1}]"), f"{amp[weak[0]]:g} leaves element {weak[0] + 1} "
                         "undriven: a forced base current of zero is an open base, which has no feed-point "
                         f"impedance; expected every amplitude at least {_MIN_AMPLITUDE_RATIO:g} of the largest "
                         "(leave the element out of the layout instead)")
        states.append(State(name, phase_deg=phase, amplitude=amp))
    if not states:
        raise r.fail(key, "no states; give at least one [[array.state]] switch position")
    return tuple(states)


# 60 dB under the strongest element: weaker is no longer a driven element
# but an open base, and its feed-point impedance V/I blows up
_MIN_AMPLITUDE_RATIO = 1e-3


def _spacings(r: _Reader, t: dict, key: str) -> tuple[float, ...]:
    k = _join(key, "spacing_m")
    if "spacing_m" not in t:
        raise r.fail(k, "missing; expected a spacing in metres or a list of options")
    v = t["spacing_m"]
    values = v if isinstance(v, list) else [v]
    if not values:
        raise r.fail(k, "is an empty list; expected a spacing in metres or a list of options")
    return tuple(r.check_number(x, k if not isinstance(v, list) else f"{k}[{i + 1}]", lo=0.0, hi=1000.0,
                                lo_open=True, what="a spacing in metres, more than 0 and up to 1000")
                 for i, x in enumerate(values))


def _option_name(layout: str, spacing: float | None, n: int) -> str:
    if spacing is None:
        return layout if layout == "single" else f"{layout} ({n} elements)"
    return f"{layout} {spacing:g} m"


def _array(r: _Reader, t: Any, feed_t: Any) -> tuple[ArraySpec, Orientation]:
    key = "array"
    t = r.table(t, key, _ARRAY)
    height = r.number(t, "height_m", key, lo=0.0, hi=100.0, lo_open=True,
                      what="an element height in metres, more than 0 and up to 100")
    radius = r.number(t, "radius_m", key, default=0.02, lo=0.0, hi=0.5, lo_open=True,
                      what="an element radius in metres, more than 0 and up to 0.5")
    if radius * 20 >= height:
        raise r.fail("array.radius_m", f"{radius:g} m is too fat for a {height:g} m element; "
                     "expected radius_m under a twentieth of height_m")
    ground = _ground(r, t.get("ground", "average"))
    # an explicit ground_loss_ohm overrides the radials; None: computed from them (or the default)
    loss = r.number(t, "ground_loss_ohm", key, default=None, lo=0.0, hi=1000.0,
                    what="a series ground-loss resistance in ohm, 0 to 1000")
    radials = _radials(r, t["radials"]) if "radials" in t else None
    foreground = _foreground(r, t["foreground"]) if "foreground" in t else ()
    options: list[ArrayOption] = []
    if "option" in t:
        for name in ("layout", "spacing_m", "elements", "positions_m", "state", "use"):
            if name in t:
                raise r.fail(_join(key, name), "give it inside each [[array.option]] block, "
                             "not beside them")
        if not r.tables(t["option"], "array.option"):
            raise r.fail("array.option", "is an empty list; expected at least one [[array.option]] block "
                         "with layout, spacing_m and states")
        for i, ot in enumerate(r.tables(t["option"], "array.option")):
            k = f"array.option[{i + 1}]"
            r.table(ot, k, _OPTION)
            layout = r.string(ot, "layout", k, default="pair", choices=LAYOUTS)
            spacing = None if layout in ("single", "custom") else _spacings(r, ot, k)
            if spacing is not None and len(spacing) != 1:
                raise r.fail(_join(k, "spacing_m"), "one spacing per option block; expected a number")
            sp = spacing[0] if spacing else None
            pos = _positions(r, ot, k, layout, sp, radius)
            states = _option_states(r, ot, k, len(pos), layout)
            name = r.string(ot, "name", k, default=_option_name(layout, sp, len(pos)))
            use = r.string(ot, "use", k, default="transmit", choices=USES)
            junction = _junction(r, ot, k) or _junction(r, t, key)
            options.append(ArrayOption(name, layout, sp, pos, states, use, junction_m=junction))
    else:
        layout = r.string(t, "layout", key, default="pair", choices=LAYOUTS)
        spacings: tuple[float | None, ...] = (None,) if layout in ("single", "custom") else _spacings(r, t, key)
        use = r.string(t, "use", key, default="transmit", choices=USES)
        for sp in spacings:
            pos = _positions(r, t, key, layout, sp, radius)
            states = _option_states(r, t, key, len(pos), layout)
            options.append(ArrayOption(_option_name(layout, sp, len(pos)), layout, sp, pos, states, use,
                                       junction_m=_junction(r, t, key)))
    names = [o.name for o in options]
    if len(set(names)) != len(names):
        raise r.fail("array.option", "two options share a name; option names must differ")
    feed = _feed(r, feed_t)
    orientation = _orientation(r, t)
    rdf_el = r.number(t, "rdf_elevation_deg", key, default=20.0, lo=1.0, hi=89.0,
                      what="a takeoff angle from 1 to 89 deg for the receiving directivity factor")
    slack = r.number(t, "line_slack_m", key, default=1.0, lo=0.0, hi=100.0,
                     what="a slack in metres, 0 to 100, added to every designed line's run")
    return ArraySpec(height, radius, ground, loss, feed, tuple(options), rdf_el, radials=radials,
                     foreground=foreground, line_slack_m=slack), orientation


def _radials(r: _Reader, t: Any) -> Radials:
    key = "array.radials"
    t = r.table(t, key, _RADIALS)
    has_depth, has_height = "depth_m" in t, "height_m" in t
    if has_depth and has_height:
        raise r.fail(key, "give either depth_m (buried radials) or height_m (elevated radials), not both")
    if not (has_depth or has_height):
        raise r.fail(key, "give depth_m (buried radials) or height_m (elevated radials)")
    elevated = has_height
    # elevated radials are wires in the moment method: 32 of them is already more than is built
    count = r.number(t, "count", key, lo=2 if elevated else 1, hi=32 if elevated else 1000, integer=True,
                     what=("a whole number of elevated radials from 2 to 32" if elevated
                           else "a whole number of radials from 1 to 1000"))
    length = r.number(t, "length_m", key, lo=0.0, hi=1000.0, lo_open=True,
                      what="a radial length in metres, more than 0 and up to 1000")
    depth = r.number(t, "depth_m", key, default=None, lo=0.0, hi=3.0, lo_open=True,
                     what="a burial depth in metres, more than 0 and up to 3")
    height = r.number(t, "height_m", key, default=None, lo=0.0, hi=20.0, lo_open=True,
                      what="a height above ground in metres, more than 0 and up to 20")
    wire = r.number(t, "wire_diameter_mm", key, default=2.0, lo=0.0, hi=50.0, lo_open=True,
                    what="a wire diameter in mm, more than 0 and up to 50")
    return Radials(count, length, depth, height, wire)


def _foreground(r: _Reader, v: Any) -> tuple[ForegroundSector, ...]:
    out = []
    for i, t in enumerate(r.tables(v, "array.foreground")):
        k = f"array.foreground[{i + 1}]"
        r.table(t, k, _FOREGROUND)
        lo, hi = r.number_list(t, "bearing_deg", k, length=2, why="[from, to], clockwise", lo=0.0, hi=360.0,
                               what="a true bearing from 0 to 360 deg")
        if lo == hi:
            raise r.fail(_join(k, "bearing_deg"), f"[{lo:g}, {hi:g}] is an empty sector; expected "
                         "[from, to] clockwise with from != to ([0, 360] for all round)")
        from_m = r.number(t, "from_m", k, default=0.0, lo=0.0, hi=100000.0,
                          what="a distance from the array's centre in metres, 0 to 100000")
        if "ground" not in t:
            raise r.fail(_join(k, "ground"), "missing; expected a ground class such as \"sea\" or "
                         "{eps_r = ..., sigma_s_m = ...}")
        ground = _ground(r, t["ground"], _join(k, "ground"))
        sector = ForegroundSector(lo, hi, from_m, ground)
        for j, other in enumerate(out):
            if _sectors_overlap(sector, other):
                raise r.fail(_join(k, "bearing_deg"), f"[{lo:g}, {hi:g}] overlaps array.foreground[{j + 1}] "
                             f"[{other.from_deg:g}, {other.to_deg:g}]; expected sectors that do not overlap")
        out.append(sector)
    return tuple(out)


def _sector_span(a: ForegroundSector) -> float:
    span = (a.to_deg - a.from_deg) % 360.0
    return 360.0 if span == 0.0 else span


def _sectors_overlap(a: ForegroundSector, b: ForegroundSector) -> bool:
    """Whether two clockwise bearing ranges share more than an edge."""
    sa, sb = _sector_span(a), _sector_span(b)
    start = (b.from_deg - a.from_deg) % 360.0   # b's start, seen from a's start
    return start < sa or start + sb > 360.0


def _option_states(r: _Reader, t: dict, key: str, n: int, layout: str) -> tuple[State, ...]:
    if "state" not in t:
        if n == 1:
            return (State("single", phase_deg=(0.0,), amplitude=(1.0,)),)
        raise r.fail(_join(key, "state"), "no states; give at least one [[array.state]] switch position "
                     "with phase_deg or line_m")
    return _states(r, t["state"], _join(key, "state"), n, layout)


def _orientation(r: _Reader, t: dict) -> Orientation:
    key = "array"
    v = t.get("orientation_deg", "sweep")
    fixed = None
    if v != "sweep":
        if isinstance(v, str):
            raise r.fail("array.orientation_deg", f"{v!r}: expected a bearing in degrees or \"sweep\"")
        fixed = r.check_number(v, "array.orientation_deg", lo=0.0, hi=360.0, hi_open=True,
                               what="a bearing from 0 to under 360 deg, or \"sweep\"") 
    step = r.number(t, "orientation_step_deg", key, default=1.0, lo=0.1, hi=30.0,
                    what="a step from 0.1 to 30 deg that divides 360")
    if abs(360.0 / step - round(360.0 / step)) > 1e-9:
        raise r.fail("array.orientation_step_deg", f"{step:g} does not divide 360; try 0.5, 1, 2 or 5")
    allowed = []
    k = "array.allowed_orientation_deg"
    if "allowed_orientation_deg" in t:
        v = t["allowed_orientation_deg"]
        if not isinstance(v, list) or not v:
            raise r.fail(k, f"{_show(v)}: expected a list of [from, to] bearing ranges, e.g. [[20, 80]]")
        if all(not isinstance(x, list) for x in v) and len(v) == 2:
            v = [v]
        r.at_most(v, k)
        for i, pair in enumerate(v):
            if not isinstance(pair, list) or len(pair) != 2:
                raise r.fail(f"{k}[{i + 1}]", f"{_show(pair)} is not a [from, to] range of bearings")
            lo, hi = (r.check_number(x, f"{k}[{i + 1}]", lo=0.0, hi=360.0,
                                     what="a bearing from 0 to 360 deg") for x in pair)
            allowed.append((lo, hi))
    if fixed is not None and allowed and not any(_in_range(fixed, a, b) for a, b in allowed):
        raise r.fail("array.orientation_deg", f"{fixed:g} deg lies outside allowed_orientation_deg")
    if fixed is None and allowed:
        grid = [i * step for i in range(int(round(360.0 / step)))]
        if not any(_in_range(t, a, b) for t in grid for a, b in allowed):
            raise r.fail(k, f"{[list(a) for a in allowed]} holds none of the swept bearings (every {step:g} "
                         "deg from 0); expected a range holding at least one, or a finer orientation_step_deg")
    return Orientation(fixed, step, tuple(allowed))


def _in_range(bearing: float, lo: float, hi: float) -> bool:
    span = (hi - lo) % 360.0
    if span == 0.0 and hi != lo:
        return True
    return (bearing - lo) % 360.0 <= span


# No transmission line used for phasing is this slow: solid-polyethylene coax
# is 0.66 and the slowest common dielectrics about 0.5 (common practice,
# from memory); 0.3 leaves room for slow-wave lines while refusing typos
# such as 1e-6, which made every line thousands of wavelengths long.
MIN_VELOCITY_FACTOR = 0.3


def _feed(r: _Reader, t: Any) -> Feed:
    key = "feed"
    t = r.table(t, key, _FEED)
    return Feed(
        z0_ohm=r.number(t, "z0_ohm", key, default=50.0, lo=1.0, hi=1000.0,
                        what="a characteristic impedance in ohm, 1 to 1000"),
        velocity_factor=r.number(t, "velocity_factor", key, default=0.66, lo=MIN_VELOCITY_FACTOR, hi=1.0,
                                 what=f"a velocity factor from {MIN_VELOCITY_FACTOR:g} to 1 (solid-PE coax "
                                 "0.66, foam 0.8, open-wire line 0.95)"),
        loss_db_per_100m_at_10mhz=r.number(t, "loss_db_per_100m_at_10mhz", key, default=1.7, lo=0.0,
                                           hi=100.0, what="a matched loss in dB per 100 m, 0 to 100"),
    )


def _bands(r: _Reader, v: Any) -> tuple[Band, ...]:
    out = []
    for i, t in enumerate(r.tables(v, "band")):
        k = f"band[{i + 1}]"
        r.table(t, k, _BAND)
        f = r.number(t, "freq_mhz", k, lo=FREQ_RANGE_MHZ[0], hi=FREQ_RANGE_MHZ[1],
                     what=f"a frequency in MHz from {FREQ_RANGE_MHZ[0]:g} to {FREQ_RANGE_MHZ[1]:g}")
        name = r.string(t, "name", k, default=f"{f:g} MHz")
        edges = None
        if "edges_mhz" in t:
            lo, hi = r.number_list(t, "edges_mhz", k, length=2, lo=FREQ_RANGE_MHZ[0], hi=FREQ_RANGE_MHZ[1])
            if not lo < f < hi:
                raise r.fail(_join(k, "edges_mhz"), f"[{lo:g}, {hi:g}] must hold freq_mhz {f:g} "
                             "strictly inside; expected [low, high] in MHz")
            edges = (lo * 1e6, hi * 1e6)
        if any(b.name == name for b in out):
            raise r.fail(_join(k, "name"), f"{name!r} is used twice; band names must differ")
        out.append(Band(name, f * 1e6, edges))
    if not out:
        raise r.fail("band", "no bands; give at least one [[band]] with freq_mhz")
    return tuple(out)


def _region_check(r: _Reader, text: Any, key: str) -> str:
    from .geo.regions import RegionError, parse_region

    if not isinstance(text, str):
        raise r.fail(key, f"{_show(text)} is not a region string such as \"continent:Europe\"")
    if len(text) > MAX_TEXT_CHARS:
        raise r.fail(key, f"is {len(text)} characters long; expected at most {MAX_TEXT_CHARS}")
    try:
        parse_region(text)
    except RegionError as exc:
        raise r.fail(key, str(exc)) from None
    return text


def _same_region(a: str, b: str) -> bool:
    """The same region string up to case and spaces (numbers compared as numbers)."""
    def norm(text: str) -> tuple:
        kind, _, arg = text.partition(":")
        parts = [x.strip().lower() for x in arg.split(",")]
        try:
            return kind.strip().lower(), tuple(float(x) for x in parts)
        except ValueError:
            return kind.strip().lower(), tuple(re.sub(r"\s+", " ", x) for x in parts)

    return norm(a) == norm(b)


def _check_band_files(r: _Reader, bands: tuple[Band, ...]) -> None:
    """Two bands whose names give the same file name would overwrite one map."""
    from .render.scene import slug

    seen: dict[str, int] = {}
    for i, b in enumerate(bands):
        s = slug(b.name).lower()  # case-insensitive filesystems fold case
        if s in seen:
            raise r.fail(f"band[{i + 1}].name", f"{b.name!r} and {bands[seen[s]].name!r} give the same file "
                         f"name (map-{slug(b.name)}.png); expected band names that differ in a letter or digit")
        seen[s] = i


def _goals(r: _Reader, v: Any, bands: tuple[Band, ...]) -> tuple[Goal, ...]:
    out = []
    band_names = tuple(b.name for b in bands)
    tables = r.tables(v, "goal")
    if not tables:
        raise r.fail("goal", "no goals; give at least one [[goal]] with a region")
    for i, t in enumerate(tables):
        k = f"goal[{i + 1}]"
        r.table(t, k, _GOAL)
        if "region" not in t:
            raise r.fail(_join(k, "region"), "missing; expected e.g. \"continent:Europe\" or \"country:BRA\"")
        region = _region_check(r, t["region"], _join(k, "region"))
        name = r.string(t, "name", k, default=region)
        weight = r.number(t, "weight", k, default=1.0, lo=0.0, hi=1000.0,
                          what="a goal weight from 0 to 1000")
        goal_bands = None
        if "bands" in t:
            bv = t["bands"]
            if not isinstance(bv, list) or not bv or not all(isinstance(b, str) for b in bv):
                raise r.fail(_join(k, "bands"), f"{_show(bv)} is not a list of band names")
            for j, b in enumerate(bv):
                if b not in band_names:
                    close = difflib.get_close_matches(b, band_names, n=1, cutoff=0.5)
                    hint = f" (did you mean {close[0]!r}?)" if close else ""
                    raise r.fail(f"{k}.bands[{j + 1}]", f"{b!r} is not a band of this site{hint}; "
                                 + (f"the bands are {', '.join(repr(n) for n in band_names)}" if band_names
                                    else "the site file has no [[band]]"))
            goal_bands = tuple(dict.fromkeys(bv))
        path = r.string(t, "path", k, default="short", choices=PATHS)
        clip = None
        if "clip" in t:
            w, s, e, n = r.number_list(t, "clip", k, length=4, lo=-180.0, hi=180.0,
                                       what="degrees; clip = [west, south, east, north]")
            if not (-90.0 <= s < n <= 90.0):
                raise r.fail(_join(k, "clip"), f"south {s:g} and north {n:g} must satisfy "
                             "-90 <= south < north <= 90")
            if w == e:
                raise r.fail(_join(k, "clip"), "west and east are equal; the box is empty")
            clip = (w, s, e, n)
        avoid: tuple[str, ...] = ()
        if "avoid" in t:
            av = t["avoid"]
            if isinstance(av, str):
                av = [av]
            if not isinstance(av, list) or not av:
                raise r.fail(_join(k, "avoid"), f"{_show(av)} is not a list of region strings")
            r.at_most(av, _join(k, "avoid"))
            avoid = tuple(_region_check(r, a, f"{k}.avoid[{j + 1}]") for j, a in enumerate(av))
            for j, a in enumerate(avoid):
                if _same_region(a, region) and "clip" not in t:
                    raise r.fail(f"{k}.avoid[{j + 1}]", f"{a!r} is the goal's own region; a region cannot be "
                                 "served and avoided at once, so every bearing would score the same; expected "
                                 "another region")
        avoid_weight = r.number(t, "avoid_weight", k, default=1.0, lo=0.0, hi=100.0,
                                what="an avoid weight from 0 to 100")
        if any(g.name == name and g.path in (("short", "long") if path == "both" else (path,)) for g in out):
            raise r.fail(_join(k, "name"), f"{name!r} is already a goal on the same path; give each goal "
                         "its own name")
        for p in (("short", "long") if path == "both" else (path,)):
            out.append(Goal(name, region, weight, goal_bands, p, clip, avoid, avoid_weight, k))
    if sum(g.weight for g in out) <= 0.0:
        raise r.fail("goal", "every goal weight is zero; at least one goal needs a weight above 0")
    return tuple(out)


def _propagation(r: _Reader, t: Any) -> PropagationSettings:
    key = "propagation"
    t = r.table(t, key, _PROP)
    model = r.string(t, "model", key, default="geometry", choices=MODELS)
    if "solar_flux" in t and "sunspot_number" in t:
        raise r.fail(key, "give either solar_flux or sunspot_number, not both")
    months = _months(r, t, key)
    flux = _solar(r, t, "solar_flux", key, months, lo=50.0, hi=400.0,
                  what="a 12-month mean F10.7 from 50 to 400 sfu")
    ssn = _solar(r, t, "sunspot_number", key, months, lo=0.0, hi=400.0,
                 what="a 12-month smoothed sunspot number from 0 to 400")
    if model == "climatology" and flux is None and ssn is None:
        raise r.fail(key, "the climatology model needs solar_flux (12-month mean F10.7) or sunspot_number")
    hours = ((0, 24),)
    if "hours_utc" in t:
        hv = t["hours_utc"]
        if isinstance(hv, list) and len(hv) == 2 and all(not isinstance(x, list) for x in hv):
            hv = [hv]
        if not isinstance(hv, list) or not hv:
            raise r.fail("propagation.hours_utc", f"{_show(hv)}: expected [[start, end], ...] in whole UT hours")
        r.at_most(hv, "propagation.hours_utc")
        ranges = []
        for i, pair in enumerate(hv):
            kk = f"propagation.hours_utc[{i + 1}]"
            if not isinstance(pair, list) or len(pair) != 2:
                raise r.fail(kk, f"{_show(pair)} is not a [start, end) pair of UT hours")
            a = r.check_number(pair[0], kk, lo=0, hi=23, integer=True, what="a start hour from 0 to 23 UT")
            b = r.check_number(pair[1], kk, lo=0, hi=24, integer=True, what="an end hour from 0 to 24 UT")
            if a == b:
                raise r.fail(kk, f"[{a}, {b}) is empty; expected start != end (ranges may wrap midnight)")
            ranges.append((a, b))
        hours = tuple(ranges)
    return PropagationSettings(
        model=model,
        month=r.number(t, "month", key, default=1, lo=1, hi=12, integer=True, what="a month from 1 to 12"),
        year=r.number(t, "year", key, default=2026, lo=YEAR_RANGE[0], hi=YEAR_RANGE[1], integer=True,
                      what=f"a year from {YEAR_RANGE[0]} to {YEAR_RANGE[1]} (the climatology's range)"),
        solar_flux=flux,
        sunspot_number=ssn,
        hours_utc=hours,
        min_elevation_deg=r.number(t, "min_elevation_deg", key, default=3.0, lo=0.0, hi=45.0,
                                   what="an elevation from 0 to 45 deg"),
        points_per_goal=r.number(t, "points_per_goal", key, default=500, lo=10, hi=20000, integer=True,
                                 what="a whole number of points from 10 to 20000"),
        f2_height_km=r.number(t, "f2_height_km", key, default=300.0, lo=150.0, hi=600.0,
                              what="a height from 150 to 600 km"),
        e_height_km=r.number(t, "e_height_km", key, default=110.0, lo=80.0, hi=150.0,
                             what="a height from 80 to 150 km"),
        seed=r.number(t, "seed", key, default=1, lo=0, hi=2**31 - 1, integer=True,
                      what="a whole number seed, 0 or more"),
        absorption_limit_db=r.number(t, "absorption_limit_db", key, default=30.0, lo=1.0, hi=200.0,
                                     what="a loss from 1 to 200 dB above which a mode counts as closed"),
        fof2_maps=r.string(t, "fof2_maps", key, default="ccir", choices=("ccir", "ursi")),
        extra_hop_loss_db=r.number(t, "extra_hop_loss_db", key, default=3.0, lo=0.0, hi=20.0,
                                   what="a loss from 0 to 20 dB per ground reflection beyond the fewest"),
        months=months,
        closed_share=r.number(t, "closed_share", key, default=0.05, lo=0.0, hi=1.0, hi_open=True,
                              what="a share from 0 to below 1 of a goal's point-hours under which it "
                                   "counts as closed"),
    )


def _months(r: _Reader, t: dict, key: str) -> tuple[int, ...]:
    """``months``: a list of distinct months 1..12 or "all"; () when absent (``month`` is used)."""
    if "months" not in t:
        return ()
    k = f"{key}.months"
    if "month" in t:
        raise r.fail(k, "give either month (one month) or months (a list), not both")
    v = t["months"]
    if v == "all":
        return tuple(range(1, 13))
    if not isinstance(v, list) or not v:
        raise r.fail(k, f"{_show(v)}: expected a non-empty list of months from 1 to 12, or \"all\"")
    out = tuple(r.check_number(m, f"{k}[{i + 1}]", lo=1, hi=12, integer=True, what="a month from 1 to 12")
                for i, m in enumerate(v))
    seen = set()
    for i, m in enumerate(out):
        if m in seen:
            raise r.fail(f"{k}[{i + 1}]", f"month {m} is listed twice; expected each month once")
        seen.add(m)
    return out


def _solar(r: _Reader, t: dict, name: str, key: str, months: tuple[int, ...], **limits):
    """A solar input: one number, or a list with one value per listed month or twelve."""
    if name not in t or not isinstance(t[name], list):
        return r.number(t, name, key, default=None, **limits)
    k = f"{key}.{name}"
    v = t[name]
    n = len(months) if months else 1
    allowed = sorted({n, 12})
    if len(v) not in allowed:
        text = " or ".join(str(a) for a in allowed)
        raise r.fail(k, f"has {len(v)} values; expected one number, or a list of {text} "
                        f"(one per month of propagation.months{', or one per calendar month' if n != 12 else ''})")
    return tuple(r.check_number(x, f"{k}[{i + 1}]", **limits) for i, x in enumerate(v))


def _map(r: _Reader, t: Any) -> MapSettings:
    key = "map"
    t = r.table(t, key, _MAP)
    return MapSettings(
        lobe_peak_km=r.number(t, "lobe_peak_km", key, default=10000.0, lo=100.0, hi=20000.0,
                              what="a length from 100 to 20000 km"),
        lobe_floor_db=r.number(t, "lobe_floor_db", key, default=20.0, lo=3.0, hi=60.0,
                               what="a floor from 3 to 60 dB below the peak"),
        ring_step_km=r.number(t, "ring_step_km", key, default=2500.0, lo=250.0, hi=10000.0,
                              what="a ring step from 250 to 10000 km"),
    )
