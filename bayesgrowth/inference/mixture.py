"""Finite mixtures of normals on the log scale: the exact engine's predictive.

For log values the predictive is ``sum_g w_g Normal(m_g, s_g^2)``, so a value's
predictive is a mixture of log-normals. Its CDF is a weighted sum of normal CDFs;
quantiles come from safeguarded Newton steps on that CDF (monotone, so the
bracket always holds the root).

A posterior of more than ``_EXACT_BELOW`` grid nodes is first compressed, column
by column: components close in mean (within a quarter of their sd) and in sd (within
1.75%) merge into one normal of the same weight, mean and variance (:func:`_compress`),
a few dozen to a few hundred per column, and the root is found on those with a normal
CDF good to 7.5e-8 (:func:`_normal_cdf_pdf`). On the value and curve mixtures of 48 M1
and Tourism series (96 mixtures, 94 of them compressed) these roots lay within 9e-5 of
the 2.5-97.5% width of the full mixture's (median 3e-5; 1.4e-4 of the 80% band's width
at most), against a grid error of about 2e-3 of the 80% band's width on the median
series. A tolerance of 1e-6 or coarser (the grid's convergence probes) stops there; a
finer one (the default) has one Newton step on the full mixture correct them
(:func:`_polish`), to within 1e-6 of the width (the cheap CDF's error; on those 96
mixtures at most 3.1e-7). ``tests/inference/test_mixture_compression.py`` checks
both bounds (3e-4, 1e-6) against a brute-force inversion by scipy. ``exact=True``, a
mixture of at most ``_EXACT_BELOW`` components and a column too spread to bin take the
root of the heaviest components holding all but 1e-5 of the weight, to ``tol``.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.inference.normal import ndtr, ndtri

__all__ = ["heaviest", "mixture_cdf", "mixture_mean_exp", "mixture_quantiles"]

_ITER = 100


#: Components outside the heaviest ones holding all but this mass are dropped before
#: root-finding: a quantile then moves by less than this in probability (2e-5 of the 80%
#: band's width on a 40-point quarterly series), far below the grid's own error (about
#: 0.3% of that width on a typical series, tests/inference/test_statespace_grid_accuracy.py),
#: with a third to half of the components of a typical exact posterior left out.
_TAIL_MASS = 1e-5

#: Mixtures of at most this many components are solved in full (compressing saves nothing).
_EXACT_BELOW = 256
#: Merged components differ in mean by at most this times their smallest sd ...
_MEAN_BIN = 0.25
#: ... and in log sd by at most this.
_LOG_SD_BIN = 0.0175
#: A column is solved in full when its sds spread over more than this many log units
#: (a ratio of about 8,000) or its means over more than ``_MAX_BINS`` bins of the
#: narrowest row: the bins would be too many to save time.
_MAX_LOG_SD_SPREAD, _MAX_BINS = 9.0, 1024
#: A tolerance below this has the compressed roots corrected on the full mixture.
_POLISH_BELOW = 1e-6


def heaviest(weight: np.ndarray) -> np.ndarray:
    """Indices (ascending) of the heaviest components, which hold all but ``1e-5`` of the weight.

    Every component at least as heavy as the lightest one needed is kept (ties included).
    """
    desc = np.sort(weight)[::-1]
    lightest = desc[min(int(np.searchsorted(np.cumsum(desc), 1.0 - _TAIL_MASS)), desc.size - 1)]
    return np.flatnonzero(weight >= lightest)


def compact(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray):
    """The heaviest components holding all but ``1e-5`` of the weight, renormalised."""
    keep = heaviest(weight)
    w = weight[keep]
    return w / w.sum(), mean[keep], sd[keep]


def mixture_cdf(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray,
                x: np.ndarray) -> np.ndarray:
    """``P(X <= x)`` per column, for ``mean``/``sd`` ``(G, H)`` and ``x`` ``(..., H)``."""
    x = np.asarray(x, dtype=float)
    z = (x[..., None, :] - mean) / sd
    return np.einsum("g,...gh->...h", weight, ndtr(z))


def mixture_quantiles(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray,
                      probs, tol: float = 1e-9, *, exact: bool = False) -> np.ndarray:
    """Quantiles ``(len(probs), H)`` of the mixture, per column.

    Newton steps on the CDF from the moment-matched normal's quantile, each kept
    inside a bracket that bisection would also keep (so the iteration cannot
    leave the root's bracket), until every step is below ``tol * max(1, |x|)``.
    A mixture of more than ``_EXACT_BELOW`` components is compressed first, and at a
    ``tol`` below 1e-6 the roots are then corrected on the full mixture (the module
    docstring gives the errors these leave).

    Parameters
    ----------
    weight : numpy.ndarray, shape (G,)
        Mixture weights (sum to 1).
    mean, sd : numpy.ndarray, shape (G, H)
        Component means and standard deviations for each of ``H`` columns.
    probs : sequence of float
        Probabilities strictly between 0 and 1.
    tol : float
        Relative tolerance of the root (the default is far below any rounding; a
        convergence check needs less).
    exact : bool
        Find the root of the full mixture, without compressing it.

    Examples
    --------
    >>> import numpy as np
    >>> q = mixture_quantiles(np.array([0.5, 0.5]), np.array([[-1.0], [1.0]]),
    ...                       np.array([[0.5], [0.5]]), [0.25, 0.5, 0.75])
    >>> np.round(q[:, 0], 4).tolist()
    [-1.0, 0.0, 1.0]
    """
    p = np.asarray(probs, dtype=float)[:, None]
    if exact or weight.size <= _EXACT_BELOW:
        weight, mean, sd = compact(weight, mean, sd)
        return _full_root(weight, mean, np.maximum(sd, 1e-300), p, tol)
    # every component lighter than 1e-5 / G goes (less than 1e-5 of the weight in all)
    keep = weight >= _TAIL_MASS / weight.size
    if not keep.all():
        weight, mean, sd = weight[keep] / weight[keep].sum(), mean[keep], sd[keep]
    sd = np.maximum(sd, 1e-300)
    fine, merged = _compress(weight, mean, sd)
    out = np.empty((p.size, mean.shape[1]))
    if merged is not None:
        w, m, s, sizes = merged
        col = np.repeat(np.arange(sizes.size), sizes)
        starts = np.cumsum(sizes) - sizes
        # a root finer than the compression's error would be wasted: the polish squares it
        out[:, fine] = _ragged_root(w, m, s, col, starts, p, max(tol, _POLISH_BELOW))
        if tol < _POLISH_BELOW:
            out[:, fine] = _polish(weight, mean[:, fine], sd[:, fine], p, out[:, fine])
    if not fine.all():
        out[:, ~fine] = _full_root(weight, mean[:, ~fine], sd[:, ~fine], p, tol)
    return out


def _full_root(weight, mean, sd, p, tol):
    """Quantiles of the full mixture (weights ``(G,)``, columns ``(G, H)``)."""
    def cdf_density(x):
        z = (x[..., None, :] - mean) / sd
        f = np.einsum("g,pgh->ph", weight, ndtr(z))
        return f, np.einsum("g,pgh->ph", weight, np.exp(-0.5 * z**2) / sd) / np.sqrt(2 * np.pi)

    lo = (mean - 40 * sd).min(axis=0)
    hi = (mean + 40 * sd).max(axis=0)
    m = weight @ mean
    s = np.sqrt(np.maximum(weight @ (sd**2 + mean**2) - m**2, 0.0))
    return _newton(cdf_density, m, s, lo, hi, p, tol)


def _ragged_root(w, m, s, col, starts, p, tol):
    """Quantiles of per-column mixtures stored flat, sorted by column ``col``.

    ``starts[h]`` is where column ``h``'s components begin.
    """
    ws, inv_s = w / s, 1.0 / s
    z, pdf, tail = (np.empty((p.size, w.size)) for _ in range(3))  # reused: fresh arrays
    neg = np.empty(z.shape, dtype=bool)  # this large cost more than the arithmetic

    def cdf_density(x):
        np.take(x, col, axis=1, out=z)
        np.subtract(z, m, out=z)
        np.multiply(z, inv_s, out=z)
        _normal_cdf_pdf(z, pdf, tail, neg)
        np.multiply(z, w, out=z)
        np.multiply(pdf, ws, out=pdf)
        return np.add.reduceat(z, starts, axis=1), np.add.reduceat(pdf, starts, axis=1)

    lo = np.minimum.reduceat(m - 40 * s, starts)
    hi = np.maximum.reduceat(m + 40 * s, starts)
    mu = np.add.reduceat(w * m, starts)
    sdev = np.sqrt(np.maximum(np.add.reduceat(w * (s * s + m * m), starts) - mu**2, 0.0))
    return _newton(cdf_density, mu, sdev, lo, hi, p, tol)


def _polish(weight, mean, sd, p, x):
    """One Newton step on the full mixture from the compressed mixture's roots ``x``.

    Those are within about 1e-4 of the band's width of the full mixture's, so the step
    leaves an error of about their square, and the CDF's own (7.5e-8 in probability). A
    step longer than ``1e-3 * max(1, |x|)``, which the compression does not leave, is
    not taken.
    """
    mt, st = np.ascontiguousarray(mean.T), np.ascontiguousarray(sd.T)  # (H, G)
    z, pdf, tail = (np.empty((p.size, weight.size)) for _ in range(3))
    neg = np.empty(z.shape, dtype=bool)
    out = x.copy()
    for h in range(mt.shape[0]):
        np.subtract(x[:, h:h + 1], mt[h], out=z)
        np.divide(z, st[h], out=z)
        _normal_cdf_pdf(z, pdf, tail, neg)
        dens = pdf @ (weight / st[h])
        with np.errstate(divide="ignore", invalid="ignore"):
            step = (z @ weight - p[:, 0]) / dens
        ok = np.abs(step) <= 1e-3 * np.maximum(1.0, np.abs(x[:, h]))
        out[:, h] = np.where(ok, x[:, h] - step, x[:, h])
    return out


#: Abramowitz and Stegun (1964), Handbook of Mathematical Functions, 26.2.17: the
#: normal tail ``P(Z > z) = pdf(z) * poly(1 / (1 + P z))`` for ``z >= 0``, within 7.5e-8.
_AS_P = 0.2316419
_AS_B = (1.330274429, -1.821255978, 1.781477937, -0.356563782, 0.319381530)


def _normal_cdf_pdf(z: np.ndarray, pdf: np.ndarray, tail: np.ndarray, neg: np.ndarray):
    """Standard normal CDF (within 7.5e-8, 26.2.17 of Abramowitz and Stegun) and density.

    Overwrites ``z`` with the CDF and ``pdf`` with the density (``tail`` and ``neg`` are
    scratch of ``z``'s shape). Four times cheaper than ``ndtr`` and the density together;
    the error is far below what compressing the mixture leaves.
    """
    np.less(z, 0.0, out=neg)
    np.multiply(z, z, out=pdf)
    pdf *= -0.5
    np.exp(pdf, out=pdf)
    pdf *= 1.0 / np.sqrt(2.0 * np.pi)
    np.abs(z, out=z)  # z becomes t = 1 / (1 + P |z|)
    z *= _AS_P
    z += 1.0
    np.reciprocal(z, out=z)
    np.multiply(z, _AS_B[0], out=tail)
    for b in _AS_B[1:]:
        tail += b
        tail *= z
    tail *= pdf  # P(Z > |z|)
    np.subtract(1.0, tail, out=z)
    np.copyto(z, tail, where=neg)


def _newton(cdf_density, m, s, lo, hi, p, tol):
    """Safeguarded Newton on ``cdf_density(x) -> (F(x), F'(x))`` from ``m + s * ndtri(p)``."""
    shape = (p.size, m.size)
    lo, hi = np.broadcast_to(lo, shape).copy(), np.broadcast_to(hi, shape).copy()
    x = np.clip(m + s * ndtri(p), lo, hi)
    for _ in range(_ITER):
        f, dens = cdf_density(x)
        f = f - p
        lo = np.where(f < 0, x, lo)
        hi = np.where(f < 0, hi, x)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = np.where(dens > 0, f / dens, np.inf)
        new = x - step
        outside = ~((new >= lo) & (new <= hi))
        new = np.where(outside, 0.5 * (lo + hi), new)
        if np.all(np.abs(new - x) < tol * np.maximum(1.0, np.abs(x))):
            return new
        x = new
    return x


def _compress(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray):
    """Each column's components merged where close in mean and sd.

    In each column the components fall into rows of log sd ``_LOG_SD_BIN`` wide and,
    within a row, into bins of mean ``_MEAN_BIN`` times the row's smallest sd wide; each
    bin becomes one normal with the bin's weight, mean and variance (its components'
    variances plus the spread of their means). All columns are binned at once, each in
    its own range of bin keys, so the merged components come out column by column.

    Parameters
    ----------
    weight : numpy.ndarray, shape (G,)
    mean, sd : numpy.ndarray, shape (G, H)

    Returns
    -------
    fine : numpy.ndarray of bool, shape (H,)
        The columns binned; the others spread their sds over more than
        ``_MAX_LOG_SD_SPREAD``, their means over more than ``_MAX_BINS`` bins of the
        narrowest row, or hold a value that is not finite.
    merged : tuple of numpy.ndarray or None
        Weights, means and sds of the merged components of the fine columns, one column
        after another, and how many each column has; None when no column is fine.
    """
    log_sd = np.log(sd)
    lmin, mmin = log_sd.min(axis=0), mean.min(axis=0)
    spread, mspread = log_sd.max(axis=0) - lmin, mean.max(axis=0) - mmin
    # also false for a column holding an infinite or undefined value
    fine = (spread <= _MAX_LOG_SD_SPREAD) & np.isfinite(mspread)
    while fine.any():
        cols = np.flatnonzero(fine)
        rows = (spread[cols] / _LOG_SD_BIN).astype(int) + 1
        # reciprocal bin width and bin count per column and row; rounding is monotone, so
        # no component's bin passes its row's count
        inv = np.exp(-lmin[cols, None] - _LOG_SD_BIN * np.arange(rows.max())) / _MEAN_BIN
        bins = (mspread[cols, None] * inv).astype(int) + 1
        wide = bins[:, 0] > _MAX_BINS
        if wide.any():
            fine[cols[wide]] = False
            continue
        bins[np.arange(rows.max()) >= rows[:, None]] = 0  # rows beyond a column's own
        first = (np.cumsum(bins) - bins.ravel()).reshape(bins.shape)  # first key of each row
        row = ((log_sd[:, cols] - lmin[cols]) / _LOG_SD_BIN).astype(int)
        at = np.arange(cols.size)
        key = first[at, row] + ((mean[:, cols] - mmin[cols]) * inv[at, row]).astype(int)
        n = int(bins.sum())
        # raveled row by row, each bin sums its components in their order
        key, wg, mg = key.ravel(), np.repeat(weight, cols.size), mean[:, cols].ravel()
        total = np.bincount(key, wg, n)
        m1 = np.bincount(key, wg * mg, n)
        m2 = np.bincount(key, wg * (mg * mg + sd[:, cols].ravel() ** 2), n)
        k = np.flatnonzero(total > 0)
        w = total[k]
        mu = m1[k] / w
        sizes = np.diff(np.searchsorted(k, np.append(first[:, 0], n)))
        return fine, (w, mu, np.sqrt(np.maximum(m2[k] / w - mu * mu, 0.0)), sizes)
    return fine, None


def mixture_mean_exp(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray) -> np.ndarray:
    """``E[exp(X)]`` per column: the mean of the log-normal mixture."""
    with np.errstate(over="ignore"):  # a very wide component has an infinite mean, honestly
        return weight @ np.exp(mean + 0.5 * sd**2)
