"""The documentation stays true: set-up commands, command coverage, runnable examples.

Runnable examples are the ```console blocks of ``docs/*.md``: every line starting with
``$ kitbin`` is run in order, file by file, against a fresh copy of the demo
workshop, in a folder holding the demo captures under ``captures/``. A line ending in
``# exits N`` must exit with status N; every other line must succeed.
"""

from __future__ import annotations

import os
import re
import shlex
import shutil
from pathlib import Path

import pytest
import typer
from typer.testing import CliRunner

from kitbin.cli.app import app

ROOT = Path(__file__).resolve().parents[2]
DOCS = sorted((ROOT / "docs").glob("*.md"))
FENCE = re.compile(r"```console\n(.*?)```", re.S)
EXPECTED_EXIT = re.compile(r"#\s*exits\s+(\d+)\s*$")


def _readme_commands() -> list[str]:
    text = (ROOT / "README.md").read_text()
    return re.findall(r"```bash\n(.*?)\n```", text, re.S)[:2]


def test_ci_runs_exactly_the_readme_test_command() -> None:
    _, test_command = _readme_commands()
    ci_lines = (ROOT / ".ci" / "run").read_text().splitlines()
    assert test_command in ci_lines


def test_readme_starts_with_the_job_then_the_two_set_up_commands() -> None:
    demo_command, test_command = _readme_commands()
    assert "kitbin demo" in demo_command and "pip install" in demo_command
    assert "pytest" in test_command and ".[test]" in test_command


def _leaf_commands(group, prefix: str = "kitbin"):
    for name, command in sorted(getattr(group, "commands", {}).items()):
        path = f"{prefix} {name}"
        if getattr(command, "commands", None):
            yield from _leaf_commands(command, path)
        else:
            yield path, command


LEAVES = list(_leaf_commands(typer.main.get_command(app)))


@pytest.mark.parametrize(("path", "command"), LEAVES, ids=[p for p, _ in LEAVES])
def test_every_command_has_help_with_an_example_and_is_documented(path: str, command) -> None:
    assert command.help and command.help.strip(), f"{path} has no help text"
    assert "Example" in command.help, f"{path}: the docstring should end with an example"
    corpus = "\n".join(p.read_text() for p in [ROOT / "README.md", *DOCS])
    assert path in corpus, f"{path} is not mentioned in README.md or docs/"


def _examples(doc: Path) -> list[tuple[str, int]]:
    found = []
    for block in FENCE.findall(doc.read_text()):
        for line in block.splitlines():
            if line.startswith("$ kitbin "):
                match = EXPECTED_EXIT.search(line)
                found.append((line[2:], int(match.group(1)) if match else 0))
    return found


DOC_EXAMPLES = [(doc, _examples(doc)) for doc in DOCS if _examples(doc)]


@pytest.fixture(scope="session")
def demo_database(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("demo")
    path = folder / "demo.sqlite"
    result = CliRunner().invoke(app, ["demo", "--db", str(path)])
    assert result.exit_code == 0, result.output
    return path


@pytest.mark.parametrize(("doc", "examples"), DOC_EXAMPLES, ids=[d.name for d, _ in DOC_EXAMPLES])
def test_documented_examples_run(doc: Path, examples, demo_database: Path, tmp_path: Path):
    database = tmp_path / "inventory.sqlite"
    shutil.copy(demo_database, database)
    captures = ROOT / "src" / "kitbin" / "demo" / "captures"
    if captures.is_dir():
        shutil.copytree(captures, tmp_path / "captures")
    runner = CliRunner()
    cwd = os.getcwd()
    os.chdir(tmp_path)
    try:
        for line, expected_exit in examples:
            argv = shlex.split(line, comments=True)[1:]
            result = runner.invoke(app, argv, env={"KITBIN_DB": str(database)})
            assert result.exit_code == expected_exit, (
                f"{doc.name}: `{line}` exited {result.exit_code}:\n{result.output}"
            )
    finally:
        os.chdir(cwd)
