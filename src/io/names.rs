//! Net names for the writers.
//!
//! Inputs and storage elements keep their own names; every logic node gets
//! `<prefix><index>`, where the prefix is chosen so that no port or storage
//! name starts with it. So internal names can never clash with the names a
//! user sees, and the same network always gets the same names.

use crate::network::{Lit, Network, NodeId};

/// The name of every node a writer refers to.
pub(crate) struct Namer<'n> {
    prefix: String,
    port_name: Vec<Option<&'n str>>,
}

impl<'n> Namer<'n> {
    /// Names for the nodes of `net`.
    pub fn new(net: &'n Network) -> Self {
        let all: Vec<&str> = net
            .inputs()
            .keys()
            .chain(net.outputs().keys())
            .chain(net.storage().keys())
            .map(String::as_str)
            .collect();
        let mut prefix = "n".to_string();
        for candidate in ["n", "w", "_n", "_w"]
            .iter()
            .map(|s| s.to_string())
            .chain((0..).map(|k| format!("_n{k}_")))
        {
            if !all.iter().any(|name| name.starts_with(candidate.as_str())) {
                prefix = candidate;
                break;
            }
        }
        let mut port_name = vec![None; net.num_nodes()];
        for (name, id) in net.inputs() {
            port_name[id.index()] = Some(name.as_str());
        }
        for (name, s) in net.storage() {
            port_name[s.output.index()] = Some(name.as_str());
        }
        Namer { prefix, port_name }
    }

    /// The name of `node` (its port or storage name, or an internal name).
    pub fn node(&self, node: NodeId) -> String {
        match self.port_name[node.index()] {
            Some(n) => n.to_string(),
            None => format!("{}{}", self.prefix, node.0),
        }
    }

    /// A name that no port, storage element or node uses, built from `stem`.
    pub fn internal(&self, stem: &str) -> String {
        format!("{}{stem}", self.prefix)
    }

    /// True when `lit` is an uncomplemented reference to a named node.
    pub fn is_plain(&self, lit: Lit) -> bool {
        !lit.is_complemented() && lit.node().0 != 0
    }
}
