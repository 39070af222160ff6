"""Output piped into a reader that stops early (``bayesgrowth ... | head``)."""

import subprocess
import sys


def test_a_closed_output_pipe_stops_quietly_with_the_sigpipe_code(tmp_path):
    # the reader has gone away before the forecast prints its lines: they meet EPIPE
    proc = subprocess.Popen([sys.executable, "-m", "bayesgrowth", "demo", "--out",
                             str(tmp_path / "out")],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    proc.stdout.close()
    err = proc.stderr.read().decode()
    proc.stderr.close()
    # 141 = 128 + SIGPIPE, what a shell reports for a program stopped by a closed pipe
    assert proc.wait(timeout=300) == 141
    assert "unexpected failure" not in err and "Traceback" not in err
