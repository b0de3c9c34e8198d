//! `report --year --out FILE.html`: one self-contained page, read back as XML, then rendered
//! by a real browser (headless Chromium) to PNG and to PDF.

mod common;
use common::Ledger;
use std::path::Path;
use std::process::Command;

/// The root of the seal the demo put on TFS's 2026, and the statements signed over it, from
/// `statements --format json`.
fn demo_seal(statements_json: &str) -> (String, Vec<String>) {
    let v: serde_json::Value = serde_json::from_str(statements_json).unwrap();
    let rows = v.as_array().expect("one table of statements");
    assert_eq!(rows.len(), 2, "{statements_json}");
    let root = rows[0]["root"].as_str().unwrap().to_string();
    assert!(rows.iter().all(|r| r["root"] == root.as_str()));
    let said = rows
        .iter()
        .map(|r| r["statement"].as_str().unwrap().to_string())
        .collect();
    (root, said)
}

/// The page of TFS's 2026 from the demo ledger (sealed and signed by the demo), and the checks
/// that it holds the seal's root and the statements over it.
fn tfs_page() -> (Ledger, String) {
    let l = Ledger::demo();
    let (root, said) = demo_seal(&l.ok(&["--format", "json", "statements", "TFS"]));
    let out = l.dir.path().join("tfs-2026.html");
    let printed = l.ok(&[
        "report",
        "TFS",
        "--year",
        "2026",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(printed.contains("Report written"), "{printed}");
    let html = std::fs::read_to_string(&out).unwrap();
    assert!(
        html.contains(&root),
        "the seal's root {root} is not on the page"
    );
    for s in said {
        assert!(html.contains(&s), "statement {s:?} is not on the page");
    }
    (l, html)
}

/// The demo's own page: the demo prints where it kept it, and it holds the seal's root and the
/// operator's and the verifier's statements, each still valid over the seal.
#[test]
fn the_demo_writes_the_annual_page_and_prints_where() {
    let dir = tempfile::tempdir().unwrap();
    let db = dir.path().join("demo.db");
    let db = db.to_str().unwrap();
    let r = common::run_without_ledger_in(dir.path(), &["--db", db, "demo"]);
    assert_eq!(r.code, 0, "{}", r.err);
    let line = r
        .out
        .lines()
        .find(|l| l.starts_with("Annual report page written to "))
        .unwrap_or_else(|| panic!("the demo names no report page: {}", r.out));
    let path = line["Annual report page written to ".len()..]
        .split(" (kept")
        .next()
        .unwrap();
    let page = Path::new(path);
    assert!(page.ends_with("tfs-2026.html"), "{path}");
    assert!(page.starts_with(dir.path()), "{path} is not in TMPDIR");
    let html = std::fs::read_to_string(page).expect("the printed page exists");
    let folder = page.parent().unwrap().to_path_buf();
    std::fs::remove_dir_all(&folder).unwrap();

    let statements =
        common::run_without_ledger(&["--db", db, "--format", "json", "statements", "TFS"]);
    assert_eq!(statements.code, 0, "{}", statements.err);
    let (root, said) = demo_seal(&statements.out);
    let doc = parse(&html);
    let body = text_of(doc.root_element());
    assert!(body.contains(&format!("root {root}")), "seal root missing");
    let table = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("table-statements"))
        .expect("a table of statements");
    let rows: Vec<String> = table
        .descendants()
        .filter(|n| n.has_tag_name("tr"))
        .skip(1)
        .map(text_of)
        .collect();
    assert_eq!(rows.len(), 2, "{rows:?}");
    for (row, (role, s)) in rows.iter().zip(["operator", "verifier"].iter().zip(&said)) {
        assert!(row.contains(role) && row.contains(s.as_str()), "{row}");
        assert!(row.contains("valid") && row.contains("yes"), "{row}");
    }
}

fn parse(html: &str) -> roxmltree::Document<'_> {
    roxmltree::Document::parse_with_options(
        html,
        roxmltree::ParsingOptions {
            allow_dtd: true,
            ..Default::default()
        },
    )
    .expect("the page is well-formed")
}

fn text_of(n: roxmltree::Node<'_, '_>) -> String {
    n.descendants()
        .filter(|d| d.is_text())
        .map(|d| d.text().unwrap())
        .collect()
}

#[test]
fn page_holds_every_section_with_headed_tables_and_nothing_from_elsewhere() {
    let (_l, html) = tfs_page();
    let doc = parse(&html);
    let tables: Vec<_> = doc
        .descendants()
        .filter(|n| n.has_tag_name("table"))
        .collect();
    assert!(tables.len() >= 8, "{} tables", tables.len());
    for t in &tables {
        let id = t.attribute("id").unwrap_or("?");
        let head = t
            .children()
            .find(|c| c.has_tag_name("thead"))
            .unwrap_or_else(|| panic!("table {id} has no header"));
        let ths = head.descendants().filter(|c| c.has_tag_name("th")).count();
        assert!(ths >= 2, "table {id}: {ths} header cells");
        for row in t.descendants().filter(|c| c.has_tag_name("tr")).skip(1) {
            let tds = row.children().filter(|c| c.has_tag_name("td")).count();
            let span = row
                .children()
                .find_map(|c| c.attribute("colspan"))
                .is_some();
            assert!(
                tds == ths || span,
                "table {id}: a row of {tds} cells under {ths} headers"
            );
        }
    }
    let body = text_of(doc.root_element());
    for section in [
        "Project and permit",
        "Mass balance by quarter",
        "Meters by quarter",
        "Leakage events and how each was quantified",
        "Uncertainty",
        "From stored to claimable",
        "Buffer pool",
        "Reconciliations",
        "Late adjustments",
        "Seal and signed statements",
    ] {
        assert!(body.contains(section), "section {section:?} missing");
    }
    // The figures are the balance command's own, to the kilogram (2026-Q2 of the demo).
    let balance = Ledger::ok(&_l, &["balance", "TFS", "--by", "quarter"]);
    for figure in ["167,455.962", "662,264.872", "0.015 t/h × 24 h × 99 d"] {
        assert!(
            balance.contains(figure) && body.contains(figure),
            "{figure}"
        );
    }
    assert!(
        body.contains("Accounting only: these figures are as good as the measurements"),
        "cautions missing"
    );
    assert!(
        body.contains("Seal seq 738 closes 2026: tree size 738, root"),
        "seal section"
    );
    // Self-contained: no script, nothing fetched; the only URIs are XML namespaces.
    for n in doc.descendants().filter(|n| n.is_element()) {
        assert_ne!(n.tag_name().name(), "script");
        assert_ne!(n.tag_name().name(), "link");
        for a in n.attributes() {
            assert!(
                !matches!(a.name(), "src" | "href") || a.value().starts_with('#'),
                "{}={}",
                a.name(),
                a.value()
            );
        }
    }
    assert!(html.contains("<svg"), "the chart is inline");
}

#[test]
fn a_project_name_with_markup_is_escaped() {
    let l = Ledger::new();
    l.ok(&[
        "project",
        "add",
        "ESC",
        "--name",
        "<b>Bold</b> & \"quoted\"",
        "--method",
        "saline-aquifer",
        "--operator",
        "O'Brien <ops>",
    ]);
    let out = l.dir.path().join("esc.html");
    l.ok(&[
        "report",
        "ESC",
        "--year",
        "2026",
        "--out",
        out.to_str().unwrap(),
    ]);
    let html = std::fs::read_to_string(&out).unwrap();
    let doc = parse(&html);
    assert!(!doc.descendants().any(|n| n.has_tag_name("b")));
    let body = text_of(doc.root_element());
    assert!(body.contains("<b>Bold</b> & \"quoted\""));
    assert!(body.contains("O'Brien <ops>"));
    assert!(body.contains("Not sealed: ESC 2026 carries no seal."));
}

#[test]
fn a_year_out_of_range_is_refused_and_nothing_written() {
    let l = Ledger::with_tfs();
    let out = l.dir.path().join("never.html");
    let r = l.run(&[
        "report",
        "TFS",
        "--year",
        "20260",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(r.err.contains("--year"), "{}", r.err);
    assert!(!out.exists());
}

/// Debian's chromium, as .ci/run installs it.
fn chromium() -> Option<&'static str> {
    ["chromium", "chromium-browser"].into_iter().find(|c| {
        Command::new(c)
            .arg("--version")
            .output()
            .is_ok_and(|o| o.status.success())
    })
}

/// Runs headless Chromium on the page with a fresh profile and no network use of its own.
fn render(browser: &str, page: &Path, flag: String) {
    let profile = tempfile::tempdir().unwrap();
    let o = Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--no-pdf-header-footer",
            "--window-size=1100,1400",
        ])
        .arg(format!("--user-data-dir={}", profile.path().display()))
        .arg(flag)
        .arg(format!("file://{}", page.display()))
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "chromium failed: {}",
        String::from_utf8_lossy(&o.stderr)
    );
}

#[test]
fn chromium_renders_the_page_to_png_and_pdf() {
    let Some(browser) = chromium() else {
        assert!(
            std::env::var("CI").is_err(),
            "chromium is missing: CI must install it (apt-get install -y chromium)"
        );
        eprintln!("skipped: chromium not installed, the page was not rendered");
        return;
    };
    let (l, html) = tfs_page();
    let page = l.dir.path().join("page.html");
    std::fs::write(&page, &html).unwrap();
    let png = l.dir.path().join("page.png");
    let pdf = l.dir.path().join("page.pdf");
    render(browser, &page, format!("--screenshot={}", png.display()));
    render(browser, &page, format!("--print-to-pdf={}", pdf.display()));

    let png_bytes = std::fs::read(&png).expect("a PNG was written");
    assert_eq!(&png_bytes[..8], b"\x89PNG\r\n\x1a\n");
    assert!(png_bytes.len() > 20_000, "PNG of {} bytes", png_bytes.len());
    let pdf_bytes = std::fs::read(&pdf).expect("a PDF was written");
    assert_eq!(&pdf_bytes[..5], b"%PDF-");
    assert!(pdf_bytes.len() > 20_000, "PDF of {} bytes", pdf_bytes.len());
    let pages = pdf_bytes
        .windows(b"/Type /Page\n".len())
        .filter(|w| w.starts_with(b"/Type /Page") && !w.starts_with(b"/Type /Pages"))
        .count();
    assert!(pages >= 2, "{pages} PDF pages");

    let colours = Command::new("python3")
        .arg(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/png_colours.py"))
        .arg(&png)
        .output()
        .expect("python3 is needed to decode the PNG");
    assert!(
        colours.status.success(),
        "{}",
        String::from_utf8_lossy(&colours.stderr)
    );
    let n: usize = String::from_utf8_lossy(&colours.stdout)
        .trim()
        .parse()
        .unwrap();
    assert!(n > 20, "the screenshot has {n} colours: a blank page");
}
