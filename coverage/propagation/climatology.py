"""Monthly-median ionosphere at many points and hours, from PyIRI.

PyIRI (Forsythe et al. 2023) evaluates the CCIR/URSI foF2 and CCIR
M(3000)F2 maps as matrix products, so every point and every hour is one
vectorised evaluation. It is imported only here and only when called:
``import PyIRI`` pulls in matplotlib.pyplot.

We call PyIRI's own building blocks in the order its
``IRI_monthly_mean_par`` does, but keep only foF2, M(3000)F2, hmF2, foE, the
solar zenith angle and the IGRF field. Two pieces are our own: the foF2 and
M(3000)F2 coefficient files are read with one pattern match (PyIRI 0.1.7
parses them record by record into ``dtype=object`` arrays, 0.15 s a month
and matrix products 400 times slower than needed), and the products
themselves go through einsum rather than the BLAS thread pool. The tests
compare the coefficients with PyIRI's reader and the result with a direct
``IRI_monthly_mean_par`` call.

References
----------
V. Forsythe et al. (2023), "PyIRI: Whole-globe approach to the International
Reference Ionosphere modeling implemented in Python", *Space Weather* 22.
D. Bilitza et al. (2022), "The International Reference Ionosphere model: a
review and description of an ionospheric benchmark", *Rev. Geophys.* 60
(hmF2 from M(3000)F2 by the BSE-1979 option: Shimazaki's 1490/M - 176 km
with the Bilitza-Sheikh-Eyfrig correction of the denominator).
ITU-R P.1239, *ITU-R reference ionospheric characteristics* (the CCIR
maps).
"""
from __future__ import annotations

from dataclasses import dataclass
import re
from functools import lru_cache

import numpy as np

__all__ = [
    "SOLAR_FLUX_RANGE_SFU",
    "YEAR_RANGE",
    "SolarInput",
    "Ionosphere",
    "solar_input",
    "ionosphere",
    "ionosphere_months",
    "solar_zenith_deg",
]

# F10.7 of a 12-month smoothed sunspot number of 0 and 150 (the IRI
# conversion F = 63.75 + 0.728 R + 8.9e-4 R^2, as PyIRI.R12_2_F107). The
# CCIR maps are given for R12 = 0 and 100 and are linear in between; IRI
# practice lets foF2 grow no further above R12 about 150 (from memory).
# PyIRI extrapolates without limit, so we clamp to this range.
SOLAR_FLUX_RANGE_SFU = (63.75, 63.75 + 0.728 * 150.0 + 8.9e-4 * 150.0**2)

# PyIRI's magnetic field (IGRF-13, for the modified dip latitude) is tabled
# 1900-2025 with secular variation to 2030.
YEAR_RANGE = (1900, 2030)


@dataclass(frozen=True, slots=True)
class SolarInput:
    """The solar activity used and whether it was clamped.

    Attributes
    ----------
    requested_sfu : float
        The F10.7 asked for (converted from R12 if that was given).
    flux_sfu : float
        The F10.7 used, within ``SOLAR_FLUX_RANGE_SFU``.
    sunspot_number : float
        R12 equivalent of ``flux_sfu`` (for the absorption index).
    clamped : bool
    """

    requested_sfu: float
    flux_sfu: float
    sunspot_number: float
    clamped: bool


@dataclass(frozen=True, slots=True)
class Ionosphere:
    """Monthly-median layer parameters; every array has shape (n_hours, n_points).

    Attributes
    ----------
    hours_utc : ndarray, shape (n_hours,)
        UT of each row (hours, fractional).
    fof2_mhz, hmf2_km, m3000f2, foe_mhz, solar_zenith_deg : ndarray
        F2 critical frequency (MHz), F2 peak height (km), M(3000)F2 factor,
        E critical frequency (MHz), solar zenith angle (deg) on day 15.
    gyrofrequency_mhz : ndarray
        Electron gyrofrequency at 300 km from the IGRF total field,
        fH = e B / (2 pi m_e) (MHz).
    dip_latitude_deg : ndarray
        Magnetic dip latitude, atan(tan(I) / 2) (deg).
    """

    hours_utc: np.ndarray
    fof2_mhz: np.ndarray
    hmf2_km: np.ndarray
    m3000f2: np.ndarray
    foe_mhz: np.ndarray
    solar_zenith_deg: np.ndarray
    gyrofrequency_mhz: np.ndarray
    dip_latitude_deg: np.ndarray


# e / (2 pi m_e) in MHz per nT (CODATA e and m_e: 27.992 GHz/T)
_GYRO_MHZ_PER_NT = 27.992e-6


def _r12_to_f107(r12: float) -> float:
    # IRI conversion (irisub.for), identical to PyIRI.main_library.R12_2_F107
    return 63.75 + 0.728 * r12 + 8.9e-4 * r12 * r12


def _f107_to_r12(f107: float) -> float:
    a, b, c = 8.9e-4, 0.728, 63.75 - f107
    return (-b + np.sqrt(b * b - 4.0 * a * c)) / (2.0 * a)


def solar_input(solar_flux_sfu: float | None = None, sunspot_number: float | None = None) -> SolarInput:
    """The F10.7 to drive the maps with, clamped to ``SOLAR_FLUX_RANGE_SFU``.

    Parameters
    ----------
    solar_flux_sfu : float, optional
        12-month mean F10.7 (sfu).
    sunspot_number : float, optional
        12-month smoothed sunspot number; used when no flux is given.

    Returns
    -------
    SolarInput

    Raises
    ------
    ValueError
        If neither is given.
    """
    if solar_flux_sfu is not None:
        requested = float(solar_flux_sfu)
    elif sunspot_number is not None:
        requested = _r12_to_f107(max(float(sunspot_number), 0.0))
    else:
        raise ValueError("propagation: the climatology model needs solar_flux or sunspot_number")
    lo, hi = SOLAR_FLUX_RANGE_SFU
    used = min(max(requested, lo), hi)
    return SolarInput(requested, used, float(_f107_to_r12(used)), bool(used != requested))


_NUMBER = re.compile(r"[-+]?\d*\.\d+[EeDd][-+]?\d+")


def _read_numbers(path) -> np.ndarray:
    """Every number of a coefficient file in (1X, 4E15.8) records, in order.

    The fields touch when a value is negative, so they are found by their
    pattern rather than split on spaces; PyIRI's own reader parses them one
    record at a time (about 0.15 s a month) and returns object arrays.
    """
    with open(path, encoding="ascii") as f:
        return np.array(_NUMBER.findall(f.read()), dtype=float)


@lru_cache(maxsize=12)
def _coefficients(month: int, fof2_maps: str):
    """The month's foF2 (CCIR or URSI) and M(3000)F2 coefficients, float64, PyIRI's layout."""
    import os

    import PyIRI
    import PyIRI.main_library as ml

    sizes = ml.highest_power_of_extension()
    shape_f = (sizes["nj"]["F0F2"], sizes["nk"]["F0F2"], 2)
    shape_m = (sizes["nj"]["M3000"], sizes["nk"]["M3000"], 2)
    name = f"{month + 10}.asc"   # the files are numbered 11..22
    ccir = _read_numbers(os.path.join(PyIRI.coeff_dir, "CCIR", "ccir" + name))
    n_f = int(np.prod(shape_f))
    m3000 = np.reshape(ccir[n_f:n_f + int(np.prod(shape_m))], shape_m, order="F")
    if fof2_maps == "ursi":
        fof2_src = _read_numbers(os.path.join(PyIRI.coeff_dir, "URSI", "ursi" + name))
    else:
        fof2_src = ccir
    fof2 = np.reshape(fof2_src[:n_f], shape_f, order="F")
    return fof2, m3000


def _maps(diurnal: np.ndarray, coeff: np.ndarray, geographic: np.ndarray) -> np.ndarray:
    """PyIRI's ``gamma`` for one quantity: D @ C[:, :, level] @ G for both solar levels.

    The products are small (24 x 13 x 76 x n points); einsum keeps them
    off the BLAS thread pool, which on a busy two-core machine made PyIRI's
    own matmul ten times slower than a plain loop.
    """
    first = np.einsum("tj,jkl->tkl", diurnal, coeff)
    return np.einsum("tkl,kn->tnl", first, geographic)


def ionosphere(year: int, month: int, hours_utc, lons_deg, lats_deg, solar_flux_sfu: float,
               fof2_maps: str = "ccir") -> Ionosphere:
    """Monthly-median foF2, hmF2, M(3000)F2, foE at all points and hours at once.

    Parameters
    ----------
    year, month : int
        Epoch (the magnetic field and the Sun's position on day 15).
    hours_utc : array_like, shape (n_hours,)
        UT (hours).
    lons_deg, lats_deg : array_like, shape (n_points,)
        Geographic positions (deg).
    solar_flux_sfu : float
        12-month mean F10.7 (sfu), already clamped by :func:`solar_input`.
    fof2_maps : {"ccir", "ursi"}
        Which foF2 coefficient set (the M(3000)F2 maps are CCIR's).

    Returns
    -------
    Ionosphere

    References
    ----------
    Forsythe et al. (2023); Bilitza et al. (2022); ITU-R P.1239.
    """
    return ionosphere_months(year, (month,), hours_utc, lons_deg, lats_deg, (solar_flux_sfu,), fof2_maps)[0]


def ionosphere_months(year: int, months, hours_utc, lons_deg, lats_deg, solar_flux_sfu,
                      fof2_maps: str = "ccir") -> tuple[Ionosphere, ...]:
    """:func:`ionosphere` for several months of one year, each with its own solar input.

    The month-independent parts (the magnetic field, modified dip latitude
    and the maps' geographic and diurnal basis functions) are evaluated
    once, for the first month's date: the field's secular change over a
    year moves the dip by well under a tenth of a degree (common practice).

    Parameters
    ----------
    year : int
    months : sequence of int
    hours_utc, lons_deg, lats_deg : array_like
        As in :func:`ionosphere`.
    solar_flux_sfu : sequence of float
        One F10.7 per month.
    fof2_maps : {"ccir", "ursi"}

    Returns
    -------
    tuple of Ionosphere
        One per month, in order.
    """
    import datetime as dt

    import PyIRI
    import PyIRI.main_library as ml
    from PyIRI import igrf_library as igrf

    if fof2_maps not in ("ccir", "ursi"):
        raise ValueError(f"fof2_maps: expected 'ccir' or 'ursi', not {fof2_maps!r}")
    months = tuple(int(m) for m in months)
    aut = np.atleast_1d(np.asarray(hours_utc, dtype=float))
    alon = np.atleast_1d(np.asarray(lons_deg, dtype=float))
    alat = np.atleast_1d(np.asarray(lats_deg, dtype=float))
    aig = np.array([0.0, 100.0])  # PyIRI's two map levels, IG12 0 and 100

    inc, *_, total_nt = igrf.inclination(PyIRI.coeff_dir, ml.decimal_year(dt.datetime(year, months[0], 15)),
                                         alon, alat, 300.0, only_inc=False)
    modip = igrf.inc2modip(inc, alat)
    d_fof2, d_m3000, _ = ml.diurnal_functions(aut)
    g_fof2, g_m3000, _ = ml.set_gl_G(alon, alat, modip)
    shape = (aut.size, alon.size)
    gyro = np.broadcast_to(_GYRO_MHZ_PER_NT * np.asarray(total_nt, dtype=float), shape)
    dip = np.broadcast_to(np.degrees(np.arctan(0.5 * np.tan(np.radians(inc)))), shape)
    out = []
    for month, flux in zip(months, solar_flux_sfu):
        c_fof2, c_m3000 = _coefficients(month, fof2_maps)
        fof2 = _maps(d_fof2, c_fof2, g_fof2)
        m3000 = _maps(d_m3000, c_m3000, g_m3000)
        foe, solzen, _, _, _ = ml.gammaE(year, month, aut, alon, alat, aig)
        hmf2, _, _ = ml.hm_IRI(m3000, foe, fof2, modip, aig)
        f2 = ml.solar_interpolation_of_dictionary({"fo": fof2, "M3000": m3000, "hm": hmf2}, float(flux))
        e = ml.solar_interpolation_of_dictionary({"fo": foe, "solzen": solzen}, float(flux))
        out.append(Ionosphere(
            hours_utc=aut,
            fof2_mhz=np.clip(f2["fo"], 0.0, None),
            hmf2_km=f2["hm"],
            m3000f2=f2["M3000"],
            foe_mhz=np.clip(e["fo"], 0.0, None),
            solar_zenith_deg=e["solzen"],
            gyrofrequency_mhz=gyro,
            dip_latitude_deg=dip,
        ))
    return tuple(out)


def solar_zenith_deg(year: int, month: int, hours_utc, lons_deg, lats_deg) -> np.ndarray:
    """Solar zenith angle on day 15 of the month, as PyIRI computes it for foE.

    Parameters
    ----------
    year, month : int
    hours_utc : array_like, shape (n_hours,)
    lons_deg, lats_deg : array_like, shape (n_points,)

    Returns
    -------
    ndarray, shape (n_hours, n_points)
        Degrees.

    References
    ----------
    Forsythe et al. (2023) (PyIRI's subsolar point and zenith angle).
    """
    import PyIRI.main_library as ml

    aut = np.atleast_1d(np.asarray(hours_utc, dtype=float))
    alon = np.atleast_1d(np.asarray(lons_deg, dtype=float))
    alat = np.atleast_1d(np.asarray(lats_deg, dtype=float))
    chi, _, _ = ml.solzen_timearray_grid(year, month, 15, aut, alon, alat)
    return np.asarray(chi, dtype=float).reshape(aut.size, alon.size)
