//! A conductance table (conduction map): one ribbon's conductance over a
//! regular grid of its gate voltages, with multilinear interpolation between
//! grid points.
//!
//! Device simulators write such maps point by point; the readers
//! ([`super::table_csv`], [`super::table_json`]) check that the points form a
//! full grid and hand this type conductances in siemens. The grid may be
//! spaced unevenly on each axis. Outside the grid the value of the nearest
//! edge is used (the characterisation checks that the logic corners lie
//! inside).

use crate::diag::SourceError;
use std::path::Path;

/// Most grid points a table may hold (bounds memory for hostile input).
pub const MAX_TABLE_POINTS: usize = 1 << 20;

/// Most inputs a table may have.
pub const MAX_TABLE_INPUTS: usize = 6;

/// One ribbon's conductance over its gate voltages.
#[derive(Clone, Debug, PartialEq)]
pub struct ConductanceTable {
    /// The file it was read from, as given (for messages).
    pub file: String,
    /// Input (gate) names, one per axis, in the table's order.
    pub inputs: Vec<String>,
    /// Grid voltages of each axis in volts, strictly increasing, at least two.
    pub axes: Vec<Vec<f64>>,
    /// Conductance in siemens at every grid point, the first axis varying
    /// fastest: point (i0, i1, ...) is at `i0 + n0 * (i1 + n1 * (...))`.
    pub values: Vec<f64>,
}

impl ConductanceTable {
    /// Number of inputs (axes).
    pub fn arity(&self) -> usize {
        self.axes.len()
    }

    /// Index in [`ConductanceTable::values`] of the grid point with axis
    /// indices `index`.
    pub fn flat_index(&self, index: &[usize]) -> usize {
        let mut flat = 0;
        for k in (0..self.axes.len()).rev() {
            flat = flat * self.axes[k].len() + index[k];
        }
        flat
    }

    /// Conductance in siemens at gate voltages `volts` (one per axis), by
    /// multilinear interpolation between the surrounding grid points;
    /// voltages outside an axis are clamped to its ends.
    pub fn conductance(&self, volts: &[f64]) -> f64 {
        let n = self.axes.len();
        // Per axis: the lower grid index and the weight of the upper point.
        let mut lower = [0usize; MAX_TABLE_INPUTS];
        let mut weight = [0f64; MAX_TABLE_INPUTS];
        for k in 0..n {
            let axis = &self.axes[k];
            let v = volts[k];
            let last = axis.len() - 1;
            if v <= axis[0] {
                lower[k] = 0;
                weight[k] = 0.0;
            } else if v >= axis[last] {
                lower[k] = last - 1;
                weight[k] = 1.0;
            } else {
                let i = axis.partition_point(|&x| x <= v) - 1;
                let i = i.min(last - 1);
                lower[k] = i;
                weight[k] = (v - axis[i]) / (axis[i + 1] - axis[i]);
            }
        }
        let mut total = 0.0;
        let mut index = [0usize; MAX_TABLE_INPUTS];
        for corner in 0..(1usize << n) {
            let mut w = 1.0;
            for k in 0..n {
                let upper = corner >> k & 1 == 1;
                index[k] = lower[k] + usize::from(upper);
                w *= if upper { weight[k] } else { 1.0 - weight[k] };
            }
            if w != 0.0 {
                total += w * self.values[self.flat_index(&index[..n])];
            }
        }
        total
    }

    /// Smallest and largest grid voltage of axis `k`.
    pub fn span(&self, k: usize) -> (f64, f64) {
        let axis = &self.axes[k];
        (axis[0], axis[axis.len() - 1])
    }
}

/// Reads a conductance table: JSON (`ribbonmap-conductance/1`) when the file
/// name ends in `.json`, CSV otherwise. `shown` is the name used in messages.
pub fn read_table(path: &Path, shown: &str) -> Result<ConductanceTable, SourceError> {
    let bytes = std::fs::read(path)
        .map_err(|e| SourceError::new(shown, 0, 0, format!("cannot read the table: {e}")))?;
    let text = crate::diag::utf8_text(shown, bytes)?;
    if path.extension().and_then(|e| e.to_str()) == Some("json") {
        super::table_json::parse_json_table(&text, shown)
    } else {
        super::table_csv::parse_csv_table(&text, shown)
    }
}

/// A grid point as read: its line in the file (for messages), its voltages
/// and its conductance in siemens.
pub(crate) struct GridPoint {
    pub line: u32,
    pub volts: Vec<f64>,
    pub siemens: f64,
}

/// Builds a table from points that must form a full regular grid: each
/// axis's distinct voltages, every combination exactly once. `header_line`
/// is named when the problem has no row of its own.
pub(crate) fn table_from_points(
    file: &str,
    inputs: Vec<String>,
    points: &[GridPoint],
    header_line: u32,
) -> Result<ConductanceTable, SourceError> {
    let n = inputs.len();
    let mut axes: Vec<Vec<f64>> = vec![Vec::new(); n];
    for (k, axis) in axes.iter_mut().enumerate() {
        let mut values: Vec<f64> = points.iter().map(|p| p.volts[k]).collect();
        values.sort_by(f64::total_cmp);
        values.dedup();
        if values.len() < 2 {
            return Err(SourceError::new(
                file,
                header_line,
                1,
                format!(
                    "input '{}' takes {} distinct voltage(s): a grid axis needs at least two",
                    inputs[k],
                    values.len()
                ),
            ));
        }
        *axis = values;
    }
    let expected: usize = axes.iter().map(Vec::len).product();
    let mut values = vec![f64::NAN; expected];
    let mut table = ConductanceTable {
        file: file.to_string(),
        inputs,
        axes,
        values: Vec::new(),
    };
    let mut index = vec![0usize; n];
    for p in points {
        for (k, at) in index.iter_mut().enumerate() {
            *at = table.axes[k]
                .binary_search_by(|x| x.total_cmp(&p.volts[k]))
                .unwrap_or(0);
        }
        let at = table.flat_index(&index);
        if !values[at].is_nan() {
            return Err(SourceError::new(
                file,
                p.line,
                1,
                format!("grid point ({}) is given twice", format_volts(&p.volts)),
            ));
        }
        values[at] = p.siemens;
    }
    if let Some(missing) = values.iter().position(|v| v.is_nan()) {
        let mut rest = missing;
        let volts: Vec<f64> = table
            .axes
            .iter()
            .map(|axis| {
                let v = axis[rest % axis.len()];
                rest /= axis.len();
                v
            })
            .collect();
        return Err(SourceError::new(
            file,
            header_line,
            1,
            format!(
                "not a regular grid: {} points given, the axes span {} ({}), and grid point ({}) is missing",
                points.len(),
                expected,
                table
                    .axes
                    .iter()
                    .map(|a| a.len().to_string())
                    .collect::<Vec<_>>()
                    .join(" x "),
                format_volts(&volts)
            ),
        ));
    }
    table.values = values;
    Ok(table)
}

/// Checks a conductance value read at `line`:`column`: finite and positive
/// (the report's colour scale and the on/off ratios take its logarithm).
pub(crate) fn check_conductance(
    file: &str,
    line: u32,
    column: u32,
    siemens: f64,
) -> Result<(), SourceError> {
    if !siemens.is_finite() {
        return Err(SourceError::new(
            file,
            line,
            column,
            format!("conductance {siemens} is not a finite number"),
        ));
    }
    if siemens < 0.0 {
        return Err(SourceError::new(
            file,
            line,
            column,
            format!("conductance {siemens} S is negative: a ribbon's conductance is zero or more"),
        ));
    }
    if siemens == 0.0 {
        return Err(SourceError::new(
            file,
            line,
            column,
            "conductance 0: every ribbon conducts a little, and on/off ratios and the report's logarithmic scale need a positive value",
        ));
    }
    Ok(())
}

fn format_volts(volts: &[f64]) -> String {
    volts
        .iter()
        .map(|v| format!("{v} V"))
        .collect::<Vec<_>>()
        .join(", ")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table_2d() -> ConductanceTable {
        // g(a, b) = 1 + 2a + 3b + 4ab on a 3 x 2 uneven grid: a bilinear
        // function, so interpolation must reproduce it exactly.
        let axes = vec![vec![0.0, 0.05, 0.2], vec![0.0, 0.2]];
        let mut values = Vec::new();
        for &b in &axes[1] {
            for &a in &axes[0] {
                values.push(1.0 + 2.0 * a + 3.0 * b + 4.0 * a * b);
            }
        }
        ConductanceTable {
            file: "t".into(),
            inputs: vec!["a".into(), "b".into()],
            axes,
            values,
        }
    }

    /// Multilinear interpolation reproduces a multilinear function exactly
    /// (common-practice fact about the method).
    #[test]
    fn bilinear_function_is_exact() {
        let t = table_2d();
        for &(a, b) in &[
            (0.0, 0.0),
            (0.03, 0.1),
            (0.12, 0.07),
            (0.2, 0.2),
            (0.05, 0.19),
        ] {
            let exact = 1.0 + 2.0 * a + 3.0 * b + 4.0 * a * b;
            assert!((t.conductance(&[a, b]) - exact).abs() < 1e-12, "{a} {b}");
        }
        // Clamped outside the grid.
        assert!((t.conductance(&[0.3, -0.1]) - t.conductance(&[0.2, 0.0])).abs() < 1e-15);
    }
}
