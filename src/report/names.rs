//! One name per quantity: every column of every report, its label for people and its key for
//! programs (JSON and CSV), listed once. A key is its label's words in lower case joined by `_`,
//! then its unit (`(t)` → `_t`, `(%)` → `_pct`, `(UTC)` → `_at`, `±` → `u`), so a table, its
//! JSON and its CSV cannot call one figure two things; the tests below hold every name to it.

use super::table::Column;

/// Declares each name as a column and lists them all in [`ALL`].
macro_rules! names {
    ($($id:ident = $label:literal, $key:literal;)*) => {
        $(pub const $id: Column = Column::new($label, $key);)*
        /// Every name a report may use.
        pub const ALL: &[Column] = &[$($id),*];
    };
}

names! {
    ANNUAL_MAXIMUM_T = "Annual maximum (t)", "annual_maximum_t";
    APPLIED = "Applied", "applied";
    APPLIED_T = "Applied (t)", "applied_t";
    AREA = "Area", "area";
    BASELINE = "Baseline", "baseline";
    BICARBONATE_ROUTE_T_CO2_PER_T = "Bicarbonate route (t CO2/t)", "bicarbonate_route_t_co2_per_t";
    BUFFER_HELD_T = "Buffer held (t)", "buffer_held_t";
    BUFFER_WITHHELD_T = "Buffer withheld (t)", "buffer_withheld_t";
    BYTES = "Bytes", "bytes";
    CA_MOL_PER_T = "Ca (mol/t)", "ca_mol_per_t";
    CAMPAIGN = "Campaign", "campaign";
    CANCELLED_FROM_BUFFER_T = "Cancelled from buffer (t)", "cancelled_from_buffer_t";
    CANCELLED_FROM_CLAIMABLE_T = "Cancelled from claimable (t)", "cancelled_from_claimable_t";
    CARBONATE_ROUTE_T_CO2_PER_T = "Carbonate route (t CO2/t)", "carbonate_route_t_co2_per_t";
    CATION = "Cation", "cation";
    CATION_RETENTION_T = "Cation retention (t)", "cation_retention_t";
    CHAIN_HASH = "Chain hash", "chain_hash";
    CHAIN_HEAD = "Chain head", "chain_head";
    CHARGE = "Charge", "charge";
    CLAIMABLE_GEOLOGICAL_T = "Claimable, geological (t)", "claimable_geological_t";
    CLAIMABLE_MINERALIZED_T = "Claimable, mineralized (t)", "claimable_mineralized_t";
    CLAIMABLE_WEATHERING_T = "Claimable, weathering (t)", "claimable_weathering_t";
    CLAIMABLE_T = "Claimable (t)", "claimable_t";
    CO2_BASIS = "CO2 basis", "co2_basis";
    CO2_FRACTION = "CO2 fraction", "co2_fraction";
    CO2_FRACTION_MEAN = "CO2 fraction (mean)", "co2_fraction_mean";
    CO2_G = "CO2 (g)", "co2_g";
    CO2_KG_PER_T = "CO2 (kg/t)", "co2_kg_per_t";
    CO2_ON_AN_ASSUMED_FRACTION_T = "CO2 on an assumed fraction (t)", "co2_on_an_assumed_fraction_t";
    CO2_T = "CO2 (t)", "co2_t";
    CO2_WT_PCT = "CO2 (wt%)", "co2_wt_pct";
    CODE = "Code", "code";
    COEFFICIENT = "Coefficient", "coefficient";
    COMMAND = "Command", "command";
    COMPRESSIBILITY_Z = "Compressibility Z", "compressibility_z";
    CONSERVATIVE_T = "Conservative (t)", "conservative_t";
    CONVERSION = "Conversion", "conversion";
    CORES_SEQ = "Cores (seq)", "cores_seq";
    CORRECTED_BY = "Corrected by", "corrected_by";
    CORRECTS = "Corrects", "corrects";
    COUNTED = "Counted", "counted";
    CUMULATIVE_INJECTED_T = "Cumulative injected (t)", "cumulative_injected_t";
    CUMULATIVE_MINERALIZED_T = "Cumulative mineralized (t)", "cumulative_mineralized_t";
    CUMULATIVE_NET_T = "Cumulative net (t)", "cumulative_net_t";
    CUMULATIVE_SEQUESTERED_T = "Cumulative sequestered (t)", "cumulative_sequestered_t";
    CUMULATIVE_STORED_T = "Cumulative stored (t)", "cumulative_stored_t";
    CUMULATIVE_T = "Cumulative (t)", "cumulative_t";
    D80 = "d80", "d80";
    DATE = "Date", "date";
    DAY = "Day", "day";
    DAYS = "Days", "days";
    DENSITY = "Density", "density";
    DENSITY_KG_PER_M3 = "Density (kg/m³)", "density_kg_per_m3";
    DIC_BACKGROUND = "DIC background", "dic_background";
    DIC_INJECTATE = "DIC injectate", "dic_injectate";
    DIC_SAMPLE = "DIC sample", "dic_sample";
    DIC_UNIT = "DIC unit", "dic_unit";
    DIFFERENCE_PCT = "Difference (%)", "difference_pct";
    DIFFERENCE_T = "Difference (t)", "difference_t";
    DISSOLVED_FRACTION = "Dissolved fraction", "dissolved_fraction";
    DRY_FEED_T = "Dry feed (t)", "dry_feed_t";
    DURABILITY_DISCOUNT_T = "Durability discount (t)", "durability_discount_t";
    DURABLE_T = "Durable (t)", "durable_t";
    ELEMENT_UNIT = "Element unit", "element_unit";
    ELEMENTS = "Elements", "elements";
    EMISSIONS_T = "Emissions (t)", "emissions_t";
    ENTRAINED_T = "Entrained (t)", "entrained_t";
    ENTRIES = "Entries", "entries";
    ENTRY_T = "Entry (t)", "entry_t";
    EQUATION = "Equation", "equation";
    EVENT = "Event", "event";
    EVIDENCE_NAME = "Evidence name", "evidence_name";
    EVIDENCE_SHA256 = "Evidence SHA256", "evidence_sha256";
    FEEDSTOCK = "Feedstock", "feedstock";
    FIELD = "Field", "field";
    FILE = "File", "file";
    FINDING = "Finding", "finding";
    FINGERPRINT = "Fingerprint", "fingerprint";
    FIRST_DAY = "First day", "first_day";
    FOUND_T_PER_HA = "Found (t/ha)", "found_t_per_ha";
    GIVEN_WT_PCT = "Given (wt%)", "given_wt_pct";
    GROSS_T = "Gross (t)", "gross_t";
    HEADROOM_T = "Headroom (t)", "headroom_t";
    HOW = "How", "how";
    IDEAL_GAS_DENSITY_KG_PER_M3 = "Ideal-gas density (kg/m³)", "ideal_gas_density_kg_per_m3";
    IMPORT = "Import", "import";
    IN_FORCE_FROM = "In force from", "in_force_from";
    IN_FORCE_TODAY = "In force today", "in_force_today";
    INJECTED_T = "Injected (t)", "injected_t";
    INPUT_T = "Input (t)", "input_t";
    K_MOL_PER_T = "K (mol/t)", "k_mol_per_t";
    KEY = "Key", "key";
    KIND = "Kind", "kind";
    LAST_DAY = "Last day", "last_day";
    LAST_SEAL = "Last seal", "last_seal";
    LEAF_HASH = "Leaf hash", "leaf_hash";
    LEAF_HEAD = "Leaf head", "leaf_head";
    LEAKS_AND_VENTS_INJECTION_T = "Leaks and vents, injection (t)", "leaks_and_vents_injection_t";
    LEAKS_AND_VENTS_PRODUCTION_T = "Leaks and vents, production (t)", "leaks_and_vents_production_t";
    LEDGER_HASH = "Ledger hash", "ledger_hash";
    LEDGER_LINKS = "Ledger links", "ledger_links";
    LEDGER_T = "Ledger (t)", "ledger_t";
    LINE = "Line", "line";
    LINES = "Lines", "lines";
    LOSSES_FROM_EOR_COMPLEX_T = "Losses from EOR complex (t)", "losses_from_eor_complex_t";
    MATERIALITY_PCT = "Materiality (%)", "materiality_pct";
    METER = "Meter", "meter";
    METER_TYPE = "Meter type", "meter_type";
    METHOD = "Method", "method";
    MG_MOL_PER_T = "Mg (mol/t)", "mg_mol_per_t";
    MINERALIZED_FRACTION = "Mineralized fraction", "mineralized_fraction";
    MINERALIZED_FRACTION_MAX = "Mineralized fraction (max)", "mineralized_fraction_max";
    MINERALIZED_FRACTION_MEAN = "Mineralized fraction (mean)", "mineralized_fraction_mean";
    MINERALIZED_FRACTION_MIN = "Mineralized fraction (min)", "mineralized_fraction_min";
    MINERALIZED_FRACTION_SD = "Mineralized fraction (sd)", "mineralized_fraction_sd";
    MINERALIZED_FRACTION_U = "Mineralized fraction ± (95 %)", "mineralized_fraction_u_95_pct";
    MINERALIZED_T = "Mineralized (t)", "mineralized_t";
    MINERALIZED_U_T = "Mineralized ± (t)", "mineralized_u_t";
    MISSTATEMENT_T = "Misstatement (t)", "misstatement_t";
    MOL_PER_MOL = "mol per mol", "mol_per_mol";
    MONITORING_REPORT = "Monitoring report", "monitoring_report";
    NA_MOL_PER_T = "Na (mol/t)", "na_mol_per_t";
    NAME = "Name", "name";
    NET_OF_EMISSIONS_T = "Net of emissions (t)", "net_of_emissions_t";
    NET_T = "Net (t)", "net_t";
    NOT_YET_SAMPLED_T = "Not yet sampled (t)", "not_yet_sampled_t";
    NOTE = "Note", "note";
    OCEAN_RE_EQUILIBRATION_T = "Ocean re-equilibration (t)", "ocean_re_equilibration_t";
    OPERATIONAL_LOSSES_T = "Operational losses (t)", "operational_losses_t";
    OPERATOR = "Operator", "operator";
    OUT_OF_RANGE = "Out of range", "out_of_range";
    OXIDE_UNIT = "Oxide unit", "oxide_unit";
    OXIDES = "Oxides", "oxides";
    PATH_HASHES = "Path hashes", "path_hashes";
    PATHWAY = "Pathway", "pathway";
    PERIOD = "Period", "period";
    PERIOD_FROM = "Period from", "period_from";
    PERIOD_TO = "Period to", "period_to";
    PERIODS = "Periods", "periods";
    PERMIT = "Permit", "permit";
    PERMIT_USED_PCT = "Permit used (%)", "permit_used_pct";
    PERMITTED_CAPACITY_T = "Permitted capacity (t)", "permitted_capacity_t";
    PHASE = "Phase", "phase";
    POTENTIAL_KG_CO2_PER_T = "Potential (kg CO2/t)", "potential_kg_co2_per_t";
    POTENTIAL_T = "Potential (t)", "potential_t";
    PRESSURE_MPA = "Pressure (MPa)", "pressure_mpa";
    PRODUCED_T = "Produced (t)", "produced_t";
    PRODUCT_T = "Product (t)", "product_t";
    PROJECT = "Project", "project";
    PROJECT_EMISSIONS_T = "Project emissions (t)", "project_emissions_t";
    PUBLIC_KEY = "Public key", "public_key";
    QUANTIFIED_BY = "Quantified by", "quantified_by";
    QUANTITY = "Quantity", "quantity";
    QUANTITY_READ = "Quantity read", "quantity_read";
    QUARTER = "Quarter", "quarter";
    RATE_T_PER_HA = "Rate (t/ha)", "rate_t_per_ha";
    READING = "Reading", "reading";
    READINGS = "Readings", "readings";
    READINGS_T = "Readings (t)", "readings_t";
    REASON = "Reason", "reason";
    RECEIVED_T = "Received (t)", "received_t";
    RECONCILED_BY = "Reconciled by", "reconciled_by";
    RECONCILIATIONS = "Reconciliations", "reconciliations";
    RECORDED_AT = "Recorded (UTC)", "recorded_at";
    RECORDED_BY = "Recorded by", "recorded_by";
    RECYCLED_T = "Recycled (t)", "recycled_t";
    REGISTERED_AT = "Registered (UTC)", "registered_at";
    REMOVAL_T = "Removal (t)", "removal_t";
    REPORT_SHA256 = "Report SHA256", "report_sha256";
    REPORT_T = "Report (t)", "report_t";
    RESULT = "Result", "result";
    REVERSED_T = "Reversed (t)", "reversed_t";
    ROLE = "Role", "role";
    ROOT = "Root", "root";
    ROWS = "Rows", "rows";
    ROW_HASH = "Row hash", "row_hash";
    SAMPLED = "Sampled", "sampled";
    SEAL_MATCHES = "Seal matches", "seal_matches";
    SEAL_SEQ = "Seal seq", "seal_seq";
    SEALED_AT = "Sealed (UTC)", "sealed_at";
    SEALED_PERIOD = "Sealed period", "sealed_period";
    SEALS = "Seals", "seals";
    SECONDARY_CARBONATE_T = "Secondary carbonate (t)", "secondary_carbonate_t";
    SECTIONS = "Sections", "sections";
    SEPARATED_T = "Separated (t)", "separated_t";
    SEQ = "Seq", "seq";
    SEQ_RANGE = "Seq range", "seq_range";
    SEQUESTERED_T = "Sequestered (t)", "sequestered_t";
    SEQUESTERED_U_PCT = "Sequestered ± (%)", "sequestered_u_pct";
    SEQUESTERED_U_T = "Sequestered ± (t)", "sequestered_u_t";
    SERIES = "Series", "series";
    SETTING = "Setting", "setting";
    SHA256 = "SHA256", "sha256";
    SHORTFALL_T = "Shortfall (t)", "shortfall_t";
    SHOWS = "Shows", "shows";
    SIGN = "Sign", "sign";
    SIGNATURE = "Signature", "signature";
    SIGNATURE_CHECK = "Signature check", "signature_check";
    SIGNED_AT = "Signed (UTC)", "signed_at";
    SITE = "Site", "site";
    SITES = "Sites", "sites";
    SPECIES = "Species", "species";
    STATEMENT = "Statement", "statement";
    STATEMENTS = "Statements", "statements";
    STILL_DISSOLVED_T = "Still dissolved (t)", "still_dissolved_t";
    STORED_G = "Stored (g)", "stored_g";
    STORED_GEOLOGICAL_T = "Stored, geological (t)", "stored_geological_t";
    STORED_LEDGER_T = "Stored, ledger (t)", "stored_ledger_t";
    STORED_T = "Stored (t)", "stored_t";
    STORED_U_PCT = "Stored ± (%)", "stored_u_pct";
    STORED_U_T = "Stored ± (t)", "stored_u_t";
    STRONG_ACID_T = "Strong acid (t)", "strong_acid_t";
    SURFACE_LEAKAGE_T = "Surface leakage (t)", "surface_leakage_t";
    TABLES = "Tables", "tables";
    TEMPERATURE_K = "Temperature (K)", "temperature_k";
    TERM = "Term", "term";
    THRESHOLD_PCT = "Threshold (%)", "threshold_pct";
    THRESHOLD_T = "Threshold (t)", "threshold_t";
    TI_MOL_PER_KG = "Ti (mol/kg)", "ti_mol_per_kg";
    TIMESTAMP = "Timestamp", "timestamp";
    TRACER_RATIO = "Tracer ratio", "tracer_ratio";
    TREE_HEAD = "Tree head", "tree_head";
    TREE_SIZE = "Tree size", "tree_size";
    UNCERTAINTY_95_PCT = "Uncertainty (95 %)", "uncertainty_95_pct";
    UNCERTAINTY_DEDUCTION_T = "Uncertainty deduction (t)", "uncertainty_deduction_t";
    UNIT = "Unit", "unit";
    VALUE = "Value", "value";
    VERDICT = "Verdict", "verdict";
    VERIFIER_STATEMENT = "Verifier statement", "verifier_statement";
    WEATHERING_NET_REMOVAL_T = "Weathering net removal (t)", "weathering_net_removal_t";
    WELL = "Well", "well";
    WELLS = "Wells", "wells";
    YEAR = "Year", "year";
    YEARS = "Years", "years";
    ZR_MOL_PER_KG = "Zr (mol/kg)", "zr_mol_per_kg";
}

/// The name with this label, if the list has one.
pub fn by_label(label: &str) -> Option<&'static Column> {
    ALL.iter().find(|c| c.label == label)
}

/// The name with this key, if the list has one.
pub fn by_key(key: &str) -> Option<&'static Column> {
    ALL.iter().find(|c| c.key == key)
}

/// The key a label gives: its words, then its unit in brackets, in lower case joined by `_`.
pub fn key_for(label: &str) -> String {
    let (words, unit) = match label.strip_suffix(')').and_then(|l| l.rsplit_once(" (")) {
        Some((w, u)) => (w, Some(u)),
        None => (label, None),
    };
    let mut parts = slug(words);
    match unit {
        Some("UTC") => parts.push("at".into()),
        Some(u) => parts.extend(slug(u)),
        None => {}
    }
    parts.join("_")
}

fn slug(text: &str) -> Vec<String> {
    let spelled = text
        .replace('±', " u ")
        .replace('%', " pct ")
        .replace('/', " per ")
        .replace('³', "3");
    spelled
        .split(|c: char| !c.is_ascii_alphanumeric())
        .filter(|w| !w.is_empty())
        .map(str::to_lowercase)
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::HashSet;

    #[test]
    fn every_key_is_its_label_spelled_for_programs() {
        for c in ALL {
            assert_eq!(key_for(c.label), c.key, "{:?}", c.label);
            assert!(c.people, "{} is listed for programs only", c.key);
        }
    }

    #[test]
    fn no_label_or_key_names_two_quantities() {
        let labels: HashSet<_> = ALL.iter().map(|c| c.label).collect();
        let keys: HashSet<_> = ALL.iter().map(|c| c.key).collect();
        assert_eq!(labels.len(), ALL.len());
        assert_eq!(keys.len(), ALL.len());
    }

    #[test]
    fn units_become_suffixes() {
        assert_eq!(key_for("Sequestered (t)"), "sequestered_t");
        assert_eq!(key_for("Stored ± (%)"), "stored_u_pct");
        assert_eq!(key_for("Recorded (UTC)"), "recorded_at");
        assert_eq!(key_for("Density (kg/m³)"), "density_kg_per_m3");
        assert_eq!(
            key_for("Leaks and vents, injection (t)"),
            "leaks_and_vents_injection_t"
        );
        assert_eq!(by_key("surface_leakage_t"), by_label("Surface leakage (t)"));
        assert!(by_label("Leakage (t)").is_none());
    }
}
