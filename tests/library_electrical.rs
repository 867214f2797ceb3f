//! The library loader checks the optional electrical data of characterised
//! libraries (docs/device-data.md) and still loads libraries without it.

use ribbonmap::device::library_write::library_text;
use ribbonmap::device::{characterize, read_kit};
use ribbonmap::library::Library;
use serde_json::Value;
use std::path::Path;

fn characterised() -> Value {
    let kit = Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo/demo.json");
    let ch = characterize(read_kit(&kit).unwrap()).unwrap();
    serde_json::from_str(&library_text(&ch, Path::new("."))).unwrap()
}

fn load(value: &Value) -> Result<Library, String> {
    Library::from_json_str(&serde_json::to_string_pretty(value).unwrap(), "lib.json")
        .map_err(|e| e.to_string())
}

#[test]
fn characterised_and_plain_libraries_load() {
    let value = characterised();
    load(&value).unwrap();
    // Without the electrical blocks and the derived_from record it is an
    // ordinary library and loads as before.
    let mut plain = value.clone();
    plain.as_object_mut().unwrap().remove("derived_from");
    for cell in plain["cells"].as_array_mut().unwrap() {
        cell.as_object_mut().unwrap().remove("electrical");
    }
    load(&plain).unwrap();
}

#[test]
fn bad_electrical_blocks_are_named() {
    let value = characterised();
    let mut v = value.clone();
    v["cells"][0]["electrical"]["vol_v"] = Value::from(0.5);
    let e = load(&v).unwrap_err();
    assert!(e.contains("electrical") && e.contains("vol_v"), "{e}");

    let mut v = value.clone();
    v["cells"][3]["electrical"]["row_output_v"] = Value::from(vec![0.1, 0.1]);
    let e = load(&v).unwrap_err();
    assert!(e.contains("row_output_v has 2 values"), "{e}");

    let mut v = value.clone();
    v["cells"][3]["electrical"]["colour"] = Value::from("red");
    let e = load(&v).unwrap_err();
    assert!(e.contains("colour"), "{e}");

    let mut v = value.clone();
    v["cells"][3]["electrical"]["pull_up"]["sha256"] = Value::from("abc");
    let e = load(&v).unwrap_err();
    assert!(e.contains("64 hex digits"), "{e}");

    let mut v = value;
    v["derived_from"]["kit"] = Value::from(3);
    let e = load(&v).unwrap_err();
    assert!(e.contains("derived_from"), "{e}");
}
