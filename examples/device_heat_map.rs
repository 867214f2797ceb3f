//! Writes the first two-input cell's heat maps of the demo kit's
//! characterisation report as a standalone SVG (the README's figure):
//! `cargo run --example device_heat_map -- docs/images/demo-heat-map.svg`.

use ribbonmap::device::report::first_heat_map_svg;
use ribbonmap::device::{characterize, read_kit};
use std::path::Path;

fn main() {
    let out = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "demo-heat-map.svg".to_string());
    let kit_path = Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo/demo.json");
    let kit = read_kit(&kit_path).expect("the demo kit reads");
    let characterization = characterize(kit).expect("the demo kit characterises");
    std::fs::write(&out, first_heat_map_svg(&characterization)).expect("the figure is written");
    println!("wrote {out}");
}
