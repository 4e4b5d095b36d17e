"""The Python side of lagfold's facade: scenarios and data frames in, files and data frames out."""

from __future__ import annotations

import io
import json
import os
import sys
from pathlib import Path
from typing import Any, Iterable, Mapping, Optional, Sequence, Union

import numpy as np
import pandas as pd

from . import _lagfold

__version__: str = _lagfold.__version__


ScenarioLike = Union[str, "os.PathLike[str]", Mapping[str, Any]]


# Every number must read back as the float the engine wrote: pandas before 3
# needs the round-trip parser for that; from 3 on it is the default.
_EXACT = {} if int(pd.__version__.split(".")[0]) >= 3 else {"float_precision": "round_trip"}


def _read_csv(data: bytes) -> pd.DataFrame:
    return pd.read_csv(io.BytesIO(data), **_EXACT)


class Outcome:
    """The files of one run (``files``: name to bytes) and its terminal summary (``text``)."""

    def __init__(self, files: Mapping[str, bytes], text: str) -> None:
        self.files: dict[str, bytes] = dict(files)
        self.text: str = text

    def _json(self, name: str) -> dict:
        return json.loads(self.files[name])

    def _table(self, name: str) -> Optional[pd.DataFrame]:
        return _read_csv(self.files[name]) if name in self.files else None

    @property
    def report_html(self) -> str:
        """The self-contained HTML report."""
        return self.files["report.html"].decode("utf-8")

    def write(self, folder: Union[str, "os.PathLike[str]"]) -> Path:
        """Writes every file into ``folder`` (created if needed), each under
        a temporary name renamed into place, and returns the folder."""
        out = Path(folder)
        out.mkdir(parents=True, exist_ok=True)
        for name, data in self.files.items():
            tmp = out / f".{name}.tmp-{os.getpid()}"
            tmp.write_bytes(data)
            os.replace(tmp, out / name)
        return out

    def __repr__(self) -> str:
        return f"<{type(self).__name__}: {', '.join(sorted(self.files))}>"

    def __str__(self) -> str:
        return self.text


class StudyResult(Outcome):
    """A study: ``summary`` (``summary.json``, or ``horizons.json`` for the
    horizon rules alone), ``curves``, ``choices``, ``holding`` and
    ``cost_sweep`` (data frames; ``holding`` is ``None`` without the
    portfolio layer, ``cost_sweep`` without several cost levels)."""

    @property
    def summary(self) -> dict:
        return self._json("summary.json" if "summary.json" in self.files else "horizons.json")

    @property
    def curves(self) -> pd.DataFrame:
        return self._table("curves.csv")

    @property
    def choices(self) -> pd.DataFrame:
        return self._table("choices.csv")

    @property
    def holding(self) -> Optional[pd.DataFrame]:
        return self._table("holding.csv")

    @property
    def cost_sweep(self) -> Optional[pd.DataFrame]:
        return self._table("cost_sweep.csv")


class PlanResult(Outcome):
    """A plan: ``summary`` (``plan.json``) and ``table`` (``plan.csv``)."""

    @property
    def summary(self) -> dict:
        return self._json("plan.json")

    @property
    def table(self) -> pd.DataFrame:
        return self._table("plan.csv")


class StressResult(Outcome):
    """A stress test: ``summary`` (``stress.json``) and ``table`` (``stress.csv``)."""

    @property
    def summary(self) -> dict:
        return self._json("stress.json")

    @property
    def table(self) -> pd.DataFrame:
        return self._table("stress.csv")


class Measurement(Outcome):
    """A measured panel: ``summary`` (``measure.json``), ``lags``
    (``measure_lags.csv``), ``per_date`` (``per_date.csv``), ``signals``
    and ``holdings`` (``None`` unless several signals or costs were given),
    and ``calibrated_toml`` (the scenario fitted to the panel, or ``None``)."""

    @property
    def summary(self) -> dict:
        return self._json("measure.json")

    @property
    def lags(self) -> pd.DataFrame:
        return self._table("measure_lags.csv")

    @property
    def per_date(self) -> pd.DataFrame:
        return self._table("per_date.csv")

    @property
    def signals(self) -> Optional[pd.DataFrame]:
        return self._table("signals.csv")

    @property
    def holdings(self) -> Optional[pd.DataFrame]:
        return self._table("holdings.csv")

    @property
    def calibrated_toml(self) -> Optional[str]:
        data = self.files.get("calibrated.toml")
        return data.decode("utf-8") if data is not None else None


def presets() -> list[str]:
    """The names of the built-in scenarios."""
    return list(_lagfold.presets())


def preset(name: str) -> str:
    """A built-in scenario's TOML text (raises ``ValueError`` for an unknown name)."""
    return _lagfold.preset_toml(name)


def _scenario(scenario: ScenarioLike) -> tuple[str, str]:
    """``(kind, text)``: a dict as JSON, TOML text, or a file path or preset name."""
    if isinstance(scenario, Mapping):
        return "json", json.dumps(scenario)
    if isinstance(scenario, os.PathLike):
        return "source", os.fspath(scenario)
    if isinstance(scenario, str):
        if "\n" in scenario and "=" in scenario and not os.path.exists(scenario):
            return "toml", scenario
        return "source", scenario
    raise TypeError(
        f"scenario: give a dict, TOML text, a file path or a preset name, not {type(scenario).__name__}"
    )


def _command(name: str, args: Mapping[str, Any]) -> str:
    given = ", ".join(f"{k}={v!r}" for k, v in args.items() if v is not None and not (isinstance(v, list) and not v))
    return f"lagfold.{name}({given}) in Python"


def study(
    scenario: ScenarioLike,
    *,
    assets: Optional[int] = None,
    history: Optional[int] = None,
    horizons: Optional[int] = None,
    paths: Optional[int] = None,
    seed: Optional[int] = None,
    target_vol: Optional[float] = None,
    cost_bps: Sequence[float] = (),
    threads: int = 0,
    more_history: bool = True,
    portfolio: bool = True,
    charts: bool = False,
) -> StudyResult:
    """Runs the study of a scenario (a dict, TOML text, a file or a preset
    name), as ``lagfold run``: the options override the scenario's keys; one
    ``cost_bps`` level replaces its cost, several add a cost table;
    ``threads=0`` uses every core (results do not depend on it).
    ``portfolio=False`` studies the horizon rules alone, without the books
    and their reference simulation, as ``lagfold run --horizons-only``."""
    kind, text = _scenario(scenario)
    args = dict(assets=assets, history=history, horizons=horizons, paths=paths, seed=seed,
                target_vol=target_vol, cost_bps=list(cost_bps))
    files, out = _lagfold.study(kind, text, threads=threads, more_history=more_history, portfolio=portfolio,
                                charts=charts, command=_command("study", {**args, "portfolio": portfolio}), **args)
    return StudyResult(files, out)


def plan(
    scenario: ScenarioLike,
    *,
    histories: Sequence[int] = (),
    target: str = "near-hit>=0.8",
    assets: Optional[int] = None,
    horizons: Optional[int] = None,
    paths: Optional[int] = None,
    seed: Optional[int] = None,
    target_vol: Optional[float] = None,
    cost_bps: Optional[float] = None,
    threads: int = 0,
    charts: bool = False,
) -> PlanResult:
    """How much history is needed, as ``lagfold plan``: every rule's record
    at each history length (default 0.5 to 3 times the scenario's) and the
    shortest that meets ``target`` (``[rule:]metric>=value`` or ``<=value``)."""
    kind, text = _scenario(scenario)
    args = dict(histories=list(histories), target=target, assets=assets, horizons=horizons, paths=paths,
                seed=seed, target_vol=target_vol, cost_bps=cost_bps)
    files, out = _lagfold.plan(kind, text, threads=threads, charts=charts, command=_command("plan", args), **args)
    return PlanResult(files, out)


def stress(
    scenario: ScenarioLike,
    *,
    assets: Optional[int] = None,
    history: Optional[int] = None,
    horizons: Optional[int] = None,
    seed: Optional[int] = None,
    target_vol: Optional[float] = None,
    cost_bps: Optional[float] = None,
    threads: int = 0,
    charts: bool = False,
) -> StressResult:
    """What a choice made under the assumed decay curve gives up when another
    curve is true, as ``lagfold stress``."""
    kind, text = _scenario(scenario)
    args = dict(assets=assets, history=history, horizons=horizons, seed=seed, target_vol=target_vol,
                cost_bps=cost_bps)
    files, out = _lagfold.stress(kind, text, threads=threads, charts=charts, command=_command("stress", args), **args)
    return StressResult(files, out)


def simulate_panel(
    scenario: ScenarioLike,
    *,
    path: int = 0,
    assets: Optional[int] = None,
    history: Optional[int] = None,
    seed: Optional[int] = None,
) -> pd.DataFrame:
    """One simulated history of the scenario (the study's path ``path``) as a
    long data frame ``date, asset, forecast, return``, as ``lagfold panel``."""
    kind, text = _scenario(scenario)
    data = _lagfold.simulate_panel(kind, text, path=path, assets=assets, history=history, seed=seed)
    return _read_csv(data)


def _text_values(values: Iterable[Any]) -> list[Optional[str]]:
    out: list[Optional[str]] = []
    for v in values:
        if v is None or (isinstance(v, float) and np.isnan(v)) or v is pd.NA or v is pd.NaT:
            out.append(None)
        elif isinstance(v, pd.Timestamp):
            out.append(_timestamp_text(v))
        else:
            out.append(str(v))
    return out


def _timestamp_text(t: pd.Timestamp) -> str:
    if t.tz is not None:
        t = t.tz_convert("UTC").tz_localize(None)
    if t == t.normalize():
        return t.strftime("%Y-%m-%d")
    return t.isoformat()


def _pandas_column(s: pd.Series) -> Any:
    if pd.api.types.is_bool_dtype(s.dtype):
        return _text_values(s.tolist())
    if pd.api.types.is_numeric_dtype(s.dtype):
        return s.to_numpy(dtype="float64", na_value=np.nan)
    if pd.api.types.is_datetime64_any_dtype(s.dtype):
        return [None if pd.isna(t) else _timestamp_text(t) for t in s]
    return _text_values(s.tolist())


def _polars_column(s: Any) -> Any:
    dtype = s.dtype
    if dtype.is_numeric():
        return s.cast(__import__("polars").Float64).fill_null(float("nan")).to_numpy()
    if dtype.is_temporal():
        return [None if t is None else _timestamp_text(pd.Timestamp(t)) for t in s.to_list()]
    return _text_values(s.to_list())


def _columns(data: Any, wanted: Optional[list[str]]) -> list[tuple[str, Any]]:
    """``(name, values)`` of the columns measured: numbers as float64 arrays
    (NaN missing), anything else as text (``None`` missing)."""
    if isinstance(data, pd.DataFrame):
        names = [str(c) for c in data.columns]
        pick = names if wanted is None else [n for n in wanted if n in names]
        return [(n, _pandas_column(data[n])) for n in pick]
    if "polars" in sys.modules and isinstance(data, sys.modules["polars"].DataFrame):
        names = list(data.columns)
        pick = names if wanted is None else [n for n in wanted if n in names]
        return [(n, _polars_column(data.get_column(n))) for n in pick]
    if isinstance(data, Mapping):
        names = [str(k) for k in data]
        pick = names if wanted is None else [n for n in wanted if n in names]
        return [(n, _pandas_column(pd.Series(np.asarray(data[n])))) for n in pick]
    raise TypeError(
        f"data: give a pandas or polars DataFrame, a dict of arrays, or a CSV/Parquet path, not {type(data).__name__}"
    )


def measure(
    data: Any,
    *,
    date: str = "date",
    asset: str = "asset",
    forecast: Union[str, Sequence[str], None] = None,
    ret: str = "return",
    every_signal: bool = False,
    blend: Optional[Mapping[str, float]] = None,
    group: Optional[str] = None,
    neutralize: Sequence[str] = (),
    backward_returns: bool = False,
    na: Optional[Sequence[str]] = None,
    horizons: Optional[int] = None,
    min_assets: int = 20,
    bootstrap: int = 1000,
    window: int = 12,
    seed: int = 1,
    cost_bps: Sequence[float] = (),
    study: bool = True,
    paths: Optional[int] = None,
    assets: Optional[int] = None,
    history: Optional[int] = None,
    target_vol: Optional[float] = None,
    threads: int = 0,
    charts: bool = False,
    name: str = "frame",
    max_bytes: Optional[int] = None,
) -> Measurement:
    """Measures your own panel, as ``lagfold measure``: lagged, rank and
    horizon ICs with their errors, each rule's best horizon with its
    bootstrap range, and (unless ``study=False``) the study on the scenario
    calibrated to it. ``data`` is a pandas or polars data frame, a dict of
    arrays, or a CSV/Parquet path; one row per date and asset, in any order,
    missing values as NaN/None/NA. The keyword arguments name the columns
    (``forecast`` one name or several; default ``forecast``)."""
    forecasts = [forecast] if isinstance(forecast, str) else list(forecast or [])
    weights = [f"{k}={float(v)!r}" for k, v in (blend or {}).items()]
    args = dict(date=date, asset=asset, forecasts=forecasts, ret=ret, every_signal=every_signal, blend=weights,
                group=group, neutralize=list(neutralize), backward_returns=backward_returns,
                na=None if na is None else list(na), horizons=horizons, min_assets=min_assets,
                bootstrap=bootstrap, window=window, seed=seed, cost_bps=list(cost_bps), study=study,
                paths=paths, assets=assets, history=history, target_vol=target_vol)
    command = _command("measure", args)
    if isinstance(data, (str, os.PathLike)):
        files, out = _lagfold.measure(path=os.fspath(data), threads=threads, charts=charts, command=command,
                                      max_bytes=max_bytes, **args)
        return Measurement(files, out)
    wanted: Optional[list[str]] = None
    if not every_signal:
        wanted = [date, asset, ret, *(forecasts or ([] if blend else ["forecast"]))]
        wanted += [k for k in (blend or {}) if k not in wanted]
        wanted += ([group] if group else []) + list(neutralize)
    columns = _columns(data, wanted)
    files, out = _lagfold.measure(columns=columns, name=name, threads=threads, charts=charts, command=command,
                                  max_bytes=max_bytes, **args)
    return Measurement(files, out)
