"""The command line as a user types it: every command's help opens, list options accept a leading minus,
errors are one plain line.  Source: argparse behaviour (Python documentation); no external values."""

import pytest

from wakemeter.cli import COMMANDS, main
from wakemeter.cli.options import join_negative_lists


@pytest.mark.parametrize("argv", [["--help"], *[[name, "--help"] for name in sorted(COMMANDS)]])
def test_every_help_opens(argv, capsys):
    with pytest.raises(SystemExit) as exit_info:
        main(argv)
    assert exit_info.value.code == 0
    out = capsys.readouterr().out
    assert "usage: wakemeter" in out


def test_negative_numbers_after_list_options():
    # argparse takes "-35,36" for an option; the README writes "--vessel -35,36"
    argv = ["analyze", "s.tif", "--vessel", "-35,36", "--vessel-px", "-1.5e2,3", "--depth", "5"]
    assert join_negative_lists(argv) == ["analyze", "s.tif", "--vessel=-35,36", "--vessel-px=-1.5e2,3", "--depth", "5"]
    assert join_negative_lists(["--vessel", "--json"]) == ["--vessel", "--json"]  # an option is left alone
    assert join_negative_lists(["--vessel", "35,36"]) == ["--vessel", "35,36"]


def test_bad_options_are_one_plain_line(capsys):
    assert main(["analyze", "no_such_scene.tif", "--vessel", "-35,36", "--radar-geometry", "1,2,3"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--radar-geometry" in err[0] and "needs 4 numbers" in err[0]
