"""Load a link file: YAML text -> validated :class:`Link`, or a :class:`ConfigError`.

Every problem, whatever its cause, is reported as ``FILE:LINE:COL: key.path: message`` with
an optional hint line; all problems of a file are collected, not only the first.
"""

import difflib
import typing
from dataclasses import dataclass
from pathlib import Path

from pydantic import BaseModel, ValidationError

from linkbudget.config.fields import InputProblem
from linkbudget.config.parts import PartLibrary, Written, is_part_use
from linkbudget.config.reachable import reachable_problems
from linkbudget.config.schema import LinkSpec
from linkbudget.config.source import ConfigError, Mark, Problem, load_yaml
from linkbudget.config.spectral import resolve_spectral
from linkbudget.reader import LinkFiles, WorkingTreeReader
from linkbudget.segments.chain import chain_problems
from linkbudget.yamlread import ReadError, read_text


@dataclass(frozen=True)
class Link:
    """A validated link: its top-level spec, its segments, and where it was read from."""

    spec: LinkSpec
    segments: tuple
    file: str
    #: Resolved paths of the files the link refers to that were read (its material files).
    referenced_files: tuple = ()
    positions: object = None  # where each key path was written, to place evaluation errors
    #: The chain entries made from parts (:class:`~linkbudget.config.parts.PartUse`), in chain order.
    part_uses: tuple = ()


def _model_at(model, loc):
    """The schema model that validates the mapping at ``loc`` below ``model``, if any."""
    for part in loc:
        if isinstance(part, int) or model is None:
            continue
        field = model.model_fields.get(part) or next(
            (f for f in model.model_fields.values() if f.alias == part), None)
        if field is None:
            return None
        model = _inner_model(field.annotation)
    return model


def _inner_model(annotation):
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return annotation
    for argument in typing.get_args(annotation):
        found = _inner_model(argument)
        if found is not None:
            return found
    return None


def _keys_of(model):
    return [field.alias or name for name, field in model.model_fields.items()]


def _written_path(data, loc):
    """``loc`` cut where the written data ends (a spread written as one value has no ``typ``)."""
    path, node = [], data
    for part in loc:
        if isinstance(node, dict) and part in node or isinstance(node, list) and isinstance(
                part, int) and part < len(node):
            path.append(part)
            node = node[part]
        else:
            break
    return tuple(path)


#: Messages of the validation library, by error type, in the tool's own words.
_MESSAGES = {
    "model_type": "expected a mapping of keys",
    "model_attributes_type": "expected a mapping of keys",
    "dict_type": "expected a mapping of keys",
    "list_type": "expected a list",
    "string_type": "expected text",
    "bool_type": "expected true or false",
    "bool_parsing": "expected true or false",
    "too_short": "needs at least one item",
}


def _message_of(item):
    if item["type"] in _MESSAGES:
        return _MESSAGES[item["type"]]
    message = item["msg"].removeprefix("Value error, ").removeprefix("Assertion failed, ")
    return message.replace("Input should be", "must be")


def problems_from_validation(error, positions, model, data, prefix=(), *, missing_ok=False):
    """Turn a pydantic ``ValidationError`` into placed :class:`Problem` s (``missing_ok``: not
    those of a missing required key)."""
    problems = []
    suggested = set()  # (parent loc, key) a misspelt key was taken for: not also "missing"
    for item in error.errors():
        loc = tuple(item["loc"])
        if item["type"] == "extra_forbidden":
            key = loc[-1]
            parent = _model_at(model, loc[:-1])
            allowed = _keys_of(parent) if parent else []
            close = difflib.get_close_matches(str(key), allowed, n=1)
            hint = f"did you mean '{close[0]}'?" if close else (
                f"allowed keys: {', '.join(allowed)}" if allowed else None)
            suggested.update((loc[:-1], match) for match in close)
            problems.append(positions.problem((*prefix, *loc), f"unknown key '{key}'", hint, at_key=True))
    for item in error.errors():
        loc = tuple(item["loc"])
        if item["type"] == "extra_forbidden" or loc and (loc[:-1], loc[-1]) in suggested:
            continue
        if item["type"] == "missing":
            if missing_ok:
                continue
            path = _written_path(data, loc)
            problems.append(positions.problem((*prefix, *path), f"missing required key '{loc[-1]}'"))
            continue
        cause = item.get("ctx", {}).get("error")
        path = _written_path(data, loc + getattr(cause, "key_path", ()))
        problems.append(positions.problem((*prefix, *path), _message_of(item), getattr(cause, "hint", None)))
    return problems


def validate_entry(item, path, positions, *, complete=True):
    """``(spec or None, problems)`` of the chain entry ``item`` written at ``path`` of ``positions``
    (a :class:`~linkbudget.config.source.Positions`, or anything that places problems as it does).

    ``complete=False`` lets required keys be missing: a part may leave them to each use (a fibre's length).
    """
    from linkbudget.segments.registry import (
        KINDS,  # here: the segment kinds import the config fields
    )

    if not isinstance(item, dict):
        return None, [positions.problem(path, "a chain item must be a mapping with a 'kind'")]
    kind = item.get("kind")
    if not isinstance(kind, str) or kind not in KINDS:
        close = difflib.get_close_matches(str(kind), KINDS, n=1)
        hint = f"did you mean '{close[0]}'?" if close else f"kinds: {', '.join(KINDS)}"
        message = "missing required key 'kind'" if kind is None else f"unknown segment kind '{kind}'"
        return None, [positions.problem((*path, "kind"), message, hint)]
    model = KINDS[kind]
    try:
        return model.model_validate(item), []
    except ValidationError as error:
        return None, problems_from_validation(error, positions, model, item, path, missing_ok=not complete)


def _validate_segment(item, index, positions):
    segment, problems = validate_entry(item, ("chain", index), positions)
    if segment is not None and segment.name is None:
        segment = segment.model_copy(update={"name": f"{segment.kind} {index + 1}"})
    return segment, problems


def parse_link(text, file="<string>", base_dir=None, allow_paths=(), *, reader=None):
    """Validate link text and return a :class:`Link`.

    Parameters
    ----------
    text : str
        The YAML document.
    file : str
        Name used in messages.
    base_dir : path-like, optional
        Folder for files the link refers to (own material files); default: the current folder.
    allow_paths : iterable of path-like
        Further folders those files may lie in, for the default reader.
    reader : object with ``read(path, folder)``, optional
        Where those files are read from (see :mod:`linkbudget.reader`); default: a
        :class:`~linkbudget.reader.WorkingTreeReader`, which confines them to the project holding
        ``base_dir`` (see :mod:`linkbudget.paths`). Each file is read once.

    Raises
    ------
    ConfigError
        With every problem found, each placed at its line, column and key path; an error inside a
        file the link refers to is placed at the key naming it, with the file's own place below.
    """
    data, positions = load_yaml(text, file)
    if not isinstance(data, dict):
        raise ConfigError([Problem(file, positions.mark(()), (), "a link file is a mapping of keys")])
    problems = []
    try:
        spec = LinkSpec.model_validate(data)
    except ValidationError as error:
        spec = None
        problems += problems_from_validation(error, positions, LinkSpec, data)
    chain = data.get("chain")
    wavelength_m = None if spec is None else spec.wavelengths_m()
    segments, seen, places, part_uses = [], {}, {}, []
    files = LinkFiles(reader or WorkingTreeReader(tuple(allow_paths)), Path(base_dir or "."))
    library = PartLibrary(files, spec.part_folders if spec is not None else (), positions)
    for index, item in enumerate(chain if isinstance(chain, list) else []):
        if is_part_use(item):
            segment, found, places[index], segment_files, use = library.use(item, index, positions)
            part_uses += [use] if use is not None else []
        else:
            segment, found = _validate_segment(item, index, positions)
            places[index], segment_files = Written(positions, ("chain", index)), files
        problems += found
        if segment is None:
            continue
        if spec is not None:
            try:
                segment = resolve_spectral(segment, wavelength_m).resolve(wavelength_m, segment_files)
            except InputProblem as problem:
                problems.append(places[index].problem(problem.key_path, str(problem), problem.hint,
                                                      cause=problem.cause))
                continue
        if segment.name in seen:
            problems.append(positions.problem(
                ("chain", index, "name"), f"duplicate segment name '{segment.name}'",
                f"already used by chain[{seen[segment.name]}]; names identify segments in diffs"))
        seen.setdefault(segment.name, index)
        segments.append(segment)
    problems += library.problems
    if not problems:
        problems = [places[index].problem(problem.key_path, str(problem), problem.hint)
                    for index, problem in chain_problems(segments, wavelength_m)]
        problems += [positions.problem(path, str(problem), problem.hint)
                     for path, problem in reachable_problems(spec.reachable, segments)]
    if problems:
        raise ConfigError(problems)
    return Link(spec, tuple(segments), file, (*files.read_paths, *library.read_paths), positions, tuple(part_uses))


def load_link(path, allow_paths=(), *, reader=None):
    """Read and validate a link file; see :func:`parse_link`.

    With a ``reader``, the link itself is read through it too (``reader.read(path)``), as are the
    files it refers to, relative to its folder; ``allow_paths`` is then the reader's business.
    """
    if reader is not None:
        source = reader.read(str(path))
        return parse_link(source.text, source.name, Path(str(path)).parent, reader=reader)
    path = Path(path)
    try:
        text = read_text(path)
    except ReadError as error:
        raise ConfigError([Problem(str(path), None, (), str(error), error.hint)]) from None
    except FileNotFoundError:
        raise ConfigError([Problem(str(path), None, (), "file not found")]) from None
    except IsADirectoryError:
        raise ConfigError([Problem(str(path), None, (), "is a directory, not a link file")]) from None
    except UnicodeDecodeError as error:
        before = error.object[: error.start]
        mark = Mark(before.count(b"\n") + 1, error.start - (before.rfind(b"\n") + 1) + 1)
        raise ConfigError([Problem(str(path), mark, (), f"not UTF-8 text ({error.reason})")]) from None
    except OSError as error:
        raise ConfigError([Problem(str(path), None, (), f"cannot read: {error.strerror}")]) from None
    return parse_link(text, str(path), path.parent, allow_paths)
