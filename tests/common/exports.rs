//! Messy monthly exports, made up for the tests: a packing plant weighing
//! cereal boxes on its filling lines (every number is invented). Each file
//! has one of the habits real exports have: decimal commas, a Windows or
//! UTF-16 encoding, a `sep=` line, title rows, blank separator rows, Total
//! and Average rows, numbers stored as text, keys with stray spaces or
//! another case, the data on a second sheet, a renamed header, units in the
//! cells. `examples/make_exports.rs` writes the same files to
//! tests/fixtures/exports/ for people to open.
#![allow(dead_code)]

use std::path::Path;

use rust_xlsxwriter::{Workbook, XlsxError};

/// The box weights (grams) of the filling lines, in sheet order. The
/// figures the tests expect are computed from these, never from sheaf.
pub const LINE_A: [f64; 4] = [500.25, 499.75, 501.0, 500.5];
pub const LINE_B: [f64; 3] = [498.5, 1499.25, 500.0];

/// Every weight of the data rows.
pub fn all_weights() -> Vec<f64> {
    LINE_A.iter().chain(LINE_B.iter()).copied().collect()
}

/// `1499,25` and `1.499,25`: a weight as a decimal-comma export writes it.
fn comma(x: f64, group: bool) -> String {
    let plain = format!("{x}");
    let (whole, fraction) = plain.split_once('.').unwrap_or((&plain, ""));
    let whole = if group && whole.len() > 3 {
        format!(
            "{}.{}",
            &whole[..whole.len() - 3],
            &whole[whole.len() - 3..]
        )
    } else {
        whole.to_string()
    };
    if fraction.is_empty() {
        whole
    } else {
        format!("{whole},{fraction}")
    }
}

/// Rows of (line, box, weight) in sheet order; keys spelled as exports do.
fn rows() -> Vec<(&'static str, String, f64)> {
    let spellings = ["Line A", "Line A ", "line A", "Line A"];
    let mut out = Vec::new();
    for (i, w) in LINE_A.iter().enumerate() {
        out.push((spellings[i], format!("A-{}", i + 1), *w));
    }
    for (i, w) in LINE_B.iter().enumerate() {
        out.push(("Line B", format!("B-{}", i + 1), *w));
    }
    out
}

/// `;`-separated, decimal commas with thousands points, a `sep=;` first
/// line and a Windows-1252 key (`Küche`, the canteen's scale).
pub fn semicolon_csv(path: &Path) {
    let mut text = String::from("sep=;\nline;box;weight_g;note\n");
    for (line, b, w) in rows() {
        text.push_str(&format!("{};{b};{};\n", line, comma(w, true)));
    }
    text.push_str("Küche;K-1;12,5;canteen\n");
    let (bytes, _, _) = encoding_rs::WINDOWS_1252.encode(&text);
    std::fs::write(path, bytes).unwrap();
}

/// Tab-separated UTF-16 with a byte-order mark, thousands grouped by spaces.
pub fn utf16_tsv(path: &Path) {
    let mut text = String::from("line\tweight_g\n");
    for (line, _, w) in rows() {
        let shown = comma(w, false);
        let shown = if shown.len() > 6 {
            format!("{} {}", &shown[..1], &shown[1..])
        } else {
            shown
        };
        text.push_str(&format!("{}\t{shown}\n", line.trim()));
    }
    let mut bytes = vec![0xFF, 0xFE];
    text.encode_utf16()
        .for_each(|u| bytes.extend(u.to_le_bytes()));
    std::fs::write(path, bytes).unwrap();
}

/// A title, an export line and a blank row above the headers on row 4;
/// a blank separator row in the data; Total and Average rows at the bottom.
pub fn titled_xlsx(path: &Path) -> Result<(), XlsxError> {
    let mut workbook = Workbook::new();
    let sheet = workbook.add_worksheet().set_name("Weights")?;
    sheet.write_string(0, 0, "Box weights, October 2026 (invented data)")?;
    sheet.write_string(1, 0, "exported 2026-11-01 06:00")?;
    for (c, h) in ["line", "box", "weight_g", "operator"].iter().enumerate() {
        sheet.write_string(3, c as u16, *h)?;
    }
    let mut r = 4;
    for (i, (line, b, w)) in rows().into_iter().enumerate() {
        if i == 4 {
            r += 1; // a blank separator row between the lines
        }
        sheet.write_string(r, 0, line)?;
        sheet.write_string(r, 1, &b)?;
        sheet.write_number(r, 2, w)?;
        sheet.write_string(r, 3, if i % 2 == 0 { "kim" } else { "ola" })?;
        r += 1;
    }
    let weights = all_weights();
    let sum: f64 = weights.iter().sum();
    sheet.write_string(r, 0, "Total")?;
    sheet.write_number(r, 2, sum)?;
    sheet.write_string(r + 1, 0, "Average")?;
    sheet.write_number(r + 1, 2, sum / weights.len() as f64)?;
    workbook.save(path)
}

/// Every weight stored as text (`"500.25"`), as some exports do.
pub fn text_numbers_xlsx(path: &Path) -> Result<(), XlsxError> {
    let mut workbook = Workbook::new();
    let sheet = workbook.add_worksheet().set_name("Weights")?;
    sheet.write_string(0, 0, "line")?;
    sheet.write_string(0, 1, "weight_g")?;
    for (i, (line, _, w)) in rows().into_iter().enumerate() {
        sheet.write_string(i as u32 + 1, 0, line.trim())?;
        sheet.write_string(i as u32 + 1, 1, format!("{w:.2}"))?;
    }
    workbook.save(path)
}

/// A cover sheet first; the data on sheet "Weights", its weight header
/// renamed from `Weight (g)` to `Weight [g]`.
pub fn two_sheets_xlsx(path: &Path, weight_header: &str) -> Result<(), XlsxError> {
    let mut workbook = Workbook::new();
    let cover = workbook.add_worksheet().set_name("Cover")?;
    cover.write_string(0, 0, "Filling lines, monthly export (invented data)")?;
    cover.write_string(1, 0, "see sheet Weights")?;
    let sheet = workbook.add_worksheet().set_name("Weights")?;
    sheet.write_string(0, 0, "line")?;
    sheet.write_string(0, 1, weight_header)?;
    for (i, (line, _, w)) in rows().into_iter().enumerate() {
        sheet.write_string(i as u32 + 1, 0, line.trim())?;
        sheet.write_number(i as u32 + 1, 1, w)?;
    }
    workbook.save(path)
}

/// Weights written with their unit in the cell (`500.25 g`).
pub fn units_csv(path: &Path) {
    let mut text = String::from("line,weight_g\n");
    for (line, _, w) in rows() {
        text.push_str(&format!("{},{w} g\n", line.trim()));
    }
    std::fs::write(path, text).unwrap();
}

/// Every fixture, by file name, written into `dir`.
pub fn write_all(dir: &Path) -> Result<(), XlsxError> {
    semicolon_csv(&dir.join("weights-semicolon.csv"));
    utf16_tsv(&dir.join("weights-utf16.tsv"));
    titled_xlsx(&dir.join("weights-titled.xlsx"))?;
    text_numbers_xlsx(&dir.join("weights-text-numbers.xlsx"))?;
    two_sheets_xlsx(&dir.join("weights-two-sheets.xlsx"), "Weight (g)")?;
    two_sheets_xlsx(&dir.join("weights-renamed.xlsx"), "Weight [g]")?;
    units_csv(&dir.join("weights-units.csv"));
    Ok(())
}
