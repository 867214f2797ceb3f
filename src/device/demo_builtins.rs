//! The ribbon libraries as characterisations of the demo kit.
//!
//! `libraries/demo-kit-ribbon3.json`, `demo-kit-ribbon3-nomaj.json` and
//! `demo-kit-ribbon2.json` carry the cell sets of the built-in `ribbon3`,
//! `ribbon3-nomaj` and `ribbon2`, but no number in them is typed in: they
//! are what `ribbonmap characterize` derives from the INVENTED demo kit
//! `libraries/devices/demo/demo.json`, cut to each library's cells. Their
//! numbers are still invented, but every one of them is traceable to a
//! conduction map through the `electrical` blocks and the `derived_from`
//! record. This module says which cells each library keeps and produces the
//! three files' text; `examples/builtin_libraries.rs` writes them and a test
//! checks that the files equal a fresh characterisation. (The embedded
//! built-ins keep their earlier hand-typed numbers until the mapper's area
//! recovery holds on the derived delays; see docs/device-data.md.)

use super::characterize::{characterize, CellCharacter};
use super::kit::read_kit;
use super::library_write::{json_text, library_json_of, LibraryChoice};
use crate::diag::SourceError;
use std::path::Path;

/// The demo kit, relative to the repository's root.
pub const DEMO_KIT: &str = "libraries/devices/demo/demo.json";

/// The folder of the derived library files, relative to the repository's
/// root (table and kit paths in the files are relative to it).
pub const LIBRARY_DIR: &str = "libraries";

/// A library derived from the demo kit with a built-in library's cells.
pub struct DerivedBuiltin {
    /// The built-in library whose cells it keeps.
    pub name: &'static str,
    /// Its own name, also its file stem under `libraries/`.
    pub library_name: &'static str,
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
        library_name: "demo-kit-ribbon3",
        description: "Complementary conductance gates (a pull-up and a pull-down ribbon per cell) of one, two and three inputs, with majority and three-input XOR. Every figure is derived by `ribbonmap characterize` from the INVENTED demo kit devices/demo/demo.json (analytic conduction maps of our own, not a device simulator's output nor a fabricated device): invented, but traceable through each cell's electrical block and the derived_from record.",
        keep: all_cells,
    },
    DerivedBuiltin {
        name: "ribbon3-nomaj",
        library_name: "demo-kit-ribbon3-nomaj",
        description: "ribbon3 without the majority and minority cells, to measure what majority gates buy. Every figure is derived by `ribbonmap characterize` from the INVENTED demo kit devices/demo/demo.json (analytic conduction maps of our own): invented, but traceable through each cell's electrical block and the derived_from record.",
        keep: without_majority,
    },
    DerivedBuiltin {
        name: "ribbon2",
        library_name: "demo-kit-ribbon2",
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
                name: b.library_name,
                description: b.description,
                keep: &b.keep,
            };
            (b.name, json_text(&library_json_of(&ch, &dir, &choice)))
        })
        .collect())
}
