"""The grid over ``theta`` of the exact state-space engine: locate the mass, then weigh it.

A coarse grid over the prior's range (every coordinate in logs) locates the posterior
mass (:func:`locate`); a finer midpoint grid over that box, the standard deviations on
their natural scale and the half-life in logs, carries the weights prior times
likelihood (:func:`on_grid`); :func:`shrink` tightens the box from those weights. Once the
box holds, :func:`remap` spaces each dimension's points by the posterior's marginal density
(next section). With ``drift="adaptive"`` there are two branches of nodes, drifting and
fading growth, each with half the prior mass (:func:`branches`).

Mapped points
-------------
An evenly spaced grid spends most of its points on the box's tails: the posterior of the
half-life, say, is a narrow peak with long tails on both sides, and the box must hold the
tails. So after the box holds, the points of each dimension are the midpoints of a grid that
is even in a mapped coordinate ``v = G(x)``, where ``G`` is the distribution function of the
density ``g ∝ f^(1/4) + 1%`` built from the marginal posterior density ``f`` of the previous
pass (log-linear between its rows). Each node is the midpoint of its cell and weighs prior
times likelihood times the cell's volume, as before: a midpoint rule, in coordinates where the
integrand is flatter. The power: for the midpoint rule, the error is smallest with a node
density growing as ``|f''|^(1/3)`` (from the rule's ``h^2 f''/24`` error per cell), about
``f^(1/3)`` for a bell-shaped ``f``; the forecast depends on the tails more than the
marginal's mass does, hence the smaller power and the 1% floor spread over the box. On the
40-point quarterly series of ``benchmarks/forecast.py``, in its final box, six mapped points
per dimension (1,296 nodes) put the band quantiles within 0.5-0.7% of the 80% band's width of
a 30-point even grid's, closer than twelve even points (20,736 nodes, 1.1%). Only grids of
four or more dimensions are mapped (:mod:`bayesgrowth.inference.statespace`); smaller ones
are cheap with even points.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from bayesgrowth.inference.statespace_nodes import Context, evaluate
from bayesgrowth.inference.theta import ThetaDim, rho_of, theta_dims

__all__ = ["Branch", "CELL_NAMES", "COARSE", "FINE", "branches", "locate", "moved", "on_grid",
           "remap", "shrink"]

COARSE = {False: 6, True: 5}  # points per dimension of the locating grid (3-D, 4-D or 5-D)
FINE = {False: 8, True: 6}  # and of the weighting grid
_KEEP = 15.0  # coarse-grid cells within e^-15 of the best bound the fine box
_MASS = 1e-4  # a fine-grid cell row with less marginal mass than this leaves the box
_POWER = 0.25  # mapped points: density of points as the marginal density to this power
_FLOOR = 0.01  # plus this share of an even spread, so the tails keep points
_FINE_MAP = 400  # pieces of the piecewise-linear map per dimension
#: The parameters a grid may span (:meth:`Branch.cells` reports a cell width for each).
CELL_NAMES = ("sigma", "sigma_level", "sigma_growth", "sigma_season", "half_life")


@dataclass
class Branch:
    """One family of nodes: random-walk growth or fading growth."""

    dims: list[ThetaDim]
    fades: bool
    prior_mass: float
    box: list[tuple[float, float]] = field(default_factory=list)
    log: list[bool] = field(default_factory=list)
    #: per dimension, the map ``(v, x)`` of :func:`remap` (``None``: even points)
    maps: list | None = None
    #: per dimension, the points and cell widths of the last :meth:`nodes`
    axes: list = field(default_factory=list)

    def __post_init__(self) -> None:
        self.log = [True] * len(self.dims)

    def nodes(self, k: int, box=None) -> tuple[dict, np.ndarray, dict]:
        """The nodes of a ``k``-per-dimension grid: parameters, log cell volumes, cell widths.

        Each node is the midpoint of its cell: even in the box, or even in each
        dimension's mapped coordinate once :func:`remap` has set :attr:`maps` (then only
        within :attr:`box`). Everything separable (values, log priors, widths) is worked
        out per dimension and then spread over the ``G = k^D`` nodes, the last dimension
        running fastest.

        Returns
        -------
        params : dict
            Natural-scale parameters ``(G,)`` and ``log_prior``, their prior log density.
        log_volume : numpy.ndarray, shape (G,)
            The log of each cell's volume in grid coordinates.
        cells : dict
            See :meth:`cells`.
        """
        box = box or [d.span(lg) for d, lg in zip(self.dims, self.log, strict=True)]
        if self.maps is None:
            edges = [np.linspace(lo, hi, k + 1) for lo, hi in box]
        else:
            v = np.linspace(0.0, 1.0, k + 1)
            edges = [np.interp(v, *m) for m in self.maps]
        self.axes = [(0.5 * (e[1:] + e[:-1]), np.diff(e)) for e in edges]
        shape = tuple(c.size for c, _ in self.axes)
        pairs = list(zip(self.dims, self.log, self.axes, strict=True))
        out = {"sigma_level": np.zeros(math.prod(shape))}
        for i, (d, lg, (centre, _)) in enumerate(pairs):
            out[d.name] = _spread(d.value(centre, lg), i, shape)
        out["rho"] = rho_of(out["half_life"]) if self.fades else np.ones(math.prod(shape))
        if not self.fades:
            out["half_life"] = np.full(math.prod(shape), np.inf)
        out["log_prior"] = _outer_sum([d.log_prior(c, lg) for d, lg, (c, _) in pairs], shape)
        log_volume = _outer_sum([np.log(w) for _, w in self.axes], shape)
        return out, log_volume, self.cells(shape)

    def cells(self, shape: tuple[int, ...]) -> dict:
        """Each node's cell width per parameter, in its grid coordinate (0 off the grid).

        ``cell_<name>`` is the width, ``cell_log_<name>`` whether the coordinate is the
        log of the parameter; the same keys for every branch, so nodes concatenate.
        ``shape`` is the grid's points per dimension (of the last :meth:`nodes`).
        """
        g = math.prod(shape)
        out = {}
        for name in CELL_NAMES:
            out[f"cell_{name}"] = np.zeros(g)
            out[f"cell_log_{name}"] = np.zeros(g, dtype=bool)
        for i, (d, lg, (_, width)) in enumerate(zip(self.dims, self.log, self.axes, strict=True)):
            out[f"cell_{d.name}"][:] = _spread(width, i, shape)
            out[f"cell_log_{d.name}"][:] = lg
        return out

    def to_fine(self) -> None:
        """Switch the standard deviations' box from ``log x`` to ``x``."""
        span = [d.span() for d in self.dims]
        for i, d in enumerate(self.dims):
            if d.linear_fine:
                lo, hi = self.box[i]
                self.box[i] = (0.0 if lo <= span[i][0] else math.exp(lo), math.exp(hi))
                self.log[i] = False


def _spread(values: np.ndarray, axis: int, shape: tuple[int, ...]) -> np.ndarray:
    """One dimension's values ``(shape[axis],)`` at every node of the grid, ``(prod(shape),)``."""
    at = [1] * len(shape)
    at[axis] = shape[axis]
    return np.broadcast_to(values.reshape(at), shape).ravel()


def _outer_sum(terms: list[np.ndarray], shape: tuple[int, ...]) -> np.ndarray:
    """Per node, the sum of one term per dimension (added in the dimensions' order)."""
    total = np.zeros(1)
    for axis, term in enumerate(terms):
        at = [1] * len(shape)
        at[axis] = shape[axis]
        total = total + term.reshape(at)
    return np.broadcast_to(total, shape).ravel()


def locate(branch: Branch, ctx: Context, k: int) -> list[tuple[float, float]]:
    """The box of ``u`` holding the posterior mass, from a coarse grid over the prior range."""
    p, _, _ = branch.nodes(k)
    lp = evaluate(ctx, p)["loglik"] + p["log_prior"]
    lp = lp.reshape((k,) * len(branch.dims))
    best = lp.max()
    box = []
    for d, dim in enumerate(branch.dims):
        lo, hi = dim.span()
        step = (hi - lo) / k
        profile = lp.max(axis=tuple(i for i in range(lp.ndim) if i != d))
        kept = np.flatnonzero(profile >= best - _KEEP)
        box.append((max(lo, lo + (kept[0] - 0.5) * step),
                    min(hi, lo + (kept[-1] + 1.5) * step)))
    return box


def _marginals(weight: np.ndarray, k: int, n_dims: int) -> list[np.ndarray]:
    """Per dimension, the share of the weight in each of a ``k``-per-dimension grid's rows."""
    w = weight.reshape((k,) * n_dims)
    total = w.sum()
    return [w.sum(axis=tuple(i for i in range(n_dims) if i != d)) / total
            for d in range(n_dims)]


def shrink(branch: Branch, weight: np.ndarray, k: int) -> list[tuple[float, float]]:
    """A tighter box from a fine grid's weights: the cells whose marginal mass counts."""
    box = []
    marginals = _marginals(weight, k, len(branch.dims))
    for d, ((lo, hi), marginal) in enumerate(zip(branch.box, marginals, strict=True)):
        step = (hi - lo) / k
        kept = np.flatnonzero(marginal >= _MASS)
        span_lo, span_hi = branch.dims[d].span(branch.log[d])
        box.append((max(span_lo, lo + (kept[0] - 1.0) * step),
                    min(span_hi, lo + (kept[-1] + 2.0) * step)))
    return box


def remap(branch: Branch, weight: np.ndarray, k: int) -> None:
    """Space the next pass's points by the marginal posterior densities of this pass.

    ``weight`` holds this pass's ``k``-per-dimension nodes' weights (any scale). Per
    dimension: the marginal density at each row (its mass over its width), log-linear
    between rows and flat beyond them, gives ``g = f^(1/4)`` plus 1% of its mean; the map
    is ``g``'s distribution function over the box (see the module docstring).
    """
    maps = []
    marginals = _marginals(weight, k, len(branch.dims))
    for (lo, hi), (centre, width), mass in zip(branch.box, branch.axes, marginals, strict=True):
        log_f = np.log(np.maximum(mass, 1e-300) / width)
        x = np.linspace(lo, hi, _FINE_MAP + 1)
        g = np.exp(_POWER * (np.interp(x, centre, log_f) - log_f.max()))
        g = g / g.mean() + _FLOOR
        cdf = np.concatenate([[0.0], np.cumsum(0.5 * (g[1:] + g[:-1]))])
        maps.append((cdf / cdf[-1], x))
    branch.maps = maps


def branches(spec, priors) -> list[Branch]:
    """The node families of a local trend: drifting, fading, or both with half the mass each."""
    drifts = getattr(spec, "season_drift", False)
    if spec.drift == "adaptive":
        return [Branch(theta_dims(priors, False, drifts), False, 0.5),
                Branch(theta_dims(priors, True, drifts), True, 0.5)]
    fades = spec.drift == "mean-reverting"
    return [Branch(theta_dims(priors, fades, drifts), fades, 1.0)]


def on_grid(ctx, branches, k_of) -> tuple[dict, np.ndarray, dict, float, list]:
    """Evaluate every branch on its grid; node weights, branch weights, log evidence."""
    parts, logw, log_ev, within = [], [], {}, []
    for b in branches:
        p, log_volume, cells = b.nodes(k_of(b), b.box)
        ev = evaluate(ctx, p)
        lw = ev["loglik"] + p["log_prior"] + log_volume + math.log(b.prior_mass)
        parts.append({**{k: v for k, v in p.items() if k != "log_prior"}, **ev, **cells})
        logw.append(lw)
        top = lw.max()
        within.append(np.exp(lw - top))
        log_ev["fading" if b.fades else "drifting"] = top + math.log(within[-1].sum())
    if len(parts) == 1:  # one branch: nothing to join (a copy of every array otherwise)
        nodes, lw = parts[0], logw[0]
    else:
        nodes = {k: np.concatenate([p[k] for p in parts]) for k in parts[0]}
        lw = np.concatenate(logw)
    top = lw.max()
    w = np.exp(lw - top)
    total = top + math.log(w.sum())
    branch_w = {k: math.exp(v - total) for k, v in log_ev.items()}
    # the likelihood is of log values; the evidence of the values subtracts sum(log y)
    return nodes, w / w.sum(), branch_w, total - float(ctx.y.sum()), within


def moved(old, new) -> bool:
    """Whether a box shrank by more than a quarter in any dimension."""
    return any((nh - nl) < 0.75 * (oh - ol) for (ol, oh), (nl, nh) in zip(old, new, strict=True))
