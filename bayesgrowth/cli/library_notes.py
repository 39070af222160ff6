"""Warnings of the libraries underneath, said in the package's words: one line each, or nothing.

The numerical libraries warn in their own terms (a missing BLAS library, a
floating-point overflow, a deprecation). A command records every warning its
work did not handle itself and, once the work is done, prints on stderr what
matters to its user: our own warnings as they are, a known library warning as
one plain line, floating-point warnings counted in one line, and developer
matters (deprecations) not at all. ``BAYESGROWTH_DEBUG=1`` shows them raw.
"""

from __future__ import annotations

import os
import sys
import warnings
from collections import Counter
from collections.abc import Iterator
from contextlib import contextmanager

__all__ = ["library_warnings", "notes_for"]

#: Warnings a user cannot act on: they concern the code, not the forecast.
DEVELOPER = (DeprecationWarning, PendingDeprecationWarning, FutureWarning, ImportWarning)

#: Library messages already said in our words elsewhere (PSIS-LOO's Pareto k).
SAID_ELSEWHERE = ("Estimated shape parameter of Pareto distribution",
                  "shape parameter of Pareto", "pareto_k")

#: Known library messages and what to say instead.
KNOWN = {
    "could not link to a BLAS": "this machine's PyTensor has no optimised BLAS library, so "
    "the NUTS sampler runs slower; the results are the same",
}


#: The package's own folder: a warning raised from a file inside it is the package's.
_PACKAGE = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _ours(w: warnings.WarningMessage) -> bool:
    # by location, not by name: a checkout is often itself a folder called bayesgrowth
    return os.path.abspath(str(w.filename)).startswith(_PACKAGE + os.sep)


def notes_for(caught: list[warnings.WarningMessage]) -> list[str]:
    """The lines to print for the warnings ``caught``, in order, without repeats.

    Parameters
    ----------
    caught : list of warnings.WarningMessage

    Returns
    -------
    list of str
        ``warning: ...`` for the package's own warnings, ``note: ...`` for the
        libraries'.
    """
    lines: list[str] = []
    numeric: Counter[str] = Counter()
    for w in caught:
        text = str(w.message).strip()
        first = text.splitlines()[0] if text else w.category.__name__
        if _ours(w):
            line = f"warning: {first}"
        elif issubclass(w.category, DEVELOPER) or any(s in text for s in SAID_ELSEWHERE):
            continue
        elif issubclass(w.category, RuntimeWarning):
            numeric[first.split(" encountered")[0]] += 1
            continue
        else:
            known = next((say for key, say in KNOWN.items() if key in text), None)
            source = str(w.filename).replace("\\", "/").split("site-packages/")[-1]
            library = source.split("/")[0] or "a library"
            line = f"note: {known}" if known else f"note: {library} says: {first[:160]}"
        if line not in lines:
            lines.append(line)
    if numeric:
        kinds = ", ".join(sorted(numeric))
        lines.append(f"note: numpy reported {sum(numeric.values())} floating-point warning(s) "
                     f"({kinds}), as extreme posterior draws can give; the outputs above "
                     "stand (BAYESGROWTH_DEBUG=1 shows where)")
    return lines


@contextmanager
def library_warnings(*, debug: bool = False) -> Iterator[None]:
    """Record the warnings a command leaves unhandled; print :func:`notes_for` them on success.

    Parameters
    ----------
    debug : bool
        Leave the warnings alone (Python prints them raw).
    """
    if debug:
        yield
        return
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("default")
        yield
    for line in notes_for(caught):
        print(line, file=sys.stderr)
