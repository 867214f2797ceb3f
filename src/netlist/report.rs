//! The cost report of a mapped netlist: cell counts, area, devices, depth,
//! delay, verification status and seconds per phase, as JSON (fields fixed
//! by docs/json-output.md) and as text for a terminal.

use super::{MappedNetlist, TimingReport, Verified};
use crate::library::Library;
use indexmap::IndexMap;
use std::fmt::Write;

/// Everything `ribbonmap map` reports. The JSON field names are a contract.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct Report {
    /// Design name.
    pub design: String,
    /// Library name.
    pub library: String,
    /// Mapping goal (`area`, `delay`, `balanced`).
    pub goal: String,
    /// Count of each cell used, in library order.
    pub cells: IndexMap<String, usize>,
    /// Number of cell instances (storage excluded).
    pub cell_count: usize,
    /// Total area (storage cells included), in the library's unit.
    pub area: f64,
    /// Most cells on any path.
    pub depth: u32,
    /// Latest arrival at an output, in the library's unit.
    pub delay: f64,
    /// Total devices of the cells.
    pub devices: u64,
    /// `proven`, `simulated` or `skipped`.
    pub verified: Verified,
    /// Seconds per phase.
    pub seconds: IndexMap<String, f64>,
    /// Storage elements.
    pub storage: usize,
    /// Units of area and delay.
    pub units: IndexMap<String, String>,
    /// Nets on the critical path, start first.
    pub critical_path: Vec<String>,
    /// The critical path stage by stage, start first (text report only).
    #[serde(skip)]
    pub critical_stages: Vec<Stage>,
}

/// One stage of the critical path: the cell driving a net, the net's load,
/// the stage's delay and the arrival at the net.
#[derive(Clone, Debug, PartialEq)]
pub struct Stage {
    /// Cell name, or `None` for the start point.
    pub cell: Option<String>,
    /// Net name.
    pub net: String,
    /// Load on the net, in input-pin load units of the library.
    pub load: f64,
    /// Arrival at the net minus arrival at the previous stage, in the
    /// library's delay unit.
    pub stage_delay: f64,
    /// Arrival at the net, in the library's delay unit.
    pub arrival: f64,
}

/// The stages of `timing`'s critical path in `nl`.
fn stages(nl: &MappedNetlist, timing: &TimingReport) -> Vec<Stage> {
    let mut previous = 0.0;
    timing
        .critical_path
        .iter()
        .map(|step| {
            let load = nl
                .nets
                .iter()
                .position(|n| n.name == step.net)
                .and_then(|i| timing.load.get(i).copied())
                .unwrap_or(0.0);
            let stage = Stage {
                cell: step.cell.clone(),
                net: step.net.clone(),
                load,
                stage_delay: step.arrival - previous,
                arrival: step.arrival,
            };
            previous = step.arrival;
            stage
        })
        .collect()
}

impl Report {
    /// Collects the report of `nl`.
    pub fn new(
        nl: &MappedNetlist,
        lib: &Library,
        goal: &str,
        timing: &TimingReport,
        verified: Verified,
        seconds: IndexMap<String, f64>,
    ) -> Report {
        let mut units = IndexMap::new();
        units.insert("area".to_string(), lib.units.area.clone());
        units.insert("delay".to_string(), lib.units.delay.clone());
        Report {
            design: nl.name.clone(),
            library: lib.name.clone(),
            goal: goal.to_string(),
            cells: nl.cell_counts(lib),
            cell_count: nl.instances.len(),
            area: nl.area(lib),
            depth: timing.depth,
            delay: timing.delay,
            devices: nl.devices(lib),
            verified,
            seconds,
            storage: nl.storage.len(),
            units,
            critical_path: timing
                .critical_path
                .iter()
                .map(|s| match &s.cell {
                    Some(c) => format!("{} ({c})", s.net),
                    None => s.net.clone(),
                })
                .collect(),
            critical_stages: stages(nl, timing),
        }
    }

    /// The report laid out for a terminal.
    pub fn to_text(&self) -> String {
        let mut s = String::new();
        let area_unit = self.units.get("area").map(String::as_str).unwrap_or("");
        let delay_unit = self.units.get("delay").map(String::as_str).unwrap_or("");
        let _ = writeln!(s, "design    {}", self.design);
        let _ = writeln!(s, "library   {}", self.library);
        let _ = writeln!(s, "goal      {}", self.goal);
        let _ = writeln!(s, "cells     {}", self.cell_count);
        let width = self.cells.keys().map(String::len).max().unwrap_or(0);
        for (name, n) in &self.cells {
            let _ = writeln!(s, "  {name:<width$}  {n:>8}");
        }
        if self.storage > 0 {
            let _ = writeln!(s, "storage   {}", self.storage);
        }
        let _ = writeln!(s, "area      {:.2} {area_unit}", self.area);
        let _ = writeln!(s, "devices   {}", self.devices);
        let _ = writeln!(s, "depth     {}", self.depth);
        let _ = writeln!(s, "delay     {:.3} {delay_unit}", self.delay);
        let _ = writeln!(s, "verified  {}", self.verified.name());
        let _ = writeln!(s, "seconds");
        for (phase, t) in &self.seconds {
            let _ = writeln!(s, "  {phase:<12} {t:>9.4}");
        }
        if !self.critical_stages.is_empty() {
            let _ = writeln!(s, "critical path, start first");
            let _ = writeln!(
                s,
                "  {:<10} {:<24} {:>16} {:>12} {:>12}",
                "cell",
                "net",
                "load (unit pins)",
                format!("stage {delay_unit}"),
                format!("arrival {delay_unit}")
            );
            for st in &self.critical_stages {
                let _ = writeln!(
                    s,
                    "  {:<10} {:<24} {:>16.3} {:>12.3} {:>12.3}",
                    st.cell.as_deref().unwrap_or("(input)"),
                    st.net,
                    st.load,
                    st.stage_delay,
                    st.arrival
                );
            }
        }
        s
    }
}
