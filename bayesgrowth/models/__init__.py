"""Growth curves. Each module gives the curve's math and builds its PyMC model."""

from bayesgrowth.models import exponential

__all__ = ["exponential"]
