//! Tourwright's own look: a palette for legs and bodies, readable on light and dark themes, and
//! the stop symbols (launch: upward triangle, swing-by: diamond, arrival: square ring).

use eframe::egui::{Align2, Color32, FontId, Painter, Pos2, Rect, Shape, Stroke, pos2};

use tourwright_mission::evaluate::StopKind;

/// Colours of successive legs (chosen for this program; distinguishable for common colour-vision
/// deficiencies by lightness as well as hue).
pub const LEG_COLORS: [Color32; 6] = [
    Color32::from_rgb(0x1F, 0xA8, 0x9A), // sea green
    Color32::from_rgb(0xE3, 0x8B, 0x2C), // amber
    Color32::from_rgb(0x7E, 0x63, 0xD0), // violet
    Color32::from_rgb(0xD2, 0x4F, 0x5E), // rose
    Color32::from_rgb(0x3E, 0x8E, 0xDE), // sky
    Color32::from_rgb(0x8C, 0xA8, 0x2E), // moss
];

/// Colour of leg `k`.
pub fn leg_color(k: usize) -> Color32 {
    LEG_COLORS[k % LEG_COLORS.len()]
}

/// Colour of a body by name (planets get a tint; user bodies a neutral slate).
pub fn body_color(name: &str) -> Color32 {
    match name.to_ascii_lowercase().as_str() {
        "mercury" => Color32::from_rgb(0x9A, 0x92, 0x8A),
        "venus" => Color32::from_rgb(0xD9, 0xB8, 0x6A),
        "earth" => Color32::from_rgb(0x4C, 0x8F, 0xD6),
        "mars" => Color32::from_rgb(0xC8, 0x5A, 0x3C),
        "jupiter" => Color32::from_rgb(0xC9, 0x9A, 0x6B),
        "saturn" => Color32::from_rgb(0xD8, 0xC2, 0x7A),
        "uranus" => Color32::from_rgb(0x7F, 0xC8, 0xCF),
        "neptune" => Color32::from_rgb(0x4F, 0x6F, 0xD8),
        "pluto" => Color32::from_rgb(0xB0, 0xA0, 0x90),
        _ => Color32::from_rgb(0x8A, 0x94, 0xA6),
    }
}

/// Background of the drawing canvases (Sun view, lens).
pub fn canvas(dark: bool) -> Color32 {
    if dark {
        Color32::from_rgb(14, 17, 24)
    } else {
        Color32::from_rgb(248, 247, 242)
    }
}

/// A number with `p` decimals, or an em dash when it is not finite or absurdly large.
pub fn fixed(x: f64, p: usize) -> String {
    fixed_opt(Some(x), p)
}

/// An optional number with `p` decimals; absent, not finite or absurd numbers show as an em dash
/// (the mission crate's one rule of which numbers are shown).
pub fn fixed_opt(x: Option<f64>, p: usize) -> String {
    match x.and_then(tourwright_mission::rules::shown) {
        Some(v) => format!("{v:.p$}"),
        None => "—".into(),
    }
}

/// Sun colour.
pub const SUN: Color32 = Color32::from_rgb(0xF2, 0xB1, 0x34);

/// The converged continuous n-body trajectory (lines, legend and its verdict).
pub fn nbody_color(dark: bool) -> Color32 {
    if dark {
        Color32::from_rgb(0x4F, 0xD1, 0xC5)
    } else {
        Color32::from_rgb(0x00, 0x7A, 0x70)
    }
}

/// Text colour for warnings.
pub fn warn_color(dark: bool) -> Color32 {
    if dark {
        Color32::from_rgb(0xF0, 0xB0, 0x50)
    } else {
        Color32::from_rgb(0xA8, 0x5A, 0x00)
    }
}

/// Text colour for errors.
pub fn error_color(dark: bool) -> Color32 {
    if dark {
        Color32::from_rgb(0xFF, 0x7A, 0x7A)
    } else {
        Color32::from_rgb(0xB0, 0x1E, 0x1E)
    }
}

/// Faint colour for orbits and grids.
pub fn faint(dark: bool) -> Color32 {
    if dark {
        Color32::from_gray(80)
    } else {
        Color32::from_gray(190)
    }
}

/// Draw the symbol of a stop.
pub fn stop_marker(
    p: &Painter,
    at: Pos2,
    kind: StopKind,
    color: Color32,
    size: f32,
    outline: Color32,
) {
    let s = size;
    let stroke = Stroke::new(1.5, outline);
    match kind {
        StopKind::Launch => {
            let pts = vec![
                pos2(at.x, at.y - s),
                pos2(at.x + 0.9 * s, at.y + 0.7 * s),
                pos2(at.x - 0.9 * s, at.y + 0.7 * s),
            ];
            p.add(Shape::convex_polygon(pts, color, stroke));
        }
        StopKind::SwingBy => {
            let pts = vec![
                pos2(at.x, at.y - s),
                pos2(at.x + s, at.y),
                pos2(at.x, at.y + s),
                pos2(at.x - s, at.y),
            ];
            p.add(Shape::convex_polygon(pts, color, stroke));
        }
        StopKind::Arrival => {
            let r = eframe::egui::Rect::from_center_size(at, eframe::egui::vec2(1.6 * s, 1.6 * s));
            p.rect_stroke(
                r,
                0.0,
                Stroke::new(2.5, color),
                eframe::egui::StrokeKind::Middle,
            );
            p.rect_stroke(r.expand(1.5), 0.0, stroke, eframe::egui::StrokeKind::Middle);
        }
    }
}

/// A colour scale for window maps: dark blue (low) through teal and sand to brick (high).
pub fn ramp(t: f32) -> Color32 {
    const STOPS: [(f32, [u8; 3]); 5] = [
        (0.0, [0x1B, 0x2A, 0x6B]),
        (0.3, [0x1F, 0x8A, 0x9A]),
        (0.55, [0x9C, 0xC8, 0x6A]),
        (0.8, [0xE8, 0xC0, 0x6A]),
        (1.0, [0xA8, 0x3A, 0x2A]),
    ];
    let t = t.clamp(0.0, 1.0);
    for w in STOPS.windows(2) {
        let (a, ca) = w[0];
        let (b, cb) = w[1];
        if t <= b {
            let f = (t - a) / (b - a);
            let mix = |i: usize| (ca[i] as f32 + f * (cb[i] as f32 - ca[i] as f32)).round() as u8;
            return Color32::from_rgb(mix(0), mix(1), mix(2));
        }
    }
    Color32::from_rgb(0xA8, 0x3A, 0x2A)
}

/// Add a widget after a visible label that also names it for assistive technology (and tests).
pub fn labelled(
    ui: &mut eframe::egui::Ui,
    label: &str,
    w: impl eframe::egui::Widget,
) -> eframe::egui::Response {
    let l = ui.label(label);
    ui.add(w).labelled_by(l.id)
}

/// A scale bar of a "nice" length in AU at the lower left of `rect`; `scale` is points per AU.
pub fn scale_bar(painter: &Painter, rect: Rect, scale: f32, color: Color32) {
    let nice = [0.05, 0.1, 0.2, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0];
    let au = nice
        .iter()
        .copied()
        .find(|&a| a as f32 * scale >= 80.0)
        .unwrap_or(50.0);
    let y = rect.bottom() - 18.0;
    let x0 = rect.left() + 16.0;
    let x1 = x0 + au as f32 * scale;
    painter.line_segment([pos2(x0, y), pos2(x1, y)], Stroke::new(2.0, color));
    painter.line_segment(
        [pos2(x0, y - 4.0), pos2(x0, y + 4.0)],
        Stroke::new(1.5, color),
    );
    painter.line_segment(
        [pos2(x1, y - 4.0), pos2(x1, y + 4.0)],
        Stroke::new(1.5, color),
    );
    painter.text(
        pos2(0.5 * (x0 + x1), y - 6.0),
        Align2::CENTER_BOTTOM,
        format!("{au} AU"),
        FontId::proportional(12.0),
        color,
    );
}

/// Text colour that reads on the canvas.
pub fn ink(dark: bool) -> Color32 {
    if dark {
        Color32::from_gray(215)
    } else {
        Color32::from_gray(40)
    }
}
