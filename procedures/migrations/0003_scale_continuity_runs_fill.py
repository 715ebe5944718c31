# Fills the continuity runs (the current-continuity fact) from the history of continuity entries.

from django.db import migrations


def fill(apps, schema_editor):
    from procedures.continuity import runs_from, write_runs

    entry = apps.get_model("procedures", "ContinuityEntry")
    run = apps.get_model("procedures", "ContinuityRun")
    welder = apps.get_model("procedures", "Welder")
    using = schema_editor.connection.alias
    ids = list(welder.objects.using(using).values_list("pk", flat=True))
    for start in range(0, len(ids), 200):
        chunk = ids[start:start + 200]
        rows = entry.objects.using(using).filter(welder_id__in=chunk).values_list("welder_id", "process", "date")
        write_runs(run, runs_from(rows.order_by()), chunk, using=using)


class Migration(migrations.Migration):

    dependencies = [
        ("procedures", "0002_scale_continuity_runs"),
    ]

    operations = [
        migrations.RunPython(fill, migrations.RunPython.noop),
    ]
