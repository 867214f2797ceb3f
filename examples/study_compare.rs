//! A small architecture study through the library API: what do majority
//! gates buy on adders, a multiplier and a parity tree?
//!
//! Run with `cargo run --example study_compare [OUT.svg]`. It generates the
//! benchmarks, maps each on three built-in libraries with the area goal,
//! proves every mapping equivalent, prints the comparison table and writes a
//! grouped bar chart of the cell-count ratios.

use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::library::Library;
use ribbonmap::study::table::{render, TableFormat};
use ribbonmap::study::{compare, render_svg, ComparisonTable, EvaluateOptions, Goal, Metric};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let benchmarks = vec![
        (
            "adder16".to_string(),
            generate(Family::Adder, &Params::new(16))?,
        ),
        (
            "mult6".to_string(),
            generate(Family::Multiplier, &Params::new(6))?,
        ),
        (
            "parity16".to_string(),
            generate(Family::Parity, &Params::new(16))?,
        ),
    ];
    let mut libraries = Vec::new();
    for name in ["ribbon3", "ribbon3-nomaj", "ribbon2"] {
        libraries.push(Library::builtin(name).ok_or(format!("no built-in library {name}"))?);
    }
    let options = EvaluateOptions {
        goal: Goal::Area,
        ..EvaluateOptions::default()
    };
    let records = compare(&benchmarks, &libraries, &options)?;
    let table = ComparisonTable::build(&records, None);
    print!("{}", render(&table, TableFormat::Text));
    let chart = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "study_compare.svg".to_string());
    std::fs::write(&chart, render_svg(&table, Metric::Cells))?;
    eprintln!("chart written to {chart}");
    Ok(())
}
