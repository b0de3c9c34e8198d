//! Diesel's view of the tables in migrations/sqlite.

diesel::table! {
    projects (code) {
        code -> Text,
        name -> Text,
        method -> Text,
        operator -> Text,
        permit_ref -> Nullable<Text>,
        permit_capacity_g -> Nullable<BigInt>,
        permit_annual_g -> Nullable<BigInt>,
        created_at -> Timestamp,
        row_hash -> Text,
    }
}

diesel::table! {
    sites (project, code) {
        project -> Text,
        code -> Text,
        kind -> Text,
        area -> Nullable<Text>,
        uncertainty -> Nullable<Text>,
        created_at -> Timestamp,
        row_hash -> Text,
    }
}

diesel::table! {
    entries (project, seq) {
        project -> Text,
        seq -> BigInt,
        kind -> Text,
        site -> Nullable<Text>,
        period_from -> Text,
        period_to -> Text,
        reading -> Text,
        grams -> BigInt,
        sign -> Text,
        recorded_at -> Timestamp,
        idem_key -> Text,
        meter -> Nullable<Text>,
        note -> Nullable<Text>,
        corrects -> Nullable<BigInt>,
        reason -> Nullable<Text>,
        evidence_name -> Nullable<Text>,
        evidence_sha256 -> Nullable<Text>,
        leaf_hash -> Text,
        chain_hash -> Text,
        recorded_by -> Nullable<Text>,
        tally_magnitude_g -> Nullable<BigInt>,
        tally_stored_g -> Nullable<BigInt>,
    }
}

diesel::table! {
    imports (id) {
        id -> BigInt,
        project -> Text,
        file_name -> Text,
        file_sha256 -> Text,
        kind -> Text,
        row_count -> BigInt,
        imported_at -> Timestamp,
        columns_map -> Text,
        density -> Text,
        byte_count -> BigInt,
    }
}

diesel::table! {
    import_evidence (import_id, part) {
        import_id -> BigInt,
        part -> BigInt,
        bytes -> Binary,
    }
}

diesel::table! {
    settings (project, seq) {
        project -> Text,
        seq -> BigInt,
        name -> Text,
        value -> Text,
        recorded_at -> Timestamp,
        row_hash -> Text,
        effective_from -> Nullable<Text>,
        source -> Nullable<Text>,
    }
}

diesel::table! {
    feedstocks (project, code) {
        project -> Text,
        code -> Text,
        oxides -> Text,
        oxide_unit -> Text,
        elements -> Text,
        element_unit -> Text,
        density -> Text,
        d80 -> Nullable<Text>,
        created_at -> Timestamp,
        row_hash -> Text,
    }
}

diesel::table! {
    signatures (project, seq) {
        project -> Text,
        seq -> BigInt,
        seal_seq -> BigInt,
        period -> Text,
        tree_size -> BigInt,
        root -> Text,
        role -> Text,
        statement -> Text,
        signed_at -> Timestamp,
        public_key -> Text,
        signature -> Text,
        row_hash -> Text,
    }
}

diesel::table! {
    reconciliations (project, seq) {
        project -> Text,
        seq -> BigInt,
        previous -> Text,
        report_name -> Text,
        report_sha256 -> Text,
        method -> Text,
        materiality -> Text,
        basis -> Text,
        chain_size -> BigInt,
        chain_head -> Text,
        lines -> Text,
        years -> Text,
        verdict -> Text,
        role -> Text,
        by_name -> Nullable<Text>,
        recorded_by -> Nullable<Text>,
        recorded_at -> Timestamp,
        row_hash -> Text,
    }
}

diesel::table! {
    ledger_chain (seq) {
        seq -> BigInt,
        record -> Text,
        project -> Text,
        item -> Text,
        row_hash -> Text,
        leaf_hash -> Text,
        chain_hash -> Text,
    }
}
