"""The ``deckward`` program ends without tearing the interpreter down only
when nothing waits for the exit: the output is complete, the exit status is
the command's, and an ``atexit`` handler still runs."""
import os
import subprocess
import sys
import textwrap

DECK = textwrap.dedent("""\
    geometry cn {
      C 0 0 0
      N 0 0 1.1718
    }
    level hf_dz { method = hf basis = cc-pvdz reference = unrestricted }
    state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }
    """)


def _run(code, tmp_path):
    return subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=tmp_path,
                          env={**os.environ, "DECKWARD_CACHE_DIR": str(tmp_path / "cache")})


def test_the_report_is_complete_and_the_status_is_the_commands(tmp_path):
    (tmp_path / "one.deck").write_text(DECK)
    plain = subprocess.run([sys.executable, "-c", "import sys; from deckward.server.cli import main; "
                            "sys.exit(main(['check', 'one.deck', '--format', 'json']))"],
                           capture_output=True, text=True, cwd=tmp_path,
                           env={**os.environ, "DECKWARD_CACHE_DIR": str(tmp_path / "cache")})
    quick = _run("import sys; sys.argv = ['deckward', 'check', 'one.deck', '--format', 'json']; "
                 "from deckward.server.cli import run_program; run_program()", tmp_path)
    assert (quick.returncode, quick.stdout, quick.stderr) == (plain.returncode, plain.stdout, plain.stderr)
    assert quick.stdout.rstrip().endswith("}")
    clean = _run("import sys; sys.argv = ['deckward', 'check', 'one.deck', '--fail-on', 'never']; "
                 "from deckward.server.cli import run_program; run_program()", tmp_path)
    assert clean.returncode == 0


def test_an_atexit_handler_still_runs(tmp_path):
    (tmp_path / "one.deck").write_text(DECK)
    proc = _run("import atexit, sys; atexit.register(lambda: print('handler ran')); "
                "sys.argv = ['deckward', 'check', 'one.deck']; "
                "from deckward.server.cli import run_program; run_program()", tmp_path)
    assert proc.stdout.rstrip().endswith("handler ran")
