"""Derived seeds depend on the seed and the key only, not on the process or the order."""

import hashlib
import os
import subprocess
import sys

import numpy as np
import pytest

from bayesgrowth.seeds import STREAMS, origin_seed, series_seed, stream


def test_seed_changes_with_name_and_global_seed():
    seeds = {series_seed(s, n) for s in (0, 1) for n in ("north", "south", "n0rth")}
    assert len(seeds) == 6


def test_seed_is_the_same_in_another_process_with_another_hash_salt():
    code = "from bayesgrowth.seeds import series_seed; print(series_seed(7, 'ünit-3'))"
    env = {**os.environ, "PYTHONHASHSEED": "12345"}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         env=env, check=True).stdout
    assert int(out) == series_seed(7, "ünit-3")


def test_seeds_follow_numpy_seed_sequence_over_the_seed_and_key():
    # Reference: numpy.random.SeedSequence (NumPy documentation, "Parallel random
    # number generation"); the scheme is the seed followed by the key's words.
    words = np.frombuffer(hashlib.sha256(b"north").digest(), dtype="<u4").tolist()
    expected = np.random.SeedSequence([4, *words]).generate_state(1, dtype=np.uint32)[0]
    assert series_seed(4, "north") == int(expected)
    assert origin_seed(4, 13) == int(np.random.SeedSequence([4, 13]).generate_state(1)[0])
    np.testing.assert_array_equal(stream(4, "forecast").normal(size=3),
                                  np.random.default_rng([4, STREAMS["forecast"]]).normal(size=3))


def test_every_purpose_has_its_own_tag_and_unknown_ones_are_refused():
    assert len(set(STREAMS.values())) == len(STREAMS)
    with pytest.raises(ValueError, match="unknown random stream"):
        stream(1, "forecasts")
    with pytest.raises(ValueError, match="seed must be >= 0"):
        series_seed(-1, "north")
