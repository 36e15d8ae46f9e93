//! A deterministic SVG line plot: several series against one x axis, axes with units, a
//! title, a legend, and an end marker per series (for a discharge curve, the point where the
//! limiting reactant runs out).
//!
//! Written by hand rather than through a plotting crate so the output is a small, stable
//! text (the same input gives the same bytes) whose labels are plain `<text>` elements in a
//! generic font family: no system fonts are read and any viewer can render it.

use crate::discharge::Discharge;
use std::fmt::Write;

/// One curve.
#[derive(Clone, Debug, PartialEq)]
pub struct Series {
    /// Legend text.
    pub label: String,
    /// (x, y) in data units, in drawing order.
    pub points: Vec<(f64, f64)>,
    /// A marked point with a short text (drawn as a ring, the text goes in the legend).
    pub marker: Option<Marker>,
}

/// A marked point on a series.
#[derive(Clone, Debug, PartialEq)]
pub struct Marker {
    /// x in data units.
    pub x: f64,
    /// y in data units.
    pub y: f64,
    /// What the point means, e.g. `PbO2(s) runs out`.
    pub text: String,
}

/// What to draw.
#[derive(Clone, Debug, PartialEq)]
pub struct Plot {
    /// Title above the plot.
    pub title: String,
    /// x-axis label with its unit.
    pub x_label: String,
    /// y-axis label with its unit.
    pub y_label: String,
    /// Draw x decreasing from left to right (state of charge runs 1 → 0 along a discharge).
    pub x_reversed: bool,
    /// The curves.
    pub series: Vec<Series>,
    /// Small print under the legend (assumptions, sources).
    pub footnote: Option<String>,
}

/// Why a plot cannot be drawn.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum PlotError {
    /// No series, or every series is empty.
    #[error("nothing to plot: no series has points")]
    Empty,
    /// A coordinate is NaN or infinite.
    #[error("series '{0}' has a coordinate that is not a finite number")]
    NotFinite(String),
}

/// Line colours and dash patterns, so curves stay apart in colour and in grey print.
const PALETTE: [(&str, &str); 8] = [
    ("#1f5fa8", ""),
    ("#c0392b", "6 3"),
    ("#2e8b57", "2 3"),
    ("#8e44ad", "8 3 2 3"),
    ("#d35400", "4 4"),
    ("#16a085", "1 2"),
    ("#7f6a00", "10 4"),
    ("#555555", "3 2 1 2"),
];

const WIDTH: f64 = 760.0;
const PLOT_LEFT: f64 = 80.0;
const PLOT_RIGHT: f64 = 730.0;
const PLOT_TOP: f64 = 50.0;
const PLOT_BOTTOM: f64 = 370.0;
const LEGEND_ROW: f64 = 34.0;

/// What a discharge plot puts along x.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DischargeAxis {
    /// State of charge, 1 (left) → 0 (right).
    StateOfCharge,
    /// Charge passed in Ah, 0 (left) → capacity (right).
    Charge,
}

/// A plot of one or more discharge curves, E against state of charge or charge passed, each
/// ending in a ring where its limiting reactant runs out (or where the curve stops).
pub fn discharge_plot(title: &str, curves: &[(String, &Discharge)], axis: DischargeAxis) -> Plot {
    let x_of = |p: &crate::discharge::DischargePoint| match axis {
        DischargeAxis::StateOfCharge => p.state_of_charge,
        DischargeAxis::Charge => p.charge_amp_hours,
    };
    let series = curves
        .iter()
        .map(|(label, curve)| Series {
            label: label.clone(),
            points: curve.points.iter().map(|p| (x_of(p), p.e_volts)).collect(),
            marker: curve.points.last().map(|p| Marker {
                x: x_of(p),
                y: p.e_volts,
                text: match &curve.stopped {
                    None => format!("limiting: {} runs out", curve.limiting.ascii()),
                    Some(_) => format!(
                        "limiting: {}; curve stops early (see output)",
                        curve.limiting.ascii()
                    ),
                },
            }),
        })
        .collect();
    let mut models: Vec<&str> = curves.iter().map(|(_, c)| c.gamma_model.name()).collect();
    models.dedup();
    Plot {
        title: title.to_owned(),
        x_label: match axis {
            DischargeAxis::StateOfCharge => {
                "state of charge (1 = charged, 0 = limiting reactant used up)".to_owned()
            }
            DischargeAxis::Charge => "charge passed (Ah)".to_owned(),
        },
        y_label: "open-circuit voltage E (V)".to_owned(),
        x_reversed: axis == DischargeAxis::StateOfCharge,
        series,
        footnote: Some(format!(
            "Open-circuit E = E° − (RT/nF) ln Q; γ model: {}; no overpotential or resistance",
            models.join(", ")
        )),
    }
}

/// Ticks at 1, 2 or 5 × 10^k covering `[low, high]`, about `target` of them.
pub(crate) fn ticks(low: f64, high: f64, target: usize) -> (Vec<f64>, f64) {
    let span = (high - low).max(f64::MIN_POSITIVE);
    let rough = span / target.max(1) as f64;
    let magnitude = 10f64.powf(rough.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|m| m * magnitude)
        .find(|s| span / s <= target as f64)
        .unwrap_or(10.0 * magnitude);
    let first = (low / step).ceil() as i64;
    let last = (high / step).floor() as i64;
    ((first..=last).map(|i| i as f64 * step).collect(), step)
}

/// Decimals that show a tick step exactly (0.05 → 2).
pub(crate) fn decimals(step: f64) -> usize {
    let mut d = 0;
    while d < 6
        && ((step * 10f64.powi(d as i32)).round() - step * 10f64.powi(d as i32)).abs() > 1e-6
    {
        d += 1;
    }
    d
}

pub(crate) fn escape(text: &str) -> String {
    text.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// Limits of the data, padded so a flat curve still gets a readable axis.
fn range(values: impl Iterator<Item = f64>, pad_fraction: f64, min_span: f64) -> (f64, f64) {
    let (mut low, mut high) = (f64::INFINITY, f64::NEG_INFINITY);
    for v in values {
        low = low.min(v);
        high = high.max(v);
    }
    let span = high - low;
    if span < min_span {
        let middle = (low + high) / 2.0;
        return (middle - min_span / 2.0, middle + min_span / 2.0);
    }
    (low - span * pad_fraction, high + span * pad_fraction)
}

/// Renders the plot as an SVG document.
pub fn render(plot: &Plot) -> Result<String, PlotError> {
    if plot.series.iter().all(|s| s.points.is_empty()) {
        return Err(PlotError::Empty);
    }
    for s in &plot.series {
        if s.points
            .iter()
            .any(|(x, y)| !(x.is_finite() && y.is_finite()))
        {
            return Err(PlotError::NotFinite(s.label.clone()));
        }
    }
    let all = || plot.series.iter().flat_map(|s| s.points.iter());
    let (x_low, x_high) = range(all().map(|p| p.0), 0.0, 1e-9);
    // A flat curve gets a 0.1 V window around it.
    let (y_low, y_high) = range(all().map(|p| p.1), 0.08, 0.1);
    let (x_ticks, x_step) = ticks(x_low, x_high, 8);
    let (y_ticks, y_step) = ticks(y_low, y_high, 9);
    let to_x = |x: f64| {
        let f = (x - x_low) / (x_high - x_low);
        let f = if plot.x_reversed { 1.0 - f } else { f };
        PLOT_LEFT + f * (PLOT_RIGHT - PLOT_LEFT)
    };
    let to_y = |y: f64| PLOT_BOTTOM - (y - y_low) / (y_high - y_low) * (PLOT_BOTTOM - PLOT_TOP);
    let legend_top = PLOT_BOTTOM + 62.0;
    let footnote_rows = usize::from(plot.footnote.is_some());
    let height = legend_top + LEGEND_ROW * (plot.series.len() + footnote_rows) as f64 + 16.0;

    let mut svg = String::new();
    // Writing to a String cannot fail.
    let _ = writeln!(
        svg,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height}" viewBox="0 0 {WIDTH} {height}" font-family="DejaVu Sans, Arial, Helvetica, sans-serif" font-size="13">"#
    );
    let _ = writeln!(
        svg,
        r#"<rect x="0" y="0" width="{WIDTH}" height="{height}" fill="white"/>"#
    );
    let _ = writeln!(
        svg,
        r#"<text id="title" x="{}" y="28" text-anchor="middle" font-size="16" font-weight="bold">{}</text>"#,
        WIDTH / 2.0,
        escape(&plot.title)
    );
    // Grid and tick labels.
    let _ = writeln!(svg, r##"<g id="grid" stroke="#dddddd" stroke-width="1">"##);
    for &x in &x_ticks {
        let px = to_x(x);
        let _ = writeln!(
            svg,
            r#"<line x1="{px:.2}" y1="{PLOT_TOP}" x2="{px:.2}" y2="{PLOT_BOTTOM}"/>"#
        );
    }
    for &y in &y_ticks {
        let py = to_y(y);
        let _ = writeln!(
            svg,
            r#"<line x1="{PLOT_LEFT}" y1="{py:.2}" x2="{PLOT_RIGHT}" y2="{py:.2}"/>"#
        );
    }
    let _ = writeln!(svg, "</g>");
    let _ = writeln!(
        svg,
        r#"<rect id="frame" x="{PLOT_LEFT}" y="{PLOT_TOP}" width="{}" height="{}" fill="none" stroke="black" stroke-width="1"/>"#,
        PLOT_RIGHT - PLOT_LEFT,
        PLOT_BOTTOM - PLOT_TOP
    );
    let _ = writeln!(svg, r#"<g id="x-ticks" text-anchor="middle">"#);
    for &x in &x_ticks {
        let _ = writeln!(
            svg,
            r#"<text x="{:.2}" y="{}">{:.*}</text>"#,
            to_x(x),
            PLOT_BOTTOM + 18.0,
            decimals(x_step),
            x
        );
    }
    let _ = writeln!(svg, "</g>");
    let _ = writeln!(svg, r#"<g id="y-ticks" text-anchor="end">"#);
    for &y in &y_ticks {
        let _ = writeln!(
            svg,
            r#"<text x="{}" y="{:.2}">{:.*}</text>"#,
            PLOT_LEFT - 6.0,
            to_y(y) + 4.0,
            decimals(y_step),
            y
        );
    }
    let _ = writeln!(svg, "</g>");
    let _ = writeln!(
        svg,
        r#"<text id="x-label" x="{}" y="{}" text-anchor="middle">{}</text>"#,
        (PLOT_LEFT + PLOT_RIGHT) / 2.0,
        PLOT_BOTTOM + 40.0,
        escape(&plot.x_label)
    );
    let _ = writeln!(
        svg,
        r#"<text id="y-label" x="20" y="{0}" text-anchor="middle" transform="rotate(-90 20 {0})">{1}</text>"#,
        (PLOT_TOP + PLOT_BOTTOM) / 2.0,
        escape(&plot.y_label)
    );
    // Curves, clipped to the frame.
    let _ = writeln!(
        svg,
        r#"<clipPath id="area"><rect x="{PLOT_LEFT}" y="{PLOT_TOP}" width="{}" height="{}"/></clipPath>"#,
        PLOT_RIGHT - PLOT_LEFT,
        PLOT_BOTTOM - PLOT_TOP
    );
    for (index, s) in plot.series.iter().enumerate() {
        let (colour, dash) = PALETTE[index % PALETTE.len()];
        let points: Vec<String> = s
            .points
            .iter()
            .map(|&(x, y)| format!("{:.2},{:.2}", to_x(x), to_y(y)))
            .collect();
        let dash = if dash.is_empty() {
            String::new()
        } else {
            format!(r#" stroke-dasharray="{dash}""#)
        };
        let _ = writeln!(
            svg,
            r#"<g class="series" id="series-{index}"><title>{}</title><polyline clip-path="url(#area)" fill="none" stroke="{colour}" stroke-width="2"{dash} points="{}"/>"#,
            escape(&s.label),
            points.join(" ")
        );
        if let Some(m) = &s.marker {
            let _ = writeln!(
                svg,
                r#"<circle class="marker" cx="{:.2}" cy="{:.2}" r="5" fill="white" stroke="{colour}" stroke-width="2"><title>{}</title></circle>"#,
                to_x(m.x),
                to_y(m.y),
                escape(&m.text)
            );
        }
        let _ = writeln!(svg, "</g>");
    }
    // Legend under the plot: one row per series, the marker's meaning after the label.
    let _ = writeln!(svg, r#"<g id="legend">"#);
    for (index, s) in plot.series.iter().enumerate() {
        let (colour, dash) = PALETTE[index % PALETTE.len()];
        let y = legend_top + LEGEND_ROW * index as f64;
        let dash = if dash.is_empty() {
            String::new()
        } else {
            format!(r#" stroke-dasharray="{dash}""#)
        };
        let _ = writeln!(
            svg,
            r#"<line x1="{PLOT_LEFT}" y1="{y:.1}" x2="{}" y2="{y:.1}" stroke="{colour}" stroke-width="2"{dash}/>"#,
            PLOT_LEFT + 36.0
        );
        let _ = writeln!(
            svg,
            r#"<text class="legend-entry" x="{}" y="{:.1}">{}</text>"#,
            PLOT_LEFT + 44.0,
            y + 4.5,
            escape(&s.label)
        );
        if let Some(m) = &s.marker {
            let _ = writeln!(
                svg,
                r##"<text class="legend-marker" x="{}" y="{:.1}" font-size="11" fill="#444444">○ {}</text>"##,
                PLOT_LEFT + 44.0,
                y + 19.0,
                escape(&m.text)
            );
        }
    }
    if let Some(note) = &plot.footnote {
        let y = legend_top + LEGEND_ROW * plot.series.len() as f64 + 4.0;
        let _ = writeln!(
            svg,
            r##"<text id="footnote" x="{PLOT_LEFT}" y="{y:.1}" font-size="11" fill="#444444">{}</text>"##,
            escape(note)
        );
    }
    let _ = writeln!(svg, "</g>");
    svg.push_str("</svg>\n");
    Ok(svg)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ticks_are_round_numbers_inside_the_range() {
        let (t, step) = ticks(1.93, 2.08, 7);
        assert!((step - 0.05).abs() < 1e-12);
        assert!(t.first().unwrap() >= &1.93 && t.last().unwrap() <= &2.08);
        assert_eq!(decimals(step), 2);
        assert!((ticks(0.0, 1.0, 8).1 - 0.2).abs() < 1e-12);
    }

    #[test]
    fn same_input_same_bytes_and_bad_numbers_refused() {
        let plot = Plot {
            title: "t & <u>".into(),
            x_label: "x".into(),
            y_label: "y".into(),
            x_reversed: true,
            series: vec![Series {
                label: "a".into(),
                points: vec![(1.0, 2.0), (0.0, 2.0)],
                marker: None,
            }],
            footnote: None,
        };
        let first = render(&plot).unwrap();
        assert_eq!(first, render(&plot).unwrap());
        assert!(first.contains("t &amp; &lt;u&gt;"));
        let mut bad = plot.clone();
        bad.series[0].points.push((f64::NAN, 1.0));
        assert!(render(&bad).is_err());
    }
}
