//! Grouped bar charts of comparison ratios, written as plain SVG.
//!
//! One group of bars per benchmark (and goal), one bar per library, the bar
//! height being the chosen metric's ratio to the baseline library. A dashed
//! line marks ratio 1. The SVG is written by hand: a y axis with gridlines
//! and tick labels, rotated benchmark labels when names are long, a legend,
//! and a title. It opens in any browser and converts with standard tools.

use super::table::{ComparisonTable, Metric};
use std::fmt::Write;

/// Colours of the bars, one per library in order (repeats after eight).
const PALETTE: [&str; 8] = [
    "#4472c4", "#ed7d31", "#70ad47", "#ffc000", "#7f3fbf", "#5b9bd5", "#c00000", "#636363",
];

fn xml_escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// A tick step of 1, 2 or 5 times a power of ten giving about five ticks.
fn nice_step(max: f64) -> f64 {
    let raw = max / 5.0;
    let magnitude = 10f64.powf(raw.log10().floor());
    for m in [1.0, 2.0, 2.5, 5.0, 10.0] {
        if m * magnitude >= raw {
            return m * magnitude;
        }
    }
    10.0 * magnitude
}

/// Draws the grouped bar chart of `metric` ratios in `table` as an SVG
/// document.
pub fn render_svg(table: &ComparisonTable, metric: Metric) -> String {
    let metric_index = Metric::ALL.iter().position(|m| *m == metric).unwrap_or(0);
    // Groups in row order.
    let mut groups: Vec<(String, Vec<Option<f64>>)> = Vec::new();
    let libraries = &table.libraries;
    for row in &table.rows {
        let label = if table.several_goals {
            format!("{} ({})", row.record.benchmark, row.record.goal)
        } else {
            row.record.benchmark.clone()
        };
        let group = match groups.iter().position(|(l, _)| *l == label) {
            Some(i) => i,
            None => {
                groups.push((label, vec![None; libraries.len()]));
                groups.len() - 1
            }
        };
        if let Some(li) = libraries.iter().position(|l| *l == row.record.library) {
            groups[group].1[li] = row.ratios[metric_index];
        }
    }
    let max_ratio = groups
        .iter()
        .flat_map(|(_, v)| v.iter().flatten())
        .fold(1.0f64, |a, &b| a.max(b));
    let step = nice_step(max_ratio * 1.05);
    let top = (max_ratio * 1.05 / step).ceil() * step;

    let bar_width = 18.0;
    let bar_gap = 2.0;
    let group_gap = 24.0;
    let n_bars = libraries.len().max(1) as f64;
    let group_width = n_bars * (bar_width + bar_gap) - bar_gap;
    let longest_label = groups
        .iter()
        .map(|(l, _)| l.chars().count())
        .max()
        .unwrap_or(0);
    let rotate = longest_label as f64 * 6.5 > group_width + group_gap;
    let label_space = if rotate {
        (longest_label as f64 * 6.0 * 0.72 + 20.0).min(200.0)
    } else {
        30.0
    };
    let legend_width = libraries
        .iter()
        .map(|l| l.chars().count())
        .max()
        .unwrap_or(0) as f64
        * 7.0
        + 40.0;
    // Rotated labels reach left of their group: leave room for the first.
    let margin_left = if rotate {
        (longest_label as f64 * 6.5 * 0.77 - group_gap - group_width / 2.0 + 10.0)
            .clamp(60.0, 220.0)
    } else {
        60.0
    };
    let margin_top = 50.0;
    let plot_height = 280.0;
    let plot_width = (groups.len().max(1) as f64) * (group_width + group_gap) + group_gap;
    let width = margin_left + plot_width + 20.0 + legend_width;
    let height = margin_top + plot_height + label_space + 30.0;
    let y_of = |v: f64| margin_top + plot_height * (1.0 - v / top);

    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<?xml version="1.0" encoding="UTF-8"?>
<svg xmlns="http://www.w3.org/2000/svg" width="{width:.0}" height="{height:.0}" viewBox="0 0 {width:.0} {height:.0}" font-family="Helvetica, Arial, sans-serif" font-size="12">"#
    );
    let _ = writeln!(
        s,
        r#"<rect x="0" y="0" width="{width:.0}" height="{height:.0}" fill="white"/>"#
    );
    let _ = writeln!(
        s,
        r#"<text x="{:.1}" y="24" font-size="15" text-anchor="middle">{} relative to {}</text>"#,
        margin_left + plot_width / 2.0,
        xml_escape(metric.name()),
        xml_escape(&table.baseline)
    );
    // Gridlines and tick labels.
    let ticks = (top / step).round() as usize;
    for i in 0..=ticks {
        let v = i as f64 * step;
        let y = y_of(v);
        let _ = writeln!(
            s,
            r##"<line x1="{margin_left:.1}" y1="{y:.1}" x2="{:.1}" y2="{y:.1}" stroke="#dddddd"/>"##,
            margin_left + plot_width
        );
        let _ = writeln!(
            s,
            r#"<text x="{:.1}" y="{:.1}" text-anchor="end">{}</text>"#,
            margin_left - 6.0,
            y + 4.0,
            format_tick(v, step)
        );
    }
    // Axis title, left of the tick labels.
    let axis_x = margin_left - 44.0;
    let _ = writeln!(
        s,
        r#"<text x="{axis_x:.1}" y="{:.1}" text-anchor="middle" transform="rotate(-90 {axis_x:.1} {:.1})">ratio ({})</text>"#,
        margin_top + plot_height / 2.0,
        margin_top + plot_height / 2.0,
        xml_escape(&metric.header(&table.units))
    );
    // Bars.
    for (gi, (label, values)) in groups.iter().enumerate() {
        let gx = margin_left + group_gap + gi as f64 * (group_width + group_gap);
        for (li, v) in values.iter().enumerate() {
            let Some(v) = v else { continue };
            let x = gx + li as f64 * (bar_width + bar_gap);
            let y = y_of(*v);
            let h = (margin_top + plot_height - y).max(0.0);
            let _ = writeln!(
                s,
                r#"<rect x="{x:.1}" y="{y:.1}" width="{bar_width:.1}" height="{h:.1}" fill="{}"><title>{}: {} {:.3}</title></rect>"#,
                PALETTE[li % PALETTE.len()],
                xml_escape(label),
                xml_escape(&libraries[li]),
                v
            );
        }
        let cx = gx + group_width / 2.0;
        let ly = margin_top + plot_height + 16.0;
        if rotate {
            let _ = writeln!(
                s,
                r#"<text x="{cx:.1}" y="{ly:.1}" text-anchor="end" transform="rotate(-40 {cx:.1} {ly:.1})">{}</text>"#,
                xml_escape(label)
            );
        } else {
            let _ = writeln!(
                s,
                r#"<text x="{cx:.1}" y="{ly:.1}" text-anchor="middle">{}</text>"#,
                xml_escape(label)
            );
        }
    }
    // Ratio 1 reference and axes.
    let y1 = y_of(1.0);
    let _ = writeln!(
        s,
        r##"<line x1="{margin_left:.1}" y1="{y1:.1}" x2="{:.1}" y2="{y1:.1}" stroke="#333333" stroke-dasharray="5,4"/>"##,
        margin_left + plot_width
    );
    let _ = writeln!(
        s,
        r##"<line x1="{margin_left:.1}" y1="{margin_top:.1}" x2="{margin_left:.1}" y2="{:.1}" stroke="black"/>"##,
        margin_top + plot_height
    );
    let _ = writeln!(
        s,
        r##"<line x1="{margin_left:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="black"/>"##,
        margin_top + plot_height,
        margin_left + plot_width,
        margin_top + plot_height
    );
    // Legend.
    let lx = margin_left + plot_width + 20.0;
    for (li, lib) in libraries.iter().enumerate() {
        let ly = margin_top + li as f64 * 20.0;
        let _ = writeln!(
            s,
            r#"<rect x="{lx:.1}" y="{ly:.1}" width="12" height="12" fill="{}"/><text x="{:.1}" y="{:.1}">{}</text>"#,
            PALETTE[li % PALETTE.len()],
            lx + 18.0,
            ly + 10.5,
            xml_escape(lib)
        );
    }
    s.push_str("</svg>\n");
    s
}

fn format_tick(v: f64, step: f64) -> String {
    let tenths = step * 10.0;
    if step >= 1.0 && step.fract() == 0.0 {
        format!("{v:.0}")
    } else if (tenths - tenths.round()).abs() < 1e-9 {
        format!("{v:.1}")
    } else {
        format!("{v:.2}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn steps_are_round() {
        assert_eq!(nice_step(1.05), 0.25);
        assert_eq!(nice_step(10.0), 2.0);
    }
}
