"""`lobeplan pattern`: azimuth/elevation patterns, front-to-back and gains."""
from __future__ import annotations

import re
from pathlib import Path

import numpy as np

from ..antenna.pattern import GAIN_FLOOR_DBI, array_pattern, pattern_figures
from ..errors import UsageError
from ..grid import AZIMUTH_DEG, ELEVATION_DEG, to_true_bearing
from .widths import width

__all__ = ["add_arguments", "build", "format_text", "write_files",
           "select_bands", "select_states", "to_true_bearing", "current_rows", "pair"]


def add_arguments(parser) -> None:
    parser.add_argument("--band", metavar="B", default=None, help="only this band (its name in the site file)")
    parser.add_argument("--state", metavar="S", default=None, help="only this switch state")


def select_bands(site, name):
    if name is None:
        return site.bands
    chosen = tuple(b for b in site.bands if b.name == name)
    if not chosen:
        raise UsageError(f"--band: no band {name!r}; the site has: "
                         + ", ".join(repr(b.name) for b in site.bands))
    return chosen


def select_states(site, name):
    """(option, state) pairs, filtered by state name."""
    pairs = [(o, s) for o in site.array.options for s in o.states]
    if name is None:
        return pairs
    chosen = [(o, s) for o, s in pairs if s.name == name]
    if not chosen:
        names = list(dict.fromkeys(s.name for _, s in pairs))
        raise UsageError(f"--state: no state {name!r}; the site has: " + ", ".join(repr(n) for n in names))
    return chosen


def pair(z) -> list[float]:
    z = complex(z)
    return [round(z.real, 3), round(z.imag, 3)]


def current_rows(currents) -> list[dict]:
    """Base currents relative to element 1 (amplitude ratio, phase in deg)."""
    i = np.asarray(currents, dtype=complex)
    ref = i[0] if abs(i[0]) > 1e-12 * max(float(np.max(np.abs(i))), 1e-300) else i[np.argmax(np.abs(i))]
    rel = i / ref
    return [{"amplitude": round(float(abs(r)), 4),
             "phase_deg": round(float(np.degrees(np.angle(r))), 2) + 0.0} for r in rel]


def _spacing(option):
    return None if option.layout in ("single", "custom") else option.spacing_m


def _r(x, nd=2):
    return None if x is None else round(float(x), nd)


def build(site, args=None) -> dict:
    band_name = getattr(args, "band", None)
    state_name = getattr(args, "state", None)
    bands = select_bands(site, band_name)
    pairs = select_states(site, state_name)
    orient = site.orientation.fixed_deg
    orient = 0.0 if orient is None else float(orient)
    out = []
    for band in bands:
        for option, state in pairs:
            res = array_pattern(site.array, option, state, band.freq_hz)
            fig = pattern_figures(res.gain_dbi)
            true_gain = np.maximum(to_true_bearing(res.gain_dbi, orient), GAIN_FLOOR_DBI)
            out.append({
                "band": band.name,
                "option": option.name,
                "state": state.name,
                "spacing_m": _spacing(option),
                "orientation_deg": orient,
                "peak_gain_dbi": _r(fig["peak_gain_dbi"]),
                "peak_azimuth_deg": _r((fig["peak_azimuth_deg"] + orient) % 360.0, 1),
                "peak_elevation_deg": _r(fig["peak_elevation_deg"], 1),
                "front_to_back_db": _r(fig["front_to_back_db"]),
                "front_to_rear_db": _r(fig["front_to_rear_db"]),
                "beamwidth_deg": _r(fig["beamwidth_deg"], 1),
                "element_currents": current_rows(res.base_current_a),
                "feedpoint_impedance_ohm": [pair(z) for z in res.feed_impedance_ohm],
                "azimuth_deg": [float(a) for a in AZIMUTH_DEG],
                "elevation_deg": [float(e) for e in ELEVATION_DEG],
                "gain_dbi": np.round(true_gain, 2).tolist(),
                "_option": option.name,  # dropped before output; used for file names
            })
    for row in out:
        row.pop("_option")
    return {"patterns": out}


def _fmt(x, spec="6.1f"):
    return f"{'-':>{spec.split('.')[0]}}" if x is None else format(x, spec)


def format_text(result: dict) -> str:
    wb = width(8, (p["band"] for p in result["patterns"]))
    ws = width(22, (p["state"] for p in result["patterns"]))
    lines = [f"{'band':<{wb}} {'state':<{ws}} {'spacing':>7} {'peak':>6} {'az':>6} {'el':>4} "
             f"{'F/B':>6} {'F/R':>6} {'-3 dB':>6}  currents (rel. element 1)",
             f"{'':<{wb}} {'':<{ws}} {'m':>7} {'dBi':>6} {'deg':>6} {'deg':>4} {'dB':>6} {'dB':>6} {'deg':>6}"]
    for p in result["patterns"]:
        cur = ", ".join(f"{c['amplitude']:.2f}/{c['phase_deg']:+.0f}" for c in p["element_currents"])
        lines.append(f"{p['band']:<{wb}} {p['state']:<{ws}} {_fmt(p['spacing_m'], '7.2f')} "
                     f"{p['peak_gain_dbi']:6.2f} {p['peak_azimuth_deg']:6.1f} {p['peak_elevation_deg']:4.0f} "
                     f"{_fmt(p['front_to_back_db'])} {_fmt(p['front_to_rear_db'])} "
                     f"{_fmt(p['beamwidth_deg'])}  {cur}")
    if result["patterns"]:
        lines.append("")
        lines.append(f"Azimuths are true bearings; the baseline points to "
                     f"{result['patterns'][0]['orientation_deg']:.1f} deg. Gain is referred to the "
                     "power into the feed (ground and line loss included).")
    return "\n".join(lines) + "\n"


def _slug(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9]+", "-", str(text)).strip("-").lower() or "x"


def write_files(site, args, result, out_dir) -> list[Path]:
    from ..render.cuts import draw_cuts

    written = []
    seen = set()
    for p in result["patterns"]:
        sp = "" if p["spacing_m"] is None else f"-{p['spacing_m']:g}m"
        stem = f"pattern-{_slug(p['band'])}{sp}-{_slug(p['state'])}"
        name, n = stem, 2
        while name in seen:
            name, n = f"{stem}-{n}", n + 1
        seen.add(name)
        title = f"{p['band']}, {p['state']}" + ("" if p["spacing_m"] is None else f", {p['spacing_m']:g} m")
        written.append(draw_cuts(np.asarray(p["gain_dbi"]), title, Path(out_dir) / f"{name}.png"))
    return written
