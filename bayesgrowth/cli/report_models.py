"""``report --models``: several curves compared and averaged in the report's model section."""

from __future__ import annotations

import argparse

from bayesgrowth.cli.common import say

__all__ = ["add_models_option", "average_from_args"]


def add_models_option(p: argparse.ArgumentParser) -> None:
    """Register ``--models`` on ``report``."""
    from bayesgrowth.select.averaging import registered_models

    p.add_argument(
        "--models", default=None, metavar="LIST",
        help="also fit these curves (comma-separated, from "
        f"{', '.join(registered_models())}), compare them by PSIS-LOO and show their "
        "stacking weights, with their uncertainty, and the forecast that mixes them by "
        "weight; the headline forecast stays that of --model [none]",
    )


def average_from_args(args, series, priors):
    """Fit the curves ``--models`` names and average them; ``None`` without the option.

    Bad names or combinations raise a usage error before any fit.
    """
    if not args.models:
        return None
    from bayesgrowth.cli.models import _check_models, _model_list, _spec_options
    from bayesgrowth.select.averaging import fit_models, model_average

    names = _model_list(args.models)
    spec_options = _spec_options(args)
    engine = "auto" if args.engine == "exact" else "nuts"
    _check_models(names, series, priors, spec_options, engine)
    fits = fit_models(series, names, engine=engine, seed=args.seed, priors=priors,
                      on_fit=lambda name: say(args, f"fitting {name} for the comparison ..."),
                      draws=args.draws, chains=args.chains, **spec_options)
    return model_average(fits, args.horizon, levels=args.levels, seed=args.seed)
