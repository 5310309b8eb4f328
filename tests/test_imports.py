"""Every module of the package imports on its own, first, in a fresh interpreter (an import cycle
shows only in the order that enters it; the command line and the test suite each take one order)."""

import pkgutil
import subprocess
import sys

import linkbudget

MODULES = sorted(info.name for info in pkgutil.walk_packages(linkbudget.__path__, "linkbudget."))

#: Imports each module first: linkbudget's modules are dropped from sys.modules between them
#: (numpy, pydantic and the rest stay loaded, so one interpreter does it quickly).
PROGRAM = """
import importlib, sys
failed = []
for name in sys.argv[1:]:
    for loaded in [key for key in sys.modules if key == "linkbudget" or key.startswith("linkbudget.")]:
        del sys.modules[loaded]
    try:
        importlib.import_module(name)
    except Exception as error:
        failed.append(f"{name}: {type(error).__name__}: {error}")
print("\\n".join(failed))
"""


def test_every_module_imports_first():
    assert len(MODULES) > 50
    done = subprocess.run([sys.executable, "-c", PROGRAM, *MODULES], capture_output=True, text=True, check=True)
    assert done.stdout.strip() == ""
