import os
import sys

sys.path.insert(0, os.path.dirname(__file__))

# In CI the property-based tests run a fixed set of examples (derandomized),
# so that a run is repeatable; locally they explore new examples each time.
from hypothesis import settings as _hypothesis_settings

_hypothesis_settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    _hypothesis_settings.load_profile("ci")
