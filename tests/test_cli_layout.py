"""The command line as a package: modules small enough to read, and a start-up that loads none
of the library (``isokin --help`` and ``isokin version`` answer at once)."""

import json
import subprocess
import sys
from pathlib import Path

import pytest

from isokin.cli import app

CLI = Path(__file__).resolve().parents[1] / "src" / "isokin" / "cli"
MAX_LINES = 400
#: What a start-up may load of isokin besides the command line itself.
LIGHT = {"isokin", "isokin.constants", "isokin.errors", "isokin.readout"}
HEAVY = {"numpy", "scipy", "matplotlib", "pandas"}
PROBE = """
import json, sys
from isokin.cli import main
modules_file, args = sys.argv[1], json.loads(sys.argv[2])
sys.argv = ["isokin", *args]
try:
    main()
except SystemExit:
    pass
with open(modules_file, "w") as f:
    json.dump(sorted(sys.modules), f)
"""


@pytest.mark.parametrize("path", sorted(CLI.glob("*.py")), ids=lambda p: p.name)
def test_no_module_of_the_command_line_is_over_400_lines(path):
    lines = len(path.read_text(encoding="utf-8").splitlines())
    assert lines <= MAX_LINES, f"{path.name} has {lines} lines; split it (at most {MAX_LINES})"


def _commands():
    return [c.name or c.callback.__name__ for c in app.registered_commands]


@pytest.mark.parametrize("args", [["version"], ["--help"], *[[c, "--help"] for c in _commands()]], ids=" ".join)
def test_start_up_loads_no_library(args, tmp_path):
    modules_file = tmp_path / "modules.json"
    done = subprocess.run([sys.executable, "-c", PROBE, str(modules_file), json.dumps(args)],
                          capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    loaded = set(json.loads(modules_file.read_text()))
    library = {m for m in loaded if m.split(".")[0] == "isokin" and not m.startswith("isokin.cli")}
    assert library <= LIGHT, f"isokin {' '.join(args)} imports {sorted(library - LIGHT)} at start-up"
    heavy = HEAVY & {m.split(".")[0] for m in loaded}
    assert not heavy, f"isokin {' '.join(args)} imports {sorted(heavy)} at start-up"
