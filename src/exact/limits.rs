//! Resource limits for SAT calls.
//!
//! The SAT solver offers no conflict budget or interrupt, but it can stream a
//! binary DRAT proof while it solves. When a limit is set, the solver writes
//! its proof into a [`BudgetWriter`], which counts the learned clauses it
//! sees (one per conflict, plus learned units) and watches the clock; once a
//! limit is passed it fails the write, which stops the solver. The solver is
//! then dropped. Without limits no proof is written, so unlimited calls pay
//! nothing. The count is checked whenever the solver's buffer is flushed, so
//! a limit may be overrun by a few hundred conflicts.

use std::io;
use std::time::Instant;

/// Limits for one SAT call.
#[derive(Clone, Debug, Default)]
pub(crate) struct Budget {
    /// Stop once this moment has passed.
    pub deadline: Option<Instant>,
    /// Stop after this many learned clauses.
    pub conflicts: Option<u64>,
}

impl Budget {
    /// Whether any limit is set.
    pub fn is_limited(&self) -> bool {
        self.deadline.is_some() || self.conflicts.is_some()
    }

    /// Whether the deadline has passed.
    pub fn expired(&self) -> bool {
        self.deadline.is_some_and(|d| Instant::now() >= d)
    }
}

/// An `io::Write` that parses a binary DRAT stream to count added clauses
/// and fails once the budget is spent.
pub(crate) struct BudgetWriter {
    budget: Budget,
    added: u64,
    in_clause: bool,
    adding: bool,
}

impl BudgetWriter {
    /// A writer enforcing `budget`.
    pub fn new(budget: Budget) -> BudgetWriter {
        BudgetWriter {
            budget,
            added: 0,
            in_clause: false,
            adding: false,
        }
    }
}

impl io::Write for BudgetWriter {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        // Each step is 'a' or 'd', then variable-length literals whose bytes
        // are never zero, then a zero byte.
        for &byte in buf {
            if !self.in_clause {
                self.adding = byte == b'a';
                self.in_clause = true;
            } else if byte == 0 {
                self.in_clause = false;
                if self.adding {
                    self.added += 1;
                }
            }
        }
        if self.budget.conflicts.is_some_and(|c| self.added >= c) || self.budget.expired() {
            return Err(io::Error::other("SAT budget spent"));
        }
        Ok(buf.len())
    }

    fn flush(&mut self) -> io::Result<()> {
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::io::Write;

    #[test]
    fn counts_added_clauses_and_stops() {
        let mut w = BudgetWriter::new(Budget {
            deadline: None,
            conflicts: Some(2),
        });
        // 'a' 2 4 0, 'd' 6 0 -> one added
        assert!(w.write(&[b'a', 2, 4, 0, b'd', 6, 0]).is_ok());
        assert_eq!(w.added, 1);
        assert!(w.write(&[b'a', 0x80, 0x01, 0]).is_err());
    }
}
