"""The ``petfall-audit assess`` command and the results exporters."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from petfall_audit.cli import main
from petfall_audit.injury import BANDS
from petfall_audit.io.building_file import save_building
from petfall_audit.io.results_export import assessment_to_csv, assessment_to_dict
from petfall_audit.model import (
    Building,
    BuildingInfo,
    CatsPresent,
    Facade,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)
from petfall_audit.present.tables import assessment_to_table, whole_percents
from petfall_audit.risk import assess


def _building() -> Building:
    floors = tuple(Floor(i, f"Level {i}", 3.2 * i) for i in range(0, 9))
    ops = []
    for level in range(1, 9):
        ops.append(Opening(f"B{level}", level, "south", OpeningKind.BALCONY, 0.0, 4.0,
                           projection_m=1.4, largest_gap_mm=90.0 if level % 2 else None,
                           cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY))
        ops.append(Opening(f"W{level}", level, "north", OpeningKind.WINDOW_TILT_TURN, 2.0, 1.0,
                           perch_height_m=0.9, cats_present=CatsPresent.UNKNOWN))
    return Building(
        info=BuildingInfo(name="Juniper Court", address="12 Invented Lane"),
        floors=floors,
        facades=(Facade("south", 12.0), Facade("north", 12.0)),
        surfaces=(Surface("terrace", SurfaceKind.CONCRETE, 0.0, facade="south"),
                  Surface("garden", SurfaceKind.LAWN, 0.0, facade="north")),
        openings=tuple(ops),
    )


@pytest.fixture()
def building_file(tmp_path: Path) -> Path:
    path = tmp_path / "juniper.json"
    save_building(_building(), path)
    return path


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_table(building_file: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = _run(capsys, "assess", str(building_file), "--samples", "200")
    assert code == 0
    assert "Juniper Court" in out and "Expected band" in out
    assert "veterinarian" in out and "not a structural" in out  # the cautions
    assert "trapped" in out  # tilt-and-turn entrapment listed apart
    rows = [line for line in out.splitlines() if line.strip()[:1].isdigit()]
    assert len(rows) == 16 and rows[0].split()[0] == "1"


def test_json_fields_and_same_seed_same_bytes(
    building_file: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out1, out2 = tmp_path / "a.json", tmp_path / "b.json"
    args = ["assess", str(building_file), "--format", "json", "--samples", "150", "--seed", "4"]
    assert _run(capsys, *args, "-o", str(out1))[0] == 0
    assert _run(capsys, *args, "-o", str(out2))[0] == 0
    assert out1.read_bytes() == out2.read_bytes()
    envelope = json.loads(out1.read_text("utf-8"))
    assert envelope["format"] == "petfall-audit-results" and envelope["contents"] == ["results"]
    doc = envelope["results"]
    assert doc["samples"] == 150 and doc["seed"] == 4 and doc["model_version"]
    assert doc["cat_profile"]["mass_kg"] == {"type": "lognormal", "mean": 4.1, "sd": 1.1}
    assert doc["cautions"]
    ops = doc["openings"]
    assert len(ops) == 16
    assert [o["risk_rank"] for o in ops] == list(range(1, 17))  # the default order
    assert sorted(o["rank"] for o in ops) == list(range(1, 17))
    for o in ops:
        for key in ("id", "floor", "rank", "risk_rank", "risk", "expected_band", "likelihood",
                    "drop_m", "impact_speed_mps", "landing", "bands", "factors", "hazards"):
            assert key in o
        assert set(o["drop_m"]) == {"p5", "p50", "p95"}
        assert set(o["impact_speed_mps"]) == {"p5", "p50", "p95"}
        assert list(o["bands"]) == list(BANDS)
        assert sum(o["bands"].values()) == pytest.approx(1.0, abs=2e-3)
        assert o["expected_band"] in BANDS
        assert all(isinstance(f, str) for f in o["factors"])
    sens = doc["sensitivity"]
    assert sens and len(sens["parameters"]) == 7
    swings = [abs(p["swing"]) for p in sens["parameters"]]
    assert swings == sorted(swings, reverse=True)
    # a different seed gives a different draw
    code, out, _ = _run(capsys, "assess", str(building_file), "--format", "json",
                        "--samples", "150", "--seed", "5", "--no-sensitivity")
    assert code == 0 and json.loads(out)["results"]["sensitivity"] is None
    assert out.encode() != out1.read_bytes()


def test_csv(building_file: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = _run(capsys, "assess", str(building_file), "--format", "csv", "--samples", "100")
    assert code == 0
    lines = out.splitlines()
    assert lines[0].startswith("# ")
    rows = list(csv.DictReader(io.StringIO("\n".join(x for x in lines if not x.startswith("#")))))
    assert len(rows) == 16 and rows[0]["risk_rank"] == "1"
    assert float(rows[0]["impact_speed_mps_p50"]) > 0


def test_bad_input(tmp_path: Path, building_file: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text("{not json", "utf-8")
    code, _, err = _run(capsys, "assess", str(bad))
    assert code == 2 and "bad.json" in err
    assert _run(capsys, "assess", str(building_file), "--samples", "0")[0] == 2
    assert _run(capsys, "assess", str(building_file), "--format", "xml")[0] == 2


def test_exporters_directly() -> None:
    a = assess(_building(), samples=100, seed=2)
    d = assessment_to_dict(a)
    assert json.dumps(d) == json.dumps(assessment_to_dict(assess(_building(), samples=100, seed=2)))
    top = a.ranked("risk")[0]
    assert d["openings"][0]["id"] == top.id
    assert "life-threatening" in assessment_to_csv(a).splitlines()[len(d["cautions"])]
    table = assessment_to_table(a, by="risk", limit=3)
    assert "Ranked by risk score" in table and "13 more openings" in table


def test_table_percentages_add_up() -> None:
    shares = [0.004, 0.006, 0.005, 0.985]
    got = whole_percents(shares)
    assert sum(got) == 100 and all(abs(g - 100 * s) < 1 for g, s in zip(got, shares, strict=True))
    assert whole_percents([0.0, 0.0, 0.014, 0.986]) == [0, 0, 1, 99]
    assert sum(whole_percents([1 / 3, 1 / 3, 1 / 3, 0.0])) == 100


# --- regressions found by exercising the command as a user --------------------------------------


def test_missing_output_folder_is_refused_before_work_naming_the_file(
    building_file: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = tmp_path / "no-such-folder" / "a.json"
    assert main(["assess", str(building_file), "--format", "json", "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert str(out) in err and "does not exist" in err
    assert ".tmp" not in err and "Traceback" not in err  # never the hidden temporary file


def test_output_that_is_a_folder_is_refused(
    building_file: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    assert main(["assess", str(building_file), "-o", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert "is a folder" in err and ".tmp" not in err


@pytest.mark.parametrize("seed", ["-1", "-99999999999999999999999"])
def test_negative_seed_is_refused_without_a_traceback(
    building_file: Path, seed: str, capsys: pytest.CaptureFixture[str]
) -> None:
    assert main(["assess", str(building_file), "--samples", "50", "--seed", seed]) == 2
    err = capsys.readouterr().err
    assert "--seed" in err and "Traceback" not in err


def test_huge_seed_is_fine(building_file: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["assess", str(building_file), "--samples", "50",
                 "--seed", "99999999999999999999999"]) == 0
    assert "99999999999999999999999" in capsys.readouterr().out


def test_more_samples_than_one_assessment_takes_are_refused(
    building_file: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from petfall_audit.risk import MAX_SAMPLES

    assert main(["assess", str(building_file), "--samples", str(MAX_SAMPLES + 1)]) == 2
    assert f"at most {MAX_SAMPLES:,} simulated cats" in capsys.readouterr().err


def test_table_prose_fits_an_80_column_terminal() -> None:
    a = assess(_building(), samples=100, seed=1)
    table = assessment_to_table(a)
    prose = table.split("Other hazards:")[1] if "Other hazards:" in table else ""
    tail = table[table.index("Speed and drop are medians"):]
    assert prose.strip() and all(len(line) <= 80 for line in (prose + tail).splitlines())
    assert "veterinarian" in tail


def test_table_of_a_building_without_openings_says_so() -> None:
    empty = Building(info=BuildingInfo(name="Bare Hall"), floors=(Floor(0, "G", 0.0),),
                     facades=(Facade("south", 10.0),))
    table = assessment_to_table(assess(empty, samples=10, seed=1))
    assert "no openings recorded" in table and "Indicative model" in table
