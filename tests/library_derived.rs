//! The built-in ribbon libraries are the characterisation of the demo kit.
//!
//! The check: characterise `libraries/devices/demo/demo.json` afresh (its
//! conductance tables, through `ribbonmap::device`) and require the texts
//! embedded in the binary as the built-in `ribbon3`, `ribbon3-nomaj` and
//! `ribbon2` to equal the result, text for text. When the characterisation
//! or the kit changes on purpose, run `cargo run --example
//! builtin_libraries` to regenerate the files (and rebuild).
//!
//! The cell sets, units, areas and device counts are checked against
//! ribbon3's previous hand-typed numbers, kept in `tests/data/libraries/`.

use ribbonmap::device::demo_builtins::derived_builtin_texts;
use ribbonmap::library::{builtin_text, Cell, Library};
use std::path::Path;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// Which cells of ribbon3 a library keeps.
type Keep = fn(&Cell) -> bool;

/// ribbon3 as it was typed in by hand, before it became the demo kit's
/// characterisation.
fn previous() -> Library {
    let path = root().join("tests/data/libraries/ribbon3-illustrative.json");
    Library::load(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

/// The built-in library `name` (derived from the demo kit).
fn derived(name: &str) -> Library {
    Library::builtin(name).unwrap_or_else(|| panic!("{name} is built in"))
}

#[test]
fn embedded_builtins_equal_a_fresh_characterisation_of_the_demo_kit() {
    let texts = derived_builtin_texts(root()).expect("the demo kit characterises");
    let names: Vec<_> = texts.iter().map(|(n, _)| *n).collect();
    assert_eq!(names, ["ribbon3", "ribbon3-nomaj", "ribbon2"]);
    for (name, text) in texts {
        let embedded = builtin_text(name).unwrap_or_else(|| panic!("{name} is built in"));
        assert!(
            embedded == text,
            "the built-in {name} differs from the characterisation of the demo kit; \
             regenerate with `cargo run --example builtin_libraries`"
        );
        let lib = derived(name);
        assert_eq!(lib.name, name, "the built-in keeps its name");
        assert!(
            lib.description.contains("INVENTED demo kit"),
            "{name}: the description says where the numbers come from"
        );
    }
}

#[test]
fn derived_libraries_keep_the_previous_cell_names_and_units() {
    // The earlier ribbon3-nomaj was ribbon3 without maj3 and minority3, the
    // earlier ribbon2 its cells of at most two inputs (libraries/README.md).
    let before = previous();
    let rules: [(&str, Keep); 3] = [
        ("ribbon3", |_| true),
        ("ribbon3-nomaj", |c| {
            !matches!(c.name.as_str(), "maj3" | "minority3")
        }),
        ("ribbon2", |c| c.arity() <= 2),
    ];
    for (name, keep) in rules {
        let now = derived(name);
        let kept: Vec<&Cell> = before.cells.iter().filter(|c| keep(c)).collect();
        let names = |cells: &[&Cell]| cells.iter().map(|c| c.name.clone()).collect::<Vec<_>>();
        let now_cells: Vec<&Cell> = now.cells.iter().collect();
        assert_eq!(names(&now_cells), names(&kept), "{name}: cell names");
        assert_eq!(now.units, before.units, "{name}: units");
        assert_eq!(now.storage, before.storage, "{name}: storage cells");
        assert_eq!(now.supply_v, before.supply_v, "{name}: supply");
        for (a, b) in now.cells.iter().zip(&kept) {
            assert_eq!(
                (a.truth, &a.inputs, a.area, a.devices),
                (b.truth, &b.inputs, b.area, b.devices),
                "{name}/{}",
                a.name
            );
        }
    }
}

#[test]
fn subsets_carry_the_same_cells_as_ribbon3() {
    let full = derived("ribbon3");
    for name in ["ribbon3-nomaj", "ribbon2"] {
        let sub = derived(name);
        for cell in &sub.cells {
            assert_eq!(Some(cell), full.cell(&cell.name), "{name}/{}", cell.name);
        }
    }
    let two = derived("ribbon2");
    let small: Vec<_> = full.cells.iter().filter(|c| c.arity() <= 2).collect();
    assert_eq!(small.len(), two.cells.len());
}
