//! Proofs of the mapper's own output in linear time, from its witness.
//!
//! A general equivalence check ([`crate::equiv`]) of a mapped netlist
//! against its input has to find, by simulation and SAT, which nets match
//! which nodes; on deep arithmetic circuits that takes minutes. The mapper
//! records the answer ([`crate::mapper::witness::CoverWitness`]), and this
//! module checks it without trusting it, in two independent steps:
//!
//! 1. mapped netlist = covered network ([`cells`]): each cell cone between
//!    named nets computes its named literal, exhaustively over at most six
//!    leaves; ports, storage and outputs sit on the right literals;
//! 2. covered network = input network ([`covered`]): nothing to do when the
//!    mapper covered the input itself; a local check per node when
//!    balancing rebuilt it; the general checker on the (structurally close)
//!    pair when logic optimisation changed it, or when a local check could
//!    not decide.
//!
//! Both steps are complete proofs, so together they prove the mapped
//! netlist equal to the input. A refused witness is not a verdict: [`prove`]
//! then falls back to the general checker, which either proves the netlist
//! or finds an input that tells it apart.

pub mod cells;
pub mod cone;
pub mod covered;

pub use cells::Refused;

use crate::equiv::{EquivOptions, Verdict};
use crate::library::Library;
use crate::mapper::witness::{CoverWitness, CoveredOrigin};
use crate::netlist::{verify, MappedNetlist, Verified, VerifyError, VerifyMode};
use crate::network::Network;

/// How a proof was reached, for reports and tests.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ProofRoute {
    /// The witness alone proved the netlist.
    Witness,
    /// The witness proved mapped = covered; the general checker proved
    /// covered = input.
    WitnessAndSweep,
    /// The witness was refused; the general checker decided.
    General,
}

/// Checks the witness alone: `Ok` is a complete proof that `mapped`
/// computes the functions of `input` (ports matched by name). `Err` says
/// which local check refused; it does not mean the netlist is wrong.
pub fn check_witness(
    input: &Network,
    mapped: &MappedNetlist,
    lib: &Library,
    witness: &CoverWitness,
) -> Result<(), Refused> {
    let covered = witness.covered(input);
    cells::check_cells(mapped, lib, covered, witness)?;
    match witness.origin.as_ref() {
        CoveredOrigin::Input => Ok(()),
        CoveredOrigin::Balanced { covered, map } => covered::check_balanced(input, covered, map),
        CoveredOrigin::Restructured { .. } => Err(Refused(
            "logic optimisation changed the network; no local witness relates it to the input"
                .into(),
        )),
    }
}

/// Proves `mapped` equal to `input`, from the witness where it suffices and
/// with the general checker where it does not (see the module comment).
/// Returns what was established and how.
pub fn prove(
    input: &Network,
    mapped: &MappedNetlist,
    lib: &Library,
    witness: &CoverWitness,
) -> Result<(Verified, ProofRoute), VerifyError> {
    let covered = witness.covered(input);
    if cells::check_cells(mapped, lib, covered, witness).is_err() {
        let verified = verify(input, &mapped.to_network(lib), VerifyMode::Full)?;
        return Ok((verified, ProofRoute::General));
    }
    let balanced = match witness.origin.as_ref() {
        CoveredOrigin::Input => return Ok((Verified::Proven, ProofRoute::Witness)),
        CoveredOrigin::Balanced { covered, map } => covered::check_balanced(input, covered, map),
        CoveredOrigin::Restructured { .. } => Err(Refused(String::new())),
    };
    if balanced.is_ok() {
        return Ok((Verified::Proven, ProofRoute::Witness));
    }
    let verdict = crate::equiv::check(input, covered, &EquivOptions::default())
        .map_err(|e| VerifyError::Ports(e.to_string()))?;
    match verdict {
        Verdict::Equivalent { .. } => Ok((Verified::Proven, ProofRoute::WitnessAndSweep)),
        Verdict::Undecided { .. } => {
            // The covered network could not be proven; fall back to
            // simulating the netlist itself against the input.
            let verified = verify(input, &mapped.to_network(lib), VerifyMode::Sim)?;
            Ok((verified, ProofRoute::WitnessAndSweep))
        }
        Verdict::Different { counterexample, .. } => Err(VerifyError::Mismatch {
            output: counterexample
                .differing_outputs
                .first()
                .cloned()
                .unwrap_or_default(),
            inputs: counterexample.inputs.into_iter().collect(),
        }),
    }
}
