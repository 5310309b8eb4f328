"""What every segment kind shares: its name and kind keys, and the evaluation contract."""

from linkbudget.config.fields import Strict


class SegmentSpec(Strict):
    """A link segment as written in the ``chain`` list.

    Subclasses set ``kind`` to a ``Literal`` of their kind name, add their own keys, and
    implement :meth:`loss_db`.
    """

    name: str | None = None

    def resolve(self, wavelength_m, base_dir):
        """Check what needs the wavelength axis or other files (materials); return the segment.

        Raises :class:`InputProblem` for input the schema alone cannot judge.
        """
        return self

    def medium_index(self):
        """Complex index over the wavelength axis of the medium the segment carries, or ``None``."""
        return

    def loss_db(self, wavelength_m, case):
        """Loss of the segment in dB over the wavelength axis for a budget case.

        Parameters
        ----------
        wavelength_m : numpy.ndarray
            Vacuum wavelengths [m], shape (n_wavelengths,).
        case : str
            One of :data:`linkbudget.config.fields.CASES`.

        Returns
        -------
        numpy.ndarray
            Loss [dB] of shape (n_wavelengths,), positive when power is lost.
        """
        raise NotImplementedError
