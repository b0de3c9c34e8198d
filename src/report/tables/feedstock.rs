//! The feedstock table: each registered feedstock's analysis and what it can take up.

use crate::accounting::weathering::campaign::Feedstock as Analysed;
use crate::accounting::weathering::composition::Immobile;
use crate::accounting::weathering::removal::Cation;
use crate::ledger::feedstock::Feedstock;
use crate::report::names;
use crate::report::{Cell, Table, columns};

pub fn list_table(project: &str, list: &[Feedstock], analysed: &[Analysed]) -> Table {
    let mut t = Table::new(
        "feedstocks",
        format!("Feedstocks, project {project}"),
        columns(&[
            names::CODE,
            names::OXIDES,
            names::OXIDE_UNIT.programs(),
            names::ELEMENTS,
            names::ELEMENT_UNIT.programs(),
            names::DENSITY,
            names::D80,
            names::CA_MOL_PER_T,
            names::MG_MOL_PER_T,
            names::NA_MOL_PER_T,
            names::K_MOL_PER_T,
            names::TI_MOL_PER_KG,
            names::ZR_MOL_PER_KG,
            names::POTENTIAL_KG_CO2_PER_T,
            names::REGISTERED_AT,
        ]),
    );
    let given = |pairs: &[(String, String)], unit: &str| {
        if pairs.is_empty() {
            return String::new();
        }
        let list: Vec<String> = pairs.iter().map(|(n, v)| format!("{n}={v}")).collect();
        format!("{} {unit}", list.join(","))
    };
    for (f, a) in list.iter().zip(analysed) {
        let cation = |c: Cation| {
            let mol = a.analysis.cations.iter().find(|x| x.cation == c);
            mol.map_or(Cell::Empty, |x| Cell::Number(x.mol_per_t, 1))
        };
        let immobile = |i: Immobile| {
            a.analysis
                .immobile(i)
                .map_or(Cell::Empty, |v| Cell::Number(v, 4))
        };
        t.push(vec![
            Cell::text(&f.code),
            Cell::text(given(&f.oxides, &f.oxide_unit)),
            Cell::text(&f.oxide_unit),
            Cell::text(given(&f.elements, &f.element_unit)),
            Cell::text(&f.element_unit),
            Cell::text(&f.density),
            Cell::opt_text(f.d80.as_deref()),
            cation(Cation::Ca),
            cation(Cation::Mg),
            cation(Cation::Na),
            cation(Cation::K),
            immobile(Immobile::Ti),
            immobile(Immobile::Zr),
            Cell::Number(a.analysis.potential_kg_per_t(), 1),
            Cell::text(f.registered_at.format("%Y-%m-%d %H:%M:%S").to_string()),
        ]);
    }
    t.note("Cations from the oxides: mol/t = wt%/100 · 10⁶ / M(oxide) × cations per oxide; Ti from Ti, else TiO2. Molar masses from CIAAW 2021 atomic weights.");
    t.note("Potential: modified Steinour formula (Renforth 2019), η = 2 (bicarbonate route), δ = −2: what full dissolution could remove, not a measured removal.");
    t
}
