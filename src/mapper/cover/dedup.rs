//! Structural deduplication during extraction: no two cells of a mapped
//! netlist compute the same function of the same nets.
//!
//! Two implementations chosen for different node phases can contain the
//! same cell over the same nets (an `and2` inside a supergate and the same
//! `and2` chosen for another node, or two cells of different names with one
//! function). Every cell about to be instantiated is keyed by its function
//! over its distinct input nets in ascending order; a key seen before
//! returns the earlier cell's output net instead of a new cell.

use crate::library::Library;
use crate::netlist::NetId;
use std::collections::HashMap;

/// Most distinct inputs a key holds (the widest cell).
const WIDEST: usize = 6;

/// The function of one cell instance over its distinct input nets.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
struct CellKey {
    /// Distinct input nets, ascending, padded with `NetId::MAX`.
    nets: [NetId; WIDEST],
    /// Truth table over `nets` (row bit `i` is the value of `nets[i]`).
    truth: u64,
}

/// The cells instantiated so far, by function of their input nets.
#[derive(Default)]
pub(super) struct CellKeys {
    seen: HashMap<CellKey, NetId>,
    /// Cells not instantiated because an equal one existed.
    pub(super) merged: usize,
}

impl CellKeys {
    /// The key of `cell` of `lib` reading `inputs`, or `None` for a cell
    /// wider than [`WIDEST`].
    fn key(lib: &Library, cell: u32, inputs: &[NetId]) -> Option<CellKey> {
        if inputs.len() > WIDEST {
            return None;
        }
        let mut nets = [NetId::MAX; WIDEST];
        let mut count = 0;
        for &n in inputs {
            if !nets[..count].contains(&n) {
                nets[count] = n;
                count += 1;
            }
        }
        nets[..count].sort_unstable();
        let table = lib.cells[cell as usize].truth;
        let mut truth = 0u64;
        for row in 0..(1u64 << count) {
            let mut pin_row = 0u64;
            for (pin, n) in inputs.iter().enumerate() {
                let position = nets[..count].iter().position(|m| m == n).unwrap_or(0);
                pin_row |= ((row >> position) & 1) << pin;
            }
            truth |= ((table >> pin_row) & 1) << row;
        }
        Some(CellKey { nets, truth })
    }

    /// The output net of an earlier cell computing what `cell` over
    /// `inputs` would, if there is one.
    pub(super) fn find(&mut self, lib: &Library, cell: u32, inputs: &[NetId]) -> Option<NetId> {
        let key = Self::key(lib, cell, inputs)?;
        let found = self.seen.get(&key).copied();
        self.merged += found.is_some() as usize;
        found
    }

    /// Records that `net` is the output of `cell` over `inputs`.
    pub(super) fn insert(&mut self, lib: &Library, cell: u32, inputs: &[NetId], net: NetId) {
        if let Some(key) = Self::key(lib, cell, inputs) {
            self.seen.entry(key).or_insert(net);
        }
    }
}
