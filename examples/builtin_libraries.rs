//! Regenerates the built-in ribbon libraries `libraries/ribbon3.json`,
//! `libraries/ribbon3-nomaj.json` and `libraries/ribbon2.json` by
//! characterising the INVENTED demo kit `libraries/devices/demo/demo.json`
//! (see `ribbonmap::device::demo_builtins` for which cells each keeps).
//!
//! Run from anywhere: `cargo run --example builtin_libraries` (writes into
//! the repository). `tests/library_derived.rs` fails until the
//! embedded built-ins equal a fresh characterisation (rebuild after running
//! this: the binary embeds the files).

use ribbonmap::device::demo_builtins::{derived_builtin_texts, LIBRARY_DIR};
use std::path::Path;

fn main() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let texts = match derived_builtin_texts(root) {
        Ok(t) => t,
        Err(e) => {
            eprintln!("error: {e}");
            std::process::exit(2);
        }
    };
    for (name, text) in texts {
        let path = root.join(LIBRARY_DIR).join(format!("{name}.json"));
        if let Err(e) = std::fs::write(&path, text) {
            eprintln!("error: {}: cannot write: {e}", path.display());
            std::process::exit(2);
        }
        println!("wrote {}", path.display());
    }
}
