"""Test set-up shared by every test module.

In CI (the CI environment variable set) hypothesis draws the same examples on every
run (derandomize), so a green or red run can be reproduced; on a developer's machine
it explores new examples each time.
"""

import os

from hypothesis import settings

settings.register_profile("ci", derandomize=True, deadline=None, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")
