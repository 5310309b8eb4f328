"""linkbudget: optical link budgets from physics and datasheets, kept as YAML.

Quick use::

    import linkbudget
    link = linkbudget.load("configs/quarry-uplink.yaml")   # a path, or YAML text
    result = linkbudget.evaluate(link)
    result.margin_db["worst"]                              # numpy array over the wavelengths
    linkbudget.result_dict(result)                         # the versioned JSON result

The names below are imported lazily so that the command line starts fast.
"""

__version__ = "0.1.0"

__all__ = ["ConfigError", "LinkResult", "__version__", "evaluate", "load", "result_dict"]


def load(source, *, base_dir=None, allow_paths=(), reader=None):
    """Load a link from a file path or from YAML text.

    Parameters
    ----------
    source : str or os.PathLike
        A path to a link file, or the YAML text itself (any string holding a newline).
    base_dir : path-like, optional
        Folder for files the link refers to when ``source`` is text (default: the current folder).
    allow_paths : iterable of path-like
        Folders outside the project that files the link refers to (material files) may lie in;
        without them every such file must lie inside the link's project: the nearest folder
        above the link holding ``.git`` or ``linkbudget.toml``, else the link's own folder.
    reader : object with ``read(path, folder)``, optional
        Where the link (given by path) and the files it refers to are read from, e.g.
        ``linkbudget.reader.MemoryReader({"link.yaml": ..., "glass.yaml": ...})``; default: the
        working tree, confined as above (see :mod:`linkbudget.reader`).

    Returns
    -------
    linkbudget.config.Link

    Raises
    ------
    linkbudget.ConfigError
        With every input problem, each placed at file, line, column and key path.
    """
    from linkbudget.config import load_link, parse_link

    if isinstance(source, str) and "\n" in source:
        return parse_link(source, "<string>", base_dir, allow_paths, reader=reader)
    return load_link(source, allow_paths, reader=reader)


def evaluate(link, *, required_margin_db=None):
    """Evaluate a loaded link; see :func:`linkbudget.engine.evaluate`."""
    from linkbudget.engine import evaluate as evaluate_link

    return evaluate_link(link, required_margin_db=required_margin_db)


def result_dict(result):
    """The versioned JSON result of an evaluated link; see :func:`linkbudget.report.json.result_dict`."""
    from linkbudget.report.json import result_dict as json_result

    return json_result(result)


def __getattr__(name):
    if name == "ConfigError":
        from linkbudget.config import ConfigError

        return ConfigError
    if name == "LinkResult":
        from linkbudget.engine import LinkResult

        return LinkResult
    raise AttributeError(f"module 'linkbudget' has no attribute {name!r}")
