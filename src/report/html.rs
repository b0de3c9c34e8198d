//! A report as one self-contained HTML page for reading on screen and printing: the same
//! `Table` values the commands print, with their notes, in titled sections, CSS inline, charts
//! as inline SVG, no script and nothing fetched from elsewhere.

use super::chart::escape;
use super::render::{CAUTIONS, human_cell};
use super::table::{Cell, Table};
use std::fmt::Write;

/// A printable page: a title, facts about what it covers, then numbered sections.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Page {
    pub title: String,
    /// Label and value pairs shown under the title (project, permit, ledger head…).
    pub facts: Vec<(String, String)>,
    pub sections: Vec<Section>,
}

/// One part of the page: paragraphs, tables, then an optional chart.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Section {
    /// The fragment id (`#balance`), stable for links and tests.
    pub id: &'static str,
    pub heading: String,
    pub text: Vec<String>,
    /// An SVG document drawn inline (from `report::chart`).
    pub figure: Option<String>,
    pub tables: Vec<Table>,
}

impl Section {
    pub fn new(id: &'static str, heading: impl Into<String>) -> Section {
        Section {
            id,
            heading: heading.into(),
            ..Section::default()
        }
    }

    pub fn text(mut self, t: impl Into<String>) -> Self {
        self.text.push(t.into());
        self
    }

    pub fn table(mut self, t: Table) -> Self {
        self.tables.push(t);
        self
    }
}

/// Print-first styling: A4 landscape so the widest balance fits, rules instead of boxes,
/// tabular figures, tables kept whole across pages where they fit.
const STYLE: &str = r#"
@page { size: A4 landscape; margin: 14mm 12mm 16mm 12mm; }
* { box-sizing: border-box; }
html { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
body { margin: 0 auto; max-width: 1180px; padding: 28px 32px 40px; color: #1d2733; background: #ffffff;
  font: 10.5pt/1.45 "Liberation Sans", "Helvetica Neue", Helvetica, Arial, "DejaVu Sans", sans-serif; }
header.cover { border-bottom: 3px solid #1f4e6e; padding-bottom: 14px; margin-bottom: 18px; }
header.cover .kicker { margin: 0; color: #1f4e6e; font-size: 9pt; font-weight: bold; letter-spacing: .14em; text-transform: uppercase; }
header.cover h1 { margin: 4px 0 12px; font-size: 21pt; line-height: 1.2; font-weight: 600; }
dl.facts { display: grid; grid-template-columns: max-content 1fr max-content 1fr; gap: 3px 18px; margin: 0; font-size: 9.5pt; }
dl.facts dt { color: #5b6775; }
dl.facts dd { margin: 0; font-variant-numeric: tabular-nums; overflow-wrap: anywhere; }
nav.contents { font-size: 9pt; color: #5b6775; margin: 0 0 10px; }
nav.contents ol { margin: 4px 0 0; padding: 0; list-style: none; columns: 3; }
nav.contents a { color: #1f4e6e; text-decoration: none; }
section { margin: 22px 0 0; }
h2 { font-size: 13pt; color: #1f4e6e; margin: 0 0 6px; padding-bottom: 3px; border-bottom: 1px solid #c9d3dd; break-after: avoid; }
section > p { margin: 4px 0 8px; max-width: 60em; }
figure { margin: 8px 0 10px; break-inside: avoid; }
figure svg { max-width: 100%; height: auto; }
figure { max-width: 760px; }
table { border-collapse: collapse; width: 100%; margin: 10px 0 4px; font-size: 8.4pt; break-inside: auto; }
caption { caption-side: top; text-align: left; font-weight: bold; font-size: 9.5pt; padding: 0 0 4px; color: #1d2733; }
thead { display: table-header-group; }
th { text-align: left; vertical-align: bottom; font-weight: 600; color: #ffffff; background: #1f4e6e; padding: 4px 6px; border-right: 1px solid #3d6987; }
table.wide { font-size: 7.6pt; }
table.wide th, table.wide td { padding: 3px 4px; }
td { white-space: nowrap; }
td.prose { white-space: normal; min-width: 14em; }
td { padding: 3px 6px; border-bottom: 1px solid #dde3e9; vertical-align: top; }
tr { break-inside: avoid; }
tbody tr:nth-child(even) td { background: #f3f6f9; }
tr.total td { font-weight: bold; border-top: 1.5px solid #1d2733; background: #e8eef3; }
.num { text-align: right; font-variant-numeric: tabular-nums; }
th.num { text-align: right; }
ul.notes { margin: 2px 0 8px; padding-left: 16px; font-size: 8.4pt; color: #46525f; }
code, .hash { font-family: "Liberation Mono", "DejaVu Sans Mono", monospace; font-size: 8.4pt; overflow-wrap: anywhere; }
footer.cautions { margin-top: 26px; padding: 10px 12px; border: 1px solid #b8860b; background: #fdf8ea; font-size: 9pt; break-inside: avoid; }
footer.cautions strong { color: #7a5a00; }
@media print { body { padding: 0; max-width: none; } nav.contents { display: none; } }
"#;

/// The page as an HTML document (well-formed XML too, so any XML reader can check it).
pub fn page(p: &Page) -> String {
    let mut out = String::new();
    write_page(&mut out, p).expect("writing to a String cannot fail");
    out
}

fn write_page(out: &mut String, p: &Page) -> std::fmt::Result {
    let title = escape(&p.title);
    writeln!(out, "<!DOCTYPE html>")?;
    writeln!(
        out,
        r#"<html xmlns="http://www.w3.org/1999/xhtml" lang="en">"#
    )?;
    writeln!(
        out,
        r#"<head><meta charset="utf-8"/><title>{title}</title><style>{STYLE}</style></head>"#
    )?;
    writeln!(out, "<body>")?;
    writeln!(
        out,
        r#"<header class="cover"><p class="kicker">sinkbook ledger report</p><h1>{title}</h1>"#
    )?;
    if !p.facts.is_empty() {
        writeln!(out, r#"<dl class="facts">"#)?;
        for (label, value) in &p.facts {
            let hash = value.len() == 64 && value.bytes().all(|b| b.is_ascii_hexdigit());
            let class = if hash { r#" class="hash""# } else { "" };
            writeln!(
                out,
                "<dt>{}</dt><dd{class}>{}</dd>",
                escape(label),
                escape(value)
            )?;
        }
        writeln!(out, "</dl>")?;
    }
    writeln!(out, "</header>")?;
    writeln!(out, r#"<nav class="contents">Contents<ol>"#)?;
    for (n, s) in p.sections.iter().enumerate() {
        writeln!(
            out,
            r##"<li><a href="#{}">{}. {}</a></li>"##,
            s.id,
            n + 1,
            escape(&s.heading)
        )?;
    }
    writeln!(out, "</ol></nav>")?;
    for (n, s) in p.sections.iter().enumerate() {
        write_section(out, n + 1, s)?;
    }
    writeln!(
        out,
        r#"<footer class="cautions"><p><strong>Cautions.</strong> {}</p></footer>"#,
        escape(CAUTIONS)
    )?;
    writeln!(out, "</body>\n</html>")
}

fn write_section(out: &mut String, n: usize, s: &Section) -> std::fmt::Result {
    writeln!(out, r#"<section id="{}">"#, s.id)?;
    writeln!(out, "<h2>{n}. {}</h2>", escape(&s.heading))?;
    for t in &s.text {
        writeln!(out, "<p>{}</p>", escape(t))?;
    }
    for t in &s.tables {
        write_table(out, t)?;
    }
    if let Some(svg) = &s.figure {
        writeln!(out, "<figure>{}</figure>", svg.trim_end())?;
    }
    writeln!(out, "</section>")
}

/// A table as people see it in the terminal: the people's columns, numbers right-aligned,
/// a total row set apart, notes beneath.
fn write_table(out: &mut String, t: &Table) -> std::fmt::Result {
    let shown: Vec<usize> = (0..t.columns.len())
        .filter(|&i| t.columns[i].people)
        .collect();
    let numeric: Vec<bool> = shown
        .iter()
        .map(|&i| t.rows.iter().any(|r| r[i].is_numeric()))
        .collect();
    let class = |n: bool| if n { r#" class="num""# } else { "" };
    // Wide tables (the RR balance has fifteen columns) get a smaller face to fit a page.
    let wide = if shown.len() > 10 {
        r#" class="wide""#
    } else {
        ""
    };
    writeln!(out, r#"<table id="table-{}"{wide}>"#, t.id)?;
    writeln!(out, "<caption>{}</caption>", escape(&t.title))?;
    write!(out, "<thead><tr>")?;
    for (&i, &n) in shown.iter().zip(&numeric) {
        write!(
            out,
            r#"<th scope="col"{}>{}</th>"#,
            class(n),
            escape(t.columns[i].label)
        )?;
    }
    writeln!(out, "</tr></thead>")?;
    writeln!(out, "<tbody>")?;
    for row in &t.rows {
        let total = matches!(row.first(), Some(Cell::Text(s)) if s == "total");
        write!(
            out,
            "{}",
            if total {
                r#"<tr class="total">"#
            } else {
                "<tr>"
            }
        )?;
        for (&i, &n) in shown.iter().zip(&numeric) {
            let text = human_cell(&row[i]);
            // Short text stays on one line (a date range, "RR-12"); sentences wrap.
            let class = if n {
                class(true)
            } else if text.chars().count() > 28 {
                r#" class="prose""#
            } else {
                ""
            };
            write!(out, "<td{class}>{}</td>", escape(&text))?;
        }
        writeln!(out, "</tr>")?;
    }
    if t.rows.is_empty() {
        writeln!(
            out,
            r#"<tr><td colspan="{}">No rows.</td></tr>"#,
            shown.len().max(1)
        )?;
    }
    writeln!(out, "</tbody></table>")?;
    if !t.notes.is_empty() {
        writeln!(out, r#"<ul class="notes">"#)?;
        for note in &t.notes {
            writeln!(out, "<li>{}</li>", escape(note))?;
        }
        writeln!(out, "</ul>")?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::Mass;
    use crate::report::{columns, names};

    fn sample() -> Page {
        let mut t = Table::new(
            "balance",
            "Mass <balance> & more",
            columns(&[names::PERIOD, names::STORED_T, names::STORED_G.programs()]),
        );
        t.push(vec![
            Cell::text("2026-Q1"),
            Cell::Tonnes(Mass::from_grams(1_234_567_000)),
            Cell::Int(1_234_567_000),
        ]);
        t.push(vec![
            Cell::text("total"),
            Cell::Tonnes(Mass::from_grams(1_234_567_000)),
            Cell::Int(1_234_567_000),
        ]);
        t.note("a \"quoted\" note");
        Page {
            title: "Annual report 2026, project O'Hare".into(),
            facts: vec![("Permit".into(), "A&B-1".into())],
            sections: vec![Section::new("balance", "Balance").text("x < y").table(t)],
        }
    }

    #[test]
    fn page_is_well_formed_and_escapes_every_text() {
        let html = page(&sample());
        let doc = roxmltree::Document::parse_with_options(
            &html,
            roxmltree::ParsingOptions {
                allow_dtd: true,
                ..Default::default()
            },
        )
        .expect("well-formed");
        let text: String = doc
            .descendants()
            .filter(|n| n.is_text())
            .map(|n| n.text().unwrap())
            .collect();
        for s in [
            "Mass <balance> & more",
            "O'Hare",
            "A&B-1",
            "x < y",
            "a \"quoted\" note",
        ] {
            assert!(text.contains(s), "{s} lost");
        }
        assert!(html.contains("Mass &lt;balance&gt; &amp; more"));
        // Columns for programs only stay out; figures are the people's.
        assert!(html.contains(r#"<td class="num">1,234.567</td>"#));
        assert!(!html.contains("1234567000"));
        assert!(html.contains(r#"<tr class="total">"#));
        assert!(html.contains(&escape(CAUTIONS)));
        assert!(!html.contains("<script"));
    }
}
