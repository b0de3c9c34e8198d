//! A report as data: titled tables of typed cells, rendered later for people or for programs.

use crate::quantity::Mass;

/// One value of a table.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    Text(String),
    Int(i64),
    /// Grams shown as tonnes.
    Tonnes(Mass),
    /// A percentage (12.5 means 12.5 %).
    Percent(f64),
    /// A plain number with the given decimals for people (JSON keeps full precision).
    Number(f64, usize),
    /// Named values (a reading): an array of [name, value] pairs for programs.
    Pairs(Vec<(String, String)>),
    Empty,
}

impl Cell {
    pub fn text(s: impl Into<String>) -> Cell {
        Cell::Text(s.into())
    }

    pub fn opt_text(s: Option<impl Into<String>>) -> Cell {
        s.map_or(Cell::Empty, |s| Cell::Text(s.into()))
    }

    /// Numbers are right-aligned for people.
    pub fn is_numeric(&self) -> bool {
        matches!(
            self,
            Cell::Int(_) | Cell::Tonnes(_) | Cell::Percent(_) | Cell::Number(..)
        )
    }
}

/// A column: the label people read (with its unit) and the key programs read (carrying it too).
/// Every column is a name from [`super::names`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Column {
    pub label: &'static str,
    pub key: &'static str,
    /// False for detail only programs want (full hashes, exact grams); people see a summary column.
    pub people: bool,
}

impl Column {
    pub const fn new(label: &'static str, key: &'static str) -> Column {
        Column {
            label,
            key,
            people: true,
        }
    }

    /// The same name, in JSON and CSV only.
    pub const fn programs(self) -> Column {
        Column {
            people: false,
            ..self
        }
    }
}

/// A table's columns, in order.
pub fn columns(names: &[Column]) -> Vec<Column> {
    names.to_vec()
}

/// A titled table with notes printed beneath it.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// Stable name for programs when a command prints several tables.
    pub id: &'static str,
    pub title: String,
    pub columns: Vec<Column>,
    pub rows: Vec<Vec<Cell>>,
    pub notes: Vec<String>,
}

impl Table {
    pub fn new(id: &'static str, title: impl Into<String>, columns: Vec<Column>) -> Table {
        Table {
            id,
            title: title.into(),
            columns,
            rows: Vec::new(),
            notes: Vec::new(),
        }
    }

    pub fn push(&mut self, row: Vec<Cell>) {
        debug_assert_eq!(
            row.len(),
            self.columns.len(),
            "row width for table {}",
            self.id
        );
        self.rows.push(row);
    }

    pub fn note(&mut self, n: impl Into<String>) {
        self.notes.push(n.into());
    }
}

/// What a command prints: sentences for people, then tables.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Report {
    pub lines: Vec<String>,
    /// Warnings for stderr, whatever the output format (e.g. a permit nearly used up).
    pub warnings: Vec<String>,
    pub tables: Vec<Table>,
    /// Whether people get the cautions line at the end (every report that states figures).
    pub cautions: bool,
    /// Exit code of a command that completed but found something scripts must act on
    /// (4: a reconciliation found a material misstatement).
    pub exit_code: u8,
    /// Text printed as it is, whatever the format (a completion script, a man page).
    pub text: Option<String>,
}

impl Report {
    /// A report a streaming renderer ([`super::stream`]) has already written: nothing is left
    /// to print.
    pub fn written() -> Report {
        Report {
            text: Some(String::new()),
            ..Report::default()
        }
    }

    pub fn line(mut self, l: impl Into<String>) -> Self {
        self.lines.push(l.into());
        self
    }

    pub fn warning(mut self, w: impl Into<String>) -> Self {
        self.warnings.push(w.into());
        self
    }

    pub fn table(mut self, t: Table) -> Self {
        self.tables.push(t);
        self.cautions = true;
        self
    }

    /// Adds a table where there is one (the late adjustments, when any came late).
    pub fn table_if(self, t: Option<Table>) -> Self {
        match t {
            Some(t) => self.table(t),
            None => self,
        }
    }

    pub fn extend(&mut self, other: Report) {
        self.lines.extend(other.lines);
        self.warnings.extend(other.warnings);
        self.tables.extend(other.tables);
        self.cautions |= other.cautions;
    }
}
