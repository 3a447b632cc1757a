import os
import sys

sys.path.insert(0, os.path.dirname(__file__))

# In CI the property-based tests run a fixed set of examples (derandomized),
# so that a run is repeatable; locally they explore new examples each time.
from hypothesis import settings as _hypothesis_settings

_hypothesis_settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    _hypothesis_settings.load_profile("ci")


# Everything the suite and the programs it starts write to a temporary folder
# goes into one folder of its own, removed when the run ends, so a run leaves
# nothing behind in the system's temporary folder (pytest's own tmp_path
# folders included). DECKWARD_KEEP_TEST_TMP=1 keeps it for a post-mortem.
# The removal is registered with atexit now, before multiprocessing registers
# its own clean-up, so that it runs after multiprocessing has removed its folders.
import atexit as _atexit
import tempfile as _tempfile

_SESSION_TMP = _tempfile.mkdtemp(prefix="deckward-tests-")
os.environ["TMPDIR"] = _SESSION_TMP
_tempfile.tempdir = _SESSION_TMP


def _remove_session_tmp():
    import shutil

    if not os.environ.get("DECKWARD_KEEP_TEST_TMP"):
        shutil.rmtree(_SESSION_TMP, ignore_errors=True)


_atexit.register(_remove_session_tmp)
