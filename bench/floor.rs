//! The bare-parse floor for bench/run.sh: read a CSV file with the csv
//! crate on one thread, parse every field as a double (fields that are not
//! numbers, such as the group names, are counted and skipped) and print the
//! sum, so that nothing is optimised away. No columns, no groups, no
//! statistics: the least any CSV reader must do.
//! Run: cargo run --release --example bench_floor -- FILE.csv
use std::error::Error;

fn main() -> Result<(), Box<dyn Error>> {
    let path = std::env::args()
        .nth(1)
        .ok_or("usage: bench_floor FILE.csv")?;
    let mut reader = csv::ReaderBuilder::new().from_path(&path)?;
    let mut record = csv::ByteRecord::new();
    let (mut sum, mut numbers, mut words) = (0.0f64, 0u64, 0u64);
    while reader.read_byte_record(&mut record)? {
        for field in record.iter() {
            match std::str::from_utf8(field)
                .ok()
                .and_then(|s| s.parse::<f64>().ok())
            {
                Some(x) => {
                    sum += x;
                    numbers += 1;
                }
                None => words += 1,
            }
        }
    }
    println!("{numbers} numbers, {words} other fields, sum {sum}");
    Ok(())
}
