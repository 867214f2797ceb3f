//! `ribbonmap characterize`: read a device kit, derive every cell's figures
//! from its conductance tables, write the library (and optionally the HTML
//! report), and print a summary with units.

use super::common::ReportFormat;
use super::{CliError, CmdResult, EXIT_OK};
use crate::device::{characterize, read_kit, Characterization};
use std::path::{Path, PathBuf};

/// Arguments of `ribbonmap characterize`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// The device kit (`ribbonmap-devices/1` JSON).
    pub kit: PathBuf,
    /// Write the library here (`ribbonmap-library/1` JSON).
    #[arg(short = 'o', long = "output", value_name = "LIB.json")]
    pub output: PathBuf,
    /// Also write a self-contained HTML report (heat maps, transfer curves,
    /// figures).
    #[arg(long, value_name = "OUT.html")]
    pub report: Option<PathBuf>,
    /// Summary format.
    #[arg(long, value_enum, default_value = "text")]
    pub format: ReportFormat,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let kit = read_kit(&args.kit)?;
    let ch = characterize(kit)?;
    let dir = match args.output.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let text = crate::device::library_write::library_text(&ch, &dir);
    // The written library must load; it fails when the kit's cells cannot
    // form a usable library (such as a set that is not functionally
    // complete), which is a property of the kit.
    crate::library::Library::from_json_str(&text, &args.output.display().to_string()).map_err(
        |e| {
            CliError::Input(format!(
                "{}: the kit does not make a valid library: {}",
                args.kit.display(),
                e.lines().first().cloned().unwrap_or_default()
            ))
        },
    )?;
    write(&args.output, &text)?;
    if let Some(report) = &args.report {
        let html = crate::device::report::report_html(&ch);
        write(report, &html)?;
    }
    match args.format {
        ReportFormat::Json => {
            let value = summary_json(&ch, &args.output);
            let text = serde_json::to_string_pretty(&value)
                .map_err(|e| CliError::Internal(format!("cannot encode the summary: {e}")))?;
            outln!("{text}");
        }
        ReportFormat::Text => out!("{}", summary_text(&ch, &args.output)),
    }
    Ok(EXIT_OK)
}

fn write(path: &Path, text: &str) -> Result<(), CliError> {
    crate::fsutil::write_atomic(path, text.as_bytes())
        .map_err(|e| CliError::Input(format!("{}: cannot write: {e}", path.display())))
}

fn mean_power_nw(ch: &Characterization, cell: &crate::device::CellCharacter) -> f64 {
    let vdd = ch.kit.supply_v;
    cell.rows.iter().map(|r| r.power_w(vdd)).sum::<f64>() / cell.rows.len() as f64 * 1e9
}

fn summary_text(ch: &Characterization, output: &Path) -> String {
    let mut s = format!(
        "library   {} ({}) -> {}\nsupply    {} V, logic inputs {} V / {} V, unit load {} aF\n\n",
        ch.kit.name,
        super::common::counted(ch.cells.len() as u64, "cell"),
        output.display(),
        ch.kit.supply_v,
        ch.kit.logic_low_v,
        ch.kit.logic_high_v,
        ch.kit.gate_capacitance_af
    );
    s.push_str(&format!(
        "{:<10} {:>6} {:>7} {:>7} {:>7} {:>7} {:>7} {:>7} {:>5} {:>7} {:>7} {:>8} {:>8} {:>9} {:>9}\n",
        "cell", "truth", "VOL mV", "VOH mV", "VIL mV", "VIH mV", "NML mV", "NMH mV", "rest", "on/off u", "on/off d",
        "t0 ps", "ps/load", "static nW", "toggle aJ"
    ));
    for c in &ch.cells {
        s.push_str(&format!(
            "{:<10} {:>6} {:>7.2} {:>7.2} {:>7.2} {:>7.2} {:>7.2} {:>7.2} {:>5} {:>7.1} {:>7.1} {:>8.3} {:>8.3} {:>9.3} {:>9.3}\n",
            c.kit_cell.name,
            format!("0x{:X}", c.truth),
            c.vol * 1e3,
            c.voh * 1e3,
            c.vil * 1e3,
            c.vih * 1e3,
            c.nml * 1e3,
            c.nmh * 1e3,
            if c.restoring { "yes" } else { "NO" },
            c.pull_up_on_off,
            c.pull_down_on_off,
            c.intrinsic_ps,
            c.per_load_ps,
            mean_power_nw(ch, c),
            c.switch_energy_aj
        ));
    }
    let total: f64 = ch.cells.iter().map(|c| mean_power_nw(ch, c)).sum();
    s.push_str(&format!(
        "\nstatic power is the mean over input rows of Vdd · I (both ribbons always conduct a little); \
         sum over one of each cell: {total:.3} nW\n"
    ));
    let weak: Vec<&str> = ch
        .cells
        .iter()
        .filter(|c| !c.restoring)
        .map(|c| c.kit_cell.name.as_str())
        .collect();
    if !weak.is_empty() {
        s.push_str(&format!(
            "not restoring (gain below 1, VIL = VIH = VM): {}\n",
            weak.join(", ")
        ));
    }
    s
}

fn summary_json(ch: &Characterization, output: &Path) -> serde_json::Value {
    let cells: Vec<serde_json::Value> = ch
        .cells
        .iter()
        .map(|c| {
            serde_json::json!({
                "name": c.kit_cell.name,
                "truth": format!("0x{:X}", c.truth),
                "vol_v": c.vol, "voh_v": c.voh, "vil_v": c.vil, "vih_v": c.vih, "vm_v": c.vm,
                "nml_v": c.nml, "nmh_v": c.nmh, "restoring": c.restoring,
                "pull_up_on_off": c.pull_up_on_off, "pull_down_on_off": c.pull_down_on_off,
                "intrinsic_delay_ps": c.intrinsic_ps, "delay_per_load_ps": c.per_load_ps,
                "step_intrinsic_delay_ps": c.step_intrinsic_ps, "step_delay_per_load_ps": c.step_per_load_ps,
                "static_power_nw": mean_power_nw(ch, c),
                "switch_energy_aj": c.switch_energy_aj,
            })
        })
        .collect();
    serde_json::json!({
        "library": output.display().to_string(),
        "name": ch.kit.name,
        "supply_v": ch.kit.supply_v,
        "cells": cells,
        "units": {"voltage": "V", "delay": "ps", "power": "nW", "energy": "aJ"},
    })
}
