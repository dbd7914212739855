"""Every command's --help reads as a metallurgist would write it: no Python type names as value
placeholders (<str>, <path>, <bool>, list[...]), choices listed, one line per option."""

import re

import pytest
from typer.testing import CliRunner

from isokin.cli.commands import app

COMMANDS = [c.name or c.callback.__name__ for c in app.registered_commands]
PYTHON_TYPES = re.compile(r"<(str|path|bool|int|float)>|list\[|\{[a-z_]+\}")
#: Text that a help renderer ate (a [table] taken as markup leaves "( of the file").
EATEN = re.compile(r"\(\s|\s\)")


@pytest.mark.parametrize("command", [None, *COMMANDS])
def test_help_has_no_python_type_names(command):
    args = [command, "--help"] if command else ["--help"]
    result = CliRunner().invoke(app, args, env={"COLUMNS": "160"})
    assert result.exit_code == 0, result.output
    found = sorted(set(m.group(0) for m in PYTHON_TYPES.finditer(result.output)))
    assert not found, f"{command}: {found}\n{result.output}"
    text = " ".join(line.strip("│ ") for line in result.output.splitlines())
    assert not EATEN.search(text), f"{command}: broken text near {EATEN.search(text).group(0)!r}"
