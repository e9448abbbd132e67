"""The command line: report formats, JSON keys in SI, 80-column text, compare, materials."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys

import numpy as np
import pytest

from roomcalc.cli import main

from conftest import EXAMPLES


def run(capsys, *argv):
    code = main(list(argv))
    out = capsys.readouterr()
    return code, out.out, out.err


def test_report_demo_text_fits_80_columns(capsys):
    code, out, err = run(capsys, "report", "--demo")
    assert code == 0 and not err
    assert "RT60 [s]" in out and "Room constant R" in out and "Critical dist." in out
    assert max(len(line) for line in out.splitlines()) <= 80


def test_report_json_keys_and_values(capsys, catalog):
    from roomcalc.engine.analysis import evaluate
    from roomcalc.io.roomfile import read_room

    code, out, _ = run(capsys, "report", str(EXAMPLES / "workshop.toml"), "--format", "json")
    assert code == 0
    d = json.loads(out)
    for key in ("bands_hz", "volume_m3", "surface_area_m2", "absorption_area_m2",
                "air_attenuation_db_per_m", "rt60_s", "room_constant_m2", "sources",
                "receivers", "warnings", "cautions"):
        assert key in d
    assert {"sabine", "eyring", "millington", "fitzroy", "arau_puchades"} <= set(d["rt60_s"])
    assert {"name", "directivity", "critical_distance_m"} <= set(d["sources"][0])
    assert {"name", "level_db", "level_dba", "direct_db", "reverberant_db"} <= set(d["receivers"][0])
    res = evaluate(read_room(EXAMPLES / "workshop.toml", catalog)[1])
    np.testing.assert_allclose(d["rt60_s"]["eyring"], res.rt60_s["eyring"])
    assert d["volume_m3"] == pytest.approx(12 * 8 * 4.5)
    assert d["cautions"], "a workshop at ~100 dB(A) must carry the hearing caution"


@pytest.mark.parametrize("fmt", ["markdown", "csv"])
def test_other_formats(capsys, fmt):
    code, out, _ = run(capsys, "report", "--demo", "--format", fmt)
    assert code == 0
    assert ("| RT60 [s]" in out) if fmt == "markdown" else out.startswith("quantity,item,unit,125")


def test_method_and_reverberant_options(capsys):
    code, out, _ = run(capsys, "report", "--demo", "--method", "eyring", "--reverberant",
                       "barron-lee", "--format", "json")
    d = json.loads(out)
    assert d["method"] == "eyring" and d["reverberant_model"] == "barron-lee"
    # The demo's own recommendation is kept beside the formula in force.
    assert d["recommended"] in ("sabine", "eyring", "millington", "fitzroy", "arau_puchades")


def test_imperial_file_gives_the_same_si_numbers(tmp_path, capsys):
    ft = 0.3048
    metric = f"""version = 1
units = "metric"
[air]
temperature = 25.0
[shape]
length = {20 * ft}
width = {15 * ft}
height = {10 * ft}
[[surfaces]]
name = "all"
area = {1300 * ft * ft}
alpha = [0.1, 0.15, 0.2, 0.25, 0.3, 0.3]
[[objects]]
name = "sofa"
absorption = [{1 * ft * ft}, {2 * ft * ft}, {3 * ft * ft}, {4 * ft * ft}, {4 * ft * ft}, {4 * ft * ft}]
[[sources]]
name = "s"
sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]
position = [{2 * ft}, {2 * ft}, {3 * ft}]
[[receivers]]
name = "r"
distances = {{ "s" = {12 * ft} }}
"""
    imperial = """version = 1
units = "imperial"
[air]
temperature = 77.0
[shape]
length = 20.0
width = 15.0
height = 10.0
[[surfaces]]
name = "all"
area = 1300.0
alpha = [0.1, 0.15, 0.2, 0.25, 0.3, 0.3]
[[objects]]
name = "sofa"
absorption = [1.0, 2.0, 3.0, 4.0, 4.0, 4.0]
[[sources]]
name = "s"
sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]
position = [2.0, 2.0, 3.0]
[[receivers]]
name = "r"
distances = { "s" = 12.0 }
"""
    (tmp_path / "m.toml").write_text(metric)
    (tmp_path / "i.toml").write_text(imperial)
    _, a, _ = run(capsys, "report", str(tmp_path / "m.toml"), "--format", "json")
    _, b, _ = run(capsys, "report", str(tmp_path / "i.toml"), "--format", "json")
    da, db = json.loads(a), json.loads(b)
    for key in ("volume_m3", "surface_area_m2"):
        assert da[key] == pytest.approx(db[key], rel=1e-12)
    for key in ("absorption_area_m2", "room_constant_m2"):
        np.testing.assert_allclose(da[key], db[key], rtol=1e-12)
    np.testing.assert_allclose(da["rt60_s"]["sabine"], db["rt60_s"]["sabine"], rtol=1e-12)
    np.testing.assert_allclose(da["receivers"][0]["level_db"], db["receivers"][0]["level_db"])
    # The text report of the imperial room speaks feet.
    _, t, _ = run(capsys, "report", str(tmp_path / "i.toml"))
    assert "ft^3" in t and "77.0 degF" in t


def test_compare_demo_and_workshop_note(capsys):
    code, out, _ = run(capsys, "compare", "--demo")
    assert code == 0 and "Before:" in out and "change" in out
    code, out, _ = run(capsys, "compare", str(EXAMPLES / "workshop.toml"),
                       str(EXAMPLES / "workshop-treated.toml"), "--format", "json")
    d = json.loads(out)
    saw = next(r for r in d["receivers"] if r["name"] == "Saw operator")
    assert saw["inside_critical_distance_of"] == "Table saw"
    # The operator gains far less than the reverberant field loses.
    assert abs(saw["level_change_dba"]) < abs(saw["reverberant_change_dba"])
    assert any("inside its critical distance" in n for n in d["notes"])


def test_materials_search(capsys):
    code, out, _ = run(capsys, "materials", "mineral", "wool", "--format", "json")
    mats = json.loads(out)
    assert code == 0 and mats and all("mineral" in (m["id"] + m["name"] + m["notes"]).lower()
                                      and "wool" in (m["id"] + m["name"] + m["notes"]).lower()
                                      for m in mats)
    wool = next(m for m in mats if m["id"] == "mineral-wool-50mm-16kg")
    assert wool["nrc"] == pytest.approx(0.80)
    code, out, _ = run(capsys, "materials", "--category", "seats", "--kind", "object")
    assert "person-seated" in out and "absorption per unit" in out


def test_usage_errors(capsys):
    assert run(capsys, "report")[0] == 2
    assert run(capsys, "compare", "a.toml")[0] == 2
    code, out, err = run(capsys, "report", "nonexistent.toml")
    assert code == 2 and "nonexistent.toml: no such file" in err and not out


def test_method_unavailable_is_a_clear_error(tmp_path, capsys):
    f = tmp_path / "vol.toml"
    f.write_text('version = 1\n[shape]\nvolume = 100.0\n[[surfaces]]\nname = "all"\n'
                 'area = 130.0\nalpha = [0.1, 0.1, 0.1, 0.1, 0.1, 0.1]\n')
    code, out, err = run(capsys, "report", str(f), "--method", "fitzroy")
    assert code == 2 and "Fitzroy is unavailable" in err and "Traceback" not in err


@pytest.mark.skipif(shutil.which("roomcalc") is None, reason="console script not installed")
def test_console_script():
    out = subprocess.run(["roomcalc", "report", "--demo"], capture_output=True, text=True)
    assert out.returncode == 0 and "RT60" in out.stdout


def test_python_m():
    out = subprocess.run([sys.executable, "-m", "roomcalc", "check", "--demo"],
                         capture_output=True, text=True)
    assert out.returncode == 0 and "ok" in out.stdout


def test_interface_needs_a_terminal():
    # Under pytest stdin is not a terminal: the interface says so instead of drawing garbage.
    out = subprocess.run([sys.executable, "-m", "roomcalc"], capture_output=True, text=True,
                         stdin=subprocess.DEVNULL)
    assert out.returncode == 2 and "needs a terminal" in out.stderr
    assert "Traceback" not in out.stderr


def test_check_json_gives_the_formula_or_every_problem(tmp_path, capsys):
    from conftest import EXAMPLES

    code = main(["check", str(EXAMPLES / "workshop.toml"), "--format", "json"])
    d = json.loads(capsys.readouterr().out)
    assert code == 0 and d["ok"] and d["method"] == "eyring" and d["method_reason"]
    assert d["counts"]["surfaces"] == 8 and d["target"]["method"] == "eyring"
    bad = tmp_path / "bad.toml"
    bad.write_text((EXAMPLES / "workshop.toml").read_text(encoding="utf-8")
                   .replace("length = 12.0", "length = -12.0"), encoding="utf-8")
    code = main(["check", str(bad), "--format", "json"])
    d = json.loads(capsys.readouterr().out)
    assert code == 2 and not d["ok"]
    assert [p["field"] for p in d["problems"]] == ["shape.length"]
