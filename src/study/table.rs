//! Side-by-side comparison tables of study records.
//!
//! [`ComparisonTable::build`] groups records by benchmark and goal, orders
//! libraries by first appearance (or puts a chosen baseline first), and
//! computes each metric's ratio to the baseline library of the same
//! benchmark and goal, plus a geometric mean of the ratios per library. The
//! `render_*` functions print the same table as aligned text, Markdown, CSV,
//! JSON or a LaTeX booktabs tabular; the chart module draws its ratios.

use super::record::StudyRecord;
use super::units::{six_significant, TableUnits};
use serde_json::json;

/// A metric that has a ratio to the baseline.
#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum Metric {
    /// Number of cell instances.
    Cells,
    /// Number of devices.
    Devices,
    /// Total area.
    Area,
    /// Cells on the longest path.
    Depth,
    /// Longest path delay.
    Delay,
    /// Energy per operation.
    Energy,
}

impl Metric {
    /// Every metric, in table order.
    pub const ALL: [Metric; 6] = [
        Metric::Cells,
        Metric::Devices,
        Metric::Area,
        Metric::Depth,
        Metric::Delay,
        Metric::Energy,
    ];

    /// Short name used in headers and JSON keys.
    pub fn name(self) -> &'static str {
        match self {
            Metric::Cells => "cells",
            Metric::Devices => "devices",
            Metric::Area => "area",
            Metric::Depth => "depth",
            Metric::Delay => "delay",
            Metric::Energy => "energy",
        }
    }

    /// The metric's value in a record.
    pub fn value(self, r: &StudyRecord) -> f64 {
        match self {
            Metric::Cells => r.cell_count as f64,
            Metric::Devices => r.devices as f64,
            Metric::Area => r.area,
            Metric::Depth => r.depth as f64,
            Metric::Delay => r.delay,
            Metric::Energy => r.energy_per_op,
        }
    }

    /// The metric's value as `units` shows it: normalised when asked,
    /// `None` when the record's library does not model it.
    pub fn shown(self, r: &StudyRecord, units: &TableUnits) -> Option<f64> {
        match self {
            Metric::Area => units.area(r),
            Metric::Delay => units.delay(r),
            Metric::Energy => units.energy(r),
            _ => Some(self.value(r)),
        }
    }

    /// Unit label of the metric in `units` (counts have none).
    pub fn unit(self, units: &TableUnits) -> Option<String> {
        let known = |u: &str| (!u.is_empty()).then(|| u.to_string());
        match self {
            Metric::Area => known(&units.area),
            Metric::Delay => known(&units.delay),
            Metric::Energy => units.energy.as_deref().and_then(known),
            _ => None,
        }
    }

    /// Header of the metric: its name and, when known, its unit in
    /// brackets (`area [nm2]`).
    pub fn header(self, units: &TableUnits) -> String {
        match self.unit(units) {
            Some(u) => format!("{} [{u}]", self.name()),
            None => self.name().to_string(),
        }
    }

    fn is_integer(self) -> bool {
        matches!(self, Metric::Cells | Metric::Devices | Metric::Depth)
    }
}

/// One table row: a record and its ratios to the baseline.
#[derive(Clone, Debug)]
pub struct TableRow {
    /// The record.
    pub record: StudyRecord,
    /// Each metric ([`Metric::ALL`] order) as shown: normalised when the
    /// table is, `None` when the library does not model it.
    pub values: [Option<f64>; 6],
    /// Ratio of each metric ([`Metric::ALL`] order) to the baseline library
    /// of the same benchmark and goal; `None` when the baseline is missing
    /// or zero.
    pub ratios: [Option<f64>; 6],
}

/// Geometric mean of a library's ratios over all benchmarks of a goal.
#[derive(Clone, Debug)]
pub struct GeomeanRow {
    /// Goal the mean is over.
    pub goal: String,
    /// Library.
    pub library: String,
    /// Geometric mean per metric; `None` when no ratio was defined.
    pub ratios: [Option<f64>; 6],
    /// Benchmarks that contributed.
    pub benchmarks: usize,
}

/// A comparison of libraries over benchmarks.
#[derive(Clone, Debug)]
pub struct ComparisonTable {
    /// Library all ratios are relative to.
    pub baseline: String,
    /// Libraries in column order (baseline first).
    pub libraries: Vec<String>,
    /// Rows grouped by benchmark and goal, libraries in order.
    pub rows: Vec<TableRow>,
    /// One geometric-mean row per goal and library.
    pub geomeans: Vec<GeomeanRow>,
    /// True when more than one goal occurs (the goal column is shown).
    pub several_goals: bool,
    /// Units of the figures, and whether they are normalised.
    pub units: TableUnits,
}

fn position_or_push(list: &mut Vec<String>, item: &str) -> usize {
    match list.iter().position(|x| x == item) {
        Some(i) => i,
        None => {
            list.push(item.to_string());
            list.len() - 1
        }
    }
}

impl ComparisonTable {
    /// Builds the table. `baseline` names the library ratios are relative
    /// to; by default the first library that occurs in `records`.
    pub fn build(records: &[StudyRecord], baseline: Option<&str>) -> ComparisonTable {
        Self::build_in_units(records, baseline, TableUnits::from_records(records))
    }

    /// Builds the table with figures shown in `units` (checked by
    /// [`TableUnits::new`]): ratios are taken between shown figures, so
    /// normalised tables give ratios of FO4 delays and NAND2-equivalents.
    pub fn build_in_units(
        records: &[StudyRecord],
        baseline: Option<&str>,
        units: TableUnits,
    ) -> ComparisonTable {
        let mut libraries: Vec<String> = Vec::new();
        if let Some(b) = baseline {
            libraries.push(b.to_string());
        }
        let mut groups: Vec<(String, String)> = Vec::new();
        let mut goals: Vec<String> = Vec::new();
        for r in records {
            position_or_push(&mut libraries, &r.library);
            position_or_push(&mut goals, &r.goal);
            if !groups
                .iter()
                .any(|(b, g)| *b == r.benchmark && *g == r.goal)
            {
                groups.push((r.benchmark.clone(), r.goal.clone()));
            }
        }
        // Study records know their library's place in the plan: use it, so
        // merged shards list libraries (and pick the baseline) as the plan
        // does.
        let plan_index = |lib: &str| -> u64 {
            records
                .iter()
                .filter(|r| r.library == lib)
                .filter_map(|r| r.extra.get("plan_position")?.get(1)?.as_u64())
                .min()
                .unwrap_or(u64::MAX)
        };
        let first_explicit = usize::from(baseline.is_some());
        libraries[first_explicit..].sort_by_key(|l| plan_index(l));
        let baseline = libraries.first().cloned().unwrap_or_default();
        let mut rows = Vec::new();
        for (bench, goal) in &groups {
            let in_group: Vec<&StudyRecord> = records
                .iter()
                .filter(|r| r.benchmark == *bench && r.goal == *goal)
                .collect();
            let base = in_group.iter().find(|r| r.library == baseline).copied();
            for lib in &libraries {
                let Some(r) = in_group.iter().find(|r| r.library == *lib) else {
                    continue;
                };
                let values = Metric::ALL.map(|m| m.shown(r, &units));
                let mut ratios = [None; 6];
                if let Some(base) = base {
                    for (i, m) in Metric::ALL.iter().enumerate() {
                        if let (Some(b), Some(v)) = (m.shown(base, &units), values[i]) {
                            if b > 0.0 && b.is_finite() {
                                ratios[i] = Some(v / b);
                            }
                        }
                    }
                }
                rows.push(TableRow {
                    record: (*r).clone(),
                    values,
                    ratios,
                });
            }
        }
        let mut geomeans = Vec::new();
        for goal in &goals {
            for lib in &libraries {
                let mine: Vec<&TableRow> = rows
                    .iter()
                    .filter(|r| r.record.goal == *goal && r.record.library == *lib)
                    .collect();
                if mine.is_empty() {
                    continue;
                }
                let mut ratios = [None; 6];
                for (i, slot) in ratios.iter_mut().enumerate() {
                    let logs: Vec<f64> = mine
                        .iter()
                        .filter_map(|r| r.ratios[i])
                        .filter(|x| *x > 0.0)
                        .map(f64::ln)
                        .collect();
                    if !logs.is_empty() {
                        *slot = Some((logs.iter().sum::<f64>() / logs.len() as f64).exp());
                    }
                }
                geomeans.push(GeomeanRow {
                    goal: goal.clone(),
                    library: lib.clone(),
                    ratios,
                    benchmarks: mine.len(),
                });
            }
        }
        libraries.retain(|l| records.iter().any(|r| r.library == *l));
        ComparisonTable {
            baseline,
            libraries,
            rows,
            geomeans,
            several_goals: goals.len() > 1,
            units,
        }
    }
}

/// Formats a number for a table: integers plainly, others with a precision
/// that suits their size.
pub fn format_number(x: f64) -> String {
    if !x.is_finite() {
        return "-".into();
    }
    let a = x.abs();
    if x == x.round() && a < 1e12 {
        format!("{x:.0}")
    } else if a >= 1000.0 {
        format!("{x:.1}")
    } else if a >= 1.0 {
        format!("{x:.2}")
    } else if a >= 0.01 {
        format!("{x:.3}")
    } else {
        format!("{x:.3e}")
    }
}

/// A ratio for display; `n/a` when undefined (a figure the library does
/// not model, or no baseline to divide by).
fn format_ratio(r: Option<f64>) -> String {
    match r {
        Some(r) => format!("{r:.2}"),
        None => "n/a".into(),
    }
}

fn metric_cell(row: &TableRow, i: usize) -> String {
    let m = Metric::ALL[i];
    let Some(v) = row.values[i] else {
        return "n/a".into();
    };
    let value = if m.is_integer() {
        format!("{v:.0}")
    } else {
        format_number(v)
    };
    format!("{value} ({})", format_ratio(row.ratios[i]))
}

/// The table as rows of display strings (header first), shared by the
/// text, Markdown and LaTeX renderers.
fn display_grid(t: &ComparisonTable) -> (Vec<String>, Vec<Vec<String>>, Vec<Vec<String>>) {
    let mut header = vec!["benchmark".to_string()];
    if t.several_goals {
        header.push("goal".into());
    }
    header.push("library".into());
    for m in Metric::ALL {
        header.push(m.header(&t.units));
    }
    header.push("maj cells".into());
    header.push("verified".into());
    let mut body = Vec::new();
    let mut last_group: Option<(String, String)> = None;
    for row in &t.rows {
        let r = &row.record;
        let group = (r.benchmark.clone(), r.goal.clone());
        let first = last_group.as_ref() != Some(&group);
        last_group = Some(group);
        let mut cells = vec![if first {
            r.benchmark.clone()
        } else {
            String::new()
        }];
        if t.several_goals {
            cells.push(if first { r.goal.clone() } else { String::new() });
        }
        cells.push(r.library.clone());
        for i in 0..Metric::ALL.len() {
            cells.push(metric_cell(row, i));
        }
        cells.push(r.majority_cells.to_string());
        cells.push(r.verified.clone());
        body.push(cells);
    }
    let mut means = Vec::new();
    for g in &t.geomeans {
        let mut cells = vec![format!("geomean ({})", g.benchmarks)];
        if t.several_goals {
            cells.push(g.goal.clone());
        }
        cells.push(g.library.clone());
        for r in g.ratios {
            cells.push(format!("({})", format_ratio(r)));
        }
        cells.push(String::new());
        cells.push(String::new());
        means.push(cells);
    }
    (header, body, means)
}

/// What normalised figures mean, printed above a normalised table.
pub const NORMALIZED_NOTE: &str = "normalised per library: delay in FO4 delays (its inverter driving four inverters), \
area in NAND2-equivalents (its two-input NAND, or AND where none), energy in its inverter's switching energy";

/// Aligned text for a terminal. Numbers are followed by their ratio to the
/// baseline in parentheses.
pub fn render_text(t: &ComparisonTable) -> String {
    let (header, body, means) = display_grid(t);
    let mut widths: Vec<usize> = header.iter().map(|h| h.chars().count()).collect();
    for row in body.iter().chain(&means) {
        for (w, c) in widths.iter_mut().zip(row) {
            *w = (*w).max(c.chars().count());
        }
    }
    let text_columns = if t.several_goals { 3 } else { 2 };
    let line = |cells: &[String]| -> String {
        let mut s = String::new();
        for (i, (c, w)) in cells.iter().zip(&widths).enumerate() {
            if i > 0 {
                s.push_str("  ");
            }
            let pad = w - c.chars().count();
            if i < text_columns || i == cells.len() - 1 {
                s.push_str(c);
                s.push_str(&" ".repeat(pad));
            } else {
                s.push_str(&" ".repeat(pad));
                s.push_str(c);
            }
        }
        s.trim_end().to_string() + "\n"
    };
    let rule: String = "-".repeat(widths.iter().sum::<usize>() + 2 * (widths.len() - 1)) + "\n";
    let mut out = format!(
        "ratios in parentheses are relative to {}\n",
        if t.baseline.is_empty() {
            "(none)"
        } else {
            &t.baseline
        }
    );
    if t.units.normalize {
        out.push_str(NORMALIZED_NOTE);
        out.push('\n');
    }
    out.push_str(&line(&header));
    out.push_str(&rule);
    for row in &body {
        out.push_str(&line(row));
    }
    if !means.is_empty() {
        out.push_str(&rule);
        for row in &means {
            out.push_str(&line(row));
        }
    }
    out
}

/// A Markdown (pipe) table.
pub fn render_markdown(t: &ComparisonTable) -> String {
    let (header, body, means) = display_grid(t);
    let text_columns = if t.several_goals { 3 } else { 2 };
    let esc = |s: &str| s.replace('|', "\\|");
    let mut out = format!(
        "Ratios in parentheses are relative to `{}`.\n\n",
        t.baseline
    );
    out.push_str(&format!(
        "| {} |\n",
        header
            .iter()
            .map(|h| esc(h))
            .collect::<Vec<_>>()
            .join(" | ")
    ));
    let aligns: Vec<&str> = (0..header.len())
        .map(|i| {
            if i < text_columns || i == header.len() - 1 {
                ":---"
            } else {
                "---:"
            }
        })
        .collect();
    out.push_str(&format!("| {} |\n", aligns.join(" | ")));
    for row in &body {
        out.push_str(&format!(
            "| {} |\n",
            row.iter().map(|c| esc(c)).collect::<Vec<_>>().join(" | ")
        ));
    }
    for row in &means {
        let cells: Vec<String> = row
            .iter()
            .map(|c| {
                if c.is_empty() {
                    String::new()
                } else {
                    format!("**{}**", esc(c))
                }
            })
            .collect();
        out.push_str(&format!("| {} |\n", cells.join(" | ")));
    }
    out
}

/// Escapes LaTeX special characters.
pub fn latex_escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '_' | '&' | '%' | '$' | '#' | '{' | '}' => {
                out.push('\\');
                out.push(ch);
            }
            '~' => out.push_str("\\textasciitilde{}"),
            '^' => out.push_str("\\textasciicircum{}"),
            '\\' => out.push_str("\\textbackslash{}"),
            _ => out.push(ch),
        }
    }
    out
}

/// A LaTeX table with booktabs rules (`\usepackage{booktabs}`), ready to
/// paste into a paper.
pub fn render_latex(t: &ComparisonTable) -> String {
    let (header, body, means) = display_grid(t);
    let text_columns = if t.several_goals { 3 } else { 2 };
    let spec: String = (0..header.len())
        .map(|i| {
            if i < text_columns || i == header.len() - 1 {
                'l'
            } else {
                'r'
            }
        })
        .collect();
    let row = |cells: &[String]| -> String {
        cells
            .iter()
            .map(|c| latex_escape(c))
            .collect::<Vec<_>>()
            .join(" & ")
            + " \\\\\n"
    };
    let mut out = String::new();
    out.push_str(&format!(
        "% ribbonmap comparison; ratios in parentheses are relative to {}\n",
        latex_escape(&t.baseline)
    ));
    out.push_str(&format!("\\begin{{tabular}}{{{spec}}}\n\\toprule\n"));
    let titled: Vec<String> = header
        .iter()
        .map(|h| {
            let mut c = h.chars();
            match c.next() {
                Some(f) => f.to_uppercase().collect::<String>() + c.as_str(),
                None => String::new(),
            }
        })
        .collect();
    out.push_str(&row(&titled));
    out.push_str("\\midrule\n");
    for (i, cells) in body.iter().enumerate() {
        if i > 0 && !cells[0].is_empty() {
            out.push_str("\\addlinespace\n");
        }
        out.push_str(&row(cells));
    }
    if !means.is_empty() {
        out.push_str("\\midrule\n");
        for cells in &means {
            out.push_str(&row(cells));
        }
    }
    out.push_str("\\bottomrule\n\\end{tabular}\n");
    out
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Comma-separated values: one line per benchmark × goal × library with all
/// numbers and ratios, then geometric-mean lines (benchmark `geomean`,
/// numbers empty). Headers name units (`area [nm2]`); numbers are rounded
/// to six significant digits; a figure the library does not model is `n/a`.
pub fn render_csv(t: &ComparisonTable) -> String {
    let mut header: Vec<String> = ["benchmark", "goal", "library", "verified"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    for m in Metric::ALL {
        header.push(match m {
            Metric::Energy => format!(
                "energy_per_op{}",
                m.unit(&t.units)
                    .map(|u| format!(" [{u}]"))
                    .unwrap_or_default()
            ),
            _ => m.header(&t.units),
        });
    }
    header.push(match t.units.power.as_deref().filter(|u| !u.is_empty()) {
        Some(u) => format!("static_power [{u}]"),
        None => "static_power".into(),
    });
    header.push("majority_cells".into());
    for m in Metric::ALL {
        header.push(format!("{}_ratio", m.name()));
    }
    let header: Vec<String> = header.iter().map(|h| csv_field(h)).collect();
    let mut out = header.join(",") + "\n";
    let number = |x: Option<f64>| x.map(six_significant).unwrap_or_else(|| "n/a".into());
    let ratio = |r: Option<f64>| r.map(six_significant).unwrap_or_default();
    for row in &t.rows {
        let r = &row.record;
        let mut cells = vec![
            csv_field(&r.benchmark),
            csv_field(&r.goal),
            csv_field(&r.library),
            csv_field(&r.verified),
        ];
        cells.extend(row.values.iter().map(|&v| number(v)));
        cells.push(number(t.units.static_power(r)));
        cells.push(r.majority_cells.to_string());
        cells.extend(row.ratios.iter().map(|&x| ratio(x)));
        out.push_str(&(cells.join(",") + "\n"));
    }
    for g in &t.geomeans {
        let mut cells = vec![
            "geomean".to_string(),
            csv_field(&g.goal),
            csv_field(&g.library),
        ];
        cells.extend(std::iter::repeat_n(String::new(), 9));
        cells.extend(g.ratios.iter().map(|&x| ratio(x)));
        out.push_str(&(cells.join(",") + "\n"));
    }
    out
}

fn ratio_object(ratios: &[Option<f64>; 6]) -> serde_json::Value {
    let mut m = serde_json::Map::new();
    for (metric, r) in Metric::ALL.iter().zip(ratios) {
        m.insert(metric.name().into(), json!(r));
    }
    serde_json::Value::Object(m)
}

/// JSON: `{"baseline", "normalized", "units" (unit of each metric's shown
/// figures and ratios; `null` for counts), "libraries", "rows": [one object
/// per benchmark × library with all numbers in the library's own units
/// (`units`), `null` for a figure it does not model, "normalized" figures
/// when normalised, and "ratios"], "geomean": [{goal, library, benchmarks,
/// ratios}]}`.
pub fn render_json(t: &ComparisonTable) -> String {
    let rows: Vec<serde_json::Value> = t
        .rows
        .iter()
        .map(|row| {
            let mut v = serde_json::to_value(&row.record).unwrap_or(json!({}));
            if let serde_json::Value::Object(m) = &mut v {
                m.insert(
                    "energy_per_op".into(),
                    json!(t
                        .units
                        .energy(&row.record)
                        .map(|_| row.record.energy_per_op)),
                );
                m.insert(
                    "static_power".into(),
                    json!(t.units.static_power(&row.record)),
                );
                if t.units.normalize {
                    let mut n = serde_json::Map::new();
                    for (metric, value) in Metric::ALL.iter().zip(&row.values) {
                        n.insert(metric.name().into(), json!(value));
                    }
                    m.insert("normalized".into(), serde_json::Value::Object(n));
                }
                m.insert("ratios".into(), ratio_object(&row.ratios));
            }
            v
        })
        .collect();
    let means: Vec<serde_json::Value> = t
        .geomeans
        .iter()
        .map(|g| {
            json!({
                "goal": g.goal,
                "library": g.library,
                "benchmarks": g.benchmarks,
                "ratios": ratio_object(&g.ratios),
            })
        })
        .collect();
    let mut units = serde_json::Map::new();
    for m in Metric::ALL {
        units.insert(m.name().into(), json!(m.unit(&t.units)));
    }
    units.insert(
        "static_power".into(),
        json!(t.units.power.as_deref().filter(|u| !u.is_empty())),
    );
    let doc = json!({
        "baseline": t.baseline,
        "normalized": t.units.normalize,
        "units": units,
        "libraries": t.libraries,
        "rows": rows,
        "geomean": means,
    });
    serde_json::to_string_pretty(&doc).unwrap_or_default() + "\n"
}

/// Output format of a comparison table.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum TableFormat {
    /// Aligned text.
    Text,
    /// JSON.
    Json,
    /// CSV.
    Csv,
    /// Markdown.
    Markdown,
    /// LaTeX booktabs.
    Latex,
}

/// Renders `t` in `format`.
pub fn render(t: &ComparisonTable, format: TableFormat) -> String {
    match format {
        TableFormat::Text => render_text(t),
        TableFormat::Json => render_json(t),
        TableFormat::Csv => render_csv(t),
        TableFormat::Markdown => render_markdown(t),
        TableFormat::Latex => render_latex(t),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    pub(crate) fn record(bench: &str, lib: &str, cells: u64, area: f64) -> StudyRecord {
        StudyRecord {
            benchmark: bench.into(),
            design: bench.into(),
            library: lib.into(),
            goal: "area".into(),
            plan_key: None,
            cells: Default::default(),
            cell_count: cells,
            area,
            depth: 3,
            delay: 4.5,
            devices: cells * 2,
            verified: "simulated".into(),
            energy_per_op: 1.25,
            static_power: 0.5,
            majority_cells: 0,
            extra: Default::default(),
        }
    }

    #[test]
    fn ratios_and_geomean_by_integer_arithmetic() {
        // Ratios 1/2 and 2 have geometric mean exactly 1 (common practice).
        let recs = vec![
            record("a", "x", 10, 1.0),
            record("a", "y", 5, 1.0),
            record("b", "x", 10, 1.0),
            record("b", "y", 20, 1.0),
        ];
        let t = ComparisonTable::build(&recs, None);
        assert_eq!(t.baseline, "x");
        assert_eq!(t.rows[1].ratios[0], Some(0.5));
        assert_eq!(t.rows[3].ratios[0], Some(2.0));
        let y = t.geomeans.iter().find(|g| g.library == "y").unwrap();
        assert!((y.ratios[0].unwrap() - 1.0).abs() < 1e-12);
        let text = render_text(&t);
        assert!(text.contains("5 (0.50)"), "{text}");
    }

    #[test]
    fn latex_escapes_and_has_rules() {
        let recs = vec![record("adder_32", "ribbon3", 10, 2.5)];
        let t = ComparisonTable::build(&recs, None);
        let tex = render_latex(&t);
        assert!(tex.contains("adder\\_32"));
        for rule in ["\\toprule", "\\midrule", "\\bottomrule", "\\begin{tabular}"] {
            assert!(tex.contains(rule));
        }
    }

    #[test]
    fn csv_columns_are_consistent() {
        let recs = vec![record("a,b", "x", 10, 1.0), record("a,b", "y", 5, 1.0)];
        let t = ComparisonTable::build(&recs, None);
        let csv = render_csv(&t);
        let header_cols = csv.lines().next().unwrap().split(',').count();
        assert!(csv.contains("\"a,b\""));
        for line in csv.lines().skip(1) {
            // The quoted field holds one comma.
            assert_eq!(
                line.split(',').count() - line.matches("\"a,b\"").count(),
                header_cols
            );
        }
    }
}
