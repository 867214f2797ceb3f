//! Writing generated circuits as files, and the shipped benchmark set.
//!
//! [`write_circuit`] generates a circuit and renders it with the netlist
//! writers of [`crate::io`], with a comment header in front that names the
//! family, width and style and the command that regenerates the file.
//! [`benchmark_set`] lists the circuits under `benchmarks/` in the
//! repository and [`write_benchmarks`] writes them, together with the
//! folder's README table; since generation and writing are deterministic,
//! running it again reproduces the folder byte for byte.

use super::{check_params, describe, generate, Family, GenerateError, Params};
use crate::io::{write_blif, write_verilog, NetlistFormat};
use crate::network::Network;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// The `ribbonmap generate` command line that produces `family` with
/// `params` (style always spelled out).
pub fn command_line(family: Family, params: &Params) -> Result<String, GenerateError> {
    let style = check_params(family, params)?;
    let mut cmd = format!(
        "ribbonmap generate {family} --width {} --style {style}",
        params.width
    );
    if params.carry_in {
        cmd.push_str(" --carry-in");
    }
    Ok(cmd)
}

/// The comment lines that open a written file: the description (family,
/// width, style, "written by ribbonmap") and the command line, each behind
/// the format's comment marker (`#` for BLIF, `//` for Verilog).
pub fn header(
    family: Family,
    params: &Params,
    format: NetlistFormat,
) -> Result<String, GenerateError> {
    let marker = match format {
        NetlistFormat::Verilog => "//",
        NetlistFormat::Blif | NetlistFormat::Bench | NetlistFormat::Aag | NetlistFormat::Aig => "#",
    };
    Ok(format!(
        "{marker} {}\n{marker} {}\n",
        describe(family, params)?,
        command_line(family, params)?
    ))
}

/// Errors of [`write_circuit`]: the circuit cannot be generated, or the
/// format has no writer.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// Generation failed.
    #[error(transparent)]
    Generate(#[from] GenerateError),
    /// Only BLIF and Verilog are written here (AIGER by
    /// [`crate::io::write_aiger`]).
    #[error(
        "this writer writes generated circuits as BLIF (.blif) or structural Verilog (.v), not .{}",
        .0.extension()
    )]
    Format(NetlistFormat),
}

/// Renders `net` (generated as `family` with `params`) in `format`, with the
/// header comment in front.
pub fn render(
    net: &Network,
    family: Family,
    params: &Params,
    format: NetlistFormat,
) -> Result<String, WriteError> {
    let body = match format {
        NetlistFormat::Blif => write_blif(net),
        NetlistFormat::Verilog => write_verilog(net),
        NetlistFormat::Bench | NetlistFormat::Aag | NetlistFormat::Aig => {
            return Err(WriteError::Format(format))
        }
    };
    let mut text = header(family, params, format)?;
    text.push_str(&body);
    Ok(text)
}

/// Generates `family` with `params` and returns the file text in `format`.
pub fn write_circuit(
    family: Family,
    params: &Params,
    format: NetlistFormat,
) -> Result<String, WriteError> {
    let net = generate(family, params)?;
    render(&net, family, params, format)
}

/// One file of the shipped benchmark set.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Benchmark {
    /// File name inside `benchmarks/`.
    pub file: String,
    /// Circuit family.
    pub family: Family,
    /// Width, style and carry-in.
    pub params: Params,
    /// BLIF or Verilog.
    pub format: NetlistFormat,
}

/// The circuits of the `benchmarks/` folder, in README order.
pub fn benchmark_set() -> Vec<Benchmark> {
    let mut set = Vec::new();
    let mut add = |family: Family, width: u32, style: &str, format: NetlistFormat| {
        let params = Params::new(width).with_style(style);
        let name = super::circuit_name(family, &params).expect("benchmark parameters are valid");
        set.push(Benchmark {
            file: format!("{name}.{}", format.extension()),
            family,
            params,
            format,
        });
    };
    use Family::*;
    use NetlistFormat::{Blif, Verilog};
    for style in [
        "ripple",
        "carry-lookahead",
        "kogge-stone",
        "brent-kung",
        "carry-select",
    ] {
        for width in [8, 16, 32, 64] {
            add(Adder, width, style, Blif);
        }
    }
    for width in [4, 8, 12, 16] {
        add(Multiplier, width, "array", Blif);
    }
    for style in ["wallace", "dadda"] {
        for width in [4, 8, 16] {
            add(Multiplier, width, style, Blif);
        }
    }
    for width in [8, 16, 32, 64] {
        add(Parity, width, "tree", Blif);
    }
    add(Parity, 64, "chain", Blif);
    for style in ["counter", "sorting"] {
        for width in [5, 9, 17, 33] {
            add(Majority, width, style, Blif);
        }
    }
    for width in [8, 16, 64] {
        add(Popcount, width, "compressor", Blif);
    }
    add(Comparator, 32, "ripple", Blif);
    add(Comparator, 32, "tree", Blif);
    add(Mux, 4, "tree", Blif);
    add(Decoder, 5, "tree", Blif);
    add(BarrelShifter, 32, "logarithmic", Blif);
    for style in ["encoder", "decoder", "secded-encoder", "secded-decoder"] {
        for width in [4, 11, 26, 57] {
            add(Hamming, width, style, Blif);
        }
    }
    add(Alu, 8, "ripple", Blif);
    add(Alu, 16, "kogge-stone", Blif);
    add(Adder, 32, "kogge-stone", Verilog);
    add(Multiplier, 8, "dadda", Verilog);
    add(Hamming, 11, "secded-decoder", Verilog);
    add(Alu, 8, "ripple", Verilog);
    set
}

/// The README of the benchmark folder: what each file is, with port and node
/// counts, and the command that regenerates the folder.
pub fn benchmark_readme(set: &[Benchmark]) -> Result<String, GenerateError> {
    let mut out = String::new();
    out.push_str("# Generated benchmark circuits\n\n");
    out.push_str(
        "Every file here is written by `ribbonmap generate` (library: \
         `ribbonmap::generate`). Regenerate the whole folder, byte for byte, \
         from the repository root with\n\n\
         ```\ncargo run --release --example generate_benchmarks\n```\n\n\
         The test `tests/generate_benchmarks.rs` checks that the files here are \
         exactly what that command writes. Each file starts with a comment \
         naming the family, width and style and the single command that \
         writes it.\n\n\
         Port conventions: inputs `a[0..n-1]`, then `b[0..n-1]`, then any \
         others; outputs one bus, least significant bit first. The \
         documentation of `ribbonmap::generate::Family` gives each family's \
         ports, the ALU's opcode table and the Hamming code layout.\n\n",
    );
    out.push_str(
        "Nodes are counted in ribbonmap's network (two-input AND, two-input \
         XOR, three-input majority; inverters are free); depth is in those \
         nodes.\n\n",
    );
    out.push_str(
        "| file | family | width | style | inputs | outputs | AND | XOR | MAJ | depth |\n",
    );
    out.push_str("|---|---|---:|---|---:|---:|---:|---:|---:|---:|\n");
    for b in set {
        let net = generate(b.family, &b.params)?;
        let k = net.kind_counts();
        let style = check_params(b.family, &b.params)?;
        let _ = writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} | {} | {} | {} | {} |",
            b.file,
            b.family,
            b.params.width,
            style,
            net.inputs().len(),
            net.outputs().len(),
            k.and,
            k.xor,
            k.maj,
            net.depth()
        );
    }
    Ok(out)
}

/// Writes every file of [`benchmark_set`] and `README.md` into `dir`
/// (created if missing), each atomically; returns the paths written.
pub fn write_benchmarks(dir: &Path) -> Result<Vec<PathBuf>, String> {
    std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    let set = benchmark_set();
    let mut written = Vec::new();
    for b in &set {
        let text = write_circuit(b.family, &b.params, b.format).map_err(|e| e.to_string())?;
        let path = dir.join(&b.file);
        crate::fsutil::write_atomic(&path, text.as_bytes())
            .map_err(|e| format!("{}: {e}", path.display()))?;
        written.push(path);
    }
    let readme = benchmark_readme(&set).map_err(|e| e.to_string())?;
    let path = dir.join("README.md");
    crate::fsutil::write_atomic(&path, readme.as_bytes())
        .map_err(|e| format!("{}: {e}", path.display()))?;
    written.push(path);
    Ok(written)
}
