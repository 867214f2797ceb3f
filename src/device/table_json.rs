//! Reading a conductance table from JSON (`ribbonmap-conductance/1`).
//!
//! The compact form for larger grids: the axes are listed once and the
//! values follow in one flat list, the first input varying fastest (the same
//! order as truth-table rows). Positions of values come from the library
//! module's JSON position scanner, so errors name their line and column.

use super::table::{check_conductance, ConductanceTable, MAX_TABLE_INPUTS, MAX_TABLE_POINTS};
use super::units::ConductanceUnit;
use crate::diag::SourceError;
use crate::library::positions::Positions;
use serde_json::{Map, Value};

/// The format tag of a JSON conductance table.
pub const TABLE_FORMAT: &str = "ribbonmap-conductance/1";

const FIELDS: &[&str] = &["format", "description", "inputs", "unit", "axes", "values"];

/// Parses JSON text; `file` is used in messages.
pub fn parse_json_table(text: &str, file: &str) -> Result<ConductanceTable, SourceError> {
    let root: Value = serde_json::from_str(text).map_err(|e| {
        let message = e.to_string();
        let message = message
            .rfind(" at line ")
            .map_or(message.as_str(), |i| &message[..i]);
        SourceError::new(
            file,
            e.line() as u32,
            e.column() as u32,
            format!("not valid JSON: {message}"),
        )
    })?;
    let positions = Positions::scan(text);
    let at = |path: &str, message: String| {
        let (line, column) = positions.key_or_value(path).unwrap_or((1, 1));
        SourceError::new(file, line, column, message)
    };
    let Some(map) = root.as_object() else {
        return Err(at("", "expected a JSON object".into()));
    };
    for key in map.keys() {
        if !FIELDS.contains(&key.as_str()) {
            return Err(at(
                &format!("/{key}"),
                format!(
                    "unknown field '{key}': expected one of {}",
                    FIELDS.join(", ")
                ),
            ));
        }
    }
    let format = string_field(map, "format", &at)?;
    if format != TABLE_FORMAT {
        return Err(at(
            "/format",
            format!("unsupported format '{format}': expected \"{TABLE_FORMAT}\""),
        ));
    }
    let unit_text = string_field(map, "unit", &at)?;
    let Some(unit) = ConductanceUnit::parse(&unit_text) else {
        return Err(at(
            "/unit",
            format!(
                "unknown conductance unit '{unit_text}': expected one of {}",
                ConductanceUnit::NAMES
            ),
        ));
    };
    let inputs: Vec<String> = match map.get("inputs") {
        Some(Value::Array(list)) if !list.is_empty() && list.len() <= MAX_TABLE_INPUTS => {
            let mut names = Vec::new();
            for (k, v) in list.iter().enumerate() {
                match v.as_str() {
                    Some(s) if !s.is_empty() && !names.iter().any(|n: &String| n == s) => {
                        names.push(s.to_string())
                    }
                    _ => {
                        return Err(at(
                            &format!("/inputs/{k}"),
                            "expected a distinct input name".into(),
                        ))
                    }
                }
            }
            names
        }
        _ => {
            return Err(at(
                "/inputs",
                format!("expected a list of 1 to {MAX_TABLE_INPUTS} input names"),
            ))
        }
    };
    let Some(Value::Array(axis_list)) = map.get("axes") else {
        return Err(at(
            "/axes",
            "expected a list of voltage lists, one per input".into(),
        ));
    };
    if axis_list.len() != inputs.len() {
        return Err(at(
            "/axes",
            format!(
                "{} axes for {} inputs: give one voltage list per input",
                axis_list.len(),
                inputs.len()
            ),
        ));
    }
    let mut axes = Vec::new();
    let mut points = 1usize;
    for (k, axis) in axis_list.iter().enumerate() {
        let path = format!("/axes/{k}");
        let Some(list) = axis.as_array() else {
            return Err(at(&path, "expected a list of voltages".into()));
        };
        if list.len() < 2 {
            return Err(at(&path, "a grid axis needs at least two voltages".into()));
        }
        let mut volts = Vec::new();
        for (i, v) in list.iter().enumerate() {
            let Some(x) = v.as_f64() else {
                return Err(at(
                    &format!("{path}/{i}"),
                    "expected a voltage (a number)".into(),
                ));
            };
            if let Some(&prev) = volts.last() {
                if x <= prev {
                    return Err(at(
                        &format!("{path}/{i}"),
                        format!(
                            "not a regular grid: voltage {x} V does not increase after {prev} V"
                        ),
                    ));
                }
            }
            volts.push(x);
        }
        points = points.saturating_mul(volts.len());
        axes.push(volts);
    }
    if points > MAX_TABLE_POINTS {
        return Err(at(
            "/axes",
            format!("more than {MAX_TABLE_POINTS} grid points"),
        ));
    }
    let Some(Value::Array(list)) = map.get("values") else {
        return Err(at("/values", "expected a flat list of conductances".into()));
    };
    if list.len() != points {
        return Err(at(
            "/values",
            format!(
                "not a regular grid: {} values, but the axes span {points} points",
                list.len()
            ),
        ));
    }
    let mut values = Vec::with_capacity(points);
    for (i, v) in list.iter().enumerate() {
        let path = format!("/values/{i}");
        let Some(g) = v.as_f64() else {
            let (line, column) = positions.value(&path).unwrap_or((1, 1));
            return Err(SourceError::new(
                file,
                line,
                column,
                "expected a conductance (a number)",
            ));
        };
        let siemens = g * unit.siemens();
        let (line, column) = positions.value(&path).unwrap_or((1, 1));
        check_conductance(file, line, column, siemens)?;
        values.push(siemens);
    }
    Ok(ConductanceTable {
        file: file.to_string(),
        inputs,
        axes,
        values,
    })
}

fn string_field(
    map: &Map<String, Value>,
    key: &str,
    at: &impl Fn(&str, String) -> SourceError,
) -> Result<String, SourceError> {
    match map.get(key) {
        Some(Value::String(s)) => Ok(s.clone()),
        Some(_) => Err(at(&format!("/{key}"), "expected a string".into())),
        None => Err(at("", format!("missing field '{key}'"))),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_transmission_units() {
        let text = r#"{"format": "ribbonmap-conductance/1", "inputs": ["a"], "unit": "G0",
            "axes": [[0, 0.2]], "values": [0.01, 0.5]}"#;
        let t = parse_json_table(text, "t.json").unwrap();
        assert!((t.values[1] - 0.5 * crate::device::units::CONDUCTANCE_QUANTUM_S).abs() < 1e-20);
    }

    #[test]
    fn negative_value_names_its_line() {
        let text = "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\"], \"unit\": \"uS\",\n \"axes\": [[0, 0.2]],\n \"values\": [1,\n -2]}";
        let e = parse_json_table(text, "t.json").unwrap_err();
        assert_eq!((e.line, e.column), (4, 2), "{e}");
    }
}
