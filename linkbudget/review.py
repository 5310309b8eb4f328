"""The three questions a reviewer asks after "does it close": where can a person reach the light
and how does it stand against the eye-safety limits (:mod:`linkbudget.safety`), how much light
returns toward the source (:mod:`linkbudget.backreflection`), and how much the loss depends on
polarization (:mod:`linkbudget.polarization_loss`)."""

from dataclasses import dataclass

from linkbudget.backreflection import BackReflection, back_reflection
from linkbudget.physics.laser_safety import HAZARD_LEVELS
from linkbudget.polarization_loss import PolarizationLoss, polarization_loss
from linkbudget.safety import assess_link


@dataclass(frozen=True)
class LinkReview:
    """The eye-safety assessments of the reachable points, the points excluded with their
    reasons, the back-reflection budget and the polarization-dependent loss of one link."""

    assessments: tuple
    excluded: tuple
    back_reflection: BackReflection
    polarization_loss: PolarizationLoss

    def above(self, hazard_level):
        """The assessments above ``hazard_level`` (or not assessed: outside the band of the limits)."""
        limit = HAZARD_LEVELS.index(hazard_level)
        return tuple(item for item in self.assessments
                     if item.hazard_level is None or HAZARD_LEVELS.index(item.hazard_level) > limit)


def review_link(link, result):
    """The :class:`LinkReview` of an evaluated link."""
    assessments, excluded = assess_link(link, result)
    return LinkReview(assessments, excluded, back_reflection(result, link.spec.source.max_back_reflection),
                      polarization_loss(result))
