//! The element table.
//!
//! Weights are the abridged standard atomic weights of CIAAW 2021 (Prohaska et al. 2022,
//! "Standard atomic weights of the elements 2021", Pure Appl. Chem. 94:573–600), five
//! significant figures or fewer. For elements whose standard atomic weight is an interval
//! (H, Li, B, C, N, O, Mg, Si, S, Cl, Ar, Br, Tl, Pb) the abridged table's single value is used,
//! as the abridged table itself does. The abridged values are used rather than the full
//! ones because a ledger wants one stated, reproducible value per element, not the last digit
//! of an isotope measurement that a rock sample will not match anyway.

/// One element that has a standard atomic weight.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Element {
    /// Atomic number Z.
    pub number: u8,
    /// IUPAC symbol, case as written in formulas (`Co` is cobalt, `CO` is two elements).
    pub symbol: &'static str,
    /// IUPAC name in English.
    pub name: &'static str,
    /// Abridged standard atomic weight Ar°; numerically the molar mass in g/mol.
    pub atomic_weight: f64,
}

const fn el(number: u8, symbol: &'static str, name: &'static str, atomic_weight: f64) -> Element {
    Element {
        number,
        symbol,
        name,
        atomic_weight,
    }
}

/// Every element with a standard atomic weight, in order of atomic number: the 84 entries of
/// the CIAAW 2021 abridged table. Tc, Pm, Po–Ac and Np onwards have none (no stable isotope and
/// no characteristic terrestrial composition), so no molar mass can be stated for them.
pub const ELEMENTS: [Element; 84] = [
    el(1, "H", "hydrogen", 1.0080),
    el(2, "He", "helium", 4.0026),
    el(3, "Li", "lithium", 6.94),
    el(4, "Be", "beryllium", 9.0122),
    el(5, "B", "boron", 10.81),
    el(6, "C", "carbon", 12.011),
    el(7, "N", "nitrogen", 14.007),
    el(8, "O", "oxygen", 15.999),
    el(9, "F", "fluorine", 18.998),
    el(10, "Ne", "neon", 20.180),
    el(11, "Na", "sodium", 22.990),
    el(12, "Mg", "magnesium", 24.305),
    el(13, "Al", "aluminium", 26.982),
    el(14, "Si", "silicon", 28.085),
    el(15, "P", "phosphorus", 30.974),
    el(16, "S", "sulfur", 32.06),
    el(17, "Cl", "chlorine", 35.45),
    el(18, "Ar", "argon", 39.95),
    el(19, "K", "potassium", 39.098),
    el(20, "Ca", "calcium", 40.078),
    el(21, "Sc", "scandium", 44.956),
    el(22, "Ti", "titanium", 47.867),
    el(23, "V", "vanadium", 50.942),
    el(24, "Cr", "chromium", 51.996),
    el(25, "Mn", "manganese", 54.938),
    el(26, "Fe", "iron", 55.845),
    el(27, "Co", "cobalt", 58.933),
    el(28, "Ni", "nickel", 58.693),
    el(29, "Cu", "copper", 63.546),
    el(30, "Zn", "zinc", 65.38),
    el(31, "Ga", "gallium", 69.723),
    el(32, "Ge", "germanium", 72.630),
    el(33, "As", "arsenic", 74.922),
    el(34, "Se", "selenium", 78.971),
    el(35, "Br", "bromine", 79.904),
    el(36, "Kr", "krypton", 83.798),
    el(37, "Rb", "rubidium", 85.468),
    el(38, "Sr", "strontium", 87.62),
    el(39, "Y", "yttrium", 88.906),
    el(40, "Zr", "zirconium", 91.224),
    el(41, "Nb", "niobium", 92.906),
    el(42, "Mo", "molybdenum", 95.95),
    el(44, "Ru", "ruthenium", 101.07),
    el(45, "Rh", "rhodium", 102.91),
    el(46, "Pd", "palladium", 106.42),
    el(47, "Ag", "silver", 107.87),
    el(48, "Cd", "cadmium", 112.41),
    el(49, "In", "indium", 114.82),
    el(50, "Sn", "tin", 118.71),
    el(51, "Sb", "antimony", 121.76),
    el(52, "Te", "tellurium", 127.60),
    el(53, "I", "iodine", 126.90),
    el(54, "Xe", "xenon", 131.29),
    el(55, "Cs", "caesium", 132.91),
    el(56, "Ba", "barium", 137.33),
    el(57, "La", "lanthanum", 138.91),
    el(58, "Ce", "cerium", 140.12),
    el(59, "Pr", "praseodymium", 140.91),
    el(60, "Nd", "neodymium", 144.24),
    el(62, "Sm", "samarium", 150.36),
    el(63, "Eu", "europium", 151.96),
    el(64, "Gd", "gadolinium", 157.25),
    el(65, "Tb", "terbium", 158.93),
    el(66, "Dy", "dysprosium", 162.50),
    el(67, "Ho", "holmium", 164.93),
    el(68, "Er", "erbium", 167.26),
    el(69, "Tm", "thulium", 168.93),
    el(70, "Yb", "ytterbium", 173.05),
    el(71, "Lu", "lutetium", 174.97),
    el(72, "Hf", "hafnium", 178.49),
    el(73, "Ta", "tantalum", 180.95),
    el(74, "W", "tungsten", 183.84),
    el(75, "Re", "rhenium", 186.21),
    el(76, "Os", "osmium", 190.23),
    el(77, "Ir", "iridium", 192.22),
    el(78, "Pt", "platinum", 195.08),
    el(79, "Au", "gold", 196.97),
    el(80, "Hg", "mercury", 200.59),
    el(81, "Tl", "thallium", 204.38),
    el(82, "Pb", "lead", 207.2),
    el(83, "Bi", "bismuth", 208.98),
    el(90, "Th", "thorium", 232.04),
    el(91, "Pa", "protactinium", 231.04),
    el(92, "U", "uranium", 238.03),
];

/// Symbols of real elements that have no standard atomic weight. They are not in
/// [`ELEMENTS`]; they are listed only so that the formula parser can say "Tc has no standard
/// atomic weight" instead of "unknown symbol", which would wrongly suggest a typo.
pub const WITHOUT_STANDARD_WEIGHT: [&str; 34] = [
    "Tc", "Pm", "Po", "At", "Rn", "Fr", "Ra", "Ac", "Np", "Pu", "Am", "Cm", "Bk", "Cf", "Es", "Fm",
    "Md", "No", "Lr", "Rf", "Db", "Sg", "Bh", "Hs", "Mt", "Ds", "Rg", "Cn", "Nh", "Fl", "Mc", "Lv",
    "Ts", "Og",
];

/// The element with this symbol (case-sensitive), if it has a standard atomic weight.
pub fn element(symbol: &str) -> Option<&'static Element> {
    let table: &'static [Element] = &ELEMENTS;
    table.get(index_of(symbol)?)
}

/// Atomic weight by symbol for compile-time constants (`weight("C") + 2.0 * weight("O")`).
/// A symbol missing from the table fails the build when used in a `const`; input must go
/// through [`element`] instead, which returns `None`.
pub(crate) const fn weight(symbol: &str) -> f64 {
    match index_of(symbol) {
        Some(i) => ELEMENTS[i].atomic_weight,
        None => panic!("symbol not in the element table"),
    }
}

/// Position of `symbol` in [`ELEMENTS`]; a `const fn` (hence the byte loops) so that
/// [`weight`] can run at compile time.
const fn index_of(symbol: &str) -> Option<usize> {
    let wanted = symbol.as_bytes();
    let mut i = 0;
    while i < ELEMENTS.len() {
        let have = ELEMENTS[i].symbol.as_bytes();
        if have.len() == wanted.len() {
            let mut j = 0;
            while j < have.len() && have[j] == wanted[j] {
                j += 1;
            }
            if j == have.len() {
                return Some(i);
            }
        }
        i += 1;
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ar(symbol: &str) -> f64 {
        element(symbol).map(|e| e.atomic_weight).unwrap_or(f64::NAN)
    }

    /// REFERENCES.md, "Standard atomic weights (CIAAW 2021 abridged values; Prohaska et al.
    /// 2022, Pure Appl. Chem. 94:573–600)" — read. Exact: these are the table's own numbers.
    #[test]
    fn references_md_atomic_weights_are_exact() {
        let read = [
            ("H", 1.0080),
            ("C", 12.011),
            ("O", 15.999),
            ("Na", 22.990),
            ("Mg", 24.305),
            ("Al", 26.982),
            ("Si", 28.085),
            ("P", 30.974),
            ("S", 32.06),
            ("K", 39.098),
            ("Ca", 40.078),
            ("Ti", 47.867),
            ("Fe", 55.845),
            ("Zr", 91.224),
            ("Nb", 92.906),
        ];
        for (symbol, value) in read {
            assert_eq!(ar(symbol), value, "{symbol}");
        }
    }

    /// CIAAW 2021 changes named in the abstract of Prohaska et al. 2022 (read): Ar and Pb became
    /// intervals [39.792, 39.963] and [206.14, 207.94]; Hf 178.486(6); Yb 173.045(10). The
    /// abridged values must sit inside those and round from them.
    #[test]
    fn abridged_values_follow_the_2021_revisions() {
        assert!((39.792..=39.963).contains(&ar("Ar")));
        assert!((206.14..=207.94).contains(&ar("Pb")));
        // Half a unit of the abridged last digit (0.005), plus float slack for 173.045 → 173.05.
        assert!((ar("Hf") - 178.486).abs() <= 0.005 + 1e-9);
        assert!((ar("Yb") - 173.045).abs() <= 0.005 + 1e-9);
    }

    #[test]
    fn table_is_ordered_unique_and_complete() {
        for pair in ELEMENTS.windows(2) {
            assert!(pair[0].number < pair[1].number);
            assert!(pair[0].atomic_weight > 0.0);
        }
        for e in &ELEMENTS {
            assert_eq!(element(e.symbol), Some(e));
            assert!(!WITHOUT_STANDARD_WEIGHT.contains(&e.symbol));
        }
        // 84 with a weight + 34 without = all 118 named elements, each symbol once.
        let mut all: Vec<&str> = ELEMENTS.iter().map(|e| e.symbol).collect();
        all.extend(WITHOUT_STANDARD_WEIGHT);
        all.sort_unstable();
        all.dedup();
        assert_eq!(all.len(), 118);
        assert_eq!(ELEMENTS.last().map(|e| e.symbol), Some("U"));
    }

    #[test]
    fn const_lookup_matches_the_table() {
        for e in &ELEMENTS {
            assert_eq!(weight(e.symbol), e.atomic_weight);
        }
        assert_eq!(element("Xx"), None);
        assert_eq!(element("co"), None);
    }
}
