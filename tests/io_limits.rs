//! Size bounds of the readers, with generators of nesting, replication and
//! hierarchy: every generated file either reads to the function integer
//! arithmetic predicts, or is refused with a located error when the size
//! it would reach (again computed by integer arithmetic here) passes the
//! bound. Also the start values of registers from Verilog `initial` blocks.

use proptest::prelude::*;
use ribbonmap::io::{read_netlist_str, NetlistFormat, ReadOptions, MAX_EXPRESSION_WIDTH};
use ribbonmap::network::{InitValue, Network};

fn read(
    text: &str,
    name: &str,
    format: NetlistFormat,
    max_nets: Option<u64>,
) -> Result<Network, ribbonmap::diag::SourceError> {
    let opts = ReadOptions {
        max_nets,
        ..ReadOptions::default()
    };
    read_netlist_str(text, name, format, &opts)
}

/// Output words of a one-input design on the patterns a = 0, a = 1.
fn column(net: &Network) -> u64 {
    net.simulate_outputs(&[0b10])[0] & 0b11
}

/// `count` in-series instances per level of a chain of `levels` modules,
/// each leaf an inverter: the output is `a` inverted `count^levels` times.
fn verilog_hierarchy(levels: u32, count: u32) -> String {
    let mut v = String::from("module m_0(a, y); input a; output y; assign y = ~a; endmodule\n");
    for k in 1..=levels {
        v.push_str(&format!("module m_{k}(a, y); input a; output y; wire t0;"));
        for i in 0..count {
            v.push_str(&format!(" wire t{};", i + 1));
        }
        v.push_str(" assign t0 = a;");
        for i in 0..count {
            v.push_str(&format!(" m_{} u{i}(t{i}, t{});", k - 1, i + 1));
        }
        v.push_str(&format!(" assign y = t{count}; endmodule\n"));
    }
    v
}

fn blif_hierarchy(levels: u32, count: u32) -> String {
    let mut b = String::new();
    for k in (1..=levels).rev() {
        b.push_str(&format!(
            ".model m_{k}\n.inputs a\n.outputs y\n.names a t0\n1 1\n"
        ));
        for i in 0..count {
            b.push_str(&format!(".subckt m_{} a=t{i} y=t{}\n", k - 1, i + 1));
        }
        b.push_str(&format!(".names t{count} y\n1 1\n.end\n"));
    }
    b.push_str(".model m_0\n.inputs a\n.outputs y\n.names a y\n0 1\n.end\n");
    b
}

/// A replication nest `{c0{{c1{ ... {a} ... }}}}` and its width.
fn replication(counts: &[u32]) -> (String, u64) {
    let mut e = "a".to_string();
    let mut width = 1u64;
    for &c in counts.iter().rev() {
        e = format!("{{{c}{{{e}}}}}");
        width = width.saturating_mul(c as u64);
    }
    (e, width)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn replication_nests_give_parity_or_a_located_width_error(counts in proptest::collection::vec(1u32..48, 1..5)) {
        let (e, width) = replication(&counts);
        let text = format!("module m(a, y); input a; output y; assign y = ^{e}; endmodule\n");
        // The net bound raised past any width allowed, so the width bound
        // is what refuses.
        match read(&text, "r.v", NetlistFormat::Verilog, Some(1 << 23)) {
            Ok(net) => {
                prop_assert!(width <= MAX_EXPRESSION_WIDTH);
                // XOR of `width` copies of a: a when width is odd, else 0.
                prop_assert_eq!(column(&net), if width % 2 == 1 { 0b10 } else { 0 });
            }
            Err(err) => {
                prop_assert!(width > MAX_EXPRESSION_WIDTH, "{}", err);
                prop_assert_eq!(err.line, 1);
                prop_assert!(err.message.contains(&width.to_string()), "{}", err);
            }
        }
    }

    #[test]
    fn hierarchies_flatten_to_the_predicted_function_or_are_refused(levels in 1u32..40, count in 1u32..4, blif in any::<bool>()) {
        let limit = 5_000u64;
        let instances: u64 = (0..levels).fold(1u64, |n, _| n.saturating_mul(count as u64));
        let (text, format) = if blif {
            (blif_hierarchy(levels, count), NetlistFormat::Blif)
        } else {
            (verilog_hierarchy(levels, count), NetlistFormat::Verilog)
        };
        match read(&text, "h", format, Some(limit)) {
            Ok(net) => {
                // count^levels inverters in series.
                prop_assert!(instances <= limit);
                prop_assert_eq!(column(&net), if instances % 2 == 1 { 0b01 } else { 0b10 });
            }
            Err(err) => {
                // The estimate counts about 12 nets per leaf here, so a
                // refusal needs more than limit / 64 leaves; the error
                // names a module.
                prop_assert!(instances > limit / 64, "{} leaves: {}", instances, err);
                prop_assert!(err.message.contains("m_") && err.message.contains("--max-nets"), "{}", err);
                prop_assert!(err.line > 0 && err.column > 0, "{}", err);
            }
        }
    }

    #[test]
    fn nesting_gives_the_predicted_function_or_a_depth_error(depth in 1usize..400) {
        let text = format!(
            "module t(a, y); input a; output y; assign y = {}a{}; endmodule\n",
            "~(".repeat(depth),
            ")".repeat(depth)
        );
        match read(&text, "n.v", NetlistFormat::Verilog, None) {
            Ok(net) => prop_assert_eq!(column(&net), if depth % 2 == 1 { 0b01 } else { 0b10 }),
            Err(err) => {
                prop_assert!(depth > 60, "{}", err);
                prop_assert!(err.message.contains("nested"), "{}", err);
            }
        }
    }
}

#[test]
fn the_option_raises_the_bound() {
    // 2^12 leaves: refused at 1,000 nets, read at the default.
    let text = verilog_hierarchy(12, 2);
    let err = read(&text, "h.v", NetlistFormat::Verilog, Some(1_000)).unwrap_err();
    assert!(err.message.contains("more than the limit of 1000"), "{err}");
    let net = read(&text, "h.v", NetlistFormat::Verilog, None).unwrap();
    assert_eq!(column(&net), 0b10);
}

#[test]
fn many_wide_statements_hit_the_running_bound() {
    // Each statement is within the width limit, but together they pass a
    // small net limit: refused at the statement that crosses it.
    let mut text = String::from("module m(a, y); input a; output y; wire [4095:0] w0;");
    for k in 1..40 {
        text.push_str(&format!(
            " wire [4095:0] w{k}; assign w{k} = w{} ^ {{4096{{a}}}};",
            k - 1
        ));
    }
    text.push_str(" assign w0 = {4096{a}}; assign y = ^w39; endmodule\n");
    let err = read(&text, "w.v", NetlistFormat::Verilog, Some(100_000)).unwrap_err();
    assert!(err.message.contains("100000"), "{err}");
    assert!(read(&text, "w.v", NetlistFormat::Verilog, None).is_ok());
}

/// A flip-flop module as benchmark files write it: the register's start
/// value in an `initial` block, a delayed continuous assignment.
const FLIP_FLOP: &str = "module dff(CK, D, Q);
  input CK, D;
  output Q;
  reg q;
  initial q <= 1'b0;
  assign #1 Q = q;
  always @(posedge CK) q <= D;
endmodule
";

#[test]
fn initial_constants_become_start_values() {
    let net = read(FLIP_FLOP, "dff.v", NetlistFormat::Verilog, None).unwrap();
    assert_eq!(net.storage()["q"].init, InitValue::Zero);
    let one = FLIP_FLOP.replace("initial q <= 1'b0;", "initial begin #0 q = 1'b1; end");
    let net = read(&one, "dff.v", NetlistFormat::Verilog, None).unwrap();
    assert_eq!(net.storage()["q"].init, InitValue::One);
    // A vector register gets one value per bit, least significant first.
    let vector = "module r(c, d, q); input c; input [2:0] d; output [2:0] q; reg [2:0] s;
      initial s = 3'b101; always @(posedge c) s <= d; assign q = s; endmodule\n";
    let net = read(vector, "r.v", NetlistFormat::Verilog, None).unwrap();
    let inits: Vec<InitValue> = net.storage().values().map(|s| s.init).collect();
    assert_eq!(inits, [InitValue::One, InitValue::Zero, InitValue::One]);
    // The writer keeps them.
    let back = read(
        &ribbonmap::io::write_verilog(&net),
        "w.v",
        NetlistFormat::Verilog,
        None,
    )
    .unwrap();
    let again: Vec<InitValue> = back.storage().values().map(|s| s.init).collect();
    assert_eq!(again, inits);
}

#[test]
fn other_initial_content_is_refused_clearly() {
    for (body, line) in [
        ("initial q = D;", 5),
        ("initial if (D) q = 1'b0;", 5),
        ("initial begin q = 1'b0; $finish; end", 5),
    ] {
        let text = FLIP_FLOP.replace("initial q <= 1'b0;", body);
        let err = read(&text, "dff.v", NetlistFormat::Verilog, None).unwrap_err();
        assert_eq!(err.line, line, "{err}");
        assert!(err.message.contains("constant start values"), "{err}");
    }
}

/// A few bytes of Verilog declaring many port bits within a raised net
/// bound (7 × 2^20 = 7,340,032 bits < 2^23) are refused at the port that
/// passes the port-bit bound of docs/netlist-formats.md (2^23 / 16 =
/// 524,288 bits, integer arithmetic), not read for seconds; at the default
/// bound 65,536 port bits (2^20 / 16) are allowed.
#[test]
fn wide_ports_within_the_net_bound_are_refused_by_the_port_bound() {
    let ports: Vec<String> = (0..7).map(|i| format!("p{i}")).collect();
    let text = format!(
        "module m({}, y);\n{}\noutput y;\nassign y = p0[0];\nendmodule\n",
        ports.join(", "),
        ports
            .iter()
            .map(|p| format!("input [1048575:0] {p};"))
            .collect::<Vec<_>>()
            .join("\n")
    );
    let raised = ReadOptions {
        max_nets: Some(1 << 23),
        ..ReadOptions::default()
    };
    let err = read_netlist_str(&text, "w.v", NetlistFormat::Verilog, &raised).expect_err("refused");
    assert_eq!(err.line, 2, "{err}");
    assert!(err.message.contains("524288 port bits"), "{err}");
    // 65,536 port bits in all are allowed (65,535 + 1).
    let text = "module m(a, y);\ninput [65534:0] a;\noutput y;\nassign y = a[0];\nendmodule\n";
    read_netlist_str(
        text,
        "ok.v",
        NetlistFormat::Verilog,
        &ReadOptions::default(),
    )
    .unwrap();
}

/// A fuzz finding (examples/fuzz_inputs.rs): a doubling hierarchy whose
/// model m_23 instantiates m_34 above it, a cycle. The search for the
/// smallest too-large model walked around the cycle for ever; now the file
/// is refused at once with a located error.
#[test]
fn a_cyclic_doubling_hierarchy_is_refused_without_hanging() {
    let text = std::fs::read_to_string("tests/data/bad/cyclic_doubling.blif").unwrap();
    let err = read(&text, "c.blif", NetlistFormat::Blif, None).unwrap_err();
    assert!(err.line >= 1, "{err}");
}
