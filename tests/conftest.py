"""Settings shared by the test suite.

Property tests draw the same examples on every run of the normal suite, so a red run always
names a case that fails again on any machine; ``HYPOTHESIS_PROFILE=explore`` draws fresh
examples (use it with ``-m slow`` to look for new failures).
"""
from __future__ import annotations

import os

from hypothesis import settings

settings.register_profile("gate", derandomize=True, print_blob=True)
settings.register_profile("explore", derandomize=False, print_blob=True)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "gate"))
