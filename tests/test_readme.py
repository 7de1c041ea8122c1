"""The README's quick start: one paragraph first, exactly two commands, and CI runs the second."""

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _quick_start_commands() -> list[str]:
    text = (ROOT / "README.md").read_text()
    section = text.split("## Quick start", 1)[1].split("\n## ", 1)[0]
    return [c.strip() for c in re.findall(r"```sh\n(.*?)```", section, flags=re.S)]


def test_readme_opens_with_one_paragraph_then_quick_start():
    text = (ROOT / "README.md").read_text()
    body = text.split("\n", 1)[1].strip()
    first, rest = body.split("\n\n", 1)
    assert not first.startswith("#") and len(first.split()) > 40
    assert rest.lstrip().startswith("## Quick start")


def test_exactly_two_commands():
    commands = _quick_start_commands()
    assert len(commands) == 2
    assert all("\n" not in c for c in commands)
    # the main job: JupyterLab on the workbook with the explorer open
    assert "cd studies && ../.venv/bin/jupyter lab explorer.ipynb" in commands[0]
    assert "[notebook]" in commands[0]
    assert "pytest" in commands[1] and "notebook" in commands[1]


def test_quick_start_notebook_exists():
    target = _quick_start_commands()[0].split("jupyter lab ", 1)[1].split()[0]
    assert (ROOT / "studies" / target).is_file()


def test_using_it_gives_the_headless_report_command():
    text = (ROOT / "README.md").read_text()
    section = text.split("## Using it", 1)[1]
    assert "bridgeopt report studies/explorer.ipynb -o" in section


def test_ci_runs_the_readme_test_command():
    ci = (ROOT / ".ci" / "run").read_text().splitlines()
    assert _quick_start_commands()[1] in ci
