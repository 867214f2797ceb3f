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

/// A sound block for a two-input cell with the levels of the example in
/// docs/device-data.md (supply 0.2 V), the margins computed here from their
/// definitions (NML = VIL − VOL, NMH = VOH − VIH, same document).
fn sound_block() -> ribbonmap::library::electrical::Electrical {
    use ribbonmap::library::electrical::{CurveRecord, Electrical, TableRecord};
    let (vol, voh, vil, vih) = (0.00206, 0.19802, 0.0776, 0.1247);
    Electrical {
        vol_v: vol,
        voh_v: voh,
        vil_v: vil,
        vih_v: vih,
        vm_v: 0.1,
        nml_v: vil - vol,
        nmh_v: voh - vih,
        restoring: true,
        pull_up_on_off: 98.0,
        pull_down_on_off: 96.0,
        row_output_v: vec![0.198, 0.198, 0.198, 0.00206],
        row_static_current_na: vec![38.36, 32.01, 32.01, 38.34],
        output_capacitance_af: 40.0,
        gate_capacitance_af: 30.0,
        curves: vec![CurveRecord {
            input: "a".into(),
            row: 2,
            vil_v: 0.078,
            vih_v: 0.124,
            vm_v: 0.1,
            max_gain: 5.1,
        }],
        pull_up: TableRecord {
            file: "tables/nand2_up.csv".into(),
            sha256: "0123456789abcdef".repeat(4),
        },
        pull_down: TableRecord {
            file: "tables/nand2_down.csv".into(),
            sha256: "FEDCBA9876543210".repeat(4),
        },
    }
}

#[test]
fn each_documented_electrical_rule_is_enforced_at_its_boundary() {
    // The rules docs/device-data.md lists for the electrical block: voltages
    // within 0 V and the supply, VOL below VOH, VIL not above VIH, margins
    // equal to their definitions, positive on/off ratios, one row value per
    // input row, curve inputs that are pins, 64-digit SHA-256 digests; plus
    // capacitances and row values of zero or more. Each edit below breaks
    // exactly one rule (or sits exactly on its boundary) and the problems
    // must name it (or be empty).
    use ribbonmap::library::electrical::{check_electrical, Electrical};
    let pins = vec!["a".to_string(), "b".to_string()];
    let supply = Some(0.2);
    let check = |edit: &dyn Fn(&mut Electrical)| {
        let mut e = sound_block();
        edit(&mut e);
        check_electrical(&e, &pins, supply)
    };
    let rejected = |edit: &dyn Fn(&mut Electrical), words: &str| {
        let problems = check(edit);
        assert!(
            problems.len() == 1 && problems[0].contains(words),
            "expected one problem with '{words}', got {problems:?}"
        );
    };
    let accepted = |edit: &dyn Fn(&mut Electrical)| {
        let problems = check(edit);
        assert!(problems.is_empty(), "{problems:?}");
    };
    accepted(&|_| {});
    // Voltages: 0 V and the supply itself are inside; below 0 V or above the
    // supply are not; with no supply given only the lower bound holds.
    accepted(&|e| e.vm_v = 0.0);
    accepted(&|e| e.vm_v = 0.2);
    rejected(&|e| e.vm_v = -0.001, "vm_v -0.001 V lies outside");
    rejected(&|e| e.vm_v = 0.201, "vm_v 0.201 V lies outside");
    rejected(&|e| e.vm_v = f64::NAN, "vm_v NaN V lies outside");
    assert!(check_electrical(
        &Electrical {
            vm_v: 7.0,
            ..sound_block()
        },
        &pins,
        None
    )
    .is_empty());
    // VOL strictly below VOH (equal levels leave no logic swing).
    let mut equal = sound_block();
    equal.voh_v = equal.vol_v;
    equal.nmh_v = equal.voh_v - equal.vih_v;
    let problems = check_electrical(&equal, &pins, supply);
    assert!(
        problems.iter().any(|p| p.contains("is not below voh_v")),
        "{problems:?}"
    );
    // VIL not above VIH: equal is allowed (a non-restoring cell has VIL =
    // VIH = VM, docs/device-data.md), above is not.
    accepted(&|e| {
        e.vih_v = e.vil_v;
        e.nmh_v = e.voh_v - e.vih_v;
    });
    let problems = check(&|e| {
        e.vih_v = e.vil_v - 0.01;
        e.nmh_v = e.voh_v - e.vih_v;
    });
    assert!(
        problems.len() == 1 && problems[0].contains("is above vih_v"),
        "{problems:?}"
    );
    // Margins must equal their definitions, each on its own.
    rejected(&|e| e.nml_v += 0.001, "nml_v and nmh_v must equal");
    rejected(&|e| e.nmh_v -= 0.001, "nml_v and nmh_v must equal");
    // On/off ratios must be positive.
    rejected(
        &|e| e.pull_up_on_off = 0.0,
        "pull_up_on_off 0 must be a positive ratio",
    );
    rejected(
        &|e| e.pull_down_on_off = -2.0,
        "pull_down_on_off -2 must be a positive",
    );
    rejected(
        &|e| e.pull_up_on_off = f64::INFINITY,
        "pull_up_on_off inf must be",
    );
    // Two inputs have four rows; values are zero or more.
    rejected(
        &|e| e.row_output_v.push(0.1),
        "row_output_v has 5 values: a cell of 2 inputs has 4 rows",
    );
    rejected(
        &|e| {
            e.row_static_current_na.pop();
        },
        "row_static_current_na has 3 values",
    );
    accepted(&|e| e.row_static_current_na[0] = 0.0);
    rejected(
        &|e| e.row_static_current_na[2] = -1.0,
        "row_static_current_na holds a negative",
    );
    rejected(
        &|e| e.row_output_v[1] = f64::NAN,
        "row_output_v holds a negative or non-finite",
    );
    // Capacitances are zero or more.
    accepted(&|e| e.output_capacitance_af = 0.0);
    rejected(
        &|e| e.output_capacitance_af = -1.0,
        "output_capacitance_af -1 must be zero or more",
    );
    rejected(
        &|e| e.gate_capacitance_af = -0.5,
        "gate_capacitance_af -0.5 must be zero or more",
    );
    // Curves: the swept input is a pin, the row one of the four.
    accepted(&|e| e.curves[0].row = 3);
    rejected(
        &|e| e.curves[0].row = 4,
        "curve row 4 is not a row of the cell",
    );
    rejected(
        &|e| e.curves[0].input = "c".into(),
        "curve input 'c' is not a pin",
    );
    // Digests: exactly 64 hex digits; files named.
    rejected(
        &|e| {
            e.pull_up.sha256.pop();
        },
        "pull_up.sha256 must be 64 hex digits",
    );
    rejected(
        &|e| e.pull_down.sha256.push('0'),
        "pull_down.sha256 must be 64 hex digits",
    );
    rejected(
        &|e| e.pull_down.sha256.replace_range(0..1, "g"),
        "pull_down.sha256 must be 64",
    );
    rejected(&|e| e.pull_up.file.clear(), "pull_up.file is empty");
}

#[test]
fn read_electrical_returns_the_blocks_as_serde_json_reads_them() {
    // Each cell's block and the derived_from record, compared field by field
    // with the same text read by serde_json alone.
    use ribbonmap::library::electrical::read_electrical;
    let value = characterised();
    let text = serde_json::to_string_pretty(&value).unwrap();
    let data = read_electrical(&text);
    let cells = value["cells"].as_array().unwrap();
    let with_block: Vec<&Value> = cells
        .iter()
        .filter(|c| c.get("electrical").is_some())
        .collect();
    assert!(!with_block.is_empty());
    assert_eq!(data.cells.len(), with_block.len());
    for (c, (name, e)) in with_block.iter().zip(&data.cells) {
        assert_eq!(c["name"].as_str().unwrap(), name);
        let j = &c["electrical"];
        assert_eq!(data.cell(name), Some(e));
        assert_eq!(e.vol_v, j["vol_v"].as_f64().unwrap(), "{name}");
        assert_eq!(e.vih_v, j["vih_v"].as_f64().unwrap(), "{name}");
        assert_eq!(e.restoring, j["restoring"].as_bool().unwrap(), "{name}");
        let rows: Vec<f64> = j["row_output_v"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_f64().unwrap())
            .collect();
        assert_eq!(e.row_output_v, rows, "{name}");
        assert_eq!(e.pull_up.sha256, j["pull_up"]["sha256"].as_str().unwrap());
    }
    let d = data.derived_from.as_ref().expect("derived_from");
    assert_eq!(d.kit, value["derived_from"]["kit"].as_str().unwrap());
    assert_eq!(
        d.unit_load_af,
        value["derived_from"]["unit_load_af"].as_f64().unwrap()
    );
    assert!(data.cell("no-such-cell").is_none());
    // Text that is not JSON gives empty data.
    assert_eq!(read_electrical("{ not json"), Default::default());
}
