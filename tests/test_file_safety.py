"""Files that are not what they seem: NUL bytes and lone surrogates in `use`
paths, FIFOs named *.deck, links out of the workspace, hard links, a write
racing ours, temporary files left by a killed writer.  Each case ends in a
located finding or a one-line refusal with exit status 1 or 2, never a hang
or an internal error (exit status 3)."""
import os
import subprocess
import sys
import time

import pytest

from deckward.grammar.resolve import Loader, resolve
from deckward.grammar.safe_open import NotRegularFile, read_regular
from deckward.rules.engine.registry import all_rules
from deckward.server import atomic_write
from deckward.server.atomic_write import WriteRefused, clean_stale_temporaries, read_snapshot, write_atomically
from deckward.server.cli import main

GOOD = all_rules()["restricted-open-shell"].info.good_example


def cli(*argv):
    import io
    from contextlib import redirect_stdout

    buf = io.StringIO()
    with redirect_stdout(buf):
        status = main(list(argv))
    return status, buf.getvalue()


def cli_process(*argv, cwd, timeout=120):
    """``deckward ARGV`` in its own process, so that a hang fails the test
    instead of stopping the suite."""
    return subprocess.run([sys.executable, "-m", "deckward", *argv], cwd=cwd, capture_output=True, text=True,
                          timeout=timeout)


def use_findings(ws):
    return [(f.rule, f.span.line, f.span.column, f.message) for f in ws.findings if f.rule == "use-outside-workspace"]


# -- odd characters in a `use` path --------------------------------------------

def test_nul_byte_in_a_use_path_is_a_finding_of_that_file_only(tmp_path):
    (tmp_path / "bad.deck").write_bytes(b'use "a\x00b.deck"\n')
    (tmp_path / "fine.deck").write_text(GOOD, encoding="utf-8")
    status, out = cli("check", "--no-cache", str(tmp_path))
    assert out.splitlines() == [
        f"{tmp_path / 'bad.deck'}:1:5: error: use-outside-workspace: `a\\x00b.deck` cannot be read "
        "(the path contains a NUL character)",
        "1 error, 0 warnings, 0 info in 2 files",
    ]
    assert status == 1


def test_nul_byte_in_a_use_path_with_the_findings_cache(tmp_path):
    (tmp_path / "bad.deck").write_bytes(b'use "a\x00b.deck"\n')
    status, out = cli("check", "--cache-dir", str(tmp_path / ".cache"), str(tmp_path / "bad.deck"))
    assert "the path contains a NUL character" in out
    assert status == 1


@pytest.mark.parametrize("path, reason", [
    ("a\ud800b.deck", "cannot be read (the path contains a character that cannot be a file name)"),
    ("\udcff.deck", "does not exist"),  # the surrogate escape of byte 0xff: a possible file name
])
def test_lone_surrogate_in_a_use_path_is_a_located_finding(tmp_path, path, reason):
    deck = tmp_path / "x.deck"
    ws = resolve(str(deck), Loader(), str(tmp_path), text=f'use "{path}"\n')
    escaped = path.replace("\ud800", "\\ud800").replace("\udcff", "\\udcff")
    assert use_findings(ws) == [("use-outside-workspace", 1, 5, f"`{escaped}` {reason}")]


@pytest.mark.parametrize("encoding, shown", [
    (None, b"\xff.deck"),  # the name's own bytes, as ls prints them
    ("utf-8:strict", b"\\udcff.deck"),  # a strict output encoding: escaped, never a crash
])
def test_a_file_name_that_is_not_utf8_never_breaks_the_output(tmp_path, encoding, shown):
    (tmp_path / os.fsdecode(b"\xff.deck")).write_bytes(b'use "missing.deck"\n')
    env = dict(os.environ)
    if encoding:
        env["PYTHONIOENCODING"] = encoding
    done = subprocess.run([sys.executable, "-m", "deckward", "check", "--no-cache", "."], cwd=tmp_path,
                          capture_output=True, env=env, timeout=120)
    assert done.stdout.splitlines() == [
        shown + b":1:5: error: use-outside-workspace: `missing.deck` does not exist",
        b"1 error, 0 warnings, 0 info in 1 file",
    ]
    assert done.returncode == 1


# -- FIFOs and other files that are not regular ---------------------------------

def test_read_regular_refuses_a_fifo_without_blocking(tmp_path):
    fifo = tmp_path / "pipe.deck"
    os.mkfifo(fifo)
    with pytest.raises(NotRegularFile, match="it is a FIFO"):
        read_regular(str(fifo))


def test_read_regular_stops_at_the_limit():
    assert len(read_regular(__file__, 10)) == 11
    with pytest.raises(NotRegularFile, match="it is a device"):
        read_regular("/dev/zero")


def test_fifo_named_deck_is_skipped_with_a_note(tmp_path):
    os.mkfifo(tmp_path / "pipe.deck")
    (tmp_path / "fine.deck").write_text(GOOD, encoding="utf-8")
    done = cli_process("check", "--no-cache", ".", cwd=tmp_path)
    assert done.stdout.splitlines() == ["deckward: skipped pipe.deck: it is not a regular file",
                                        "0 errors, 0 warnings, 0 info in 1 file"]
    assert done.returncode == 0


def test_fifo_used_by_a_deck_is_a_finding_not_a_hang(tmp_path):
    os.mkfifo(tmp_path / "pipe.deck")
    (tmp_path / "x.deck").write_text('use "pipe.deck"\n', encoding="utf-8")
    done = cli_process("check", "x.deck", cwd=tmp_path)
    assert done.stdout.splitlines() == [
        "x.deck:1:5: error: use-outside-workspace: `pipe.deck` cannot be read "
        "(it is a FIFO (named pipe), not a regular file)",
        "1 error, 0 warnings, 0 info in 1 file",
    ]
    assert done.returncode == 1


def test_fifo_in_an_editor_buffer_workspace_does_not_block(tmp_path):
    os.mkfifo(tmp_path / "pipe.deck")
    loader = Loader({str(tmp_path / "x.deck"): 'use "pipe.deck"\n'})
    ws = resolve(str(tmp_path / "x.deck"), loader, str(tmp_path))
    assert [m for *_, m in use_findings(ws)] == ["`pipe.deck` cannot be read (it is a FIFO (named pipe), not a regular file)"]


# -- links out of the workspace ------------------------------------------------

@pytest.fixture
def outside(tmp_path):
    """A deck outside the workspace folder, and the workspace linking to it."""
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    target = elsewhere / "system.deck"
    target.write_text("geometry g {\n  N 0 0 0\n}\nstate s { geometry = g  method = hf  basis = sto-3g"
                      "  multiplicity = 1 }\n", encoding="utf-8")
    ws = tmp_path / "ws"
    ws.mkdir()
    (ws / "deckward.yaml").write_text("", encoding="utf-8")
    (ws / "linked.deck").symlink_to(target)
    return ws, target


def test_check_does_not_follow_a_link_out_of_the_workspace(outside):
    ws, target = outside
    status, out = cli("check", "--no-cache", str(ws))
    assert out.splitlines() == [f"deckward: skipped {ws / 'linked.deck'}: it is a link to a file outside the workspace",
                                "0 errors, 0 warnings, 0 info in 0 files"]
    assert status == 0


def test_fix_never_writes_through_a_link_out_of_the_workspace(outside):
    ws, target = outside
    before = target.read_bytes()
    cli("check", "--fix-risky", "--no-cache", str(ws))
    status, out = cli("check", "--fix-risky", "--no-cache", str(ws / "linked.deck"))
    assert target.read_bytes() == before
    assert (f"deckward: refused to write {ws / 'linked.deck'}: it is a link to {target}, "
            f"outside the workspace {ws}") in out.splitlines()
    assert status == 1


# -- atomic writes -----------------------------------------------------------------

def test_a_file_with_hard_links_is_refused_and_untouched(tmp_path):
    deck = tmp_path / "x.deck"
    deck.write_text("old\n", encoding="utf-8")
    os.link(deck, tmp_path / "other.deck")
    snap = read_snapshot(str(deck))
    with pytest.raises(WriteRefused, match="^it has 2 hard links, and replacing it would leave the other names "
                                           "with the old text$"):
        write_atomically(snap, b"new\n")
    assert deck.read_bytes() == b"old\n" and (tmp_path / "other.deck").read_bytes() == b"old\n"


def test_a_write_in_place_at_the_last_moment_is_kept(tmp_path, monkeypatch):
    deck = tmp_path / "x.deck"
    deck.write_text("old\n", encoding="utf-8")
    snap = read_snapshot(str(deck))
    real_link = os.link

    def editor_writes_then_link(src, dst, *a, **k):
        with open(src, "r+b") as f:  # an in-place writer, after deckward's last check
            f.write(b"EDIT\n")
        return real_link(src, dst, *a, **k)

    monkeypatch.setattr(atomic_write.os, "link", editor_writes_then_link)
    with pytest.raises(WriteRefused, match="^it changed on disk while being fixed$"):
        write_atomically(snap, b"new\n")
    assert deck.read_bytes() == b"EDIT\n"
    assert [p.name for p in tmp_path.iterdir()] == ["x.deck"]


def test_a_successful_write_leaves_no_temporary_file(tmp_path):
    deck = tmp_path / "x.deck"
    deck.write_text("old\n", encoding="utf-8")
    write_atomically(read_snapshot(str(deck)), b"new\n")
    assert deck.read_bytes() == b"new\n"
    assert [p.name for p in tmp_path.iterdir()] == ["x.deck"]
    assert os.stat(deck).st_nlink == 1


def dead_pid():
    proc = subprocess.Popen([sys.executable, "-c", "pass"])
    proc.wait()
    return proc.pid


def test_stale_temporary_files_of_a_killed_writer_are_removed(tmp_path):
    deck = tmp_path / "x.deck"
    deck.write_text("old\n", encoding="utf-8")
    pid = dead_pid()
    stale = tmp_path / f".x.deck.{pid}.0123456789ab.deckward-tmp"
    young = tmp_path / f".x.deck.{pid}.ba9876543210.deckward-tmp"
    alive = tmp_path / f".x.deck.1.0123456789ab.deckward-tmp"  # pid 1 always exists
    foreign = tmp_path / ".x.deck.swp"
    for p in (stale, young, alive, foreign):
        p.write_text("left over", encoding="utf-8")
    old = time.time() - 3600
    for p in (stale, alive, foreign):
        os.utime(p, (old, old))
    write_atomically(read_snapshot(str(deck)), b"new\n")
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(["x.deck", young.name, alive.name, foreign.name])
    assert clean_stale_temporaries(str(tmp_path)) == []


def test_format_never_writes_through_a_link_out_of_the_workspace(outside, capsys):
    ws, target = outside
    target.write_text("geometry   g {\n N 0 0 0\n}\n", encoding="utf-8")
    before = target.read_bytes()
    assert main(["format", str(ws)]) == 0
    assert main(["format", str(ws / "linked.deck")]) == 1
    out, err = capsys.readouterr()
    assert target.read_bytes() == before
    assert err.splitlines() == [
        f"deckward: skipped {ws / 'linked.deck'}: it is a link to a file outside the workspace",
        f"{ws / 'linked.deck'}: not written: it is a link to {target}, outside the workspace {ws}",
    ]


def test_resolved_path_is_realpath_with_folders_remembered(tmp_path):
    from deckward.grammar.safe_open import resolved_path

    (tmp_path / "real").mkdir()
    (tmp_path / "real" / "a.deck").write_text("")
    (tmp_path / "elsewhere").mkdir()
    (tmp_path / "elsewhere" / "b.deck").write_text("")
    os.symlink(tmp_path / "real", tmp_path / "linked_folder")
    os.symlink(tmp_path / "elsewhere" / "b.deck", tmp_path / "real" / "link.deck")
    memo: dict[str, str] = {}
    for rel in ("real/a.deck", "real/link.deck", "linked_folder/a.deck", "linked_folder/link.deck",
                "real/missing.deck", "real/../real/a.deck", "linked_folder"):
        path = str(tmp_path / rel)
        assert resolved_path(path, memo) == os.path.realpath(path), rel
    assert memo[str(tmp_path / "linked_folder")] == os.path.realpath(tmp_path / "real")


def test_replace_file_writes_whole_files_and_leaves_no_temporary(tmp_path, monkeypatch):
    from deckward.grammar import safe_open

    target = tmp_path / "cache" / "entry.json"
    safe_open.replace_file(str(target), b"first")
    safe_open.replace_file(str(target), b"second")
    assert target.read_bytes() == b"second"

    def interrupted(src, dst):
        raise KeyboardInterrupt

    monkeypatch.setattr(safe_open.os, "replace", interrupted)
    with pytest.raises(KeyboardInterrupt):
        safe_open.replace_file(str(target), b"third")
    assert target.read_bytes() == b"second"
    assert sorted(p.name for p in target.parent.iterdir()) == ["entry.json"]
