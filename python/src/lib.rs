//! `lagfold._lagfold`: the facade ([`lagfold::api`]) for Python. Each
//! function runs one operation with the GIL released and returns the very
//! files the command line writes (`name → bytes`) and its terminal summary;
//! the Python package (`lagfold/__init__.py`) turns them into dictionaries
//! and data frames. Bad input raises `ValueError`, anything else
//! `RuntimeError`, with the command line's messages.

use lagfold::api::{self, Column, Outcome, Overrides, PanelSource, Scenario, Silent};
use lagfold::report::Made;
use numpy::PyReadonlyArray1;
use pyo3::exceptions::{PyRuntimeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::{PyBytes, PyDict};
use std::path::PathBuf;

/// The command line's error, as a Python exception.
fn raise(e: api::Error) -> PyErr {
    match e {
        api::Error::Input(m) => PyValueError::new_err(m),
        api::Error::Failure(m) => PyRuntimeError::new_err(m),
    }
}

/// A scenario given as `("json", text)`, `("toml", text)` or `("source", a
/// file path or preset name)`, with its origin for messages.
fn scenario(kind: &str, text: &str, ov: &Overrides) -> Result<(Scenario, String), api::Error> {
    match kind {
        "json" => Ok((api::scenario_from_json(text, "scenario dict", ov)?, "scenario dict".into())),
        "toml" => Ok((api::scenario_from_toml(text, "scenario text", ov)?, "scenario text".into())),
        "source" => api::load_scenario(&PathBuf::from(text), ov),
        other => Err(api::Error::Input(format!("scenario kind {other:?}: use json, toml or source"))),
    }
}

/// Runs `work` with the GIL released and hands back its outcome's files (a
/// `dict` of `bytes`, charts when `charts`, the report made by `command`)
/// and terminal text.
fn run<'py, O: Outcome>(
    py: Python<'py>,
    charts: bool,
    command: String,
    work: impl FnOnce() -> Result<O, api::Error> + Send,
) -> PyResult<(Bound<'py, PyDict>, String)> {
    let (files, text) = py
        .detach(|| {
            let outcome = work()?;
            Ok((outcome.files(charts, &Made::now_by(command))?, outcome.terminal()))
        })
        .map_err(raise)?;
    let d = PyDict::new(py);
    for (name, bytes) in files {
        d.set_item(name, PyBytes::new(py, &bytes))?;
    }
    Ok((d, text))
}

/// Runs a study (of the horizon rules alone unless `portfolio`).
#[pyfunction]
#[pyo3(signature = (kind, text, *, assets=None, history=None, horizons=None, paths=None, seed=None,
    target_vol=None, cost_bps=Vec::new(), threads=0, more_history=true, portfolio=true, charts=false,
    command=String::new()))]
#[allow(clippy::too_many_arguments)]
fn study<'py>(
    py: Python<'py>,
    kind: &str,
    text: &str,
    assets: Option<usize>,
    history: Option<usize>,
    horizons: Option<usize>,
    paths: Option<usize>,
    seed: Option<u64>,
    target_vol: Option<f64>,
    cost_bps: Vec<f64>,
    threads: usize,
    more_history: bool,
    portfolio: bool,
    charts: bool,
    command: String,
) -> PyResult<(Bound<'py, PyDict>, String)> {
    let ov = Overrides { assets, history, horizons, paths, seed, target_vol, ..Default::default() };
    if !portfolio {
        if !cost_bps.is_empty() || target_vol.is_some() {
            return Err(PyValueError::new_err(
                "cost_bps and target_vol price the books, which portfolio=False skips; drop one or the other",
            ));
        }
        return run(py, charts, command, || {
            let (s, origin) = scenario(kind, text, &ov)?;
            api::study_horizons(&s, &origin, threads, &Silent)
        });
    }
    run(py, charts, command, || {
        let (s, origin) = scenario(kind, text, &ov)?;
        api::study(&s, &origin, &api::StudyOptions { threads, cost_bps, more_history }, &Silent)
    })
}

/// Runs a plan.
#[pyfunction]
#[pyo3(signature = (kind, text, *, histories=Vec::new(), target="near-hit>=0.8", assets=None, horizons=None,
    paths=None, seed=None, target_vol=None, cost_bps=None, threads=0, charts=false, command=String::new()))]
#[allow(clippy::too_many_arguments)]
fn plan<'py>(
    py: Python<'py>,
    kind: &str,
    text: &str,
    histories: Vec<usize>,
    target: &str,
    assets: Option<usize>,
    horizons: Option<usize>,
    paths: Option<usize>,
    seed: Option<u64>,
    target_vol: Option<f64>,
    cost_bps: Option<f64>,
    threads: usize,
    charts: bool,
    command: String,
) -> PyResult<(Bound<'py, PyDict>, String)> {
    let goal = lagfold::plan::Goal::parse(target).map_err(|e| PyValueError::new_err(format!("target: {e}")))?;
    let ov = Overrides { assets, horizons, paths, seed, target_vol, ..Default::default() };
    run(py, charts, command, || {
        let (s, origin) = scenario(kind, text, &ov)?;
        api::plan(&s, &origin, &api::PlanOptions { histories, goal, cost_bps, threads }, &Silent)
    })
}

/// Runs a stress test.
#[pyfunction]
#[pyo3(signature = (kind, text, *, assets=None, history=None, horizons=None, seed=None, target_vol=None,
    cost_bps=None, threads=0, charts=false, command=String::new()))]
#[allow(clippy::too_many_arguments)]
fn stress<'py>(
    py: Python<'py>,
    kind: &str,
    text: &str,
    assets: Option<usize>,
    history: Option<usize>,
    horizons: Option<usize>,
    seed: Option<u64>,
    target_vol: Option<f64>,
    cost_bps: Option<f64>,
    threads: usize,
    charts: bool,
    command: String,
) -> PyResult<(Bound<'py, PyDict>, String)> {
    let ov = Overrides { assets, history, horizons, seed, target_vol, ..Default::default() };
    run(py, charts, command, || {
        let (s, origin) = scenario(kind, text, &ov)?;
        api::stress(&s, &origin, &api::StressOptions { cost_bps, threads }, &Silent)
    })
}

/// One simulated history as the CSV `lagfold panel` writes.
#[pyfunction]
#[pyo3(signature = (kind, text, *, path=0, assets=None, history=None, seed=None))]
fn simulate_panel<'py>(
    py: Python<'py>,
    kind: &str,
    text: &str,
    path: u64,
    assets: Option<usize>,
    history: Option<usize>,
    seed: Option<u64>,
) -> PyResult<Bound<'py, PyBytes>> {
    let ov = Overrides { assets, history, seed, ..Default::default() };
    let csv = py
        .detach(|| {
            let (s, origin) = scenario(kind, text, &ov)?;
            let sim = api::simulate_panel(&s, &origin, path)?;
            let mut out = Vec::new();
            sim.write_csv(&mut out).map_err(|e| api::Error::Failure(e.to_string()))?;
            Ok(out)
        })
        .map_err(raise)?;
    Ok(PyBytes::new(py, &csv))
}

/// A column from Python: a float64 numpy array, or a sequence of `str` or `None`.
fn column(values: &Bound<'_, PyAny>) -> PyResult<Column> {
    if let Ok(a) = values.extract::<PyReadonlyArray1<'_, f64>>() {
        return Ok(Column::Numbers(a.as_array().to_vec()));
    }
    Ok(Column::Text(values.extract::<Vec<Option<String>>>()?))
}

/// Measures a panel: a file (`path`) or named columns (`columns`).
#[pyfunction]
#[pyo3(signature = (*, path=None, columns=None, name="frame".to_string(), date="date".to_string(),
    asset="asset".to_string(), forecasts=Vec::new(), ret="return".to_string(), every_signal=false,
    blend=Vec::new(), group=None, neutralize=Vec::new(), backward_returns=false, na=None, horizons=None,
    min_assets=20, bootstrap=1000, window=12, seed=1, cost_bps=Vec::new(), study=true, paths=None,
    assets=None, history=None, target_vol=None, max_bytes=None, threads=0, charts=false,
    command=String::new()))]
#[allow(clippy::too_many_arguments)]
fn measure<'py>(
    py: Python<'py>,
    path: Option<PathBuf>,
    columns: Option<Vec<(String, Bound<'py, PyAny>)>>,
    name: String,
    date: String,
    asset: String,
    forecasts: Vec<String>,
    ret: String,
    every_signal: bool,
    blend: Vec<String>,
    group: Option<String>,
    neutralize: Vec<String>,
    backward_returns: bool,
    na: Option<Vec<String>>,
    horizons: Option<usize>,
    min_assets: usize,
    bootstrap: usize,
    window: usize,
    seed: u64,
    cost_bps: Vec<f64>,
    study: bool,
    paths: Option<usize>,
    assets: Option<usize>,
    history: Option<usize>,
    target_vol: Option<f64>,
    max_bytes: Option<u64>,
    threads: usize,
    charts: bool,
    command: String,
) -> PyResult<(Bound<'py, PyDict>, String)> {
    let source = match (path, columns) {
        (Some(p), None) => PanelSource::File(p),
        (None, Some(cols)) => {
            let cols = cols.iter().map(|(n, v)| Ok((n.clone(), column(v)?))).collect::<PyResult<Vec<_>>>()?;
            PanelSource::Columns(name, cols)
        }
        _ => return Err(PyValueError::new_err("give either a path or columns")),
    };
    let blend = if blend.is_empty() {
        Vec::new()
    } else {
        lagfold::own_data::parse_blend(&blend).map_err(PyValueError::new_err)?
    };
    let read = api::ReadOptions {
        date,
        asset,
        forecasts,
        ret,
        backward: backward_returns,
        max_bytes: max_bytes.unwrap_or_else(lagfold::reader::default_max_bytes),
        na: na.unwrap_or_else(|| lagfold::reader::DEFAULT_NA.iter().map(|s| s.to_string()).collect()),
        group,
        exposures: neutralize,
    };
    let o = api::MeasureOptions {
        read,
        every_signal,
        blend,
        horizons,
        min_assets,
        bootstrap,
        window,
        seed,
        cost_bps,
        study,
        paths,
        assets,
        history,
        target_vol,
        threads,
    };
    run(py, charts, command, || api::measure(source, &o, &Silent))
}

/// The names of the built-in presets.
#[pyfunction]
fn presets() -> Vec<String> {
    lagfold::scenario::presets::ALL.iter().map(|(n, _)| n.to_string()).collect()
}

/// A preset's TOML text.
#[pyfunction]
fn preset_toml(name: &str) -> PyResult<String> {
    lagfold::scenario::presets::text(name).map(str::to_string).map_err(|e| PyValueError::new_err(e.to_string()))
}

/// The extension module.
#[pymodule]
fn _lagfold(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(study, m)?)?;
    m.add_function(wrap_pyfunction!(plan, m)?)?;
    m.add_function(wrap_pyfunction!(stress, m)?)?;
    m.add_function(wrap_pyfunction!(simulate_panel, m)?)?;
    m.add_function(wrap_pyfunction!(measure, m)?)?;
    m.add_function(wrap_pyfunction!(presets, m)?)?;
    m.add_function(wrap_pyfunction!(preset_toml, m)?)?;
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    Ok(())
}
