"""What a segment does to the faces of the chain: the closed set of roles the engine knows.

The engine inserts the faces between media from these roles alone (it knows no kind names):

- :class:`Carries`: the segment carries a medium (its index over the wavelength axis); between
  two media the engine inserts their interface;
- :class:`Joint`: a joint passes the light on between the media around it, through nothing
  (index-matched), one pair of faces in contact, or two faces through a gap's medium;
- :class:`Coats`: a coating on the face between the two media around it;
- :data:`PASSES`: an element passes the light on, faces unchanged;
- :data:`GUIDES`: the light is guided (a fibre or waveguide without faces, a splitter), which
  ends a run of faces.
"""

from dataclasses import dataclass
from enum import Enum

import numpy as np


@dataclass(frozen=True)
class Carries:
    """A medium: its complex ``index`` over the wavelength axis, the ``angle_rad`` of incidence on
    its entry face it states (else ``None``), the ``polarization`` it states for the light
    arriving (else ``None``), whether its two faces are parallel (a plate: a tilt before it
    carries on inside, and the light between its faces may bounce), whether those bounces are
    summed, and its thinnest path [m] (for the coherence note of a plate)."""

    index: np.ndarray
    angle_rad: float | None = None
    polarization: str | None = None
    parallel_faces: bool = False
    multiple_reflections: bool = False
    thinnest_m: float | None = None


class Faces(Enum):
    """The faces a joint makes between the media around it."""

    NONE = "none"  # index-matched: no face
    CONTACT = "contact"  # the media touch: one interface (none when their indices are equal)
    GAP = "gap"  # two faces through the gap's medium


@dataclass(frozen=True)
class Joint:
    """A joint: its :class:`Faces`, and for a gap the gap medium's index and its shortest length [m]."""

    faces: Faces
    gap_index: np.ndarray | None = None
    shortest_gap_m: float = 0.0


@dataclass(frozen=True)
class Coats:
    """A coating: layer indices (n_layers, n_wavelengths) and thicknesses [m] (n_layers,)."""

    layer_index: np.ndarray
    thickness_m: np.ndarray


@dataclass(frozen=True)
class Passes:
    """An element the light passes through, leaving the faces around it as they are."""


@dataclass(frozen=True)
class Guides:
    """A guide or a device that ends a run of faces."""


PASSES = Passes()
GUIDES = Guides()
