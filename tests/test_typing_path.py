"""The typing path (parse + static rules) never imports PySCF: importing it
costs about half a second, and the editor and `deckward check` start often."""
import os
import subprocess
import sys
import textwrap

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def test_check_does_not_import_pyscf(tmp_path):
    deck = tmp_path / "cn.deck"
    deck.write_text(textwrap.dedent("""\
        study { goal = electron_affinity kind = vertical }
        geometry cn {
          C 0 0 0
          N 0 0 1.1718
        }
        level hf_dz { method = hf basis = cc-pvdz reference = unrestricted }
        state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }
        state anion { geometry = cn level = hf_dz charge = -1 multiplicity = 1 }
        derive ea = energy(anion) - energy(radical) in ev
        """))
    probe = textwrap.dedent(f"""\
        import sys
        from deckward.server.cli import main
        code = main(["check", {str(deck)!r}, "--format", "json"])
        heavy = sorted(m for m in sys.modules
                       if m.split(".")[0] in ("pyscf", "numpy", "scipy", "matplotlib", "dask", "distributed"))
        sys.stderr.write("HEAVY=" + ",".join(heavy) + "\\n")
        sys.exit(code)
        """)
    proc = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True)
    assert proc.returncode == 1, proc.stderr  # the deck has findings
    heavy_line = [ln for ln in proc.stderr.splitlines() if ln.startswith("HEAVY=")][0]
    assert "pyscf" not in heavy_line, heavy_line
    assert "dask" not in heavy_line and "distributed" not in heavy_line, heavy_line
    assert '"rule": "anion-lacks-diffuse"' in proc.stdout


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
