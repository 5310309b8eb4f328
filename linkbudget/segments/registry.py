"""The one registry of segment kinds: kind name -> spec model (which evaluates itself).

The loader, the CLI, the JSON schema and the docs all read this table.
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
