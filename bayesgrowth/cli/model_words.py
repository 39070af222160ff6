"""Library messages and model checks in the command line's own words."""

from __future__ import annotations

import re

__all__ = ["check_ceiling", "cli_spelling", "exact_covers", "exact_refusal"]

#: The command-line option of each model keyword the library's messages name.
_OPTION_OF = {"noise": "--noise-dist", "errors": "--errors", "engine": "--engine",
              "seasonal": "--seasonal", "drift": "--drift", "model": "--model"}
#: How ``--seasonal`` spells the library's true and false.
_SEASONAL_WORD = {"true": "yes", "false": "no"}
_KEYWORD = re.compile(r"\b(" + "|".join(_OPTION_OF) + r")=(['\"]?)([\w-]+)\2")


def cli_spelling(message: str) -> str:
    """A library message with its model keywords spelled as the command line's options.

    ``noise='normal'`` becomes ``--noise-dist normal``, ``seasonal=False`` becomes
    ``--seasonal no``, and likewise for errors, engine, drift and model.

    Examples
    --------
    >>> cli_spelling("use noise='normal' with it, or fit with seasonal=False")
    'use --noise-dist normal with it, or fit with --seasonal no'
    """
    def option(match: re.Match) -> str:
        key, value = match.group(1), match.group(3)
        if key == "seasonal":
            value = _SEASONAL_WORD.get(value.lower(), value)
        return f"{_OPTION_OF[key]} {value}"

    return _KEYWORD.sub(option, message)


def check_ceiling(args, models) -> None:
    """Refuse ``--ceiling`` when none of ``models`` (family names) has a ceiling.

    Raises
    ------
    UsageError
        Naming the curves the option applies to.
    """
    from bayesgrowth.models import registry

    value = getattr(args, "ceiling", None)
    models = list(models)
    if value is None or any(registry.get_family(m).ceiling for m in models):
        return
    curves = " or ".join(f"--model {f.name}" for f in registry.families() if f.ceiling)
    names = list(dict.fromkeys(models))
    which = (f"not to the {' or '.join(names)} model{'s' if len(names) > 1 else ''}" if names
             else "and no model of this run has one")
    from bayesgrowth.cli.common import UsageError

    raise UsageError(
        f"--ceiling {value:,.6g}: applies only to the curves with a ceiling ({curves}), "
        f"{which}; choose one of those curves or leave --ceiling out"
    )


def exact_covers(spec) -> bool:
    """Whether the exact engine fits ``spec`` (declared by its family in the registry)."""
    return spec.exact_fits


def exact_refusal(spec, option: str = "--engine") -> str:
    """The one-line refusal for a model the exact engine does not fit."""
    from bayesgrowth.models.registry import exact_coverage

    return (f"{option}: the exact engine fits {exact_coverage()}, not {spec.label()}; "
            f"use nuts instead of exact ({option} nuts)")
