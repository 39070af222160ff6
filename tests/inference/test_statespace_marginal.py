"""The exact engine's marginal predictive per node, against its joint predictive.

Without drifting seasons the marginal means and variances come from an expansion of the
level's loading on the coefficients (``statespace_paths._plain_marginal``); the joint
predictive builds each node's full covariance from the design matrix. They must agree to
rounding.
"""

from __future__ import annotations

import numpy as np
import pytest

import bayesgrowth as bg
from bayesgrowth.config import DEFAULT_MODEL
from bayesgrowth.inference import statespace_paths as paths
from bayesgrowth.inference.run import fit_series


@pytest.mark.parametrize("options", [
    DEFAULT_MODEL,
    {**DEFAULT_MODEL, "seasonal": False},
    {**DEFAULT_MODEL, "drift": "adaptive"},  # with nodes of growth that does not revert
])
def test_marginal_predictive_equals_the_joint_ones_diagonal(options):
    fit = fit_series(bg.load_demo(), engine="exact", seed=3, **options)
    post = fit.state_space
    t = fit.series.future_t(6)
    marginal = paths.predictive(post, t, joint=False)
    joint = paths.predictive(post, t, joint=True)
    np.testing.assert_allclose(marginal["mean"], joint["mean"], rtol=1e-12)
    for key in ("curve", "value"):
        np.testing.assert_allclose(marginal[f"{key}_var"],
                                   np.diagonal(joint[f"{key}_cov"], axis1=1, axis2=2),
                                   rtol=1e-10)
