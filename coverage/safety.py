"""RF exposure estimates and the printed cautions.

References
----------
FCC OET Bulletin 65 (1997), far-field power density with ground reflection
S = 0.64 EIRP / (pi R^2) (reflection factor 1.6 on the field); 47 CFR
1.1310 Table 1 limits for controlled and uncontrolled exposure (both from
memory, see the tests).
"""
from __future__ import annotations

__all__ = ["CAUTIONS", "CAUTION_LINE"]

CAUTIONS = (
    "RF exposure: evaluate it for your power, duty cycle and where people can be; "
    "near a vertical the far-field estimate does not hold.",
    "Power lines: keep verticals, radials and guys far enough away that nothing can touch a line "
    "if it falls.",
    "Lightning: bond and ground the array, switch box and feed lines as your electrical code requires.",
    "These are planning estimates from published models; local codes, permits and licensed "
    "practice govern.",
)

CAUTION_LINE = ("Planning estimate only. Mind RF exposure, keep clear of power lines, ground against "
                "lightning; local codes and licensed practice govern.")
