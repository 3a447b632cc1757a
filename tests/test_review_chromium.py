"""The review report renders in a real browser (headless Chromium), at
desktop and phone widths, without network access."""
from __future__ import annotations

import shutil
import subprocess
import tempfile

import pytest
from PIL import Image

from deck_batch import write_batch
from deckward.server.cli import main

pytestmark = pytest.mark.editor  # drives an installed program headless

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")


def screenshot(html_path: str, png_path: str, width: int, height: int) -> subprocess.CompletedProcess:
    profile = tempfile.mkdtemp(prefix="deckward-chromium-")
    try:
        return subprocess.run(
            [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
             "--disable-background-networking", "--disable-component-update", "--disable-sync",
             f"--user-data-dir={profile}", f"--screenshot={png_path}", f"--window-size={width},{height}",
             "file://" + html_path],
            capture_output=True, text=True, timeout=120)
    finally:
        shutil.rmtree(profile, ignore_errors=True)


@pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed (apt-get install chromium); CI installs it")
@pytest.mark.parametrize("width,height", [(1200, 1600), (390, 844)])
def test_report_renders_headless(tmp_path, monkeypatch, width, height):
    write_batch(str(tmp_path / "batch"))
    monkeypatch.chdir(tmp_path)
    assert main(["review", "batch", "--out", "report.html", "--no-cache"]) == 0
    png = str(tmp_path / "shot.png")
    done = screenshot(str(tmp_path / "report.html"), png, width, height)
    assert done.returncode == 0, done.stderr[-2000:]
    with Image.open(png) as im:
        assert im.size == (width, height)
        grey = im.convert("L")
        # Not a blank page: dark text pixels on the light background.
        dark = sum(grey.histogram()[:100])
        assert dark > 0.002 * width * height
        # Nothing overflows sideways on a phone: the right-most column is page background.
        right = [grey.getpixel((width - 2, y)) for y in range(0, height, 4)]
        assert min(right) > 200
