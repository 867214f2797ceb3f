//! Implementations: small networks of library cells over the leaves of a cut.
//!
//! Every entry of the match table is an [`Implementation`]: one cell, or a
//! supergate of a few cells, whose inputs are cut leaves in either phase or
//! constants. Leaves used complemented are *not* inverted inside the
//! implementation: the cover takes the complemented phase of the leaf node,
//! which is either mapped directly or gets a shared inverter charged once.
//! Extra implementations (for example optimum networks per NPN class from
//! exact synthesis) are added with [`Implementation::new`] and
//! `MatchTable::add`.

use super::small_truth::{replicate, VAR_MASKS};
use crate::library::Library;

/// Where an input pin of a gate inside an implementation is connected.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Source {
    /// Cut leaf `var` (0-based position in the cut), possibly complemented.
    Leaf {
        /// Leaf position.
        var: u8,
        /// True when the complemented phase of the leaf is used.
        complemented: bool,
    },
    /// The output of an earlier gate of the same implementation.
    Gate(u8),
    /// A constant tie.
    Constant(bool),
}

/// One cell instance inside an implementation.
#[derive(Clone, Debug, PartialEq)]
pub struct ImplGate {
    /// Index of the cell in the library.
    pub cell: u32,
    /// One source per cell input pin, in pin order.
    pub inputs: Vec<Source>,
}

/// How a leaf phase reaches the output: the worst delay from that leaf to
/// the output, without the load-dependent part of the output gate.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LeafUse {
    /// Leaf position in the cut.
    pub var: u8,
    /// True when the leaf is used complemented.
    pub complemented: bool,
    /// Delay from this leaf to the output, the output gate's intrinsic delay
    /// included, its load term excluded.
    pub delay: f32,
}

/// A network of library cells computing one function of cut leaves.
#[derive(Clone, Debug, PartialEq)]
pub struct Implementation {
    /// The function, replicated six-variable table over the leaf positions.
    pub function: u64,
    /// Gates in topological order; the last one drives the output.
    pub gates: Vec<ImplGate>,
    /// Total cell area.
    pub area: f64,
    /// Total devices.
    pub devices: u32,
    /// Distinct leaf phases used, with their delays.
    pub leaf_uses: Vec<LeafUse>,
    /// `per_load` of the output gate, multiplied by the load it drives.
    pub root_per_load: f32,
}

impl Implementation {
    /// Builds an implementation from its gates (topological, last is the
    /// output), computing function, area and pin delays from the library.
    /// Returns `None` when a source refers to a later gate or a pin count
    /// does not match its cell.
    pub fn new(lib: &Library, gates: Vec<ImplGate>) -> Option<Implementation> {
        // Per gate: its table, the load its output drives inside the
        // implementation, and the delay from each leaf phase to its output
        // (excluding the root's load term). On the stack for the usual few
        // gates: the supergate generator builds millions of these.
        const INLINE: usize = 8;
        type Scratch = (u64, f64, [Option<f32>; 12]);
        let blank: Scratch = (0, 0.0, [None; 12]);
        let mut inline = [blank; INLINE];
        let mut heap = Vec::new();
        let scratch: &mut [Scratch] = if gates.len() <= INLINE {
            &mut inline[..gates.len()]
        } else {
            heap.resize(gates.len(), blank);
            &mut heap
        };
        Self::evaluate(lib, &gates, scratch)?;
        let (function, _, root_delays) = *scratch.last()?;
        let mut area = 0.0;
        let mut devices = 0;
        for gate in &gates {
            let cell = &lib.cells[gate.cell as usize];
            area += cell.area;
            devices += cell.devices;
        }
        let root = &lib.cells[gates.last()?.cell as usize];
        let leaf_uses = root_delays
            .iter()
            .enumerate()
            .filter_map(|(slot, d)| {
                d.map(|delay| LeafUse {
                    var: (slot / 2) as u8,
                    complemented: slot % 2 == 1,
                    delay,
                })
            })
            .collect();
        Some(Implementation {
            function,
            gates,
            area,
            devices,
            leaf_uses,
            root_per_load: root.delay.per_load as f32,
        })
    }

    /// Fills `scratch` (one entry per gate, zeroed) with each gate's table,
    /// inner load and leaf-phase delays; `None` when the gates are not a
    /// well-formed implementation over `lib` (see [`Implementation::new`]).
    fn evaluate(
        lib: &Library,
        gates: &[ImplGate],
        scratch: &mut [(u64, f64, [Option<f32>; 12])],
    ) -> Option<()> {
        if gates.is_empty() {
            return None;
        }
        for (g, gate) in gates.iter().enumerate() {
            let cell = lib.cells.get(gate.cell as usize)?;
            if cell.arity() != gate.inputs.len() || gate.inputs.len() > 6 {
                return None;
            }
            for s in &gate.inputs {
                match *s {
                    Source::Gate(j) if (j as usize) < g => scratch[j as usize].1 += cell.input_load,
                    Source::Gate(_) => return None,
                    Source::Leaf { var, .. } if var >= 6 => return None,
                    _ => {}
                }
            }
        }
        for (g, gate) in gates.iter().enumerate() {
            let cell = &lib.cells[gate.cell as usize];
            let own = if g + 1 == gates.len() {
                cell.delay.intrinsic
            } else {
                cell.delay.intrinsic + cell.delay.per_load * scratch[g].1
            } as f32;
            let mut ins = [0u64; 6];
            let mut arrival = [None::<f32>; 12];
            for (k, s) in gate.inputs.iter().enumerate() {
                ins[k] = match *s {
                    Source::Leaf { var, complemented } => {
                        let slot = var as usize * 2 + complemented as usize;
                        arrival[slot] = Some(arrival[slot].unwrap_or(0.0).max(own));
                        let v = VAR_MASKS[var as usize];
                        if complemented {
                            !v
                        } else {
                            v
                        }
                    }
                    Source::Gate(j) => {
                        for (slot, d) in scratch[j as usize].2.iter().enumerate() {
                            if let Some(d) = d {
                                let t = d + own;
                                arrival[slot] = Some(arrival[slot].map_or(t, |a| a.max(t)));
                            }
                        }
                        scratch[j as usize].0
                    }
                    Source::Constant(c) => {
                        if c {
                            u64::MAX
                        } else {
                            0
                        }
                    }
                };
            }
            scratch[g].0 = evaluate_cell(cell.truth, &ins[..gate.inputs.len()]);
            scratch[g].2 = arrival;
        }
        Some(())
    }

    /// Area including one inverter (of area `inverter_area`) per leaf used
    /// complemented: what the implementation costs where no complemented
    /// leaf is available for free.
    pub fn standalone_area(&self, inverter_area: f64) -> f64 {
        let complemented = self.leaf_uses.iter().filter(|u| u.complemented).count();
        self.area + inverter_area * complemented as f64
    }

    /// Area of the cheapest single cell computing `!a`, the price of a
    /// complemented leaf (zero when the library has no inverter cell).
    pub fn inverter_area(lib: &Library) -> f64 {
        lib.cells
            .iter()
            .filter(|c| c.arity() == 1 && c.truth & 0b11 == 0b01)
            .map(|c| c.area)
            .fold(None, |best: Option<f64>, a| {
                Some(best.map_or(a, |b| b.min(a)))
            })
            .unwrap_or(0.0)
    }

    /// The leaf phases the implementation reads, one bit per
    /// `2 * leaf position + complemented`: two implementations of a function
    /// with the same area and the same leaf phases cost the same in any
    /// cover, and with other leaf phases they may not.
    pub fn leaf_phases(&self) -> u16 {
        self.leaf_uses.iter().fold(0, |m, u| {
            m | 1 << (2 * u.var as u16 + u.complemented as u16)
        })
    }

    /// Worst leaf-to-output delay when the output drives `load`.
    pub fn delay(&self, load: f32) -> f32 {
        self.leaf_uses.iter().map(|u| u.delay).fold(0.0, f32::max) + self.root_per_load * load
    }
}

/// The costs by which the supergate generator and the match table decide
/// which implementations of a function to keep: per function, the best under
/// each of [`KEEP_CRITERIA`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct KeepCosts {
    /// Area of the implementation's own cells.
    pub area: f32,
    /// Area with one inverter per complemented leaf.
    pub standalone: f32,
    /// Delay when the output drives the typical load.
    pub delay: f32,
}

/// Cost differences smaller than this are ties.
const COST_TOLERANCE: f32 = 1e-6;

impl KeepCosts {
    /// The costs of `imp` with inverters of `inverter_area`, driving `load`.
    pub fn of(imp: &Implementation, inverter_area: f64, load: f32) -> KeepCosts {
        KeepCosts {
            area: imp.area as f32,
            standalone: imp.standalone_area(inverter_area) as f32,
            delay: imp.delay(load),
        }
    }

    /// Costs of an implementation not built yet, whose complemented leaves
    /// are unknown: its area stands in for the standalone area (a lower
    /// bound, so a test against it prunes only what cannot be kept).
    pub fn before_leaves(area: f32, delay: f32) -> KeepCosts {
        KeepCosts {
            area,
            standalone: area,
            delay,
        }
    }

    /// Less area, or equal area and less standalone area. Delays play no
    /// part, so the area-optimal entries of a table (and the supergates
    /// built from them) are the same for any two libraries with the same
    /// cell areas.
    pub fn cheaper(&self, other: &KeepCosts) -> bool {
        less_then(self.area, other.area, self.standalone, other.standalone)
    }

    /// Less standalone area, or equal and less area (no delays, as for
    /// [`KeepCosts::cheaper`]).
    pub fn cheaper_standalone(&self, other: &KeepCosts) -> bool {
        less_then(self.standalone, other.standalone, self.area, other.area)
    }

    /// Less delay, or equal delay and less area.
    pub fn faster(&self, other: &KeepCosts) -> bool {
        less_then(self.delay, other.delay, self.area, other.area)
    }
}

/// `a` below `b`, or tied and `tie_a` below `tie_b`.
fn less_then(a: f32, b: f32, tie_a: f32, tie_b: f32) -> bool {
    a < b - COST_TOLERANCE || (a <= b + COST_TOLERANCE && tie_a < tie_b - COST_TOLERANCE)
}

/// The keep criteria: cheapest by area, cheapest with an inverter paid per
/// complemented leaf (a table that kept only the raw cheapest would map a
/// NOR3 as an AND3 behind three inverters), fastest.
pub const KEEP_CRITERIA: [fn(&KeepCosts, &KeepCosts) -> bool; 3] = [
    KeepCosts::cheaper,
    KeepCosts::cheaper_standalone,
    KeepCosts::faster,
];

/// The output table of a cell whose inputs carry the tables `inputs`
/// (sum of the cell's minterms).
#[inline]
pub fn evaluate_cell(truth: u64, inputs: &[u64]) -> u64 {
    let rows = 1usize << inputs.len();
    let mut out = 0u64;
    for r in 0..rows {
        if (truth >> r) & 1 == 1 {
            let mut m = u64::MAX;
            for (i, &t) in inputs.iter().enumerate() {
                m &= if (r >> i) & 1 == 1 { t } else { !t };
            }
            out |= m;
        }
    }
    out
}

/// The cell truth table replicated over six variables.
pub fn cell_table(lib: &Library, cell: usize) -> u64 {
    let c = &lib.cells[cell];
    replicate(c.truth, c.arity())
}
