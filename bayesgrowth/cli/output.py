"""Output folders: every file of a run appears together or none does, and no file is lost.

A run stages its files in a hidden folder inside ``--out`` and moves them into
place only when all of them are written, each by an atomic rename. The folder
keeps a small manifest, :data:`MANIFEST`, with the SHA-256 of every file the tool
wrote there. A run replaces a file only if the manifest says the tool wrote it
and it has not changed since; any other file of the same name is left alone and
the run is refused before any computation (``--force`` replaces it).

A run that writes fewer files than an earlier one into the same folder (no
``posterior.nc`` or ``scenario.csv`` this time) removes the earlier run's files of
those names when the manifest records them unchanged, so that no file of an
earlier run sits beside this run's as if it were one of them; a file changed
since is the user's and stays.
"""

from __future__ import annotations

import argparse
import hashlib
import json
import os
import shutil
import tempfile
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path

from bayesgrowth.cli.signals import deferred
from bayesgrowth.data.export import atomic_write
from bayesgrowth.data.leftovers import TMP_PREFIX, remove_abandoned, temp_prefix
from bayesgrowth.data.series import InputError

__all__ = ["MANIFEST", "add_force_option", "check_output", "earlier_outputs", "staged_output"]

#: The manifest of the files the tool wrote into an output folder.
MANIFEST = ".bayesgrowth-manifest.json"
STAGE_PREFIX = ".bayesgrowth-stage-"


def add_force_option(p: argparse.ArgumentParser) -> None:
    """Register ``--force`` on a subcommand that writes into ``--out``."""
    p.add_argument(
        "--force",
        action="store_true",
        help="replace files of the same names in --out even when bayesgrowth did not write "
        "them (or they changed since); without it such a run stops before any work",
    )


def _sha256(path: Path) -> str:
    digest = hashlib.sha256()
    with path.open("rb") as f:
        for block in iter(lambda: f.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def _read_manifest(out: Path) -> dict[str, str]:
    try:
        files = json.loads((out / MANIFEST).read_text())["files"]
        return {str(k): str(v) for k, v in files.items()}
    except (OSError, ValueError, KeyError, TypeError, AttributeError):
        return {}


def _write_manifest(out: Path, files: dict[str, str]) -> None:
    record = {"written_by": "bayesgrowth", "files": dict(sorted(files.items()))}
    atomic_write(out / MANIFEST, lambda tmp: tmp.write_text(json.dumps(record, indent=2) + "\n"))


def earlier_outputs(out_dir: str | Path, names: list[str]) -> tuple[list[str], list[str]]:
    """Files of ``names`` in ``out_dir`` that bayesgrowth wrote: unchanged ones, changed ones.

    A file the manifest does not record is in neither list (it is the user's).
    """
    out = Path(out_dir)
    own = _read_manifest(out) if out.is_dir() else {}
    found = [n for n in names if n in own and (out / n).is_file()]
    unchanged = [n for n in found if own[n] == _sha256(out / n)]
    return unchanged, [n for n in found if n not in unchanged]


def _retire(out: Path, names: Sequence[str], files: dict[str, str]) -> None:
    """Remove the files of ``names`` still as bayesgrowth wrote them, and their records."""
    for name in names:
        path = out / name
        if name in files and path.is_file() and files[name] == _sha256(path):
            path.unlink()
            del files[name]


def check_output(out_dir: str | Path, names: list[str], protect: list[Path],
                 force: bool = False) -> None:
    """Refuse, before any work, names that would overwrite the input, a folder, or a user's file.

    Raises
    ------
    InputError
        Naming ``--out``, the file, and the way out (another folder, or ``--force``).
    """
    out = Path(out_dir)
    protected = {p.resolve() for p in protect}
    own = _read_manifest(out) if out.is_dir() else {}
    for name in names:
        target = out / name
        if target.resolve() in protected:
            raise InputError(f"--out {out}: writing {name} there would overwrite the input "
                             "file; choose another folder")
        if target.is_dir():
            raise InputError(f"--out {out}: {name} there is a folder; choose another folder")
        if target.exists() and not force and own.get(name) != _sha256(target):
            how = "changed since bayesgrowth wrote it" if name in own else (
                "not written by bayesgrowth")
            raise InputError(f"--out {out}: {name} is already there and {how}; choose another "
                             "folder, or pass --force to replace it")


def _make_stage(out: Path) -> tuple[Path, bool]:
    """Create ``out`` if needed and a staging folder inside it; fail early if not writable."""
    if out.exists() and not out.is_dir():
        raise InputError(f"--out {out}: exists and is not a folder; name a folder")
    created = not out.exists()
    try:
        out.mkdir(parents=False, exist_ok=True)
        for prefix in (STAGE_PREFIX, TMP_PREFIX):  # of runs killed outright
            remove_abandoned(out, prefix)
        return Path(tempfile.mkdtemp(prefix=temp_prefix(STAGE_PREFIX), dir=out)), created
    except FileNotFoundError:
        raise InputError(
            f"--out {out}: its parent folder {out.resolve().parent} does not exist; create it "
            "first"
        ) from None
    except OSError as exc:
        if created and out.is_dir() and not any(out.iterdir()):
            out.rmdir()
        raise InputError(f"--out {out}: cannot write there ({exc.strerror}); choose a folder "
                         "you may write to") from None


@contextmanager
def staged_output(
    out_dir: str | Path, names: list[str], protect: list[Path], *, force: bool = False,
    retire: Sequence[str] = (),
) -> Iterator[Path]:
    """Stage files inside ``out_dir`` and move them into place only on success.

    Parameters
    ----------
    out_dir : path
        Destination folder; created if missing (and removed again on failure when
        it is still empty).
    names : list of str
        File names the run will write; checked before any work against ``protect``,
        folders of those names, and files the tool did not write.
    protect : list of Path
        Files that must never be overwritten (the user's input).
    force : bool
        Replace existing files of those names even when the tool did not write them.
    retire : list of str
        Names of files an earlier run may have written that this run does not: removed
        with the moves if the manifest records them unchanged (see
        :func:`earlier_outputs`), else left alone.

    Yields
    ------
    Path
        The staging folder to write into (hidden, inside ``out_dir``).

    Raises
    ------
    InputError
        Before the body runs, when the folder cannot take the files; after it, when
        a file the tool did not write appeared there in the meantime.
    """
    out = Path(out_dir)
    check_output(out, names, protect, force)
    stage, created = _make_stage(out)
    try:
        yield stage
        check_output(out, names, protect, force)  # nothing of the user's appeared meanwhile
        written = {n: _sha256(stage / n) for n in names if (stage / n).exists()}
        try:
            with deferred():  # all files and their record, or none: an interrupt waits
                for name in written:
                    os.replace(stage / name, out / name)
                files = _read_manifest(out)
                keep = {p.resolve() for p in protect}  # the input, whatever its name
                _retire(out, [n for n in retire
                              if n not in written and (out / n).resolve() not in keep], files)
                _write_manifest(out, {**files, **written})
        except KeyboardInterrupt as exc:  # it came during the moves: the outputs are done
            exc.outputs_complete = out
            created = False
            raise
    except BaseException:
        shutil.rmtree(stage, ignore_errors=True)
        if created and out.is_dir() and not any(out.iterdir()):
            out.rmdir()
        raise
    finally:
        shutil.rmtree(stage, ignore_errors=True)
