"""The command line's contract: help, version, exit codes."""

import subprocess
import sys

from lightpath import __version__
from lightpath.cli import main


def test_version(capsys):
    try:
        main(["--version"])
    except SystemExit as exc:
        assert exc.code == 0
    assert __version__ in capsys.readouterr().out


def test_help_lists_commands(capsys):
    assert main([]) == 0
    out = capsys.readouterr().out
    assert "COMMAND" in out


def test_unknown_option_is_exit_2():
    proc = subprocess.run([sys.executable, "-m", "lightpath", "--no-such-option"], capture_output=True, text=True)
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr
