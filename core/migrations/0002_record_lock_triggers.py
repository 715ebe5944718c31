"""Database triggers that refuse changes to frozen records through raw SQL too (SQLite and PostgreSQL).

Written by hand: the ORM cannot express triggers. The statements are built per database from each guarded
model's Lock (core.locking, core.triggers), so the rule stays written once; a post_migrate handler installs the
same triggers again after every later migrate, because SQLite drops a table's triggers when a migration rebuilds
the table.
"""

from django.db import migrations


def install(apps, schema_editor):
    from core import triggers

    triggers.install(schema_editor.connection)


def drop(apps, schema_editor):
    from core import triggers

    triggers.drop(schema_editor.connection)


class Migration(migrations.Migration):

    dependencies = [
        ("core", "0001_initial"),
        ("procedures", "0001_initial"),
        ("inspections", "0002_initial"),
    ]

    operations = [migrations.RunPython(install, drop, elidable=False)]
