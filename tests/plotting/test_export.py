"""Result export: surface CSV and results JSON."""

import csv
import json
import os

import numpy as np
import pytest

from fake_analysis import N, fake_analysis
from profilebench.assess.results import Analysis, AnalysisStatus
from profilebench.errors import InputError, ProfileBenchError
from profilebench.io.export import CAUTION, SURFACE_COLUMNS, write_results_json, write_surface_csv


@pytest.fixture(scope="module")
def analysis():
    return fake_analysis()


def _read(path):
    with open(path, newline="") as fh:
        return list(csv.DictReader(fh))


def test_csv_one_row_per_station(analysis, tmp_path):
    rows = _read(write_surface_csv(analysis, tmp_path / "s.csv"))
    assert len(rows) == N
    assert tuple(rows[0].keys()) == SURFACE_COLUMNS


def test_csv_values_round_trip(analysis, tmp_path):
    rows = _read(write_surface_csv(analysis, tmp_path / "s.csv"))
    up = [r for r in rows if r["surface"] == "upper"]
    idx = analysis.flow.upper.surface.index
    np.testing.assert_array_equal([float(r["cp"]) for r in up], analysis.flow.inviscid.cp[idx])
    np.testing.assert_array_equal([float(r["H"]) for r in up], analysis.flow.upper.bl.H)
    assert {r["regime"] for r in up} == {"laminar", "turbulent", "separated"}


def test_json_parses_and_holds_caution(analysis, tmp_path):
    data = json.loads(write_results_json(analysis, tmp_path / "r.json").read_text())
    assert data["caution"] == CAUTION
    assert data["summary"]["cd"] == analysis.drag.cd
    assert data["drag"]["cd_base"] == analysis.drag.cd_base
    assert [c["verdict"] for c in data["corners"]] == [c.verdict.value for c in analysis.corners]
    assert len(data["events"]) == len(analysis.events)
    assert data["conditions"]["speed"] == analysis.conditions.speed
    assert data["profilebench_version"]


def test_json_of_failed_analysis(tmp_path):
    a = fake_analysis()
    failed = Analysis(
        AnalysisStatus.BOUNDARY_LAYER_FAILED, "march stalled", a.profile, a.conditions
    )
    data = json.loads(write_results_json(failed, tmp_path / "r.json").read_text())
    assert data["summary"]["success"] is False and data["summary"]["message"] == "march stalled"
    with pytest.raises(InputError, match="march stalled"):
        write_surface_csv(failed, tmp_path / "s.csv")


def test_failed_write_keeps_previous_file(analysis, tmp_path, monkeypatch):
    target = tmp_path / "s.csv"
    target.write_text("previous\n")

    def boom(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(ProfileBenchError, match="disk full"):
        write_surface_csv(analysis, target)
    assert target.read_text() == "previous\n"
    assert [p.name for p in tmp_path.iterdir()] == ["s.csv"]


def test_export_needs_an_analysis(tmp_path):
    with pytest.raises(InputError, match="needs an Analysis"):
        write_results_json(object(), tmp_path / "r.json")
