"""The one registry of segment kinds: kind name -> spec model (which evaluates itself).

The loader, the CLI, the JSON schema and the docs all read this table.
"""

from linkbudget.segments.datasheet import Connector, Element, Splice
from linkbudget.segments.medium import Fiber, Medium

KINDS = {
    "medium": Medium,
    "fiber": Fiber,
    "connector": Connector,
    "splice": Splice,
    "element": Element,
}
