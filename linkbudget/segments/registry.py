"""The one registry of segment kinds: kind name -> spec model (which evaluates itself).

The loader validates every chain item against this table (and names its kinds in the hint for
an unknown kind); nothing else keeps a list of kinds.
"""

from linkbudget.segments.coating import Coating
from linkbudget.segments.datasheet import Connector, Element, Splice
from linkbudget.segments.gap import Gap
from linkbudget.segments.medium import Fiber, Medium
from linkbudget.segments.splitter import Splitter
from linkbudget.segments.waveguide import Waveguide

KINDS = {
    "medium": Medium,
    "coating": Coating,
    "fiber": Fiber,
    "waveguide": Waveguide,
    "gap": Gap,
    "connector": Connector,
    "splice": Splice,
    "splitter": Splitter,
    "element": Element,
}
