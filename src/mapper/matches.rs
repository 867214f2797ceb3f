//! The match table: from a cut function to the implementations that realise
//! it, built once per library.
//!
//! Keys are replicated 64-bit truth tables over the cut leaves after support
//! minimisation, so a lookup is one hash probe and needs no canonical form.
//! Every function is stored next to its complement: slot `s` holds the
//! implementations of `f` and slot `s ^ 1` those of `!f`, so a cut's one slot
//! number gives the matches of both output phases. Per function the table
//! keeps the cheapest implementation by area, the cheapest with its
//! complemented leaves paid for, the fastest by delay, and one cheapest
//! implementation for every set of leaf phases that reaches the least area.

use super::implementation::{ImplGate, Implementation, KeepCosts, Source, KEEP_CRITERIA};
use super::small_truth::{depends_on, var};
use super::supergate;
use crate::library::Library;
use rustc_hash::FxHashMap;
use std::sync::{Arc, OnceLock};

/// Marker for "no slot".
pub const NO_SLOT: u32 = u32::MAX;

/// Most implementations kept per function (the cover packs a candidate's
/// position into [`CANDIDATE_BITS`] bits of a choice).
pub const MAX_CANDIDATES: usize = 1 << CANDIDATE_BITS;

/// Bits of a cover choice that hold the candidate's position in its slot.
pub const CANDIDATE_BITS: u32 = 5;

/// Area differences smaller than this are ties (areas are sums of a few
/// cell areas).
const AREA_TIE: f32 = 1e-6;

/// Implementations per cut function, both phases side by side.
///
/// A table read from the disk cache keeps its implementations as stored
/// gate lists and builds each [`Implementation`] the first time it is asked
/// for (see [`StoredGates`]), so a process pays only for the functions its
/// cuts have.
#[derive(Clone, Debug)]
pub struct MatchTable {
    pub(super) index: FxHashMap<u64, u32>,
    pub(super) slots: Vec<Vec<u32>>,
    /// Per slot, how many leading candidates are kept for area (see
    /// [`MatchTable::area_candidates`]).
    pub(super) area_kept: Vec<u8>,
    /// Every implementation the table refers to (built on first use when
    /// the table came from the cache).
    pub(super) implementations: Vec<OnceLock<Implementation>>,
    /// Where the implementations not built yet are read from.
    pub(super) stored: Option<Arc<StoredGates>>,
    /// Load assumed at a cell output when ranking by delay (mean input load).
    pub typical_load: f32,
    pub(super) inverter: Option<u32>,
    pub(super) buffer: Option<u32>,
    /// Area of the library's cheapest inverter cell (0 without one).
    pub(super) inverter_area: f64,
}

/// True when the variables `truth` depends on are exactly `0..m` for some m.
fn prefix_support(truth: u64) -> bool {
    let mut seen_gap = false;
    for v in 0..6 {
        if depends_on(truth, v) {
            if seen_gap {
                return false;
            }
        } else {
            seen_gap = true;
        }
    }
    true
}

impl MatchTable {
    /// Builds the table for `lib`: single cells and supergates (see
    /// [`supergate::generate`]).
    pub fn build(lib: &Library) -> MatchTable {
        let typical_load = if lib.cells.is_empty() {
            1.0
        } else {
            (lib.cells.iter().map(|c| c.input_load).sum::<f64>() / lib.cells.len() as f64) as f32
        };
        let mut table = MatchTable {
            index: FxHashMap::default(),
            slots: Vec::new(),
            area_kept: Vec::new(),
            implementations: Vec::new(),
            stored: None,
            typical_load,
            inverter: None,
            buffer: None,
            inverter_area: Implementation::inverter_area(lib),
        };
        for imp in supergate::generate(lib, typical_load) {
            table.add(imp);
        }
        table.inverter = table.push_direct(lib, true);
        table.buffer = table.push_direct(lib, false);
        table
    }

    /// The cheapest single cell realising `x0` (or `!x0` when `complement`)
    /// with its pins tied to leaf 0 uncomplemented or to constants; failing
    /// that, for the buffer, two inverters in series. Stored outside the
    /// lookup index, so it never reads the complemented leaf it may be
    /// asked to produce.
    fn push_direct(&mut self, lib: &Library, complement: bool) -> Option<u32> {
        let want = if complement { !var(0) } else { var(0) };
        let mut best: Option<Implementation> = None;
        for (c, cell) in lib.cells.iter().enumerate() {
            let a = cell.arity();
            if a > 6 {
                continue;
            }
            // Each pin: 0 = leaf, 1 = constant 0, 2 = constant 1.
            let mut ties = vec![0usize; a];
            loop {
                if ties.contains(&0) {
                    let inputs = ties
                        .iter()
                        .map(|&t| match t {
                            0 => Source::Leaf {
                                var: 0,
                                complemented: false,
                            },
                            1 => Source::Constant(false),
                            _ => Source::Constant(true),
                        })
                        .collect();
                    if let Some(imp) = Implementation::new(
                        lib,
                        vec![ImplGate {
                            cell: c as u32,
                            inputs,
                        }],
                    ) {
                        if imp.function == want && best.as_ref().is_none_or(|b| imp.area < b.area) {
                            best = Some(imp);
                        }
                    }
                }
                let mut i = 0;
                while i < a {
                    ties[i] += 1;
                    if ties[i] < 3 {
                        break;
                    }
                    ties[i] = 0;
                    i += 1;
                }
                if i == a {
                    break;
                }
            }
        }
        if best.is_none() && !complement {
            let inv = self.inverter?;
            let g = self.implementation(inv).gates[0].clone();
            let mut second = g.clone();
            second.inputs = second
                .inputs
                .iter()
                .map(|s| match s {
                    Source::Leaf { .. } => Source::Gate(0),
                    other => *other,
                })
                .collect();
            best = Implementation::new(lib, vec![g, second]);
        }
        let imp = best?;
        self.implementations.push(OnceLock::from(imp));
        Some((self.implementations.len() - 1) as u32)
    }

    /// Adds an implementation (for example an optimum network from exact
    /// synthesis). Per function the table keeps the cheapest by area, the
    /// cheapest by area with an inverter charged for each complemented leaf,
    /// the fastest by delay (ties go to the one listed first), and besides
    /// them one implementation of the least area for every other set of
    /// leaf phases it can be had with (why: below), at most
    /// [`MAX_CANDIDATES`] in all. Functions that are
    /// constant or whose support is not `0..m` are ignored.
    ///
    /// Why the leaf-phase alternatives: which phase of a leaf is free
    /// depends on the rest of the cover, so `xor3(a, b, !c)` and
    /// `xnor3(a, b, c)` are not interchangeable even though they cost the
    /// same. A table keeping only one of them (chosen by delay, or by the
    /// order of generation) makes the least-area cover depend on the delays.
    pub fn add(&mut self, imp: Implementation) {
        let f = imp.function;
        if f == 0 || f == u64::MAX || !prefix_support(f) {
            return;
        }
        let slot = self.slot_or_insert(f);
        let id = self.implementations.len() as u32;
        let mut ids: Vec<u32> = self.slots[slot as usize].clone();
        ids.push(id);
        let (list, area_kept) = {
            let costs = |i: u32| {
                let imp = if i == id {
                    &imp
                } else {
                    self.implementation(i)
                };
                (
                    KeepCosts::of(imp, self.inverter_area, self.typical_load),
                    imp.leaf_phases(),
                )
            };
            order_candidates(&ids, costs)
        };
        if !list.contains(&id) {
            return;
        }
        self.implementations.push(OnceLock::from(imp));
        self.slots[slot as usize] = list;
        self.area_kept[slot as usize] = area_kept;
    }

    fn slot_or_insert(&mut self, f: u64) -> u32 {
        if let Some(&s) = self.index.get(&f) {
            return s;
        }
        let s = self.slots.len() as u32;
        self.slots.push(Vec::new());
        self.slots.push(Vec::new());
        self.area_kept.push(0);
        self.area_kept.push(0);
        self.index.insert(f, s);
        self.index.insert(!f, s + 1);
        s
    }

    /// The slot of function `f` (replicated table with support `0..m`), or
    /// [`NO_SLOT`] when neither `f` nor `!f` has an implementation.
    #[inline]
    pub fn slot(&self, f: u64) -> u32 {
        self.index.get(&f).copied().unwrap_or(NO_SLOT)
    }

    /// Implementations of the function of `slot`, cheapest by area first.
    #[inline]
    pub fn candidates(&self, slot: u32) -> &[u32] {
        &self.slots[slot as usize]
    }

    /// The leading candidates of `slot` that the least-area cover reads:
    /// every candidate except one kept only for being the fastest, so that
    /// the least-area cover sees the same candidates, in the same order,
    /// for any two libraries with the same cells and areas (positions are
    /// those of [`MatchTable::candidates`]).
    #[inline]
    pub fn area_candidates(&self, slot: u32) -> &[u32] {
        let list = &self.slots[slot as usize];
        &list[..self.area_kept[slot as usize] as usize]
    }

    /// The implementation with id `id`.
    #[inline]
    pub fn implementation(&self, id: u32) -> &Implementation {
        self.implementations[id as usize].get_or_init(|| {
            let stored = self
                .stored
                .as_ref()
                .expect("only a table read from the cache has unbuilt implementations");
            stored.build(id)
        })
    }

    /// Number of implementations (built or not).
    pub fn num_implementations(&self) -> usize {
        self.implementations.len()
    }

    /// The cheapest implementation by area of `f`, if any.
    pub fn best_area(&self, f: u64) -> Option<u32> {
        let s = self.slot(f);
        if s == NO_SLOT {
            return None;
        }
        self.slots[s as usize].first().copied()
    }

    /// The inverter: cheapest implementation of `!x0`.
    pub fn inverter(&self) -> Option<u32> {
        self.inverter
    }

    /// The buffer: cheapest implementation of `x0`.
    pub fn buffer(&self) -> Option<u32> {
        self.buffer
    }

    /// True when a single cell over the leaves realises `f` in some phase.
    pub fn has_function(&self, f: u64) -> bool {
        let s = self.slot(f);
        s != NO_SLOT
            && (!self.slots[s as usize].is_empty() || !self.slots[(s ^ 1) as usize].is_empty())
    }

    /// Number of functions with at least one implementation.
    pub fn num_functions(&self) -> usize {
        self.slots.iter().filter(|s| !s.is_empty()).count()
    }

    /// A single-gate implementation of `cell` with pins on leaves `0..arity`
    /// in order (convenience for callers adding their own entries).
    pub fn single_cell(lib: &Library, cell: usize) -> Option<Implementation> {
        let arity = lib.cells.get(cell)?.arity();
        Implementation::new(
            lib,
            vec![ImplGate {
                cell: cell as u32,
                inputs: (0..arity as u8)
                    .map(|v| Source::Leaf {
                        var: v,
                        complemented: false,
                    })
                    .collect(),
            }],
        )
    }
}

/// Which of the implementations `ids` (in order of addition, so ascending)
/// a slot keeps, in the order it keeps them, and how many of them lead the
/// list as the area-kept ones.
///
/// Kept for area, in ascending id: the cheapest by area, the cheapest with
/// its complemented leaves paid for, and for every set of leaf phases with
/// which the least area can be had the first implementation added with it
/// (at most [`MAX_CANDIDATES`] − 1 in all). Ties go to the implementation
/// added first, never to the faster, so this part of the list is the same
/// for any two libraries with the same cells and areas. Then, last and only
/// when it is not already in the list, the fastest (ties by the order of
/// addition).
fn order_candidates(ids: &[u32], costs: impl Fn(u32) -> (KeepCosts, u16)) -> (Vec<u32>, u8) {
    if ids.is_empty() {
        return (Vec::new(), 0);
    }
    let mut sorted: Vec<(u32, KeepCosts, u16)> = ids
        .iter()
        .map(|&i| {
            let (c, p) = costs(i);
            (i, c, p)
        })
        .collect();
    sorted.sort_by_key(|c| c.0);
    // Per criterion, the first contender that no later one beats.
    let winner = |better: fn(&KeepCosts, &KeepCosts) -> bool| {
        let mut best = sorted[0];
        for c in &sorted[1..] {
            if better(&c.1, &best.1) {
                best = *c;
            }
        }
        best.0
    };
    let [cheapest, standalone, fastest] = KEEP_CRITERIA.map(winner);
    let least = sorted
        .iter()
        .map(|c| c.1.area)
        .fold(f32::INFINITY, f32::min);
    let mut area: Vec<u32> = vec![cheapest];
    if standalone != cheapest {
        area.push(standalone);
    }
    let mut phase_sets: Vec<u16> = Vec::new();
    for c in &sorted {
        if c.1.area <= least + AREA_TIE && !phase_sets.contains(&c.2) {
            phase_sets.push(c.2);
            if !area.contains(&c.0) && area.len() < MAX_CANDIDATES - 1 {
                area.push(c.0);
            }
        }
    }
    area.sort_unstable();
    let count = area.len() as u8;
    if !area.contains(&fastest) {
        area.push(fastest);
    }
    (area, count)
}

/// The implementations of a table read from the cache, as their gate lists
/// in the file's encoding (see `table_cache`), each already checked on load
/// to be well formed and to compute its stored function; so building one
/// cannot fail.
pub struct StoredGates {
    /// The library the gates are cells of.
    pub(super) lib: Library,
    /// The file's implementation records.
    pub(super) bytes: Vec<u8>,
    /// Offset in `bytes` of the gate count of implementation `id`.
    pub(super) offsets: Vec<u32>,
}

impl std::fmt::Debug for StoredGates {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("StoredGates")
            .field("library", &self.lib.name)
            .field("implementations", &self.offsets.len())
            .finish()
    }
}

impl StoredGates {
    /// The implementation `id` built from its stored gates.
    fn build(&self, id: u32) -> Implementation {
        let mut at = self.offsets[id as usize] as usize;
        let gates = super::table_cache::read_gates(&self.bytes, &mut at)
            .expect("stored gates were checked on load");
        Implementation::new(&self.lib, gates).expect("stored gates were checked on load")
    }
}
