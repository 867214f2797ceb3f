//! Regenerates the benchmarks/ folder byte for byte (every netlist and the
//! README table).
//!
//! ```text
//! cargo run --release --example generate_benchmarks            # into benchmarks/
//! cargo run --release --example generate_benchmarks -- OUT_DIR # elsewhere
//! ```

use std::path::PathBuf;

fn main() {
    let dir = std::env::args()
        .nth(1)
        .map(PathBuf::from)
        .unwrap_or_else(|| PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("benchmarks"));
    match ribbonmap::generate::write_benchmarks(&dir) {
        Ok(paths) => println!("wrote {} files to {}", paths.len(), dir.display()),
        Err(e) => {
            eprintln!("error: {e}");
            std::process::exit(2);
        }
    }
}
