//! Reports for people: comfy-table tables fitted to a width (stacked column groups when a table
//! cannot fit), notes and sentences wrapped to it, the cautions line last.

use super::fit::{self, Group, Shape};
use super::layout::Layout;
use super::render::{CAUTIONS, human_cell};
use super::table::{Report, Table};
use super::wrap;
use comfy_table::{CellAlignment, ColumnConstraint, ContentArrangement, Width, presets};

/// A column people see, as text: its label and cells, each cell marked whether it is a number.
struct Shown {
    label: &'static str,
    cells: Vec<(String, bool)>,
    /// Numbers are right-aligned, and so is the header above them.
    right: bool,
}

fn shown(t: &Table) -> Vec<Shown> {
    (0..t.columns.len())
        .filter(|&i| t.columns[i].people)
        .map(|i| {
            let cells: Vec<(String, bool)> = t
                .rows
                .iter()
                .map(|r| (human_cell(&r[i]), r[i].is_numeric()))
                .collect();
            Shown {
                label: t.columns[i].label,
                right: cells.iter().any(|(_, n)| *n),
                cells,
            }
        })
        .collect()
}

/// Text wrapped to a content width; numbers are never wrapped.
fn fitted(text: &str, numeric: bool, width: Option<usize>) -> String {
    match width {
        Some(w) if !numeric => wrap::wrap(text, w).join("\n"),
        _ => text.to_string(),
    }
}

/// One group of columns as a comfy-table table. With a width, each column gets its planned
/// width through comfy-table's dynamic arrangement; without one, rows keep their full width.
fn draw(columns: &[Shown], group: &Group, width: Option<usize>) -> String {
    let mut ct = comfy_table::Table::new();
    ct.load_style(presets::UTF8_FULL_CONDENSED);
    let planned = |k: usize| width.map(|_| group.widths[k]);
    match width {
        Some(w) => ct
            .set_content_arrangement(ContentArrangement::Dynamic)
            .set_width(u16::try_from(w).unwrap_or(u16::MAX)),
        None => ct.set_content_arrangement(ContentArrangement::Disabled),
    };
    ct.set_header(
        group
            .columns
            .iter()
            .enumerate()
            .map(|(k, &c)| fitted(columns[c].label, false, planned(k))),
    );
    let rows = columns.first().map_or(0, |c| c.cells.len());
    for r in 0..rows {
        ct.add_row(group.columns.iter().enumerate().map(|(k, &c)| {
            let (text, numeric) = &columns[c].cells[r];
            fitted(text, *numeric, planned(k))
        }));
    }
    for (k, &c) in group.columns.iter().enumerate() {
        if let Some(col) = ct.column_mut(k) {
            if columns[c].right {
                col.set_cell_alignment(CellAlignment::Right);
            }
            if let Some(w) = planned(k) {
                let padded = u16::try_from(w + 2).unwrap_or(u16::MAX);
                col.set_constraint(ColumnConstraint::Absolute(Width::Fixed(padded)));
            }
        }
    }
    format!("{ct}\n")
}

/// Prose wrapped to the width, if there is one.
fn prose(text: &str, indent: &str, width: Option<usize>) -> String {
    match width {
        Some(w) => wrap::paragraph(text, indent, w),
        None => format!("{indent}{text}\n"),
    }
}

fn table(t: &Table, layout: Layout) -> String {
    let columns = shown(t);
    // The first column names the row (and repeats in every group): it never wraps.
    let shapes: Vec<Shape> = columns
        .iter()
        .enumerate()
        .map(|(k, c)| {
            let cells = c.cells.iter().map(|(s, n)| (s.as_str(), *n || k == 0));
            Shape::new(c.label, cells)
        })
        .collect();
    let title = prose(&t.title, "", layout.width);
    let mut out = if layout.styled {
        format!("\x1b[1m{}\x1b[0m\n", title.trim_end())
    } else {
        title
    };
    for group in fit::plan(&shapes, layout.width) {
        out.push_str(&draw(&columns, &group, layout.width));
    }
    for n in &t.notes {
        out.push_str(&prose(n, "  ", layout.width));
    }
    out
}

pub fn report(r: &Report, layout: Layout) -> String {
    let mut parts: Vec<String> = r.lines.iter().map(|l| prose(l, "", layout.width)).collect();
    parts.extend(r.tables.iter().map(|t| table(t, layout)));
    if r.cautions {
        parts.push(prose(CAUTIONS, "", layout.width));
    }
    parts.join("\n")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::Mass;
    use crate::report::{Cell, columns, names};

    fn wide_table() -> Table {
        let mut t = Table::new(
            "balance",
            "Mass balance by quarter, project TFS",
            columns(&[
                names::PERIOD,
                names::INJECTED_T,
                names::SURFACE_LEAKAGE_T,
                names::CUMULATIVE_SEQUESTERED_T,
                names::HEADROOM_T,
                names::STORED_G.programs(),
            ]),
        );
        for (p, g) in [("2026-Q1", 166_108_635_000), ("2026-Q2", 2_333_891_365_123)] {
            t.push(vec![
                Cell::text(p),
                Cell::Tonnes(Mass::from_grams(g)),
                Cell::Tonnes(Mass::from_grams(g / 1000)),
                Cell::Tonnes(Mass::from_grams(g * 2)),
                Cell::Percent(12.5),
                Cell::Int(g),
            ]);
        }
        t.note("Entries spanning periods are split by days, and a note this long wraps at spaces.");
        t
    }

    fn at(width: usize) -> Layout {
        Layout {
            width: Some(width),
            styled: false,
        }
    }

    fn longest(s: &str) -> usize {
        s.lines().map(wrap::width).max().unwrap_or(0)
    }

    #[test]
    fn full_width_rows_without_a_width() {
        let s = table(&wide_table(), Layout::FULL);
        assert!(
            s.contains("│ Period  ┆  Injected (t) ┆ Surface leakage (t) ┆"),
            "{s}"
        );
        assert_eq!(longest(&s), 93);
    }

    #[test]
    fn fits_by_wrapping_headers_then_by_stacking_groups() {
        let t = wide_table();
        let two_line = table(&t, at(90));
        assert!(longest(&two_line) <= 90, "{two_line}");
        assert!(two_line.contains("sequestered (t)"), "{two_line}");
        // At 40 the table stacks; every group starts with the period column.
        let stacked = table(&t, at(40));
        println!("{two_line}\n{stacked}");
        assert!(longest(&stacked) <= 40, "{stacked}");
        assert_eq!(stacked.matches("│ 2026-Q1 ┆").count(), 3, "{stacked}");
        for number in ["166,108.635", "4,667,782.730", "12.50 %"] {
            assert!(stacked.contains(number), "{number} broken in\n{stacked}");
        }
    }

    #[test]
    fn styling_is_a_bold_title_only() {
        let styled = Layout {
            width: Some(200),
            styled: true,
        };
        let s = table(&wide_table(), styled);
        assert!(s.starts_with("\x1b[1mMass balance"));
        assert_eq!(s.matches('\x1b').count(), 2);
        assert!(!table(&wide_table(), at(200)).contains('\x1b'));
    }
}
