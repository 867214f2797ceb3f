//! The built-in libraries, embedded from `libraries/*.json` at build time.
//!
//! They go through the same loader and checks as any user file, so a broken
//! built-in fails its test (tests/library_builtin.rs) rather than surprising
//! a user. libraries/README.md says what each is for and where its numbers
//! come from.

use super::Library;
use std::sync::OnceLock;

/// Names of the built-in libraries, the default (`ribbon3`) first.
const NAMES: &[&str] = &[
    "ribbon3",
    "ribbon3-nomaj",
    "ribbon2",
    "cmos-le",
    "nand-nor-inv",
];

/// The JSON text of the built-in library `name`.
pub fn builtin_text(name: &str) -> Option<&'static str> {
    Some(match name {
        "ribbon3" => include_str!("../../libraries/ribbon3.json"),
        "ribbon3-nomaj" => include_str!("../../libraries/ribbon3-nomaj.json"),
        "ribbon2" => include_str!("../../libraries/ribbon2.json"),
        "cmos-le" => include_str!("../../libraries/cmos-le.json"),
        "nand-nor-inv" => include_str!("../../libraries/nand-nor-inv.json"),
        _ => return None,
    })
}

impl Library {
    /// Name of the library used when none is given.
    pub const DEFAULT_BUILTIN: &'static str = "ribbon3";

    /// Names of all built-in libraries, the default first.
    pub fn builtin_names() -> &'static [&'static str] {
        NAMES
    }

    /// The built-in library `name`, or `None` if there is no such built-in.
    ///
    /// Each is parsed once per process and then cloned.
    ///
    /// # Panics
    /// Only if an embedded file is broken, which the test suite rules out.
    pub fn builtin(name: &str) -> Option<Library> {
        static PARSED: [OnceLock<Library>; NAMES.len()] = [const { OnceLock::new() }; NAMES.len()];
        let index = NAMES.iter().position(|n| *n == name)?;
        let lib = PARSED[index].get_or_init(|| {
            let text = builtin_text(name).expect("every listed built-in has a file");
            match Library::from_json_str(text, &format!("<builtin:{name}>")) {
                Ok(lib) => lib,
                Err(e) => panic!("built-in library {name} is broken (a bug): {e}"),
            }
        });
        Some(lib.clone())
    }
}
