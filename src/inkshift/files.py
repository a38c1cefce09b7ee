"""Writing output files so that a failure never leaves a partial file behind.

Every file the project writes goes to a temporary name in the target folder
and is renamed into place (``os.replace`` is atomic on POSIX and Windows when
both names are on the same file system).
"""

from __future__ import annotations

import os
import tempfile
from concurrent.futures import Future, ThreadPoolExecutor
from contextlib import contextmanager
from pathlib import Path
from typing import Callable, Iterator

from PIL import Image

from inkshift.errors import InputError

__all__ = [
    "atomic_path",
    "write_bytes_atomic",
    "write_text_atomic",
    "save_image_atomic",
    "ensure_writable_dir",
    "OutputFolder",
    "output_folder",
]


def _new_file_mode() -> int:
    """The permissions ``open()`` gives a new file: 0o666 less the process umask."""
    try:
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith("Umask:"):
                return 0o666 & ~int(line.split()[1], 8)
    except (OSError, ValueError):
        pass
    mask = os.umask(0o022)  # read by setting; done once, at import, before any thread writes
    os.umask(mask)
    return 0o666 & ~mask


_NEW_FILE_MODE = _new_file_mode()


@contextmanager
def atomic_path(path: str | Path) -> Iterator[Path]:
    """Yield a temporary path beside ``path``; rename it to ``path`` if the block succeeds.

    The file ends with the permissions a plainly created file would have
    (``mkstemp`` makes its files private to the owner).
    """
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    os.close(fd)
    tmp_path = Path(tmp)
    try:
        yield tmp_path
        try:
            os.chmod(tmp_path, _NEW_FILE_MODE)
        except OSError:
            pass  # file systems without Unix permissions (vfat, some network mounts)
        os.replace(tmp_path, path)
    except BaseException:
        tmp_path.unlink(missing_ok=True)
        raise


def write_bytes_atomic(path: str | Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically and return the path."""
    with atomic_path(path) as tmp:
        tmp.write_bytes(data)
    return Path(path)


def write_text_atomic(path: str | Path, text: str) -> Path:
    """Write UTF-8 ``text`` to ``path`` atomically and return the path."""
    return write_bytes_atomic(path, text.encode("utf-8"))


def save_image_atomic(image: Image.Image, path: str | Path, format: str = "PNG", **params: object) -> Path:
    """Save a Pillow image to ``path`` atomically (format given explicitly) and return the path."""
    with atomic_path(path) as tmp:
        image.save(tmp, format=format, **params)
    return Path(path)


def ensure_writable_dir(path: str | Path) -> tuple[Path, bool]:
    """Make sure ``path`` is a folder we can write to; create it if needed.

    Returns the folder and whether it was created here (so a caller that
    fails later can remove it again). Raises :class:`InputError` with one
    line when the folder cannot be used.
    """
    path = Path(path)
    created = False
    if path.exists() and not path.is_dir():
        raise InputError(f"{path}: output path exists and is not a folder")
    if not path.exists():
        try:
            path.mkdir(parents=True)
            created = True
        except OSError as exc:
            raise InputError(f"{path}: cannot create output folder ({exc.strerror or exc})") from None
    try:
        fd, probe = tempfile.mkstemp(prefix=".inkshift-probe.", dir=path)
        os.close(fd)
        os.unlink(probe)
    except OSError as exc:
        if created:
            _remove_empty(path)
        raise InputError(f"{path}: output folder is not writable ({exc.strerror or exc})") from None
    return path, created


def _remove_empty(path: Path) -> None:
    try:
        path.rmdir()
    except OSError:
        pass


class OutputFolder:
    """A folder that a command writes its files into, remembering what it wrote.

    With ``workers`` > 0, :meth:`image` and :meth:`file` can hand a write to a
    worker thread (``background=True``): PNG encoding releases the GIL, so the
    next picture can be drawn while the last one is written.
    """

    def __init__(self, path: Path, workers: int = 0) -> None:
        self.path = path
        self.written: list[Path] = []
        self._pool = ThreadPoolExecutor(max_workers=workers) if workers > 0 else None
        self._pending: list[Future[Path]] = []

    def image(self, name: str, image: Image.Image, *, background: bool = False, **params: object) -> Path:
        """Save a Pillow image as PNG under ``name`` atomically and return its path."""
        return self.file(name, lambda path: save_image_atomic(image, path, **params), background=background)

    def file(self, name: str, write: Callable[[Path], object], *, background: bool = False) -> Path:
        """Have ``write(path)`` write the file ``name`` (atomically, by its own means); return the path.

        With ``background`` (and workers), ``write`` runs in a worker thread.
        """
        path = self.path / name

        def run() -> Path:
            write(path)
            return path

        if background and self._pool is not None:
            self._pending.append(self._pool.submit(run))
            return path
        self.written.append(run())
        return path

    def text(self, name: str, text: str) -> Path:
        """Write UTF-8 ``text`` under ``name`` atomically and return its path."""
        path = write_text_atomic(self.path / name, text)
        self.written.append(path)
        return path

    def wait(self) -> None:
        """Wait for every background write; raise the first failure after all have ended."""
        pending, self._pending = self._pending, []
        failure: BaseException | None = None
        for job in pending:
            try:
                self.written.append(job.result())
            except BaseException as exc:  # noqa: BLE001 - re-raised below once all writes ended
                failure = failure or exc
        if failure is not None:
            raise failure

    def close(self) -> None:
        """Stop the worker threads (after waiting for them)."""
        if self._pool is not None:
            self._pool.shutdown(wait=True)


@contextmanager
def output_folder(path: str | Path, *, workers: int = 0) -> Iterator[OutputFolder]:
    """Yield an :class:`OutputFolder` for ``path``; on any failure remove what it wrote.

    Background writes are waited for before the block counts as done. Files
    already renamed into place are deleted again on failure, and the folder
    itself is removed if this call created it, so a failed command leaves
    nothing behind.
    """
    out, created = ensure_writable_dir(path)
    folder = OutputFolder(out, workers)
    try:
        yield folder
        folder.wait()
    except BaseException:
        try:
            folder.wait()  # let every write end, so that none lands after the clean-up
        except BaseException:  # noqa: BLE001 - the first failure is the one raised
            pass
        for written in folder.written:
            written.unlink(missing_ok=True)
        if created:
            _remove_empty(out)
        raise
    finally:
        folder.close()
