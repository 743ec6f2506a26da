"""The command line: exit codes, an existing folder left alone, the caution in the help."""

import pytest

from advisor.cli import EXIT_OK, EXIT_USAGE, main


def test_existing_results_folder_is_not_overwritten(tmp_path, capsys):
    out = tmp_path / "results"
    out.mkdir()
    (out / "keep.txt").write_text("earlier work")
    assert main(["demo", "--out", str(out)]) == EXIT_USAGE
    assert "already exists" in capsys.readouterr().err
    assert [p.name for p in out.iterdir()] == ["keep.txt"]
    assert (out / "keep.txt").read_text() == "earlier work"


def test_force_replaces_the_folder(tmp_path):
    out = tmp_path / "results"
    out.mkdir()
    (out / "stale.txt").write_text("old")
    (out / ".soakwise-results").write_text('{"files": ["stale.txt", ".soakwise-results"]}')
    assert main(["--quiet", "demo", "--out", str(out), "--force"]) == EXIT_OK
    assert not (out / "stale.txt").exists()
    assert (out / "summary.json").is_file()
    assert [p.name for p in tmp_path.iterdir()] == ["results"]  # no staging folder left


def test_no_command_prints_help_and_exits_2(capsys):
    assert main([]) == EXIT_USAGE
    assert "usage: soakwise" in capsys.readouterr().out


@pytest.mark.parametrize("argv", [["--help"], ["demo", "--help"]])
def test_help_carries_the_caution(argv, capsys):
    with pytest.raises(SystemExit) as stop:
        main(argv)
    assert stop.value.code == 0
    assert "licensed professional practice" in " ".join(capsys.readouterr().out.split())


def test_version(capsys):
    with pytest.raises(SystemExit):
        main(["--version"])
    assert capsys.readouterr().out.startswith("soakwise ")
