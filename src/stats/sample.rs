//! One column's non-missing values, with the shared sort and moments cached.

use std::sync::OnceLock;

use super::moments::Moments;
use super::summation::Neumaier;
use super::undefined::{Stat, Undefined, need};

/// The numeric values of one column (or one group of it), with the count of
/// cells that were missing. Order statistics share one sorted copy and shape
/// statistics share one pass of central moments; both are made on first use.
#[derive(Debug)]
pub struct Sample {
    values: Vec<f64>,
    /// For each value, its index in the column it came from (for cell
    /// addresses); None while there has been no gap, when it is the identity.
    positions: Option<Vec<u32>>,
    missing: usize,
    sorted: OnceLock<Vec<f64>>,
    moments: OnceLock<Moments>,
}

impl Sample {
    /// Takes a column with gaps. `None` and non-finite numbers count as missing.
    pub fn from_column(column: impl IntoIterator<Item = Option<f64>>) -> Sample {
        let column = column.into_iter();
        let mut values = Vec::with_capacity(column.size_hint().0);
        let mut positions: Option<Vec<u32>> = None;
        let mut missing = 0;
        for (i, cell) in column.enumerate() {
            match cell {
                Some(x) if x.is_finite() => {
                    values.push(x);
                    if let Some(p) = positions.as_mut() {
                        p.push(i as u32);
                    }
                }
                _ => {
                    missing += 1;
                    // The first gap: positions stop being the identity.
                    positions.get_or_insert_with(|| (0..values.len() as u32).collect());
                }
            }
        }
        Sample::build(values, positions, missing)
    }

    /// Takes values that are all present. Non-finite numbers count as missing.
    pub fn from_values(values: impl IntoIterator<Item = f64>) -> Sample {
        Sample::from_column(values.into_iter().map(Some))
    }

    /// The entries of `numbers` (NaN where missing) at `rows`: one gather,
    /// and the general path only when something is missing.
    pub fn at_rows(numbers: &[f64], rows: &[u32]) -> Sample {
        let values: Vec<f64> = rows.iter().map(|&r| numbers[r as usize]).collect();
        if values.iter().all(|x| x.is_finite()) {
            return Sample::build(values, None, 0);
        }
        Sample::from_column(values.into_iter().map(Some))
    }

    /// Takes ownership of values already known to be finite, without a copy.
    pub(crate) fn from_finite(values: Vec<f64>) -> Sample {
        debug_assert!(values.iter().all(|x| x.is_finite()));
        Sample::build(values, None, 0)
    }

    fn build(values: Vec<f64>, positions: Option<Vec<u32>>, missing: usize) -> Sample {
        Sample {
            values,
            positions,
            missing,
            sorted: OnceLock::new(),
            moments: OnceLock::new(),
        }
    }

    /// Values in the order they were given.
    pub fn values(&self) -> &[f64] {
        &self.values
    }

    /// The index, in the column it was built from, of the cell of value i.
    pub fn position(&self, i: usize) -> usize {
        match &self.positions {
            Some(p) => p[i] as usize,
            None => i,
        }
    }

    /// Values in ascending order; sorted once, on first use.
    pub fn sorted(&self) -> &[f64] {
        self.sorted.get_or_init(|| sorted_copy(&self.values))
    }

    /// Central moments; computed once, on first use.
    pub fn moments(&self) -> Stat<&Moments> {
        need(self.count(), 1)?;
        Ok(self.moments.get_or_init(|| Moments::of(&self.values)))
    }

    /// The number of numeric values.
    pub fn count(&self) -> usize {
        self.values.len()
    }

    /// The number of cells without a number (blank, text, error).
    pub fn missing(&self) -> usize {
        self.missing
    }

    /// True when there is no numeric value.
    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// The compensated (Neumaier) sum of the values; 0 for none.
    pub fn sum(&self) -> f64 {
        Neumaier::of(self.values.iter().copied())
    }

    /// The smallest value.
    pub fn min(&self) -> Stat {
        self.extreme(|a, b| a.min(b))
    }

    /// The largest value.
    pub fn max(&self) -> Stat {
        self.extreme(|a, b| a.max(b))
    }

    fn extreme(&self, pick: fn(f64, f64) -> f64) -> Stat {
        // The sorted copy, if it already exists, answers without a pass.
        if let Some(sorted) = self.sorted.get() {
            return match (sorted.first(), sorted.last()) {
                (Some(&lo), Some(&hi)) => Ok(if pick(lo, hi) == lo { lo } else { hi }),
                _ => Err(Undefined::NoValues),
            };
        }
        self.values
            .iter()
            .copied()
            .reduce(pick)
            .ok_or(Undefined::NoValues)
    }

    /// max - min.
    pub fn range(&self) -> Stat {
        Ok(self.max()? - self.min()?)
    }

    /// True when every value is the same (shape statistics are undefined then).
    /// (Stops at the first value that differs from the first, so it costs
    /// nothing on ordinary data.)
    pub fn is_constant(&self) -> bool {
        match self.values.split_first() {
            Some((&first, rest)) => rest.iter().all(|&x| x == first),
            None => false,
        }
    }

    /// The arithmetic mean.
    pub fn mean(&self) -> Stat {
        Ok(self.moments()?.mean)
    }
}

/// The values in `f64::total_cmp` order. Each double maps to a u64 whose
/// unsigned order is that order (negatives have every bit flipped, others
/// only the sign bit), and integers sort faster than doubles compared
/// through `total_cmp`; the result is the same, bit for bit.
fn sorted_copy(values: &[f64]) -> Vec<f64> {
    if let Some(sorted) = counting_sort(values) {
        return sorted;
    }
    let mut keys: Vec<u64> = values
        .iter()
        .map(|x| {
            let bits = x.to_bits();
            if bits >> 63 == 1 {
                !bits
            } else {
                bits ^ (1 << 63)
            }
        })
        .collect();
    keys.sort_unstable();
    keys.into_iter()
        .map(|k| f64::from_bits(if k >> 63 == 1 { k ^ (1 << 63) } else { !k }))
        .collect()
}

/// True for a whole number. Every double of 2^52 or more in size is whole;
/// below that, truncating to an integer is exact and cheap (`fract` calls
/// a library function on baseline x86-64).
pub fn is_whole(x: f64) -> bool {
    x.abs() >= 4_503_599_627_370_496.0 || x == (x as i64) as f64
}

/// Whole numbers spanning no more values than there are: counted, not
/// compared (counts, minutes, stops). None for anything else, including
/// -0.0, which `total_cmp` puts before 0.0.
fn counting_sort(values: &[f64]) -> Option<Vec<f64>> {
    const EXACT: f64 = 9_007_199_254_740_992.0; // 2^53: every whole number below is a double
    let first = *values.first()?;
    let (mut lo, mut hi) = (first, first);
    for &x in values {
        if !is_whole(x) || x.to_bits() == (-0.0f64).to_bits() {
            return None;
        }
        lo = lo.min(x);
        hi = hi.max(x);
    }
    if hi - lo > values.len() as f64 || lo.abs().max(hi.abs()) >= EXACT {
        return None;
    }
    let mut counts = vec![0u32; (hi - lo) as usize + 1];
    for &x in values {
        counts[(x - lo) as usize] += 1;
    }
    let mut sorted = Vec::with_capacity(values.len());
    for (offset, &count) in counts.iter().enumerate() {
        sorted.extend(std::iter::repeat_n(lo + offset as f64, count as usize));
    }
    Some(sorted)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gaps_and_non_finite_values_count_as_missing() {
        let s = Sample::from_column([
            Some(2.0),
            None,
            Some(f64::NAN),
            Some(5.0),
            Some(f64::INFINITY),
        ]);
        assert_eq!(s.count(), 2);
        assert_eq!(s.missing(), 3);
        assert_eq!((s.position(0), s.position(1)), (0, 3));
        let whole = Sample::from_values([4.0, 5.0]);
        assert_eq!(whole.position(1), 1);
        assert_eq!(s.sum(), 7.0);
        let gathered = Sample::at_rows(&[1.0, f64::NAN, 3.0, 4.0], &[3, 1, 2]);
        assert_eq!(
            (gathered.values(), gathered.missing()),
            (&[4.0, 3.0][..], 1)
        );
        assert_eq!((gathered.position(0), gathered.position(1)), (0, 2));
    }

    #[test]
    fn sorting_by_bits_matches_total_cmp() {
        let values = [
            3.5,
            -0.0,
            0.0,
            -2.25,
            f64::MIN_POSITIVE,
            -f64::MIN_POSITIVE,
            1e300,
            -1e300,
            7.0,
            3.5,
        ];
        let mut expected = values.to_vec();
        expected.sort_unstable_by(f64::total_cmp);
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        assert_eq!(bits(&sorted_copy(&values)), bits(&expected));
        // Whole numbers take the counting path; -0.0 keeps them off it.
        let whole: Vec<f64> = (0..500).map(|i| f64::from((i * 37) % 91) - 40.0).collect();
        assert!(counting_sort(&whole).is_some());
        let mut expected = whole.clone();
        expected.sort_unstable_by(f64::total_cmp);
        assert_eq!(bits(&sorted_copy(&whole)), bits(&expected));
        assert!(counting_sort(&[3.0, -0.0, 1.0]).is_none());
        assert!(counting_sort(&[1.0, 1e9]).is_none(), "too wide a span");
        for (x, whole) in [
            (3.0, true),
            (-2.5, false),
            (1e300, true),
            (0.1, false),
            (-0.0, true),
        ] {
            assert_eq!(is_whole(x), whole, "{x}");
            assert_eq!(is_whole(x), x.fract() == 0.0, "{x}");
        }
    }

    #[test]
    fn empty_sample_has_no_extremes() {
        let s = Sample::from_values([]);
        assert_eq!(s.min(), Err(Undefined::NoValues));
        assert_eq!(s.range(), Err(Undefined::NoValues));
        assert_eq!(s.mean(), Err(Undefined::NoValues));
    }

    #[test]
    fn extremes_agree_before_and_after_sorting() {
        let s = Sample::from_values([3.0, -1.0, 7.5, 2.0]);
        assert_eq!((s.min(), s.max()), (Ok(-1.0), Ok(7.5)));
        let _ = s.sorted();
        assert_eq!((s.min(), s.max()), (Ok(-1.0), Ok(7.5)));
        assert_eq!(s.range(), Ok(8.5));
    }
}
