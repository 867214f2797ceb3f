//! The built-in ribbon libraries as characterisations of the demo kit.
//!
//! The built-in `ribbon3`, `ribbon3-nomaj` and `ribbon2`
//! (`libraries/ribbon3.json`, `ribbon3-nomaj.json`, `ribbon2.json`,
//! embedded by [`crate::library::builtin_text`]) carry no typed-in number:
//! they are what `ribbonmap characterize` derives from the INVENTED demo kit
//! `libraries/devices/demo/demo.json`, cut to each library's cells. Their
//! numbers are still invented, but every one of them is traceable to a
//! conduction map through the `electrical` blocks and the `derived_from`
//! record. This module says which cells each library keeps and produces the
//! three files' text; `examples/builtin_libraries.rs` writes them and
//! tests/library_derived.rs checks that the embedded texts equal a fresh
//! characterisation. (The earlier hand-typed numbers survive only as test
//! data, tests/data/libraries/*-illustrative.json.)

use super::characterize::{characterize, CellCharacter};
use super::kit::read_kit;
use super::library_write::{json_text, library_json_of, LibraryChoice};
use crate::diag::SourceError;
use std::path::Path;

/// The demo kit, relative to the repository's root.
pub const DEMO_KIT: &str = "libraries/devices/demo/demo.json";

/// The folder of the built-in library files, relative to the repository's
/// root (table and kit paths in the files are relative to it).
pub const LIBRARY_DIR: &str = "libraries";

/// A built-in library derived from the demo kit.
pub struct DerivedBuiltin {
    /// The built-in library's name, also written in the file and its file
    /// stem under `libraries/`.
    pub name: &'static str,
    /// Its description.
    pub description: &'static str,
    /// Which kit cells it keeps.
    pub keep: fn(&CellCharacter) -> bool,
}

fn all_cells(_: &CellCharacter) -> bool {
    true
}

fn without_majority(c: &CellCharacter) -> bool {
    !matches!(c.kit_cell.name.as_str(), "maj3" | "minority3")
}

fn up_to_two_inputs(c: &CellCharacter) -> bool {
    c.kit_cell.inputs.len() <= 2
}

/// The libraries derived from the demo kit, largest first.
pub const DERIVED_BUILTINS: [DerivedBuiltin; 3] = [
    DerivedBuiltin {
        name: "ribbon3",
        description: "Complementary conductance gates (a pull-up and a pull-down ribbon per cell) of one, two and three inputs, with majority and three-input XOR. Every figure is derived by `ribbonmap characterize` from the INVENTED demo kit devices/demo/demo.json (analytic conduction maps of our own, not a device simulator's output nor a fabricated device): invented, but traceable through each cell's electrical block and the derived_from record.",
        keep: all_cells,
    },
    DerivedBuiltin {
        name: "ribbon3-nomaj",
        description: "ribbon3 without the majority and minority cells, to measure what majority gates buy. Every figure is derived by `ribbonmap characterize` from the INVENTED demo kit devices/demo/demo.json (analytic conduction maps of our own): invented, but traceable through each cell's electrical block and the derived_from record.",
        keep: without_majority,
    },
    DerivedBuiltin {
        name: "ribbon2",
        description: "The one- and two-input cells of ribbon3. Every figure is derived by `ribbonmap characterize` from the INVENTED demo kit devices/demo/demo.json (analytic conduction maps of our own): invented, but traceable through each cell's electrical block and the derived_from record.",
        keep: up_to_two_inputs,
    },
];

/// Characterises the demo kit under the repository root `root` and returns
/// each derived library's built-in name and file text, in
/// [`DERIVED_BUILTINS`] order.
pub fn derived_builtin_texts(root: &Path) -> Result<Vec<(&'static str, String)>, SourceError> {
    let kit = read_kit(&root.join(DEMO_KIT))?;
    let ch = characterize(kit)?;
    let dir = root.join(LIBRARY_DIR);
    Ok(DERIVED_BUILTINS
        .iter()
        .map(|b| {
            let choice = LibraryChoice {
                name: b.name,
                description: b.description,
                keep: &b.keep,
            };
            (b.name, json_text(&library_json_of(&ch, &dir, &choice)))
        })
        .collect())
}
