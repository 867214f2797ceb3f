//! Shared helpers of the mapper tests: cell libraries built in code with the
//! cells and numbers of the built-in `ribbon3`, `ribbon3-nomaj` and
//! `nand-nor-inv` libraries, and circuits built from integer-arithmetic
//! definitions (full adders as XOR plus majority).
#![allow(dead_code)]

use ribbonmap::library::{Cell, DelayModel, Leakage, Library, StorageCell, Units};
use ribbonmap::network::{Lit, Network};

fn cell(
    name: &str,
    inputs: &[&str],
    truth: u64,
    area: f64,
    delay: (f64, f64),
    load: f64,
    devices: u32,
) -> Cell {
    Cell {
        name: name.into(),
        inputs: inputs.iter().map(|s| s.to_string()).collect(),
        output: "y".into(),
        truth,
        area,
        delay: DelayModel {
            intrinsic: delay.0,
            per_load: delay.1,
        },
        input_load: load,
        switch_energy: 1.0,
        switch_energy_per_load: 0.0,
        leakage: Leakage::Constant(0.01),
        devices,
    }
}

fn library(name: &str, cells: Vec<Cell>, storage_area: f64, area_unit: &str) -> Library {
    Library {
        name: name.into(),
        description: "built in code for tests".into(),
        units: Units {
            area: area_unit.into(),
            delay: "ps".into(),
            energy: "aJ".into(),
            power: "nW".into(),
        },
        supply_v: None,
        primary_output_load: 1.0,
        cells,
        storage: vec![StorageCell {
            name: "dff".into(),
            d: "d".into(),
            q: "q".into(),
            clock: "clk".into(),
            area: storage_area,
        }],
    }
}

/// The cells of ribbon3 (numbers as in libraries/ribbon3.json).
pub fn ribbon3_cells(with_majority: bool) -> Vec<Cell> {
    let ab = &["a", "b"][..];
    let pins3 = &["a", "b", "c"][..];
    let mut v = vec![
        cell("inv", &["a"], 0b01, 40.0, (1.0, 0.5), 1.0, 2),
        cell("buf", &["a"], 0b10, 44.0, (1.2, 0.5), 1.0, 2),
        cell("and2", ab, 0x8, 60.0, (1.6, 0.55), 1.0, 2),
        cell("nand2", ab, 0x7, 60.0, (1.6, 0.55), 1.0, 2),
        cell("or2", ab, 0xE, 60.0, (1.6, 0.55), 1.0, 2),
        cell("nor2", ab, 0x1, 60.0, (1.6, 0.55), 1.0, 2),
        cell("xor2", ab, 0x6, 72.0, (1.9, 0.55), 1.1, 2),
        cell("xnor2", ab, 0x9, 72.0, (1.9, 0.55), 1.1, 2),
        cell("and3", pins3, 0x80, 84.0, (2.2, 0.6), 1.0, 2),
        cell("nand3", pins3, 0x7F, 84.0, (2.2, 0.6), 1.0, 2),
        cell("or3", pins3, 0xFE, 84.0, (2.2, 0.6), 1.0, 2),
        cell("nor3", pins3, 0x01, 84.0, (2.2, 0.6), 1.0, 2),
    ];
    if with_majority {
        v.push(cell("maj3", pins3, 0xE8, 110.0, (2.4, 0.6), 1.0, 2));
        v.push(cell("minority3", pins3, 0x17, 110.0, (2.4, 0.6), 1.0, 2));
    }
    v.push(cell("xor3", pins3, 0x96, 120.0, (2.7, 0.65), 1.2, 2));
    v.push(cell("xnor3", pins3, 0x69, 120.0, (2.7, 0.65), 1.2, 2));
    v
}

/// ribbon3: two- and three-input ribbon gates with majority.
pub fn ribbon3() -> Library {
    library("ribbon3", ribbon3_cells(true), 300.0, "nm2")
}

/// ribbon3 without maj3/minority3.
pub fn ribbon3_nomaj() -> Library {
    library("ribbon3-nomaj", ribbon3_cells(false), 300.0, "nm2")
}

/// Static CMOS {INV, NAND2, NOR2} with transistor counts as area
/// (common practice: inverter 2, NAND2 and NOR2 4 transistors).
pub fn nand_nor_inv() -> Library {
    library(
        "nand-nor-inv",
        vec![
            cell("inv", &["a"], 0b01, 2.0, (1.0, 1.0), 1.0, 2),
            cell("nand2", &["a", "b"], 0x7, 4.0, (2.0, 1.0), 4.0 / 3.0, 4),
            cell("nor2", &["a", "b"], 0x1, 4.0, (2.0, 1.0), 5.0 / 3.0, 4),
        ],
        24.0,
        "transistors",
    )
}

/// Inputs a[0..n], b[0..n] in the order of docs/generated-circuits.md.
pub fn operands(net: &mut Network, n: usize) -> (Vec<Lit>, Vec<Lit>) {
    let a = (0..n)
        .map(|i| net.add_input(format!("a[{i}]")).unwrap())
        .collect();
    let b = (0..n)
        .map(|i| net.add_input(format!("b[{i}]")).unwrap())
        .collect();
    (a, b)
}

/// An n-bit ripple-carry adder from a half adder and n - 1 full adders
/// (sum = a ^ b ^ c as a two-node chain, carry = maj(a, b, c)); outputs
/// s[0..n].
pub fn ripple_carry_adder(n: usize) -> Network {
    let mut net = Network::new(format!("rca{n}"));
    let (a, b) = operands(&mut net, n);
    let mut carry = Lit::FALSE;
    for i in 0..n {
        let (s, c) = if i == 0 {
            (net.xor(a[0], b[0]), net.and(a[0], b[0]))
        } else {
            let t = net.xor(a[i], b[i]);
            (net.xor(t, carry), net.maj(a[i], b[i], carry))
        };
        net.add_output(format!("s[{i}]"), s).unwrap();
        carry = c;
    }
    net.add_output(format!("s[{n}]"), carry).unwrap();
    net
}

/// Parity of n inputs as a chain ((x0 ^ x1) ^ x2) ^ ...
pub fn parity_chain(n: usize) -> Network {
    let mut net = Network::new(format!("parity_chain{n}"));
    let x: Vec<Lit> = (0..n)
        .map(|i| net.add_input(format!("x{i}")).unwrap())
        .collect();
    let mut acc = x[0];
    for &l in &x[1..] {
        acc = net.xor(acc, l);
    }
    net.add_output("p", acc).unwrap();
    net
}

/// Parity of n inputs as a balanced binary tree.
pub fn parity_tree(n: usize) -> Network {
    let mut net = Network::new(format!("parity_tree{n}"));
    let x: Vec<Lit> = (0..n)
        .map(|i| net.add_input(format!("x{i}")).unwrap())
        .collect();
    let p = net.xor_many(&x);
    net.add_output("p", p).unwrap();
    net
}

/// An n x n array multiplier from the generators (partial products ANDed,
/// rows summed with xor/majority full adders).
pub fn array_multiplier(n: usize) -> Network {
    ribbonmap::generate::generate(
        ribbonmap::generate::Family::Multiplier,
        &ribbonmap::generate::Params::new(n as u32).with_style("array"),
    )
    .expect("array multiplier of a supported width")
}

/// The value of bus `name[0..width]` in a 64-pattern simulation, per pattern.
pub fn bus_value(net: &Network, values: &[u64], name: &str, width: usize, pattern: u32) -> u128 {
    let mut v = 0u128;
    for i in 0..width {
        let lit = net.outputs()[&format!("{name}[{i}]")];
        let w = ribbonmap::network::lit_word(values, lit);
        v |= (((w >> pattern) & 1) as u128) << i;
    }
    v
}
