//! Units of the figures a comparison shows, and the per-library yardsticks
//! that make figures of different unit systems comparable.
//!
//! Libraries state their own units (`nm2` and `ps` for the ribbon libraries,
//! `transistors` and `tau` for the logical-effort CMOS ones). A ratio of
//! figures in different units means nothing, so a comparison across unit
//! systems is refused unless it is normalised. Normalised figures use
//! yardsticks of each library (all common practice):
//!
//! - delay in FO4 delays: the library's inverter driving four copies of
//!   itself, by the library's own delay model,
//!   `intrinsic + per_load × 4 × input_load`;
//! - area in NAND2-equivalents: the area of the library's smallest
//!   two-input NAND, or of its smallest two-input AND where it has no NAND;
//! - energy in inverter switchings: the switching energy of the library's
//!   inverter.
//!
//! A figure a library does not model (energy when no cell has a switching
//! energy, static power when no cell leaks) is shown as `n/a`, never 0.

use super::record::StudyRecord;
use crate::library::{Leakage, Library};
use indexmap::IndexMap;

/// Unit label of delays normalised to FO4 delays.
pub const FO4_LABEL: &str = "FO4";
/// Unit label of areas normalised to NAND2-equivalents.
pub const NAND2_LABEL: &str = "NAND2 eq.";
/// Unit label of energies normalised to the inverter's switching energy.
pub const INVERTER_ENERGY_LABEL: &str = "inv. switchings";

/// What a comparison knows about one library's units and yardsticks.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LibraryScale {
    /// Unit of area (empty when unknown).
    pub area_unit: String,
    /// Unit of delay (empty when unknown).
    pub delay_unit: String,
    /// Unit of energy; `None` when the library models no switching energy.
    pub energy_unit: Option<String>,
    /// Unit of static power; `None` when the library models no leakage.
    pub power_unit: Option<String>,
    /// FO4 delay in the delay unit, when the library has an inverter.
    pub fo4_delay: Option<f64>,
    /// NAND2 (or AND2) area in the area unit, when the library has one.
    pub nand2_area: Option<f64>,
    /// Inverter switching energy, when the library has an inverter with a
    /// positive one.
    pub inverter_energy: Option<f64>,
}

/// Truth table of a one-input inverter (row 0 gives 1).
const INVERTER_TRUTH: u64 = 0b01;
/// Truth table of a two-input NAND.
const NAND2_TRUTH: u64 = 0b0111;
/// Truth table of a two-input AND.
const AND2_TRUTH: u64 = 0b1000;

impl LibraryScale {
    /// Units and yardsticks of `library`. Where several cells compute the
    /// yardstick function, the smallest (by area) is used.
    pub fn of(library: &Library) -> LibraryScale {
        let smallest = |arity: usize, truth: u64| {
            library
                .cells
                .iter()
                .filter(|c| c.arity() == arity && c.truth == truth)
                .min_by(|a, b| a.area.total_cmp(&b.area))
        };
        let inverter = smallest(1, INVERTER_TRUTH);
        let models_energy = library.cells.iter().any(|c| c.switch_energy > 0.0);
        let models_leakage = library.cells.iter().any(|c| match &c.leakage {
            Leakage::Constant(v) => *v > 0.0,
            Leakage::PerRow(rows) => rows.iter().any(|v| *v > 0.0),
        });
        LibraryScale {
            area_unit: library.units.area.clone(),
            delay_unit: library.units.delay.clone(),
            energy_unit: models_energy.then(|| library.units.energy.clone()),
            power_unit: models_leakage.then(|| library.units.power.clone()),
            fo4_delay: inverter
                .map(|i| i.delay.intrinsic + i.delay.per_load * 4.0 * i.input_load)
                .filter(|d| *d > 0.0),
            nand2_area: smallest(2, NAND2_TRUTH)
                .or_else(|| smallest(2, AND2_TRUTH))
                .map(|c| c.area)
                .filter(|a| *a > 0.0),
            inverter_energy: inverter.map(|i| i.switch_energy).filter(|e| *e > 0.0),
        }
    }

    /// Units as a result line records them (its `units` object); energy and
    /// power are taken as modelled, since a line cannot tell.
    pub fn from_record(record: &StudyRecord) -> LibraryScale {
        let unit = |key: &str| -> String {
            record
                .extra
                .get("units")
                .and_then(|u| u.get(key))
                .and_then(|v| v.as_str())
                .unwrap_or_default()
                .to_string()
        };
        LibraryScale {
            area_unit: unit("area"),
            delay_unit: unit("delay"),
            energy_unit: Some(unit("energy")),
            power_unit: Some(unit("power")),
            ..LibraryScale::default()
        }
    }

    /// The unit system in words, e.g. `nm2, ps`.
    pub fn system(&self) -> String {
        format!("{}, {}", self.area_unit, self.delay_unit)
    }
}

/// The one unit every library shares for a figure, or an error naming two
/// libraries whose units differ. Unknown (empty) units match anything;
/// libraries that do not model the figure (`None`) are left out.
fn common_unit<'a>(
    scales: &'a IndexMap<String, LibraryScale>,
    unit: impl Fn(&'a LibraryScale) -> Option<&'a str>,
) -> Result<Option<&'a str>, (&'a str, &'a str)> {
    let mut first: Option<(&str, &str)> = None;
    for (name, scale) in scales {
        let Some(u) = unit(scale).filter(|u| !u.is_empty()) else {
            continue;
        };
        match first {
            None => first = Some((name, u)),
            Some((_, f)) if f == u => {}
            Some((other, _)) => return Err((other, name)),
        }
    }
    Ok(first.map(|(_, u)| u))
}

/// How a table shows each figure: the libraries' yardsticks, whether
/// figures are normalised, and the unit label of each column.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct TableUnits {
    /// Yardsticks by library name.
    pub scales: IndexMap<String, LibraryScale>,
    /// True when area, delay and energy are shown in yardsticks.
    pub normalize: bool,
    /// Unit label of the area column.
    pub area: String,
    /// Unit label of the delay column.
    pub delay: String,
    /// Unit label of the energy column (`None`: no library models energy).
    pub energy: Option<String>,
    /// Unit label of the static power column (`None`: not shown, because
    /// no library models it or the units differ under normalisation).
    pub power: Option<String>,
}

impl TableUnits {
    /// Checks that the libraries' figures can be set side by side and
    /// names each column's unit. Without `normalize`, libraries of
    /// different unit systems are refused with a one-line message naming
    /// both systems; with it, every library needs its yardsticks.
    pub fn new(
        scales: IndexMap<String, LibraryScale>,
        normalize: bool,
    ) -> Result<TableUnits, String> {
        let refuse = |a: &str, b: &str, what: &str| -> String {
            format!(
                "cannot compare {a} ({}) with {b} ({}): their {what} units differ, so ratios \
                 would mix units; give --normalize to compare in FO4 delays, NAND2-equivalents \
                 and inverter switchings",
                scales[a].system(),
                scales[b].system()
            )
        };
        if normalize {
            for (name, s) in &scales {
                if s.fo4_delay.is_none() {
                    return Err(format!(
                        "--normalize: library '{name}' has no inverter with a positive delay, so it has no FO4 delay"
                    ));
                }
                if s.nand2_area.is_none() {
                    return Err(format!(
                        "--normalize: library '{name}' has neither a two-input NAND nor a two-input AND of positive area"
                    ));
                }
            }
            let energy = scales
                .values()
                .any(|s| s.energy_unit.is_some() && s.inverter_energy.is_some())
                .then(|| INVERTER_ENERGY_LABEL.to_string());
            let power = common_unit(&scales, |s| s.power_unit.as_deref())
                .ok()
                .flatten()
                .map(str::to_string);
            return Ok(TableUnits {
                scales,
                normalize,
                area: NAND2_LABEL.into(),
                delay: FO4_LABEL.into(),
                energy,
                power,
            });
        }
        let area = common_unit(&scales, |s| Some(s.area_unit.as_str()))
            .map_err(|(a, b)| refuse(a, b, "area"))?
            .unwrap_or_default()
            .to_string();
        let delay = common_unit(&scales, |s| Some(s.delay_unit.as_str()))
            .map_err(|(a, b)| refuse(a, b, "delay"))?
            .unwrap_or_default()
            .to_string();
        let energy = common_unit(&scales, |s| s.energy_unit.as_deref())
            .map_err(|(a, b)| refuse(a, b, "energy"))?
            .map(str::to_string);
        let power = common_unit(&scales, |s| s.power_unit.as_deref())
            .map_err(|(a, b)| refuse(a, b, "power"))?
            .map(str::to_string);
        Ok(TableUnits {
            scales,
            normalize,
            area,
            delay,
            energy,
            power,
        })
    }

    /// Units read from the records themselves (no yardsticks, not
    /// normalised); mixed units are not checked.
    pub fn from_records(records: &[StudyRecord]) -> TableUnits {
        let mut scales = IndexMap::new();
        for r in records {
            scales
                .entry(r.library.clone())
                .or_insert_with(|| LibraryScale::from_record(r));
        }
        let label = |f: fn(&LibraryScale) -> String| {
            scales
                .values()
                .map(f)
                .find(|u| !u.is_empty())
                .unwrap_or_default()
        };
        let area = label(|s| s.area_unit.clone());
        let delay = label(|s| s.delay_unit.clone());
        let energy = Some(label(|s| s.energy_unit.clone().unwrap_or_default()));
        let power = Some(label(|s| s.power_unit.clone().unwrap_or_default()));
        TableUnits {
            scales,
            normalize: false,
            area,
            delay,
            energy,
            power,
        }
    }

    fn scale(&self, library: &str) -> Option<&LibraryScale> {
        self.scales.get(library)
    }

    /// Area of `r` as shown: in NAND2-equivalents when normalised.
    pub fn area(&self, r: &StudyRecord) -> Option<f64> {
        match (self.normalize, self.scale(&r.library)) {
            (true, Some(s)) => s.nand2_area.map(|a| r.area / a),
            (true, None) => None,
            (false, _) => Some(r.area),
        }
    }

    /// Delay of `r` as shown: in FO4 delays when normalised.
    pub fn delay(&self, r: &StudyRecord) -> Option<f64> {
        match (self.normalize, self.scale(&r.library)) {
            (true, Some(s)) => s.fo4_delay.map(|d| r.delay / d),
            (true, None) => None,
            (false, _) => Some(r.delay),
        }
    }

    /// Energy per operation of `r` as shown; `None` when its library does
    /// not model energy (or, normalised, has no inverter energy).
    pub fn energy(&self, r: &StudyRecord) -> Option<f64> {
        let s = self.scale(&r.library);
        if s.is_some_and(|s| s.energy_unit.is_none()) || self.energy.is_none() {
            return None;
        }
        if self.normalize {
            return s?.inverter_energy.map(|e| r.energy_per_op / e);
        }
        Some(r.energy_per_op)
    }

    /// Static power of `r` as shown; `None` when its library models no
    /// leakage or the column is not shown.
    pub fn static_power(&self, r: &StudyRecord) -> Option<f64> {
        let s = self.scale(&r.library);
        if s.is_some_and(|s| s.power_unit.is_none()) || self.power.is_none() {
            return None;
        }
        Some(r.static_power)
    }
}

/// Formats `x` rounded to six significant digits, without trailing zeros
/// (`1234567` → `1234570`, `0.000123456789` → `0.000123457`).
pub fn six_significant(x: f64) -> String {
    if !x.is_finite() {
        return "n/a".into();
    }
    if x == 0.0 {
        return "0".into();
    }
    let rounded: f64 = format!("{x:.5e}").parse().unwrap_or(x);
    let magnitude = rounded.abs().log10().floor() as i32;
    let decimals = (5 - magnitude).max(0) as usize;
    let text = format!("{rounded:.decimals$}");
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn six_significant_digits_by_decimal_rounding() {
        // Expected strings by hand: round half away at the sixth digit.
        assert_eq!(six_significant(1234567.0), "1234570");
        assert_eq!(six_significant(0.000123456789), "0.000123457");
        assert_eq!(six_significant(2.0 / 3.0), "0.666667");
        assert_eq!(six_significant(282060.0), "282060");
        assert_eq!(six_significant(-12.5), "-12.5");
        assert_eq!(six_significant(0.0), "0");
    }

    #[test]
    fn cmos_fo4_is_five_tau_by_logical_effort() {
        // Sutherland, Sproull and Harris, "Logical Effort" (1999): an
        // inverter (p = 1, g = 1) driving four inverters has h = 4 and
        // delay d = p + g·h = 5 τ.
        let lib = Library::builtin("cmos-le").unwrap();
        let s = LibraryScale::of(&lib);
        assert_eq!(s.fo4_delay, Some(5.0));
        // A two-input NAND is four transistors (common practice).
        assert_eq!(s.nand2_area, Some(4.0));
        assert_eq!(s.energy_unit, None);
    }
}
