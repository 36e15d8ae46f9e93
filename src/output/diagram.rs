//! A predominance diagram as SVG: each region a filled polygon labelled with its species, the
//! potential axis vs SHE (or RHE) with an optional second axis on a reference electrode, the two
//! water lines dashed, and the conditions and data source in a caption. Hand-written and
//! deterministic like the line plots of `svg.rs`, whose tick and escape helpers it shares.

use super::svg::{decimals, escape, ticks};
use crate::predominance::{Axis, Diagram, Line};
use std::fmt::Write;

const WIDTH: f64 = 860.0;
const LEFT: f64 = 84.0;
const RIGHT: f64 = 760.0;
const TOP: f64 = 56.0;
const BOTTOM: f64 = 596.0;
const CAPTION_ROW: f64 = 17.0;
/// Characters per caption line (11 px text in the plot's width).
const CAPTION_CHARACTERS: usize = 118;

/// Fill colours: dissolved species in blues, solids and liquids in sands and greys, the element
/// in green (where it is stable it does not corrode), gases in lilac.
const DISSOLVED: [&str; 4] = ["#cfe3f5", "#b3d3ee", "#e2eefa", "#9fc5e8"];
const CONDENSED: [&str; 4] = ["#f3e3c3", "#e8d3a9", "#ecdcd0", "#ddd7c8"];
const ELEMENT: &str = "#cfe8c9";
const GAS: &str = "#e6d9f2";

fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > width {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// Width of a horizontal chord of a convex polygon (pixel coordinates) at height `y`.
fn chord(points: &[(f64, f64)], y: f64) -> Option<(f64, f64)> {
    let n = points.len();
    let mut xs = Vec::new();
    for k in 0..n {
        let (x0, y0) = points[k];
        let (x1, y1) = points[(k + 1) % n];
        if (y0 - y) * (y1 - y) <= 0.0 && (y1 - y0).abs() > 1e-9 {
            xs.push(x0 + (y - y0) / (y1 - y0) * (x1 - x0));
        }
    }
    let low = xs.iter().copied().fold(f64::INFINITY, f64::min);
    let high = xs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    (high > low).then_some((low, high))
}

/// Where a label of `characters` fits in a polygon: (x, y, font size). Tries the centroid's
/// height, then heights above and below it, with the font shrinking from 15 to 8 px; `None`
/// when it fits nowhere.
fn place_label(
    points: &[(f64, f64)],
    centroid: (f64, f64),
    characters: usize,
) -> Option<(f64, f64, f64)> {
    let top = points.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
    let bottom = points.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
    let text_width = |size: f64| 0.62 * size * characters as f64 + 6.0;
    for size in [15.0, 13.0, 11.0, 9.5, 8.0] {
        let height = bottom - top;
        if height < size + 2.0 {
            continue;
        }
        let mut candidates = vec![centroid.1];
        for step in 1..8 {
            let d = step as f64 * height / 16.0;
            candidates.push(centroid.1 - d);
            candidates.push(centroid.1 + d);
        }
        for y in candidates {
            if y - size * 0.8 < top || y + size * 0.3 > bottom {
                continue;
            }
            // The text's box must fit at its top and at its baseline.
            let upper = chord(points, y - size * 0.75);
            let lower = chord(points, y + size * 0.2);
            if let (Some(a), Some(b)) = (upper, lower) {
                let (low, high) = (a.0.max(b.0), a.1.min(b.1));
                if high - low >= text_width(size) {
                    let x = centroid
                        .0
                        .clamp(low + text_width(size) / 2.0, high - text_width(size) / 2.0);
                    return Some((x, y + size * 0.3, size));
                }
            }
        }
    }
    None
}

/// The box a label covers: (left, top, right, bottom) in pixels.
type LabelBox = (f64, f64, f64, f64);

fn label_box(x: f64, y: f64, size: f64, characters: usize, anchor_end: bool) -> LabelBox {
    let width = 0.62 * size * characters as f64;
    let left = if anchor_end {
        x - width
    } else {
        x - width / 2.0
    };
    (left, y - 0.85 * size, left + width, y + 0.3 * size)
}

fn overlaps(a: &LabelBox, b: &LabelBox) -> bool {
    const GAP: f64 = 5.0;
    a.0 < b.2 + GAP && b.0 < a.2 + GAP && a.1 < b.3 + GAP && b.1 < a.3 + GAP
}

/// Renders the diagram. `second` is a reference-electrode axis drawn on the right (a constant
/// offset from the diagram's own axis); `caption` lines go under the plot.
pub fn diagram_svg(diagram: &Diagram, second: Option<&Axis>, caption: &[String]) -> String {
    let window = &diagram.window;
    let axis = &window.axis;
    let (p0, p1) = window.ph;
    let (e0, e1) = window.e_volts;
    let to_x = |ph: f64| LEFT + (ph - p0) / (p1 - p0) * (RIGHT - LEFT);
    let to_y = |e: f64| BOTTOM - (e - e0) / (e1 - e0) * (BOTTOM - TOP);
    // A point vs SHE in pixels on the diagram's own axis.
    let pixel = |(ph, e): (f64, f64)| (to_x(ph), to_y(axis.from_she(ph, e)));
    let mut svg = String::new();
    let _ = writeln!(
        svg,
        r#"<text id="title" x="{}" y="30" text-anchor="middle" font-size="17" font-weight="bold">{}</text>"#,
        (LEFT + RIGHT) / 2.0,
        escape(&format!(
            "Potential–pH predominance diagram of {}",
            diagram.element.symbol()
        ))
    );
    let _ = writeln!(
        svg,
        r#"<clipPath id="area"><rect x="{LEFT}" y="{TOP}" width="{}" height="{}"/></clipPath>"#,
        RIGHT - LEFT,
        BOTTOM - TOP
    );
    // Regions.
    let mut dissolved = 0;
    let mut condensed = 0;
    let _ = writeln!(
        svg,
        r##"<g id="regions" stroke="#222222" stroke-width="1.3" stroke-linejoin="round">"##
    );
    let mut labels = String::new();
    let mut narrow: Vec<String> = Vec::new();
    let mut boxes: Vec<LabelBox> = Vec::new();
    for region in &diagram.regions {
        let species = &diagram.species[region.species];
        let fill = if species.is_dissolved() {
            dissolved += 1;
            DISSOLVED[(dissolved - 1) % DISSOLVED.len()]
        } else if species.row.phase == crate::thermo::DataPhase::Gas {
            GAS
        } else if species.oxidation_number == num_rational::BigRational::from_integer(0.into()) {
            ELEMENT
        } else {
            condensed += 1;
            CONDENSED[(condensed - 1) % CONDENSED.len()]
        };
        let points: Vec<(f64, f64)> = region.polygon.vertices.iter().map(|&v| pixel(v)).collect();
        let text: Vec<String> = points
            .iter()
            .map(|(x, y)| format!("{x:.2},{y:.2}"))
            .collect();
        let label = species.label();
        let _ = writeln!(
            svg,
            r#"<polygon class="region" fill="{fill}" points="{}"><title>{}</title></polygon>"#,
            text.join(" "),
            escape(&label)
        );
        let characters = label.chars().count();
        let centroid = pixel(region.polygon.centroid());
        // A label that fits nowhere becomes a number, explained in the caption.
        let (text, x, y, size) = match place_label(&points, centroid, characters) {
            Some((x, y, size)) => (label.clone(), x, y, size),
            None => {
                narrow.push(label.clone());
                let mark = narrow.len().to_string();
                let (x, y, size) = place_label(&points, centroid, mark.len())
                    .map_or((centroid.0, centroid.1 + 4.0, 11.0), |(x, y, s)| {
                        (x, y, s.max(11.0))
                    });
                (mark, x, y, size)
            }
        };
        boxes.push(label_box(x, y, size, text.chars().count(), false));
        let weight = if text == label { "normal" } else { "bold" };
        let _ = writeln!(
            labels,
            r#"<text class="region-label" x="{x:.2}" y="{y:.2}" text-anchor="middle" font-size="{size}" font-weight="{weight}" paint-order="stroke" stroke="white" stroke-width="3" stroke-opacity="0.8">{}</text>"#,
            escape(&text)
        );
    }
    let _ = writeln!(svg, "</g>");
    // Water lines, dashed, clipped to the frame.
    let _ = writeln!(
        svg,
        r##"<g id="water" stroke="#1f4e9a" stroke-width="1.6" stroke-dasharray="7 4" clip-path="url(#area)">"##
    );
    let mut water_labels = String::new();
    for (name, line, above) in [
        ("O₂/H₂O", diagram.water.oxygen, true),
        ("H₂O/H₂", diagram.water.hydrogen, false),
    ] {
        let Line::Sloped {
            intercept_volts,
            volts_per_ph,
        } = line
        else {
            continue;
        };
        let at = |ph: f64| pixel((ph, intercept_volts + volts_per_ph * ph));
        let (a, b) = (at(p0), at(p1));
        let _ = writeln!(
            svg,
            r#"<line x1="{:.2}" y1="{:.2}" x2="{:.2}" y2="{:.2}"/>"#,
            a.0, a.1, b.0, b.1
        );
        // The name on the water side of the line, as far right as it clears the region labels.
        let dy = if above { 15.0 } else { -9.0 };
        let spot = [0.97, 0.88, 0.78, 0.66, 0.52, 0.38, 0.24, 0.12]
            .iter()
            .map(|f| {
                let (x, y) = at(p0 + (p1 - p0) * f);
                (x, y + dy)
            })
            .find(|&(x, y)| {
                (TOP + 12.0..BOTTOM - 4.0).contains(&y) && x > LEFT + 50.0 && {
                    let b = label_box(x, y, 11.0, name.chars().count(), true);
                    !boxes.iter().any(|other| overlaps(&b, other))
                }
            });
        if let Some((x, y)) = spot {
            boxes.push(label_box(x, y, 11.0, name.chars().count(), true));
            let _ = writeln!(
                water_labels,
                r##"<text class="water-label" x="{x:.2}" y="{y:.2}" text-anchor="end" font-size="11" fill="#1f4e9a" paint-order="stroke" stroke="white" stroke-width="3">{name}</text>"##
            );
        }
    }
    let _ = writeln!(svg, "</g>");
    svg.push_str(&labels);
    svg.push_str(&water_labels);
    let _ = writeln!(
        svg,
        r#"<rect id="frame" x="{LEFT}" y="{TOP}" width="{}" height="{}" fill="none" stroke="black" stroke-width="1.2"/>"#,
        RIGHT - LEFT,
        BOTTOM - TOP
    );
    // Axes.
    let (x_ticks, x_step) = ticks(p0, p1, 10);
    let (y_ticks, y_step) = ticks(e0, e1, 12);
    let _ = writeln!(
        svg,
        r#"<g id="x-ticks" text-anchor="middle" stroke-width="1">"#
    );
    for &ph in &x_ticks {
        let x = to_x(ph);
        let _ = writeln!(
            svg,
            r#"<line x1="{x:.2}" y1="{BOTTOM}" x2="{x:.2}" y2="{}" stroke="black"/><text x="{x:.2}" y="{}">{:.*}</text>"#,
            BOTTOM + 5.0,
            BOTTOM + 19.0,
            decimals(x_step),
            ph
        );
    }
    let _ = writeln!(svg, "</g>");
    let _ = writeln!(svg, r#"<g id="y-ticks" text-anchor="end">"#);
    for &e in &y_ticks {
        let y = to_y(e);
        let _ = writeln!(
            svg,
            r#"<line x1="{}" y1="{y:.2}" x2="{LEFT}" y2="{y:.2}" stroke="black"/><text x="{}" y="{:.2}">{:.*}</text>"#,
            LEFT - 5.0,
            LEFT - 8.0,
            y + 4.0,
            decimals(y_step),
            e
        );
    }
    let _ = writeln!(svg, "</g>");
    let _ = writeln!(
        svg,
        r#"<text id="x-label" x="{}" y="{}" text-anchor="middle">pH</text>"#,
        (LEFT + RIGHT) / 2.0,
        BOTTOM + 40.0
    );
    let y_name = if axis.volts_per_ph == 0.0 && axis.offset_volts == 0.0 {
        "E vs SHE (V)".to_owned()
    } else {
        format!("E vs {} (V)", axis.label)
    };
    let _ = writeln!(
        svg,
        r#"<text id="y-label" x="24" y="{0}" text-anchor="middle" transform="rotate(-90 24 {0})">{1}</text>"#,
        (TOP + BOTTOM) / 2.0,
        escape(&y_name)
    );
    if let Some(second) = second {
        // E on the second axis = E on the first + shift (both constant offsets from SHE).
        let shift = second.offset_volts - axis.offset_volts;
        let (s_ticks, s_step) = ticks(e0 + shift, e1 + shift, 12);
        let _ = writeln!(svg, r#"<g id="second-axis" text-anchor="start">"#);
        for &e in &s_ticks {
            let y = to_y(e - shift);
            let _ = writeln!(
                svg,
                r#"<line x1="{RIGHT}" y1="{y:.2}" x2="{}" y2="{y:.2}" stroke="black"/><text x="{}" y="{:.2}">{:.*}</text>"#,
                RIGHT + 5.0,
                RIGHT + 8.0,
                y + 4.0,
                decimals(s_step),
                e
            );
        }
        let _ = writeln!(svg, "</g>");
        let x = WIDTH - 22.0;
        let _ = writeln!(
            svg,
            r#"<text id="second-label" x="{x}" y="{0}" text-anchor="middle" transform="rotate(90 {x} {0})">{1}</text>"#,
            (TOP + BOTTOM) / 2.0,
            escape(&format!("E vs {} (V)", second.label))
        );
    }
    let mut caption = caption.to_vec();
    if !narrow.is_empty() {
        let keys: Vec<String> = narrow
            .iter()
            .enumerate()
            .map(|(k, name)| format!("{} = {name}", k + 1))
            .collect();
        caption.insert(0, format!("Narrow regions: {}.", keys.join("; ")));
    }
    let lines: Vec<String> = caption
        .iter()
        .flat_map(|c| wrap(c, CAPTION_CHARACTERS))
        .collect();
    let caption_top = BOTTOM + 64.0;
    let height = caption_top + CAPTION_ROW * lines.len() as f64 + 12.0;
    let _ = writeln!(svg, r##"<g id="caption" font-size="11" fill="#333333">"##);
    for (k, line) in lines.iter().enumerate() {
        let _ = writeln!(
            svg,
            r#"<text x="{}" y="{:.1}">{}</text>"#,
            LEFT - 60.0,
            caption_top + CAPTION_ROW * k as f64,
            escape(line)
        );
    }
    let _ = writeln!(svg, "</g>");
    svg.push_str("</svg>\n");
    let mut document = String::new();
    let _ = writeln!(
        document,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height}" viewBox="0 0 {WIDTH} {height}" font-family="DejaVu Sans, Arial, Helvetica, sans-serif" font-size="13">"#
    );
    let _ = writeln!(
        document,
        r#"<rect x="0" y="0" width="{WIDTH}" height="{height}" fill="white"/>"#
    );
    document.push_str(&svg);
    document
}
