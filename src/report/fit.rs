//! Fitting a table to a width. First headers wrap onto two lines, then text cells wrap at
//! spaces; a table that still does not fit is split into stacked column groups that each repeat
//! the first (period) column. Numbers are never broken.

use super::wrap;

/// What the planner needs to know of one column, in terminal columns.
#[derive(Debug, Clone, PartialEq)]
pub struct Shape {
    /// Header and every cell on one line.
    natural: usize,
    /// The widest cell on one line (the header may wrap).
    cells: usize,
    /// The narrowest width for a header of at most two lines.
    header: usize,
    /// The narrowest width that breaks no number and no word.
    hard: usize,
}

impl Shape {
    /// A column from its header and its cells, each cell marked whether it is a number (numbers
    /// never wrap, not even at the space before a unit).
    pub fn new<'a>(header: &str, cells: impl IntoIterator<Item = (&'a str, bool)>) -> Shape {
        let (mut widest, mut hard) = (0, wrap::longest_word(header));
        for (text, numeric) in cells {
            widest = widest.max(wrap::width(text));
            hard = hard.max(if numeric {
                wrap::width(text)
            } else {
                wrap::longest_word(text)
            });
        }
        Shape {
            natural: widest.max(wrap::width(header)),
            cells: widest,
            header: wrap::narrowest(header, 2).max(hard),
            hard,
        }
    }
    /// Widths by how much may wrap: nothing; headers onto two lines; text cells too; headers
    /// onto as many lines as their words need.
    fn stages(shapes: &[&Shape]) -> [Vec<usize>; 4] {
        let each = |f: fn(&Shape) -> usize| shapes.iter().map(|s| f(s)).collect::<Vec<_>>();
        [
            each(|s| s.natural),
            each(|s| s.cells.max(s.header)),
            each(|s| s.header),
            each(|s| s.hard),
        ]
    }
}

/// One stacked part of a table: its columns (indices into the table's) and their content widths.
#[derive(Debug, Clone, PartialEq)]
pub struct Group {
    pub columns: Vec<usize>,
    pub widths: Vec<usize>,
}

/// Printed width of columns with these content widths: a space of padding on each side of a
/// cell, a border between columns and around them.
pub fn printed(widths: &[usize]) -> usize {
    widths.iter().sum::<usize>() + 3 * widths.len() + 1
}

/// Hands spare columns to the columns that want them. A header gains nothing from part of what
/// it wants, so without `partly` each column gets all it wants, cheapest first. With `partly`
/// (a wrapped cell takes fewer lines with every column it gets) the spare is shared out evenly:
/// the narrowest column that wants more gets the next one.
fn widen(mut widths: Vec<usize>, wanted: &[usize], mut spare: usize, partly: bool) -> Vec<usize> {
    let wanting = |w: &[usize]| {
        (0..w.len())
            .filter(|&i| wanted[i] > w[i])
            .collect::<Vec<_>>()
    };
    if partly {
        while spare > 0 {
            let Some(&i) = wanting(&widths).iter().min_by_key(|&&i| widths[i]) else {
                break;
            };
            widths[i] += 1;
            spare -= 1;
        }
        return widths;
    }
    let mut order = wanting(&widths);
    order.sort_by_key(|&i| wanted[i] - widths[i]);
    for i in order {
        let more = wanted[i] - widths[i];
        if more > spare {
            break;
        }
        widths[i] += more;
        spare -= more;
    }
    widths
}

/// Content widths that fit `max` without splitting the columns, if there are any: the first
/// stage of wrapping that fits, its spare room handed back to the columns that wrapped.
fn fit(shapes: &[&Shape], max: usize) -> Option<Vec<usize>> {
    let stages = Shape::stages(shapes);
    let first = stages.iter().position(|w| printed(w) <= max)?;
    let widths = stages[first].clone();
    if first == 0 {
        return Some(widths);
    }
    let spare = max - printed(&widths);
    Some(widen(widths, &stages[first - 1], spare, first >= 2))
}

/// Splits `count` columns, in order, into `parts` runs of at least one column whose widest
/// printed run is as narrow as it can be.
fn balanced(count: usize, parts: usize, cost: impl Fn(usize, usize) -> usize) -> Vec<usize> {
    // best[p][i]: the narrowest widest run splitting the first i columns into p runs, and where
    // the last run starts.
    let mut best = vec![vec![(usize::MAX, 0); count + 1]; parts + 1];
    best[0][0] = (0, 0);
    for p in 1..=parts {
        for i in p..=count {
            for start in (p - 1)..i {
                let (before, _) = best[p - 1][start];
                if before == usize::MAX {
                    continue;
                }
                let widest = before.max(cost(start, i));
                if widest < best[p][i].0 {
                    best[p][i] = (widest, start);
                }
            }
        }
    }
    let mut starts = Vec::with_capacity(parts);
    let mut end = count;
    for p in (1..=parts).rev() {
        end = best[p][end].1;
        starts.push(end);
    }
    starts.reverse();
    starts
}

/// The layout of a table: one group at full width when `max` is `None` or the table fits, else
/// stacked groups that each repeat the first column, as few as fit without wrapping a cell and
/// as even in width as can be. A group that cannot fit even alone with the first column is
/// printed at its narrowest, wider than `max`, rather than break a number.
pub fn plan(shapes: &[Shape], max: Option<usize>) -> Vec<Group> {
    let pick = |cols: &[usize]| cols.iter().map(|&i| &shapes[i]).collect::<Vec<_>>();
    let all: Vec<usize> = (0..shapes.len()).collect();
    let Some(m) = max else {
        return vec![Group {
            widths: shapes.iter().map(|s| s.natural).collect(),
            columns: all,
        }];
    };
    if let Some(widths) = fit(&pick(&all), m) {
        return vec![Group {
            widths,
            columns: all,
        }];
    }
    // Columns after the first, in runs [from, to); a run's cost is its printed width with the
    // first column and headers on two lines.
    let rest = shapes.len().saturating_sub(1);
    let cost = |from: usize, to: usize| {
        let cols: Vec<usize> = std::iter::once(0).chain(from + 1..to + 1).collect();
        printed(&Shape::stages(&pick(&cols))[1])
    };
    let mut parts = 1;
    let mut from = 0;
    for to in 1..=rest {
        if to - from > 1 && cost(from, to) > m {
            parts += 1;
            from = to - 1;
        }
    }
    // Even out the runs that fit; a run of several columns that does not is ruled out, and a
    // lone column too wide for any run stands apart, whatever its width.
    let even = |from: usize, to: usize| match cost(from, to) {
        c if c <= m => c,
        _ if to - from == 1 => 0,
        _ => usize::MAX,
    };
    let starts = balanced(rest, parts.min(rest.max(1)), even);
    let ends = starts.iter().skip(1).copied().chain(std::iter::once(rest));
    starts
        .iter()
        .zip(ends)
        .map(|(&from, to)| {
            let columns: Vec<usize> = std::iter::once(0).chain(from + 1..to + 1).collect();
            let picked = pick(&columns);
            let widths = fit(&picked, m).unwrap_or_else(|| Shape::stages(&picked)[3].clone());
            Group { columns, widths }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn numbers(header: &str, cells: &[&str]) -> Shape {
        Shape::new(header, cells.iter().map(|c| (*c, true)))
    }

    fn balance() -> Vec<Shape> {
        let mut s = vec![Shape::new("Period", [("2026-Q1", false), ("total", false)])];
        for h in [
            "Injected (t)",
            "Surface leakage (t)",
            "Sequestered (t)",
            "Cumulative sequestered (t)",
            "Headroom (t)",
        ] {
            s.push(numbers(h, &["2,333,891.365", "0.000"]));
        }
        s
    }

    #[test]
    fn a_table_that_fits_keeps_its_natural_widths() {
        let shapes = balance();
        let g = plan(&shapes, Some(200));
        assert_eq!(g.len(), 1);
        assert_eq!(g[0].widths, [7, 13, 19, 15, 26, 13]);
        assert_eq!(plan(&shapes, None), g);
    }

    #[test]
    fn headers_wrap_onto_two_lines_before_anything_else() {
        let shapes = balance();
        // Natural: 93 + 19 = 112 printed. Two-line headers: 7 + 13 × 4 + 15 = 74 + 19 = 93.
        let g = plan(&shapes, Some(100));
        assert_eq!(g.len(), 1);
        let w = &g[0].widths;
        assert!(printed(w) <= 100, "{w:?}");
        // The 7 spare columns go to the cheapest header first: "Sequestered (t)" (2 more) fits
        // on one line; "Surface leakage (t)" would want 6 more and stays on two lines.
        assert_eq!(w, &vec![7, 13, 13, 15, 15, 13]);
    }

    #[test]
    fn a_table_too_wide_splits_into_groups_repeating_the_first_column() {
        let shapes = balance();
        let g = plan(&shapes, Some(50));
        assert!(g.len() > 1);
        let mut seen: Vec<usize> = Vec::new();
        for group in &g {
            assert_eq!(group.columns[0], 0, "{g:?}");
            assert!(printed(&group.widths) <= 50, "{g:?}");
            seen.extend(group.columns.iter().skip(1));
            // No number is narrower than its column.
            assert!(group.widths.iter().skip(1).all(|&w| w >= 13));
        }
        assert_eq!(seen, [1, 2, 3, 4, 5]);
    }

    #[test]
    fn groups_are_as_even_as_can_be() {
        // Seven columns of width 10 and one of 30: [10 10 10] [10 10 10] [10 30] is as narrow
        // at its widest (40) as runs can be, where filling greedily to 45 would leave [30].
        let widths = [10, 10, 10, 10, 10, 10, 10, 30];
        let cost = |from: usize, to: usize| widths[from..to].iter().sum::<usize>();
        assert_eq!(balanced(8, 3, cost), [0, 3, 6]);
        assert_eq!(balanced(3, 3, cost), [0, 1, 2]);
        assert_eq!(balanced(1, 1, cost), [0]);
    }

    #[test]
    fn text_cells_wrap_before_the_table_splits() {
        let shapes = vec![
            Shape::new("Pathway", [("TF-M1 annulus", false)]),
            Shape::new(
                "Quantified by",
                [(
                    "0.015 t/h × 24 h × 99 d, start backdated to the survey",
                    false,
                )],
            ),
            numbers("CO2 (t)", &["35.640"]),
        ];
        let g = plan(&shapes, Some(50));
        assert_eq!(g.len(), 1);
        assert_eq!(printed(&g[0].widths), 50);
    }

    #[test]
    fn a_column_too_wide_for_any_group_stands_apart() {
        let mut shapes = vec![
            Shape::new("Code", [("EVB-1", false)]),
            Shape::new("Oxides", [("SiO2=49.5,Al2O3=14.2,FeO=11.6,CaO=9.4", false)]),
        ];
        for h in [
            "Na (mol/t)",
            "K (mol/t)",
            "Ti (mol/kg)",
            "Potential (kg CO2/t)",
        ] {
            shapes.push(numbers(h, &["1,676.3"]));
        }
        let g = plan(&shapes, Some(40));
        assert_eq!(g[0].columns, [0, 1]);
        for group in &g {
            assert!(printed(&group.widths) <= 40, "{g:?}");
        }
    }

    #[test]
    fn a_number_wider_than_the_width_is_printed_whole() {
        let shapes = vec![
            Shape::new("Period", [("2026", false)]),
            numbers("Stored (t)", &["1,234,567,890.123"]),
        ];
        let g = plan(&shapes, Some(20));
        assert_eq!(g[0].widths, [6, 17]);
    }
}
