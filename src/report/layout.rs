//! How tables for people are laid out: the width they must fit and whether they may be styled.
//! The shell reads the terminal; this decides from what it read.

/// The width people's tables fit and whether titles are styled.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Layout {
    /// Columns to fit; `None` prints full-width rows.
    pub width: Option<usize>,
    /// Bold titles, for a terminal only.
    pub styled: bool,
}

/// What the shell found out about standard output and its environment.
#[derive(Debug, Clone, Default)]
pub struct Terminal {
    pub is_terminal: bool,
    /// The terminal's width, if it could be read.
    pub columns: Option<u16>,
    /// `COLUMNS` as set in the environment.
    pub columns_var: Option<String>,
    /// `NO_COLOR` set to anything but the empty string.
    pub no_color: bool,
    /// `--wide` given.
    pub wide: bool,
}

impl Layout {
    /// Full-width rows, no styling: what programs and pipes get.
    pub const FULL: Layout = Layout {
        width: None,
        styled: false,
    };

    /// A terminal's tables fit its width (`COLUMNS` first); piped output keeps full-width rows
    /// unless `COLUMNS` is given; `--wide` always keeps them. Styling needs a terminal and no
    /// `NO_COLOR`.
    pub fn choose(t: &Terminal) -> Layout {
        let given = t
            .columns_var
            .as_deref()
            .and_then(|v| v.trim().parse::<usize>().ok())
            .filter(|&n| n > 0);
        let width = if t.wide {
            None
        } else if given.is_some() {
            given
        } else if t.is_terminal {
            t.columns.map(usize::from).filter(|&n| n > 0)
        } else {
            None
        };
        Layout {
            width,
            styled: t.is_terminal && !t.no_color,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at_terminal() -> Terminal {
        Terminal {
            is_terminal: true,
            columns: Some(132),
            ..Terminal::default()
        }
    }

    #[test]
    fn a_terminal_gets_its_width_and_styling() {
        let l = Layout::choose(&at_terminal());
        assert_eq!(l.width, Some(132));
        assert!(l.styled);
    }

    #[test]
    fn columns_wins_over_the_terminal_and_applies_to_pipes() {
        let mut t = at_terminal();
        t.columns_var = Some("100".into());
        assert_eq!(Layout::choose(&t).width, Some(100));
        let piped = Terminal {
            columns_var: Some("80".into()),
            ..Terminal::default()
        };
        assert_eq!(
            Layout::choose(&piped),
            Layout {
                width: Some(80),
                styled: false
            }
        );
    }

    #[test]
    fn pipes_and_wide_keep_full_rows() {
        assert_eq!(Layout::choose(&Terminal::default()), Layout::FULL);
        let mut t = at_terminal();
        t.columns_var = Some("100".into());
        t.wide = true;
        assert_eq!(Layout::choose(&t).width, None);
    }

    #[test]
    fn a_terminal_of_unknown_width_gets_full_rows() {
        let mut t = at_terminal();
        t.columns = Some(0);
        assert_eq!(Layout::choose(&t).width, None);
        t.columns = None;
        assert_eq!(Layout::choose(&t).width, None);
    }

    #[test]
    fn no_color_disables_styling() {
        let mut t = at_terminal();
        t.no_color = true;
        assert!(!Layout::choose(&t).styled);
    }

    #[test]
    fn columns_that_is_no_width_is_ignored() {
        for bad in ["", "0", "wide", "-5"] {
            let mut t = at_terminal();
            t.columns_var = Some(bad.into());
            assert_eq!(Layout::choose(&t).width, Some(132), "{bad:?}");
        }
    }
}
