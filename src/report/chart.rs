//! A line chart of cumulative tonnes by reporting period, written as SVG by hand: the output
//! is plain text a browser opens, byte-for-byte the same for the same input, so it can be
//! kept beside a report and compared.

use super::render::grouped;
use crate::quantity::Mass;
use std::fmt::{self, Write};

/// The line colours, in series order; each also gets its own dash pattern so that lines stay
/// apart in grey print and for readers who do not tell the colours apart.
const COLOURS: [&str; 6] = [
    "#1f5f8b", "#c2571a", "#3c8d40", "#7b4fa0", "#a8862b", "#b03a5b",
];
const DASHES: [&str; 3] = ["none", "8 4", "2 3"];
const CAPACITY_COLOUR: &str = "#8c1c13";
const CAPACITY_DASH: &str = "10 4 2 4";

const HEIGHT: f64 = 460.0;
const TOP: f64 = 56.0;
const BOTTOM: f64 = 380.0;
const PLOT_WIDTH: f64 = 560.0;
/// A rough width of one character of the 12 px font, for sizing margins to the labels.
const CHAR_WIDTH: f64 = 7.0;
const Y_TITLE: &str = "Cumulative CO2 (t)";
const X_TITLE: &str = "Reporting period";
const CAPACITY_NAME: &str = "Permitted capacity";

/// Why a chart was refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ChartError {
    /// A series with more points than there are periods to place them on.
    SeriesLength {
        series: String,
        points: usize,
        periods: usize,
    },
}

impl fmt::Display for ChartError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::SeriesLength {
                series,
                points,
                periods,
            } => write!(
                f,
                "series {series:?} has {points} points for {periods} periods"
            ),
        }
    }
}

/// What to draw. A series may be shorter than `periods` (a figure not yet worked out for the
/// latest periods); its points fall on the first periods.
#[derive(Debug, Clone, PartialEq)]
pub struct LineChart {
    pub title: String,
    pub periods: Vec<String>,
    pub series: Vec<(String, Vec<Mass>)>,
    /// Drawn as a horizontal line when given.
    pub capacity: Option<Mass>,
}

impl LineChart {
    /// The chart as an SVG document.
    pub fn to_svg(&self) -> Result<String, ChartError> {
        for (name, values) in &self.series {
            if values.len() > self.periods.len() {
                return Err(ChartError::SeriesLength {
                    series: name.clone(),
                    points: values.len(),
                    periods: self.periods.len(),
                });
            }
        }
        let mut out = String::new();
        self.write_svg(&mut out)
            .expect("writing to a String cannot fail");
        Ok(out)
    }

    fn write_svg(&self, out: &mut String) -> fmt::Result {
        let axis = YAxis::new(self.values().chain(self.capacity.map(Mass::tonnes)));
        let labels: Vec<String> = axis.ticks().map(|v| grouped(v, axis.decimals)).collect();
        let left = 48.0 + CHAR_WIDTH * longest(labels.iter().map(String::as_str)) as f64;
        let frame = Frame {
            left,
            right: left + PLOT_WIDTH,
            periods: self.periods.len(),
            axis,
        };
        let legend_names = self.series.iter().map(|(n, _)| n.as_str());
        let width =
            frame.right + 72.0 + CHAR_WIDTH * longest(legend_names.chain([CAPACITY_NAME])) as f64;
        let centre = (frame.left + frame.right) / 2.0;

        writeln!(
            out,
            r##"<svg xmlns="http://www.w3.org/2000/svg" width="{w:.0}" height="{HEIGHT:.0}" viewBox="0 0 {w:.0} {HEIGHT:.0}" font-family="Helvetica, Arial, sans-serif" font-size="12" fill="#222222">"##,
            w = width.ceil()
        )?;
        let title = escape(&self.title);
        writeln!(out, "<title>{title}</title>")?;
        writeln!(
            out,
            r##"<rect width="100%" height="100%" fill="#ffffff"/>"##
        )?;
        writeln!(
            out,
            r#"<text class="title" x="{centre:.1}" y="28" text-anchor="middle" font-size="16" font-weight="bold">{title}</text>"#
        )?;
        frame.write_y_ticks(out, &labels)?;
        self.write_x_ticks(out, &frame)?;
        let (l, r) = (frame.left, frame.right);
        writeln!(
            out,
            r##"<path class="axes" d="M{l:.1},{TOP:.1} V{BOTTOM:.1} H{r:.1}" fill="none" stroke="#444444"/>"##
        )?;
        writeln!(
            out,
            r#"<text class="axis-title" x="{centre:.1}" y="{:.1}" text-anchor="middle">{X_TITLE}</text>"#,
            BOTTOM + 48.0
        )?;
        let mid = (TOP + BOTTOM) / 2.0;
        writeln!(
            out,
            r#"<text class="axis-title" x="18" y="{mid:.1}" text-anchor="middle" transform="rotate(-90 18 {mid:.1})">{Y_TITLE}</text>"#
        )?;
        if let Some(c) = self.capacity {
            let cy = frame.y(c.tonnes());
            writeln!(
                out,
                r#"<line class="capacity" x1="{l:.1}" y1="{cy:.1}" x2="{r:.1}" y2="{cy:.1}" stroke="{CAPACITY_COLOUR}" stroke-width="1.5" stroke-dasharray="{CAPACITY_DASH}"/>"#
            )?;
            writeln!(
                out,
                r#"<text class="capacity-label" x="{:.1}" y="{:.1}" text-anchor="end" fill="{CAPACITY_COLOUR}">{CAPACITY_NAME} {} t</text>"#,
                r - 4.0,
                cy - 6.0,
                grouped(c.tonnes(), 0)
            )?;
        }
        self.write_series(out, &frame)?;
        self.write_legend(out, frame.right + 24.0)?;
        writeln!(out, "</svg>")
    }

    /// Period labels under the plot, every k-th one, k chosen so that they do not overlap.
    fn write_x_ticks(&self, out: &mut String, frame: &Frame) -> fmt::Result {
        writeln!(out, r#"<g class="x-ticks">"#)?;
        let widest = longest(self.periods.iter().map(String::as_str)) as f64;
        let fit = (PLOT_WIDTH / (CHAR_WIDTH * widest + 12.0)).floor().max(1.0) as usize;
        let every = self.periods.len().div_ceil(fit).max(1);
        for (i, p) in self.periods.iter().enumerate().step_by(every) {
            writeln!(
                out,
                r#"<text x="{:.1}" y="{:.1}" text-anchor="middle">{}</text>"#,
                frame.x(i),
                BOTTOM + 20.0,
                escape(p)
            )?;
        }
        writeln!(out, "</g>")
    }

    /// One group per series: its polyline, and a marker on every point so that a one-point
    /// series still shows.
    fn write_series(&self, out: &mut String, frame: &Frame) -> fmt::Result {
        for (i, (name, values)) in self.series.iter().enumerate() {
            let (colour, dash) = style(i);
            let points: Vec<(f64, f64)> = values
                .iter()
                .enumerate()
                .map(|(j, m)| (frame.x(j), frame.y(m.tonnes())))
                .collect();
            let line: Vec<String> = points
                .iter()
                .map(|(px, py)| format!("{px:.1},{py:.1}"))
                .collect();
            writeln!(out, r#"<g class="series">"#)?;
            writeln!(out, "<title>{}</title>", escape(name))?;
            writeln!(
                out,
                r#"<polyline points="{}" fill="none" stroke="{colour}" stroke-width="2" stroke-dasharray="{dash}"/>"#,
                line.join(" ")
            )?;
            for (px, py) in &points {
                writeln!(
                    out,
                    r#"<circle cx="{px:.1}" cy="{py:.1}" r="3" fill="{colour}"/>"#
                )?;
            }
            writeln!(out, "</g>")?;
        }
        Ok(())
    }

    /// A sample of each line with its name, the capacity line last.
    fn write_legend(&self, out: &mut String, x: f64) -> fmt::Result {
        writeln!(out, r#"<g class="legend">"#)?;
        let entries = self
            .series
            .iter()
            .enumerate()
            .map(|(i, (name, _))| (name.as_str(), style(i)))
            .chain(
                self.capacity
                    .map(|_| (CAPACITY_NAME, (CAPACITY_COLOUR, CAPACITY_DASH))),
            );
        for (k, (name, (colour, dash))) in entries.enumerate() {
            let ly = TOP + 8.0 + 22.0 * k as f64;
            writeln!(
                out,
                r#"<line x1="{x:.1}" y1="{ly:.1}" x2="{:.1}" y2="{ly:.1}" stroke="{colour}" stroke-width="2" stroke-dasharray="{dash}"/>"#,
                x + 28.0
            )?;
            writeln!(
                out,
                r#"<text x="{:.1}" y="{:.1}">{}</text>"#,
                x + 36.0,
                ly + 4.0,
                escape(name)
            )?;
        }
        writeln!(out, "</g>")
    }

    fn values(&self) -> impl Iterator<Item = f64> + '_ {
        self.series
            .iter()
            .flat_map(|(_, v)| v.iter().map(|m| m.tonnes()))
    }
}

/// Where the plot sits and how values map onto it.
struct Frame {
    left: f64,
    right: f64,
    periods: usize,
    axis: YAxis,
}

impl Frame {
    /// The centre of period `i`'s slot, so a single period sits mid-plot. Only called for
    /// `i < periods`, so `periods` is not zero here.
    fn x(&self, i: usize) -> f64 {
        self.left + (self.right - self.left) * (i as f64 + 0.5) / self.periods as f64
    }

    /// The axis always spans a positive range (`YAxis::new`), so this never divides by zero.
    fn y(&self, v: f64) -> f64 {
        let a = &self.axis;
        BOTTOM - (v - a.lo) / (a.hi - a.lo) * (BOTTOM - TOP)
    }

    /// Grid lines with their value labels.
    fn write_y_ticks(&self, out: &mut String, labels: &[String]) -> fmt::Result {
        let (l, r) = (self.left, self.right);
        writeln!(out, r#"<g class="y-ticks">"#)?;
        for (v, label) in self.axis.ticks().zip(labels) {
            let ty = self.y(v);
            writeln!(
                out,
                r##"<line x1="{l:.1}" y1="{ty:.1}" x2="{r:.1}" y2="{ty:.1}" stroke="#dddddd"/>"##
            )?;
            writeln!(
                out,
                r#"<text x="{:.1}" y="{:.1}" text-anchor="end">{label}</text>"#,
                l - 8.0,
                ty + 4.0
            )?;
        }
        writeln!(out, "</g>")
    }
}

fn style(i: usize) -> (&'static str, &'static str) {
    (COLOURS[i % COLOURS.len()], DASHES[i % DASHES.len()])
}

fn longest<'a>(texts: impl Iterator<Item = &'a str>) -> usize {
    texts.map(|t| t.chars().count()).max().unwrap_or(0)
}

/// A y axis from zero (or the lowest value, if below) to the highest, in round steps of 1, 2
/// or 5 times a power of ten, so tick labels read as people would write them.
#[derive(Debug, Clone, Copy, PartialEq)]
struct YAxis {
    lo: f64,
    hi: f64,
    /// The lowest tick as a whole number of steps, so ticks are exact multiples of the step.
    first: i64,
    steps: i64,
    step: f64,
    decimals: usize,
}

impl YAxis {
    /// About five intervals over the values; an empty or flat chart gets 0 to 1 t.
    fn new(values: impl Iterator<Item = f64>) -> Self {
        let (mut min, mut max) =
            values.fold((0.0f64, 0.0f64), |(lo, hi), v| (lo.min(v), hi.max(v)));
        if max - min <= 0.0 {
            (min, max) = (min, min + 1.0);
        }
        let raw = (max - min) / 5.0;
        let exp = raw.log10().floor() as i32;
        let f = raw / 10f64.powi(exp);
        let (nice, exp) = match f {
            f if f <= 1.0 => (1.0, exp),
            f if f <= 2.0 => (2.0, exp),
            f if f <= 5.0 => (5.0, exp),
            _ => (1.0, exp + 1),
        };
        let step = nice * 10f64.powi(exp);
        let first = (min / step).floor() as i64;
        let last = ((max / step).ceil() as i64).max(first + 1);
        Self {
            lo: first as f64 * step,
            hi: last as f64 * step,
            first,
            steps: last - first,
            step,
            decimals: usize::try_from(-exp).unwrap_or(0),
        }
    }

    fn ticks(&self) -> impl Iterator<Item = f64> + '_ {
        (0..=self.steps).map(|i| (self.first + i) as f64 * self.step)
    }
}

/// Escapes text for XML content and attributes; characters XML 1.0 cannot hold at all become
/// U+FFFD, so no name can break the document.
pub(super) fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            '\t' | '\n' | '\r' => out.push(c),
            c if c < ' ' || matches!(c, '\u{FFFE}' | '\u{FFFF}') => out.push('\u{FFFD}'),
            c => out.push(c),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(tonnes: i64) -> Mass {
        Mass::from_grams(tonnes * 1_000_000)
    }

    fn chart() -> LineChart {
        LineChart {
            title: "Cumulative storage, project TFS".into(),
            periods: ["2026-Q1", "2026-Q2", "2026-Q3", "2026-Q4"]
                .map(String::from)
                .to_vec(),
            series: vec![
                (
                    "stored".into(),
                    vec![t(210_000), t(430_000), t(655_000), t(870_000)],
                ),
                (
                    "conservative".into(),
                    vec![t(205_000), t(420_000), t(640_000), t(850_000)],
                ),
                ("durable".into(), vec![t(203_000), t(416_000), t(634_000)]),
            ],
            capacity: Some(t(2_500_000)),
        }
    }

    fn texts(doc: &roxmltree::Document, class: &str) -> Vec<String> {
        doc.descendants()
            .filter(|n| n.attribute("class") == Some(class))
            .flat_map(|g| g.descendants().filter(|n| n.has_tag_name("text")))
            .map(|n| n.text().unwrap_or_default().to_string())
            .collect()
    }

    #[test]
    fn parses_with_one_line_per_series_and_a_legend() {
        let svg = chart().to_svg().unwrap();
        let doc = roxmltree::Document::parse(&svg).unwrap();
        let root = doc.root_element();
        assert_eq!(root.tag_name().name(), "svg");
        for a in ["width", "height", "viewBox", "font-family"] {
            assert!(root.attribute(a).is_some(), "{a}");
        }
        assert_eq!(
            doc.descendants()
                .filter(|n| n.has_tag_name("polyline"))
                .count(),
            3
        );
        assert_eq!(
            texts(&doc, "legend"),
            ["stored", "conservative", "durable", "Permitted capacity"]
        );
        assert_eq!(
            doc.descendants()
                .filter(|n| n.attribute("class") == Some("capacity"))
                .count(),
            1
        );
        let titles: Vec<&str> = doc
            .descendants()
            .filter(|n| n.attribute("class") == Some("axis-title"))
            .filter_map(|n| n.text())
            .collect();
        assert_eq!(titles, ["Reporting period", "Cumulative CO2 (t)"]);
        assert_eq!(
            texts(&doc, "x-ticks"),
            ["2026-Q1", "2026-Q2", "2026-Q3", "2026-Q4"]
        );
    }

    #[test]
    fn round_ticks_with_thousands_separators() {
        // Up to 2.5 Mt of capacity: steps of 500 000 t.
        let doc_text = chart().to_svg().unwrap();
        let doc = roxmltree::Document::parse(&doc_text).unwrap();
        assert_eq!(
            texts(&doc, "y-ticks"),
            [
                "0",
                "500,000",
                "1,000,000",
                "1,500,000",
                "2,000,000",
                "2,500,000"
            ]
        );
        let axis = |vals: &[f64]| {
            let a = YAxis::new(vals.iter().copied());
            a.ticks()
                .map(|v| grouped(v, a.decimals))
                .collect::<Vec<_>>()
        };
        assert_eq!(axis(&[0.7]), ["0.0", "0.2", "0.4", "0.6", "0.8"]);
        assert_eq!(axis(&[-3.0, 12.0]), ["-5", "0", "5", "10", "15"]);
        assert_eq!(
            axis(&[87_000.0]),
            ["0", "20,000", "40,000", "60,000", "80,000", "100,000"]
        );
    }

    #[test]
    fn no_capacity_line_unless_given() {
        let c = LineChart {
            capacity: None,
            ..chart()
        };
        let svg = c.to_svg().unwrap();
        assert!(!svg.contains("capacity"));
    }

    #[test]
    fn empty_and_single_point_charts_do_not_fail() {
        for c in [
            LineChart {
                title: String::new(),
                periods: vec![],
                series: vec![],
                capacity: None,
            },
            LineChart {
                title: "one".into(),
                periods: vec!["2026".into()],
                series: vec![("stored".into(), vec![]), ("durable".into(), vec![t(5)])],
                capacity: Some(Mass::ZERO),
            },
            LineChart {
                periods: vec!["2026".into()],
                series: vec![("flat".into(), vec![Mass::ZERO])],
                ..chart()
            },
        ] {
            let svg = c.to_svg().unwrap();
            assert!(!svg.contains("NaN") && !svg.contains("inf"), "{svg}");
            let doc = roxmltree::Document::parse(&svg).unwrap();
            let polylines = doc
                .descendants()
                .filter(|n| n.has_tag_name("polyline"))
                .count();
            assert_eq!(polylines, c.series.len());
        }
    }

    #[test]
    fn text_is_escaped() {
        let c = LineChart {
            title: "A & B <\"quoted\"> 'x'".into(),
            series: vec![("<stored> & \"more\"".into(), vec![t(1)])],
            periods: vec!["Q<1>".into()],
            capacity: None,
        };
        let svg = c.to_svg().unwrap();
        let doc = roxmltree::Document::parse(&svg).unwrap();
        assert_eq!(texts(&doc, "title"), ["A & B <\"quoted\"> 'x'"]);
        assert_eq!(texts(&doc, "legend"), ["<stored> & \"more\""]);
        assert_eq!(texts(&doc, "x-ticks"), ["Q<1>"]);
    }

    #[test]
    fn same_input_same_bytes() {
        assert_eq!(chart().to_svg().unwrap(), chart().to_svg().unwrap());
    }

    #[test]
    fn too_many_points_is_refused() {
        let mut c = chart();
        c.series[0].1.push(t(1));
        assert_eq!(
            c.to_svg().unwrap_err().to_string(),
            "series \"stored\" has 5 points for 4 periods"
        );
    }

    #[test]
    fn many_periods_thin_the_labels() {
        let periods: Vec<String> = (0..120)
            .map(|i| format!("{}-{:02}", 2020 + i / 12, i % 12 + 1))
            .collect();
        let c = LineChart { periods, ..chart() };
        let doc_text = c.to_svg().unwrap();
        let doc = roxmltree::Document::parse(&doc_text).unwrap();
        let labels = texts(&doc, "x-ticks");
        assert!(labels.len() < 120 && labels.len() > 5, "{}", labels.len());
        assert_eq!(labels[0], "2020-01");
    }

    proptest::proptest! {
        #[test]
        fn any_input_gives_a_document(
            title in "\\PC{0,12}",
            names in proptest::collection::vec("\\PC{0,8}", 0..5),
            grams in proptest::collection::vec(i64::MIN / 2..i64::MAX / 2, 0..6),
            capacity in proptest::option::of(0i64..i64::MAX / 2),
        ) {
            let periods: Vec<String> = (0..grams.len()).map(|i| format!("P{i}")).collect();
            let series = names
                .into_iter()
                .enumerate()
                .map(|(k, n)| (n, grams.iter().skip(k % 2).map(|&g| Mass::from_grams(g)).collect()))
                .collect();
            let c = LineChart {
                title,
                periods,
                series,
                capacity: capacity.map(Mass::from_grams),
            };
            let svg = c.to_svg().unwrap();
            proptest::prop_assert!(!svg.contains("NaN"));
            let doc = roxmltree::Document::parse(&svg);
            proptest::prop_assert!(doc.is_ok(), "{:?}", doc.err());
        }
    }
}
