"""Results on disk as they finish, so an interrupted batch loses at most the chunks in flight.

Layout of the output folder::

    forecast.csv  summary.csv  failures.csv      merged results (written at the end)
    posteriors/<series>-<hash>.nc                 with --save-posteriors
    .bayesgrowth-batch/run.json                   the settings the results belong to
    .bayesgrowth-batch/parts/<chunk>.*.csv        results of each finished chunk
    .bayesgrowth-batch/parts/<chunk>.done.json    names and input fingerprints of the chunk

The merged results are written with their text cells neutralised against
spreadsheet formulas (:mod:`bayesgrowth.data.export`); the chunk files keep the
names as they are, since merging matches them, and live in the hidden state folder.

Every file is written to a temporary name in its own folder and renamed into
place, so no file is ever half-written; temporary files of a run that was killed
are removed by the next run (:mod:`bayesgrowth.data.leftovers`), and so are the
tables of a chunk whose marker was never written. One run at a time writes to a
folder (``.bayesgrowth-batch/lock`` holds its process id). A chunk counts as finished only once its
``done.json`` exists, and that is renamed into place last. A later run into the
same folder with the same settings skips every series whose name and input
fingerprint a finished chunk records as forecast; series that failed are tried
again (a failure that depends only on the data fails again, quickly). A run with
other settings is refused rather than mixing results.
"""

from __future__ import annotations

import json
import os
import secrets
from pathlib import Path

import pandas as pd

from bayesgrowth.batch.work import SUMMARY_COLUMNS, SeriesOutcome
from bayesgrowth.data.export import atomic_write, json_text, write_csv
from bayesgrowth.data.leftovers import TMP_PREFIX, pid_alive, remove_abandoned
from bayesgrowth.data.series import InputError

__all__ = ["RunStore", "OUTPUTS", "STATE_DIR", "atomic_write"]

OUTPUTS = ("forecast.csv", "summary.csv", "failures.csv")
STATE_DIR = ".bayesgrowth-batch"
FLOAT_FORMAT = "%.6g"
CHUNK_FILES = ("forecast.csv", "summary.csv", "failures.csv", "done.json")


def _write_csv(frame: pd.DataFrame, path: Path, float_format: str | None = None) -> None:
    """A chunk's table as computed (names unchanged, so that merging can match them)."""
    atomic_write(path, lambda tmp: frame.to_csv(tmp, index=False, float_format=float_format))


def _write_result(frame: pd.DataFrame, path: Path) -> None:
    """A merged result for people: text cells neutralised against spreadsheet formulas."""
    atomic_write(path, lambda tmp: write_csv(frame, tmp, FLOAT_FORMAT))


def _first_difference(old: dict, new: dict) -> str:
    for key in sorted(set(old) | set(new)):
        if old.get(key) != new.get(key):
            return f"{key} was {old.get(key)!r}, now {new.get(key)!r}"
    return "settings differ"


class RunStore:
    """The output folder of one batch run: settings, finished chunks, merged results.

    Parameters
    ----------
    out_dir : path
        The output folder; created if missing.
    record : dict
        Settings that decide the results (:meth:`BatchSettings.to_record`).
    protect : list of Path
        Files that must never be overwritten (the input).

    Raises
    ------
    InputError
        If the folder cannot hold this run: it is a file, its parent is missing, it
        holds result files of something else, it would overwrite the input, or it
        holds a run with other settings.
    """

    def __init__(self, out_dir: str | Path, record: dict, protect: list[Path]) -> None:
        out = Path(out_dir)
        self.out = out
        if out.exists() and not out.is_dir():
            raise InputError(f"--out {out}: exists and is not a folder; name a folder")
        parent = out.resolve().parent
        if not parent.is_dir():
            raise InputError(f"--out {out}: parent folder {parent} does not exist")
        protected = {p.resolve() for p in protect}
        for name in OUTPUTS:
            if (out / name).resolve() in protected:
                raise InputError(
                    f"--out {out}: writing {name} there would overwrite the input file; "
                    "choose another folder"
                )
        self.state = out / STATE_DIR
        self.parts = self.state / "parts"
        manifest = self.state / "run.json"
        if out.is_dir() and not manifest.exists():
            clash = [n for n in OUTPUTS if (out / n).exists()]
            if clash:
                raise InputError(
                    f"--out {out}: holds {clash[0]} that no batch run wrote there; "
                    "choose another folder so it is not overwritten"
                )
        if manifest.exists():
            try:
                old = json.loads(manifest.read_text())
            except (OSError, ValueError):
                raise InputError(
                    f"--out {out}: {manifest} is unreadable; choose another folder"
                ) from None
            if old != record:
                raise InputError(
                    f"--out {out}: holds a batch run with other settings "
                    f"({_first_difference(old, record)}); rerun with the same options to "
                    "resume, or choose another folder"
                )
        self.parts.mkdir(parents=True, exist_ok=True)
        self._lock = self.state / "lock"
        self._take_lock()
        self._remove_leftovers()
        if not manifest.exists():
            atomic_write(manifest, lambda tmp: tmp.write_text(json_text(record)))
        self._run = secrets.token_hex(4)
        self._count = 0

    def _take_lock(self) -> None:
        while True:
            try:
                fd = os.open(self._lock, os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o644)
            except FileExistsError:
                try:
                    pid = int(self._lock.read_text().strip() or 0)
                except (OSError, ValueError):
                    pid = 0
                if pid != os.getpid() and pid_alive(pid):
                    raise InputError(
                        f"--out {self.out}: another batch run (process {pid}) is writing "
                        "there; wait for it to finish or choose another folder"
                    ) from None
                self._lock.unlink(missing_ok=True)  # left by a run that was killed
                continue
            with os.fdopen(fd, "w") as f:
                f.write(str(os.getpid()))
            return

    def release(self) -> None:
        """Let other runs write to the folder (the end of this run)."""
        try:
            if self._lock.read_text().strip() == str(os.getpid()):
                self._lock.unlink()
        except OSError:
            pass

    def _remove_leftovers(self) -> None:
        """Temporary files of killed runs, and chunk tables whose marker never came."""
        for folder in (self.out, self.state, self.parts, self.out / "posteriors"):
            if folder.is_dir():
                remove_abandoned(folder, TMP_PREFIX)
        marked = {p.name[: -len(".done.json")] for p in self.parts.glob("*.done.json")}
        for path in self.parts.glob("*.csv"):
            if not path.name.startswith(".") and path.name.split(".", 1)[0] not in marked:
                path.unlink(missing_ok=True)

    def clear_results(self, pending: list[str]) -> None:
        """Remove the merged results, and the posteriors of ``pending`` series, of earlier runs.

        Called before a run that has work to do: until it merges its own results, the
        folder holds no finished-looking file of an earlier run beside new ones.
        """
        from bayesgrowth.batch.work import posterior_file_name

        for name in OUTPUTS:
            (self.out / name).unlink(missing_ok=True)
        folder = self.out / "posteriors"
        if folder.is_dir():
            for name in pending:
                (folder / posterior_file_name(name)).unlink(missing_ok=True)

    def posterior_dir(self) -> Path:
        """The folder for per-series posterior files (created)."""
        folder = self.out / "posteriors"
        folder.mkdir(exist_ok=True)
        return folder

    def _markers(self) -> list[tuple[str, dict[str, str]]]:
        found = []
        for path in sorted(self.parts.glob("*.done.json")):
            try:
                found.append((path.name[: -len(".done.json")], json.loads(path.read_text())))
            except (OSError, ValueError):
                continue  # an unreadable marker: that chunk is simply redone
        return found

    def finished(self, current: dict[str, str] | None = None) -> dict[str, str]:
        """Input fingerprints of the series forecast by earlier chunks, by name.

        Parameters
        ----------
        current : dict of str to str, optional
            Fingerprints of this run's input: a series forecast from this input by any
            chunk maps to it, even when other chunks forecast it from an older input.
        """
        current = current or {}
        done: dict[str, str] = {}
        for _, names in self._markers():
            for name, fingerprint in names.items():
                if name not in current or done.get(name) != current[name]:
                    done[name] = fingerprint
        return done

    def write_chunk(self, outcomes: list[SeriesOutcome]) -> None:
        """Record a finished chunk: its tables first, then its marker (the commit point)."""
        self._count += 1
        chunk = f"{self._run}-{self._count:05d}"
        try:
            self._write_chunk(chunk, outcomes)
        except BaseException:  # interrupted or failed half-way: none of the chunk stays
            for suffix in CHUNK_FILES:
                (self.parts / f"{chunk}.{suffix}").unlink(missing_ok=True)
            raise

    def _write_chunk(self, chunk: str, outcomes: list[SeriesOutcome]) -> None:
        forecasts = [o.forecast for o in outcomes if o.forecast is not None]
        summaries = [o.summary for o in outcomes if o.summary is not None]
        failures = [(o.name, o.failure) for o in outcomes if o.failure is not None]
        if forecasts:
            _write_csv(pd.concat(forecasts, ignore_index=True),
                       self.parts / f"{chunk}.forecast.csv")
        if summaries:
            _write_csv(pd.DataFrame(summaries), self.parts / f"{chunk}.summary.csv")
        if failures:
            _write_csv(pd.DataFrame(failures, columns=["series", "reason"]),
                       self.parts / f"{chunk}.failures.csv")
        marker = {o.name: o.fingerprint for o in outcomes if o.failure is None}
        atomic_write(self.parts / f"{chunk}.done.json",
                     lambda tmp: tmp.write_text(json_text(marker, indent=None)))

    def merge(
        self, current: dict[str, str], order: list[str], extra_failures: list[tuple[str, str]]
    ) -> tuple[pd.DataFrame, pd.DataFrame, pd.DataFrame]:
        """Merge the finished chunks of the series in ``current`` into the three result files.

        Parameters
        ----------
        current : dict of str to str
            Input fingerprints of the series of this run's input, by name; records of
            other series or other inputs are left out.
        order : list of str
            Every series name in input order (also those that failed validation).
        extra_failures : list of (str, str)
            The failures of this run (validation, fits, lost workers); failures of
            earlier runs were retried, so only this run's count.

        Returns
        -------
        forecast, summary, failures : pandas.DataFrame
            As written to ``forecast.csv``, ``summary.csv``, ``failures.csv``.
        """
        rank = {name: i for i, name in enumerate(order)}
        tables: dict[str, list[pd.DataFrame]] = {"forecast": [], "summary": []}
        taken: set[str] = set()
        for chunk, names in self._markers():
            keep = {n for n, fp in names.items() if current.get(n) == fp and n not in taken}
            if not keep:
                continue
            taken |= keep
            for kind in tables:
                path = self.parts / f"{chunk}.{kind}.csv"
                if path.exists():
                    frame = pd.read_csv(path, dtype={"series": str}, keep_default_na=False,
                                        na_values=[""])
                    tables[kind].append(frame[frame["series"].isin(keep)])
        failures = [f for f in extra_failures if f[0] not in taken]
        tables["failures"] = (
            [pd.DataFrame(failures, columns=["series", "reason"])] if failures else []
        )
        out = {}
        for kind, frames in tables.items():
            frames = [f for f in frames if len(f)]
            if frames:
                frame = pd.concat(frames, ignore_index=True)
            elif kind == "summary":
                frame = pd.DataFrame(columns=SUMMARY_COLUMNS)
            elif kind == "failures":
                frame = pd.DataFrame(columns=["series", "reason"])
            else:
                frame = pd.DataFrame(columns=["series", "period", "step"])
            key = frame["series"].map(rank).fillna(len(rank))
            sort_cols = ["_rank"] + (["step"] if kind == "forecast" else [])
            frame = (frame.assign(_rank=key).sort_values(sort_cols, kind="stable")
                     .drop(columns="_rank").reset_index(drop=True))
            out[kind] = frame
        for kind, frame in out.items():
            _write_result(frame, self.out / f"{kind}.csv")
        return out["forecast"], out["summary"], out["failures"]
