//! Writes the demo workbooks in workbooks/: three months of an invented
//! courier company's deliveries (every number is made up), with a few
//! typed-in outliers, a blank cell and a text cell among the numbers.
//! Run: cargo run --example make_demo
use rust_xlsxwriter::{ExcelDateTime, Format, Workbook};
use sheaf::stats::SplitMix64;

fn round(x: f64, digits: i32) -> f64 {
    let scale = 10f64.powi(digits);
    (x * scale).round() / scale
}

fn month(year: u16, month: u8, seed: u64) -> Result<(), rust_xlsxwriter::XlsxError> {
    let mut rng = SplitMix64(seed);
    let mut workbook = Workbook::new();
    let sheet = workbook.add_worksheet().set_name("Deliveries")?;
    let bold = Format::new().set_bold();
    let date_format = Format::new().set_num_format("yyyy-mm-dd");
    for (c, h) in [
        "Parcel",
        "depot",
        "status",
        "Minutes late",
        "weight_kg",
        "Delivered on",
    ]
    .iter()
    .enumerate()
    {
        sheet.write_string_with_format(0, c as u16, *h, &bold)?;
    }
    let depots = [
        ("North", 6.0, 1.0),
        ("Harbour", 11.0, 1.3),
        ("Ridge", 4.0, 0.8),
    ];
    for (row, i) in (1u32..).zip(0..240) {
        let (depot, late_scale, weight_scale) = depots[i % 3];
        let u = rng.uniform();
        let status = if u < 0.06 {
            "cancelled"
        } else if u < 0.10 {
            "returned"
        } else {
            "delivered"
        };
        // Lateness: mostly small, skewed right (sum of two exponentials), in minutes.
        let late = round(
            -late_scale * (rng.uniform().max(1e-12).ln() + rng.uniform().max(1e-12).ln()) - 3.0,
            1,
        );
        let weight = round(
            weight_scale * (2.0 + 18.0 * rng.uniform() * rng.uniform() + 4.0 * rng.uniform()),
            2,
        );
        let day = 1 + (i % 28) as u8;
        sheet.write_string(row, 0, format!("P{year}{month:02}-{i:04}"))?;
        sheet.write_string(row, 1, depot)?;
        sheet.write_string(row, 2, status)?;
        sheet.write_number(row, 3, late)?;
        sheet.write_number(row, 4, weight)?;
        sheet.write_datetime_with_format(
            row,
            5,
            ExcelDateTime::from_ymd(year, month, day)?,
            &date_format,
        )?;
    }
    // Typed-in mistakes an analyst meets every month (invented).
    sheet.write_number(17, 3, 900.0)?; // minutes typed without the decimal point
    sheet.write_number(40, 4, 250.0)?; // 25.0 kg typed as 250
    sheet.write_string(63, 4, "n/a")?; // text among the weights
    sheet.write_blank(88, 3, &Format::new())?; // a blank lateness
    sheet.write_string(88, 3, "")?;
    if month == 10 {
        sheet.write_number(120, 3, -45.0)?; // an early delivery typed with the wrong sign
    }
    workbook.save(format!("workbooks/depot-{year}-{month:02}.xlsx"))?;
    Ok(())
}

fn main() -> Result<(), rust_xlsxwriter::XlsxError> {
    for (m, seed) in [(8u8, 801u64), (9, 901), (10, 1001)] {
        month(2026, m, seed)?;
    }
    Ok(())
}
