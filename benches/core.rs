//! The statistics core on 10^6 values: the cost of the figures one panel
//! row needs, after the column is in memory. Run: cargo bench --bench core
use criterion::{Criterion, criterion_group, criterion_main};
use sheaf::stats::*;
use std::hint::black_box;

fn million() -> Vec<f64> {
    let mut state = 7u64;
    (0..1_000_000)
        .map(|_| {
            state = state
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((state >> 11) as f64 / (1u64 << 53) as f64).powi(3) * 100.0
        })
        .collect()
}

fn panel_row(values: &[f64]) -> f64 {
    let s = Sample::from_values(values.iter().copied());
    let hf7 = QuantileMethod::default();
    let figures = [
        s.mean(),
        s.sd(Denominator::Sample),
        s.min(),
        s.max(),
        quartile(&s, 1, hf7),
        median(&s),
        quartile(&s, 3, hf7),
        iqr(&s, hf7),
        s.skewness(false),
        bowley(&s, hf7),
        s.kurtosis(false),
        mad(&s, true),
        trimmed_mean(&s, 0.1),
    ];
    let outliers = outliers(&s, 1.5, hf7).map(|o| o.count() as f64);
    let modes = binned_mode(&s, 20).map(|m| m[0]);
    figures
        .into_iter()
        .chain([outliers, modes])
        .map(|f| f.unwrap_or(0.0))
        .sum()
}

fn bench(c: &mut Criterion) {
    let values = million();
    let mut group = c.benchmark_group("core_1e6");
    group.sample_size(10);
    group.bench_function("moments", |b| {
        b.iter(|| Sample::from_values(black_box(&values).iter().copied()).skewness(false))
    });
    group.bench_function("sort_and_quartiles", |b| {
        b.iter(|| {
            iqr(
                &Sample::from_values(black_box(&values).iter().copied()),
                QuantileMethod::default(),
            )
        })
    });
    group.bench_function("panel_row", |b| b.iter(|| panel_row(black_box(&values))));
    group.bench_function("bootstrap_200", |b| {
        let s = Sample::from_values(values.iter().copied());
        b.iter(|| bootstrap_intervals(black_box(&s), 200, 0.95, DEFAULT_SEED))
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
