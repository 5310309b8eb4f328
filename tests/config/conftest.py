"""Every input test in this folder runs twice: with libyaml's parser and with PyYAML's pure-Python
one, so that the placed errors (file, line, column, key path) are the same whichever a user's
PyYAML was built with."""

import pytest

from linkbudget import yamlread

_LOADERS = {"libyaml": yamlread.loader_class(yamlread.FastParser),
            "pure-python": yamlread.loader_class(yamlread.PurePythonParser)}


@pytest.fixture(autouse=True, params=sorted(_LOADERS))
def yaml_parser(request, monkeypatch):
    """The parser this run of the test reads YAML with."""
    monkeypatch.setattr(yamlread, "LOADER", _LOADERS[request.param])
    return request.param
