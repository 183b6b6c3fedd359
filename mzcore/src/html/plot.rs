//! The page's plots as SVG text, drawn with `plotters` and its SVG backend.
//!
//! Colours are the Okabe–Ito palette (Okabe and Ito, "Color Universal Design", 2008), safe
//! for the common colour-vision deficiencies; no plot relies on colour alone: every line has
//! its own marker shape and a text label beside it, observed bars are filled and expected
//! bars are outlined.

use std::fmt::Write as _;

use plotters::prelude::*;

/// Okabe–Ito colours, in the order lines are given them: blue, vermillion, bluish green,
/// reddish purple, orange, sky blue.
pub const OKABE_ITO: [(u8, u8, u8); 6] = [
    (0x00, 0x72, 0xB2),
    (0xD5, 0x5E, 0x00),
    (0x00, 0x9E, 0x73),
    (0xCC, 0x79, 0xA7),
    (0xE6, 0x9F, 0x00),
    (0x56, 0xB4, 0xE9),
];

/// Okabe–Ito black, for axes and text.
const INK: RGBColor = RGBColor(0, 0, 0);

fn colour(i: usize) -> RGBColor {
    let (r, g, b) = OKABE_ITO[i % OKABE_ITO.len()];
    RGBColor(r, g, b)
}

fn escape(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;")
}

/// One line of a plot.
#[derive(Debug, Clone)]
pub struct Line {
    /// Label written beside the line and in the legend.
    pub label: String,
    /// Points, x ascending.
    pub points: Vec<(f64, f64)>,
}

/// A retention time marked on a chromatogram.
#[derive(Debug, Clone)]
pub struct Mark {
    /// Retention time, minutes.
    pub rt: f64,
    /// Short label (compound number).
    pub label: String,
    /// Halogenated compounds get a filled triangle and their label; others a small tick.
    pub strong: bool,
}

/// Keeps at most `bins` points: the most intense point of each retention-time bin, so peaks
/// survive the thinning.
pub fn thin(points: &[(f64, f64)], bins: usize) -> Vec<(f64, f64)> {
    if points.len() <= bins || bins == 0 {
        return points.to_vec();
    }
    let (lo, hi) = (points[0].0, points[points.len() - 1].0);
    let width = (hi - lo).max(f64::MIN_POSITIVE) / bins as f64;
    let mut out: Vec<(f64, f64)> = Vec::with_capacity(bins);
    let mut current = usize::MAX;
    for &(x, y) in points {
        let b = (((x - lo) / width) as usize).min(bins - 1);
        if b != current {
            out.push((x, y));
            current = b;
        } else if let Some(last) = out.last_mut() {
            if y > last.1 {
                *last = (x, y);
            }
        }
    }
    out
}

fn range(lines: &[Line]) -> Option<((f64, f64), f64)> {
    let mut it = lines.iter().flat_map(|l| l.points.iter());
    let first = it.next()?;
    let (mut x0, mut x1, mut y1) = (first.0, first.0, first.1);
    for &(x, y) in lines.iter().flat_map(|l| l.points.iter()) {
        x0 = x0.min(x);
        x1 = x1.max(x);
        y1 = y1.max(y);
    }
    if x1 <= x0 {
        x1 = x0 + 1.0;
    }
    Some(((x0, x1), if y1 > 0.0 { y1 * 1.12 } else { 1.0 }))
}

fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("plot could not be drawn: {e:?}")
}

/// Draws `lines` against retention time (minutes): a line per series with markers on a few
/// of its points, its label at its highest point, a legend, and `marks` along the top.
pub fn lines_plot(
    title: &str,
    y_label: &str,
    lines: &[Line],
    marks: &[Mark],
    size: (u32, u32),
) -> Result<String, String> {
    let mut svg = String::new();
    let mut extra = String::new();
    let Some(((x0, x1), y1)) = range(lines) else { return Err("nothing to plot".into()) };
    {
        let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let mut chart = ChartBuilder::on(&root)
            .caption(title, ("sans-serif", 14).into_font().color(&INK))
            .margin(8)
            .x_label_area_size(30)
            .y_label_area_size(62)
            .build_cartesian_2d(x0..x1, 0.0..y1)
            .map_err(err)?;
        chart
            .configure_mesh()
            .disable_mesh()
            .x_desc("retention time (min)")
            .y_desc(y_label)
            .y_label_formatter(&|v| super::page::number(*v))
            .x_labels(8)
            .y_labels(5)
            .label_style(("sans-serif", 11))
            .draw()
            .map_err(err)?;
        for (i, l) in lines.iter().enumerate() {
            let c = colour(i);
            let series = chart
                .draw_series(LineSeries::new(l.points.iter().copied(), c.stroke_width(2)))
                .map_err(err)?;
            series.label(l.label.clone()).legend(move |(x, y)| marker(i, (x + 10, y), c));
            if let Some(top) = l.points.iter().copied().max_by(|a, b| a.1.total_cmp(&b.1)) {
                chart
                    .draw_series(std::iter::once(
                        EmptyElement::at(top)
                            + Text::new(
                                l.label.clone(),
                                (6, -14 - 12 * i as i32),
                                ("sans-serif", 11).into_font().color(&c),
                            ),
                    ))
                    .map_err(err)?;
            }
            if lines.len() == 1 {
                continue;
            }
            // Markers on about ten points, so the line is told apart without its colour.
            let step = (l.points.len() / 10).max(1);
            let offset = i * step / lines.len().max(1);
            let pts: Vec<(f64, f64)> =
                l.points.iter().skip(offset).step_by(step).copied().collect();
            chart
                .draw_series(pts.into_iter().map(|p| EmptyElement::at(p) + marker(i, (0, 0), c)))
                .map_err(err)?;
        }
        // Marks as two SVG paths and a few labels (a chromatogram may carry hundreds of
        // compounds; one element each would weigh down the page).
        let mut ticks = String::new();
        let mut triangles = String::new();
        let mut labels = String::new();
        let mut last_label: Option<i32> = None;
        for m in marks.iter().filter(|m| m.rt >= x0 && m.rt <= x1) {
            let (px, py) = chart.backend_coord(&(m.rt, y1));
            if m.strong {
                let _ = write!(triangles, "M{px},{}l-4,7h8z", py + 1);
                if last_label.is_none_or(|l| (px - l).abs() >= 14) {
                    let _ = write!(
                        labels,
                        "<text x=\"{px}\" y=\"{}\">{}</text>",
                        py + 18,
                        escape(&m.label)
                    );
                    last_label = Some(px);
                }
            } else {
                let _ = write!(ticks, "M{px},{py}v6");
            }
        }
        if !marks.is_empty() {
            extra = format!(
                "<path d=\"{ticks}\" stroke=\"#000\" fill=\"none\"/><path d=\"{triangles}\" fill=\"#000\"/>\
<g font-family=\"sans-serif\" font-size=\"9\" text-anchor=\"middle\">{labels}</g>"
            );
        }
        if lines.len() > 1 {
            chart
                .configure_series_labels()
                .position(SeriesLabelPosition::UpperRight)
                .background_style(WHITE.mix(0.85))
                .border_style(INK)
                .label_font(("sans-serif", 11))
                .draw()
                .map_err(err)?;
        }
        root.present().map_err(err)?;
    }
    if let Some(end) = svg.rfind("</svg>") {
        svg.insert_str(end, &extra);
    }
    Ok(svg)
}

/// The marker shape of line `i`: circle, triangle, cross, square, then again.
fn marker<DB: DrawingBackend>(
    i: usize,
    at: (i32, i32),
    c: RGBColor,
) -> DynElement<'static, DB, (i32, i32)> {
    match i % 4 {
        0 => Circle::new(at, 3, c.filled()).into_dyn(),
        1 => TriangleMarker::new(at, 4, c.filled()).into_dyn(),
        2 => Cross::new(at, 3, c.stroke_width(2)).into_dyn(),
        _ => Rectangle::new([(at.0 - 3, at.1 - 3), (at.0 + 3, at.1 + 3)], c.filled()).into_dyn(),
    }
}

/// One shell of an isotope cluster: observed and expected, both relative to the most intense
/// shell.
#[derive(Debug, Clone)]
pub struct Bar {
    /// Shell label (`M`, `M+2`, ...).
    pub label: String,
    /// Observed relative intensity.
    pub observed: f64,
    /// Expected relative intensity.
    pub expected: f64,
}

/// The observed cluster as filled bars beside the expected cluster as outlined bars.
pub fn cluster_plot(title: &str, bars: &[Bar], size: (u32, u32)) -> Result<String, String> {
    if bars.is_empty() {
        return Err("nothing to plot".into());
    }
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let top = bars.iter().map(|b| b.observed.max(b.expected)).fold(1.0f64, f64::max) * 1.15;
        let n = bars.len();
        let mut chart = ChartBuilder::on(&root)
            .caption(title, ("sans-serif", 14).into_font().color(&INK))
            .margin(8)
            .x_label_area_size(26)
            .y_label_area_size(40)
            .build_cartesian_2d(0.0..n as f64, 0.0..top)
            .map_err(err)?;
        let labels: Vec<String> = bars.iter().map(|b| b.label.clone()).collect();
        chart
            .configure_mesh()
            .disable_mesh()
            .x_labels(0)
            .y_desc("relative")
            .y_labels(5)
            .label_style(("sans-serif", 11))
            .draw()
            .map_err(err)?;
        let (obs, exp) = (colour(0), colour(1));
        chart
            .draw_series(bars.iter().enumerate().map(|(i, b)| {
                Rectangle::new(
                    [(i as f64 + 0.12, 0.0), (i as f64 + 0.48, b.observed)],
                    obs.filled(),
                )
            }))
            .map_err(err)?
            .label("observed (filled)")
            .legend(move |(x, y)| Rectangle::new([(x, y - 5), (x + 10, y + 5)], obs.filled()));
        chart
            .draw_series(bars.iter().enumerate().map(|(i, b)| {
                Rectangle::new(
                    [(i as f64 + 0.52, 0.0), (i as f64 + 0.88, b.expected)],
                    exp.stroke_width(2),
                )
            }))
            .map_err(err)?
            .label("expected (outline)")
            .legend(move |(x, y)| {
                Rectangle::new([(x, y - 5), (x + 10, y + 5)], exp.stroke_width(2))
            });
        chart
            .draw_series(labels.iter().enumerate().map(|(i, l)| {
                Text::new(
                    l.clone(),
                    (i as f64 + 0.38, 0.0),
                    ("sans-serif", 11).into_font().color(&INK),
                )
            }))
            .map_err(err)?;
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::UpperRight)
            .background_style(WHITE.mix(0.85))
            .border_style(INK)
            .label_font(("sans-serif", 11))
            .draw()
            .map_err(err)?;
        root.present().map_err(err)?;
    }
    Ok(svg)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thinning_keeps_the_peak() {
        let pts: Vec<(f64, f64)> =
            (0..1000).map(|i| (i as f64 / 100.0, if i == 537 { 50.0 } else { 1.0 })).collect();
        let t = thin(&pts, 100);
        assert!(t.len() <= 100);
        assert!(t.contains(&(5.37, 50.0)));
    }

    #[test]
    fn plots_are_svg_with_their_labels() {
        let l = Line { label: "M+2".into(), points: vec![(1.0, 0.0), (1.1, 5.0), (1.2, 1.0)] };
        let svg = lines_plot("traces", "intensity", &[l], &[], (400, 200)).unwrap();
        assert!(svg.starts_with("<svg") && svg.contains("M+2"));
        let b = [Bar { label: "M".into(), observed: 1.0, expected: 1.0 }];
        assert!(cluster_plot("c", &b, (300, 200)).unwrap().contains("expected (outline)"));
        assert!(lines_plot("t", "y", &[], &[], (100, 100)).is_err());
    }
}
