"""Which Legwork wrote a backup or an export: the version in pyproject.toml and, in a git checkout, the commit."""

import subprocess
import tomllib
from functools import cache
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


@cache
def legwork_version() -> str:
    try:
        version = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]["version"]
    except (OSError, KeyError, ValueError):
        version = "unknown"
    try:
        commit = subprocess.run(["git", "-C", str(ROOT), "describe", "--always", "--dirty", "--abbrev=12"],
                                capture_output=True, text=True, timeout=5, check=True).stdout.strip()
    except (OSError, subprocess.SubprocessError):
        commit = ""
    return f"{version} ({commit})" if commit else version
