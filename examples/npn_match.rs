//! Load the default library and find which cells realise a small function
//! by NPN matching, printing how to wire each matching cell.
//!
//! Run: `cargo run --example npn_match -- 0x2A 3` (truth table, input count).

use ribbonmap::library::Library;
use ribbonmap::truth::{npn_canon, parse_truth_word};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let inputs: usize = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(3);
    let text = args.get(1).map(String::as_str).unwrap_or("0x2A");
    let truth = match parse_truth_word(text, inputs) {
        Ok(t) => t,
        Err(e) => {
            eprintln!("error: {e}");
            std::process::exit(2);
        }
    };
    let library = Library::builtin(Library::DEFAULT_BUILTIN).expect("built-in library");
    let (canon, to_canon) = npn_canon(truth, inputs);
    println!("function {text} over {inputs} inputs: NPN class {canon:#x}");
    for cell in library.cells.iter().filter(|c| c.arity() == inputs) {
        let (cell_canon, cell_to_canon) = cell.npn();
        if cell_canon != canon {
            continue;
        }
        // The cell, wired this way, computes the function.
        let wiring = cell_to_canon.then(&to_canon.inverse());
        assert_eq!(wiring.apply(cell.truth, inputs), truth);
        let pins: Vec<String> = (0..inputs)
            .map(|j| {
                let neg = if (wiring.input_neg >> j) & 1 == 1 {
                    "!"
                } else {
                    ""
                };
                format!("{} <- {neg}x{}", cell.inputs[j], wiring.perm[j])
            })
            .collect();
        let out = if wiring.output_neg {
            " (output complemented)"
        } else {
            ""
        };
        println!("  {}: {}{}", cell.name, pins.join(", "), out);
    }
}
