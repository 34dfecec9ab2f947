//! Synthetic benchmark data (invented numbers): 1,000,000 rows x 6 numeric
//! columns + a group column as CSV, and 200,000 rows x 6 as xlsx.
//! Run: cargo run --release --example bench_data -- bench/data
//! For the scaling table, any number of rows in any number of groups:
//! cargo run --release --example bench_data -- bench/data ROWS GROUPS
//! writes bench/data/deliveries-ROWSr-GROUPSg.csv (groups named depot-00001...).
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

fn row(rng: &mut SplitMix64, groups: usize) -> (usize, [f64; 6]) {
    let g = (rng.uniform() * groups as f64) as usize % groups;
    let e = |r: &mut SplitMix64| -(r.uniform().max(1e-12)).ln();
    let values = [
        (e(rng) * 8.0 - 2.0 + (g % 5) as f64).round(),
        ((2.0 + 20.0 * rng.uniform() * rng.uniform()) * 100.0).round() / 100.0,
        (5.0 + 40.0 * rng.uniform()).round(),
        (rng.uniform() * 30.0).floor(),
        (3.0 + e(rng) * 2.0 * 100.0).round() / 100.0,
        (e(rng) * 60.0 * 100.0).round() / 100.0,
    ];
    (g, values)
}

/// Writes `rows` rows in `groups` groups as CSV, named by `name`.
fn write_csv(
    path: &str,
    rng: &mut SplitMix64,
    rows: usize,
    groups: usize,
    name: impl Fn(usize) -> String,
) -> std::io::Result<()> {
    let mut csv = BufWriter::new(std::fs::File::create(path)?);
    writeln!(csv, "depot,{}", COLUMNS.join(","))?;
    for _ in 0..rows {
        let (g, v) = row(rng, groups);
        writeln!(
            csv,
            "{},{},{},{},{},{},{}",
            name(g),
            v[0],
            v[1],
            v[2],
            v[3],
            v[4],
            v[5]
        )?;
    }
    csv.flush()
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let dir = args.first().cloned().unwrap_or_else(|| "bench/data".into());
    std::fs::create_dir_all(&dir)?;
    if let [_, rows, groups] = args.as_slice() {
        let (rows, groups): (usize, usize) = (rows.parse()?, groups.parse()?);
        let path = format!("{dir}/deliveries-{rows}r-{groups}g.csv");
        let mut rng = SplitMix64(2026 + groups as u64);
        return Ok(write_csv(&path, &mut rng, rows, groups, |g| {
            format!("depot-{:05}", g + 1)
        })?);
    }
    let mut rng = SplitMix64(2026);
    let path = format!("{dir}/deliveries-1m.csv");
    write_csv(&path, &mut rng, 1_000_000, GROUPS.len(), |g| {
        GROUPS[g].to_string()
    })?;
    let mut workbook = Workbook::new();
    let sheet = workbook.add_worksheet().set_name("Deliveries")?;
    sheet.write_string(0, 0, "depot")?;
    for (c, name) in COLUMNS.iter().enumerate() {
        sheet.write_string(0, c as u16 + 1, *name)?;
    }
    for r in 1..=200_000u32 {
        let (g, v) = row(&mut rng, GROUPS.len());
        sheet.write_string(r, 0, GROUPS[g])?;
        for (c, x) in v.iter().enumerate() {
            sheet.write_number(r, c as u16 + 1, *x)?;
        }
    }
    workbook.save(format!("{dir}/deliveries-200k.xlsx"))?;
    Ok(())
}
