"""Faults outside Legwork end on a page that says what happened, and leave nothing half done.

The database unreachable: 503 "try again", from a view or from the session's read in a middleware. The media
folder not writable, or the disk full: the record is not saved, no file or part of one is left, the form comes
back with what was typed and the reason beside the file. Every error page is branded and shows no internal
detail; a body over the limit is refused before it is read.
"""

import errno
import os
import tempfile
from pathlib import Path

import pytest
from django.core.files.base import ContentFile
from django.core.files.uploadedfile import SimpleUploadedFile
from django.db import OperationalError, connection
from django.test import Client
from django.urls import reverse

from core.storage import SafeFileSystemStorage, files_or_nothing
from inspections.models import Photo, Traveler
from procedures.models import Qualification
from tests.factory import png_bytes

# The checkout's own folder, wherever it is, stands for "a path of the server" on an error page.
PROJECT_ROOT = str(Path(__file__).resolve().parent.parent)
INTERNALS = ("Traceback", "File \"", PROJECT_ROOT, "site-packages", "OperationalError", "Errno", "errno",
             "settings.py")


def _plain(text):
    return not any(word in text for word in INTERNALS)


@pytest.fixture
def signed_in(users):
    """A client that answers a failure with the page a visitor gets (the default test client re-raises)."""

    def sign_in(role):
        client = Client(raise_request_exception=False)
        client.force_login(users[role])
        return client

    return sign_in


def _files(root):
    return sorted(str(p.relative_to(root)) for p in Path(root).rglob("*") if p.is_file())


# --- the database --------------------------------------------------------------------------------------------

def _database_down(monkeypatch):
    def refuse(*args, **kwargs):
        raise OperationalError("could not connect to server: Connection refused")

    monkeypatch.setattr(connection, "ensure_connection", refuse)


@pytest.mark.parametrize("name", ["home", "inspections:job_list", "procedures:wps_list"])
def test_a_database_out_of_reach_is_a_503_that_says_try_again(name, signed_in, monkeypatch):
    client = signed_in("inspector")
    _database_down(monkeypatch)  # the session itself cannot be read: the failure is in a middleware
    response = client.get(reverse(name))
    monkeypatch.undo()
    assert response.status_code == 503 and response["Retry-After"] == "60"
    text = response.content.decode()
    assert "cannot reach its database" in text and "Try again" in text and _plain(text)


def test_a_database_failure_inside_a_view_is_the_same_503(signed_in, monkeypatch, make):
    from inspections.views import jobs as job_views

    job = make.make_job()
    client = signed_in("inspector")

    def broken(*args, **kwargs):
        raise OperationalError("database is locked")

    monkeypatch.setattr(job_views.weldmap_csv, "export_lines", broken)
    response = client.get(reverse("inspections:weldmap_export", args=[job.pk]))
    assert response.status_code == 503 and "nothing you sent was saved" in response.content.decode()


# --- files that cannot be stored -----------------------------------------------------------------------------

@pytest.fixture
def media(settings, tmp_path):
    root = tmp_path / "media"
    root.mkdir()
    settings.MEDIA_ROOT = str(root)
    return root


@pytest.fixture
def read_only_media(media, monkeypatch):
    """MEDIA_ROOT made read-only. As root the kernel still lets the process write, so there the folder's refusal is
    given by the call that creates the file in it, with the error the kernel gives everyone else (EACCES)."""
    media.chmod(0o555)
    probe = media / ".probe"
    try:
        probe.write_bytes(b"")
    except PermissionError:
        pass
    else:
        probe.unlink()
        real = tempfile.mkstemp

        def mkstemp(*args, dir=None, **kwargs):
            if dir and Path(dir).resolve().is_relative_to(media.resolve()):
                raise PermissionError(errno.EACCES, "Permission denied", dir)
            return real(*args, dir=dir, **kwargs)

        monkeypatch.setattr("core.storage.tempfile.mkstemp", mkstemp)
    yield media
    media.chmod(0o755)


@pytest.fixture
def full_disk(media, monkeypatch):
    """A disk that fills up while a file is written: the bytes go out, the sync reports ENOSPC."""

    def fsync(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr("core.storage.os.fsync", fsync)
    return media


def _photo_post(client, inspection):
    upload = SimpleUploadedFile("weld.png", png_bytes((64, 48)), content_type="image/png")
    return client.post(reverse("inspections:photo_add", args=[inspection.pk]),
                       {"image": upload, "caption": "toe of W7, north end"})


@pytest.mark.parametrize("fault, words", [("read_only_media", "may not write to its file folder"),
                                          ("full_disk", "disk is full")])
def test_a_photo_that_cannot_be_stored_saves_nothing_and_keeps_the_caption(fault, words, request, make, users,
                                                                          signed_in):
    inspection = make.make_inspection(user=users["inspector"])
    root = request.getfixturevalue(fault)
    response = _photo_post(signed_in("inspector"), inspection)
    assert response.status_code == 503
    text = response.content.decode()
    assert words in text and "nothing was saved" in text and "toe of W7, north end" in text and _plain(text)
    assert not Photo.objects.exists()
    assert _files(root) == []  # no photo, no thumbnail, no partial file


def test_when_the_thumbnail_fails_the_photo_already_stored_is_removed(media, make, users, signed_in, monkeypatch):
    inspection = make.make_inspection(user=users["inspector"])
    real = SafeFileSystemStorage._save
    calls = []

    def second_fails(self, name, content):
        calls.append(name)
        if len(calls) == 2:
            raise OSError(errno.ENOSPC, "No space left on device")
        return real(self, name, content)

    monkeypatch.setattr(SafeFileSystemStorage, "_save", second_fails)
    response = _photo_post(signed_in("inspector"), inspection)
    assert response.status_code == 503 and len(calls) == 2
    assert not Photo.objects.exists() and _files(media) == []


def test_a_report_that_cannot_be_stored_saves_no_test_and_keeps_the_form(full_disk, make, signed_in):
    from tests.test_welders_views import PDF, test_input

    welder = make.make_welder()
    data = test_input(report=SimpleUploadedFile("bend test.pdf", PDF, content_type="application/pdf"),
                      examiner="J. Vasquez, CWI")
    response = signed_in("welding_engineer").post(reverse("procedures:qualification_create", args=[welder.pk]), data)
    assert response.status_code == 503
    text = response.content.decode()
    assert "disk is full" in text and "J. Vasquez, CWI" in text and _plain(text)
    assert not Qualification.objects.exists() and _files(full_disk) == []


@pytest.mark.pdf
def test_a_traveler_that_cannot_be_stored_is_not_issued(full_disk, make, users, signed_in):
    assembly = make.make_assembly()
    make.make_weld(assembly=assembly)
    client = signed_in("qa_lead")
    response = client.post(reverse("inspections:traveler_issue", args=[assembly.pk]), follow=True)
    assert response.status_code == 200 and "disk is full" in response.content.decode()
    assert not Traveler.objects.exists() and _files(full_disk) == []


def test_the_storage_leaves_no_partial_file_when_a_write_fails(media):
    storage = SafeFileSystemStorage(location=str(media))

    class Breaks(ContentFile):
        def chunks(self, chunk_size=None):
            yield b"x" * 1000
            raise OSError(errno.ENOSPC, "No space left on device")

    with pytest.raises(OSError):
        storage.save("photos/a.jpg", Breaks(b"", name="a.jpg"))
    assert _files(media) == []
    name = storage.save("photos/a.jpg", ContentFile(b"whole", name="a.jpg"))
    assert (media / name).read_bytes() == b"whole" and _files(media) == [name]
    assert storage.save("photos/a.jpg", ContentFile(b"other", name="a.jpg")) != name  # never overwrites


def test_files_or_nothing_removes_what_it_stored_when_the_block_fails(media):
    storage = SafeFileSystemStorage(location=str(media))
    with pytest.raises(RuntimeError), files_or_nothing() as saved:
        storage.save("a.txt", ContentFile(b"a"))
        storage.save("b.txt", ContentFile(b"b"))
        raise RuntimeError("the row could not be saved")
    assert len(saved) == 2 and _files(media) == []
    with files_or_nothing():
        kept = storage.save("c.txt", ContentFile(b"c"))
    assert _files(media) == [kept]


def test_a_media_root_that_is_not_a_folder_is_a_storage_fault(settings, tmp_path, make, users, signed_in):
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("a file where the media folder should be")
    settings.MEDIA_ROOT = str(blocker / "media")
    inspection = make.make_inspection(user=users["inspector"])
    response = _photo_post(signed_in("inspector"), inspection)
    assert response.status_code == 503 and "may not write" in response.content.decode()
    assert not Photo.objects.exists()


# --- branded error pages and the request limit ----------------------------------------------------------------

def test_a_missing_record_is_a_branded_404(client_as):
    response = client_as("viewer").get(reverse("inspections:job_detail", args=[987654]))
    text = response.content.decode()
    assert response.status_code == 404 and "Not found" in text and "Legwork" in text and _plain(text)


def test_an_unexpected_failure_is_a_branded_500_without_detail(signed_in, monkeypatch, make):
    from inspections.views import jobs as job_views

    job = make.make_job()

    def broken(*args, **kwargs):
        raise RuntimeError("secret internal detail at /srv/legwork/settings.py")

    monkeypatch.setattr(job_views.weldmap_csv, "export_lines", broken)
    response = signed_in("inspector").get(reverse("inspections:weldmap_export", args=[job.pk]))
    text = response.content.decode()
    assert response.status_code == 500 and "Something went wrong" in text and "secret" not in text and _plain(text)


def test_a_bad_host_is_a_branded_400(client):
    response = client.get(reverse("login"), HTTP_HOST="evil.example")
    text = response.content.decode()
    assert response.status_code == 400 and "could not be read" in text and "evil.example" not in text


def test_a_form_without_its_csrf_token_is_a_branded_403(users):
    client = Client(enforce_csrf_checks=True)
    client.force_login(users["welding_engineer"])
    response = client.post(reverse("inspections:job_create"), {"number": "J-1"})
    text = response.content.decode()
    assert response.status_code == 403 and "reload the page" in text and "CSRF" not in text


def test_a_body_over_the_limit_is_refused_before_it_is_read(settings, client_as, make, users):
    settings.LEGWORK_MAX_REQUEST_BYTES = 1000
    inspection = make.make_inspection(user=users["inspector"])

    class Unread:
        def read(self, *args):
            raise AssertionError("the body was read")

        readline = read

    response = client_as("inspector").generic(
        "POST", reverse("inspections:photo_add", args=[inspection.pk]), b"",
        CONTENT_TYPE="multipart/form-data; boundary=x", CONTENT_LENGTH="50000000", **{"wsgi.input": Unread()})
    assert response.status_code == 413
    assert "47.7 MB" in response.content.decode() and not Photo.objects.exists()  # 50,000,000 bytes


def test_an_upload_under_the_limit_goes_through(settings, client_as, make, users):
    settings.LEGWORK_MAX_REQUEST_BYTES = 200_000
    inspection = make.make_inspection(user=users["inspector"])
    response = _photo_post(client_as("inspector"), inspection)
    assert response.status_code == 302 and Photo.objects.count() == 1


def test_the_default_limit_leaves_room_for_the_largest_photo(settings):
    assert settings.LEGWORK_MAX_REQUEST_BYTES > settings.LEGWORK_PHOTO_MAX_BYTES
    assert settings.LEGWORK_MAX_REQUEST_BYTES > settings.LEGWORK_REPORT_MAX_BYTES
    assert os.environ.get("LEGWORK_MAX_REQUEST_BYTES") or settings.LEGWORK_MAX_REQUEST_BYTES < 20 * 1024 * 1024
