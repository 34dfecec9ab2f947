//! The JSON of `run --json`: the committed schema is the one the types
//! generate, and real output (a single run, a batch with its trend, a
//! comparison) validates against it and keeps its promised shapes.
//! After a deliberate change of the report types, regenerate the schema
//! with `SHEAF_BLESS=1 cargo test --test json_schema` and review its diff.

mod common;

use std::path::Path;

use common::{root, sheaf, text};
use serde_json::Value;

const SCHEMA: &str = "schema/sheaf-report.schema.json";

#[test]
fn the_committed_schema_is_generated_from_the_types() {
    let generated = sheaf::report::schema();
    let path = root().join(SCHEMA);
    if std::env::var_os("SHEAF_BLESS").is_some() {
        std::fs::write(&path, &generated).unwrap();
    }
    let committed = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        committed == generated,
        "{SCHEMA} is stale; regenerate it with SHEAF_BLESS=1 cargo test --test json_schema"
    );
}

fn validator() -> jsonschema::Validator {
    let schema: Value = serde_json::from_str(&sheaf::report::schema()).unwrap();
    jsonschema::validator_for(&schema).unwrap()
}

/// Every line of standard output, each checked against the schema.
fn documents(stdout: &[u8]) -> Vec<Value> {
    let validator = validator();
    let lines: Vec<Value> = String::from_utf8_lossy(stdout)
        .lines()
        .map(|l| serde_json::from_str(l).unwrap_or_else(|e| panic!("not JSON ({e}): {l}")))
        .collect();
    for doc in &lines {
        let errors: Vec<String> = validator.iter_errors(doc).map(|e| e.to_string()).collect();
        assert!(errors.is_empty(), "{errors:#?}");
        assert_eq!(doc["version"], sheaf::report::REPORT_VERSION);
    }
    lines
}

/// Object keys are snake_case everywhere except inside a figures block's
/// `figures`, whose keys are the recipe's own names.
fn assert_snake_case(v: &Value, path: &str) {
    match v {
        Value::Object(map) => {
            for (k, child) in map {
                let user_names = path.ends_with("rows[].figures");
                assert!(
                    user_names
                        || k.chars()
                            .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_'),
                    "key {k:?} at {path}"
                );
                assert_snake_case(child, &format!("{path}.{k}"));
            }
        }
        Value::Array(items) => items
            .iter()
            .for_each(|i| assert_snake_case(i, &format!("{path}[]"))),
        _ => {}
    }
}

fn demo() -> (String, String) {
    let w = root().join("workbooks");
    (
        w.join("depot-monthly.sheaf").display().to_string(),
        w.join("depot-2026-10.xlsx").display().to_string(),
    )
}

#[test]
fn a_single_run_prints_one_valid_document_with_everything_the_workbook_holds() {
    let dir = tempfile::tempdir().unwrap();
    let (recipe, data) = demo();
    let o = sheaf(
        &["run", &recipe, "--data", &data, "--out", "r.xlsx", "--json"],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let docs = documents(&o.stdout);
    assert_eq!(docs.len(), 1);
    let doc = &docs[0];
    assert_snake_case(doc, "");
    assert_eq!(doc["kind"], "result");
    assert_eq!(doc["output"], "r.xlsx");
    assert_eq!(doc["run_time"], "2026-11-01T09:00:00Z");
    assert_eq!(doc["period"]["label"], "2026-10");
    assert_eq!(doc["period"]["source"], "file_name");
    assert_eq!(doc["recipe"]["fingerprint"].as_str().unwrap().len(), 24);
    assert_eq!(doc["input"]["sha256"].as_str().unwrap().len(), 64);
    let panel = &doc["blocks"][0];
    assert_eq!(panel["kind"], "panel");
    let entry = &panel["entries"][0];
    // Stable keys from the panel table (labels "Bowley skewness", "Q1").
    assert!(entry["figures"]["bowley_skewness"].is_number(), "{entry}");
    assert!(entry["figures"]["q1"].is_number());
    let robustness = &entry["robustness"];
    for key in ["outliers_1_5_iqr", "largest_mean_influence", "bootstrap"] {
        assert!(!robustness[key].is_null(), "{key}: {robustness}");
    }
    // An outlier names its cell with the number as the input holds it and
    // the value used: Harbour's typed-in 900 minutes, used as 15 hours by
    // `late_h = {Minutes late} / 60`. A column read as it is (weight_kg)
    // has the same number in both.
    let entry_of = |group: &str, column: &str| {
        panel["entries"]
            .as_array()
            .unwrap()
            .iter()
            .find(|e| e["group"][0] == group && e["column"] == column)
            .unwrap_or_else(|| panic!("no entry {group} {column}"))
            .clone()
    };
    let harbour = entry_of("Harbour", "late_h");
    let far = &harbour["robustness"]["outliers_3_iqr"][0];
    assert_eq!(far["cell"], "Deliveries!D18", "{far}");
    assert_eq!(far["input_value"], 900.0, "{far}");
    assert_eq!(far["value"], 15.0, "{far}");
    let influence = &harbour["robustness"]["largest_mean_influence"];
    assert_eq!(influence["input_value"], 900.0, "{influence}");
    let north = entry_of("North", "weight_kg");
    let far = &north["robustness"]["outliers_3_iqr"][0];
    assert_eq!(far["cell"], "Deliveries!E41", "{far}");
    assert_eq!(
        (&far["input_value"], &far["value"]),
        (&250.0.into(), &250.0.into())
    );
    // Checks carry their level; a check that could not be evaluated says why.
    let checks = doc["checks"].as_array().unwrap();
    assert!(checks.iter().any(|c| c["level"] == "fail"));
    let steady = checks
        .iter()
        .find(|c| c["name"] == "steady on-time share")
        .unwrap();
    assert_eq!(steady["level"], "warn");
    assert!(steady["value"]["reason"].is_string(), "{steady}");
    assert!(doc["changes"].is_null());
}

#[test]
fn a_batch_prints_json_lines_one_per_file_then_the_trend() {
    let dir = tempfile::tempdir().unwrap();
    let (recipe, _) = demo();
    let pattern = root().join("workbooks/depot-2026-*.xlsx");
    let o = sheaf(
        &[
            "run",
            &recipe,
            "--data",
            pattern.to_str().unwrap(),
            "--out-dir",
            "out",
            "--json",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let docs = documents(&o.stdout);
    let kinds: Vec<&str> = docs.iter().map(|d| d["kind"].as_str().unwrap()).collect();
    assert_eq!(kinds, ["result", "result", "result", "trend"]);
    // From the second period on, each file is compared with the one before.
    assert!(docs[0]["changes"].is_null());
    let changes = &docs[1]["changes"];
    assert_eq!(changes["previous_period"], "2026-08");
    let figures = changes["figures"].as_array().unwrap();
    assert!(figures.iter().any(|f| f["moved"] == true));
    // A panel mean carries its standard error (Welch) and the change in its units;
    // a shape figure has none.
    let mean = figures
        .iter()
        .find(|f| f["figure"].as_str().is_some_and(|n| n.ends_with(" mean")))
        .expect("a panel mean among the changes");
    let (se, z) = (
        mean["standard_error"].as_f64().unwrap(),
        mean["change_in_standard_errors"].as_f64().unwrap(),
    );
    assert!(se > 0.0 && (z - mean["change"].as_f64().unwrap() / se).abs() < 1e-12);
    let shape = figures
        .iter()
        .find(|f| {
            f["figure"]
                .as_str()
                .is_some_and(|n| n.ends_with("skewness_g1"))
        })
        .expect("a skewness among the changes");
    assert!(shape["standard_error"].is_null());
    for f in figures {
        let (now, previous) = (f["now"].as_f64().unwrap(), f["previous"].as_f64().unwrap());
        assert!((f["change"].as_f64().unwrap() - (now - previous)).abs() < 1e-12);
    }
    let trend = &docs[3];
    assert_eq!(
        trend["periods"],
        serde_json::json!(["2026-08", "2026-09", "2026-10"])
    );
    assert!(Path::new(&dir.path().join(trend["output"].as_str().unwrap())).exists());
    assert_snake_case(trend, "");
}

#[test]
fn the_schema_refuses_a_document_that_breaks_its_promises() {
    let dir = tempfile::tempdir().unwrap();
    let (recipe, data) = demo();
    let o = sheaf(&["run", &recipe, "--data", &data, "--json"], dir.path());
    let good: Value = serde_json::from_slice(&o.stdout).unwrap();
    let validator = validator();
    assert!(validator.is_valid(&good));
    let mut no_version = good.clone();
    no_version.as_object_mut().unwrap().remove("version");
    assert!(!validator.is_valid(&no_version));
    // A display label as a key instead of the snake_case one.
    let mut label_key = good.clone();
    let figures = label_key["blocks"][0]["entries"][0]["figures"]
        .as_object_mut()
        .unwrap();
    let v = figures.remove("bowley_skewness").unwrap();
    figures.insert("Bowley skewness".into(), v);
    assert!(!validator.is_valid(&label_key));
    // A figure with no value is {"reason": ...}, not a bare string list.
    let mut bad_value = good;
    bad_value["blocks"][0]["entries"][0]["figures"]["mean"] = serde_json::json!({"why": "x"});
    assert!(!validator.is_valid(&bad_value));
}

/// Invented shipping dates, as a workbook with date cells: (region,
/// shipped). 2026-10-01 is serial 46296 and 2026-11-02 is 46328 (days since
/// 1899-12-30, from Python's date arithmetic).
const SHIPPED: &[(&str, &str)] = &[
    ("North", "2026-10-01"),
    ("South", "2026-10-20"),
    ("North", "2026-11-02"),
    ("South", "2026-11-30"),
];

fn shipping_workbook(dir: &Path) -> String {
    let path = dir.join("shipping.xlsx");
    let mut book = rust_xlsxwriter::Workbook::new();
    let sheet = book.add_worksheet();
    let day = rust_xlsxwriter::Format::new().set_num_format("yyyy-mm-dd");
    sheet.write_string(0, 0, "region").unwrap();
    sheet.write_string(0, 1, "shipped").unwrap();
    for (i, (region, shipped)) in SHIPPED.iter().enumerate() {
        let serial = sheaf::format::serial_from_calendar(shipped).unwrap();
        sheet.write_string(i as u32 + 1, 0, *region).unwrap();
        sheet
            .write_number_with_format(i as u32 + 1, 1, serial, &day)
            .unwrap();
    }
    book.save(&path).unwrap();
    path.display().to_string()
}

#[test]
fn date_figures_are_dates_in_json_in_the_workbook_and_on_the_terminal() {
    let dir = tempfile::tempdir().unwrap();
    let data = shipping_workbook(dir.path());
    let recipe = dir.path().join("r.sheaf");
    std::fs::write(
        &recipe,
        "let month = month_of(shipped)\nfigures \"Shipping\" per month:\n    first = min(shipped)\n    span = range(shipped)\n",
    )
    .unwrap();
    let o = sheaf(
        &[
            "run",
            recipe.to_str().unwrap(),
            "--data",
            &data,
            "--out",
            "r.xlsx",
            "--json",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let doc = &documents(&o.stdout)[0];
    let rows = &doc["blocks"][0]["rows"];
    assert_eq!(rows[0]["group"][0], "2026-10");
    assert_eq!(rows[0]["figures"]["first"], "2026-10-01");
    assert_eq!(rows[0]["figures"]["span"], 19.0);
    assert_eq!(rows[1]["group"][0], "2026-11");
    assert_eq!(rows[1]["figures"]["first"], "2026-11-02");
    assert_eq!(rows[1]["figures"]["span"], 28.0);
    // In the workbook the figure is a date cell holding the serial.
    let cells = common::cells(&dir.path().join("r.xlsx"), "Shipping");
    let row = cells
        .iter()
        .find(|r| r.first().is_some_and(|c| *c == "2026-10"))
        .expect("a row for 2026-10");
    match &row[2] {
        calamine::Data::DateTime(d) => assert_eq!(d.as_f64(), 46296.0),
        other => panic!("not a date cell: {other:?}"),
    }
    assert_eq!(row[3], calamine::Data::Float(19.0));
    // On the terminal, ISO dates; a date with a time of day shows it.
    let calc = |e: &str| text(&sheaf(&["calc", e, "--data", &data], dir.path()));
    assert_eq!(calc("max(shipped)"), "2026-11-30\n");
    assert_eq!(calc("median(shipped)"), "2026-10-26 12:00:00\n");
    assert_eq!(calc("week_of(min(shipped))"), "2026-W40\n");
}
