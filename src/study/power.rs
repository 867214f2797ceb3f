//! Switching-activity energy and static power of a circuit of library cells.
//!
//! The model is the usual one for a first architecture estimate: drive the
//! circuit with a sequence of input patterns, count how often each net
//! changes value between consecutive patterns, and charge each change of a
//! cell's output net with that cell's `switch_energy` plus, when the library
//! gives one, its `switch_energy_per_load` times the load the net drives (the
//! `½·C_load·Vdd²` of the driven gates). Dividing by the number
//! of pattern transitions gives the dynamic energy of one operation (one new
//! input vector). Static power is the sum of cell leakage; when a cell gives
//! one leakage value per input row, each row is weighted by how often it
//! occurred in the same simulation.
//!
//! The circuit is described by a [`SwitchingCircuit`], a flat list of cell
//! instances over numbered nets, so the model does not depend on how the
//! mapper stores its result: any mapped netlist converts into one. Patterns
//! come from a [`Stimulus`]: random words with a settable probability of a
//! one (built by combining random words bit by bit of the probability), or an
//! explicit list of [`InputVectors`] read from a file. Simulation is
//! word-parallel, 64 patterns per machine word, and deterministic for a given
//! seed.

use crate::diag::SourceError;
use crate::library::{Leakage, Library};
use crate::network::SplitMix64;

/// A circuit of library cells over numbered nets, in topological order.
///
/// Net 0 is constant 0, net 1 is constant 1, nets `2..2 + input_count` are
/// the combinational inputs (in declaration order), and gate `g` drives net
/// `2 + input_count + g`. Every fanin of a gate is a smaller net.
#[derive(Clone, Debug, Default)]
pub struct SwitchingCircuit {
    input_count: u32,
    /// Library cell index of each gate.
    cells: Vec<u32>,
    /// Start of each gate's fanins in `fanins` (one extra entry at the end).
    fanin_start: Vec<u32>,
    /// Fanin nets of all gates, concatenated.
    fanins: Vec<u32>,
    /// Per gate: how many circuit ends (primary outputs, storage data
    /// inputs) its output net drives; each adds the library's
    /// `primary_output_load`.
    end_refs: Vec<u32>,
}

/// Net number of constant 0.
pub const NET_FALSE: u32 = 0;
/// Net number of constant 1.
pub const NET_TRUE: u32 = 1;

/// Errors of the energy model.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PowerError {
    /// A gate names a cell the library does not have.
    #[error("gate {gate} uses cell index {cell}, but library '{library}' has {cells} cells")]
    UnknownCell {
        /// Gate number.
        gate: usize,
        /// Cell index used.
        cell: u32,
        /// Library name.
        library: String,
        /// Number of cells in the library.
        cells: usize,
    },
    /// A gate's fanin count differs from its cell's input count.
    #[error("gate {gate} has {found} fanins, but cell '{cell}' has {expected} inputs")]
    ArityMismatch {
        /// Gate number.
        gate: usize,
        /// Cell name.
        cell: String,
        /// Fanins given.
        found: usize,
        /// Inputs of the cell.
        expected: usize,
    },
    /// The input probability is outside [0, 1].
    #[error("input probability {0} is not between 0 and 1")]
    BadProbability(f64),
    /// The input vectors have a different width than the circuit's inputs.
    #[error("input vectors have {found} bits per line, but the circuit has {expected} inputs")]
    VectorWidth {
        /// Bits per vector line.
        found: usize,
        /// Primary inputs of the circuit.
        expected: usize,
    },
}

impl SwitchingCircuit {
    /// An empty circuit with `input_count` combinational inputs.
    pub fn new(input_count: u32) -> SwitchingCircuit {
        SwitchingCircuit {
            input_count,
            cells: Vec::new(),
            fanin_start: vec![0],
            fanins: Vec::new(),
            end_refs: Vec::new(),
        }
    }

    /// Records that `net` drives a circuit end (a primary output or a
    /// storage data input), which loads it with the library's
    /// `primary_output_load` like static timing does. Ends on inputs and
    /// constants are ignored (they carry no cell energy).
    pub fn add_end(&mut self, net: u32) {
        let first_gate = 2 + self.input_count;
        if net >= first_gate {
            if let Some(refs) = self.end_refs.get_mut((net - first_gate) as usize) {
                *refs += 1;
            }
        }
    }

    /// Load on each gate's output net in input-load units: the `input_load`
    /// of every cell pin it drives plus `primary_output_load` per circuit
    /// end (the same loads static timing uses).
    pub fn output_loads(&self, library: &Library) -> Vec<f64> {
        let first_gate = 2 + self.input_count;
        let mut load: Vec<f64> = self
            .end_refs
            .iter()
            .map(|&r| r as f64 * library.primary_output_load)
            .collect();
        for g in 0..self.gate_count() {
            let pin_load = library
                .cells
                .get(self.cells[g] as usize)
                .map_or(0.0, |c| c.input_load);
            for &f in self.gate_fanins(g) {
                if f >= first_gate {
                    load[(f - first_gate) as usize] += pin_load;
                }
            }
        }
        load
    }

    /// Net of combinational input `i` (0-based, declaration order).
    pub fn input_net(&self, i: u32) -> u32 {
        debug_assert!(i < self.input_count);
        2 + i
    }

    /// Adds an instance of library cell `cell` whose input pin k is driven
    /// by `fanins[k]`; returns the net it drives. Fanins must be existing
    /// nets (this is checked: a bad net panics only in debug builds and is
    /// treated as constant 0 otherwise).
    pub fn add_gate(&mut self, cell: u32, fanins: &[u32]) -> u32 {
        let net = self.net_count();
        debug_assert!(fanins.iter().all(|&f| f < net), "fanin net out of order");
        self.cells.push(cell);
        self.fanins
            .extend(fanins.iter().map(|&f| if f < net { f } else { NET_FALSE }));
        self.fanin_start.push(self.fanins.len() as u32);
        self.end_refs.push(0);
        net
    }

    /// Number of combinational inputs.
    pub fn input_count(&self) -> u32 {
        self.input_count
    }

    /// Number of gates (cell instances).
    pub fn gate_count(&self) -> usize {
        self.cells.len()
    }

    /// Number of nets (constants, inputs and gate outputs).
    pub fn net_count(&self) -> u32 {
        2 + self.input_count + self.cells.len() as u32
    }

    /// Library cell index of gate `g`.
    pub fn gate_cell(&self, g: usize) -> u32 {
        self.cells[g]
    }

    /// Fanin nets of gate `g`.
    pub fn gate_fanins(&self, g: usize) -> &[u32] {
        &self.fanins[self.fanin_start[g] as usize..self.fanin_start[g + 1] as usize]
    }

    /// Checks that every gate names a cell of `library` with the right
    /// number of inputs (at most six).
    pub fn check_against(&self, library: &Library) -> Result<(), PowerError> {
        for g in 0..self.gate_count() {
            let cell = self.cells[g];
            let Some(c) = library.cells.get(cell as usize) else {
                return Err(PowerError::UnknownCell {
                    gate: g,
                    cell,
                    library: library.name.clone(),
                    cells: library.cells.len(),
                });
            };
            let found = self.gate_fanins(g).len();
            if found != c.arity() || found > 6 {
                return Err(PowerError::ArityMismatch {
                    gate: g,
                    cell: c.name.clone(),
                    found,
                    expected: c.arity(),
                });
            }
        }
        Ok(())
    }
}

/// Explicit input vectors: one vector per pattern, one bit per primary
/// input, packed 64 patterns to a word per input.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct InputVectors {
    width: usize,
    count: u64,
    /// `words[i]` holds input i's bits, pattern p at bit p % 64 of word p / 64.
    words: Vec<Vec<u64>>,
}

impl InputVectors {
    /// Vectors from rows of bits (`rows[p][i]` = input i in pattern p).
    /// Every row must have `width` bits; shorter or longer rows are an error
    /// reported as [`PowerError::VectorWidth`].
    pub fn from_rows(width: usize, rows: &[Vec<bool>]) -> Result<InputVectors, PowerError> {
        let mut v = InputVectors {
            width,
            count: 0,
            words: vec![Vec::new(); width],
        };
        for row in rows {
            if row.len() != width {
                return Err(PowerError::VectorWidth {
                    found: row.len(),
                    expected: width,
                });
            }
            v.push(row.iter().copied());
        }
        Ok(v)
    }

    fn push(&mut self, bits: impl Iterator<Item = bool>) {
        let word = (self.count / 64) as usize;
        let bit = self.count % 64;
        for (i, b) in bits.enumerate() {
            let w = &mut self.words[i];
            if w.len() <= word {
                w.resize(word + 1, 0);
            }
            if b {
                w[word] |= 1u64 << bit;
            }
        }
        if self.width == 0 {
            // nothing to store; the count alone matters
        }
        self.count += 1;
    }

    /// Parses a vector file: one vector per line, a string of `0` and `1`
    /// giving the primary inputs in declaration order. Blank lines and lines
    /// starting with `#` are skipped; `_` and spaces inside a vector are
    /// ignored so long vectors can be grouped. Errors name `file`, line and
    /// column.
    pub fn parse(text: &str, file: &str, width: usize) -> Result<InputVectors, SourceError> {
        let mut v = InputVectors {
            width,
            count: 0,
            words: vec![Vec::new(); width],
        };
        let mut bits = Vec::with_capacity(width);
        for (line_index, line) in text.lines().enumerate() {
            let line_no = line_index as u32 + 1;
            let trimmed = line.trim();
            if trimmed.is_empty() || trimmed.starts_with('#') {
                continue;
            }
            bits.clear();
            for (col, ch) in line.chars().enumerate() {
                match ch {
                    '0' => bits.push(false),
                    '1' => bits.push(true),
                    ' ' | '\t' | '_' | '\r' => {}
                    other => {
                        return Err(SourceError::new(
                            file,
                            line_no,
                            col as u32 + 1,
                            format!("found '{other}' in an input vector; expected 0 or 1"),
                        ))
                    }
                }
            }
            if bits.len() != width {
                return Err(SourceError::new(
                    file,
                    line_no,
                    1,
                    format!(
                        "input vector has {} bits; expected {width} (one per primary input, in declaration order)",
                        bits.len()
                    ),
                ));
            }
            v.push(bits.iter().copied());
        }
        if v.count < 2 {
            return Err(SourceError::new(
                file,
                0,
                0,
                format!(
                    "found {} input vector(s); at least two are needed to count transitions",
                    v.count
                ),
            ));
        }
        Ok(v)
    }

    /// Number of vectors (patterns).
    pub fn len(&self) -> u64 {
        self.count
    }

    /// True when there are no vectors.
    pub fn is_empty(&self) -> bool {
        self.count == 0
    }

    /// Bits per vector.
    pub fn width(&self) -> usize {
        self.width
    }
}

/// Where the simulation patterns come from.
#[derive(Clone, Debug)]
pub enum Stimulus {
    /// Independent random inputs, each 1 with `probability`.
    Random {
        /// Probability that an input is 1 in a pattern (0 to 1).
        probability: f64,
        /// Number of patterns to simulate.
        patterns: u64,
        /// Seed of the random source.
        seed: u64,
    },
    /// Explicit vectors for the primary inputs; inputs beyond the vectors'
    /// width (storage outputs of a sequential circuit) are random with
    /// `probability`.
    Vectors {
        /// The vectors.
        vectors: InputVectors,
        /// Probability for inputs the vectors do not cover.
        probability: f64,
        /// Seed for those inputs.
        seed: u64,
    },
}

impl Default for Stimulus {
    /// 16384 random patterns, probability 0.5, seed 1.
    fn default() -> Self {
        Stimulus::Random {
            probability: 0.5,
            patterns: DEFAULT_PATTERNS,
            seed: 1,
        }
    }
}

/// Patterns simulated by default.
pub const DEFAULT_PATTERNS: u64 = 16384;

/// How often every net toggled and every gate's input rows occurred.
#[derive(Clone, Debug, PartialEq)]
pub struct Activity {
    /// Patterns simulated.
    pub patterns: u64,
    /// Transitions between consecutive patterns (`patterns - 1`).
    pub transitions: u64,
    /// Output toggles of each gate.
    pub toggles: Vec<u64>,
    /// For each gate whose cell has per-row leakage: how many patterns put
    /// each input row on the gate (row r = input k is bit k of r). Empty for
    /// other gates.
    pub row_counts: Vec<Vec<u64>>,
}

/// Energy per operation and static power in the library's units.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct EnergyReport {
    /// Dynamic energy of one operation (one new input vector), in the
    /// library's energy unit.
    pub energy_per_op: f64,
    /// Static power (sum of cell leakage), in the library's power unit.
    pub static_power: f64,
    /// Patterns simulated.
    pub patterns: u64,
    /// Sum of all gate output toggles.
    pub toggles: u64,
}

/// Generates the input words of one 64-pattern block.
struct PatternSource<'a> {
    stimulus: &'a Stimulus,
    rng: SplitMix64,
    /// Fixed-point probability in 1/65536 units (65536 means always 1).
    probability16: u32,
}

fn probability_to_fixed(p: f64) -> Result<u32, PowerError> {
    if !(0.0..=1.0).contains(&p) || p.is_nan() {
        return Err(PowerError::BadProbability(p));
    }
    Ok((p * 65536.0).round() as u32)
}

impl<'a> PatternSource<'a> {
    fn new(stimulus: &'a Stimulus) -> Result<PatternSource<'a>, PowerError> {
        let (p, seed) = match stimulus {
            Stimulus::Random {
                probability, seed, ..
            } => (*probability, *seed),
            Stimulus::Vectors {
                probability, seed, ..
            } => (*probability, *seed),
        };
        Ok(PatternSource {
            stimulus,
            rng: SplitMix64::new(seed),
            probability16: probability_to_fixed(p)?,
        })
    }

    fn patterns(&self) -> u64 {
        match self.stimulus {
            Stimulus::Random { patterns, .. } => *patterns,
            Stimulus::Vectors { vectors, .. } => vectors.count,
        }
    }

    /// A random word whose bits are 1 with probability `probability16 / 2^16`
    /// exactly: walk the probability's binary digits from the least
    /// significant set one upwards, OR-ing a fresh random word in for a 1
    /// digit and AND-ing one in for a 0 digit.
    fn random_word(&mut self) -> u64 {
        let p = self.probability16;
        if p == 0 {
            return 0;
        }
        if p >= 65536 {
            return u64::MAX;
        }
        let mut word = 0u64;
        for bit in p.trailing_zeros()..16 {
            let r = self.rng.next();
            word = if (p >> bit) & 1 == 1 {
                word | r
            } else {
                word & r
            };
        }
        word
    }

    fn fill_block(&mut self, block: usize, words: &mut [u64]) {
        match self.stimulus {
            Stimulus::Random { .. } => {
                for w in words.iter_mut() {
                    *w = self.random_word();
                }
            }
            Stimulus::Vectors { vectors, .. } => {
                for (i, w) in words.iter_mut().enumerate() {
                    *w = if i < vectors.width {
                        vectors.words[i].get(block).copied().unwrap_or(0)
                    } else {
                        self.random_word()
                    };
                }
            }
        }
    }
}

/// Simulates `circuit` under `stimulus` and counts toggles and input rows.
///
/// Deterministic: the same circuit, library and stimulus give the same
/// counts on every machine. Cost: one pass over the gates per 64 patterns.
pub fn simulate_activity(
    circuit: &SwitchingCircuit,
    library: &Library,
    stimulus: &Stimulus,
) -> Result<Activity, PowerError> {
    circuit.check_against(library)?;
    let mut source = PatternSource::new(stimulus)?;
    let patterns = source.patterns();
    let gate_count = circuit.gate_count();
    let per_row: Vec<bool> = (0..gate_count)
        .map(|g| {
            matches!(
                library.cells[circuit.cells[g] as usize].leakage,
                Leakage::PerRow(_)
            )
        })
        .collect();
    let truths: Vec<u64> = circuit
        .cells
        .iter()
        .map(|&c| library.cells[c as usize].truth)
        .collect();
    // The input words are drawn in one sequence (block by block, input by
    // input), so the patterns do not depend on how the simulation is split.
    let blocks = patterns.div_ceil(64) as usize;
    let width = circuit.input_count as usize;
    let mut inputs = vec![0u64; blocks * width];
    for block in 0..blocks {
        source.fill_block(block, &mut inputs[block * width..(block + 1) * width]);
    }
    let counts = super::activity::simulate(circuit, &truths, &per_row, &inputs, patterns);
    Ok(Activity {
        patterns,
        transitions: patterns.saturating_sub(1),
        toggles: counts.toggles,
        row_counts: counts.row_counts,
    })
}

/// Turns activity counts into energy per operation and static power.
///
/// Energy per operation = sum over gates of toggles × (the cell's
/// `switch_energy` + its `switch_energy_per_load` × the load its output net
/// drives, see [`SwitchingCircuit::output_loads`]), divided by the number of
/// transitions (0 when fewer than two patterns were simulated). Static power = sum over gates of the cell's
/// leakage; per-row leakage is weighted by the observed row frequencies.
pub fn energy_from_activity(
    circuit: &SwitchingCircuit,
    library: &Library,
    activity: &Activity,
) -> EnergyReport {
    let mut switched = 0.0;
    let mut leakage = 0.0;
    let mut total_toggles = 0;
    let loads = circuit.output_loads(library);
    for (g, load) in loads.iter().enumerate() {
        let cell = &library.cells[circuit.cells[g] as usize];
        let per_toggle = cell.switch_energy + cell.switch_energy_per_load * load;
        switched += activity.toggles[g] as f64 * per_toggle;
        total_toggles += activity.toggles[g];
        leakage += match &cell.leakage {
            Leakage::Constant(v) => *v,
            Leakage::PerRow(rows) => {
                let counts = &activity.row_counts[g];
                let seen: u64 = counts.iter().sum();
                if rows.len() == counts.len() && seen > 0 {
                    rows.iter()
                        .zip(counts)
                        .map(|(l, &c)| l * c as f64)
                        .sum::<f64>()
                        / seen as f64
                } else {
                    cell.mean_leakage()
                }
            }
        };
    }
    EnergyReport {
        energy_per_op: if activity.transitions == 0 {
            0.0
        } else {
            switched / activity.transitions as f64
        },
        static_power: leakage,
        patterns: activity.patterns,
        toggles: total_toggles,
    }
}

/// Simulates and evaluates in one call: see [`simulate_activity`] and
/// [`energy_from_activity`].
pub fn estimate(
    circuit: &SwitchingCircuit,
    library: &Library,
    stimulus: &Stimulus,
) -> Result<EnergyReport, PowerError> {
    let activity = simulate_activity(circuit, library, stimulus)?;
    Ok(energy_from_activity(circuit, library, &activity))
}

#[cfg(test)]
mod tests {
    use super::*;

    // The serial simulation this module used before the kernel in
    // `study::activity`, kept as the reference the kernel must agree with.
    /// Evaluates a truth table on fanin words: Shannon expansion, variable 0
    /// first, `2^k - 1` multiplexers.
    #[inline]
    fn eval_truth(truth: u64, inputs: &[u64]) -> u64 {
        let k = inputs.len();
        let mut values = [0u64; 64];
        let rows = 1usize << k;
        for (r, v) in values.iter_mut().enumerate().take(rows) {
            *v = if (truth >> r) & 1 == 1 { u64::MAX } else { 0 };
        }
        let mut len = rows;
        for &x in inputs {
            len /= 2;
            for j in 0..len {
                values[j] = (x & values[2 * j + 1]) | (!x & values[2 * j]);
            }
        }
        values[0]
    }

    /// Adds to `counts[r]` how many valid patterns put row r on the inputs.
    fn count_rows(inputs: &[u64], valid: u64, counts: &mut [u64]) {
        let mut minterms = [0u64; 64];
        minterms[0] = valid;
        let mut len = 1usize;
        for (i, &x) in inputs.iter().enumerate() {
            for r in 0..len {
                let m = minterms[r];
                minterms[r] = m & !x;
                minterms[r | (1 << i)] = m & x;
            }
            len *= 2;
            debug_assert_eq!(len, 1 << (i + 1));
        }
        for (c, m) in counts.iter_mut().zip(&minterms[..len]) {
            *c += u64::from(m.count_ones());
        }
    }

    /// Simulates `circuit` under `stimulus` one word at a time.
    fn simulate_activity_serial(
        circuit: &SwitchingCircuit,
        library: &Library,
        stimulus: &Stimulus,
    ) -> Result<Activity, PowerError> {
        circuit.check_against(library)?;
        let mut source = PatternSource::new(stimulus)?;
        let patterns = source.patterns();
        let gate_count = circuit.gate_count();
        let first_gate_net = 2 + circuit.input_count as usize;
        let mut values = vec![0u64; circuit.net_count() as usize];
        values[NET_TRUE as usize] = u64::MAX;
        let mut toggles = vec![0u64; gate_count];
        let per_row: Vec<bool> = (0..gate_count)
            .map(|g| {
                matches!(
                    library.cells[circuit.cells[g] as usize].leakage,
                    Leakage::PerRow(_)
                )
            })
            .collect();
        let mut row_counts: Vec<Vec<u64>> = (0..gate_count)
            .map(|g| {
                if per_row[g] {
                    vec![0; 1 << circuit.gate_fanins(g).len()]
                } else {
                    Vec::new()
                }
            })
            .collect();
        // Last pattern's value of each gate output in the previous block.
        let mut previous_last = vec![false; gate_count];
        let truths: Vec<u64> = circuit
            .cells
            .iter()
            .map(|&c| library.cells[c as usize].truth)
            .collect();
        if patterns == 0 {
            return Ok(Activity {
                patterns,
                transitions: 0,
                toggles,
                row_counts,
            });
        }
        let blocks = patterns.div_ceil(64) as usize;
        let mut fanin_words = [0u64; 6];
        for block in 0..blocks {
            let valid_bits = (patterns - block as u64 * 64).min(64) as u32;
            let valid = if valid_bits == 64 {
                u64::MAX
            } else {
                (1u64 << valid_bits) - 1
            };
            // Transitions inside the block: between bit j and j + 1 for
            // j + 1 < valid_bits.
            let inner = if valid_bits <= 1 { 0 } else { valid >> 1 };
            source.fill_block(block, &mut values[2..first_gate_net]);
            for g in 0..gate_count {
                let fanins = circuit.gate_fanins(g);
                for (slot, &f) in fanin_words.iter_mut().zip(fanins) {
                    *slot = values[f as usize];
                }
                let inputs = &fanin_words[..fanins.len()];
                let word = eval_truth(truths[g], inputs);
                values[first_gate_net + g] = word;
                let mut count = ((word ^ (word >> 1)) & inner).count_ones() as u64;
                if block > 0 && (word & 1 == 1) != previous_last[g] {
                    count += 1;
                }
                toggles[g] += count;
                previous_last[g] = (word >> (valid_bits - 1)) & 1 == 1;
                if per_row[g] {
                    count_rows(inputs, valid, &mut row_counts[g]);
                }
            }
        }
        Ok(Activity {
            patterns,
            transitions: patterns - 1,
            toggles,
            row_counts,
        })
    }

    #[test]
    fn eval_truth_matches_rows() {
        // Exhaustive: bit r of the table is the value on row r.
        let inputs = [0xAAu64, 0xCC, 0xF0];
        assert_eq!(eval_truth(0xE8, &inputs) & 0xFF, 0xE8);
        assert_eq!(eval_truth(0x96, &inputs) & 0xFF, 0x96);
        assert_eq!(eval_truth(0b0110, &inputs[..2]) & 0xF, 0b0110);
        assert_eq!(eval_truth(0b01, &inputs[..1]) & 0xF, 0b0101);
    }

    #[test]
    fn rows_are_counted_exhaustively() {
        let inputs = [0xAAu64, 0xCC, 0xF0];
        let mut counts = vec![0; 8];
        count_rows(&inputs, 0xFF, &mut counts);
        assert_eq!(counts, vec![1; 8]);
    }

    #[test]
    fn fixed_point_probability_is_exact_in_expectation() {
        let stim = Stimulus::Random {
            probability: 0.25,
            patterns: 64,
            seed: 7,
        };
        let mut src = PatternSource::new(&stim).unwrap();
        let ones: u32 = (0..2000).map(|_| src.random_word().count_ones()).sum();
        let fraction = ones as f64 / (2000.0 * 64.0);
        assert!((fraction - 0.25).abs() < 0.01, "{fraction}");
    }

    #[test]
    fn bad_vectors_are_located() {
        let e = InputVectors::parse("01\n0x\n", "v.txt", 2).unwrap_err();
        assert_eq!(
            e.to_string(),
            "v.txt:2:2: found 'x' in an input vector; expected 0 or 1"
        );
        let e = InputVectors::parse("01\n011\n", "v.txt", 2).unwrap_err();
        assert_eq!((e.line, e.column), (2, 1));
    }

    /// A random circuit over the cells of `library` (every cell, random
    /// earlier fanins), from a fixed seed.
    fn random_circuit(library: &Library, inputs: u32, gates: usize, seed: u64) -> SwitchingCircuit {
        let mut rng = SplitMix64::new(seed);
        let mut c = SwitchingCircuit::new(inputs);
        for _ in 0..gates {
            let cell = rng.below(library.cells.len() as u64) as u32;
            let arity = library.cells[cell as usize].arity();
            let nets = c.net_count() as u64;
            let fanins: Vec<u32> = (0..arity).map(|_| rng.below(nets) as u32).collect();
            c.add_gate(cell, &fanins);
        }
        c
    }

    /// The parallel batched kernel gives exactly the counts of the serial
    /// simulation it replaced, for pattern counts that end inside a word,
    /// inside a batch and on a thread boundary, with per-row leakage.
    #[test]
    fn kernel_agrees_with_the_serial_simulation() {
        let mut library = crate::library::Library::builtin("ribbon3").unwrap();
        for (i, cell) in library.cells.iter_mut().enumerate() {
            if i % 2 == 0 {
                cell.leakage = Leakage::PerRow(vec![0.5; 1 << cell.arity()]);
            }
        }
        for (seed, patterns) in [
            (1, 1),
            (2, 63),
            (3, 64),
            (4, 65),
            (5, 1000),
            (6, 16384),
            (7, 4097),
        ] {
            let circuit = random_circuit(&library, 9, 300, seed);
            for probability in [0.5, 0.3] {
                let stimulus = Stimulus::Random {
                    probability,
                    patterns,
                    seed,
                };
                let fast = simulate_activity(&circuit, &library, &stimulus).unwrap();
                let serial = simulate_activity_serial(&circuit, &library, &stimulus).unwrap();
                assert_eq!(fast, serial, "seed {seed}, {patterns} patterns");
            }
        }
        let rows: Vec<Vec<bool>> = (0..200)
            .map(|r| (0..5).map(|b| (r * 7 + b) % 3 == 0).collect())
            .collect();
        let stimulus = Stimulus::Vectors {
            vectors: InputVectors::from_rows(5, &rows).unwrap(),
            probability: 0.5,
            seed: 3,
        };
        let circuit = random_circuit(&library, 9, 200, 11);
        assert_eq!(
            simulate_activity(&circuit, &library, &stimulus).unwrap(),
            simulate_activity_serial(&circuit, &library, &stimulus).unwrap()
        );
    }
}
