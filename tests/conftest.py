"""Shared fixtures: seeded generators, the demo series, reference data, figure clean-up."""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np
import pytest

os.environ.setdefault("MPLBACKEND", "Agg")

REPO = Path(__file__).resolve().parents[1]
#: shared/reference sits beside the repository (as laid out for developers and CI).
REFERENCE = REPO.parent / "shared" / "reference"


@pytest.fixture
def rng() -> np.random.Generator:
    return np.random.default_rng(20261201)


@pytest.fixture(scope="session")
def reference_dir() -> Path:
    if not REFERENCE.is_dir():
        pytest.skip(f"reference data not found at {REFERENCE} (shared/ beside the repo)")
    return REFERENCE


@pytest.fixture(scope="session")
def demo():
    import bayesgrowth as bg

    return bg.load_demo()


@pytest.fixture(scope="session")
def demo_exact_fit(demo):
    from bayesgrowth.inference import fit_series

    return fit_series(demo, engine="exact", seed=7)


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    import sys

    if "matplotlib.pyplot" in sys.modules:
        import matplotlib.pyplot as plt

        plt.close("all")
