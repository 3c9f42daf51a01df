"""`lobeplan exposure`: far-field RF exposure distances per band, with cautions."""
from __future__ import annotations

import math

from ..antenna.pattern import array_pattern, pattern_figures
from ..errors import UsageError
from ..safety import CAUTIONS, EXPOSURE_NOTES, exposure_distance
from .widths import width

__all__ = ["add_arguments", "check_arguments", "build", "format_text", "peak_gain_by_band"]


def add_arguments(p) -> None:
    p.add_argument("--power-w", type=str, required=True, metavar="P",
                   help="transmitter power at the array in watts (peak envelope)")
    p.add_argument("--duty-cycle", type=str, default="1", metavar="D",
                   help="fraction of the averaging time transmitted, 0 to 1 (default 1)")


def _number(text: str, option: str, lo: float, hi: float, lo_open: bool) -> float:
    try:
        v = float(text)
    except ValueError:
        v = math.nan
    if not math.isfinite(v) or v < lo or v > hi or (lo_open and v == lo):
        side = f"more than {lo:g}" if lo_open else f"at least {lo:g}"
        raise UsageError(f"{option} {text!r}: expected a number {side} and at most {hi:g}")
    return v


def check_arguments(args) -> None:
    args.power_w = _number(args.power_w, "--power-w", 0.0, 1e7, True)
    args.duty_cycle = _number(args.duty_cycle, "--duty-cycle", 0.0, 1.0, True)


def peak_gain_by_band(site) -> dict[str, tuple[float, str, str]]:
    """The highest gain any transmit option and state reaches per band: (dBi, option, state).

    Receive options (``use = "receive"``) radiate nothing and are left out;
    with no transmit option the result is empty.
    """
    out = {}
    transmit = [o for o in site.array.options if not o.receive]
    if not transmit:
        return out
    for band in site.bands:
        best = (-math.inf, "", "")
        for option in transmit:
            for state in option.states:
                g = pattern_figures(array_pattern(site.array, option, state, band.freq_hz).gain_dbi)
                best = max(best, (g["peak_gain_dbi"], option.name, state.name))
        out[band.name] = best
    return out


def build(site, args) -> dict:
    rows = []
    peaks = peak_gain_by_band(site)
    for band in site.bands if peaks else ():
        gain, option, state = peaks[band.name]
        e = exposure_distance(args.power_w, args.duty_cycle, gain, band.freq_mhz)
        rows.append({
            "band": band.name, "freq_mhz": round(band.freq_mhz, 6), "peak_gain_dbi": round(gain, 2),
            "option": option, "state": state, "eirp_w": round(e.eirp_w, 1),
            "controlled_distance_m": round(e.controlled_distance_m, 2),
            "uncontrolled_distance_m": round(e.uncontrolled_distance_m, 2),
            "near_field_m": round(e.near_field_m, 2),
            "controlled_in_near_field": e.controlled_in_near_field,
            "uncontrolled_in_near_field": e.uncontrolled_in_near_field,
        })
    notes = list(EXPOSURE_NOTES)
    if not peaks:
        notes.insert(0, "Every option of this site has use = \"receive\": nothing transmits, so there is no "
                     "exposure to estimate. A transmit antenna elsewhere on the lot needs its own estimate.")
    return {"power_w": args.power_w, "duty_cycle": args.duty_cycle, "exposure": rows,
            "notes": notes, "cautions": list(CAUTIONS)}


def format_text(result: dict) -> str:
    w = width(8, (r["band"] for r in result["exposure"]))
    out = [f"RF exposure, far-field estimate: {result['power_w']:g} W at duty cycle {result['duty_cycle']:g}", "",
           f"  {'band':<{w}} {'MHz':>7} {'peak dBi':>9} {'EIRP W':>9} {'controlled m':>13} {'uncontrolled m':>15}"
           f"  strongest state"]
    for r in result["exposure"]:
        flag_c = "*" if r["controlled_in_near_field"] else " "
        flag_u = "*" if r["uncontrolled_in_near_field"] else " "
        out.append(f"  {r['band']:<{w}} {r['freq_mhz']:7.3f} {r['peak_gain_dbi']:9.2f} {r['eirp_w']:9.0f}"
                   f" {r['controlled_distance_m']:12.1f}{flag_c} {r['uncontrolled_distance_m']:14.1f}{flag_u}"
                   f"  {r['option']}: {r['state']}")
    if any(r["controlled_in_near_field"] or r["uncontrolled_in_near_field"] for r in result["exposure"]):
        out.append("  * closer than lambda / 2 pi: inside the near field, where this formula does not hold")
    out += [""] + [f"  - {n}" for n in result["notes"]]
    out += ["", "Cautions"] + [f"  - {c}" for c in result["cautions"]]
    return "\n".join(out) + "\n"
