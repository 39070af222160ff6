"""Named models for a backtest: which curve, errors and engine each compared forecast uses.

A backtest compares *models*, each under a name that labels its rows, scores
and plots. A model is a :class:`ModelChoice`: a name, the method that forecasts
(a Bayesian engine, ``"exact"`` or ``"nuts"``, or a least-squares or baseline
method of :mod:`bayesgrowth.backtest.methods`) and, for the engines, the model
options passed to :func:`bayesgrowth.inference.fit_series`.

Models are named in a short text form, ``BASE[/MODIFIER...]``:

``default``
    The package's default: the damped local trend (growth fades towards a
    long-run rate), seasonal factors when the calendar allows (exact engine).
``local-trend``
    The local trend whose growth rate drifts without fading.
``exponential``, ``damped``, ``logistic``, ``gompertz``
    The growth curves, and any other family of :mod:`bayesgrowth.models.registry`
    (under its name, with the options the family's ``named_options`` give).
``log-linear``, ``log-linear-anchored``, ``revenue-scale``, ``naive``
    The least-squares fits and the naive baseline (no modifiers).

Modifiers: ``ar1`` (deviations persist), ``student-t`` (heavy-tailed noise),
``seasonal`` / ``no-seasons`` (force seasonal factors on or off), ``drifting-seasons``
(seasonal factors that drift, local trend only),
``random-walk`` / ``mean-reverting`` / ``adaptive`` (how a local trend's growth
drifts), and ``exact`` / ``nuts`` (the engine). Without an engine modifier a
model uses the exact engine when it covers the model, else NUTS. Examples:
``exponential/ar1``, ``default/nuts``, ``logistic/student-t``.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field

from bayesgrowth.backtest.methods import ALIASES, BAYESIAN, METHODS, check_methods
from bayesgrowth.config import DEFAULT_MODEL

__all__ = [
    "DEFAULT_MODELS",
    "ModelChoice",
    "choices_from_methods",
    "file_stem",
    "label_for_options",
    "parse_model",
    "resolve_models",
]

#: The models a backtest compares unless told otherwise.
DEFAULT_MODELS = ("default", "exponential", "log-linear")
#: When ``seasonal="auto"`` fits seasonal factors (see
#: :func:`bayesgrowth.models.spec.resolve_seasonal`), in a description's words.
AUTO_SEASONS = "seasonal factors when the calendar has two full years"



def _bases() -> dict[str, dict]:
    """Model options each text base stands for (merged over :data:`DEFAULT_MODEL`).

    ``default``, then every registered family under its name.
    """
    from bayesgrowth.models import registry

    return {"default": {}, **{f.name: {"model": f.name, **f.named_options}
                              for f in registry.families()}}

#: What each modifier sets.
_MODIFIERS = {
    "ar1": ("errors", "ar1"),
    "student-t": ("noise", "student-t"),
    "seasonal": ("seasonal", True),
    "no-seasons": ("seasonal", False),
    "drifting-seasons": ("seasonal", "drifting"),
    "random-walk": ("drift", "random-walk"),
    "mean-reverting": ("drift", "mean-reverting"),
    "adaptive": ("drift", "adaptive"),
    "exact": ("engine", "exact"),
    "nuts": ("engine", "nuts"),
}
#: Keys of a model given as a dict: model options, the engine, and sampler settings.
MODEL_KEYS = ("model", "errors", "noise", "seasonal", "drift", "season_drift")
SAMPLER_KEYS = ("draws", "chains", "tune", "target_accept", "cores")


@dataclass(frozen=True)
class ModelChoice:
    """One model of a backtest: its name, the method that forecasts, and its options.

    Attributes
    ----------
    name : str
        The label of the model's rows, scores and plots.
    method : str
        One of :data:`bayesgrowth.backtest.methods.METHODS`.
    options : dict
        For the Bayesian methods, options passed to
        :func:`bayesgrowth.inference.fit_series` (model and sampler settings);
        empty otherwise.
    """

    name: str
    method: str
    options: dict = field(default_factory=dict)

    @property
    def bayesian(self) -> bool:
        """Whether the model is fitted by a Bayesian engine (and has sampling diagnostics)."""
        return self.method in BAYESIAN

    def describe(self, series=None, splitter=None) -> str:
        """The model in words, e.g. ``"exponential, independent errors, ... (exact engine)"``.

        Parameters
        ----------
        series : GrowthSeries, optional
            The backtested series: seasonal factors left to the calendar
            (``seasonal="auto"``) are decided on it as the fits decide them. Without
            it the description says when they are fitted.
        splitter : RollingOrigin, optional
            The backtest's origins, whose training sets the exact engine decides
            seasons on (each fit on its own); by default the whole series.

        Returns
        -------
        str
        """
        if not self.bayesian:
            return {"log-linear": "least squares on the log values",
                    "log-linear, anchored": "least squares on the log values, through the "
                    "first value",
                    "revenue-scale": "least squares on the values (point forecast)",
                    "naive": "last value carried forward (random walk on the log scale)",
                    }[self.method]
        return f"{self._label(series, splitter)} ({self.method} engine)"

    def _label(self, series, splitter) -> str:
        """The model's label, with the seasonal factors that ``"auto"`` gives its fits."""
        from bayesgrowth.models.spec import resolve_seasonal

        spec = _spec(self.options)
        if self.options.get("seasonal") != "auto" or not spec.family.auto_seasonal:
            return spec.label()
        seasonal = _spec({**self.options, "seasonal": True}).label()
        if series is None:
            return f"{spec.label()}; {AUTO_SEASONS}"
        train_sets = [t for t, _ in splitter.split(series.n)] if (
            splitter is not None and not self._seasons_on_whole_series()) else [
            range(series.n)]
        on = [bool(resolve_seasonal("auto", series.axis, series.t[list(t)], spec.model))
              for t in train_sets]
        if all(on):
            return seasonal
        if not any(on):
            return spec.label()
        first = series.labels[train_sets[on.index(True)][-1]]
        return f"{spec.label()}; seasonal factors from origin {first} on, two full years in"

    def _seasons_on_whole_series(self) -> bool:
        """Whether "auto" seasons are decided once on the whole series (a NUTS refit)."""
        if self.method != "nuts":
            return False
        from bayesgrowth.inference import refit

        return refit.supports(self.options)


def _spec(options: Mapping):
    """The :class:`ModelSpec` of model options, ``seasonal="auto"`` read as no seasons."""
    from bayesgrowth.models.spec import ModelSpec

    keys = {k: options[k] for k in MODEL_KEYS if k in options}
    seasonal = keys.get("seasonal", False)
    keys["seasonal"] = seasonal if seasonal in (True, "drifting") else False
    return ModelSpec(**keys)


def _engine_for(name: str, options: dict, engine: str | None) -> str:
    """The engine of a Bayesian model: as asked, else exact where it covers the model."""
    spec = _spec(options)
    covered = spec.exact_fits
    if engine is None:
        engine = "exact" if covered else "nuts"
    if engine == "exact" and not covered:
        from bayesgrowth.models.registry import exact_coverage

        raise ValueError(
            f"model {name!r}: the exact engine fits {exact_coverage()}, not {spec.label()}; "
            f"use the nuts engine ({_nuts_name(name)})"
        )
    if engine == "nuts" and spec.adaptive:
        raise ValueError(f"model {name!r}: adaptive drift needs the exact engine")
    return engine


def _nuts_name(name: str) -> str:
    """How to ask for the NUTS engine: the text name with ``/nuts``, or the dict key."""
    parts = name.split("/")
    if parts[0] in _bases():
        return "/".join([p for p in parts if p != "exact"] + ["nuts"])
    return "engine='nuts' in its options"


def _from_options(name: str, given: Mapping) -> ModelChoice:
    allowed = (*MODEL_KEYS, "engine", *SAMPLER_KEYS)
    unknown = [k for k in given if k not in allowed]
    if unknown:
        raise ValueError(f"model {name!r}: unknown option {unknown[0]!r}; use "
                         f"{', '.join(allowed)}")
    options = {**DEFAULT_MODEL, **{k: v for k, v in given.items() if k != "engine"}}
    engine = given.get("engine")
    if engine is not None and engine not in BAYESIAN:
        raise ValueError(f"model {name!r}: engine must be exact or nuts, got {engine!r}")
    try:
        if not _spec(options).family.drifts:
            options.pop("drift")  # only the local trend's growth drifts
        return ModelChoice(name, _engine_for(name, options, engine), options)
    except ValueError as exc:
        text = str(exc)
        prefix = f"model {name!r}"
        raise ValueError(text if text.startswith(prefix) else f"{prefix}: {text}") from None


def parse_model(text: str) -> ModelChoice:
    """The model a text such as ``"exponential/ar1"`` names (see the module docstring).

    Parameters
    ----------
    text : str
        ``BASE[/MODIFIER...]``; case and surrounding blanks are ignored.

    Returns
    -------
    ModelChoice
        Named by the text (lowercased, without blanks).

    Raises
    ------
    ValueError
        Naming the unknown part and the allowed ones.
    """
    name = re.sub(r"\s*/\s*", "/", str(text).strip().lower())
    base, *mods = name.split("/")
    method = ALIASES.get(base, base)
    if method in METHODS and method not in BAYESIAN:
        if mods:
            raise ValueError(f"model {name!r}: {base} takes no modifiers")
        return ModelChoice(name, method)
    bases = _bases()
    if base not in bases:
        names = [*bases, *(m for m in METHODS if m not in BAYESIAN and "," not in m),
                 "log-linear-anchored"]
        hint = " (name a model; the engine is a modifier, e.g. default/nuts)" if (
            base in BAYESIAN) else ""
        raise ValueError(f"unknown model {base!r}{hint}; choose from {', '.join(names)}")
    options = dict(bases[base])
    for mod in mods:
        if mod not in _MODIFIERS:
            raise ValueError(f"model {name!r}: unknown modifier {mod!r}; choose from "
                             f"{', '.join(_MODIFIERS)}")
        key, value = _MODIFIERS[mod]
        options[key] = value
    return _from_options(name, options)


def label_for_options(options: Mapping) -> str:
    """The text name of Bayesian model options, e.g. ``"logistic/ar1"``.

    :func:`parse_model` of the name gives the same model; the engine is left to
    its default choice (exact where it covers the model).

    Parameters
    ----------
    options : mapping
        Model options (``model``, ``errors``, ``noise``, ``seasonal``, ``drift``),
        missing ones taken from :data:`bayesgrowth.config.DEFAULT_MODEL`.

    Returns
    -------
    str
    """
    spec = _spec({**DEFAULT_MODEL, **options})
    seasonal = options.get("seasonal", DEFAULT_MODEL["seasonal"])
    family = spec.family
    base = spec.model
    if spec.model == DEFAULT_MODEL["model"] and family.drifts and (
            spec.drift != family.named_options.get("drift")):
        base = "default" if spec.drift == DEFAULT_MODEL["drift"] else f"default/{spec.drift}"
    mods = [m for m, on in (("ar1", spec.errors == "ar1"), ("student-t", spec.noise != "normal"),
                            ("seasonal", seasonal is True),
                            ("drifting-seasons", seasonal == "drifting"),
                            ("no-seasons", seasonal is False and family.auto_seasonal))
            if on]
    return "/".join([base, *mods])


def _one(name: str | None, spec) -> ModelChoice:
    if isinstance(spec, ModelChoice):
        choice = spec
    elif isinstance(spec, str):
        choice = parse_model(spec)
    elif isinstance(spec, Mapping):
        if name is None:
            raise ValueError("a model given as options needs a name: pass {name: options}")
        return _from_options(str(name), spec)
    else:
        raise ValueError(f"a model is a name, a dict of options or a ModelChoice, got {spec!r}")
    return choice if name is None else ModelChoice(str(name), choice.method, choice.options)


def resolve_models(models) -> tuple[ModelChoice, ...]:
    """The models of a backtest, from any of the accepted forms, in order, named uniquely.

    Parameters
    ----------
    models : str, mapping or iterable
        A text such as ``"default,exponential,log-linear"``; a mapping of names to
        specs (a text name such as ``"log-linear"``, a dict of model options with an
        optional ``engine``, e.g. ``{"model": "exponential"}``, merged over
        :data:`bayesgrowth.config.DEFAULT_MODEL`, or a :class:`ModelChoice`); or an
        iterable of text names and :class:`ModelChoice` objects.

    Returns
    -------
    tuple of ModelChoice

    Raises
    ------
    ValueError
        If a model is unknown or invalid, two models share a name, or none is given.
    """
    if isinstance(models, str):
        models = [m for m in models.split(",") if m.strip()]
    if isinstance(models, Mapping):
        choices = [_one(name, spec) for name, spec in models.items()]
    elif isinstance(models, Iterable):
        choices = [_one(None, spec) for spec in models]
    else:
        raise ValueError(f"models must be names, a mapping or a list, got {models!r}")
    if not choices:
        raise ValueError(f"name at least one model, e.g. {','.join(DEFAULT_MODELS)}")
    seen: set[str] = set()
    for c in choices:
        if not c.name.strip():
            raise ValueError("a model name is empty; name every model")
        if c.name in seen:
            raise ValueError(f"model name {c.name!r} appears twice; name every model once")
        seen.add(c.name)
    return tuple(choices)


def choices_from_methods(methods, model_options: dict | None) -> tuple[ModelChoice, ...]:
    """One model per method name, each named by its method, sharing ``model_options``.

    The Bayesian methods fit the exponential curve unless ``model_options`` name a model
    (this form's meaning from before models were named).
    """
    shared = {"model": "exponential", **(model_options or {})}
    return tuple(ModelChoice(m, m, dict(shared) if m in BAYESIAN else {})
                 for m in check_methods(methods))


def file_stem(names: Iterable[str]) -> dict[str, str]:
    """A file-name stem per model name: lowercase letters, digits and dashes, unique.

    Parameters
    ----------
    names : iterable of str

    Returns
    -------
    dict of str to str
    """
    out: dict[str, str] = {}
    for name in names:
        stem = re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-") or "model"
        base, k = stem, 2
        while stem in out.values():
            stem, k = f"{base}-{k}", k + 1
        out[name] = stem
    return out
