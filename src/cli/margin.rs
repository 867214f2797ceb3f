//! `map --min-margin`: margin-aware mapping on a characterised library
//! (module [`crate::device::margin`]) and its part of the map report.

use super::spice::load_library_models;
use super::CliError;
use crate::device::levels::{LevelModel, LevelOptions};
use crate::device::margin::{self, MarginOutcome};
use crate::library::Library;
use crate::mapper::MapOptions;
use crate::network::Network;
use std::fmt::Write;

/// Failing nets named in a message, at most.
const NETS_NAMED: usize = 10;

/// Maps `net` onto `lib` (loaded from `lib_spec`) so that every net keeps
/// `min_margin_mv` millivolts, with `levels`' default patterns.
pub fn map_with_margin(
    net: &Network,
    lib: &Library,
    lib_spec: &str,
    options: &MapOptions,
    min_margin_mv: f64,
) -> Result<MarginOutcome, CliError> {
    if !min_margin_mv.is_finite() {
        return Err(CliError::Input(format!(
            "--min-margin {min_margin_mv}: expected a number of millivolts"
        )));
    }
    let (models, data) = load_library_models(lib, lib_spec)?;
    let model = LevelModel::new(lib, &models, &data);
    margin::map_with_margin(
        net,
        lib,
        &model,
        &data,
        options,
        min_margin_mv / 1e3,
        &LevelOptions::default(),
    )
    .map_err(|e| CliError::Input(e.to_string()))
}

/// The first failing nets, comma-separated, with a count of the rest.
pub fn list(nets: &[String]) -> String {
    let mut s = nets
        .iter()
        .take(NETS_NAMED)
        .cloned()
        .collect::<Vec<_>>()
        .join(", ");
    if nets.len() > NETS_NAMED {
        let _ = write!(s, " and {} more", nets.len() - NETS_NAMED);
    }
    s
}

/// The report lines of margin-aware mapping; every figure names its unit.
pub fn text(m: &MarginOutcome, lib: &Library) -> String {
    let mut t = String::new();
    let required = m.min_margin_v * 1e3;
    let left: Vec<String> = m
        .left_out
        .iter()
        .map(|l| {
            format!(
                "{} ({}, own margin {:.1} mV)",
                l.cell,
                l.reason.replace('_', " "),
                l.own_margin_mv
            )
        })
        .collect();
    let _ = writeln!(
        t,
        "margin    required {required} mV: {}",
        if m.holds { "holds" } else { "FAILS" }
    );
    let _ = writeln!(
        t,
        "left out  {}",
        if left.is_empty() {
            "none".to_string()
        } else {
            left.join(", ")
        }
    );
    let stage = m.restorer.as_ref().map_or("none", |r| r.name.as_str());
    let _ = writeln!(
        t,
        "restoring {} ({} of {stage}), area +{:.4} {}, delay {:.4} -> {:.4} {}, static {:.3} -> {:.3} nW",
        super::common::counted(m.restoring_cells as u64, "cell"),
        super::common::counted(m.restored_nets.len() as u64, "stage"),
        m.restoring_area,
        lib.units.area,
        m.delay_before,
        m.delay_after,
        lib.units.delay,
        m.static_before_nw,
        m.static_after_nw
    );
    let mv = |v: Option<f64>| v.map_or("n/a".to_string(), |v| format!("{:.3} mV", v * 1e3));
    let _ = writeln!(
        t,
        "worst     {} before restoring, {} reached ({}, {} of level analysis)",
        mv(m.worst_before_v),
        mv(m.levels.worst_margin_v()),
        super::common::counted(m.covers as u64, "cover"),
        super::common::counted(m.rounds as u64, "round")
    );
    if !m.holds {
        let _ = writeln!(t, "failing   {}", list(&m.failing_nets));
    }
    t
}

/// The JSON object `margin` of the map report.
pub fn json(m: &MarginOutcome, lib: &Library) -> serde_json::Value {
    m.summary_json(lib)
}
