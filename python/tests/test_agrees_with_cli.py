"""Every function of the module against the command line's files for the same
inputs and seed: byte for byte, and as parsed scalars and data frames."""

import json
import sys
import threading
import time
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import lagfold
from conftest import run_cli

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    tomllib = None

STUDY = ["--assets", "300", "--paths", "150", "--seed", "3"]


def same_files(py: lagfold.Outcome, folder: Path, names):
    for name in names:
        assert py.files[name] == (folder / name).read_bytes(), name


def test_study_matches_the_cli(cli, tmp_path):
    run_cli(cli, "run", "monthly-steady", *STUDY, "--cost-bps", "5,20", "--no-charts", "-q", "--out", str(tmp_path / "cli"))
    s = lagfold.study("monthly-steady", assets=300, paths=150, seed=3, cost_bps=[5, 20])
    same_files(s, tmp_path / "cli", ["summary.json", "curves.csv", "choices.csv", "holding.csv", "cost_sweep.csv"])
    assert s.summary == json.loads((tmp_path / "cli" / "summary.json").read_text())
    pd.testing.assert_frame_equal(s.curves, pd.read_csv(tmp_path / "cli" / "curves.csv"))
    assert list(s.choices.columns)[:2] == list(pd.read_csv(tmp_path / "cli" / "choices.csv").columns)[:2]
    assert "Recommendation" in s.text and s.report_html.startswith("<!DOCTYPE html>")


def test_the_horizon_rules_alone_match_the_cli_and_the_full_study(cli, tmp_path):
    run_cli(cli, "run", "monthly-steady", *STUDY, "--horizons-only", "-q", "--out", str(tmp_path / "cli"))
    h = lagfold.study("monthly-steady", assets=300, paths=150, seed=3, portfolio=False)
    same_files(h, tmp_path / "cli", ["horizons.json", "curves.csv", "choices.csv"])
    assert h.holding is None and "report.html" not in h.files
    full = lagfold.study("monthly-steady", assets=300, paths=150, seed=3, more_history=False)
    assert h.files["curves.csv"] == full.files["curves.csv"]
    for rule in ("peak", "formula", "fitted"):
        assert h.summary["study"]["rules"][rule] == full.summary["study"]["rules"][rule]
    with pytest.raises(ValueError, match="portfolio=False"):
        lagfold.study("monthly-steady", portfolio=False, cost_bps=[5])


def test_a_scenario_as_dict_or_toml_text_is_the_preset(tmp_path):
    if tomllib is None:
        pytest.skip("tomllib needs Python 3.11")
    text = lagfold.preset("monthly-steady")
    by_name = lagfold.study("monthly-steady", assets=300, paths=100, seed=5, more_history=False)
    by_dict = lagfold.study(tomllib.loads(text), assets=300, paths=100, seed=5, more_history=False)
    by_text = lagfold.study(text, assets=300, paths=100, seed=5, more_history=False)
    path = tmp_path / "scenario.toml"
    path.write_text(text)
    by_file = lagfold.study(path, assets=300, paths=100, seed=5, more_history=False)
    for other in (by_dict, by_text, by_file):
        assert other.files["summary.json"] == by_name.files["summary.json"]


def test_plan_matches_the_cli(cli, tmp_path):
    args = ["--assets", "200", "--paths", "100", "--seed", "2", "--histories", "60,120"]
    run_cli(cli, "plan", "monthly-steady", *args, "--no-charts", "-q", "--out", str(tmp_path / "cli"))
    p = lagfold.plan("monthly-steady", assets=200, paths=100, seed=2, histories=[60, 120])
    same_files(p, tmp_path / "cli", ["plan.json", "plan.csv"])
    assert p.summary == json.loads((tmp_path / "cli" / "plan.json").read_text())
    assert len(p.table) == len(pd.read_csv(tmp_path / "cli" / "plan.csv"))


def test_stress_matches_the_cli(cli, tmp_path):
    run_cli(cli, "stress", "monthly-steady", "--assets", "200", "--seed", "4", "--no-charts", "-q", "--out",
            str(tmp_path / "cli"))
    s = lagfold.stress("monthly-steady", assets=200, seed=4)
    same_files(s, tmp_path / "cli", ["stress.json", "stress.csv"])
    pd.testing.assert_frame_equal(s.table, pd.read_csv(tmp_path / "cli" / "stress.csv"))


def test_simulated_panel_is_the_cli_panel(cli, tmp_path):
    out = tmp_path / "panel.csv"
    run_cli(cli, "panel", "weekly-hump", "--assets", "50", "--history", "60", "--seed", "8", "--path", "3", "-q",
            "--out", str(out))
    frame = lagfold.simulate_panel("weekly-hump", assets=50, history=60, seed=8, path=3)
    pd.testing.assert_frame_equal(frame, lagfold._wrap._read_csv(out.read_bytes()))
    assert list(frame.columns) == ["date", "asset", "forecast", "return"]


@pytest.fixture(scope="module")
def messy_panel(tmp_path_factory, cli) -> Path:
    """A simulated panel with missing values (NA tokens, empty fields) and rows out of order."""
    folder = tmp_path_factory.mktemp("messy")
    clean = folder / "clean.csv"
    run_cli(cli, "panel", "monthly-steady", "--assets", "120", "--history", "90", "--seed", "11", "-q", "--out",
            str(clean))
    frame = pd.read_csv(clean, dtype={"forecast": str, "return": str})
    rng = np.random.default_rng(5)
    frame.loc[rng.choice(len(frame), 400, replace=False), "forecast"] = "NA"
    frame.loc[rng.choice(len(frame), 300, replace=False), "return"] = ""
    frame = frame.iloc[rng.permutation(len(frame))]
    path = folder / "messy.csv"
    frame.to_csv(path, index=False)
    return path


MEASURE = ["--paths", "60", "--bootstrap", "200", "--cost-bps", "10"]
MEASURED_FILES = ["measure.json", "measure_lags.csv", "per_date.csv", "holdings.csv", "calibrated.toml"]


def test_a_frame_with_missing_values_and_unsorted_rows_gives_the_cli_answer(cli, messy_panel, tmp_path):
    run_cli(cli, "measure", str(messy_panel), *MEASURE, "--no-charts", "-q", "--out", str(tmp_path / "cli"))
    frame = lagfold._wrap._read_csv(messy_panel.read_bytes())
    assert frame["forecast"].isna().sum() == 400 and not frame["date"].is_monotonic_increasing
    m = lagfold.measure(frame, paths=60, bootstrap=200, cost_bps=[10], name=str(messy_panel))
    same_files(m, tmp_path / "cli", MEASURED_FILES)
    assert m.summary == json.loads((tmp_path / "cli" / "measure.json").read_text())
    pd.testing.assert_frame_equal(m.lags, pd.read_csv(tmp_path / "cli" / "measure_lags.csv"))
    assert m.calibrated_toml == (tmp_path / "cli" / "calibrated.toml").read_text()
    # Dates as timestamps, assets as categories, a file path, a dict of arrays: the same figures.
    typed = frame.assign(date=pd.to_datetime(frame["date"]), asset=frame["asset"].astype("category"))
    by_types = lagfold.measure(typed, paths=60, bootstrap=200, cost_bps=[10], name=str(messy_panel))
    by_path = lagfold.measure(messy_panel, paths=60, bootstrap=200, cost_bps=[10])
    by_dict = lagfold.measure({c: frame[c].to_numpy() for c in frame.columns}, paths=60, bootstrap=200,
                              cost_bps=[10], name=str(messy_panel))
    for other in (by_types, by_path, by_dict):
        assert other.files["measure.json"] == m.files["measure.json"]


def test_named_columns_and_several_signals(cli, messy_panel, tmp_path):
    frame = lagfold._wrap._read_csv(messy_panel.read_bytes())
    frame = frame.rename(columns={"forecast": "alpha", "return": "fwd"})
    frame["slow"] = frame.groupby("asset")["alpha"].transform(lambda x: x.rolling(3, min_periods=1).mean())
    path = tmp_path / "renamed.csv"
    frame.to_csv(path, index=False)
    args = ["--forecast-column", "alpha,slow", "--return-column", "fwd", "--blend", "alpha=0.5,slow=0.5",
            "--no-study", "--bootstrap", "100"]
    run_cli(cli, "measure", str(path), *args, "--no-charts", "-q", "--out", str(tmp_path / "cli"))
    m = lagfold.measure(frame, forecast=["alpha", "slow"], ret="fwd", blend={"alpha": np.float64(0.5), "slow": 0.5},
                        study=False, bootstrap=100, name=str(path))
    same_files(m, tmp_path / "cli", ["measure.json", "signals.csv", "per_date.csv"])
    assert list(m.signals["signal"].unique()) == ["alpha", "slow", "blend"]


def test_polars_frames_are_read_like_pandas(messy_panel):
    pl = pytest.importorskip("polars")
    frame = lagfold._wrap._read_csv(messy_panel.read_bytes())
    m = lagfold.measure(frame, study=False, bootstrap=100, name="x.csv")
    as_polars = pl.DataFrame({c: frame[c].tolist() for c in frame.columns})
    p = lagfold.measure(as_polars, study=False, bootstrap=100, name="x.csv")
    assert p.files["measure.json"] == m.files["measure.json"]
    dated = as_polars.with_columns(pl.col("date").str.to_date())
    d = lagfold.measure(dated, study=False, bootstrap=100, name="x.csv")
    assert d.files["measure.json"] == m.files["measure.json"]


def stderr_message(done) -> str:
    return done.stderr.strip().removeprefix("lagfold: ")


def test_bad_input_raises_with_the_cli_message(cli, messy_panel, tmp_path):
    done = run_cli(cli, "run", "monthly-steady", "--assets", "5", "-q", "--out", str(tmp_path / "a"), expect=2)
    with pytest.raises(ValueError) as e:
        lagfold.study("monthly-steady", assets=5)
    assert str(e.value) == stderr_message(done)
    done = run_cli(cli, "measure", str(messy_panel), "--return-column", "ret", "-q", "--out", str(tmp_path / "b"),
                   expect=2)
    with pytest.raises(ValueError, match="no column `ret`"):
        lagfold.measure(lagfold._wrap._read_csv(messy_panel.read_bytes()), ret="ret")
    assert "no column `ret`" in done.stderr
    with pytest.raises(ValueError, match="decay.family"):
        lagfold.study({"assets": 1000, "history": 120, "horizons": 24, "decay": {"family": "nope"}})
    with pytest.raises(ValueError, match="min-assets"):
        lagfold.measure(lagfold._wrap._read_csv(messy_panel.read_bytes()), min_assets=1)
    empty = pd.DataFrame({"date": ["2024-01-31"] * 3, "asset": ["a", "b", "c"], "forecast": [1.0, 2.0, 3.0],
                          "return": [np.nan] * 3})
    with pytest.raises(ValueError):
        lagfold.measure(empty)
    with pytest.raises(ValueError, match="not a scenario file, nor a preset"):
        lagfold.study("no-such-preset")
    with pytest.raises(TypeError):
        lagfold.study(42)


def test_the_gil_is_released_while_computing():
    done = threading.Event()
    ticks = 0

    def work():
        lagfold.study("monthly-steady", assets=300, paths=300, seed=1, more_history=False, threads=1)
        done.set()

    t = threading.Thread(target=work)
    start = time.perf_counter()
    t.start()
    while not done.is_set():
        ticks += 1
        time.sleep(0.001)
    t.join()
    elapsed = time.perf_counter() - start
    # Holding the GIL would freeze this loop for the whole call; released, it
    # ticks about once a millisecond (at least a tenth of that on a busy machine).
    assert elapsed > 0.2 and ticks > 0.1 * elapsed * 1000, (ticks, elapsed)
