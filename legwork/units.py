"""The published name of the units engine, kept for checks outside the repository (docs/engines.md).

The engine lives in core.units; project code imports it from there.
"""

from core.units import *  # noqa: F403
