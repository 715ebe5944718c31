"""Files in an S3-compatible object store, so that several app machines share them (LEGWORK_STORAGE=s3).

django-storages' S3Storage (boto3) does the talking; this subclass keeps Legwork's file rules:

- Whole or nothing: a file is stored with one PutObject, which the store applies completely or not at all (no
  reader ever sees half a file), and the name joins the open core.storage.files_or_nothing() blocks, so a record
  that fails to save takes its files with it.
- Never over another file: the PUT carries If-None-Match: *, so the store refuses it when the name is taken
  (the local backend's O_EXCL); Legwork then picks the next free name, as Django does. A stored file (a signed
  record's photo, PDF or certificate) is never replaced, whatever the timing between two machines.
- Failures in words: a refusal or an unreachable store becomes core.storage.ObjectStoreError (an OSError), which
  the views already answer with "the file could not be stored"; a missing file is FileNotFoundError. The message
  names the operation, the file and the store's error code, never a key or a signed address.

Nothing is ever served from the bucket by URL: files go out through the same login-checked views as on disk.
"""

from __future__ import annotations

import uuid
from contextlib import contextmanager, suppress

from botocore.exceptions import BotoCoreError, ClientError
from django.core.files.base import ContentFile
from storages.backends.s3 import S3Storage
from storages.utils import ReadBytesWrapper, clean_name, is_seekable

from core.storage import ObjectStoreError, remember

MAX_RENAMES = 20


def _code(exc) -> str:
    if isinstance(exc, ClientError):
        error = exc.response.get("Error", {})
        return str(error.get("Code") or exc.response.get("ResponseMetadata", {}).get("HTTPStatusCode") or "error")
    return type(exc).__name__  # BotoCoreError: EndpointConnectionError, ReadTimeoutError, NoCredentialsError...


def _status(exc) -> int | None:
    return exc.response.get("ResponseMetadata", {}).get("HTTPStatusCode") if isinstance(exc, ClientError) else None


@contextmanager
def _translated(operation: str, name: str):
    try:
        yield
    except ClientError as exc:
        if _status(exc) == 404 or _code(exc) in ("NoSuchKey", "404", "NotFound"):
            raise FileNotFoundError(f"{name} is not in the object store.") from None
        raise ObjectStoreError(f"The object store refused to {operation} {name} ({_code(exc)}).") from None
    except BotoCoreError as exc:
        raise ObjectStoreError(f"The object store could not {operation} {name} ({_code(exc)}).") from None


class ObjectStorage(S3Storage):
    def get_default_settings(self):
        return {**super().get_default_settings(), "file_overwrite": False, "default_acl": None}

    def _save(self, name, content):
        name = clean_name(name)
        for _attempt in range(MAX_RENAMES):
            with _translated("store", name):
                stored = self._put_new(name, content)
            if stored:
                remember(self, name)
                return name
            name = self.get_available_name(name)  # taken meanwhile (another machine): the next free name
        raise ObjectStoreError(f"The object store kept refusing new names for {name}.")

    def _put_new(self, name, content) -> bool:
        """One PutObject that only creates; False when the store answers that the name is taken (412)."""
        key = self._normalize_name(name)
        params = self._get_write_parameters(key, content)
        if is_seekable(content):
            content.seek(0)
        try:
            self.connection.meta.client.put_object(Bucket=self.bucket_name, Key=key,
                                                   Body=ReadBytesWrapper(content), IfNoneMatch="*", **params)
        except ClientError as exc:
            if _status(exc) == 412 or _code(exc) == "PreconditionFailed":
                return False
            raise
        return True

    def _open(self, name, mode="rb"):
        with _translated("read", name):
            handle = super()._open(name, mode)
            if "r" in mode:
                handle.file  # noqa: B018 - fetch now, so a failure is raised here, translated
        return handle

    def delete(self, name):
        with _translated("delete", name):
            return super().delete(name)

    def exists(self, name):
        with _translated("look up", name):
            return super().exists(name)

    def size(self, name):
        with _translated("measure", name):
            return super().size(name)

    def listdir(self, name):
        with _translated("list", name):
            return super().listdir(name)

    def path(self, name):
        raise NotImplementedError("Files in the object store have no local path: read them with open().")

    def overwrite_refusal(self) -> str:
        """Why this store would let a stored file be replaced ("" when it refuses, as Legwork needs): a probe object
        is put twice with If-None-Match: *, and the second PUT must be refused; the probe is deleted again. A
        store that ignores the condition would let two machines overwrite a signed record's file."""
        name = f"legwork-probe/{uuid.uuid4().hex}.txt"
        try:
            with _translated("store", name):
                first = self._put_new(name, ContentFile(b"probe"))
                second = self._put_new(name, ContentFile(b"probe, again"))
        except OSError as exc:  # unreachable, refused, or no such bucket (the store answers 404)
            return f"a probe file could not be stored ({type(exc).__name__}: {exc}); does the bucket exist?"
        finally:
            with suppress(OSError):
                self.delete(name)
        if not first:
            return f"the store refused a new name ({name}) as taken."
        if second:
            return ("the store accepted a second PUT of the same name with If-None-Match: * (it would replace a "
                    "stored file); use a store that honours the condition (AWS S3 does).")
        return ""
