"""A user's own r/t table (in-house data) reaches the analysis through the command line.

The table here is invented data: this checks the mechanism (the table is read, used and named),
not any physics.
"""

from profilebench import cli
from profilebench.io import sample_paths

TABLE = """# name: in-house demo table
# source: invented demo data for a test
# reynolds_min: 1e5
# reynolds_max: 1e8
# thickness: body height
# quantity: Cd of the body
# critical_ratio: 0.05
r_over_t,cd
0.0,0.60
0.02,0.45
0.05,0.35
0.10,0.34
"""


def _hatch():
    return str(next(p for p in sample_paths() if "hatch" in p.name))


def test_user_table_is_used_and_named(tmp_path, capsys):
    path = tmp_path / "mine.csv"
    path.write_text(TABLE, encoding="utf-8")
    assert cli.main(["corners", _hatch(), "--table", str(path)]) == 0
    out = capsys.readouterr().out
    # r/t of the hatch's corners against the table's critical ratio 0.05: both verdicts occur
    assert "below critical" in out and "at or above critical" in out


def test_user_table_with_a_bad_row_is_bad_input(tmp_path, capsys):
    path = tmp_path / "bad.csv"
    path.write_text(TABLE.replace("0.05,0.35", "0.01,0.35"), encoding="utf-8")  # r/t not increasing
    assert cli.main(["analyse", _hatch(), "--table", str(path)]) == 2
    err = capsys.readouterr().err
    assert "bad.csv" in err and "line" in err
