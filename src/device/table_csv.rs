//! Reading a conductance table from CSV.
//!
//! The form device simulators write most easily: a header naming the gate
//! inputs and then the conductance with its unit in brackets (`a,b,g[uS]`),
//! then one line per grid point with the gate voltages in volts and the
//! conductance. Lines starting with `#` and blank lines are skipped, so a file
//! can say where it comes from. Every problem names its line and column.

use super::table::{
    check_conductance, table_from_points, ConductanceTable, GridPoint, MAX_TABLE_INPUTS,
    MAX_TABLE_POINTS,
};
use super::units::ConductanceUnit;
use crate::diag::SourceError;

/// Parses CSV text; `file` is used in messages.
pub fn parse_csv_table(text: &str, file: &str) -> Result<ConductanceTable, SourceError> {
    let mut header: Option<(u32, Vec<String>, ConductanceUnit)> = None;
    let mut points: Vec<GridPoint> = Vec::new();
    for (number, raw) in text.lines().enumerate() {
        let line = number as u32 + 1;
        let trimmed = raw.trim();
        if trimmed.is_empty() || trimmed.starts_with('#') {
            continue;
        }
        let fields = split_fields(raw);
        match &header {
            None => header = Some(parse_header(&fields, file, line)?),
            Some((_, inputs, unit)) => {
                if fields.len() != inputs.len() + 1 {
                    return Err(SourceError::new(
                        file,
                        line,
                        1,
                        format!(
                            "{} fields: the header names {} inputs and a conductance, so every row has {}",
                            fields.len(),
                            inputs.len(),
                            inputs.len() + 1
                        ),
                    ));
                }
                if points.len() >= MAX_TABLE_POINTS {
                    return Err(SourceError::new(
                        file,
                        line,
                        1,
                        format!("more than {MAX_TABLE_POINTS} grid points"),
                    ));
                }
                let mut volts = Vec::with_capacity(inputs.len());
                for (k, (column, field)) in fields[..inputs.len()].iter().enumerate() {
                    let v = number_at(field, file, line, *column, || {
                        format!("the voltage of input '{}'", inputs[k])
                    })?;
                    volts.push(v);
                }
                let (column, field) = fields[inputs.len()];
                let g = number_at(field, file, line, column, || "the conductance".to_string())?;
                let siemens = g * unit.siemens();
                check_conductance(file, line, column, siemens)?;
                points.push(GridPoint {
                    line,
                    volts,
                    siemens,
                });
            }
        }
    }
    let Some((header_line, inputs, _)) = header else {
        return Err(SourceError::new(
            file,
            0,
            0,
            "empty table: expected a header such as 'a,b,g[uS]' and one row per grid point",
        ));
    };
    table_from_points(file, inputs, &points, header_line)
}

/// Splits a line at commas, keeping each field's 1-based start column.
fn split_fields(line: &str) -> Vec<(u32, &str)> {
    let mut fields = Vec::new();
    let mut start = 0usize;
    for (i, c) in line.char_indices() {
        if c == ',' {
            fields.push((start, &line[start..i]));
            start = i + 1;
        }
    }
    fields.push((start, &line[start..]));
    fields
        .into_iter()
        .map(|(at, f)| {
            let lead = f.len() - f.trim_start().len();
            let column = line[..at + lead].chars().count() as u32 + 1;
            (column, f.trim())
        })
        .collect()
}

fn parse_header(
    fields: &[(u32, &str)],
    file: &str,
    line: u32,
) -> Result<(u32, Vec<String>, ConductanceUnit), SourceError> {
    if fields.len() < 2 {
        return Err(SourceError::new(
            file,
            line,
            1,
            "expected a header naming the inputs and then the conductance with its unit, such as 'a,b,g[uS]'",
        ));
    }
    if fields.len() - 1 > MAX_TABLE_INPUTS {
        return Err(SourceError::new(
            file,
            line,
            1,
            format!(
                "{} inputs: a table may have at most {MAX_TABLE_INPUTS}",
                fields.len() - 1
            ),
        ));
    }
    let mut inputs: Vec<String> = Vec::new();
    for &(column, name) in &fields[..fields.len() - 1] {
        let valid = name
            .chars()
            .next()
            .is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
            && name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_');
        if !valid {
            return Err(SourceError::new(
                file,
                line,
                column,
                format!("'{name}' is not an input name (letters, digits and '_')"),
            ));
        }
        if inputs.iter().any(|i| i == name) {
            return Err(SourceError::new(
                file,
                line,
                column,
                format!("input '{name}' is named twice"),
            ));
        }
        inputs.push(name.to_string());
    }
    let (column, last) = fields[fields.len() - 1];
    let unit_text = last
        .find('[')
        .filter(|_| last.ends_with(']'))
        .map(|open| &last[open + 1..last.len() - 1]);
    let Some(unit_text) = unit_text else {
        return Err(SourceError::new(
            file,
            line,
            column,
            format!(
                "'{last}': the last column is the conductance with its unit in brackets, such as 'g[uS]' (units {})",
                ConductanceUnit::NAMES
            ),
        ));
    };
    let Some(unit) = ConductanceUnit::parse(unit_text) else {
        return Err(SourceError::new(
            file,
            line,
            column,
            format!(
                "unknown conductance unit '{unit_text}': expected one of {}",
                ConductanceUnit::NAMES
            ),
        ));
    };
    Ok((line, inputs, unit))
}

fn number_at(
    field: &str,
    file: &str,
    line: u32,
    column: u32,
    what: impl Fn() -> String,
) -> Result<f64, SourceError> {
    match field.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(SourceError::new(
            file,
            line,
            column,
            format!("'{field}' is not a number ({})", what()),
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_a_small_grid_in_any_row_order() {
        let text = "# invented\na,b,g[nS]\n0,0,1\n0.2,0,2\n0,0.2,3\n0.2,0.2,4\n";
        let t = parse_csv_table(text, "t.csv").unwrap();
        assert_eq!(t.inputs, vec!["a", "b"]);
        for (got, want) in t.values.iter().zip([1e-9, 2e-9, 3e-9, 4e-9]) {
            assert!((got - want).abs() < 1e-21, "{got} {want}");
        }
        let shuffled = "a,b,g[nS]\n0.2,0.2,4\n0,0.2,3\n0,0,1\n0.2,0,2\n";
        assert_eq!(parse_csv_table(shuffled, "t.csv").unwrap().values, t.values);
    }

    #[test]
    fn errors_name_line_and_column() {
        let e = parse_csv_table("a,g[uS]\n0,1\n0.2,x\n", "t.csv").unwrap_err();
        assert_eq!((e.line, e.column), (3, 5), "{e}");
        let e = parse_csv_table("a,g[kS]\n0,1\n", "t.csv").unwrap_err();
        assert_eq!((e.line, e.column), (1, 3), "{e}");
        let e = parse_csv_table("a,b,g[uS]\n0,0,1\n0,1\n", "t.csv").unwrap_err();
        assert_eq!(e.line, 3, "{e}");
    }
}
