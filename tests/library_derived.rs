//! The demo-kit ribbon libraries are the characterisation of the demo kit.
//!
//! The check: characterise `libraries/devices/demo/demo.json` afresh (its
//! conductance tables, through `ribbonmap::device`) and require
//! `libraries/demo-kit-ribbon3.json`, `-ribbon3-nomaj` and `-ribbon2` to
//! equal the result, text for text. When the characterisation or the kit changes on purpose, run
//! `cargo run --example builtin_libraries` to regenerate the files.
//!
//! The cell sets and units are checked against the previous hand-typed
//! libraries kept in `tests/data/libraries/` (same names, same units).

use ribbonmap::device::demo_builtins::derived_builtin_texts;
use ribbonmap::library::Library;
use std::path::Path;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn previous(name: &str) -> Library {
    let path = root()
        .join("tests/data/libraries")
        .join(format!("{name}-illustrative.json"));
    Library::load(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

/// The demo-kit library with the cells of built-in `name`.
fn derived(name: &str) -> Library {
    let path = root().join(format!("libraries/demo-kit-{name}.json"));
    Library::load(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

#[test]
fn demo_kit_libraries_equal_a_fresh_characterisation_of_the_demo_kit() {
    let derived = derived_builtin_texts(root()).expect("the demo kit characterises");
    assert_eq!(derived.len(), 3);
    for (name, text) in derived {
        let path = root().join(format!("libraries/demo-kit-{name}.json"));
        let on_disk =
            std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
        assert!(
            on_disk == text,
            "{} differs from the characterisation of the demo kit; \
             regenerate with `cargo run --example builtin_libraries`",
            path.display()
        );
        let loaded = Library::load(&path).expect("the derived library loads");
        assert!(Library::builtin(name).is_some(), "{name} is built in");
        assert_eq!(
            loaded.cells.len(),
            Library::builtin(name).unwrap().cells.len()
        );
    }
}

#[test]
fn derived_libraries_keep_the_previous_cell_names_and_units() {
    for name in ["ribbon3", "ribbon3-nomaj", "ribbon2"] {
        let now = derived(name);
        let before = previous(name);
        let names = |l: &Library| l.cells.iter().map(|c| c.name.clone()).collect::<Vec<_>>();
        assert_eq!(names(&now), names(&before), "{name}: cell names");
        assert_eq!(now.units, before.units, "{name}: units");
        assert_eq!(now.storage, before.storage, "{name}: storage cells");
        assert_eq!(now.supply_v, before.supply_v, "{name}: supply");
        for (a, b) in now.cells.iter().zip(&before.cells) {
            assert_eq!(
                (a.truth, &a.inputs),
                (b.truth, &b.inputs),
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
