"""The valid range of every quantity of the link language, with the reason for each bound.

One table (:data:`RANGES`) holds them: the schema fields check their values against it, the
README's table of valid ranges is written from it (:func:`markdown_table`; a test keeps the two
equal), and the notes on possible but unusual values come from it. A value outside its range is
an input error that states the range and the reason; a value inside it but past a :class:`Unusual`
threshold is accepted and noted on its row.

Values are in the internal unit of their dimension (metres, radians, dB, dBm, dB/m, 1/m; see
:mod:`linkbudget.units`); each range names the unit it is shown in.
"""

import math
from dataclasses import dataclass, field

#: Display units: name -> factor from the internal unit.
_SHOWN = {
    "": 1.0, "dB": 1.0, "dBm": 1.0, "nm": 1e-9, "um": 1e-6, "mm": 1e-3, "m": 1.0, "km": 1e3,
    "deg": math.pi / 180.0, "rad": 1.0, "dB/m": 1.0, "dB/km": 1e-3, "dB/cm": 1e2, "dB/um": 1e6, "/m": 1.0,
}


@dataclass(frozen=True)
class Unusual:
    """A threshold past which a value is possible but unusual: accepted, with a note."""

    threshold: float
    above: bool  # the note is for values above the threshold (else below it)
    why: str


@dataclass(frozen=True)
class Range:
    """The valid range of one quantity, ``low`` to ``high`` in its internal unit.

    ``None`` leaves an end open-ended; ``low_open``/``high_open`` exclude the bound itself.
    """

    what: str
    keys: str  # where the language uses it, for the README
    low: float | None
    high: float | None
    unit: str
    why: str
    low_open: bool = False
    high_open: bool = False
    unusual: tuple = field(default=())

    def shown(self, value):
        """``value`` (internal unit) as text in the range's display unit (a whole number beyond a
        float as its order of magnitude)."""
        if isinstance(value, int) and abs(value) > 2**53:
            return f"a {len(str(abs(value)))}-digit number"
        return f"{value / _SHOWN[self.unit]:g}{' ' + self.unit if self.unit else ''}"

    def text(self):
        """The range in words, e.g. ``> 0 and <= 1`` or ``from 0 dB to 60 dB``."""
        def end(bound, is_open, strict, loose):
            return f"{strict if is_open else loose} {self.shown(bound)}"

        if self.low is not None and self.high is not None and not (self.low_open or self.high_open):
            return f"from {self.shown(self.low)} to {self.shown(self.high)}"
        ends = []
        if self.low is not None:
            ends.append(end(self.low, self.low_open, ">", ">="))
        if self.high is not None:
            ends.append(end(self.high, self.high_open, "<", "<="))
        return " and ".join(ends)

    def contains(self, value):
        """``value`` lies within the range (NaN never does)."""
        if isinstance(value, float) and math.isnan(value):
            return False
        above_low = self.low is None or (value > self.low if self.low_open else value >= self.low)
        below_high = self.high is None or (value < self.high if self.high_open else value <= self.high)
        return above_low and below_high

    def problem(self, value):
        """The message for a value outside the range, or ``None`` when it is inside."""
        if self.contains(value):
            return None
        return f"{self.what} must be {self.text()}: {self.why}; got {self.shown(value)}"

    def check(self, value):
        """``value`` if it lies within the range; else ``ValueError`` stating the range and why."""
        message = self.problem(value)
        if message is not None:
            raise ValueError(message)
        return value

    def notes(self, values):
        """Notes for the values (the ends of a spread) that pass an :class:`Unusual` threshold."""
        found = []
        for unusual in self.unusual:
            passed = [v for v in values if (v > unusual.threshold if unusual.above else v < unusual.threshold)]
            if passed:
                extreme = max(passed) if unusual.above else min(passed)
                side = "above" if unusual.above else "below"
                found.append(f"{self.what} {self.shown(extreme)} is {side} {self.shown(unusual.threshold)}: "
                             f"{unusual.why}")
        return found


#: Real part and extinction coefficient of a transparent (dielectric) medium's index.
DIELECTRIC_N = (1.0, 10.0)
#: Highest κ of a dielectric: a medium with κ >= 1 absorbs like a metal.
DIELECTRIC_KAPPA_MAX = 1.0
#: Highest n and κ of any optical medium (metals in the far infrared come close).
METAL_N_MAX, METAL_KAPPA_MAX = 100.0, 200.0

_COMMON = "common practice"
_LOSS = "a passive part cannot add power (loss >= 0 dB)"

RANGES = {range_.what: range_ for range_ in (
    Range("wavelength", "`wavelength`, `channels`, `band.from`, `band.to`, a layer's `quarter_wave`",
          100e-9, 100e-6, "nm", "the optical range, ultraviolet to far infrared"),
    Range("band step", "`band.step`", 0.0, None, "nm",
          "a step must be > 0 and not exceed the band's span (to - from)", low_open=True),
    Range("source power", "`source.power`", -100.0, 70.0, "dBm",
          f"{_COMMON}: below -100 dBm nothing is launched, above 70 dBm (10 kW) is an industrial laser, "
          "not a link source",
          unusual=(Unusual(20.0, True, "unusual for a link source and hazardous to eyes and skin; the figures "
                           "are estimates, follow IEC 60825-1/-2 and the site's laser safety officer"),)),
    Range("spectral width", "`source.spectral_width`", 0.0, 1000e-9, "nm",
          f"a width is > 0; 1000 nm is a white-light source ({_COMMON})", low_open=True),
    Range("receiver power", "`receiver.sensitivity`, `receiver.overload`", -150.0, 40.0, "dBm",
          f"{_COMMON}: photon counters reach about -150 dBm, power sensors take up to 40 dBm (10 W)",
          unusual=(Unusual(-80.0, False, "below -80 dBm only a photon-counting receiver works"),)),
    Range("required margin", "`receiver.required_margin`", 0.0, 60.0, "dB",
          f"{_COMMON}: a margin is not negative, and 60 dB is more than any link keeps"),
    Range("joint loss", "`connector.loss`, `splice.loss`, `bends.loss`, `crossings.loss`", 0.0, 60.0, "dB",
          f"{_LOSS}; above 60 dB ({_COMMON}) no light passes a joint"),
    Range("excess loss", "`splitter.excess_loss`", 0.0, 60.0, "dB", f"{_LOSS}; 60 dB is {_COMMON}"),
    Range("element loss", "`element.loss`", -60.0, 100.0, "dB",
          f"{_COMMON}: no single amplifier has more than 60 dB of gain, and past 100 dB nothing passes",
          unusual=(Unusual(0.0, False, "an element with gain (negative loss): an amplifier; its noise and "
                           "saturation are not modelled"),)),
    Range("return loss", "`connector.return_loss`", 0.0, 100.0, "dB",
          f"a passive joint reflects no more than it receives (>= 0 dB); 100 dB is past any "
          f"measurement ({_COMMON})"),
    Range("back-reflection tolerance", "`source.max_back_reflection`", -100.0, 0.0, "dB",
          f"the light returning is a fraction of the launch power (<= 0 dB); -100 dB is past any "
          f"measurement ({_COMMON})"),
    Range("fibre length", "`fiber.length`", 0.0, 40_000e3, "km",
          "the Earth's circumference (40000 km) bounds any fibre route",
          unusual=(Unusual(300e3, True, f"beyond an unrepeated span ({_COMMON}); amplification and dispersion "
                           "are not modelled"),)),
    Range("gap length", "`gap.length`", 0.0, 4e8, "km",
          "the distance to the Moon (about 400000 km, laser ranging) bounds a free-space path",
          unusual=(Unusual(10e3, True, "a long free-space path: turbulence and pointing are not modelled"),)),
    Range("medium thickness", "`medium.thickness`, `medium.length`", 0.0, 1e3, "m",
          f"a medium has two faces, so it has a thickness > 0; past 1 km ({_COMMON}) it is a gap",
          low_open=True),
    Range("waveguide length", "`waveguide.length`", 0.0, 10.0, "mm",
          f"{_COMMON}: the longest on-chip spirals are a few metres"),
    Range("layer thickness", "a layer's `thickness`", 0.0, 100e-6, "nm",
          "a layer has a thickness > 0; past 100 um the coherent thin-film model does not hold "
          f"({_COMMON})", low_open=True),
    Range("fibre attenuation", "`fiber.attenuation`", 0.0, 10.0, "dB/km",
          f"{_LOSS}; glass fibre loses well under 10 dB/km, plastic fibre under 1 dB/m, so 10 dB/m "
          f"({_COMMON}) is past any fibre"),
    Range("waveguide attenuation", "`waveguide.attenuation`", 0.0, 1e4, "dB/cm",
          f"{_LOSS}; past 100 dB/cm ({_COMMON}) a guide carries no light over a millimetre"),
    Range("bulk attenuation", "`medium.attenuation`, `gap.attenuation`", 0.0, 1e6, "dB/um",
          f"{_LOSS}; past 1 dB/um ({_COMMON}) a medium is opaque within a wavelength"),
    Range("absorption coefficient", "`medium.absorption`, `gap.absorption`", 0.0, 1e9, "/m",
          "a passive medium absorbs (alpha >= 0); metals reach about 1e8 /m"),
    Range("extinction coefficient", "`medium.kappa`, `gap.kappa`", 0.0, METAL_KAPPA_MAX, "",
          f"a passive medium has kappa >= 0; metals in the far infrared stay below {METAL_KAPPA_MAX:g}"),
    Range("angle of incidence", "`angle` of `medium`, `gap`, `fiber`, `waveguide`", 0.0, math.radians(89.0),
          "deg", "grazing incidence carries no flux"),
    Range("tilt", "`connector.tilt`, `splice.tilt`, `gap.tilt`", 0.0, math.pi / 2, "deg",
          "a tilt of 90 deg or more points away from the joint", high_open=True),
    Range("offset", "`connector.offset`, `splice.offset`, `gap.offset`", 0.0, 1.0, "mm",
          f"{_COMMON}: past 1 m of lateral offset no mode overlaps another"),
    Range("joint gap", "`connector.gap`, `splice.gap`", 0.0, 1.0, "mm",
          "past 1 m a free-space path is a `gap` segment"),
    Range("mode field diameter", "`mode_field_diameter` (fibre, waveguide), `mode_field_diameter_before`, "
          "`mode_field_diameter_after`, `mode_size.width`, `mode_size.height`", 0.1e-6, 1e-3, "um",
          f"{_COMMON}: a guided mode spans 0.1 um (a silicon wire) to 1 mm; it must also be at least a tenth "
          "of the wavelength"),
    Range("core diameter", "`fiber.core_diameter`", 0.5e-6, 2e-3, "um",
          f"{_COMMON}: from a sub-wavelength core to a 2 mm plastic fibre"),
    Range("numerical aperture", "`fiber.numerical_aperture`", 0.0, 1.0, "",
          "the sine of the acceptance half-angle in air: > 0 and at most 1, and below the core index "
          "when the fibre gives one", low_open=True),
    Range("beam waist diameter", "`gap.beam.waist_diameter`", 0.1e-6, 2.0, "mm",
          f"{_COMMON}: a waist diameter is at least a tenth of the wavelength, and 2 m is past any beam"),
    Range("beam waist", "`gap.beam.waist` (a radius, read for this release: write `waist_diameter`)",
          0.05e-6, 1.0, "mm", f"{_COMMON}: half the waist diameter's range"),
    Range("beam divergence", "`gap.beam.divergence`", 0.0, math.pi / 2, "deg",
          "a half-angle of 90 deg or more leaves no forward beam", low_open=True, high_open=True,
          unusual=(Unusual(math.radians(15.0), True, "beyond the paraxial Gaussian beam model "
                           f"({_COMMON})"),)),
    Range("aperture diameter", "`gap.aperture`", 0.0, 10.0, "mm",
          f"{_COMMON}: the largest telescope mirrors are about 10 m across", low_open=True),
    Range("visibility", "`gap.visibility`", 1.0, 1e6, "km",
          f"{_COMMON}: the densest fog still sees about 1 m, and no air sees past 1000 km"),
    Range("splice count", "`splice.count`", 1, 10_000, "",
          f"{_COMMON}: a route has a few hundred splices at most"),
    Range("connector count", "`connector.count`", 1, 1_000, "",
          f"{_COMMON}: a route crosses a few dozen patch panels at most"),
    Range("feature count", "`bends.count`, `crossings.count`", 0, 100_000, "",
          f"{_COMMON}: a chip's path has at most a few thousand bends or crossings"),
    Range("layer count", "`coating.layers` (number of layers)", 1, 500, "",
          f"{_COMMON}: the most complex thin-film filters have a few hundred layers"),
    Range("quarter-wave count", "a layer's `quarter_waves`", 1, 100, "",
          f"{_COMMON}: a thin film is a few quarter-waves thick"),
    Range("splitter ports", "`splitter.ports`", 2, 1024, "",
          f"a splitter has at least 2 ports; the largest planar splitters are 1x128, cascades a few "
          f"hundred ({_COMMON})"),
    Range("splitter port", "`splitter.port`", 1, 1024, "",
          "ports are numbered from 1, and a splitter has at most 1024"),
    Range("port share", "`splitter.ratio` (the share of each port)", 1e-6, 1.0, "",
          f"{_COMMON}: a tap sends at least 1e-6 (-60 dB) of the power to each port"),
    Range("trial count", "`statistics.trials`, `--trials`", 2, 1_000_000_000, "",
          f"a spread needs 2 trials at least; 1e9 trials resolve a probability of 1e-7 and take hours ({_COMMON})"),
    Range("seed", "`statistics.seed`, `--seed`", 0, None, "",
          "a seed of the random generator (numpy's SeedSequence) is a whole number >= 0"),
)}

#: The valid index forms, for the README (checked by :func:`index_problem`).
INDEX_RULES = (
    ("`index` of `medium` and of a layer", f"a dielectric: n from {DIELECTRIC_N[0]:g} to {DIELECTRIC_N[1]:g} "
     f"with kappa < {DIELECTRIC_KAPPA_MAX:g}; or a metal: n > 0 up to {METAL_N_MAX:g} with kappa from "
     f"{DIELECTRIC_KAPPA_MAX:g} to {METAL_KAPPA_MAX:g} (noted)",
     "n < 1 and n > 10 occur only in metals, which absorb strongly (kappa >= 1)"),
    ("`index` of `fiber`, `waveguide`, `gap`; `gap_index`; `effective_index`",
     f"a dielectric: n from {DIELECTRIC_N[0]:g} to {DIELECTRIC_N[1]:g} with kappa < {DIELECTRIC_KAPPA_MAX:g}",
     "a transparent medium has n >= 1 at optical wavelengths (no transparent material exceeds about 4); a "
     "guided mode's effective index lies above its cladding's"),
    ("`material`", "any catalog material or material file; an index below 1 (a metal) is noted",
     "the data say what the material is"),
)


#: A guided mode's or a beam's 1/e² diameter is at least the wavelength over this factor
#: (about λ/(2n) in the highest-index optical materials, n ≈ 4; common practice margin).
MODE_DIAMETER_PER_WAVELENGTH = 0.1


def mode_size_problem(diameter_m, wavelength_m):
    """The message for a mode field diameter too small for the longest wavelength, or ``None``."""
    smallest_m = MODE_DIAMETER_PER_WAVELENGTH * max(wavelength_m)
    if diameter_m >= smallest_m:
        return None
    return (f"a mode field diameter must be at least {MODE_DIAMETER_PER_WAVELENGTH:g} of the wavelength "
            f"({smallest_m * 1e6:g} um at {max(wavelength_m) * 1e9:g} nm): no guided mode or beam is confined "
            f"below about half a wavelength in the densest optical material; got {diameter_m * 1e6:g} um")


def index_problem(index, *, metal_allowed):
    """The message for a complex index outside its valid forms, or ``None``.

    Parameters
    ----------
    index : complex
        n + κj, with n > 0 and κ >= 0 already checked.
    metal_allowed : bool
        The segment may be a metal (a bulk medium, a thin-film layer).
    """
    n, kappa = index.real, index.imag
    low, high = DIELECTRIC_N
    if kappa < DIELECTRIC_KAPPA_MAX and low <= n <= high:
        return None
    if not metal_allowed:
        return (f"this index must be a dielectric's, n from {low:g} to {high:g} with kappa < "
                f"{DIELECTRIC_KAPPA_MAX:g}: a transparent medium has n >= 1 at optical wavelengths and no "
                f"transparent material exceeds about 4; got {index.real:g}{index.imag:+g}j")
    if kappa >= DIELECTRIC_KAPPA_MAX and n <= METAL_N_MAX and kappa <= METAL_KAPPA_MAX:
        return None
    return (f"an index must be a dielectric's (n from {low:g} to {high:g}, kappa < {DIELECTRIC_KAPPA_MAX:g}) "
            f"or a metal's (n up to {METAL_N_MAX:g}, kappa from {DIELECTRIC_KAPPA_MAX:g} to "
            f"{METAL_KAPPA_MAX:g}): n < 1 or n > 10 occur only in strongly absorbing metals; "
            f"got {index.real:g}{index.imag:+g}j")


def index_notes(index):
    """Notes for a valid index array (a metal: n < 1 or κ >= 1 somewhere on the axis)."""
    if (index.real < 1).any() or (index.imag >= DIELECTRIC_KAPPA_MAX).any():
        return [f"index n down to {index.real.min():g}, kappa up to {index.imag.max():g}: a metal (n < 1 or "
                "kappa >= 1); its faces reflect most of the light"]
    return []


def markdown_table():
    """The README's table of valid ranges, one row per quantity, from :data:`RANGES`."""
    lines = ["| quantity | keys | valid range | why |", "|---|---|---|---|"]
    for range_ in RANGES.values():
        noted = "".join(f"; noted {'above' if u.above else 'below'} {range_.shown(u.threshold)}"
                        for u in range_.unusual)
        lines.append(f"| {range_.what} | {range_.keys} | {range_.text()}{noted} | {range_.why} |")
    for keys, rule, why in INDEX_RULES:
        lines.append(f"| refractive index | {keys} | {rule} | {why} |")
    return "\n".join(lines)
