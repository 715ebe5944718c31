"""Deployment checks of Legwork's own (`manage.py check --deploy`): what Django's cannot know.

object_store_keeps_files: with LEGWORK_STORAGE=s3, the store must refuse a second PUT of a name with
If-None-Match: * (core/object_storage.py), or two machines could replace a signed record's photo, PDF or
certificate. Checked by putting a probe twice (and deleting it); the message names the store's answer, never a key.
"""

from django.core.checks import Error, register


@register("legwork", deploy=True)
def object_store_keeps_files(app_configs=None, **kwargs):
    from django.core.files.storage import storages

    from core.object_storage import ObjectStorage

    storage = storages["default"]
    if not isinstance(storage, ObjectStorage):
        return []  # files on the local disk: created exclusively, never replaced
    problem = storage.overwrite_refusal()
    if not problem:
        return []
    return [Error(f"The object store cannot keep stored files unchanged: {problem}",
                  hint="Legwork never replaces a stored file; see README, 'Deployment on several machines'.",
                  id="legwork.E001")]
