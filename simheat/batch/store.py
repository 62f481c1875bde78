"""The kill-safe, resumable sweep store: sidecar files and one consolidating writer.

HDF5 has no journal: a process killed while it writes can leave a file that does
not open. So no HDF5 file is ever written in place:

1. Each finished variant goes to its own small file in a sidecar directory next
   to the output, ``OUT.parts/``: ``NNNNNN.json`` (its table row) and, with
   ``keep_series``, ``NNNNNN.h5`` (its run file) written first. Each is written
   under a temporary name, flushed to disk (fsync) and renamed; a rename is
   atomic, so a part is either whole or absent, and a row's presence implies its
   run file's.
2. One writer, the sweep process, consolidates: it writes the complete sweep file
   (texts, the table with every variant, finished or pending, and the kept runs)
   under a temporary name, fsyncs it, renames it onto ``OUT`` and fsyncs the
   directory. It does so at the start, every checkpoint interval and at the end.
3. After the final consolidation the sidecar is deleted.

A SIGKILL at any moment therefore loses only the variants in flight: a finished
variant is in a part or in ``OUT`` already, ``OUT`` is always a whole file from the
last consolidation, and what is left over is a temporary file, deleted on the
next start. ``resume`` reads ``OUT`` and the parts, checks that both belong to the
same sweep (content hash of the sweep and base scenario texts, same
``keep_series``) and runs only what is missing. A lock on the sidecar directory
keeps a second sweep process off the same output. A power cut can lose parts
renamed since the last directory fsync, never corrupt what is kept.
"""

from __future__ import annotations

import contextlib
import json
import os
import shutil
from collections.abc import Sequence
from datetime import UTC, datetime
from pathlib import Path

import h5py

import simheat
from simheat.batch.expand import Variant
from simheat.batch.spec import SweepSpec
from simheat.batch.sweepfile import (
    FILE_FORMAT,
    SCHEMA_VERSION,
    SERIES_GROUP,
    STRING,
    read_sweep,
    series_name,
    write_table,
)
from simheat.batch.table import DONE, FAILED, PENDING, empty_row, json_ready
from simheat.batch.variant import VariantResult
from simheat.errors import RunFileError, ScenarioError
from simheat.files import TEMPORARY_PREFIX, temporary_path

try:  # POSIX advisory locks; without them a second writer is not detected
    import fcntl
except ImportError:  # pragma: no cover - not on POSIX
    fcntl = None

PARTS_SUFFIX = ".parts"
MANIFEST_NAME = "sweep.json"
PARTS_FORMAT = "simheat-sweep-parts"
TEMPORARY_SUFFIX = ".tmp"


def parts_dir(out_path: str | Path) -> Path:
    """The sidecar directory of a sweep file: ``OUT.parts`` next to it.

    Parameters
    ----------
    out_path : str or Path
        The sweep file. [-]

    Returns
    -------
    Path
        The sidecar directory.
    """
    out_path = Path(out_path)
    return out_path.with_name(out_path.name + PARTS_SUFFIX)


def write_atomically(path: Path, data: bytes) -> None:
    """Write bytes under a temporary name, fsync, and rename onto ``path``.

    Parameters
    ----------
    path : Path
        Target; replaced if it exists (callers own it). [-]
    data : bytes
        Content. [-]
    """
    temporary = _temporary(path)
    try:
        with open(temporary, "xb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(temporary, path)
    finally:
        temporary.unlink(missing_ok=True)


def _temporary(path: Path) -> Path:
    return temporary_path(path)


def _fsync_directory(path: Path) -> None:
    try:
        fd = os.open(path, os.O_RDONLY)
    except OSError:  # some platforms cannot open a directory
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


class SweepStore:
    """Sidecar parts and the consolidated sweep file of one sweep.

    Use :meth:`open`; then :meth:`add` each result, :meth:`consolidate` now and
    then, and :meth:`finish` (or :meth:`close` on an error, keeping the parts).

    Parameters
    ----------
    out_path : Path
        The sweep file. [-]
    spec : SweepSpec
        The sweep. [-]
    variants : sequence of Variant
        Its expansion. [-]
    keep : bool
        Keep each variant's run in the file. [-]

    Attributes
    ----------
    out_path : Path
        The sweep file.
    rows : dict
        Finished rows (``done`` or ``failed``) by variant id.
    kept : int
        Rows found on opening (from an earlier, interrupted run). [-]
    """

    def __init__(
        self, out_path: Path, spec: SweepSpec, variants: Sequence[Variant], keep: bool
    ) -> None:
        self.out_path = out_path
        self.parts = parts_dir(out_path)
        self.spec = spec
        self.variants = list(variants)
        self.keep_series = keep
        self.rows: dict[int, dict] = {}
        self.kept = 0
        self._lock_fd: int | None = None
        self._written = False  # whether this store has written OUT yet
        self._file_is_ours = (
            False  # OUT is a sweep file of this sweep (read or written)
        )
        self._created_utc = _now()

    @classmethod
    def open(
        cls,
        out_path: str | Path,
        spec: SweepSpec,
        variants: Sequence[Variant],
        *,
        keep_series: bool = False,
        resume: bool = False,
        overwrite: bool = False,
    ) -> SweepStore:
        """Open the store for writing: check, lock, clean up, load what is kept.

        Parameters
        ----------
        out_path : str or Path
            The sweep file to write. [-]
        spec : SweepSpec
            The sweep. [-]
        variants : sequence of Variant
            Its expansion. [-]
        keep_series : bool
            Keep each variant's run in the file. [-]
        resume : bool
            Continue an interrupted sweep of the same content. [-]
        overwrite : bool
            Start afresh, discarding an existing file and sidecar. [-]

        Returns
        -------
        SweepStore
            The locked store; ``rows`` holds the variants already finished.

        Raises
        ------
        FileExistsError
            When the output or its sidecar exists and neither ``resume`` nor
            ``overwrite`` is given, or another sweep holds the lock.
        ScenarioError
            When resuming a sweep of other content, or with another
            ``keep_series``, or whose stored parameter values differ.
        RunFileError
            When resuming onto a file that is not a sweep file.
        """
        out_path = Path(out_path)
        store = cls(out_path, spec, variants, keep_series)
        exists = out_path.exists() or store.parts.exists()
        if exists and not (resume or overwrite):
            found = out_path if out_path.exists() else store.parts
            raise FileExistsError(
                f"{found} exists; pass --resume to continue that sweep or "
                "--overwrite to start afresh"
            )
        out_path.parent.mkdir(parents=True, exist_ok=True)
        store.parts.mkdir(exist_ok=True)
        store._lock()
        try:
            store._remove_temporaries()
            if overwrite:
                store._clear_parts()
            else:
                store._load_kept()
            manifest = {
                "format": PARTS_FORMAT,
                "content_hash": spec.content_hash,
                "keep_series": keep_series,
                "n_variants": len(store.variants),
                "simheat_version": simheat.__version__,
            }
            write_atomically(
                store.parts / MANIFEST_NAME,
                json.dumps(manifest, allow_nan=False).encode(),
            )
        except BaseException:
            store.close()
            raise
        store.kept = len(store.rows)
        return store

    def _lock(self) -> None:
        if fcntl is None:
            return
        fd = os.open(self.parts, os.O_RDONLY)
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            os.close(fd)
            raise FileExistsError(
                f"{self.out_path}: another simheat sweep is writing it (lock on "
                f"{self.parts})"
            ) from None
        self._lock_fd = fd

    def close(self) -> None:
        """Release the lock; keep the sidecar (it is what a resume reads)."""
        if self._lock_fd is not None:
            os.close(self._lock_fd)
            self._lock_fd = None

    def abandon(self) -> None:
        """Release the lock after a failure; drop a sidecar that holds nothing.

        A sweep that failed before writing the sweep file or keeping a variant
        (say, its cluster could not be reached) leaves no trace; otherwise the
        sidecar stays for a resume.
        """
        self.close()
        if not self._written and not self.rows:
            shutil.rmtree(self.parts, ignore_errors=True)

    def _remove_temporaries(self) -> None:
        """Delete temporary files an earlier, killed sweep left behind.

        Called with the sidecar's lock held, so no other sweep writes this
        output: every temporary of its name (``simheat.files.temporary_path``,
        and the ``.<name>.<random>.tmp`` names of earlier versions) is a
        leftover, however recent.
        """
        patterns = (
            f"{TEMPORARY_PREFIX}*-{self.out_path.name}",
            f".{self.out_path.name}.*{TEMPORARY_SUFFIX}",
        )
        for pattern in patterns:
            for path in self.out_path.parent.glob(pattern):
                path.unlink(missing_ok=True)
        for pattern in (f"{TEMPORARY_PREFIX}*", f".*{TEMPORARY_SUFFIX}"):
            for path in self.parts.glob(pattern):
                path.unlink(missing_ok=True)

    def _clear_parts(self) -> None:
        for path in self.parts.iterdir():
            if path.is_file():
                path.unlink()

    def _refuse(self, where: Path, problem: str) -> ScenarioError:
        return ScenarioError(
            f"{where}: {problem}; pass --overwrite to start the sweep afresh"
        )

    def _load_kept(self) -> None:
        """Read the finished variants of the file and the sidecar, checking both."""
        manifest_path = self.parts / MANIFEST_NAME
        if manifest_path.exists():
            try:
                manifest = json.loads(manifest_path.read_text(encoding="utf-8"))
            except (OSError, ValueError):
                manifest = {}
            self._check_same_sweep(
                self.parts, manifest.get("content_hash"), manifest.get("keep_series")
            )
        if self.out_path.exists():
            try:
                results = read_sweep(self.out_path)
            except RunFileError as exc:
                raise RunFileError(f"cannot resume: {exc}") from None
            self._check_same_sweep(
                self.out_path, results.content_hash, results.keep_series
            )
            self._file_is_ours = True
            for row in results.rows:
                if row["status"] != PENDING:
                    self._keep(row, self.out_path)
        for path in sorted(self.parts.glob("[0-9]*.json")):
            try:
                row = json.loads(path.read_text(encoding="utf-8"))
            except (OSError, ValueError):  # cannot happen after a rename; re-run it
                continue
            if self.keep_series and row.get("status") == DONE:
                if not self._part_series(row["id"]).exists():
                    continue
            self._keep(row, self.parts)

    def _check_same_sweep(self, where: Path, content_hash, keep_series) -> None:
        if content_hash != self.spec.content_hash:
            raise self._refuse(
                where,
                "holds a different sweep (the sweep file or its base scenario "
                "changed since it was started)",
            )
        if keep_series is not None and bool(keep_series) != self.keep_series:
            started = "with" if keep_series else "without"
            raise self._refuse(
                where,
                f"was started {started} --keep-series; resume it the same way",
            )

    def _keep(self, row: dict, where: Path) -> None:
        variant_id = row.get("id")
        if not isinstance(variant_id, int) or not 0 <= variant_id < len(self.variants):
            raise self._refuse(
                where, f"holds variant {variant_id!r}, not of this sweep"
            )
        variant = self.variants[variant_id]
        expected = json_ready(list(variant.values))
        if row["values"] != expected or row["scheme"] != variant.scheme:
            raise self._refuse(
                where,
                f"variant {variant_id} was run with parameter values "
                f"{row['values']} under {row['scheme']}, but the sweep now expands "
                f"to {expected} under {variant.scheme} (a different sampler?)",
            )
        row["values"] = expected  # the expansion's types (ints stay ints)
        self.rows[variant_id] = row

    def _part_row(self, variant_id: int) -> Path:
        return self.parts / f"{series_name(variant_id)}.json"

    def _part_series(self, variant_id: int) -> Path:
        return self.parts / f"{series_name(variant_id)}.h5"

    def add(self, result: VariantResult) -> None:
        """Keep a finished variant: its run file (if any), then its row, atomically.

        Parameters
        ----------
        result : VariantResult
            What a worker returned. [-]
        """
        row = result.row
        if self.keep_series and result.series is not None:
            write_atomically(self._part_series(row["id"]), result.series)
        text = json.dumps(row, allow_nan=False, sort_keys=True)
        write_atomically(self._part_row(row["id"]), text.encode())
        self.rows[row["id"]] = row

    def all_rows(self) -> list[dict]:
        """Every variant's row in id order; ``pending`` for those not finished."""
        return [
            self.rows.get(v.id) or empty_row(v.id, v.scheme, v.values, PENDING)
            for v in self.variants
        ]

    def consolidate(self) -> None:
        """Write the whole sweep file under a temporary name and rename it onto OUT."""
        temporary = _temporary(self.out_path)
        try:
            with contextlib.ExitStack() as stack:
                previous = None
                if self.keep_series and self._file_is_ours and self.out_path.exists():
                    previous = stack.enter_context(h5py.File(self.out_path, "r"))
                with h5py.File(temporary, "x") as f:
                    self._write(f, previous)
            with open(temporary, "rb+") as handle:
                os.fsync(handle.fileno())
            os.replace(temporary, self.out_path)
            self._written = self._file_is_ours = True
            _fsync_directory(self.out_path.parent)
        finally:
            temporary.unlink(missing_ok=True)

    def finish(self) -> None:
        """Consolidate a last time, delete the sidecar and release the lock."""
        self.consolidate()
        shutil.rmtree(self.parts, ignore_errors=True)
        self.close()

    def _write(self, f: h5py.File, previous: h5py.File | None) -> None:
        spec = self.spec
        rows = self.all_rows()
        counts = {
            s: sum(r["status"] == s for r in rows) for s in (DONE, FAILED, PENDING)
        }
        attrs = {
            "format": FILE_FORMAT,
            "schema_version": SCHEMA_VERSION,
            "simheat_version": simheat.__version__,
            "created_utc": self._created_utc,
            "updated_utc": _now(),
            "name": spec.name,
            "mode": spec.mode,
            "sampling": spec.sampling if spec.mode == "random" else "",
            "samples": spec.samples or 0,
            "seed": spec.seed,
            "content_hash": spec.content_hash,
            "keep_series": self.keep_series,
            "sweep_origin": spec.origin,
            "base_origin": spec.base_origin,
            "n_variants": len(rows),
            "n_done": counts[DONE],
            "n_failed": counts[FAILED],
            "n_pending": counts[PENDING],
            "complete": counts[PENDING] == 0,
            "caution": _caution(),
        }
        for name, value in attrs.items():
            f.attrs[name] = value
        f.create_dataset("sweep_toml", data=spec.text, dtype=STRING)
        f.create_dataset("base_scenario_toml", data=spec.base_text, dtype=STRING)
        write_table(
            f.create_group("table"),
            rows,
            {
                "keys": spec.keys,
                "operations": [p.operation for p in spec.parameters],
                "room_ids": [room.id for room in spec.base.rooms],
                "schemes": spec.schemes,
            },
        )
        if self.keep_series:
            group = f.create_group(SERIES_GROUP)
            group.attrs["note"] = "one group per finished variant, run-file layout"
            for row in rows:
                if row["status"] == DONE:
                    self._copy_series(row["id"], group, previous)

    def _copy_series(
        self, variant_id: int, group: h5py.Group, previous: h5py.File | None
    ) -> None:
        """Copy a variant's run into ``group``: from its part, else the old file."""
        name = series_name(variant_id)
        part = self._part_series(variant_id)
        with contextlib.ExitStack() as stack:
            if part.exists():
                source = stack.enter_context(h5py.File(part, "r"))
            elif previous is not None and f"{SERIES_GROUP}/{name}" in previous:
                source = previous[f"{SERIES_GROUP}/{name}"]
            else:  # cannot happen: a kept row always has its run; say so in the file
                group.attrs[f"missing_{name}"] = True
                return
            target = group.create_group(name)
            for key, value in source.attrs.items():
                target.attrs[key] = value
            for key in source:
                source.copy(source[key], target, name=key)


def _now() -> str:
    return datetime.now(UTC).isoformat(timespec="seconds")


def _caution() -> str:
    from simheat.caution import CAUTION

    return CAUTION
