"""Reading link files: YAML with positions, the schema, and placed input errors.

The names below are loaded on first use (PEP 562), so that importing one module of this package
(the field types a segment module needs) does not import the loader, which imports the segments.
"""

import importlib

#: Exported name -> the module of this package that defines it.
_EXPORTS = {"Link": "loader", "load_link": "loader", "parse_link": "loader", "ConfigError": "source",
            "Problem": "source"}

__all__ = sorted(_EXPORTS)


def __getattr__(name):
    if name not in _EXPORTS:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    return getattr(importlib.import_module(f"{__name__}.{_EXPORTS[name]}"), name)
