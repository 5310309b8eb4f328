"""Reading link files: YAML with positions, the schema, and placed input errors."""

from linkbudget.config.loader import Link, load_link, parse_link
from linkbudget.config.source import ConfigError, Problem

__all__ = ["ConfigError", "Link", "Problem", "load_link", "parse_link"]
