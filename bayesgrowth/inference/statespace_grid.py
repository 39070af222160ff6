"""The grid over ``theta`` of the exact state-space engine: locate the mass, then weigh it.

A coarse grid over the prior's range (every coordinate in logs) locates the posterior
mass (:func:`locate`); a finer midpoint grid over that box, the standard deviations on
their natural scale and the half-life in logs, carries the weights prior times
likelihood (:func:`on_grid`); :func:`shrink` tightens the box from those weights. With
``drift="adaptive"`` there are two branches of nodes, drifting and fading growth, each
with half the prior mass (:func:`branches`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from bayesgrowth.inference.statespace_nodes import Context, evaluate
from bayesgrowth.inference.theta import ThetaDim, rho_of, theta_dims

__all__ = ["Branch", "CELL_NAMES", "COARSE", "FINE", "branches", "locate", "moved", "on_grid",
           "shrink"]

COARSE = {False: 6, True: 5}  # points per dimension of the locating grid (3-D, 4-D or 5-D)
FINE = {False: 8, True: 6}  # and of the weighting grid
_KEEP = 15.0  # coarse-grid cells within e^-15 of the best bound the fine box
_MASS = 1e-4  # a fine-grid cell row with less marginal mass than this leaves the box
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

    def __post_init__(self) -> None:
        self.log = [True] * len(self.dims)

    def nodes(self, k: int, box=None) -> tuple[np.ndarray, float]:
        """Cell midpoints ``(G, D)`` of a ``k``-per-dimension grid, and the cell volume."""
        box = box or [d.span(lg) for d, lg in zip(self.dims, self.log, strict=True)]
        axes = [lo + (np.arange(k) + 0.5) * (hi - lo) / k for lo, hi in box]
        mesh = np.meshgrid(*axes, indexing="ij")
        vol = float(np.prod([(hi - lo) / k for lo, hi in box]))
        return np.stack([m.ravel() for m in mesh], axis=1), vol

    def params(self, u: np.ndarray) -> dict:
        """Natural-scale parameters of the nodes (and their log prior)."""
        out = {"sigma_level": np.zeros(u.shape[0])}
        log_prior = np.zeros(u.shape[0])
        for i, (d, lg) in enumerate(zip(self.dims, self.log, strict=True)):
            out[d.name] = d.value(u[:, i], lg)
            log_prior += d.log_prior(u[:, i], lg)
        out["rho"] = rho_of(out["half_life"]) if self.fades else np.ones(u.shape[0])
        if not self.fades:
            out["half_life"] = np.full(u.shape[0], np.inf)
        out["log_prior"] = log_prior
        return out

    def cells(self, k: int, box, g: int) -> dict:
        """Each node's cell width per parameter, in its grid coordinate (0 off the grid).

        ``cell_<name>`` is the width, ``cell_log_<name>`` whether the coordinate is the
        log of the parameter; the same keys for every branch, so nodes concatenate.
        """
        out = {}
        for name in CELL_NAMES:
            out[f"cell_{name}"] = np.zeros(g)
            out[f"cell_log_{name}"] = np.zeros(g, dtype=bool)
        for d, (lo, hi), lg in zip(self.dims, box, self.log, strict=True):
            out[f"cell_{d.name}"][:] = (hi - lo) / k
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


def locate(branch: Branch, ctx: Context, k: int) -> list[tuple[float, float]]:
    """The box of ``u`` holding the posterior mass, from a coarse grid over the prior range."""
    u, _ = branch.nodes(k)
    p = branch.params(u)
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


def shrink(branch: Branch, weight: np.ndarray, k: int) -> list[tuple[float, float]]:
    """A tighter box from a fine grid's weights: the cells whose marginal mass counts."""
    w = weight.reshape((k,) * len(branch.dims))
    total = w.sum()
    box = []
    for d, (lo, hi) in enumerate(branch.box):
        step = (hi - lo) / k
        marginal = w.sum(axis=tuple(i for i in range(w.ndim) if i != d)) / total
        kept = np.flatnonzero(marginal >= _MASS)
        span_lo, span_hi = branch.dims[d].span(branch.log[d])
        box.append((max(span_lo, lo + (kept[0] - 1.0) * step),
                    min(span_hi, lo + (kept[-1] + 2.0) * step)))
    return box


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
        u, vol = b.nodes(k_of(b), b.box)
        p = b.params(u)
        ev = evaluate(ctx, p)
        lw = ev["loglik"] + p["log_prior"] + math.log(vol) + math.log(b.prior_mass)
        parts.append({**{k: v for k, v in p.items() if k != "log_prior"}, **ev,
                      **b.cells(k_of(b), b.box, u.shape[0])})
        logw.append(lw)
        top = lw.max()
        within.append(np.exp(lw - top))
        log_ev["fading" if b.fades else "drifting"] = top + math.log(within[-1].sum())
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
