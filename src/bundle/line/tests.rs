use super::item::unhex;
use super::*;

#[test]
fn one_spelling_only() {
    let header =
        r#"{"type":"header","format":"sinkbook-bundle","version":2,"project":"TFS","seals":[]}"#;
    assert!(Line::parse(header).is_ok());
    // Version 1 is still read; a version this build does not know is refused by name.
    let v1 = header.replace(r#""version":2"#, r#""version":1"#);
    assert!(Line::parse(&v1).unwrap().to_item("TFS").is_ok());
    let v3 = header.replace(r#""version":2"#, r#""version":3"#);
    let e = Line::parse(&v3).unwrap().to_item("TFS").unwrap_err();
    assert!(
        e.contains("version 3 is not a version this build reads"),
        "{e}"
    );
    // The same meaning, spelt otherwise: spaces, another field order, an unknown field.
    for other in [
        r#"{"type": "header","format":"sinkbook-bundle","version":1,"project":"TFS","seals":[]}"#,
        r#"{"type":"header","version":1,"format":"sinkbook-bundle","project":"TFS","seals":[]}"#,
        r#"{"type":"header","format":"sinkbook-bundle","version":1,"project":"TFS","seals":[],"x":0}"#,
    ] {
        assert!(Line::parse(other).is_err(), "{other}");
    }
    let t = "2026-12-01T09:00:00+00:00";
    let site = Line::Site {
        code: "TF-I1".into(),
        kind: "injection-well".into(),
        area: None,
        uncertainty: None,
        registered_at: t.into(),
        row_hash: "00".repeat(32),
    };
    let err = site.to_item("TFS").unwrap_err();
    assert!(err.contains("row_hash"), "{err}");
}

#[test]
fn evidence_bytes_are_lowercase_hex() {
    let p = EvidencePart {
        part: 0,
        bytes: vec![0, 0xab, 0xff, b'\n'],
    };
    let line = p.to_line();
    assert_eq!(
        line,
        Line::Evidence {
            part: 0,
            bytes: "00abff0a".into()
        }
    );
    assert_eq!(line.to_item("TFS").unwrap(), Item::Evidence(p));
    assert!(unhex("00ABff0a").is_err());
    assert!(unhex("abc").is_err());
}
