"""A passive 1×N power splitter or an unequal tap.

The loss to the output port the link follows is one budget row, the sum of two parts
(:meth:`Splitter.loss_parts_db` gives them separately):

- ``split``: the ideal, lossless division of power, 10·log10(N) for an equal 1×N split
  (:func:`linkbudget.physics.splitter.ideal_split_loss_db`) or −10·log10(r) for a tap sending
  the fraction r to the followed port (:func:`linkbudget.physics.splitter.tap_loss_db`);
- ``excess``: the datasheet ``excess_loss`` of the real device (default 0 dB). A datasheet's
  port-to-port uniformity belongs in its ``max``, so the worst case takes the weakest port.
"""

import re
from typing import Annotated, Literal

from pydantic import BeforeValidator, Field, model_validator

from linkbudget.config.fields import InputProblem, Written, integer
from linkbudget.config.ranges import RANGES
from linkbudget.physics.splitter import ideal_split_loss_db, tap_loss_db
from linkbudget.segments.base import NOTHING_AROUND, ExcessLossSpread, SegmentSpec, flat_over_wavelength
from linkbudget.units import NUMBER_PATTERN

_RATIO = re.compile(rf"^\s*(?P<a>{NUMBER_PATTERN})\s*(/\s*(?P<b>{NUMBER_PATTERN})\s*)?$", re.ASCII)

_RATIO_FORMS = "a/b such as 2/98 (shares of the two ports) or a power fraction such as 0.02"


def split_ratio(value):
    """Parse a tap's ``ratio``: text ``a/b`` -> the shares ``(a, b)``; a number -> the fraction.

    ``a/b`` (any a, b > 0, e.g. ``2/98`` or ``1/3``) sends a/(a+b) of the power to port 1 and
    b/(a+b) to port 2. A number r (0 < r ≤ 1) is the fraction into the followed port itself.
    """
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise ValueError(f"expected a split ratio, {_RATIO_FORMS}; got {value!r}")
    if isinstance(value, str):
        match = _RATIO.match(value)
        if match is None:
            raise ValueError(f"cannot read {value!r} as a split ratio; write {_RATIO_FORMS}")
        if match["b"] is not None:
            shares = (float(match["a"]), float(match["b"]))
            if min(shares) <= 0:
                raise ValueError(f"both shares of a split ratio a/b must be > 0, got {value!r}")
            return shares
        value = float(match["a"])
    if not 0 < value <= 1:  # also rejects NaN
        raise ValueError(f"a ratio written as a number is the power fraction into the followed port, "
                         f"0 < ratio <= 1; got {value!r}")
    return float(value)


SplitRatio = Annotated[tuple[float, float] | float, BeforeValidator(split_ratio),
                      Written("number or text", pattern=_RATIO.pattern)]


class Splitter(SegmentSpec):
    """A 1×N splitter (``ports: N``) or a tap (``ratio``), and the output ``port`` the link follows.

    Give exactly one of ``ports`` (an equal split; ``port`` ≤ N is recorded, every port loses the
    same) or ``ratio`` (``2/98``: ``port: 1``, the default, follows the 2 % port, ``port: 2`` the
    98 % port; a fraction such as ``0.02`` is already the followed port's share and takes no
    ``port``). ``excess_loss`` (spread allowed) comes on top in every case.
    """

    kind: Literal["splitter"]
    ports: integer(bounds=RANGES["splitter ports"]) | None = Field(
        None, description="Output ports of an equal 1xN split (or ratio).")
    ratio: SplitRatio | None = Field(
        None, description="A tap: shares a/b such as 2/98, or the followed port's fraction (or ports).")
    port: integer(bounds=RANGES["splitter port"]) | None = Field(
        None, description="Output port the link follows, from 1.")
    excess_loss: ExcessLossSpread = Field(default="0 dB", validate_default=True,
                                          description="Datasheet excess loss on top of the split.")

    @model_validator(mode="after")
    def _one_of_each(self):
        if self.ports is None and self.ratio is None:
            raise ValueError("give ports (an equal 1xN split, e.g. ports: 8) or ratio (a tap, e.g. ratio: 2/98)")
        if self.ports is not None and self.ratio is not None:
            raise InputProblem(("ratio",), "give ports or ratio, not both")
        if self.ratio is not None:
            shares = (self.ratio[0] / sum(self.ratio), self.ratio[1] / sum(self.ratio)) if isinstance(
                self.ratio, tuple) else (self.ratio,)
            for share in shares:
                message = RANGES["port share"].problem(share)
                if message is not None:
                    raise InputProblem(("ratio",), message)
        if self.port is None:
            return self
        if self.ports is not None and self.port > self.ports:
            raise InputProblem(("port",), f"port {self.port} does not exist on a 1x{self.ports} splitter",
                               f"ports are numbered 1 to {self.ports}")
        if isinstance(self.ratio, float):
            raise InputProblem(("port",), "a ratio written as a fraction is already the share of the followed "
                               "port; drop port", "or write the ratio as a/b (e.g. 2/98) and pick port 1 or 2")
        if isinstance(self.ratio, tuple) and self.port > 2:
            raise InputProblem(("port",), f"a tap with ratio a/b has ports 1 and 2, got port {self.port}")
        return self

    @property
    def followed_port(self):
        """The 1-based output port the link follows: ``port``, 1 for an ``a/b`` tap, else ``None``."""
        if self.port is None and isinstance(self.ratio, tuple):
            return 1
        return self.port

    def row_facts(self):
        return () if self.followed_port is None else (f"port {self.followed_port}",)

    def loss_parts_db(self, wavelength_m, case):
        """The parts of the loss [dB] over the wavelength axis for a budget case.

        Returns
        -------
        dict
            ``{"split", "excess"}`` -> loss [dB] arrays shaped like ``wavelength_m``.
        """
        if self.ports is not None:
            split_db = ideal_split_loss_db(self.ports)
        elif isinstance(self.ratio, tuple):
            split_db = tap_loss_db(self.ratio[self.followed_port - 1] / sum(self.ratio))
        else:
            split_db = tap_loss_db(self.ratio)
        return {"split": flat_over_wavelength(split_db, wavelength_m),
                "excess": flat_over_wavelength(case.value(self.excess_loss), wavelength_m)}

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        return sum(self.loss_parts_db(wavelength_m, case).values())
