"""Files in an S3-compatible object store (LEGWORK_STORAGE=s3: several app machines share one bucket).

Each test gets a fresh bucket on a real S3 server (moto's server, a separate process on loopback, started once per
run: tests/s3server.py) and reads what Legwork stored back with its own boto3 client, so a file is proven to be in
the bucket, not in a local folder or a mock. Photos, certificates, travelers and their sidecars, packets built by
the background task, the record check, whole-or-nothing saves, no overwrite, failures in words.
"""

import hashlib
import io
import os
from datetime import timedelta

import pytest
from django.core.exceptions import ImproperlyConfigured
from django.core.files.base import ContentFile
from django.core.files.storage import default_storage
from django.core.files.uploadedfile import SimpleUploadedFile
from django.core.management import CommandError, call_command
from django.urls import reverse
from django.utils.timezone import localdate as today

from core import archive
from core.storage import ObjectStoreError, files_or_nothing
from inspections.models import JobPacket, PacketState, Photo, Traveler
from tests.factory import png_bytes
from tests.pages_travelers import build_assembly
from tests.s3server import ACCESS_KEY, SECRET_KEY

pytestmark = pytest.mark.s3


def sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def served(response) -> bytes:
    return b"".join(response.streaming_content)


def test_a_photo_goes_to_the_bucket_and_comes_back_through_the_view(object_storage, make, client_as, users):
    inspection = make.make_inspection(user=users["inspector"])
    upload = SimpleUploadedFile("weld.png", png_bytes((200, 150)), content_type="image/png")
    response = client_as("inspector").post(reverse("inspections:photo_add", args=[inspection.pk]),
                                           {"image": upload, "caption": "toe of W1"})
    assert response.status_code == 302
    photo = Photo.objects.get(inspection=inspection)
    assert object_storage.keys() == sorted([photo.image.name, photo.thumbnail.name])
    assert sha(object_storage.read(photo.image.name)) == photo.sha256  # the cleaned bytes, in the bucket
    body = served(client_as("viewer").get(reverse("inspections:photo_file", args=[photo.pk])))
    assert body == object_storage.read(photo.image.name)
    call_command("verify_records", stdout=io.StringIO())  # the photo's seal names the bucket's bytes


def test_a_photo_held_at_the_weld_is_attached_at_signing_and_a_discarded_one_leaves_the_bucket(
        object_storage, make, client_as, users):
    from inspections.models import DraftPhoto
    from tests.factory import L
    from tests.test_inspect_views import sign

    weld = make.make_weld(size=L("1/4 in"))
    client = client_as("inspector")
    upload = SimpleUploadedFile("toe.png", png_bytes((64, 48)), content_type="image/png")
    held = client.post(reverse("inspections:inspect_weld", args=[weld.pk]), {
        "stage": "final", "min_size": "1/4", "action": "photo", "photo": upload, "photo_caption": "north toe"},
        HTTP_HX_REQUEST="true")
    assert held.status_code == 200
    draft = DraftPhoto.objects.get()
    assert sha(object_storage.read(draft.image.name)) == draft.sha256
    assert sign(client, weld, {"stage": "final", "min_size": "1/4"}).status_code == 302
    attached = Photo.objects.get()
    assert attached.image.name == draft.image.name and sha(object_storage.read(attached.image.name)) == draft.sha256

    other = make.make_weld(size=L("1/4 in"))
    client.post(reverse("inspections:inspect_weld", args=[other.pk]), {
        "stage": "final", "min_size": "1/4", "action": "photo", "photo_caption": "thrown away",
        "photo": SimpleUploadedFile("b.png", png_bytes((32, 24), color=(1, 2, 3)), content_type="image/png")},
        HTTP_HX_REQUEST="true")
    thrown = DraftPhoto.objects.get()
    names = {thrown.image.name, thrown.thumbnail.name}
    assert names <= set(object_storage.keys())
    client.post(reverse("inspections:inspect_weld", args=[other.pk]), {"action": "discard"})
    assert not names & set(object_storage.keys())


def test_a_calibration_certificate_is_stored_as_uploaded_in_the_bucket(object_storage, make, client_as):
    gauge = make.make_gauge(result=None)
    content = png_bytes((64, 48))
    response = client_as("qa_lead").post(reverse("inspections:calibration_create", args=[gauge.pk]), {
        "calibrated_on": today().isoformat(), "due_on": (today() + timedelta(days=365)).isoformat(),
        "result": "in_tolerance", "performed_by": "Ridgeway Metrology Lab",
        "document": SimpleUploadedFile("cert.png", content, content_type="image/png")})
    assert response.status_code == 302
    record = gauge.calibrations.get()
    assert object_storage.read(record.document.name) == content and record.document_sha256 == sha(content)
    download = client_as("inspector").get(reverse("inspections:calibration_document", args=[record.pk]))
    assert download.status_code == 200 and served(download) == content


@pytest.mark.pdf
def test_a_traveler_is_issued_into_the_bucket_with_its_sidecar_and_downloaded(object_storage, make, client_as):
    assembly = build_assembly(make, welds=1)
    assert client_as("qa_lead").post(reverse("inspections:traveler_issue", args=[assembly.pk])).status_code == 302
    traveler = Traveler.objects.get()
    stored = object_storage.read(traveler.file.name)
    assert stored.startswith(b"%PDF") and sha(stored) == traveler.sha256 and len(stored) == traveler.size_bytes
    sidecar = object_storage.read(f"{traveler.file.name}.sha256").decode()
    assert sidecar == f"{traveler.sha256}  {traveler.filename}\n"  # `sha256sum -c` format, beside the PDF
    download = client_as("viewer").get(reverse("inspections:traveler_download", args=[traveler.pk]))
    assert served(download) == stored and download["X-Content-SHA256"] == traveler.sha256


@pytest.mark.pdf
def test_a_packet_built_by_the_task_lands_in_the_bucket(object_storage, make, client_as,
                                                       django_capture_on_commit_callbacks):
    assembly = build_assembly(make, welds=1)
    with django_capture_on_commit_callbacks(execute=True):  # the task runs inline in tests (LEGWORK_TASKS_INLINE)
        client_as("qa_lead").post(reverse("inspections:packet_start", args=[assembly.job.pk]),
                                  {"assemblies": [assembly.pk]})
    packet = JobPacket.objects.get()
    assert packet.state == PacketState.DONE, packet.error
    stored = object_storage.read(packet.file.name)
    assert sha(stored) == packet.sha256
    traveler = packet.travelers.get()
    assert traveler.file.name in object_storage.keys()  # the packet's traveler, issued into the bucket too
    download = client_as("viewer").get(reverse("inspections:packet_download", args=[packet.pk]))
    assert served(download) == stored


def test_verify_records_reads_the_bucket_and_names_a_changed_or_missing_file(object_storage, make):
    photo = make.make_photo()
    assert photo.image.name in object_storage.keys()
    call_command("verify_records", stdout=io.StringIO())
    object_storage.s3.put_object(Bucket=object_storage.name, Key=photo.image.name, Body=b"swapped")
    with pytest.raises(CommandError, match="file changed"):
        call_command("verify_records", stdout=io.StringIO(), stderr=io.StringIO())
    object_storage.s3.delete_object(Bucket=object_storage.name, Key=photo.image.name)
    with pytest.raises(CommandError, match="file missing"):
        call_command("verify_records", stdout=io.StringIO(), stderr=io.StringIO())


def test_a_job_export_copies_its_files_from_the_bucket(object_storage, make):
    import zipfile

    from inspections import export

    photo = make.make_photo()
    job = photo.inspection.weld.assembly.job
    out = io.BytesIO()
    description = export.write_zip(job, out)
    assert not description["missing_files"]
    with zipfile.ZipFile(out) as archive:
        stored = archive.read(f"{export.folder_name(job)}/files/{photo.image.name}")
    assert stored == object_storage.read(photo.image.name) and sha(stored) == photo.sha256


def test_files_stored_in_a_failed_block_are_removed_from_the_bucket(object_storage):
    with pytest.raises(RuntimeError), files_or_nothing():
        default_storage.save("travelers/first.pdf", ContentFile(b"%PDF-1 first"))
        default_storage.save("travelers/second.pdf", ContentFile(b"%PDF-1 second"))
        raise RuntimeError("the row was not saved")
    assert object_storage.keys() == []
    with files_or_nothing() as saved:
        name = default_storage.save("travelers/kept.pdf", ContentFile(b"%PDF-1 kept"))
    assert [n for _storage, n in saved] == [name] and object_storage.read(name) == b"%PDF-1 kept"


def test_a_stored_file_is_never_overwritten_even_when_the_name_is_taken_meanwhile(object_storage, monkeypatch):
    first = default_storage.save("photos/a.jpg", ContentFile(b"first"))
    second = default_storage.save("photos/a.jpg", ContentFile(b"second"))
    assert first == "photos/a.jpg" and second != first
    # Another machine takes the name between the look-up and the PUT: the store refuses (If-None-Match) and the
    # next free name is used; the first file keeps its bytes.
    storage = type(default_storage._wrapped)
    real_exists, looked_up = storage.exists, []

    def exists_once_stale(self, name):
        looked_up.append(name)
        return False if len(looked_up) == 1 else real_exists(self, name)

    monkeypatch.setattr(storage, "exists", exists_once_stale)
    third = default_storage.save("photos/a.jpg", ContentFile(b"third"))
    assert third not in (first, second)
    assert [object_storage.read(n) for n in (first, second, third)] == [b"first", b"second", b"third"]


def test_a_missing_file_is_file_not_found_and_there_is_no_local_path(object_storage):
    with pytest.raises(FileNotFoundError):
        default_storage.open("photos/nowhere.jpg")
    with pytest.raises(NotImplementedError):
        default_storage.path("photos/nowhere.jpg")


def _point_at_nothing(settings, monkeypatch):
    """The storage settings of a store that does not answer (a free loopback port), failing fast (one attempt)."""
    from botocore.config import Config

    from legwork.env import default_storage_from_env
    from tests.s3server import free_port

    monkeypatch.setenv("LEGWORK_S3_ENDPOINT_URL", f"http://127.0.0.1:{free_port()}")
    options = default_storage_from_env()
    options["OPTIONS"]["client_config"] = Config(retries={"max_attempts": 1}, connect_timeout=1, read_timeout=1)
    settings.STORAGES = {**settings.STORAGES, "default": options}


@pytest.fixture
def unreachable_store(object_storage, settings, monkeypatch):
    _point_at_nothing(settings, monkeypatch)


def test_an_unreachable_store_is_an_oserror_without_keys(unreachable_store):
    with pytest.raises(ObjectStoreError) as raised:
        default_storage.save("photos/b.jpg", ContentFile(b"x"))
    text = str(raised.value)
    assert "photos/b.jpg" in text and "object store could not" in text
    assert SECRET_KEY not in text and ACCESS_KEY not in text


def test_verify_records_says_when_the_store_cannot_be_read(object_storage, make, settings, monkeypatch):
    make.make_photo()
    _point_at_nothing(settings, monkeypatch)
    with pytest.raises(CommandError, match="could not be read") as raised:
        call_command("verify_records", stdout=io.StringIO(), stderr=io.StringIO())
    assert SECRET_KEY not in str(raised.value)


def test_a_photo_the_store_cannot_take_is_said_beside_the_field(unreachable_store, make, client_as, users):
    inspection = make.make_inspection(user=users["inspector"])
    upload = SimpleUploadedFile("weld.png", png_bytes(), content_type="image/png")
    response = client_as("inspector").post(reverse("inspections:photo_add", args=[inspection.pk]),
                                           {"image": upload, "caption": "kept"})
    assert response.status_code == 503 and not Photo.objects.exists()
    page = response.content.decode()
    assert "object storage" in page and SECRET_KEY not in page and ACCESS_KEY not in page


def test_backup_and_restore_refuse_an_object_store(object_storage, tmp_path):
    with pytest.raises(archive.ArchiveError, match="object store"):
        archive.backup(tmp_path / "b.tar")
    with pytest.raises(archive.ArchiveError, match="object store"):
        archive.restore(tmp_path / "b.tar")
    assert not (tmp_path / "b.tar").exists()


# --- settings -----------------------------------------------------------------------------------------------------

def test_local_disk_stays_the_default(monkeypatch):
    from legwork.env import default_storage_from_env

    monkeypatch.delenv("LEGWORK_STORAGE", raising=False)
    assert default_storage_from_env() == {"BACKEND": "core.storage.SafeFileSystemStorage"}


@pytest.mark.parametrize("env, words", [
    ({"LEGWORK_STORAGE": "ftp"}, "use local"),
    ({"LEGWORK_STORAGE": "s3"}, "LEGWORK_S3_BUCKET"),
    ({"LEGWORK_STORAGE": "s3", "LEGWORK_S3_BUCKET": "b", "LEGWORK_S3_SECRET_ACCESS_KEY": SECRET_KEY}, "both"),
])
def test_a_bad_storage_setting_stops_start_up_without_printing_the_secret(monkeypatch, env, words):
    from legwork.env import default_storage_from_env

    for name in ("LEGWORK_S3_BUCKET", "LEGWORK_S3_ACCESS_KEY_ID", "LEGWORK_S3_SECRET_ACCESS_KEY"):
        monkeypatch.delenv(name, raising=False)
    for name, value in env.items():
        monkeypatch.setenv(name, value)
    with pytest.raises(ImproperlyConfigured, match=words) as raised:
        default_storage_from_env()
    assert SECRET_KEY not in str(raised.value)


def test_deploy_checks_pass_with_the_files_in_an_object_store(s3_server):
    """`manage.py check --deploy` with production settings and LEGWORK_STORAGE=s3, as .ci/run runs it."""
    import subprocess
    import sys
    from pathlib import Path
    from uuid import uuid4

    bucket = f"legwork-deploy-{uuid4().hex[:12]}"
    s3_server.client().create_bucket(Bucket=bucket)  # the check stores a probe in it (core/checks.py)
    env = {**os.environ, **s3_server.env(bucket), "LEGWORK_DEBUG": "0",
           "LEGWORK_SECRET_KEY": "x" * 60 + "deploy-check-key", "LEGWORK_ALLOWED_HOSTS": "legwork.shop.example"}
    done = subprocess.run([sys.executable, "manage.py", "check", "--deploy", "--fail-level", "WARNING"],
                          cwd=Path(__file__).resolve().parent.parent, env=env, capture_output=True, text=True,
                          timeout=120)
    assert done.returncode == 0, done.stdout + done.stderr
    assert SECRET_KEY not in done.stdout + done.stderr
    env.update(s3_server.env(f"{bucket}-missing"))  # a bucket that does not exist: said, not a traceback
    done = subprocess.run([sys.executable, "manage.py", "check", "--deploy", "--fail-level", "WARNING"],
                          cwd=Path(__file__).resolve().parent.parent, env=env, capture_output=True, text=True,
                          timeout=120)
    assert done.returncode == 1 and "legwork.E001" in done.stderr and "does the bucket exist" in done.stderr
    assert "Traceback" not in done.stderr and SECRET_KEY not in done.stderr


def test_a_prefix_keeps_legworks_files_in_one_folder_of_the_bucket(object_storage, settings, monkeypatch):
    from legwork.env import default_storage_from_env

    monkeypatch.setenv("LEGWORK_S3_PREFIX", "/legwork/")
    monkeypatch.setenv("LEGWORK_S3_ADDRESSING_STYLE", "path")
    settings.STORAGES = {**settings.STORAGES, "default": default_storage_from_env()}
    name = default_storage.save("photos/c.jpg", ContentFile(b"in a folder"))
    assert name == "photos/c.jpg" and object_storage.keys() == ["legwork/photos/c.jpg"]
    with default_storage.open(name) as handle:
        assert handle.read() == b"in a folder"
    config = default_storage._wrapped.client_config
    assert config.s3 == {"addressing_style": "path"} and config.connect_timeout == 5


def test_the_deploy_check_probes_that_the_store_refuses_a_second_put(object_storage, monkeypatch):
    from core import checks
    from core.object_storage import ObjectStorage

    assert checks.object_store_keeps_files() == []  # moto's server honours If-None-Match: *
    assert object_storage.keys() == []  # the probe is deleted again
    # A store that ignores the condition (each PUT "succeeds"): the check names it, keys never.
    monkeypatch.setattr(ObjectStorage, "_put_new", lambda self, name, content: True)
    error, = checks.object_store_keeps_files()
    assert error.id == "legwork.E001" and "accepted a second PUT" in error.msg and SECRET_KEY not in error.msg


def test_the_deploy_check_asks_nothing_of_a_local_disk(settings):
    from core import checks

    assert checks.object_store_keeps_files() == []
