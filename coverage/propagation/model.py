"""Input types of the propagation model (validated in ``lobeplan.site``)."""
from __future__ import annotations

from dataclasses import dataclass, replace

__all__ = ["PropagationSettings", "hour_ranges_text"]


@dataclass(frozen=True, slots=True)
class PropagationSettings:
    """How takeoff-angle needs are found.

    ``hours_utc`` holds half-open ranges [start, end) in whole hours that may
    wrap midnight, e.g. ((20, 24), (0, 6)); the default is all day.
    Exactly one of ``solar_flux`` (12-month mean F10.7, sfu) and
    ``sunspot_number`` (12-month smoothed) is used by the climatology model.
    Heights are the fixed reflection heights of the geometry model; the
    climatology model takes hmF2 from the maps instead.

    ``months`` lists the months modelled (empty: just ``month``). The solar
    input may be one value for every month or a tuple: one value per month
    of ``month_list`` or twelve, one per calendar month.
    ``closed_share`` is the open share of a goal's point-hours below which
    maps, panels, the schedule and the switch card list it as closed.
    """

    model: str = "geometry"  # geometry | climatology
    month: int = 1
    year: int = 2026
    solar_flux: float | tuple[float, ...] | None = None
    sunspot_number: float | tuple[float, ...] | None = None
    hours_utc: tuple[tuple[int, int], ...] = ((0, 24),)
    min_elevation_deg: float = 3.0
    points_per_goal: int = 500
    f2_height_km: float = 300.0
    e_height_km: float = 110.0
    seed: int = 1
    # climatology only: a mode below 10 MHz whose daytime absorption estimate
    # exceeds this is closed (a planning margin of our choosing, not a
    # published value); which foF2 coefficient set PyIRI uses
    absorption_limit_db: float = 30.0
    extra_hop_loss_db: float = 3.0  # per ground reflection beyond the fewest (common practice)
    fof2_maps: str = "ccir"  # ccir | ursi
    months: tuple[int, ...] = ()
    closed_share: float = 0.05

    @property
    def month_list(self) -> tuple[int, ...]:
        """The months modelled, in the order given."""
        return tuple(self.months) if self.months else (int(self.month),)

    def _solar_of(self, value, month: int):
        if not isinstance(value, tuple):
            return value
        months = self.month_list
        if len(value) == len(months):
            return value[months.index(month)]
        return value[month - 1]  # twelve values, one per calendar month

    def for_month(self, month: int) -> "PropagationSettings":
        """These settings for one month of ``month_list``, with that month's solar input."""
        return replace(self, month=int(month), months=(),
                       solar_flux=self._solar_of(self.solar_flux, month),
                       sunspot_number=self._solar_of(self.sunspot_number, month))

    @property
    def hours(self) -> tuple[int, ...]:
        """The UT hours (0..23) the ranges cover, sorted, each once."""
        out: set[int] = set()
        for start, end in self.hours_utc:
            if end <= start:
                end += 24
            out.update(h % 24 for h in range(start, end))
        return tuple(sorted(out))


def hour_ranges_text(hours, sep: str = ", ") -> str:
    """UT hours as [start-end) runs, e.g. "20-02, 13-18"; "all day" for all 24, "" for none.

    A run ending at 23 and one starting at 0 are one run across midnight.
    """
    hs = sorted(set(int(h) for h in hours))
    if not hs:
        return ""
    if len(hs) == 24:
        return "all day"
    runs = []
    start = prev = hs[0]
    for h in hs[1:]:
        if h != prev + 1:
            runs.append((start, prev))
            start = h
        prev = h
    runs.append((start, prev))
    if len(runs) > 1 and runs[0][0] == 0 and runs[-1][1] == 23:
        runs = [(runs[-1][0], runs[0][1])] + runs[1:-1]
    return sep.join(f"{a:02d}-{b + 1:02d}" for a, b in runs)
