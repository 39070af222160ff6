"""Library warnings reach the user as one line in the package's words, or not at all."""

import os
import warnings

import numpy as np

import bayesgrowth
from bayesgrowth.cli.library_notes import library_warnings, notes_for

#: The installed package's folder, wherever the checkout or environment put it.
PACKAGE = os.path.dirname(bayesgrowth.__file__)


def _message(text, category, filename):
    return warnings.WarningMessage(text, category, filename, 1)


BLAS = ("PyTensor could not link to a BLAS installation. Operations that might benefit from "
        "BLAS will be severely degraded.\nThis usually happens when ...")


def test_each_kind_of_warning_becomes_one_plain_line_or_nothing():
    lib = "/venv/lib/python3.11/site-packages/"
    caught = [
        _message(BLAS, UserWarning, lib + "pytensor/link/c/cmodule.py"),
        _message(BLAS, UserWarning, lib + "pytensor/link/c/cmodule.py"),
        _message("overflow encountered in exp", RuntimeWarning, lib + "numpy/core/x.py"),
        _message("overflow encountered in exp", RuntimeWarning, lib + "numpy/core/x.py"),
        _message("invalid value encountered in divide", RuntimeWarning, lib + "numpy/x.py"),
        _message("the default of x will change", FutureWarning, lib + "arviz/stats.py"),
        _message("Estimated shape parameter of Pareto distribution is greater than 0.70",
                 UserWarning, lib + "arviz/stats/stats.py"),
        _message("sampling diagnostics failed: R-hat 1.2", UserWarning,
                 os.path.join(PACKAGE, "inference", "nuts.py")),
        _message("something else\nsecond line", UserWarning, lib + "xarray/core/x.py"),
    ]
    lines = notes_for(caught)
    assert lines == [
        "note: this machine's PyTensor has no optimised BLAS library, so the NUTS sampler "
        "runs slower; the results are the same",
        "warning: sampling diagnostics failed: R-hat 1.2",
        "note: xarray says: something else",
        "note: numpy reported 3 floating-point warning(s) (invalid value, overflow), as "
        "extreme posterior draws can give; the outputs above stand (BAYESGROWTH_DEBUG=1 "
        "shows where)",
    ]


def test_the_context_prints_notes_on_stderr_after_the_work(capsys):
    with library_warnings():
        with np.errstate(over="warn"):
            np.exp(np.array([1000.0]))
        warnings.warn("old spelling", DeprecationWarning, stacklevel=1)
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and err[0].startswith("note: numpy reported 1 floating-point")


def test_a_checkout_called_bayesgrowth_is_not_the_package():
    # a clone is often a folder named bayesgrowth: its tests and scripts are not the package
    outside = os.path.join(os.path.dirname(PACKAGE), "x", "bayesgrowth", "tests", "test_x.py")
    lines = notes_for([_message("overflow encountered in exp", RuntimeWarning, outside),
                       _message("a script's own note", UserWarning, outside)])
    assert lines[0].startswith("note: ") and "script's own note" in lines[0]
    assert lines[1].startswith("note: numpy reported 1 floating-point")


def test_debug_leaves_warnings_raw(capsys):
    with warnings.catch_warnings(record=True) as outer:
        warnings.simplefilter("always")
        with library_warnings(debug=True):
            warnings.warn("raw", UserWarning, stacklevel=1)
    assert [str(w.message) for w in outer] == ["raw"]
    assert capsys.readouterr().err == ""
