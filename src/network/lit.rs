//! Node identifiers and literals.
//!
//! A [`Lit`] packs a node index and a complement flag into one `u32`
//! (`index << 1 | complemented`), so edges cost four bytes and negation is a
//! single XOR. Node 0 is the constant-false node, so `Lit::FALSE` is 0 and
//! `Lit::TRUE` is 1.

use std::fmt;
use std::ops::Not;

/// Index of a node in a [`crate::network::Network`] arena.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct NodeId(pub u32);

impl NodeId {
    /// The constant-false node, present in every network.
    pub const CONST: NodeId = NodeId(0);

    /// The index as a `usize`, for indexing flat per-node arrays.
    #[inline]
    pub fn index(self) -> usize {
        self.0 as usize
    }

    /// The positive literal of this node.
    #[inline]
    pub fn lit(self) -> Lit {
        Lit(self.0 << 1)
    }
}

/// An edge: a node with an optional complement.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Lit(u32);

impl Lit {
    /// Constant 0.
    pub const FALSE: Lit = Lit(0);
    /// Constant 1.
    pub const TRUE: Lit = Lit(1);

    /// The literal of `node`, complemented when `complemented` is true.
    #[inline]
    pub fn new(node: NodeId, complemented: bool) -> Lit {
        Lit((node.0 << 1) | complemented as u32)
    }

    /// Builds a literal from its packed form (`index << 1 | complement`).
    #[inline]
    pub fn from_raw(raw: u32) -> Lit {
        Lit(raw)
    }

    /// The packed form (`index << 1 | complement`).
    #[inline]
    pub fn raw(self) -> u32 {
        self.0
    }

    /// The node this literal points at.
    #[inline]
    pub fn node(self) -> NodeId {
        NodeId(self.0 >> 1)
    }

    /// True when the edge is complemented.
    #[inline]
    pub fn is_complemented(self) -> bool {
        self.0 & 1 == 1
    }

    /// The same node without complement.
    #[inline]
    pub fn regular(self) -> Lit {
        Lit(self.0 & !1)
    }

    /// Complements the literal when `flip` is true.
    #[inline]
    pub fn xor(self, flip: bool) -> Lit {
        Lit(self.0 ^ flip as u32)
    }

    /// True for the two constant literals.
    #[inline]
    pub fn is_const(self) -> bool {
        self.0 <= 1
    }
}

impl Not for Lit {
    type Output = Lit;
    #[inline]
    fn not(self) -> Lit {
        Lit(self.0 ^ 1)
    }
}

impl fmt::Display for Lit {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.is_complemented() {
            write!(f, "!n{}", self.node().0)
        } else {
            write!(f, "n{}", self.node().0)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn packing_round_trips() {
        let n = NodeId(12345);
        let l = Lit::new(n, true);
        assert_eq!(l.node(), n);
        assert!(l.is_complemented());
        assert_eq!(!l, Lit::new(n, false));
        assert_eq!(l.regular(), n.lit());
        assert_eq!(!Lit::FALSE, Lit::TRUE);
    }
}
