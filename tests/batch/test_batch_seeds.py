"""Series seeds depend on the global seed and the name only, not on the process."""

import os
import subprocess
import sys

from bayesgrowth.batch.seeds import series_seed


def test_seed_changes_with_name_and_global_seed():
    seeds = {series_seed(s, n) for s in (0, 1) for n in ("north", "south", "n0rth")}
    assert len(seeds) == 6


def test_seed_is_the_same_in_another_process_with_another_hash_salt():
    code = "from bayesgrowth.batch.seeds import series_seed; print(series_seed(7, 'ünit-3'))"
    env = {**os.environ, "PYTHONHASHSEED": "12345"}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         env=env, check=True).stdout
    assert int(out) == series_seed(7, "ünit-3")
