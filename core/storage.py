"""Files are stored whole or not at all, and a record's files go with the record.

SafeFileSystemStorage (the default storage) writes each file into a temporary file beside its final name,
flushes and syncs it, and only then moves it into place: a full disk or an unwritable folder leaves no truncated
or zero-byte file behind, only the OSError. files_or_nothing() wraps the saving of one record: if anything in the
block fails (the second of two files, the database row), the files it already stored are deleted again, so no
orphan file outlives a record that was not saved.

With LEGWORK_STORAGE=s3 the default storage is core.object_storage.ObjectStorage instead (several app machines
share one bucket): each file is one PUT, which the object store applies whole or not at all, under a name no
other object holds (If-None-Match), and it joins files_or_nothing() the same way. Its failures reach the caller as
ObjectStoreError, an OSError, so the views' "the file could not be stored" answers cover both backends.
"""

import contextvars
import errno
import os
import tempfile
from contextlib import contextmanager, suppress

from django.core.files.storage import FileSystemStorage
from django.utils._os import safe_makedirs

_open_blocks = contextvars.ContextVar("legwork_files_or_nothing", default=())


class SafeFileSystemStorage(FileSystemStorage):
    def _save(self, name, content):
        full_path = self.path(name)
        directory = os.path.dirname(full_path)
        if self.directory_permissions_mode is not None:
            safe_makedirs(directory, self.directory_permissions_mode, exist_ok=True)
        else:
            os.makedirs(directory, exist_ok=True)
        handle, partial = tempfile.mkstemp(dir=directory, prefix=".partial-")
        try:
            with os.fdopen(handle, "wb") as out:
                for chunk in content.chunks():
                    out.write(chunk.encode() if isinstance(chunk, str) else chunk)
                out.flush()
                os.fsync(out.fileno())
            if self.file_permissions_mode is not None:
                os.chmod(partial, self.file_permissions_mode)
            name, full_path = self._reserve(name, full_path)
            try:
                os.replace(partial, full_path)
            except BaseException:
                with suppress(OSError):
                    os.unlink(full_path)
                raise
        finally:
            with suppress(FileNotFoundError):
                os.unlink(partial)
        name = str(name).replace("\\", "/")
        remember(self, name)
        return name

    def _reserve(self, name, full_path):
        """Claim the final name (O_EXCL: never another file's), trying the next free name if it is taken."""
        while True:
            try:
                os.close(os.open(full_path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600))
                return name, full_path
            except FileExistsError:
                name = self.get_available_name(name)
                full_path = self.path(name)


class ObjectStoreError(OSError):
    """The object store refused a request or did not answer. The message names the operation, the file and the
    store's error code, never an access key, a signature or a presigned address."""

    def __init__(self, message):
        super().__init__(errno.EIO, message)


def remember(storage, name: str) -> None:
    """Tell the open files_or_nothing() blocks that `name` was stored (deleted again if the block fails)."""
    for saved in _open_blocks.get():
        saved.append((storage, name))


@contextmanager
def files_or_nothing():
    """Delete the files stored inside the block if the block fails; yields the list of (storage, name) stored."""
    saved = []
    token = _open_blocks.set((*_open_blocks.get(), saved))
    try:
        yield saved
    except BaseException:
        for storage, name in reversed(saved):
            with suppress(OSError):
                storage.delete(name)
        raise
    finally:
        _open_blocks.reset(token)
