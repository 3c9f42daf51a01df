"""Input types of the array physics (validated in ``lobeplan.site``)."""
from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Ground", "GROUND_CLASSES", "Feed", "State", "ArrayOption", "Radials", "ForegroundSector",
           "ArraySpec", "DEFAULT_GROUND_LOSS_OHM", "USES"]


@dataclass(frozen=True, slots=True)
class Ground:
    """Far-field ground constants.

    ``perfect`` means a perfectly conducting plane (reflection coefficient +1
    for vertical polarization); ``eps_r`` and ``sigma_s_m`` are then ignored.
    """

    name: str
    eps_r: float
    sigma_s_m: float
    perfect: bool = False


# ITU-R P.527 (HF values read from its curves; from memory) and handbook
# practice ("average", "very-good", "poor": common practice, no single source).
GROUND_CLASSES: dict[str, Ground] = {
    "perfect": Ground("perfect", 1.0, 0.0, perfect=True),
    "sea": Ground("sea", 70.0, 5.0),
    "fresh-water": Ground("fresh-water", 80.0, 0.003),
    "wet": Ground("wet", 30.0, 0.01),
    "land": Ground("land", 22.0, 0.003),
    "medium-dry": Ground("medium-dry", 15.0, 0.001),
    "very-dry": Ground("very-dry", 3.0, 0.0001),
    "average": Ground("average", 13.0, 0.005),
    "very-good": Ground("very-good", 20.0, 0.0303),
    "poor": Ground("poor", 13.0, 0.002),
}


@dataclass(frozen=True, slots=True)
class Feed:
    """The coaxial cable every ``line_m`` state is built from."""

    z0_ohm: float = 50.0
    velocity_factor: float = 0.66
    loss_db_per_100m_at_10mhz: float = 1.7  # matched loss; scales with sqrt(f)


@dataclass(frozen=True, slots=True)
class State:
    """One switch position.

    Exactly one form: forced base currents (``phase_deg`` with ``amplitude``,
    the same on every band: an ideal feed) or lines from a common junction
    (``line_m``, physical length of each element's line in metres).
    Phasors use e^{j omega t}: a negative phase lags.

    A forced state with ``design_freq_hz`` is "as built": on every frequency
    not in ``forced_freqs_hz`` it has the currents its network (designed on
    ``design_band``) delivers there.
    """

    name: str
    phase_deg: tuple[float, ...] | None = None
    amplitude: tuple[float, ...] | None = None
    line_m: tuple[float, ...] | None = None
    # a forced state is realised by a network designed on one band (None:
    # an ideal feed on every band); on the bands in forced_freqs_hz the
    # switch box has its own network, so the forced currents hold there
    design_band: str | None = None
    design_freq_hz: float | None = None
    forced_freqs_hz: tuple[float, ...] = ()

    @property
    def is_fed(self) -> bool:
        return self.line_m is not None


USES = ("transmit", "receive")
"""What an option is for (``use`` of an option in the site file)."""


@dataclass(frozen=True, slots=True)
class ArrayOption:
    """One way to build the array: a layout, its element positions, its states.

    ``positions_m`` are (along, across) in metres in the array frame: along
    points along the baseline bearing, across 90 deg clockwise from it.
    Element 1 is at the origin. ``use`` is "transmit" or "receive": a
    receive option is scored by directivity over the sky mean, not gain, and
    gets no match or exposure estimate (see :mod:`lobeplan.antenna.receive`).
    """

    name: str
    layout: str  # single | pair | line | square | custom
    spacing_m: float | None
    positions_m: tuple[tuple[float, float], ...]
    states: tuple[State, ...]
    use: str = "transmit"
    junction_m: tuple[float, float] | None = None  # where the lines meet; None: the centroid

    @property
    def receive(self) -> bool:
        return self.use == "receive"

    @property
    def junction_point_m(self) -> tuple[float, float]:
        """(along, across) of the junction, metres."""
        if self.junction_m is not None:
            return self.junction_m
        n = len(self.positions_m)
        return (sum(p[0] for p in self.positions_m) / n, sum(p[1] for p in self.positions_m) / n)

    @property
    def n_elements(self) -> int:
        return len(self.positions_m)


@dataclass(frozen=True, slots=True)
class Radials:
    """The radial system of every element.

    Exactly one of ``depth_m`` (buried) and ``height_m`` (elevated) is set.
    """

    count: int
    length_m: float
    depth_m: float | None = None
    height_m: float | None = None
    wire_diameter_mm: float = 2.0

    @property
    def buried(self) -> bool:
        return self.height_m is None


@dataclass(frozen=True, slots=True)
class ForegroundSector:
    """Ground beyond the array that the far field reflects on.

    ``from_deg`` to ``to_deg`` is a clockwise range of true bearings (may
    wrap); the sector's ground begins ``from_m`` from the array's centre.
    """

    from_deg: float
    to_deg: float
    from_m: float
    ground: Ground


DEFAULT_GROUND_LOSS_OHM = 2.0
"""Series loss per base when the site gives neither radials nor a loss."""


@dataclass(frozen=True, slots=True)
class ArraySpec:
    """Physical array common to every option: elements, ground, cable.

    ``ground_loss_ohm`` is the series loss per base given by the site (an
    explicit override); None means "compute it from ``radials``".
    ``foreground`` holds the sectors of other ground beyond the array.
    """

    height_m: float
    radius_m: float
    ground: Ground
    ground_loss_ohm: float | None
    feed: Feed
    options: tuple[ArrayOption, ...]
    rdf_elevation_deg: float = 20.0  # takeoff angle of the receiving directivity factor
    radials: Radials | None = None
    foreground: tuple[ForegroundSector, ...] = ()
    line_slack_m: float = 1.0   # every designed line is at least its run plus this
