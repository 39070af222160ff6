"""Collection settings for the doctests of the package (``--doctest-modules``, pyproject).

A module whose examples need an optional extra is left out when that extra is not
installed, so the suite runs on the core dependencies alone.
"""

from importlib.util import find_spec

#: Module of the package -> the import its examples need (from an optional extra).
NEEDS_EXTRA = {
    "bayesgrowth/batch/executors.py": "distributed",  # extra "dask"
    "bayesgrowth/data/excel.py": "openpyxl",  # extra "excel"
}

collect_ignore = [path for path, module in NEEDS_EXTRA.items() if find_spec(module) is None]

#: The test folders' conftest files are plugins, not modules with examples: collected as
#: doctest modules, two files of the same name clash on import.
collect_ignore_glob = ["tests/conftest.py", "tests/*/conftest.py"]
