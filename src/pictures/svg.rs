//! A small SVG text writer shared by the pictures: escaping, fixed-precision numbers, the
//! palette, and the root element with its viewBox and explicit size.
//!
//! Numbers are printed with one decimal (trailing `.0` dropped), so the same input always
//! gives the same bytes.

use std::fmt::Write as _;

/// Escape the five XML special characters for text content and attribute values.
pub(crate) fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            // Control characters other than tab/newline are not allowed in XML 1.0.
            c if (c as u32) < 0x20 && c != '\t' && c != '\n' && c != '\r' => out.push('\u{fffd}'),
            c => out.push(c),
        }
    }
    out
}

/// A coordinate or length with one decimal; `-0` is printed as `0`.
pub(crate) fn n(v: f64) -> String {
    let r = (v * 10.0).round() / 10.0;
    let r = if r == 0.0 { 0.0 } else { r };
    if (r - r.trunc()).abs() < 1e-9 {
        format!("{}", r as i64)
    } else {
        format!("{r:.1}")
    }
}

/// The palette. Grey values are the BT.601 luma of each colour as a share of white.
/// Every pair of roles that can meet in one picture differs in lightness
/// (grey value) and, for strokes, in dash pattern or width, not in hue alone; see
/// `docs/pictures.md`.
pub(crate) mod palette {
    /// Background.
    pub(crate) const PAPER: &str = "#ffffff";
    /// Text, state nodes, ordinary arrows (grey value about 13%).
    pub(crate) const INK: &str = "#1f2328";
    /// Secondary text: code labels, Gray labels, minterm numbers (about 43%).
    pub(crate) const MUTED: &str = "#6b6f76";
    /// Cube edges and map grid lines (about 78%).
    pub(crate) const GRID: &str = "#c4c7cc";
    /// Sub-cube shading of a multi-bit transition (about 92% as drawn, translucent).
    pub(crate) const SHADE: &str = "#e9dcb5";
    /// Critical race: dark vermilion, thick and dashed (about 35%).
    pub(crate) const CRITICAL: &str = "#b3361d";
    /// Dash pattern of the critical-race stroke.
    pub(crate) const CRITICAL_DASH: &str = "7 4";
    /// Hatching of required transition cubes (about 55%).
    pub(crate) const HATCH: &str = "#8c8f96";
    /// Reset marker (about 25%).
    pub(crate) const RESET: &str = "#21466b";
    /// Stable entries (about 35%).
    pub(crate) const STABLE: &str = "#3d6b45";

    /// Outline styles of the chosen products of a map, in order: (colour, dash, width).
    /// Consecutive styles alternate between dark and light greys and between solid and
    /// broken strokes, so neighbours stay apart in a greyscale print.
    pub(crate) const PRODUCT_STYLES: [(&str, &str, f64); 8] = [
        ("#12355b", "", 2.6),         // dark blue, solid, about 18%
        ("#e07b00", "8 3", 2.6),      // orange, long dash, about 55%
        ("#3e7d3a", "2 2.5", 2.8),    // green, dotted, about 38%
        ("#b07cc6", "10 3 2 3", 2.4), // lilac, dash-dot, about 58%
        ("#0f7c8c", "", 1.6),         // teal, thin solid, about 37%
        ("#7a5a00", "5 5", 2.6),      // umber, even dash, about 35%
        ("#e0609a", "1.5 3", 3.0),    // rose, sparse dots, about 55%
        ("#404040", "12 4", 1.8),     // grey, very long dash, about 25%
    ];
}

/// Accumulates the body of one SVG document.
pub(crate) struct Svg {
    body: String,
    defs: String,
}

impl Svg {
    pub(crate) fn new() -> Self {
        Svg {
            body: String::new(),
            defs: String::new(),
        }
    }

    /// Append raw markup to the body.
    pub(crate) fn raw(&mut self, s: &str) {
        self.body.push_str(s);
        self.body.push('\n');
    }

    /// The body buffer, for `write!`.
    pub(crate) fn body_mut(&mut self) -> &mut String {
        &mut self.body
    }

    /// Append raw markup to `<defs>`.
    pub(crate) fn def(&mut self, s: &str) {
        self.defs.push_str(s);
        self.defs.push('\n');
    }

    /// A line segment.
    pub(crate) fn line(&mut self, x1: f64, y1: f64, x2: f64, y2: f64, attrs: &str) {
        let _ = writeln!(
            self.body,
            "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" {attrs}/>",
            n(x1),
            n(y1),
            n(x2),
            n(y2)
        );
    }

    /// A circle.
    pub(crate) fn circle(&mut self, cx: f64, cy: f64, r: f64, attrs: &str) {
        let _ = writeln!(
            self.body,
            "<circle cx=\"{}\" cy=\"{}\" r=\"{}\" {attrs}/>",
            n(cx),
            n(cy),
            n(r)
        );
    }

    /// A rectangle.
    pub(crate) fn rect(&mut self, x: f64, y: f64, w: f64, h: f64, attrs: &str) {
        let _ = writeln!(
            self.body,
            "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" {attrs}/>",
            n(x),
            n(y),
            n(w.max(0.0)),
            n(h.max(0.0))
        );
    }

    /// A text element; `text` is escaped here.
    pub(crate) fn text(&mut self, x: f64, y: f64, text: &str, attrs: &str) {
        let _ = writeln!(
            self.body,
            "<text x=\"{}\" y=\"{}\" {attrs}>{}</text>",
            n(x),
            n(y),
            esc(text)
        );
    }

    /// A polyline through the points.
    pub(crate) fn polyline(&mut self, pts: &[(f64, f64)], attrs: &str) {
        let _ = writeln!(self.body, "<polyline points=\"{}\" {attrs}/>", points(pts));
    }

    /// A closed polygon.
    pub(crate) fn polygon(&mut self, pts: &[(f64, f64)], attrs: &str) {
        let _ = writeln!(self.body, "<polygon points=\"{}\" {attrs}/>", points(pts));
    }

    /// The finished document with root `<svg>` carrying width, height and viewBox.
    pub(crate) fn finish(self, width: f64, height: f64, title: &str) -> String {
        let (w, h) = (width.ceil(), height.ceil());
        let mut out = String::with_capacity(self.body.len() + self.defs.len() + 512);
        out.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
        let _ = writeln!(
            out,
            "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{}\" height=\"{}\" viewBox=\"0 0 {} {}\" font-family=\"sans-serif\" font-size=\"12\">",
            n(w),
            n(h),
            n(w),
            n(h)
        );
        let _ = writeln!(out, "<title>{}</title>", esc(title));
        if !self.defs.is_empty() {
            out.push_str("<defs>\n");
            out.push_str(&self.defs);
            out.push_str("</defs>\n");
        }
        let _ = writeln!(
            out,
            "<rect x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" fill=\"{}\"/>",
            n(w),
            n(h),
            palette::PAPER
        );
        out.push_str(&self.body);
        out.push_str("</svg>\n");
        out
    }
}

/// `x1,y1 x2,y2 ...` with fixed precision.
pub(crate) fn points(pts: &[(f64, f64)]) -> String {
    let mut s = String::new();
    for (i, &(x, y)) in pts.iter().enumerate() {
        if i > 0 {
            s.push(' ');
        }
        let _ = write!(s, "{},{}", n(x), n(y));
    }
    s
}

/// Rough width of `text` at `size` px in a sans-serif face (average advance 0.6 em);
/// used only to size boxes and the canvas.
pub(crate) fn text_width(text: &str, size: f64) -> f64 {
    text.chars().count() as f64 * size * 0.6
}

/// Stroke attributes `stroke=.. stroke-width=.. [stroke-dasharray=..]`.
pub(crate) fn stroke(colour: &str, width: f64, dash: &str) -> String {
    if dash.is_empty() {
        format!("stroke=\"{colour}\" stroke-width=\"{}\"", n(width))
    } else {
        format!(
            "stroke=\"{colour}\" stroke-width=\"{}\" stroke-dasharray=\"{dash}\"",
            n(width)
        )
    }
}

/// An arrowhead marker definition with the given id and colour.
pub(crate) fn arrow_marker(id: &str, colour: &str) -> String {
    format!(
        "<marker id=\"{id}\" viewBox=\"0 0 10 10\" refX=\"9\" refY=\"5\" markerWidth=\"7\" markerHeight=\"7\" markerUnits=\"userSpaceOnUse\" orient=\"auto\"><path d=\"M0,0 L10,5 L0,10 z\" fill=\"{colour}\"/></marker>"
    )
}

/// A text with a white halo behind it (paint-order stroke), for labels over lines.
pub(crate) fn halo() -> &'static str {
    "stroke=\"#ffffff\" stroke-width=\"3\" stroke-linejoin=\"round\" paint-order=\"stroke\""
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_xml_specials() {
        assert_eq!(esc("a<b>&\"c'"), "a&lt;b&gt;&amp;&quot;c&apos;");
        assert_eq!(esc("x\u{1}y"), "x\u{fffd}y");
    }

    /// BT.601 luma of `#rrggbb` as a share of white (common practice, no source).
    fn luma(hex: &str) -> f64 {
        let c = |i: usize| f64::from(u8::from_str_radix(&hex[i..i + 2], 16).unwrap());
        (0.299 * c(1) + 0.587 * c(3) + 0.114 * c(5)) / 255.0
    }

    #[test]
    fn palette_survives_greyscale() {
        use palette::*;
        // Roles that meet in one picture differ in lightness or in dash pattern.
        assert!((luma(INK) - luma(GRID)).abs() > 0.5);
        assert!((luma(INK) - luma(MUTED)).abs() > 0.25);
        assert!((luma(CRITICAL) - luma(INK)).abs() > 0.15 && !CRITICAL_DASH.is_empty());
        assert!(luma(SHADE) > 0.8 && luma(HATCH) > 0.45);
        let st = PRODUCT_STYLES;
        for (i, a) in st.iter().enumerate() {
            let b = st[(i + 1) % st.len()];
            assert!(
                a.1 != b.1 || (luma(a.0) - luma(b.0)).abs() > 0.15,
                "styles {i} and {} look alike in grey",
                (i + 1) % st.len()
            );
            for c in &st[i + 1..] {
                assert!(
                    a.1 != c.1 || (a.2 - c.2).abs() > 0.5 || (luma(a.0) - luma(c.0)).abs() > 0.15
                );
            }
        }
    }

    #[test]
    fn numbers_are_fixed_precision() {
        assert_eq!(n(1.0), "1");
        assert_eq!(n(1.25), "1.3");
        assert_eq!(n(-0.01), "0");
        assert_eq!(n(-2.5), "-2.5");
        assert_eq!(points(&[(0.0, 1.5), (2.0, 3.0)]), "0,1.5 2,3");
    }
}
