"""The developer docs stay short and true: DEVELOPERS.md under 10 KB, and every file or folder it or the
architecture page names in backticks exists, so a rename that forgets the docs fails here."""

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
DOCS = ["DEVELOPERS.md", "docs/architecture.md"]
# A backticked word that looks like a path in the repository: has a slash or a known suffix, no spaces or
# placeholders (`<standard>`), and is not a URL or a command line.
PATH = re.compile(r"`([A-Za-z0-9_./-]+(?:/|\.py|\.md|\.html))`")


def test_developers_page_stays_under_ten_kilobytes():
    size = (ROOT / "DEVELOPERS.md").stat().st_size
    assert size < 10 * 1024, f"DEVELOPERS.md is {size} bytes: move detail to docs/ and keep the page short"


@pytest.mark.parametrize("doc", DOCS)
def test_every_path_the_docs_name_exists(doc):
    text = (ROOT / doc).read_text()
    named = {m for m in PATH.findall(text) if not m.startswith(("http", "/", "."))}
    missing = sorted(name for name in named if not _exists(name))
    assert missing == [], f"{doc} names paths that do not exist: {missing}"


def _exists(name):
    """A path from the root, or one written relative to its app (`services/ncr.py` under an app)."""
    if (ROOT / name).exists():
        return True
    apps = ("legwork", "core", "procedures", "inspections", "demo", "tests")
    return any((ROOT / app / name).exists() for app in apps)
