"""``--reference-period``: refused in one line naming the option when no observation has it."""

from __future__ import annotations

from bayesgrowth.cli.common import UsageError
from bayesgrowth.data.series import InputError

__all__ = ["check_reference_period"]


def check_reference_period(args, series, first_train: int | None = None,
                           models=()) -> None:
    """Refuse a ``--reference-period`` that names no observation the fit will see.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed options; without ``reference_period`` (or with ``None``) nothing
        is checked.
    series : GrowthSeries
        The series read from ``args.file``.
    first_train : int, optional
        A backtest's first training set: the reference period must be among its
        first ``first_train`` observations, since every origin's fit refers to it.
    models : iterable of str
        Model families the run fits; those with states (the local trend) anchor
        their level at the first observation, so any other reference period is
        refused for them.

    Raises
    ------
    UsageError
        Naming the option, the periods it may take and what to do.
    """
    label = getattr(args, "reference_period", None)
    if label is None:
        return
    part = series if first_train is None else series.head(first_train)
    try:
        at = part.index_of(label)
    except InputError:
        labels = part.labels
        where = (f"the backtest's first training set (the first {first_train} points of "
                 f"{args.file})" if first_train is not None else str(args.file))
        raise UsageError(
            f"--reference-period {label}: no observation of {where} has this period (they run "
            f"from {labels[0]} to {labels[-1]}); name one of them, or leave the option out "
            f"to refer to the first ({labels[0]})"
        ) from None
    from bayesgrowth.models.registry import families, get_family

    anchored = [m for m in dict.fromkeys(models) if get_family(m).states]
    if at != 0 and anchored:
        curves = ", ".join(f.name for f in families() if not f.states)
        raise UsageError(
            f"--reference-period {label}: the {anchored[0]} model anchors its level at the "
            f"first observation ({part.labels[0]}); leave the option out, or fit only "
            f"curves ({curves})"
        )
