//! Generates a large multiplier, writes it as BLIF, and reports node counts,
//! memory and the time of each phase.
//!
//! ```text
//! cargo run --release --example generate_multiplier -- 256 array out.blif
//! ```

use ribbonmap::generate::{generate, render, Family, Params};
use ribbonmap::io::NetlistFormat;
use std::time::Instant;

fn main() {
    let mut args = std::env::args().skip(1);
    let width: u32 = args.next().and_then(|w| w.parse().ok()).unwrap_or(256);
    let style = args.next().unwrap_or_else(|| "array".to_string());
    let out = args.next();
    let params = Params::new(width).with_style(style.clone());
    let start = Instant::now();
    let net = match generate(Family::Multiplier, &params) {
        Ok(net) => net,
        Err(e) => {
            eprintln!("error: {e}");
            std::process::exit(2);
        }
    };
    let generated = start.elapsed();
    let k = net.kind_counts();
    println!(
        "{width}x{width} {style} multiplier: {} AND, {} XOR, {} MAJ ({} nodes), depth {}, {:.1} MB",
        k.and,
        k.xor,
        k.maj,
        k.total(),
        net.depth(),
        net.memory_bytes() as f64 / 1e6
    );
    println!("generate: {:.3} s", generated.as_secs_f64());
    let start = Instant::now();
    let text = render(&net, Family::Multiplier, &params, NetlistFormat::Blif).expect("BLIF");
    println!(
        "write BLIF: {:.3} s, {:.1} MB",
        start.elapsed().as_secs_f64(),
        text.len() as f64 / 1e6
    );
    if let Some(path) = out {
        if let Err(e) = ribbonmap::fsutil::write_atomic(path.as_ref(), text.as_bytes()) {
            eprintln!("error: {path}: {e}");
            std::process::exit(2);
        }
    }
}
