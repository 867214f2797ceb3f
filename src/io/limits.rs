//! Size bounds of the readers.
//!
//! A small file can describe a huge design: a replication nested three
//! deep, a module that instantiates the one below it twice at each of 40
//! levels, or a handful of ports a million bits wide. Without bounds such a
//! file makes a reader allocate gigabytes or run for minutes. This module
//! holds the bounds and the check that estimates, before anything is
//! flattened, how many one-bit nets each module of a hierarchy would
//! produce, so that the error names the module that grows too large and the
//! size it would reach, and costs no more memory than the parse itself.

use super::flat::{Flat, Loc};
use crate::diag::SourceError;

/// The default bound on the one-bit nets of a flattened design (named nets
/// and intermediate expression values); [`super::ReadOptions::max_nets`]
/// raises or lowers it. At 2^20 a design reads in about two CPU-seconds
/// and a few hundred megabytes; a 256 x 256 array multiplier (11 MB of
/// BLIF) fits, and larger designs need `--max-nets`.
pub const DEFAULT_MAX_NETS: u64 = 1 << 20;

/// The widest Verilog expression (in bits) a reader evaluates: the largest
/// declared range, so that no replication or concatenation grows past what
/// a declaration may hold.
pub const MAX_EXPRESSION_WIDTH: u64 = 1 << 20;

/// Port bits are bounded more tightly than nets: a top module may declare
/// at most the net bound divided by this many port bits (65,536 by
/// default, enough for a 4096-bit adder's 12,289). Real designs have a few thousand port bits at most, while a
/// few bytes of Verilog (`input [1048575:0] p;`) can declare millions, and
/// every port bit costs a name and a place in every writer's port list.
pub const NETS_PER_PORT_BIT: u64 = 16;

/// The gate input connections a design may have, per allowed net.
pub const CONNECTIONS_PER_NET: u64 = 4;

/// One element of a module, in source order, for the size estimate: its
/// own one-bit nets and, for an instance, the module it instantiates.
pub(crate) struct Part {
    /// One-bit nets the element itself creates.
    pub own: u64,
    /// Where it is.
    pub loc: Loc,
    /// The module an instance refers to (an index into the module list).
    pub child: Option<usize>,
}

/// A module of the hierarchy for the size estimate.
pub(crate) struct ModuleSize<'n> {
    /// Module or model name.
    pub name: &'n str,
    /// Its elements in source order.
    pub parts: Vec<Part>,
}

/// Estimates the flattened size of every module reachable from `top` and
/// refuses the design when it exceeds `limit` one-bit nets. The error
/// points at the element of the smallest too-large module where its size
/// crosses the limit. Recursion in the hierarchy is left to the elaborator
/// (a module on the current path counts as empty here).
pub(crate) fn check_hierarchy(
    flat: &Flat,
    modules: &[ModuleSize],
    top: usize,
    limit: u64,
    what: &str,
) -> Result<(), SourceError> {
    let sizes = flattened_sizes(modules, top);
    if sizes[top] <= limit {
        return Ok(());
    }
    // Walk down to the smallest module that is too large. A hierarchy with
    // a cycle could lead the walk back to a module it has left: it stops
    // there instead (the elaborator would report the recursion).
    let mut at = top;
    let mut walked = vec![false; modules.len()];
    loop {
        walked[at] = true;
        let mut total = 0u64;
        let mut crossing = None;
        for part in &modules[at].parts {
            let child = part.child.map_or(0, |c| sizes[c]);
            total = total.saturating_add(part.own).saturating_add(child);
            if total > limit {
                crossing = Some(part);
                break;
            }
        }
        let Some(part) = crossing else {
            // Only possible through recursion, which the elaborator reports.
            return Ok(());
        };
        match part.child {
            Some(c) if sizes[c] > limit && !walked[c] => at = c,
            _ => {
                return Err(flat.error(
                    part.loc,
                    format!(
                        "{what} '{}' would flatten to {} one-bit nets, more than the limit of {limit} (expected a smaller design; --max-nets N raises the limit)",
                        modules[at].name,
                        shown(sizes[at])
                    ),
                ))
            }
        }
    }
}

/// A size for a message: saturated sizes are shown as "more than 2^64".
fn shown(size: u64) -> String {
    if size == u64::MAX {
        "more than 18446744073709551615".to_string()
    } else {
        size.to_string()
    }
}

/// The flattened size of each module reachable from `top` (saturating;
/// unreachable modules get 0). Iterative, so a deep hierarchy cannot
/// overflow the stack.
fn flattened_sizes(modules: &[ModuleSize], top: usize) -> Vec<u64> {
    const UNSEEN: u8 = 0;
    const ACTIVE: u8 = 1;
    const DONE: u8 = 2;
    let mut state = vec![UNSEEN; modules.len()];
    let mut size = vec![0u64; modules.len()];
    let mut stack: Vec<(usize, usize)> = vec![(top, 0)];
    state[top] = ACTIVE;
    while let Some(&mut (m, ref mut next)) = stack.last_mut() {
        let parts = &modules[m].parts;
        if let Some(part) = parts.get(*next) {
            *next += 1;
            if let Some(c) = part.child {
                if state[c] == UNSEEN {
                    state[c] = ACTIVE;
                    stack.push((c, 0));
                }
            }
            continue;
        }
        let mut total = 0u64;
        for part in parts {
            let child = match part.child {
                Some(c) if state[c] == DONE => size[c],
                _ => 0,
            };
            total = total.saturating_add(part.own).saturating_add(child);
        }
        size[m] = total;
        state[m] = DONE;
        stack.pop();
    }
    size
}

#[cfg(test)]
mod tests {
    use super::*;

    fn doubling(levels: usize) -> Vec<ModuleSize<'static>> {
        (0..levels)
            .map(|k| ModuleSize {
                name: "m",
                parts: if k == 0 {
                    vec![Part {
                        own: 3,
                        loc: (1, 1),
                        child: None,
                    }]
                } else {
                    vec![
                        Part {
                            own: 1,
                            loc: (k as u32 + 1, 1),
                            child: Some(k - 1),
                        },
                        Part {
                            own: 1,
                            loc: (k as u32 + 1, 9),
                            child: Some(k - 1),
                        },
                    ]
                },
            })
            .collect()
    }

    #[test]
    fn doubling_hierarchy_sizes_follow_the_recurrence() {
        // size(0) = 3, size(k) = 2 * (1 + size(k - 1)): integer arithmetic.
        let mods = doubling(10);
        let sizes = flattened_sizes(&mods, 9);
        let mut want = 3u64;
        for (k, &s) in sizes.iter().enumerate() {
            if k > 0 {
                want = 2 * (1 + want);
            }
            assert_eq!(s, want, "level {k}");
        }
    }

    #[test]
    fn sixty_four_doublings_saturate() {
        let mods = doubling(80);
        assert_eq!(flattened_sizes(&mods, 79)[79], u64::MAX);
    }

    #[test]
    fn the_error_names_the_smallest_module_past_the_limit() {
        let mods = doubling(12);
        let flat = Flat::new("f.v");
        // size(5) = 158 and size(6) = 318 by the recurrence above.
        let e = check_hierarchy(&flat, &mods, 11, 200, "module").unwrap_err();
        assert!(e.message.contains("318"), "{e}");
        // Level 6 is at line 7; its second instance crosses the limit.
        assert_eq!((e.line, e.column), (7, 9), "{e}");
        assert!(check_hierarchy(&flat, &mods, 11, 1 << 20, "module").is_ok());
    }
}
