"""RF exposure estimates and the printed cautions.

References
----------
FCC OET Bulletin 65 (edition 97-01), far-field power density over ground,
S = 0.64 EIRP / (pi R^2): the field reflection factor 1.6 squared, 2.56,
over 4 pi R^2 (from memory). 47 CFR 1.1310 Table 1, maximum permissible
exposure (from memory): occupational / controlled 100 mW/cm^2 at
0.3-3 MHz, 900/f^2 at 3-30 MHz, 1.0 at 30-300 MHz; general population /
uncontrolled 100 mW/cm^2 at 0.3-1.34 MHz, 180/f^2 at 1.34-30 MHz, 0.2 at
30-300 MHz (f in MHz).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = ["CAUTIONS", "CAUTION_LINE", "EXPOSURE_NOTES", "mpe_mw_per_cm2", "Exposure", "exposure_distance"]

CAUTIONS = (
    "RF exposure: evaluate it for your power, duty cycle and where people can be; "
    "near a vertical the far-field estimate does not hold.",
    "Power lines: keep verticals, radials and guys far enough away that nothing can touch a line "
    "if it falls.",
    "Radials: the tips of elevated radials carry a high RF voltage, so insulate them and keep them out "
    "of reach; have buried services located before burying radials.",
    "Lightning: bond and ground the array, switch box and feed lines as your electrical code requires.",
    "These are planning estimates from published models; local codes, permits and licensed "
    "practice govern.",
)

CAUTION_LINE = ("Planning estimate only. Mind RF exposure, keep clear of power lines, ground against "
                "lightning; local codes and licensed practice govern.")

EXPOSURE_NOTES = (
    "Far-field estimate: S = 0.64 EIRP / (pi R^2) (FCC OET Bulletin 65) against the 47 CFR 1.1310 "
    "limits (US).",
    "The gain already includes the ground reflection, so the 0.64 factor counts the ground twice: "
    "deliberately conservative.",
    "Near a vertical (closer than about lambda / 2 pi, and in practice within a wavelength or so) the "
    "far-field formula does not hold; evaluate the fields there by measurement or a near-field model.",
    "Other countries apply ICNIRP or their own rules; local regulations and licensed practice govern.",
)

_C_M_PER_S = 299_792_458.0


def mpe_mw_per_cm2(freq_mhz: float, controlled: bool) -> float:
    """Maximum permissible exposure, 47 CFR 1.1310 Table 1 (power density, mW/cm^2)."""
    f = float(freq_mhz)
    if not 0.3 <= f <= 300.0:
        raise ValueError(f"{f:g} MHz is outside the 0.3-300 MHz span of the table used here")
    if controlled:
        if f < 3.0:
            return 100.0
        return 900.0 / f**2 if f <= 30.0 else 1.0
    if f < 1.34:
        return 100.0
    return 180.0 / f**2 if f <= 30.0 else 0.2


@dataclass(frozen=True, slots=True)
class Exposure:
    freq_mhz: float
    peak_gain_dbi: float
    eirp_w: float
    controlled_distance_m: float
    uncontrolled_distance_m: float
    near_field_m: float          # lambda / (2 pi): closer than this the formula fails
    controlled_in_near_field: bool
    uncontrolled_in_near_field: bool


def exposure_distance(power_w: float, duty_cycle: float, peak_gain_dbi: float, freq_mhz: float) -> Exposure:
    """Minimum distances (m) at which the far-field density meets the limits.

    Average power = ``power_w`` x ``duty_cycle``; EIRP = that x 10^(G/10);
    R = sqrt(0.64 EIRP / (pi S_limit)) with S in W/m^2 (1 mW/cm^2 = 10 W/m^2).
    """
    eirp = power_w * duty_cycle * 10.0 ** (peak_gain_dbi / 10.0)

    def distance(controlled: bool) -> float:
        s_w_m2 = mpe_mw_per_cm2(freq_mhz, controlled) * 10.0
        return math.sqrt(0.64 * eirp / (math.pi * s_w_m2))

    near = _C_M_PER_S / (freq_mhz * 1e6) / (2.0 * math.pi)
    rc, ru = distance(True), distance(False)
    return Exposure(freq_mhz, peak_gain_dbi, eirp, rc, ru, near, rc < near, ru < near)
