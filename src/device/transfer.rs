//! Voltage transfer curves of a complementary cell and the input thresholds
//! read from them.
//!
//! With insulated gates downstream, the output is the divider
//! `V = Vdd · Gu / (Gu + Gd)`. Sweeping one input with the others held at
//! logic levels gives a transfer curve; VIL and VIH are the input voltages
//! where the gain |dV/dVin| is 1, and VM is where V = Vdd / 2 (Rabaey,
//! Chandrakasan and Nikolić, *Digital Integrated Circuits*, 2nd ed., 2003).
//! Between grid points the tables are multilinear, so along one input each
//! conductance is piecewise linear and the gain has a closed form inside
//! each grid interval; the curve is sampled finely and crossings are
//! interpolated between samples.

use super::table::ConductanceTable;

/// Samples per sweep.
pub const SWEEP_SAMPLES: usize = 4001;

/// Static output of a cell at given input voltages.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DividerPoint {
    /// Pull-up conductance in siemens.
    pub pull_up_s: f64,
    /// Pull-down conductance in siemens.
    pub pull_down_s: f64,
    /// Output voltage `Vdd · Gu / (Gu + Gd)` in volts.
    pub output_v: f64,
    /// Static supply current `Vdd · Gu · Gd / (Gu + Gd)` in amperes.
    pub current_a: f64,
}

/// The divider formula for one pair of conductances.
pub fn divider(supply_v: f64, pull_up_s: f64, pull_down_s: f64) -> DividerPoint {
    let total = pull_up_s + pull_down_s;
    DividerPoint {
        pull_up_s,
        pull_down_s,
        output_v: supply_v * pull_up_s / total,
        current_a: supply_v * pull_up_s * pull_down_s / total,
    }
}

/// One transfer curve: input `input` swept, the others at the logic levels
/// of `row` (bit k of `row` is input k).
#[derive(Clone, Debug, PartialEq)]
pub struct TransferCurve {
    /// Index of the swept input.
    pub input: usize,
    /// Logic row of the other inputs (the swept input's bit is 0).
    pub row: usize,
    /// Whether the output falls as the input rises.
    pub inverting: bool,
    /// Input voltage where |gain| first reaches 1 (VM when it never does).
    pub vil: f64,
    /// Input voltage where |gain| last is 1 (VM when it never reaches 1).
    pub vih: f64,
    /// Input voltage where the output crosses Vdd / 2.
    pub vm: f64,
    /// Largest |gain| along the sweep.
    pub max_gain: f64,
    /// Whether |gain| reaches 1 (the cell restores levels along this curve).
    pub restoring: bool,
    /// (input V, output V) samples for plotting, about 200 of them.
    pub samples: Vec<(f64, f64)>,
}

/// Sweeps input `input` over the tables' common range with the other inputs
/// at `low_v` / `high_v` as `row` says.
pub fn sweep(
    up: &ConductanceTable,
    down: &ConductanceTable,
    supply_v: f64,
    input: usize,
    row: usize,
    low_v: f64,
    high_v: f64,
) -> TransferCurve {
    let n = up.arity();
    let (up_lo, up_hi) = up.span(input);
    let (down_lo, down_hi) = down.span(input);
    let from = up_lo.max(down_lo);
    let to = up_hi.min(down_hi);
    let mut volts: Vec<f64> = (0..n)
        .map(|k| if row >> k & 1 == 1 { high_v } else { low_v })
        .collect();
    let mut xs = Vec::with_capacity(SWEEP_SAMPLES);
    let mut outs = Vec::with_capacity(SWEEP_SAMPLES);
    let mut gains = Vec::with_capacity(SWEEP_SAMPLES);
    for i in 0..SWEEP_SAMPLES {
        let x = from + (to - from) * i as f64 / (SWEEP_SAMPLES - 1) as f64;
        volts[input] = x;
        let gu = up.conductance(&volts);
        let gd = down.conductance(&volts);
        let du = slope(up, &volts, input);
        let dd = slope(down, &volts, input);
        let total = gu + gd;
        xs.push(x);
        outs.push(supply_v * gu / total);
        gains.push(supply_v * (du * gd - gu * dd) / (total * total));
    }
    let inverting = outs[outs.len() - 1] < outs[0];
    let abs: Vec<f64> = gains.iter().map(|g| g.abs()).collect();
    let max_gain = abs.iter().cloned().fold(0.0, f64::max);
    let half = supply_v / 2.0;
    let vm = crossing(&xs, &outs, half).unwrap_or((from + to) / 2.0);
    let restoring = max_gain >= 1.0;
    let (vil, vih) = if restoring {
        let first = abs.iter().position(|&g| g >= 1.0).unwrap_or(0);
        let last = abs.iter().rposition(|&g| g >= 1.0).unwrap_or(abs.len() - 1);
        let vil = if first == 0 {
            xs[0]
        } else {
            lerp_at(xs[first - 1], xs[first], abs[first - 1], abs[first], 1.0)
        };
        let vih = if last + 1 == abs.len() {
            xs[last]
        } else {
            lerp_at(xs[last], xs[last + 1], abs[last], abs[last + 1], 1.0)
        };
        (vil, vih)
    } else {
        (vm, vm)
    };
    let stride = (SWEEP_SAMPLES - 1) / 200;
    let samples = (0..SWEEP_SAMPLES)
        .step_by(stride.max(1))
        .map(|i| (xs[i], outs[i]))
        .collect();
    TransferCurve {
        input,
        row,
        inverting,
        vil,
        vih,
        vm,
        max_gain,
        restoring,
        samples,
    }
}

/// Slope dG/dv of the multilinear interpolant along `input` at `volts`:
/// the interpolant is linear along one axis inside a grid interval.
fn slope(table: &ConductanceTable, volts: &[f64], input: usize) -> f64 {
    let axis = &table.axes[input];
    let last = axis.len() - 1;
    let v = volts[input];
    if v < axis[0] || v > axis[last] {
        return 0.0;
    }
    let i = (axis.partition_point(|&x| x <= v).max(1) - 1).min(last - 1);
    let mut at = volts.to_vec();
    at[input] = axis[i];
    let g0 = table.conductance(&at);
    at[input] = axis[i + 1];
    let g1 = table.conductance(&at);
    (g1 - g0) / (axis[i + 1] - axis[i])
}

/// Where `ys` crosses `level`, interpolated linearly between samples.
fn crossing(xs: &[f64], ys: &[f64], level: f64) -> Option<f64> {
    (1..xs.len()).find_map(|i| {
        let (a, b) = (ys[i - 1] - level, ys[i] - level);
        if a == 0.0 {
            Some(xs[i - 1])
        } else if a * b < 0.0 || b == 0.0 {
            Some(lerp_at(xs[i - 1], xs[i], ys[i - 1], ys[i], level))
        } else {
            None
        }
    })
}

fn lerp_at(x0: f64, x1: f64, y0: f64, y1: f64, level: f64) -> f64 {
    if y1 == y0 {
        x0
    } else {
        x0 + (x1 - x0) * (level - y0) / (y1 - y0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn linear(values: [f64; 2]) -> ConductanceTable {
        ConductanceTable {
            file: "t".into(),
            inputs: vec!["a".into()],
            axes: vec![vec![0.0, 0.2]],
            values: values.to_vec(),
        }
    }

    /// Hand-checked: with Gu = 1 - 4.5 v (µS·V⁻¹ scaled) and Gd = 0.1 + 4.5 v on
    /// 0..0.2 V, Gu + Gd = 1.1 is constant, so V = Vdd·Gu/1.1 is linear with
    /// gain Vdd·4.5/1.1 = 0.818 at Vdd = 0.2 V: below 1, not restoring, and
    /// VM is where Gu = Gd, v = 0.1 V.
    #[test]
    fn linear_divider_gain_by_hand() {
        let up = linear([1.0, 0.1]);
        let down = linear([0.1, 1.0]);
        let c = sweep(&up, &down, 0.2, 0, 0, 0.0, 0.2);
        assert!(
            (c.max_gain - 0.2 * 4.5 / 1.1).abs() < 1e-9,
            "{}",
            c.max_gain
        );
        assert!(!c.restoring && c.inverting);
        assert!((c.vm - 0.1).abs() < 1e-6);
        assert_eq!((c.vil, c.vih), (c.vm, c.vm));
    }
}
