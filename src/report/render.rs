//! Rendering reports: tables for people (people.rs), JSON and CSV for programs.

use super::layout::Layout;
use super::people;
use super::table::{Cell, Column, Report, Table};
use serde_json::{Map, Value};

/// Ends every human report that states figures (DESIGN.md).
pub const CAUTIONS: &str = "Accounting only: these figures are as good as the measurements and the approved monitoring plan behind them. Storage integrity, well safety and what counts toward any permit or credit are for licensed engineers and geoscientists, the local regulator and the applicable rules to decide.";

/// The output formats of `--format`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    Table,
    Json,
    Csv,
}

/// A report at full width, unstyled: what a pipe or a file gets.
pub fn render(report: &Report, format: Format) -> String {
    render_with(report, format, Layout::FULL)
}

/// A report for the given layout (it shapes people's tables only; JSON and CSV ignore it).
pub fn render_with(report: &Report, format: Format, layout: Layout) -> String {
    if let Some(text) = &report.text {
        return text.clone();
    }
    match format {
        Format::Table => people::report(report, layout),
        Format::Json => json(report),
        Format::Csv => csv(report),
    }
}

/// Groups digits in threes: 1234567 → "1,234,567".
fn thousands(int: &str) -> String {
    let (sign, digits) = int.strip_prefix('-').map_or(("", int), |d| ("-", d));
    let mut out = String::new();
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    format!("{sign}{out}")
}

/// A number with fixed decimals and thousands separators.
pub fn grouped(x: f64, decimals: usize) -> String {
    let s = format!("{x:.decimals$}");
    // A value that rounds to zero is shown as zero, never "-0.000".
    let s = match s.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| c == '0' || c == '.') => rest.to_string(),
        _ => s,
    };
    match s.split_once('.') {
        Some((i, f)) => format!("{}.{f}", thousands(i)),
        None => thousands(&s),
    }
}

/// Tonnes to the kilogram, from exact grams (rounded half to even at the kilogram).
pub fn tonnes_text(m: crate::quantity::Mass) -> String {
    let kg = (m.grams() as f64 / 1000.0).round_ties_even() as i64;
    let sign = if kg < 0 { "-" } else { "" };
    let a = kg.unsigned_abs();
    format!(
        "{sign}{}.{:03}",
        thousands(&(a / 1000).to_string()),
        a % 1000
    )
}

pub(super) fn human_cell(c: &Cell) -> String {
    match c {
        Cell::Text(s) => s.clone(),
        Cell::Int(i) => thousands(&i.to_string()),
        Cell::Tonnes(m) => tonnes_text(*m),
        Cell::Percent(p) => format!("{} %", grouped(*p, 2)),
        Cell::Number(x, d) => grouped(*x, *d),
        Cell::Pairs(p) => pairs_text(p),
        Cell::Empty => String::new(),
    }
}

fn pairs_text(p: &[(String, String)]) -> String {
    p.iter()
        .map(|(n, v)| format!("{n}={v}"))
        .collect::<Vec<_>>()
        .join("; ")
}

fn json_cell(c: &Cell) -> Value {
    match c {
        Cell::Text(s) => Value::String(s.clone()),
        Cell::Int(i) => Value::from(*i),
        Cell::Tonnes(m) => Value::from(m.tonnes()),
        Cell::Percent(p) | Cell::Number(p, _) => Value::from(*p),
        Cell::Pairs(p) => Value::Array(
            p.iter()
                .map(|(n, v)| Value::Array(vec![Value::from(n.as_str()), Value::from(v.as_str())]))
                .collect(),
        ),
        Cell::Empty => Value::Null,
    }
}

/// One row as a JSON object, keys in column order.
pub(super) fn json_row(columns: &[Column], row: &[Cell]) -> Value {
    let obj: Map<String, Value> = columns
        .iter()
        .zip(row)
        .map(|(c, v)| (c.key.to_string(), json_cell(v)))
        .collect();
    Value::Object(obj)
}

fn json_rows(t: &Table) -> Value {
    Value::Array(t.rows.iter().map(|row| json_row(&t.columns, row)).collect())
}

/// One table: an array of row objects; several: an object of table id → rows; several that
/// share an id (the demo's balance of each project): an array of {table, title, rows}, so
/// none is lost.
fn json(r: &Report) -> String {
    let ids: std::collections::HashSet<&str> = r.tables.iter().map(|t| t.id).collect();
    let v = match r.tables.as_slice() {
        [one] => json_rows(one),
        many if ids.len() == many.len() => Value::Object(
            many.iter()
                .map(|t| (t.id.to_string(), json_rows(t)))
                .collect(),
        ),
        many => Value::Array(
            many.iter()
                .map(|t| serde_json::json!({"table": t.id, "title": t.title, "rows": json_rows(t)}))
                .collect(),
        ),
    };
    format!(
        "{}\n",
        serde_json::to_string_pretty(&v).expect("values serialize")
    )
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

fn csv_cell(c: &Cell) -> String {
    match c {
        Cell::Text(s) => csv_field(s),
        Cell::Int(i) => i.to_string(),
        // Exact: grams as a six-decimal tonne figure.
        Cell::Tonnes(m) => {
            let s = m.to_string();
            s.trim_end_matches(" t").to_string()
        }
        Cell::Percent(p) | Cell::Number(p, _) => p.to_string(),
        Cell::Pairs(p) => csv_field(&pairs_text(p)),
        Cell::Empty => String::new(),
    }
}

/// The header line of a CSV table: the columns' keys.
pub(super) fn csv_header(columns: &[Column]) -> String {
    let mut out = columns.iter().map(|c| c.key).collect::<Vec<_>>().join(",");
    out.push('\n');
    out
}

/// One row of a CSV table, with its line end.
pub(super) fn csv_row(row: &[Cell]) -> String {
    let mut out = row.iter().map(csv_cell).collect::<Vec<_>>().join(",");
    out.push('\n');
    out
}

/// One table: header and rows; several: each preceded by a `# id` line, a blank line between.
fn csv(r: &Report) -> String {
    let one = |t: &Table| {
        let mut out = csv_header(&t.columns);
        for row in &t.rows {
            out.push_str(&csv_row(row));
        }
        out
    };
    match r.tables.as_slice() {
        [t] => one(t),
        many => many
            .iter()
            .map(|t| format!("# {}\n{}", t.id, one(t)))
            .collect::<Vec<_>>()
            .join("\n"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::Mass;

    #[test]
    fn number_text() {
        assert_eq!(thousands("1234567"), "1,234,567");
        assert_eq!(thousands("-123"), "-123");
        assert_eq!(thousands("-1234"), "-1,234");
        assert_eq!(
            tonnes_text(Mass::from_grams(1_234_567_891_500)),
            "1,234,567.892"
        );
        assert_eq!(tonnes_text(Mass::from_grams(-1_500)), "-0.002");
        assert_eq!(grouped(12345.678, 1), "12,345.7");
        assert_eq!(csv_field("a,\"b\""), "\"a,\"\"b\"\"\"");
    }
}
