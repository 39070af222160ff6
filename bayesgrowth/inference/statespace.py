"""The exact engine for the local trend: Kalman filter likelihood, ``theta`` on a grid.

Given the scale and persistence parameters ``theta`` (noise, level shocks,
growth drift, and for fading growth its half-life), the local trend is a
linear-Gaussian state-space model on the log scale. The augmented Kalman filter
(:mod:`bayesgrowth.inference.kalman`) gives, per value of ``theta``:

* the marginal likelihood with the starting level, starting growth, long-run
  growth and seasonal factors ``beta`` integrated out against their normal
  priors (the user's priors on the initial value and growth);
* the normal posterior of ``beta``, and the filtered state at the last
  observation, hence a normal forecast of every future log value.

``theta`` is then integrated out deterministically, as in the nested-Laplace
approach of Rue, Martino & Chopin (2009, *JRSS-B* 71(2)) but with a plain grid:
a coarse grid over the prior's range locates the posterior mass, a finer grid
over that box carries the weights (prior times likelihood, midpoint rule in
transformed coordinates), and the grid is refined until the forecast's
quantiles stop moving. Once the box holds, a grid of four or more dimensions
spaces its points by the marginal posterior densities of the previous pass
(:func:`bayesgrowth.inference.statespace_grid.remap`), so few points resolve a
narrow peak inside a box wide enough for the tails. The posterior predictive is a finite mixture of
log-normals, so quantiles and exceedance probabilities are exact up to the grid
(:mod:`bayesgrowth.inference.mixture`); draws are made only where a consumer
needs them.

With ``drift="adaptive"`` the growth rate either drifts freely (``rho = 1``) or
fades towards the long-run rate; each branch gets half the prior mass and the
data weight them by their exact evidence (Bayesian model averaging).
"""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.inference import statespace_grid as grid
from bayesgrowth.inference import statespace_paths as paths
from bayesgrowth.inference.mixture import heaviest, mixture_quantiles
from bayesgrowth.inference.statespace_nodes import Context, innovations
from bayesgrowth.lazy import Deferred, DeferredMapping
from bayesgrowth.models import linear
from bayesgrowth.seeds import stream

__all__ = ["StateSpacePosterior", "state_space_posterior"]

_SETTLE = 0.02  # quantiles settled when they move less than 2% of the 10-90 width
_MAX_MOVES = 8  # tighter boxes before the grid is refined anyway
_PROBE = np.array([0.1, 0.5, 0.9])
_MAPPED = True  # points spaced by the marginal posterior once the box holds (False: even)
_MAP_FROM = 4  # in branches of this many dimensions or more (fewer are cheap on even grids)


class StateSpacePosterior:
    """The posterior of a local trend as weighted nodes of ``theta``.

    Attributes
    ----------
    params : dict of numpy.ndarray
        Per node: ``sigma``, ``sigma_level``, ``sigma_growth``, (drifting seasons)
        ``sigma_season``, ``rho``, ``half_life``
        (``inf`` where growth drifts freely).
    weight : numpy.ndarray
        Posterior probability of each node (sums to 1).
    beta_mean, beta_cov : numpy.ndarray
        Normal posterior of the linear coefficients per node.
    branch_weight : dict
        Posterior probability of drifting and of fading growth.
    log_evidence : float
        Log marginal likelihood of the log values (grid quadrature).
    grid_points : int
        Points per dimension of the final grid.
    """

    def __init__(self, ctx, spec, axis, t_ref, nodes: dict, weight, branch_weight,
                 log_evidence, grid_points):
        # the nodes holding all but 1e-5 of the mass, the components the mixture quantiles
        # keep anyway: every later step (predictive, draws, bands) costs half as much
        keep = heaviest(weight)
        self._ctx, self.spec, self._axis, self.t_ref = ctx, spec, axis, int(t_ref)
        self.weight = weight[keep] / weight[keep].sum()
        sel = {k: v[keep] for k, v in nodes.items()}
        self.params = {k: sel[k] for k in ("sigma", "sigma_level", "sigma_growth",
                                           "sigma_season", "rho", "half_life") if k in sel}
        self.beta_mean, self.beta_cov = sel["beta_mean"], sel["beta_cov"]
        # each node's cell on the grid (width, and whether in logs), for :meth:`spread`
        self._cells = {n: (sel[f"cell_{n}"], sel[f"cell_log_{n}"]) for n in grid.CELL_NAMES
                       if f"cell_{n}" in sel}
        self._state, self._state_cov = sel["state"], sel["state_cov"]
        self.branch_weight = branch_weight
        self.log_evidence = float(log_evidence)
        self.grid_points = int(grid_points)
        #: the largest move of the probe quantiles at the last refinement, as a share of
        #: their 10-90 width (settled when at most 0.02); set by state_space_posterior
        self.last_move = math.nan

    @property
    def n_nodes(self) -> int:
        """Number of nodes carrying weight."""
        return int(self.weight.size)

    def _season_rows(self, t: np.ndarray):
        if not self._ctx.n_seasons:
            return None
        from bayesgrowth.models.spec import season_index

        m, s_idx = season_index(self._axis, np.asarray(t))
        return linear.season_basis(m)[s_idx]

    def predictive(self, t_future: np.ndarray, joint: bool = True,
                   nodes: np.ndarray | None = None) -> dict:
        """Normal forecast of future log values per node.

        Parameters
        ----------
        t_future : numpy.ndarray
            Consecutive future time indices right after the last observation.
        joint : bool
            Whether to return full ``(G, H, H)`` covariances or only variances.
        nodes : numpy.ndarray of int, optional
            Only these nodes (default all).

        Returns
        -------
        dict
            ``mean`` ``(G, H)``; ``curve_cov``/``value_cov`` (joint) or
            ``curve_var``/``value_var`` ``(G, H)``: the level alone, and the level
            plus noise (see :func:`bayesgrowth.inference.statespace_paths.predictive`).
        """
        return paths.predictive(self, t_future, joint, nodes)

    def simulate(self, t_future: np.ndarray, nodes: np.ndarray, beta: np.ndarray,
                 rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
        """Joint predictive paths by running the state forward, one per ``(node, beta)``.

        Returns
        -------
        level, value : numpy.ndarray, shape (S, H)
            Log level (the trend, seasons included) and log value (plus noise); see
            :func:`bayesgrowth.inference.statespace_paths.simulate`.
        """
        return paths.simulate(self, t_future, nodes, beta, rng)

    def latest_growth(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Growth (log scale) in the last observed period: loading on ``beta``, shift, variance.

        The growth given ``beta`` is ``load @ beta + shift`` plus a normal error with
        the returned variance (the filtered growth deviation's).
        """
        ctx, rho = self._ctx, self.params["rho"]
        j = float(ctx.idx[-1])
        cols = [np.zeros_like(rho), rho**j]
        if ctx.long_run:
            cols.append(1 - rho**j)
        gx = np.stack(cols, axis=-1)
        if ctx.n_seasons:
            gx = np.concatenate([gx, np.zeros((rho.size, ctx.n_seasons - 1))], axis=-1)
        load = gx - self._state[:, 1, 1:]
        return load, self._state[:, 1, 0], self._state_cov[:, 1, 1]

    def sample(self, n: int, rng: np.random.Generator) -> tuple[np.ndarray, dict]:
        """Draw ``n`` nodes by weight, then ``beta`` and the latest growth given each.

        Returns
        -------
        nodes : numpy.ndarray of int
        draws : dict
            ``theta`` values, the named coefficients (see
            :func:`bayesgrowth.models.linear.split_coefficients`) and
            ``latest_log_growth``.
        """
        nodes = rng.choice(self.weight.size, size=n, p=self.weight)
        used, inverse = np.unique(nodes, return_inverse=True)
        root = _cov_root(self.beta_cov[used], self._ctx.var0 > 0)[inverse]
        zb = rng.standard_normal((n, self.beta_mean.shape[1]))
        beta = self.beta_mean[nodes] + np.einsum("sij,sj->si", root, zb)
        load, shift, var = self.latest_growth()
        growth = (np.einsum("sp,sp->s", load[nodes], beta) + shift[nodes]
                  + np.sqrt(np.clip(var[nodes], 0, None)) * rng.standard_normal(n))
        ctx = self._ctx
        named = linear.split_coefficients(self.spec, beta, ctx.n_seasons, ctx.var0[0] == 0,
                                          float(ctx.mu0[0]))
        draws = {k: v[nodes] for k, v in self.params.items()}
        return nodes, {**draws, **named, "latest_log_growth": growth}

    def spread(self, name: str, nodes: np.ndarray, rng: np.random.Generator) -> np.ndarray:
        """Values of ``name`` for draws at ``nodes``, each moved uniformly within its cell.

        The weights are a midpoint rule: the posterior as constant over each cell of the
        grid (in its coordinate: ``x`` for the scales, ``log x`` for the half-life).
        Drawing within the cell samples that density, so intervals of ``theta`` are not
        stuck on the grid's few values. For reporting only: the posterior draws, their
        coefficients and likelihoods stay at the nodes.
        """
        x = self.params[name][nodes]
        if name not in self._cells:
            return x
        width, log = (a[nodes] for a in self._cells[name])
        shift = (rng.random(nodes.size) - 0.5) * width
        with np.errstate(invalid="ignore", over="ignore"):
            return np.where(width > 0, np.where(log, x * np.exp(shift), x + shift), x)

    def one_step(self, nodes: np.ndarray, beta: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """One-step-ahead errors and their variances at the observations, ``(S, n)`` each.

        For draw ``(node, beta)`` the filter's forecast of each log value from the
        values before it is ``y - error`` with variance ``variance`` (the prediction
        error decomposition: the errors are independent given the draw).
        """
        used, inverse = np.unique(nodes, return_inverse=True)
        innov, var = innovations(self._ctx, {k: v[used] for k, v in self.params.items()})
        v = innov[inverse]
        return v[..., 0] - np.einsum("snp,sp->sn", v[..., 1:], beta), var[inverse]

    def pointwise_loglik(self, nodes: np.ndarray, beta: np.ndarray) -> np.ndarray:
        """One-step log densities of the log values for draws ``(nodes, beta)``, ``(S, n)``."""
        e, f = self.one_step(nodes, beta)
        return -0.5 * (math.log(2 * math.pi) + np.log(f) + e**2 / f)

    def beta_of(self, draws: dict) -> np.ndarray:
        """Coefficient vectors in design order from named draws (inverse of the split)."""
        cols = [draws["log_a"], draws["log1p_g"]]
        if self._ctx.long_run:
            cols.append(draws["long_run"])
        out = np.stack(cols, axis=-1)
        if self._ctx.n_seasons:
            q = linear.season_basis(self._ctx.n_seasons)
            out = np.concatenate([out, draws["season"] @ q], axis=-1)
        return out


def _cov_root(cov: np.ndarray, free: np.ndarray) -> np.ndarray:
    """Lower Cholesky factors ``(G, p, p)`` of ``beta``'s posterior covariances.

    A coefficient with a zero prior sd is fixed: its row and column are zero, and so is
    its row of the factor; the free block is positive definite (``S M^-1 S`` with ``M``
    positive definite, see :func:`bayesgrowth.inference.statespace_nodes.integrate`).
    """
    root = np.zeros_like(cov)
    idx = np.flatnonzero(free)
    block = cov[:, idx[:, None], idx[None, :]]
    root[:, idx[:, None], idx[None, :]] = np.linalg.cholesky(
        0.5 * (block + np.swapaxes(block, 1, 2)))
    return root


def _context(spec, priors, series) -> Context:
    t = np.asarray(series.t, dtype=int)
    season, m = linear.season_rows(spec, series.axis, t)
    mu0, var0 = linear.linear_prior(spec, priors, m)
    return Context(idx=t - int(priors.t_ref), y=series.log_values, season=season, mu0=mu0,
                   var0=var0, long_run=linear.uses_long_run(spec), n_seasons=m,
                   season_drift=spec.season_drift)


def _probe_quantiles(post: StateSpacePosterior, t_probe: np.ndarray) -> np.ndarray:
    pred = post.predictive(t_probe, joint=False)
    # a tolerance of 1e-6 of the log value: the check compares to 2% of the band
    return mixture_quantiles(post.weight, pred["mean"], np.sqrt(pred["value_var"]), _PROBE,
                             tol=1e-6)


def state_space_posterior(series, priors, spec, *, max_refinements: int = 3):
    """The exact posterior of a local trend (see the module docstring).

    Parameters
    ----------
    series : GrowthSeries
    priors : ResolvedPriors
    spec : ModelSpec
        A local trend with normal noise and independent errors.
    max_refinements : int
        How many times the fine grid may be refined (two more points per
        dimension each time) while the probe quantiles still move; before that
        the box shrinks around the mass while it moves (at most ``_MAX_MOVES``
        times), which does not count as a refinement, and a grid of four or more
        dimensions is then mapped to the mass once at the same size.

    Returns
    -------
    StateSpacePosterior
    """
    ctx = _context(spec, priors, series)
    branches = grid.branches(spec, priors)
    for b in branches:
        b.box = grid.locate(b, ctx, grid.COARSE[len(b.dims) >= 4])
        b.to_fine()
    ppy = series.axis.periods_per_year or 4
    t_probe = series.t_last + np.array([1, int(max(4, 2 * round(ppy)))])  # next, two years on
    previous, extra, moves, mapped = None, 0, 0, False
    while True:
        def k_of(b, extra=extra):
            return grid.FINE[len(b.dims) >= 4] + extra

        nodes, w, branch_w, log_ev, within = grid.on_grid(ctx, branches, k_of)
        post = StateSpacePosterior(ctx, spec, series.axis, priors.t_ref, nodes, w, branch_w,
                                   log_ev, k_of(branches[-1]))
        q = _probe_quantiles(post, t_probe)
        if previous is not None:
            width = np.maximum(q[-1] - q[0], 1e-12)
            post.last_move = float(np.max(np.abs(q - previous) / width))
            if post.last_move <= _SETTLE:
                break
        previous = q
        if not mapped:
            boxes = [grid.shrink(b, wb, k_of(b)) for b, wb in zip(branches, within, strict=True)]
            moved = any(grid.moved(b.box, nb) for b, nb in zip(branches, boxes, strict=True))
            if moved and moves < _MAX_MOVES:  # the mass is not yet resolved: a tighter box
                moves += 1
            elif extra >= 2 * max_refinements:
                break
            elif _MAPPED and any(len(b.dims) >= _MAP_FROM for b in branches):
                mapped = True  # the box holds: points where the mass is (see statespace_grid)
            else:  # the box holds: more points
                extra += 2
        elif extra >= 2 * max_refinements:
            break
        else:
            extra += 2
        for b, nb, wb in zip(branches, boxes, within, strict=True):
            if mapped and len(b.dims) >= _MAP_FROM:
                grid.remap(b, wb, k_of(b))
            elif not mapped:
                b.box = nb
    return post


def fit_state_space(series, priors, spec, *, seed: int, draws: int = 1000, chains: int = 4):
    """Fit a local trend by the exact engine: the grid posterior plus independent draws.

    The draws (``chains * draws``, arranged as chains only to match the NUTS
    engine's shape) serve the consumers that need draws, and are made when first
    read; bands and probabilities use the grid posterior itself
    (:attr:`Fit.state_space`).

    Returns
    -------
    Fit
    """
    from bayesgrowth.inference.diagnostics import Diagnostics
    from bayesgrowth.inference.fit import Fit

    post = state_space_posterior(series, priors, spec)
    n = chains * draws
    drawn = Deferred(lambda: _draws(post, spec, seed, chains, draws))
    settled = ("its forecast quantiles moved by less than 2% of their 10-90 width at the last "
               "refinement" if post.last_move <= _SETTLE else
               f"its forecast quantiles still moved by {100 * post.last_move:.1f}% of their 10-90 "
               "width at the last refinement allowed")
    diagnostics = Diagnostics.independent(
        n, f"exact posterior on a {post.grid_points}-point-per-dimension grid "
        f"({post.n_nodes} nodes; {settled}), independent draws: no chains to check")
    settings = {"draws": draws, "chains": chains, "grid_points": post.grid_points,
                "grid_nodes": post.n_nodes, "grid_last_move": post.last_move}
    return Fit(series=series, priors=priors, engine="exact", seed=seed, posterior=drawn,
               diagnostics=diagnostics, settings=settings, spec=spec, state_space=post,
               extra=DeferredMapping(drawn, 1))


def _draws(post: StateSpacePosterior, spec, seed: int, chains: int, draws: int):
    """The posterior draws as chains, and the extra per-draw quantities (see :class:`Fit`)."""
    from bayesgrowth.inference.fit import as_chains

    nodes, flat = post.sample(chains * draws, stream(seed, "posterior_completion"))
    latest = flat.pop("latest_log_growth")
    shape = (chains, draws)
    posterior = as_chains(flat, [k for k in flat if k in spec.parameters() or k == "season"],
                          chains, draws)
    return posterior, {"nodes": nodes.reshape(shape), "latest_log_growth": latest.reshape(shape)}
