"""Files on disk: atomic writes, the review's lock, digests and confinement (a leaf module).

A reader sees the old file or the new one, never half of either (temp file, fsync, rename).
New files get the mode the umask gives (so a group-shared folder stays shared); a replaced
file keeps its mode. A save killed half-way leaves a hidden ``.NAME.*.tmp`` file; the next
save of the same file under the review's lock removes it (no one else can be writing it then).

Every read-modify-write of a review file holds the review's lock (``review_lock``: an OS
advisory lock through the `filelock` library, file ``DIR/.robtui.lock``) and compares the file
with the digest of what it read (``digest_of``), so no writer replaces what another wrote.
"""

from __future__ import annotations

import hashlib
import os
import stat
import tempfile
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from robtui.errors import DataFileError, RobtuiError

LOCK_NAME = ".robtui.lock"
LOCK_TIMEOUT_S = 30.0
# A leftover temp file this old cannot belong to a save still running outside the lock.
_LEFTOVER_AGE_S = 600.0


class LockTimeoutError(RobtuiError):
    """Another process held the review's lock for too long."""


class StaleFileError(DataFileError):
    """A file changed on disk after it was read: writing would lose the other writer's work."""


class OutsideReviewError(DataFileError):
    """A path would lead outside the review folder (a symlink, '..', an absolute path)."""


def umask_mode() -> int:
    """Mode of a new file under the current umask (0o666 minus the umask)."""
    try:  # Linux states the umask without changing it
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith("Umask:"):
                return 0o666 & ~int(line.split()[1], 8)
    except (OSError, ValueError, IndexError):
        pass
    current = os.umask(0o022)  # elsewhere: read it by setting it (and put it back)
    os.umask(current)
    return 0o666 & ~current


def _mode_for(path: Path) -> int:
    try:
        return stat.S_IMODE(path.stat().st_mode)
    except OSError:
        return umask_mode()


def _leftover_prefix(path: Path) -> str:
    return f".{path.name}."


def remove_leftovers(path: Path, older_than_s: float = 0.0) -> list[Path]:
    """Remove temp files a killed save of ``path`` left behind; returns what was removed.

    Call it with ``older_than_s=0`` only while holding the lock every writer of ``path`` holds.
    """
    path = Path(path)
    removed = []
    now = time.time()
    try:
        siblings = list(path.parent.iterdir())
    except OSError:
        return removed
    for other in siblings:
        name = other.name
        if not (name.startswith(_leftover_prefix(path)) and name.endswith(".tmp")):
            continue
        try:
            if now - other.lstat().st_mtime >= older_than_s and not other.is_dir():
                other.unlink()
                removed.append(other)
        except OSError:
            continue
    return removed


def write_bytes_atomic(path: Path, data: bytes, *, locked: bool = False) -> None:
    """Write ``data`` to ``path`` through a temporary file in the same folder, fsync, rename.

    ``locked``: the caller holds the lock all writers of ``path`` take, so any leftover temp
    file of ``path`` is dead and is removed now (otherwise only old ones are).
    """
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    mode = _mode_for(path)
    fd, tmp_name = tempfile.mkstemp(prefix=_leftover_prefix(path), suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as handle:
            os.fchmod(handle.fileno(), mode)
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp_name, path)
    except BaseException:
        try:
            os.unlink(tmp_name)
        except FileNotFoundError:
            pass
        raise
    _fsync_dir(path.parent)
    remove_leftovers(path, 0.0 if locked else _LEFTOVER_AGE_S)


def write_text_atomic(path: Path, text: str, *, locked: bool = False) -> None:
    """Write UTF-8 ``text`` to ``path`` atomically (newlines kept as given)."""
    write_bytes_atomic(path, text.encode("utf-8"), locked=locked)


def _fsync_dir(folder: Path) -> None:
    # Makes the rename itself durable; not every platform lets a folder be opened.
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


# -- the review's lock ---------------------------------------------------------------------
@contextmanager
def review_lock(root: Path, timeout_s: float = LOCK_TIMEOUT_S) -> Iterator[None]:
    """Hold the review folder's advisory lock (re-entrant within a thread)."""
    from filelock import FileLock, Timeout

    # One lock object per review (resolved path): taking it again in the same thread nests.
    lock_path = Path(root).resolve() / LOCK_NAME
    lock = FileLock(lock_path, timeout=timeout_s, mode=umask_mode(), is_singleton=True)
    try:
        lock.acquire()
    except Timeout:
        raise LockTimeoutError(
            f"another robtui process has held the review's lock ({lock_path}) for over "
            f"{timeout_s:.0f} s: wait for it to finish and try again (nothing was written)"
        ) from None
    except OSError as error:
        raise LockTimeoutError(
            f"cannot take the review's lock {lock_path} ({error.strerror or error}): check that "
            "you may write in the review folder (nothing was written)"
        ) from None
    try:
        yield
    finally:
        lock.release()


# -- what was read ---------------------------------------------------------------------------
def digest_bytes(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def digest_of(path: Path) -> str | None:
    """sha256 of a file's bytes; None when there is no file."""
    try:
        return digest_bytes(Path(path).read_bytes())
    except FileNotFoundError:
        return None


def refuse_if_changed(path: Path, expected: str | None) -> None:
    """StaleFileError when ``path`` is no longer what was read (``expected``: its digest,
    None when it did not exist)."""
    actual = digest_of(path)
    if actual == expected:
        return
    if expected is None:
        what = "was created by another process after this one looked"
    elif actual is None:
        what = "was removed by another process after it was read"
    else:
        what = "was changed by another process (or an editor) after it was read"
    raise StaleFileError(
        f"{path} {what}: nothing was written, so no one's work is lost; reload it and make "
        "the change again"
    )


# -- confinement -----------------------------------------------------------------------------
def confined(root: Path, path: Path) -> Path:
    """``path`` (absolute, or relative to the working folder, as ``root`` is) when it stays
    inside ``root``; returned absolute.

    Every existing part of the path below ``root`` must be a real file or folder: a symlink
    is refused (it could point anywhere later), as are '..' and absolute paths outside.
    """
    root, path = Path(root), Path(path)
    real_root = root.resolve()
    try:
        relative = Path(os.path.abspath(path)).relative_to(os.path.abspath(root))
    except ValueError:
        raise OutsideReviewError(
            f"{path} is outside the review folder {root}: robtui only writes inside it"
        ) from None
    if ".." in relative.parts:
        raise OutsideReviewError(f"{path}: '..' is not allowed in a path inside the review")
    current = real_root
    for part in relative.parts:
        current = current / part
        if current.is_symlink():
            raise OutsideReviewError(
                f"{current} is a symbolic link: robtui does not follow links inside a review "
                "(they can lead outside it); replace it with the real folder or file"
            )
        if not current.exists():
            break
    return real_root / relative
