use super::*;
use proptest::prelude::*;

fn parse(text: &str) -> Formula {
    match Formula::parse(text) {
        Ok(f) => f,
        Err(e) => panic!("{text}: {e}"),
    }
}

fn err(text: &str) -> FormulaError {
    match Formula::parse(text) {
        Ok(f) => panic!("{text} parsed as {f}"),
        Err(e) => e,
    }
}

fn counts(text: &str) -> Vec<(&'static str, f64)> {
    parse(text)
        .counts()
        .iter()
        .map(|c| (c.element.symbol, c.count))
        .collect()
}

/// REFERENCES.md, "Molar masses and CO2 content" — computed from the CIAAW 2021 abridged
/// weights; printed to 3 decimals, so checked to half a unit of the last digit.
#[test]
fn references_md_molar_masses() {
    for (text, printed) in [
        ("CO2", 44.009),
        ("CaCO3", 100.086),
        ("MgCO3", 84.313),
        ("FeCO3", 115.853),
        ("CaMg(CO3)2", 184.399),
    ] {
        let m = parse(text).molar_mass();
        assert!((m - printed).abs() <= 0.0005, "{text}: {m}");
    }
}

/// Computed here from the same weights (no outside source): groups, brackets, decimals
/// and hydrates.
#[test]
fn syntax_forms() {
    assert_eq!(
        counts("Ca(Mg(OH)2)2"),
        [("Ca", 1.0), ("Mg", 2.0), ("O", 4.0), ("H", 4.0)]
    );
    assert_eq!(parse("Ca[Mg(OH)2]2"), parse("Ca(Mg(OH)2)2"));
    assert_eq!(
        counts("Mg1.8Fe0.2SiO4"),
        [("Mg", 1.8), ("Fe", 0.2), ("Si", 1.0), ("O", 4.0)]
    );
    assert_eq!(
        counts("MgCO3·3H2O"),
        [("Mg", 1.0), ("C", 1.0), ("O", 6.0), ("H", 6.0)]
    );
    assert_eq!(
        counts("CaSO4.0.5H2O"),
        [("Ca", 1.0), ("S", 1.0), ("O", 4.5), ("H", 1.0)]
    );
    // 40.078 + 32.06 + 4.5 × 15.999 + 1.0080 = 145.1415
    assert!((parse("CaSO4.0.5H2O").molar_mass() - 145.1415).abs() < 1e-9);
    for same in ["MgCO3*3H2O", "MgCO3⋅3H2O", "MgCO3∙3H2O", "MgCO3.(H2O)3"] {
        assert_eq!(parse(same), parse("MgCO3·3H2O"), "{same}");
    }
    assert!(matches!(
        Formula::parse("MgCO3.3H2O"),
        Err(FormulaError::AmbiguousPoint { position: 5 })
    ));
    // The decimal reading stays available by writing the water as a group.
    assert_eq!(parse("CaSO4.2(H2O)").count("O"), 5.2);
    assert_eq!(parse("(OH)0.1.2H2O"), parse("(OH)0.1·2H2O"));
    assert_eq!(parse("CaCl2.H2O"), parse("CaCl2·H2O"));
    assert_eq!(parse("2H2O"), parse("H4O2"));
    assert_eq!(parse("Co").counts().len(), 1);
    assert_eq!(parse("CO").counts().len(), 2);
    assert_eq!(parse("CaCO3").carbon_count(), 1.0);
    assert_eq!(parse("CaMg(CO3)2").carbon_count(), 2.0);
    assert_eq!(parse("Mg2SiO4").carbon_count(), 0.0);
    assert_eq!(parse("OH"), parse("HO"));
    assert_ne!(parse("OH"), parse("OH2"));
}

#[test]
fn symbol_and_group_errors_name_the_part_and_its_character_position() {
    assert_eq!(err(""), FormulaError::Empty);
    assert_eq!(
        err("CaXx3"),
        FormulaError::UnknownSymbol {
            symbol: "Xx".into(),
            position: 2
        }
    );
    assert_eq!(
        err("Tc2O7"),
        FormulaError::NoStandardWeight {
            symbol: "Tc".into(),
            position: 0
        }
    );
    assert_eq!(
        err("Ca(OH"),
        FormulaError::UnclosedGroup {
            bracket: '(',
            position: 2
        }
    );
    assert_eq!(
        err("CaOH)2"),
        FormulaError::UnmatchedClose {
            bracket: ')',
            position: 4
        }
    );
    assert_eq!(
        err("Ca(OH]2"),
        FormulaError::MismatchedClose {
            open: '(',
            open_position: 2,
            close: ']',
            position: 5
        }
    );
    assert_eq!(err("Ca()2"), FormulaError::EmptyGroup { position: 2 });
    let unclosed = "(".repeat(100_000);
    assert_eq!(
        err(&unclosed),
        FormulaError::UnclosedGroup {
            bracket: '(',
            position: 99_999
        }
    );
}

#[test]
fn count_and_separator_errors_name_the_part_and_its_character_position() {
    assert_eq!(
        err("H0"),
        FormulaError::ZeroCount {
            text: "0".into(),
            position: 1
        }
    );
    assert_eq!(
        err("MgCO3·0H2O"),
        FormulaError::ZeroCount {
            text: "0".into(),
            position: 6
        }
    );
    assert_eq!(
        err("MgCO3·"),
        FormulaError::DanglingSeparator {
            separator: '·',
            position: 5
        }
    );
    assert_eq!(
        err("·H2O"),
        FormulaError::DanglingSeparator {
            separator: '·',
            position: 0
        }
    );
    assert_eq!(
        err("MgCO3··H2O"),
        FormulaError::DanglingSeparator {
            separator: '·',
            position: 6
        }
    );
    assert_eq!(
        err("(MgCO3·H2O)"),
        FormulaError::SeparatorInGroup {
            separator: '·',
            position: 6
        }
    );
    assert_eq!(
        err("MgCO3·3"),
        FormulaError::ExpectedFormula { position: 7 }
    );
    assert_eq!(
        err("CaSO4.2H2O"),
        FormulaError::AmbiguousPoint { position: 5 }
    );
    let huge = format!("H{}", "9".repeat(400));
    assert!(matches!(
        err(&huge),
        FormulaError::CountOutOfRange { position: 1, .. }
    ));
    let deep = format!("{}H{}", "(".repeat(40), ")1000".repeat(40));
    assert!(matches!(err(&deep), FormulaError::CountOutOfRange { .. }));
}

#[test]
fn stray_characters_are_named_at_their_character_position() {
    assert_eq!(
        err("Ca O"),
        FormulaError::StrayCharacter {
            character: ' ',
            position: 2
        }
    );
    // After a two-byte '·' the character position (10) is not the byte offset (11).
    assert_eq!(
        err("MgCO3·3H2O$"),
        FormulaError::StrayCharacter {
            character: '$',
            position: 10
        }
    );
    assert_eq!(
        err("mgO"),
        FormulaError::StrayCharacter {
            character: 'm',
            position: 0
        }
    );
}

#[test]
fn error_messages_are_one_line() {
    let e = err("MgCO3·3H2O$");
    assert_eq!(
        e.to_string(),
        "unexpected character '$' at character 10 (0-based)"
    );
    for text in ["", "Xx", "Ca(OH", "H0", "·", "CaSO4.2H2O", "Ca()", "Ca(OH]"] {
        assert!(!err(text).to_string().contains('\n'), "{text}");
    }
}

#[test]
fn display_is_canonical() {
    assert_eq!(parse("Ca(OH)2").to_string(), "CaO2H2");
    assert_eq!(parse("MgCO3·3H2O").to_string(), "MgCO6H6");
    assert_eq!(parse("Mg1.8Fe0.2SiO4").to_string(), "Mg1.8Fe0.2SiO4");
    // Without the explicit 1 this would end in "2.5H2O" and be refused as ambiguous.
    let f = parse("Fe2.5(H2O)");
    assert_eq!(f.to_string(), "Fe2.5H2O1");
    assert_eq!(parse(&f.to_string()), f);
}

const SYMBOLS: [&str; 12] = [
    "H", "C", "O", "Na", "Mg", "Al", "Si", "S", "K", "Ca", "Fe", "Co",
];

fn count_text() -> impl Strategy<Value = String> {
    prop_oneof![
        Just(String::new()),
        (2u32..20).prop_map(|n| n.to_string()),
        (1u32..100).prop_map(|n| (f64::from(n) / 10.0).to_string()),
    ]
}

/// Formula text made from the grammar: nested groups, counts, hydrate separators.
fn formula_text() -> impl Strategy<Value = String> {
    let atom =
        (prop::sample::select(&SYMBOLS[..]), count_text()).prop_map(|(s, n)| format!("{s}{n}"));
    let item = atom.prop_recursive(3, 12, 3, |inner| {
        (
            prop::collection::vec(inner, 1..4),
            prop::bool::ANY,
            count_text(),
        )
            .prop_map(|(items, square, n)| {
                let (l, r) = if square { ('[', ']') } else { ('(', ')') };
                format!("{l}{}{r}{n}", items.concat())
            })
    });
    let part = (count_text(), prop::collection::vec(item, 1..4))
        .prop_map(|(n, items)| format!("{n}{}", items.concat()));
    (
        prop::collection::vec(part, 1..4),
        prop::sample::select(vec!["·", ".", "*"]),
    )
        .prop_map(|(parts, sep)| parts.join(sep))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn never_panics_on_any_text(text in any::<String>()) {
        let _ = Formula::parse(&text);
    }

    #[test]
    fn never_panics_on_formula_like_text(text in "[A-Za-z0-9()\\[\\].·⋅* ]{0,24}") {
        if let Err(e) = Formula::parse(&text) {
            prop_assert!(e.position() <= text.chars().count());
        }
    }

    /// parse(display(f)) == f. With '.' as separator the generated text may read other
    /// than it was built (the rules prefer decimals) or be refused as ambiguous; any text
    /// that parses must round-trip.
    #[test]
    fn display_round_trips(text in formula_text()) {
        match Formula::parse(&text) {
            Ok(f) => {
                let again = Formula::parse(&f.to_string());
                prop_assert_eq!(again.as_ref(), Ok(&f), "{} -> {}", text, f);
                prop_assert_eq!(again.map(|g| g.molar_mass()), Ok(f.molar_mass()));
            }
            Err(e) => prop_assert!(
                matches!(
                    e,
                    FormulaError::AmbiguousPoint { .. } | FormulaError::ExpectedFormula { .. }
                ),
                "{} refused: {}", text, e
            ),
        }
    }
}
