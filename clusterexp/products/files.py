"""Every file clusterexp writes (`-o`, the tables and figures of an input) goes through here.

The rule for a target path:

- A path that does not exist is created as a regular file with the permissions of any new file
  (0666 less the umask).
- A symbolic link is followed: the rule applies to the file it finally points to, which is written
  (the link stays a link); a dangling link creates its target.
- An existing regular file is replaced only with `overwrite`, keeping its permissions.
- Anything else (a folder, a FIFO, a device, a socket) is refused: results go to regular files only
  (standard output is `-o -` or no `-o`).
- The input file and the files it includes are never written, and one run never writes two results
  into one file.

Writing is atomic and all-or-nothing: a `Batch` first writes every file to a temporary file beside
its target and only then renames them into place, so a failure or an interrupt while writing leaves
no partial file and no temporary file, and the targets as they were.
"""
from __future__ import annotations

import os
import secrets
import stat
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError, Span

KINDS = ((stat.S_ISDIR, "a folder"), (stat.S_ISFIFO, "a FIFO (named pipe)"), (stat.S_ISCHR, "a character device"),
         (stat.S_ISBLK, "a block device"), (stat.S_ISSOCK, "a socket"))


def file_identity(path) -> tuple[int, int] | None:
    """(device, inode) of an existing file (symbolic links followed), else None."""
    try:
        info = os.stat(path)
    except (OSError, ValueError):
        return None
    return info.st_dev, info.st_ino


def protected_files(system, extra=()) -> dict[tuple[int, int], str]:
    """{identity: what it is} of the input's files (the main file and every included one), which no
    output may replace."""
    out = {}
    for number, name in enumerate([*extra, *getattr(system, "files", ())]):
        identity = file_identity(name)
        if identity is not None and identity not in out:
            out[identity] = "the input file" if number == 0 else "a file the input includes"
    return out


def resolve(path, overwrite: bool, protected: dict | None = None, span: Span | None = None,
            folder_may_be_missing: bool = False) -> Path:
    """The regular file to write for `path` (symbolic links followed), or an `InputError` (at `span`)
    saying why it may not be written. Only looks: nothing is created."""
    shown = str(path)
    try:
        real = Path(os.path.realpath(path))
        info = os.stat(real)
    except FileNotFoundError:
        folder = real.parent
        if not folder.is_dir():
            if not folder_may_be_missing:
                raise InputError(f"cannot write {shown}: no such folder {_folder_name(path, real)}", span) from None
            existing = next(p for p in folder.parents if p.exists())
            if not existing.is_dir():
                raise InputError(f"cannot write {shown}: {existing} is not a folder", span) from None
        return real
    except ValueError:   # a NUL in the name
        raise InputError(f"cannot write {shown!r}: not a file name", span) from None
    except OSError as error:
        raise InputError(f"cannot write {shown}: {error.strerror}", span) from None
    for test, kind in KINDS:
        if test(info.st_mode):
            hint = "; give a file name" if kind == "a folder" else (
                ": results are written to regular files only (standard output: `-o -` or no -o)")
            raise InputError(f"cannot write {shown}: it is {kind}" + hint, span)
    what = (protected or {}).get((info.st_dev, info.st_ino))
    if what is not None:
        raise InputError(f"cannot write {shown}: it is {what}; choose another name", span)
    if not overwrite:
        raise InputError(f"{shown} exists; pass --overwrite to replace it", span)
    return real


def _folder_name(path, real: Path) -> str:
    parent = Path(path).parent
    return str(parent) if str(parent) not in ("", ".") else str(real.parent)


@dataclass
class _Item:
    shown: str
    target: Path
    data: bytes
    overwrite: bool
    span: Span | None
    make_folder: bool


class Batch:
    """Files written together or not at all. `add` only records; `commit` writes every file to a
    temporary file in its target's folder, then renames them all into place."""

    def __init__(self, protected: dict | None = None):
        self.protected = dict(protected or {})
        self.items: list[_Item] = []
        self._identities: dict[Path, str] = {}

    def add(self, path, data: bytes, overwrite: bool, span: Span | None = None, make_folder: bool = False) -> Path:
        """Record one file (checked now by the rule above, and again when it is written)."""
        target = resolve(path, overwrite, self.protected, span, folder_may_be_missing=make_folder)
        claimed(self._identities, target, str(path), span)
        self.items.append(_Item(str(path), target, bytes(data), overwrite, span, make_folder))
        return Path(path)

    def commit(self) -> list[Path]:
        """Write every recorded file; returns the paths as given. On any failure (or an interrupt)
        the temporary files are removed and no target has been touched, except those already
        renamed into place when a rename itself fails."""
        staged: list[tuple[_Item, str]] = []
        try:
            for item in self.items:
                if item.make_folder:
                    _make_folder(item)
                staged.append((item, _stage(item)))
            for item, temporary in staged:
                _place(item, temporary, self.protected)
        finally:
            for _, temporary in staged:
                try:
                    os.unlink(temporary)
                except OSError:
                    pass
        return [Path(item.shown) for item in self.items]


def claimed(seen: dict, target: Path, shown: str, span: Span | None) -> None:
    """Refuse a second result written to the same file (`seen`: {real path: how it was named})."""
    if target in seen:
        first = seen[target]
        also = f" (as {first})" if first != shown else ""
        raise InputError(f"{shown} is written twice by this run{also}; give each result its own file", span)
    seen[target] = shown


def write_atomically(path, data: bytes, overwrite: bool = True) -> Path:
    """One file by the rule above (a batch of one)."""
    batch = Batch()
    batch.add(path, data, overwrite)
    batch.commit()
    return Path(path)


def _make_folder(item: _Item) -> None:
    try:
        item.target.parent.mkdir(parents=True, exist_ok=True)
    except OSError as error:
        raise InputError(f"cannot write {item.shown}: cannot create the folder {item.target.parent}: "
                         f"{error.strerror}", item.span) from None


def _stage(item: _Item) -> str:
    """Write the data to a new temporary file beside the target; returns its name. New files get
    0666 less the umask (the system applies it); a replaced file's permissions are kept."""
    folder = item.target.parent
    mode = None
    try:
        old = os.stat(item.target)
        if stat.S_ISREG(old.st_mode):
            mode = stat.S_IMODE(old.st_mode)
    except OSError:
        pass
    for _ in range(100):
        name = str(folder / f".{item.target.name}.{secrets.token_hex(4)}.part")
        try:
            handle = os.open(name, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_CLOEXEC", 0), 0o666)
            break
        except FileExistsError:
            continue
        except OSError as error:
            raise InputError(f"cannot write {item.shown}: {error.strerror}", item.span) from None
    else:  # pragma: no cover - 100 collisions of 32 random bits
        raise InputError(f"cannot write {item.shown}: no free temporary name in {folder}", item.span)
    try:
        if mode is not None:
            os.chmod(name, mode)
        with os.fdopen(handle, "wb") as stream:
            stream.write(item.data)
    except BaseException as error:
        try:
            os.unlink(name)
        except OSError:
            pass
        if isinstance(error, OSError):
            raise InputError(f"cannot write {item.shown}: {error.strerror}", item.span) from None
        raise
    return name


def _place(item: _Item, temporary: str, protected: dict) -> None:
    """Rename the temporary file onto the target, checking the target once more (it may have
    changed since it was checked)."""
    resolve(item.target, item.overwrite, protected, item.span, folder_may_be_missing=True)
    try:
        if item.overwrite:
            os.replace(temporary, item.target)
            return
        try:
            os.link(temporary, item.target)      # never replaces: fails if the file appeared meanwhile
        except FileExistsError:
            raise InputError(f"{item.shown} exists; pass --overwrite to replace it", item.span) from None
        except OSError:                          # no hard links on this file system
            if os.path.lexists(item.target):
                raise InputError(f"{item.shown} exists; pass --overwrite to replace it", item.span) from None
            os.replace(temporary, item.target)
    except OSError as error:
        raise InputError(f"cannot write {item.shown}: {error.strerror}", item.span) from None

