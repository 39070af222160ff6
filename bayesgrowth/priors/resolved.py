"""The priors on the log scale, as both engines use them, and their description in words."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field

__all__ = ["NU_ALPHA", "NU_BETA", "ResolvedPriors"]


#: Degrees-of-freedom prior of Student-t noise, ``Gamma(alpha, beta)`` (Juárez & Steel 2010).
NU_ALPHA, NU_BETA = 2.0, 0.1


@dataclass(frozen=True)
class ResolvedPriors:
    """The priors on the log scale, as both engines use them.

    ``log_a ~ Normal(log_a_mu, log_a_sd)`` (fixed at ``log_a_mu`` when
    ``log_a_sd == 0``), ``log1p_g ~ Normal(log1p_g_mu, log1p_g_sd)`` and
    ``sigma ~ HalfNormal(sigma_scale)``. ``t_ref`` is the time index that ``a``
    refers to and ``reference_period`` its label.

    The remaining fields serve the other curves and options:
    ``log_k ~ Normal(log_k_mu, log_k_sd)`` (ceiling), ``log half_life ~
    Normal(log_h_mu, log_h_sd)``, long-run log growth ``~ Normal(long_run_mu,
    long_run_sd)`` (fixed when the sd is 0), ``phi ~ Beta(phi_alpha, phi_beta)``,
    level-shock, growth-drift and seasonal-drift Gamma(2) means, the seasonal sd and
    ``nu ~ Gamma(nu_alpha, nu_beta)``.
    """

    log_a_mu: float
    log_a_sd: float
    log1p_g_mu: float
    log1p_g_sd: float
    sigma_scale: float
    t_ref: int
    reference_period: str
    stated: dict = field(default_factory=dict)
    log_k_mu: float = 0.0
    log_k_sd: float = math.log(2.0)
    log_h_mu: float = math.log(8.0)
    log_h_sd: float = math.log(3.0)
    long_run_mu: float = 0.0
    long_run_sd: float = 0.0
    phi_alpha: float = 1.0
    phi_beta: float = 1.0
    level_shock_scale: float = 0.0
    growth_drift_scale: float = 0.01
    seasonal_scale: float = math.log1p(0.30)
    season_drift_scale: float = math.log1p(10.0 / 3.0 / math.sqrt(2.0) / 100)
    nu_alpha: float = NU_ALPHA
    nu_beta: float = NU_BETA

    def compile_key(self) -> tuple:
        """Prior settings a compiled NUTS model bakes in (``log_a_mu`` and ``t_ref`` are data).

        Two resolved priors with the same key can share one compiled model.
        """
        return (self.log_a_sd, self.log1p_g_mu, self.log1p_g_sd, self.sigma_scale)

    @property
    def fixed_initial(self) -> bool:
        """Whether the initial value is fixed rather than estimated."""
        return self.log_a_sd == 0.0

    def to_dict(self) -> dict:
        """A JSON-ready description of the priors used."""
        return asdict(self)

    def describe(self, spec=None) -> list[str]:
        """The priors in plain words, one line each.

        Parameters
        ----------
        spec : ModelSpec, optional
            The model the priors serve; adds a line for each further prior it uses
            (its family's lines come from the model registry).
            Without it only the three priors of the exponential model are described.
        """
        st = self.stated
        a_line = (
            f"initial value at {self.reference_period}: fixed at {math.exp(self.log_a_mu):,.4g}"
            if self.fixed_initial
            else f"initial value at {self.reference_period}: about {math.exp(self.log_a_mu):,.4g}"
            f", give or take {st['initial']['give_or_take_pct']:g}%"
        )
        return [
            a_line,
            f"growth: about {st['growth']['center_pct']:g}% per period, give or take "
            f"{st['growth']['give_or_take_pts']:g} points",
            f"noise: typical deviation from trend about {st['noise']['typical_pct']:g}%",
        ] + ([] if spec is None else self._describe_extra(spec))

    def _describe_extra(self, spec) -> list[str]:
        lines = list(spec.family.prior_lines(self, spec))  # the model family's own priors
        if spec.errors == "ar1":
            lines.append(
                f"persistence of deviations (AR(1)): Beta({self.phi_alpha:g}, "
                f"{self.phi_beta:g}) on 0 to 1, mean "
                f"{self.phi_alpha / (self.phi_alpha + self.phi_beta):.2g}"
            )
        if spec.noise == "student-t":
            lines.append(
                f"heavy tails: Student-t degrees of freedom Gamma({self.nu_alpha:g}, "
                f"{self.nu_beta:g}), mean {self.nu_alpha / self.nu_beta:g}"
            )
        if spec.seasonal:
            lines.append(
                f"seasonal factors: seasons differ from the average by about "
                f"{100 * math.expm1(self.seasonal_scale):.3g}% (factors sum to zero on the "
                "log scale)"
            )
        return lines
