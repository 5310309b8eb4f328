"""What ``uses`` and ``check`` print about parts: where a part is used, and what no link uses."""

from linkbudget.config.source import format_key_path
from linkbudget.text import escaped


def use_line(path, use, part_name):
    """One use of ``part_name`` in the link ``path``: its chain entry, segment and the part file."""
    named = use.parts[0]
    through = "" if named.name == part_name else f", through part '{escaped(named.name)}'"
    defining = next(part for part in use.parts if part.name == part_name)
    return (f"  {escaped(path)}: {format_key_path(('chain', use.index))} '{escaped(use.segment)}' "
            f"(part file {escaped(defining.file)}{through})")


def uses_heading(part_name, count, links, folder):
    """The first line of ``uses``."""
    if not count:
        return f"part '{escaped(part_name)}' is used by no link under {escaped(folder)}"
    return f"part '{escaped(part_name)}' is used {count} time(s) in {links} link(s) under {escaped(folder)}:"


def unused_lines(unused_parts, links):
    """The parts no one of ``links`` (said in words) uses, one part file a line (``[]`` when every
    part is used)."""
    if not unused_parts:
        return []
    return [f"used by no link {escaped(links)}:"] + [
        f"  {escaped(path)}: {', '.join(escaped(name) for name in names)}" for path, names in unused_parts]


def part_files_summary(count, broken, unused_count):
    """``check``'s line on the part files of the folders it was given."""
    return f"{count} part file(s): {broken} with input errors, {unused_count} part(s) used by no link checked"
