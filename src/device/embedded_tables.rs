//! The demo kit's conduction maps, compiled into the binary.
//!
//! The built-in ribbon libraries are the characterisation of the demo kit
//! (`libraries/devices/demo/`), and their `electrical` blocks name the kit's
//! table files relative to `libraries/`. Level analysis, margin-aware mapping
//! and SPICE decks need those tables; embedding them lets `--lib ribbon3` work
//! from any folder, not only from a checkout of the repository. The SHA-256
//! recorded in the library is still checked against the embedded text.

/// Each table as `(path relative to libraries/, text)`.
const DEMO_TABLES: &[(&str, &str)] = &[
    (
        "devices/demo/tables/and2_down.csv",
        include_str!("../../libraries/devices/demo/tables/and2_down.csv"),
    ),
    (
        "devices/demo/tables/and2_up.csv",
        include_str!("../../libraries/devices/demo/tables/and2_up.csv"),
    ),
    (
        "devices/demo/tables/and3_down.json",
        include_str!("../../libraries/devices/demo/tables/and3_down.json"),
    ),
    (
        "devices/demo/tables/and3_up.json",
        include_str!("../../libraries/devices/demo/tables/and3_up.json"),
    ),
    (
        "devices/demo/tables/buf_down.csv",
        include_str!("../../libraries/devices/demo/tables/buf_down.csv"),
    ),
    (
        "devices/demo/tables/buf_up.csv",
        include_str!("../../libraries/devices/demo/tables/buf_up.csv"),
    ),
    (
        "devices/demo/tables/inv_down.csv",
        include_str!("../../libraries/devices/demo/tables/inv_down.csv"),
    ),
    (
        "devices/demo/tables/inv_up.csv",
        include_str!("../../libraries/devices/demo/tables/inv_up.csv"),
    ),
    (
        "devices/demo/tables/maj3_down.json",
        include_str!("../../libraries/devices/demo/tables/maj3_down.json"),
    ),
    (
        "devices/demo/tables/maj3_up.json",
        include_str!("../../libraries/devices/demo/tables/maj3_up.json"),
    ),
    (
        "devices/demo/tables/minority3_down.json",
        include_str!("../../libraries/devices/demo/tables/minority3_down.json"),
    ),
    (
        "devices/demo/tables/minority3_up.json",
        include_str!("../../libraries/devices/demo/tables/minority3_up.json"),
    ),
    (
        "devices/demo/tables/nand2_down.csv",
        include_str!("../../libraries/devices/demo/tables/nand2_down.csv"),
    ),
    (
        "devices/demo/tables/nand2_up.csv",
        include_str!("../../libraries/devices/demo/tables/nand2_up.csv"),
    ),
    (
        "devices/demo/tables/nand3_down.json",
        include_str!("../../libraries/devices/demo/tables/nand3_down.json"),
    ),
    (
        "devices/demo/tables/nand3_up.json",
        include_str!("../../libraries/devices/demo/tables/nand3_up.json"),
    ),
    (
        "devices/demo/tables/nor2_down.csv",
        include_str!("../../libraries/devices/demo/tables/nor2_down.csv"),
    ),
    (
        "devices/demo/tables/nor2_up.csv",
        include_str!("../../libraries/devices/demo/tables/nor2_up.csv"),
    ),
    (
        "devices/demo/tables/nor3_down.json",
        include_str!("../../libraries/devices/demo/tables/nor3_down.json"),
    ),
    (
        "devices/demo/tables/nor3_up.json",
        include_str!("../../libraries/devices/demo/tables/nor3_up.json"),
    ),
    (
        "devices/demo/tables/or2_down.csv",
        include_str!("../../libraries/devices/demo/tables/or2_down.csv"),
    ),
    (
        "devices/demo/tables/or2_up.csv",
        include_str!("../../libraries/devices/demo/tables/or2_up.csv"),
    ),
    (
        "devices/demo/tables/or3_down.json",
        include_str!("../../libraries/devices/demo/tables/or3_down.json"),
    ),
    (
        "devices/demo/tables/or3_up.json",
        include_str!("../../libraries/devices/demo/tables/or3_up.json"),
    ),
    (
        "devices/demo/tables/xnor2_down.csv",
        include_str!("../../libraries/devices/demo/tables/xnor2_down.csv"),
    ),
    (
        "devices/demo/tables/xnor2_up.csv",
        include_str!("../../libraries/devices/demo/tables/xnor2_up.csv"),
    ),
    (
        "devices/demo/tables/xnor3_down.json",
        include_str!("../../libraries/devices/demo/tables/xnor3_down.json"),
    ),
    (
        "devices/demo/tables/xnor3_up.json",
        include_str!("../../libraries/devices/demo/tables/xnor3_up.json"),
    ),
    (
        "devices/demo/tables/xor2_down.csv",
        include_str!("../../libraries/devices/demo/tables/xor2_down.csv"),
    ),
    (
        "devices/demo/tables/xor2_up.csv",
        include_str!("../../libraries/devices/demo/tables/xor2_up.csv"),
    ),
    (
        "devices/demo/tables/xor3_down.json",
        include_str!("../../libraries/devices/demo/tables/xor3_down.json"),
    ),
    (
        "devices/demo/tables/xor3_up.json",
        include_str!("../../libraries/devices/demo/tables/xor3_up.json"),
    ),
];

/// The embedded text of the demo-kit table whose path relative to
/// `libraries/` is `relative`, if the built-in libraries use it.
pub fn demo_table_text(relative: &str) -> Option<&'static str> {
    let relative = relative.replace('\\', "/");
    DEMO_TABLES
        .iter()
        .find(|(path, _)| *path == relative)
        .map(|(_, text)| *text)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The embedded copies equal the files on disk (a stale build would
    /// otherwise pass the SHA-256 check against a library built from them).
    #[test]
    fn embedded_tables_equal_the_kit_files() {
        let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries");
        for (path, text) in DEMO_TABLES {
            let on_disk = std::fs::read_to_string(root.join(path)).unwrap();
            assert_eq!(&on_disk, text, "{path}");
        }
        assert!(demo_table_text("devices/demo/tables/inv_up.csv").is_some());
        assert!(demo_table_text("devices/demo/tables/none.csv").is_none());
    }
}
