//! Generates an adder in every style and prints its node counts and depth.
//!
//! ```text
//! cargo run --example generate_adder -- 32
//! ```

use ribbonmap::generate::{generate, Family, Params};

fn main() {
    let width: u32 = std::env::args()
        .nth(1)
        .and_then(|w| w.parse().ok())
        .unwrap_or(32);
    println!("{width}-bit adders (nodes: two-input AND, two-input XOR, three-input majority)");
    println!(
        "{:<16} {:>6} {:>6} {:>6} {:>6} {:>6}",
        "style", "AND", "XOR", "MAJ", "total", "depth"
    );
    for &style in Family::Adder.styles() {
        let params = Params::new(width).with_style(style);
        match generate(Family::Adder, &params) {
            Ok(net) => {
                let k = net.kind_counts();
                println!(
                    "{:<16} {:>6} {:>6} {:>6} {:>6} {:>6}",
                    style,
                    k.and,
                    k.xor,
                    k.maj,
                    k.total(),
                    net.depth()
                );
            }
            Err(e) => {
                eprintln!("error: {e}");
                std::process::exit(2);
            }
        }
    }
}
