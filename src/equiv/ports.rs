//! Pairing the ports of two networks before they are compared.
//!
//! Inputs, outputs and storage elements are paired by name (the default), by
//! declaration order, or through an explicit list of `(name in A, name in B)`
//! pairs read from a port-map file. Ports the explicit list does not mention
//! fall back to pairing by name. Whatever stays without a partner is an error
//! that lists every such port, so a user never gets a verdict about a
//! comparison that silently left something out.

use super::{EquivError, PortMatching};
use crate::diag::SourceError;
use crate::network::Network;

/// The three kinds of port a network has, in the order they are reported.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum PortKind {
    Input,
    Output,
    Storage,
}

impl PortKind {
    fn noun(self) -> &'static str {
        match self {
            PortKind::Input => "input",
            PortKind::Output => "output",
            PortKind::Storage => "storage element",
        }
    }
}

/// Paired port names: `(name in A, name in B)` for each kind, in A's
/// declaration order.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub(crate) struct PortPairs {
    pub inputs: Vec<(String, String)>,
    pub outputs: Vec<(String, String)>,
    pub storage: Vec<(String, String)>,
}

fn names(net: &Network, kind: PortKind) -> Vec<String> {
    match kind {
        PortKind::Input => net.inputs().keys().cloned().collect(),
        PortKind::Output => net.outputs().keys().cloned().collect(),
        PortKind::Storage => net.storage().keys().cloned().collect(),
    }
}

fn kind_of(net: &Network, name: &str) -> Option<PortKind> {
    if net.inputs().contains_key(name) {
        Some(PortKind::Input)
    } else if net.outputs().contains_key(name) {
        Some(PortKind::Output)
    } else if net.storage().contains_key(name) {
        Some(PortKind::Storage)
    } else {
        None
    }
}

/// Pairs the ports of `a` and `b` as `matching` says.
pub(crate) fn pair_ports(
    a: &Network,
    b: &Network,
    matching: &PortMatching,
) -> Result<PortPairs, EquivError> {
    let kinds = [PortKind::Input, PortKind::Output, PortKind::Storage];
    let mut pairs = PortPairs::default();
    let mut unmatched = Vec::new();
    // Explicit pairs, sorted by kind, checked against both networks.
    let mut explicit: [Vec<(String, String)>; 3] = Default::default();
    if let PortMatching::Map(list) = matching {
        for (name_a, name_b) in list {
            let Some(kind) = kind_of(a, name_a) else {
                return Err(EquivError::BadPortMap(format!(
                    "the port map names '{name_a}', which is not a port of the first netlist"
                )));
            };
            if kind_of(b, name_b) != Some(kind) {
                return Err(EquivError::BadPortMap(format!(
                    "the port map pairs {} '{name_a}' with '{name_b}', which is not {} {} of the second netlist",
                    kind.noun(),
                    if kind == PortKind::Input { "an" } else { "a" },
                    kind.noun()
                )));
            }
            explicit[kind as usize].push((name_a.clone(), name_b.clone()));
        }
    }
    for kind in kinds {
        let names_a = names(a, kind);
        let names_b = names(b, kind);
        let list = match matching {
            PortMatching::ByOrder => {
                for extra in names_a.iter().skip(names_b.len()) {
                    unmatched.push(format!("{} '{extra}' of the first netlist", kind.noun()));
                }
                for extra in names_b.iter().skip(names_a.len()) {
                    unmatched.push(format!("{} '{extra}' of the second netlist", kind.noun()));
                }
                names_a
                    .iter()
                    .cloned()
                    .zip(names_b.iter().cloned())
                    .collect()
            }
            PortMatching::ByName | PortMatching::Map(_) => {
                let given = &explicit[kind as usize];
                let mapped_a: rustc_hash::FxHashMap<&str, &str> = given
                    .iter()
                    .map(|(x, y)| (x.as_str(), y.as_str()))
                    .collect();
                let taken_b: rustc_hash::FxHashSet<&str> =
                    given.iter().map(|(_, y)| y.as_str()).collect();
                let set_b: rustc_hash::FxHashSet<&str> =
                    names_b.iter().map(String::as_str).collect();
                let mut list = Vec::new();
                let mut used_b = rustc_hash::FxHashSet::default();
                for name in &names_a {
                    let partner = match mapped_a.get(name.as_str()) {
                        Some(&p) => Some(p),
                        None if set_b.contains(name.as_str())
                            && !taken_b.contains(name.as_str()) =>
                        {
                            Some(name.as_str())
                        }
                        None => None,
                    };
                    match partner {
                        Some(p) => {
                            used_b.insert(p.to_string());
                            list.push((name.clone(), p.to_string()));
                        }
                        None => {
                            unmatched.push(format!("{} '{name}' of the first netlist", kind.noun()))
                        }
                    }
                }
                for name in &names_b {
                    if !used_b.contains(name) {
                        unmatched.push(format!("{} '{name}' of the second netlist", kind.noun()));
                    }
                }
                list
            }
        };
        match kind {
            PortKind::Input => pairs.inputs = list,
            PortKind::Output => pairs.outputs = list,
            PortKind::Storage => pairs.storage = list,
        }
    }
    if unmatched.is_empty() {
        Ok(pairs)
    } else {
        Err(EquivError::UnmatchedPorts(unmatched))
    }
}

/// Reads a port-map file: one `name_in_a name_in_b` pair a line, `#` starts
/// a comment, blank lines are ignored. A name may appear at most once on each
/// side. Errors point at the offending line and column.
pub fn parse_port_map(text: &str, file_name: &str) -> Result<Vec<(String, String)>, SourceError> {
    let mut pairs = Vec::new();
    let mut seen_a = rustc_hash::FxHashMap::default();
    let mut seen_b = rustc_hash::FxHashMap::default();
    for (index, raw_line) in text.lines().enumerate() {
        let line_no = index as u32 + 1;
        let line = match raw_line.find('#') {
            Some(cut) => &raw_line[..cut],
            None => raw_line,
        };
        // Tokens with their 1-based starting columns.
        let mut tokens = Vec::new();
        let mut start = None;
        for (pos, ch) in line
            .char_indices()
            .chain(std::iter::once((line.len(), ' ')))
        {
            if ch.is_whitespace() {
                if let Some(s) = start.take() {
                    tokens.push((&line[s..pos], line[..s].chars().count() as u32 + 1));
                }
            } else if start.is_none() {
                start = Some(pos);
            }
        }
        match tokens.len() {
            0 => continue,
            2 => {}
            1 => {
                let column = tokens[0].1 + tokens[0].0.chars().count() as u32;
                return Err(SourceError::new(
                    file_name,
                    line_no,
                    column,
                    format!(
                        "expected two port names ('name_in_a name_in_b'), found only '{}'",
                        tokens[0].0
                    ),
                ));
            }
            _ => {
                return Err(SourceError::new(
                    file_name,
                    line_no,
                    tokens[2].1,
                    format!(
                        "expected two port names ('name_in_a name_in_b'), found a third word '{}'",
                        tokens[2].0
                    ),
                ));
            }
        }
        let (name_a, col_a) = tokens[0];
        let (name_b, col_b) = tokens[1];
        if let Some(first) = seen_a.insert(name_a.to_string(), line_no) {
            return Err(SourceError::new(
                file_name,
                line_no,
                col_a,
                format!("port '{name_a}' of the first netlist is already paired on line {first}"),
            ));
        }
        if let Some(first) = seen_b.insert(name_b.to_string(), line_no) {
            return Err(SourceError::new(
                file_name,
                line_no,
                col_b,
                format!("port '{name_b}' of the second netlist is already paired on line {first}"),
            ));
        }
        pairs.push((name_a.to_string(), name_b.to_string()));
    }
    Ok(pairs)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn port_map_reads_pairs_and_comments() {
        let text = "# header\n a  x # first\n\nb y\n";
        let pairs = parse_port_map(text, "m.txt").unwrap();
        assert_eq!(
            pairs,
            vec![("a".into(), "x".into()), ("b".into(), "y".into())]
        );
    }

    #[test]
    fn port_map_errors_have_positions() {
        let e = parse_port_map("a x\n  b\n", "m.txt").unwrap_err();
        assert_eq!((e.line, e.column), (2, 4));
        let e = parse_port_map("a x y\n", "m.txt").unwrap_err();
        assert_eq!((e.line, e.column), (1, 5));
        let e = parse_port_map("a x\na y\n", "m.txt").unwrap_err();
        assert_eq!((e.line, e.column), (2, 1));
        assert!(e.message.contains("line 1"));
    }

    #[test]
    fn unmatched_ports_are_listed() {
        let mut a = Network::new("a");
        let x = a.add_input("x").unwrap();
        a.add_input("only_a").unwrap();
        a.add_output("f", x).unwrap();
        let mut b = Network::new("b");
        let x = b.add_input("x").unwrap();
        b.add_output("g", x).unwrap();
        let err = pair_ports(&a, &b, &PortMatching::ByName).unwrap_err();
        let EquivError::UnmatchedPorts(list) = err else {
            panic!("expected unmatched ports")
        };
        assert_eq!(
            list,
            vec![
                "input 'only_a' of the first netlist",
                "output 'f' of the first netlist",
                "output 'g' of the second netlist"
            ]
        );
        let pairs = pair_ports(
            &a,
            &b,
            &PortMatching::Map(vec![
                ("f".into(), "g".into()),
                ("only_a".into(), "x".into()),
            ]),
        );
        // 'x' of A is left without a partner because B's 'x' is taken.
        assert!(
            matches!(pairs, Err(EquivError::UnmatchedPorts(l)) if l == vec!["input 'x' of the first netlist"])
        );
    }
}
