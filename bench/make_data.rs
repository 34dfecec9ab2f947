//! Synthetic benchmark data (invented numbers): 1,000,000 rows x 6 numeric
//! columns + a group column as CSV, and 200,000 rows x 6 as xlsx.
//! Run: cargo run --release --example bench_data -- bench/data
use std::io::{BufWriter, Write};

use rust_xlsxwriter::Workbook;
use sheaf::stats::SplitMix64;

const GROUPS: [&str; 5] = ["North", "Harbour", "Ridge", "Valley", "Airport"];
const COLUMNS: [&str; 6] = [
    "minutes_late",
    "weight_kg",
    "distance_km",
    "stops",
    "fuel_l",
    "parcel_value",
];

fn row(rng: &mut SplitMix64) -> (usize, [f64; 6]) {
    let g = (rng.uniform() * 5.0) as usize % 5;
    let e = |r: &mut SplitMix64| -(r.uniform().max(1e-12)).ln();
    let values = [
        (e(rng) * 8.0 - 2.0 + g as f64).round(),
        ((2.0 + 20.0 * rng.uniform() * rng.uniform()) * 100.0).round() / 100.0,
        (5.0 + 40.0 * rng.uniform()).round(),
        (rng.uniform() * 30.0).floor(),
        (3.0 + e(rng) * 2.0 * 100.0).round() / 100.0,
        (e(rng) * 60.0 * 100.0).round() / 100.0,
    ];
    (g, values)
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "bench/data".into());
    std::fs::create_dir_all(&dir)?;
    let mut rng = SplitMix64(2026);
    let mut csv = BufWriter::new(std::fs::File::create(format!("{dir}/deliveries-1m.csv"))?);
    writeln!(csv, "depot,{}", COLUMNS.join(","))?;
    for _ in 0..1_000_000 {
        let (g, v) = row(&mut rng);
        writeln!(
            csv,
            "{},{},{},{},{},{},{}",
            GROUPS[g], v[0], v[1], v[2], v[3], v[4], v[5]
        )?;
    }
    csv.flush()?;
    let mut workbook = Workbook::new();
    let sheet = workbook.add_worksheet().set_name("Deliveries")?;
    sheet.write_string(0, 0, "depot")?;
    for (c, name) in COLUMNS.iter().enumerate() {
        sheet.write_string(0, c as u16 + 1, *name)?;
    }
    for r in 1..=200_000u32 {
        let (g, v) = row(&mut rng);
        sheet.write_string(r, 0, GROUPS[g])?;
        for (c, x) in v.iter().enumerate() {
            sheet.write_number(r, c as u16 + 1, *x)?;
        }
    }
    workbook.save(format!("{dir}/deliveries-200k.xlsx"))?;
    Ok(())
}
