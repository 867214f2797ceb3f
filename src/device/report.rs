//! The characterisation report: one self-contained HTML file (inline SVG and
//! CSS, no scripts, nothing fetched) that a browser opens.
//!
//! Per cell: heat maps of the pull-up and pull-down tables on one
//! logarithmic colour scale shared by the whole kit (legend in µS), with the
//! logic corners marked by the output bit; the voltage transfer curves with
//! VIL, VIH and VM marked; and a table of the derived figures. A summary
//! table of all cells comes first. Three-input tables are shown as two
//! slices (third input at logic low and at logic high). The SVG is written
//! by hand, like the comparison charts of `study::chart`: the drawing needs
//! only rectangles, lines, circles and text, which no crate makes simpler.

use super::characterize::{CellCharacter, Characterization};
use super::table::ConductanceTable;
use std::fmt::Write;

fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// The kit-wide colour scale: log10 of the smallest and largest conductance
/// (siemens) over every table.
#[derive(Clone, Copy, Debug)]
pub struct LogScale {
    /// log10 of the lowest conductance in siemens.
    pub low: f64,
    /// log10 of the highest conductance in siemens.
    pub high: f64,
}

impl LogScale {
    /// The scale spanning every table of `ch`.
    pub fn of(ch: &Characterization) -> LogScale {
        let mut low = f64::INFINITY;
        let mut high = f64::NEG_INFINITY;
        for c in &ch.cells {
            for t in [&c.pull_up, &c.pull_down] {
                for &g in &t.values {
                    low = low.min(g.log10());
                    high = high.max(g.log10());
                }
            }
        }
        if high - low < 1e-9 {
            high = low + 1.0;
        }
        LogScale { low, high }
    }

    fn colour(&self, siemens: f64) -> String {
        let t = ((siemens.log10() - self.low) / (self.high - self.low)).clamp(0.0, 1.0);
        colour(t)
    }
}

/// A perceptually ordered dark-blue → green → yellow ramp (anchors in the
/// style of common scientific colour maps, our own values).
fn colour(t: f64) -> String {
    const ANCHORS: [(f64, [f64; 3]); 5] = [
        (0.0, [48.0, 18.0, 79.0]),
        (0.25, [59.0, 82.0, 139.0]),
        (0.5, [33.0, 145.0, 140.0]),
        (0.75, [94.0, 201.0, 98.0]),
        (1.0, [253.0, 231.0, 37.0]),
    ];
    let i = ANCHORS
        .iter()
        .rposition(|(x, _)| *x <= t)
        .unwrap_or(0)
        .min(3);
    let (x0, c0) = ANCHORS[i];
    let (x1, c1) = ANCHORS[i + 1];
    let f = ((t - x0) / (x1 - x0)).clamp(0.0, 1.0);
    let c: Vec<u8> = (0..3)
        .map(|k| (c0[k] + f * (c1[k] - c0[k])).round() as u8)
        .collect();
    format!("#{:02x}{:02x}{:02x}", c[0], c[1], c[2])
}

/// Cell borders of axis points: halfway between neighbours.
fn borders(axis: &[f64]) -> Vec<f64> {
    let mut b = vec![axis[0]];
    for w in axis.windows(2) {
        b.push((w[0] + w[1]) / 2.0);
    }
    b.push(axis[axis.len() - 1]);
    b
}

const MAP: f64 = 180.0;
const PAD: f64 = 34.0;

/// One heat map (a 2-D slice, or a strip for one input) as an SVG group of
/// size (MAP + 2 PAD) square. `fixed` gives the third input's voltage of a
/// three-input table.
fn heat_map(
    out: &mut String,
    table: &ConductanceTable,
    scale: &LogScale,
    cell: &CellCharacter,
    fixed: Option<f64>,
    title: &str,
) {
    let size = MAP + 2.0 * PAD;
    let _ = write!(
        out,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{size}\" height=\"{size}\" viewBox=\"0 0 {size} {size}\" font-family=\"sans-serif\" font-size=\"10\">"
    );
    let _ = write!(
        out,
        "<text x=\"{}\" y=\"14\" text-anchor=\"middle\" font-size=\"11\">{}</text>",
        size / 2.0,
        escape(title)
    );
    let xa = &table.axes[0];
    let (x0, x1) = table.span(0);
    let px = |v: f64| PAD + (v - x0) / (x1 - x0) * MAP;
    let bx = borders(xa);
    let two_d = table.arity() >= 2;
    let (y0, y1) = if two_d { table.span(1) } else { (0.0, 1.0) };
    let py = |v: f64| PAD + MAP - (v - y0) / (y1 - y0) * MAP;
    let by = if two_d {
        borders(&table.axes[1])
    } else {
        vec![0.0, 1.0]
    };
    let ny = if two_d { table.axes[1].len() } else { 1 };
    let mut volts = vec![0.0; table.arity()];
    if let Some(z) = fixed {
        volts[2] = z;
    }
    for j in 0..ny {
        if two_d {
            volts[1] = table.axes[1][j];
        }
        for i in 0..xa.len() {
            volts[0] = xa[i];
            let g = table.conductance(&volts);
            let (left, right) = (px(bx[i]), px(bx[i + 1]));
            let (top, bottom) = (py(by[j + 1]), py(by[j]));
            let _ = write!(
                out,
                "<rect x=\"{left:.2}\" y=\"{top:.2}\" width=\"{:.2}\" height=\"{:.2}\" fill=\"{}\"><title>{:.4} µS</title></rect>",
                right - left + 0.3,
                bottom - top + 0.3,
                scale.colour(g),
                g * 1e6
            );
        }
    }
    // Axes labels.
    let names = &cell.kit_cell.inputs;
    let _ = write!(
        out,
        "<text x=\"{}\" y=\"{}\" text-anchor=\"middle\">{} (V)</text>",
        size / 2.0,
        size - 6.0,
        escape(&names[0])
    );
    let _ = write!(out, "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"start\">{x0}</text><text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{x1}</text>", PAD, PAD + MAP + 12.0, PAD + MAP, PAD + MAP + 12.0);
    if two_d {
        let _ = write!(
            out,
            "<text x=\"10\" y=\"{}\" text-anchor=\"middle\" transform=\"rotate(-90 10 {})\">{} (V)</text>",
            size / 2.0,
            size / 2.0,
            escape(&names[1])
        );
        let _ = write!(out, "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{y0}</text><text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{y1}</text>", PAD - 2.0, PAD + MAP, PAD - 2.0, PAD + 8.0);
    }
    // Logic corners with the output bit.
    let (low, high) = (cell.logic_low_v, cell.logic_high_v);
    let n = cell.kit_cell.inputs.len();
    for r in 0..1usize << n {
        if let Some(z) = fixed {
            let zr = if r >> 2 & 1 == 1 { high } else { low };
            if (zr - z).abs() > 1e-12 {
                continue;
            }
        }
        let vx = if r & 1 == 1 { high } else { low };
        let vy = if n >= 2 && r >> 1 & 1 == 1 {
            high
        } else if n >= 2 {
            low
        } else {
            0.5
        };
        let (cx, cy) = (
            px(vx).clamp(PAD + 8.0, PAD + MAP - 8.0),
            if two_d {
                py(vy).clamp(PAD + 8.0, PAD + MAP - 8.0)
            } else {
                PAD + MAP / 2.0
            },
        );
        let bit = cell.truth >> r & 1;
        let _ = write!(
            out,
            "<circle cx=\"{cx:.1}\" cy=\"{cy:.1}\" r=\"7\" fill=\"white\" stroke=\"black\"/><text x=\"{cx:.1}\" y=\"{:.1}\" text-anchor=\"middle\" font-weight=\"bold\">{bit}</text>",
            cy + 3.5
        );
    }
    out.push_str("</svg>");
}

/// The colour legend: a bar from the scale's low to high end with decade
/// ticks in µS.
fn legend(out: &mut String, scale: &LogScale) {
    let (w, h) = (360.0, 46.0);
    let _ = write!(out, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" font-family=\"sans-serif\" font-size=\"10\">");
    let steps = 60;
    for i in 0..steps {
        let t = i as f64 / steps as f64;
        let _ = write!(
            out,
            "<rect x=\"{:.2}\" y=\"4\" width=\"{:.2}\" height=\"14\" fill=\"{}\"/>",
            10.0 + t * 340.0,
            340.0 / steps as f64 + 0.3,
            colour(t + 0.5 / steps as f64)
        );
    }
    let first = scale.low.ceil() as i32;
    let last = scale.high.floor() as i32;
    for d in first..=last {
        let t = (d as f64 - scale.low) / (scale.high - scale.low);
        let x = 10.0 + t * 340.0;
        let us = 10f64.powi(d + 6);
        let _ = write!(
            out,
            "<line x1=\"{x:.1}\" y1=\"18\" x2=\"{x:.1}\" y2=\"23\" stroke=\"black\"/><text x=\"{x:.1}\" y=\"33\" text-anchor=\"middle\">{}</text>",
            format_us(us)
        );
    }
    let _ = write!(out, "<text x=\"180\" y=\"44\" text-anchor=\"middle\">conductance (µS, logarithmic)</text></svg>");
}

fn format_us(us: f64) -> String {
    if us >= 1.0 {
        format!("{us:.0}")
    } else {
        format!("{us}")
    }
}

/// The transfer curves of a cell with VIL, VIH and VM marked.
fn transfer_plot(out: &mut String, cell: &CellCharacter, supply_v: f64) {
    let (w, h, pad) = (300.0, 240.0, 36.0);
    let pw = w - 2.0 * pad;
    let ph = h - 2.0 * pad;
    let (x0, x1) = cell
        .curves
        .first()
        .map(|c| (c.samples[0].0, c.samples[c.samples.len() - 1].0))
        .unwrap_or((0.0, supply_v));
    let px = |v: f64| pad + (v - x0) / (x1 - x0) * pw;
    let py = |v: f64| pad + ph - v / supply_v * ph;
    let _ = write!(out, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" font-family=\"sans-serif\" font-size=\"10\">");
    let _ = write!(out, "<rect x=\"{pad}\" y=\"{pad}\" width=\"{pw}\" height=\"{ph}\" fill=\"none\" stroke=\"#888\"/>");
    for (v, label, colour) in [
        (cell.vil, "VIL", "#1f77b4"),
        (cell.vm, "VM", "#555"),
        (cell.vih, "VIH", "#d62728"),
    ] {
        let x = px(v);
        let _ = write!(
            out,
            "<line x1=\"{x:.1}\" y1=\"{pad}\" x2=\"{x:.1}\" y2=\"{:.1}\" stroke=\"{colour}\" stroke-dasharray=\"4 3\"/><text x=\"{x:.1}\" y=\"{:.1}\" text-anchor=\"middle\" fill=\"{colour}\">{label} {:.1}</text>",
            pad + ph,
            if label == "VM" { pad - 14.0 } else { pad - 4.0 },
            v * 1e3
        );
    }
    const COLOURS: [&str; 6] = [
        "#222", "#8c564b", "#9467bd", "#2ca02c", "#ff7f0e", "#17becf",
    ];
    for (i, c) in cell.curves.iter().enumerate() {
        let points: Vec<String> = c
            .samples
            .iter()
            .map(|&(x, y)| format!("{:.1},{:.1}", px(x), py(y)))
            .collect();
        let _ = write!(
            out,
            "<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"1.3\" points=\"{}\"><title>sweep {} with row {} (max gain {:.2})</title></polyline>",
            COLOURS[i % COLOURS.len()],
            points.join(" "),
            escape(&cell.kit_cell.inputs[c.input]),
            c.row,
            c.max_gain
        );
    }
    let _ = write!(
        out,
        "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\">input (mV: thresholds; axis {x0} to {x1} V)</text><text x=\"10\" y=\"{:.1}\" transform=\"rotate(-90 10 {:.1})\" text-anchor=\"middle\">output (0 to {supply_v} V)</text></svg>",
        w / 2.0,
        h - 8.0,
        h / 2.0,
        h / 2.0
    );
}

/// The heat maps of one cell's pull-up and pull-down tables (two slices
/// each for three inputs), as standalone SVG elements in a row.
pub fn cell_heat_maps(cell: &CellCharacter, scale: &LogScale) -> Vec<String> {
    let mut maps = Vec::new();
    for (table, role) in [(&cell.pull_up, "pull-up"), (&cell.pull_down, "pull-down")] {
        if table.arity() >= 3 {
            for (z, level) in [(cell.logic_low_v, "low"), (cell.logic_high_v, "high")] {
                let mut svg = String::new();
                let title = format!(
                    "{} {role}, {} {level}",
                    cell.kit_cell.name, cell.kit_cell.inputs[2]
                );
                heat_map(&mut svg, table, scale, cell, Some(z), &title);
                maps.push(svg);
            }
        } else {
            let mut svg = String::new();
            heat_map(
                &mut svg,
                table,
                scale,
                cell,
                None,
                &format!("{} {role}", cell.kit_cell.name),
            );
            maps.push(svg);
        }
    }
    maps
}

/// The first cell's pull-up heat map with the legend below it, as one
/// standalone SVG document (for documentation).
pub fn first_heat_map_svg(ch: &Characterization) -> String {
    let scale = LogScale::of(ch);
    let Some(cell) = ch
        .cells
        .iter()
        .find(|c| c.kit_cell.inputs.len() == 2)
        .or(ch.cells.first())
    else {
        return String::new();
    };
    let maps = cell_heat_maps(cell, &scale);
    let mut legend_svg = String::new();
    legend(&mut legend_svg, &scale);
    let size = MAP + 2.0 * PAD;
    let width = (size * maps.len() as f64).max(360.0);
    let mut out = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{width}\" height=\"{}\" style=\"background:white\">",
        size + 50.0
    );
    let _ = write!(out, "<rect width=\"100%\" height=\"100%\" fill=\"white\"/>");
    for (i, m) in maps.iter().enumerate() {
        let _ = write!(
            out,
            "<g transform=\"translate({} 0)\">{m}</g>",
            size * i as f64
        );
    }
    let _ = writeln!(
        out,
        "<g transform=\"translate(0 {size})\">{legend_svg}</g></svg>"
    );
    out
}

fn figures_rows(c: &CellCharacter, supply_v: f64) -> Vec<(String, String)> {
    let mean_power: f64 =
        c.rows.iter().map(|r| r.power_w(supply_v)).sum::<f64>() / c.rows.len() as f64 * 1e9;
    vec![
        ("function (truth table)".into(), format!("0x{:X}", c.truth)),
        (
            "VOL / VOH".into(),
            format!("{:.2} mV / {:.2} mV", c.vol * 1e3, c.voh * 1e3),
        ),
        (
            "VIL / VIH / VM".into(),
            format!(
                "{:.2} mV / {:.2} mV / {:.2} mV",
                c.vil * 1e3,
                c.vih * 1e3,
                c.vm * 1e3
            ),
        ),
        (
            "noise margins NML / NMH".into(),
            format!("{:.2} mV / {:.2} mV", c.nml * 1e3, c.nmh * 1e3),
        ),
        (
            "restores levels".into(),
            if c.restoring {
                "yes (gain reaches 1 on every curve)".into()
            } else {
                "NO: gain stays below 1; VIL = VIH = VM".into()
            },
        ),
        (
            "on/off ratio pull-up / pull-down".into(),
            format!("{:.1} / {:.1}", c.pull_up_on_off, c.pull_down_on_off),
        ),
        (
            "delay (slowest arc; step input)".into(),
            format!(
                "{:.3} ps + {:.3} ps per unit load (step: {:.3} + {:.3})",
                c.intrinsic_ps, c.per_load_ps, c.step_intrinsic_ps, c.step_per_load_ps
            ),
        ),
        (
            "energy per output toggle".into(),
            format!(
                "{:.3} aJ + {:.3} aJ per unit load",
                c.switch_energy_aj, c.switch_energy_per_load_aj
            ),
        ),
        (
            "static power, mean over rows".into(),
            format!("{mean_power:.3} nW"),
        ),
        (
            "input load".into(),
            format!("{:.3} unit loads", c.input_load),
        ),
    ]
}

/// The whole report as HTML text.
pub fn report_html(ch: &Characterization) -> String {
    let scale = LogScale::of(ch);
    let vdd = ch.kit.supply_v;
    let mut out = String::new();
    let _ = write!(
        out,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>Characterisation of {name}</title>\
<style>body{{font-family:sans-serif;margin:24px;max-width:1200px}}table{{border-collapse:collapse;margin:8px 0}}\
td,th{{border:1px solid #ccc;padding:3px 8px;text-align:right}}th{{background:#f2f2f2}}td:first-child,th:first-child{{text-align:left}}\
.maps svg{{margin-right:6px}}.cell{{border-top:2px solid #444;margin-top:24px}} .weak{{color:#b00;font-weight:bold}}</style></head><body>\
<h1>Characterisation of {name}</h1><p>{desc}</p><p>Kit <code>{kit}</code> (SHA-256 {sha}); supply {vdd} V, logic inputs {lo} V and {hi} V, \
unit load {cg} aF. Output levels from the divider V = Vdd·Gu/(Gu+Gd); thresholds where the transfer gain is 1 \
(Rabaey, Chandrakasan and Nikolić, <i>Digital Integrated Circuits</i>, 2003); delay of the slowest arc with the input driven by a fanout-of-four inverter chain's edge, \
integrated from the tables and fitted as intrinsic + per_load · load (docs/device-data.md); the step-input figure is t50 = ln 2 · C/(Gu+Gd) of the slowest row.</p>",
        name = escape(&ch.kit.name),
        desc = escape(&ch.kit.description),
        kit = escape(&ch.kit.file),
        sha = &ch.kit_sha256[..16.min(ch.kit_sha256.len())],
        lo = ch.kit.logic_low_v,
        hi = ch.kit.logic_high_v,
        cg = ch.kit.gate_capacitance_af,
    );
    out.push_str("<h2>Summary</h2><table><tr><th>cell</th><th>truth</th><th>VOL mV</th><th>VOH mV</th><th>VIL mV</th><th>VIH mV</th><th>NML mV</th><th>NMH mV</th><th>restoring</th><th>on/off up</th><th>on/off down</th><th>delay ps</th><th>ps / load</th><th>static nW</th><th>toggle aJ</th></tr>");
    for c in &ch.cells {
        let mean_power: f64 =
            c.rows.iter().map(|r| r.power_w(vdd)).sum::<f64>() / c.rows.len() as f64 * 1e9;
        let _ = write!(
            out,
            "<tr><td><a href=\"#{n}\">{n}</a></td><td>0x{:X}</td><td>{:.2}</td><td>{:.2}</td><td>{:.2}</td><td>{:.2}</td><td>{:.2}</td><td>{:.2}</td><td{}>{}</td><td>{:.1}</td><td>{:.1}</td><td>{:.3}</td><td>{:.3}</td><td>{:.3}</td><td>{:.3}</td></tr>",
            c.truth, c.vol * 1e3, c.voh * 1e3, c.vil * 1e3, c.vih * 1e3, c.nml * 1e3, c.nmh * 1e3,
            if c.restoring { "" } else { " class=\"weak\"" },
            if c.restoring { "yes" } else { "no" },
            c.pull_up_on_off, c.pull_down_on_off, c.intrinsic_ps, c.per_load_ps, mean_power, c.switch_energy_aj,
            n = escape(&c.kit_cell.name)
        );
    }
    out.push_str("</table><p>Colour scale of every heat map:</p>");
    legend(&mut out, &scale);
    for c in &ch.cells {
        let _ = write!(
            out,
            "<div class=\"cell\" id=\"{n}\"><h2>{n}</h2><p>Heat maps of the pull-up (conducts where the output is 1) and pull-down tables; circles mark the logic corners with the output bit.</p><div class=\"maps\">",
            n = escape(&c.kit_cell.name)
        );
        for m in cell_heat_maps(c, &scale) {
            out.push_str(&m);
        }
        out.push_str("</div><div style=\"display:flex;gap:24px;align-items:flex-start\">");
        transfer_plot(&mut out, c, vdd);
        out.push_str("<table><tr><th>figure</th><th>value</th></tr>");
        for (k, v) in figures_rows(c, vdd) {
            let _ = write!(
                out,
                "<tr><td>{}</td><td>{}</td></tr>",
                escape(&k),
                escape(&v)
            );
        }
        out.push_str("</table></div><table><tr><th>row</th><th>output V</th><th>Gu µS</th><th>Gd µS</th><th>static current nA</th><th>static power nW</th></tr>");
        for (r, p) in c.rows.iter().enumerate() {
            let bits: String = (0..c.kit_cell.inputs.len())
                .map(|k| if r >> k & 1 == 1 { '1' } else { '0' })
                .collect();
            let _ = write!(
                out,
                "<tr><td>{}={bits}</td><td>{:.5}</td><td>{:.4}</td><td>{:.4}</td><td>{:.4}</td><td>{:.4}</td></tr>",
                escape(&c.kit_cell.inputs.join("")),
                p.output_v,
                p.pull_up_s * 1e6,
                p.pull_down_s * 1e6,
                p.current_a * 1e9,
                p.power_w(vdd) * 1e9
            );
        }
        out.push_str("</table></div>");
    }
    out.push_str("</body></html>\n");
    out
}
