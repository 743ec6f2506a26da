"""The measured-file reader: good files in several dialects read to the same numbers, and a
corpus of malformed files, each refused with the file, the line and the column of its fault.

The expected values are written out in the test from the text of each file (unit conversions
by hand: 1 min = 60 s, T[°C] = (T[°F] − 32)·5/9, T[°C] = T[K] − 273.15)."""

from pathlib import Path

import numpy as np
import pytest

from advisor.fitting.measured import MeasuredFileError, check_positions, read_measured

PROBES = {"core": (0.0, 0.0), "skin": (0.018, 0.0)}


def write(tmp_path: Path, text: str, name: str = "trial.csv") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_csv_with_units_in_the_header(tmp_path):
    path = write(
        tmp_path,
        "# logger 7\ntime [min],core [degC],skin [degF]\n0,850,1562\n1,700,932\n2,600,752\n",
    )
    curves = read_measured(path, PROBES)
    assert curves.times.tolist() == [0.0, 60.0, 120.0]
    assert curves.readings["core"].tolist() == [850.0, 700.0, 600.0]
    np.testing.assert_allclose(
        curves.readings["skin"], [(1562 - 32) * 5 / 9, (932 - 32) * 5 / 9, (752 - 32) * 5 / 9]
    )
    assert curves.probes == ("core", "skin") and curves.count == 6


def test_whitespace_table_with_units_apart_and_a_map(tmp_path):
    path = write(
        tmp_path,
        "time  tc1 [K]  tc2\n0 1123.15 850\n\n10  1100.15 800\n20 1073.15 760\n",
        "log.txt",
    )
    curves = read_measured(
        path, PROBES, units={"time": "s", "tc2": "degC"}, mapping={"tc1": "core", "tc2": "skin"}
    )
    np.testing.assert_allclose(curves.readings["core"], [850.0, 827.0, 800.0])
    assert curves.readings["skin"].tolist() == [850.0, 800.0, 760.0]
    assert curves.columns == {"core": "tc1", "skin": "tc2"}


def test_a_column_mapped_to_a_point_becomes_a_probe(tmp_path):
    path = write(tmp_path, "time [s], mid [degC]\n0, 800\n5, 790\n10, 780\n")
    curves = read_measured(path, PROBES, mapping={"mid": "9 mm, 0 mm"})
    assert curves.positions == {"mid": pytest.approx((0.009, 0.0), abs=1e-15)}


def test_semicolons_and_tabs(tmp_path):
    for text in (
        "time [s];core [degC]\n0;850\n5;840\n10;830\n",
        "time [s]\tcore [degC]\n0\t850\n5\t840\n10\t830\n",
    ):
        curves = read_measured(write(tmp_path, text), PROBES)
        assert curves.readings["core"].tolist() == [850.0, 840.0, 830.0]


# (file text, options, line, column, words in the message): each a different fault.
CORPUS = {
    "empty": ("", {}, 0, 0, "empty"),
    "only comments": ("# nothing logged\n# at all\n", {}, 0, 0, "empty"),
    "no time column": ("clock [s], core [degC]\n0, 1\n1, 2\n2, 3\n", {}, 1, 0, "time"),
    "missing column in map": (
        "time [s], core [degC]\n0, 1\n1, 2\n2, 3\n",
        {"mapping": {"tc9": "skin"}},
        1,
        0,
        "tc9",
    ),
    "column not a probe": (
        "time [s], core [degC], rim [degC]\n0,1,1\n1,2,2\n2,3,3\n",
        {},
        1,
        3,
        "rim",
    ),
    "no unit": ("time [s], core\n0, 1\n1, 2\n2, 3\n", {}, 1, 2, "no unit"),
    "unknown unit": ("time [s], core [degZ]\n0, 1\n1, 2\n2, 3\n", {}, 1, 2, "degZ"),
    "length as time": ("time [mm], core [degC]\n0, 1\n1, 2\n2, 3\n", {}, 1, 1, "mm"),
    "text in a number": ("time [s], core [degC]\n0, 800\n5, 79O\n10, 780\n", {}, 3, 2, "79O"),
    "decimal comma": ("time [s];core [degC]\n0;850\n5;84,5\n10;830\n", {}, 3, 2, "decimal points"),
    "not a number": ("time [s], core [degC]\n0, 800\n5, nan\n10, 780\n", {}, 3, 2, "finite"),
    "infinite": ("time [s], core [degC]\n0, 800\n5, 790\n10, -inf\n", {}, 4, 2, "finite"),
    "time goes back": (
        "time [s], core [degC]\n0, 800\n10, 790\n5, 780\n20, 770\n",
        {},
        4,
        1,
        "increase",
    ),
    "time repeats": (
        "time [s], core [degC]\n# restart\n0, 800\n0, 790\n5, 780\n",
        {},
        4,
        1,
        "increase",
    ),
    "negative time": (
        "time [s], core [degC]\n-5, 800\n0, 790\n5, 780\n",
        {},
        2,
        1,
        "before the start",
    ),
    "short row": (
        "time [s], core [degC], skin [degC]\n0, 800, 800\n5, 790\n10, 780, 700\n",
        {},
        3,
        0,
        "2 cells",
    ),
    "long row": ("time [s], core [degC]\n0, 800\n5, 790, 12\n10, 780\n", {}, 3, 3, "3 cells"),
    "too few points": (
        "time [s], core [degC]\n0, 800\n5, 790\n",
        {"parameters": 1},
        3,
        0,
        "at least 3",
    ),
    "too few for a table": (
        "time [s], core [degC]\n" + "".join(f"{5 * i}, {800 - i}\n" for i in range(7)),
        {"parameters": 6},
        8,
        0,
        "at least 8",
    ),
    "same name twice": (
        "time [s], core [degC], core [degC]\n0,1,1\n1,2,2\n2,3,3\n",
        {},
        1,
        3,
        "twice",
    ),
    "two columns one probe": (
        "time [s], core [degC], tc [degC]\n0,1,1\n1,2,2\n2,3,3\n",
        {"mapping": {"tc": "core"}},
        1,
        3,
        "two columns",
    ),
    "bad point": (
        "time [s], mid [degC]\n0, 1\n1, 2\n2, 3\n",
        {"mapping": {"mid": "9 kg, 0 mm"}},
        1,
        2,
        "length",
    ),
    "units for an absent column": (
        "time [s], core [degC]\n0, 1\n1, 2\n2, 3\n",
        {"units": {"rim": "degC"}},
        1,
        0,
        "rim",
    ),
}


@pytest.mark.parametrize("name", sorted(CORPUS))
def test_malformed_files_are_refused_with_file_line_and_column(tmp_path, name):
    text, options, line, column, words = CORPUS[name]
    path = write(tmp_path, text, "bad-trial.csv")
    with pytest.raises(MeasuredFileError) as caught:
        read_measured(path, PROBES, **options)
    error = caught.value
    assert (error.path, error.line, error.column) == (path, line, column), str(error)
    message = str(error)
    assert message.startswith("bad-trial.csv")
    assert (f"line {line}" in message) == bool(line) and (f"column {column}" in message) == bool(
        column
    )
    assert words in message, message
    assert list(tmp_path.iterdir()) == [path]  # nothing written beside it


def test_a_file_that_is_not_there_or_not_text(tmp_path):
    with pytest.raises(MeasuredFileError, match="does not exist"):
        read_measured(tmp_path / "absent.csv", PROBES)
    path = tmp_path / "binary.csv"
    path.write_bytes(b"time [s], core [degC]\n0, 1\n\xff\xfe, 2\n")
    with pytest.raises(MeasuredFileError, match="line 3: not UTF-8"):
        read_measured(path, PROBES)


def test_a_point_outside_the_section_is_refused_with_its_column(tmp_path):
    from geometries import Rectangle

    section = Rectangle(0.02, 0.02).mesh(size=0.005)  # from (0, 0) to (20 mm, 20 mm)
    path = write(tmp_path, "time [s], core [degC], out [degC]\n0,1,1\n1,2,2\n2,3,3\n")
    inside = read_measured(path, {"core": (0.01, 0.01)}, mapping={"out": "19 mm, 19 mm"})
    check_positions(inside, section)  # inside: no error
    outside = read_measured(path, {"core": (0.01, 0.01)}, mapping={"out": "25 mm, 5 mm"})
    with pytest.raises(MeasuredFileError) as caught:
        check_positions(outside, section)
    assert (caught.value.line, caught.value.column) == (1, 3)
    assert "outside the section" in str(caught.value)
