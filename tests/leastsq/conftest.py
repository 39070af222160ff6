"""Shared fixtures for the least-squares tests: a reader for NIST StRD files."""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pytest

# The shared/ folder sits beside the repository root.
NIST_DIR = Path(__file__).resolve().parents[2] / ".." / "shared" / "reference" / "nist"

_NUMBER = r"[-+]?\d*\.?\d+(?:[eE][-+]?\d+)?"


@dataclass(frozen=True)
class NistProblem:
    """Data, starting values and certified values read from one StRD file."""

    name: str
    x: np.ndarray
    y: np.ndarray
    start1: np.ndarray  # empty for linear files
    start2: np.ndarray  # empty for linear files
    certified: np.ndarray
    certified_sd: np.ndarray
    rss: float  # NaN for linear files (they give an ANOVA table instead)
    residual_sd: float
    r_squared: float  # NaN for nonlinear files


def _line_range(header: str, label: str) -> tuple[int, int]:
    match = re.search(label + r"\s*\(lines\s+(\d+)\s+to\s+(\d+)\)", header)
    if match is None:
        raise ValueError(f"no '{label}' line range in the file header")
    return int(match.group(1)), int(match.group(2))


def read_nist(name: str) -> NistProblem:
    """Parse ``<name>.dat`` using the line ranges its own header states."""
    path = NIST_DIR / f"{name}.dat"
    if not path.is_file():
        pytest.skip(f"NIST reference file not found: {path} (shared/ must sit beside the repo)")
    lines = path.read_text().splitlines()
    header = "\n".join(lines[:10])
    c0, c1 = _line_range(header, "Certified Values")
    d0, d1 = _line_range(header, "Data")
    cert_block = lines[c0 - 1 : c1]
    data = np.array([[float(v) for v in ln.split()] for ln in lines[d0 - 1 : d1]])
    y, x = data[:, 0], data[:, 1]

    start1, start2, cert, cert_sd = [], [], [], []
    rss = residual_sd = r_squared = float("nan")
    for ln in cert_block:
        nls = re.match(rf"\s*b\d+\s*=\s*({_NUMBER})\s+({_NUMBER})\s+({_NUMBER})\s+({_NUMBER})", ln)
        lin = re.match(rf"\s*B\d+\s+({_NUMBER})\s+({_NUMBER})\s*$", ln)
        if nls:
            s1, s2, c, sd = (float(g) for g in nls.groups())
            start1.append(s1)
            start2.append(s2)
            cert.append(c)
            cert_sd.append(sd)
        elif lin:
            cert.append(float(lin.group(1)))
            cert_sd.append(float(lin.group(2)))
        elif m := re.search(rf"Residual Sum of Squares:\s*({_NUMBER})", ln):
            rss = float(m.group(1))
        elif m := re.search(rf"Standard Deviation:?\s+({_NUMBER})\s*$", ln):
            residual_sd = float(m.group(1))
        elif m := re.search(rf"R-Squared\s+({_NUMBER})", ln):
            r_squared = float(m.group(1))
    if not cert or np.isnan(residual_sd):
        raise ValueError(f"could not read the certified values of {name}")
    return NistProblem(
        name=name,
        x=x,
        y=y,
        start1=np.array(start1),
        start2=np.array(start2),
        certified=np.array(cert),
        certified_sd=np.array(cert_sd),
        rss=rss,
        residual_sd=residual_sd,
        r_squared=r_squared,
    )


@pytest.fixture(scope="session")
def nist() -> Callable[[str], NistProblem]:
    """Loader for NIST StRD problems; skips the test when the files are missing."""
    return read_nist
