"""The command line's help formatter reads the terminal width as argparse's
own does (through shutil), without importing shutil."""
import argparse

import pytest

from deckward.server import cli


@pytest.mark.parametrize("columns", [None, "57", "200", "0", "wide"])
def test_the_width_is_argparses(monkeypatch, columns):
    if columns is None:
        monkeypatch.delenv("COLUMNS", raising=False)
    else:
        monkeypatch.setenv("COLUMNS", columns)
    assert cli._Formatter("deckward")._width == argparse.HelpFormatter("deckward")._width
    assert cli._Formatter("deckward", width=40)._width == 40


def test_every_parser_uses_it():
    parser = cli.build_parser("check")
    assert parser.formatter_class is cli._Formatter
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    assert sub.choices["check"].formatter_class is cli._Formatter
