"""The README's two commands are the ones CI and users run."""
import os
import re

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def read(name):
    with open(os.path.join(ROOT, name), encoding="utf-8") as f:
        return f.read()


def readme_commands():
    return [m.group(1).strip() for m in re.finditer(r"^    (pip install .*)$", read("README.md"), re.MULTILINE)]


def test_readme_starts_with_the_job_then_two_commands():
    commands = readme_commands()
    assert commands[:2] == ["pip install . && deckward check examples/",
                            "pip install '.[test]' && python -m pytest -q"]
    first_paragraph = read("README.md").split("\n\n")[1]
    assert "electron affinit" in first_paragraph and "deckward" in first_paragraph


def test_ci_runs_exactly_the_readme_test_command():
    ci_lines = [ln.strip() for ln in read(".ci/run").splitlines() if ln.strip() and not ln.strip().startswith("#")]
    assert ci_lines[-1] == readme_commands()[1]
