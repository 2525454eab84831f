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


def test_atomic_write_has_usual_mode_and_leaves_nothing_on_failure(tmp_path):
    import os
    import stat

    import pytest

    from lightpath.files import write_atomic, write_text_atomic

    path = write_text_atomic(tmp_path / "a.txt", "first")
    mask = os.umask(0)
    os.umask(mask)
    assert stat.S_IMODE(path.stat().st_mode) == 0o666 & ~mask

    def broken(handle):
        handle.write(b"half")
        raise RuntimeError("interrupted")

    with pytest.raises(RuntimeError):
        write_atomic(path, broken)
    assert path.read_text() == "first"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.txt"]


def test_public_api_names_resolve():
    import lightpath

    for name in lightpath.__all__:
        assert getattr(lightpath, name) is not None, name


def test_accuracy_warning_becomes_one_line_notice():
    # 4000 BC is before the span checked against JPL DE406, so the Sun source warns.
    proc = subprocess.run(
        [sys.executable, "-m", "lightpath", "sun", "--site", "53.452,104.637", "--at", "4000 BC-04-20T08:00 LAT"],
        capture_output=True,
        text=True,
    )
    assert proc.returncode == 0
    notices = [line for line in proc.stderr.splitlines() if "notice:" in line]
    assert len(notices) == 1 and "3000 BC" in notices[0]
    assert "Warning" not in proc.stderr
