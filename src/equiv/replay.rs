//! Replaying a counterexample on the two original networks.
//!
//! A pattern found on the miter is only reported after it has been
//! simulated on the networks the user gave, independently of the miter, the
//! sweep and the solver. The outputs that really differ under it are the
//! ones listed; if none does, something upstream is wrong and the check
//! fails loudly instead of reporting a false difference.

use indexmap::IndexMap;

use super::miter::{next_state_name, Miter};
use super::ports::PortPairs;
use super::{Counterexample, EquivError};
use crate::network::Network;

/// Values of `net`'s combinational outputs (outputs, then next-states) on
/// one pattern given per miter input, through `order` (miter input index for
/// each combinational input of `net`).
fn outputs_on(net: &Network, order: &[usize], pattern: &[bool]) -> Vec<bool> {
    let words: Vec<u64> = order
        .iter()
        .map(|&i| if pattern[i] { u64::MAX } else { 0 })
        .collect();
    net.simulate_outputs(&words)
        .into_iter()
        .map(|w| w & 1 == 1)
        .collect()
}

/// Simulates both networks on `pattern` (one value per miter input) and
/// builds the counterexample, or fails when no paired output differs.
pub(crate) fn replay(
    a: &Network,
    b: &Network,
    ports: &PortPairs,
    miter: &Miter,
    pattern: &[bool],
) -> Result<Counterexample, EquivError> {
    let out_a = outputs_on(a, &miter.a_inputs, pattern);
    let out_b = outputs_on(b, &miter.b_inputs, pattern);
    let n_out_a = a.outputs().len();
    let n_out_b = b.outputs().len();
    let mut differing_outputs = Vec::new();
    let mut output_values = Vec::new();
    for (name_a, name_b) in &ports.outputs {
        let ia = a.outputs().get_index_of(name_a.as_str()).expect("paired");
        let ib = b.outputs().get_index_of(name_b.as_str()).expect("paired");
        if out_a[ia] != out_b[ib] {
            differing_outputs.push(name_a.clone());
            output_values.push((out_a[ia], out_b[ib]));
        }
    }
    for (name_a, name_b) in &ports.storage {
        let ia = n_out_a + a.storage().get_index_of(name_a.as_str()).expect("paired");
        let ib = n_out_b + b.storage().get_index_of(name_b.as_str()).expect("paired");
        if out_a[ia] != out_b[ib] {
            differing_outputs.push(next_state_name(name_a));
            output_values.push((out_a[ia], out_b[ib]));
        }
    }
    if differing_outputs.is_empty() {
        return Err(EquivError::Internal(
            "a counterexample found on the miter does not separate the original networks".into(),
        ));
    }
    let inputs: IndexMap<String, bool> = miter
        .input_names
        .iter()
        .cloned()
        .zip(pattern.iter().copied())
        .collect();
    Ok(Counterexample {
        inputs,
        differing_outputs,
        output_values,
    })
}
