//! Checks a mapped netlist the way a user would: generate a 12-bit
//! Kogge-Stone adder, map it onto the default library, write the mapped
//! netlist as structural Verilog, read that text back with the library's
//! cells, and prove it equivalent to the generated adder.
//!
//! Run with `cargo run --release --example check_mapped`.

use ribbonmap::equiv::{check, EquivOptions, Verdict};
use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::io::{read_netlist_str, NetlistFormat, ReadOptions};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, MapOptions};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let adder = generate(Family::Adder, &Params::new(12).with_style("kogge-stone"))?;
    let lib = Library::builtin("ribbon3").ok_or("ribbon3 is built in")?;
    let mapped = map(&adder, &lib, &MapOptions::default())?;
    let verilog = mapped.write_verilog(&lib);
    println!(
        "mapped {} onto {}: {} cells, {} lines of Verilog",
        adder.name(),
        lib.name,
        mapped.instances.len(),
        verilog.lines().count()
    );

    let options = ReadOptions {
        library: Some(&lib),
        ..ReadOptions::default()
    };
    let read_back = read_netlist_str(&verilog, "mapped.v", NetlistFormat::Verilog, &options)?;
    match check(&adder, &read_back, &EquivOptions::default())? {
        Verdict::Equivalent { outputs_checked } => {
            println!("proven equivalent: {outputs_checked} outputs");
            Ok(())
        }
        other => Err(format!("mapped netlist differs from the adder: {other:?}").into()),
    }
}
