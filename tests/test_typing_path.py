"""What the command line and the language server load at start, run for
real: no Dask, no PySCF.  (`tests/test_layering.py` reads the same from the
source; `tests/test_cold_start.py` lists everything `check one.deck` loads.)"""
import subprocess
import sys
import textwrap



def test_language_server_start_and_cli_parser_do_not_import_dask():
    """Building the command line (every subcommand's options, cluster ones
    included) and the language server must not import Dask."""
    probe = textwrap.dedent("""\
        import sys
        from deckward.server.cli import build_parser
        build_parser()
        import deckward.server.lsp.server
        heavy = sorted(m for m in sys.modules if m.split(".")[0] in ("dask", "distributed", "dask_jobqueue", "pyscf"))
        print("HEAVY=" + ",".join(heavy))
        """)
    proc = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True)
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.strip() == "HEAVY="
