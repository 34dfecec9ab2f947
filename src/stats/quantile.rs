//! Sample quantiles: the nine types of Hyndman and Fan (1996) and Tukey's hinges.

use super::undefined::{Stat, Undefined};

/// How a quantile is read off the sorted values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum QuantileMethod {
    /// Hyndman and Fan (1996) type 1 to 9.
    HyndmanFan(u8),
    /// Tukey's (1977) hinges: the medians of the lower and upper halves,
    /// each half including the median when n is odd. Defined for the
    /// quartiles only (and 0 and 1, the extremes).
    Hinges,
}

impl Default for QuantileMethod {
    /// Type 7, the linear interpolation most spreadsheet programs use.
    fn default() -> Self {
        QuantileMethod::HyndmanFan(7)
    }
}

impl QuantileMethod {
    /// The option word used in recipes and notes: `hf1` ... `hf9`, `hinges`.
    pub fn word(self) -> String {
        match self {
            QuantileMethod::HyndmanFan(t) => format!("hf{t}"),
            QuantileMethod::Hinges => "hinges".to_string(),
        }
    }

    /// The method a recipe option names (`hinges` or `hf1` to `hf9`); None otherwise.
    pub fn from_word(word: &str) -> Option<QuantileMethod> {
        if word == "hinges" {
            return Some(QuantileMethod::Hinges);
        }
        let t: u8 = word.strip_prefix("hf")?.parse().ok()?;
        (1..=9)
            .contains(&t)
            .then_some(QuantileMethod::HyndmanFan(t))
    }
}

/// The p-quantile (p in [0, 1]) of values sorted ascending.
pub fn quantile_sorted(sorted: &[f64], p: f64, method: QuantileMethod) -> Stat {
    quantile_about(sorted, p, method, 0.0)
}

/// The p-quantile minus `centre`, computed as (lo - centre) + gamma (hi - lo)
/// from the two order statistics it lies between. With `centre` a data
/// value near the quantile, both differences are exact or nearly so, so the
/// result keeps its digits when the data sit far from zero (1e8 + small
/// values), where Q - centre computed after Q would not.
pub fn quantile_about(sorted: &[f64], p: f64, method: QuantileMethod, centre: f64) -> Stat {
    let Between { lo, hi, gamma } = between(sorted, p, method)?;
    // Written so that gamma = 0 or 1 gives a data value (minus the centre) exactly.
    Ok(if gamma == 0.0 {
        lo - centre
    } else if gamma == 1.0 {
        hi - centre
    } else {
        (lo - centre) + gamma * (hi - lo)
    })
}

/// A quantile as (1 - gamma) lo + gamma hi, lo and hi adjacent order statistics.
struct Between {
    lo: f64,
    hi: f64,
    gamma: f64,
}

fn between(sorted: &[f64], p: f64, method: QuantileMethod) -> Stat<Between> {
    if !(0.0..=1.0).contains(&p) {
        return Err(Undefined::LevelOutside(p));
    }
    if sorted.is_empty() {
        return Err(Undefined::NoValues);
    }
    match method {
        QuantileMethod::HyndmanFan(t) => hyndman_fan(sorted, p, t),
        QuantileMethod::Hinges => hinges(sorted, p),
    }
}

fn hyndman_fan(x: &[f64], p: f64, kind: u8) -> Stat<Between> {
    let n = x.len() as f64;
    // Hyndman and Fan's notation: Q(p) = (1 - gamma) x[j] + gamma x[j+1],
    // 1-based, with j = floor(np + m) and x[0] = x[1], x[n+1] = x[n].
    let m = match kind {
        1 | 2 | 4 => 0.0,
        3 => -0.5,
        5 => 0.5,
        6 => p,
        7 => 1.0 - p,
        8 => (p + 1.0) / 3.0,
        9 => p / 4.0 + 3.0 / 8.0,
        _ => {
            return Err(Undefined::NoSuchQuantileType(kind));
        }
    };
    let h = snap_to_integer(n * p + m);
    let j = h.floor();
    let g = h - j;
    let gamma = match kind {
        1 => step(g > 0.0),
        2 => {
            if g > 0.0 {
                1.0
            } else {
                0.5
            }
        }
        3 => step(!(g == 0.0 && (j as i64) % 2 == 0)),
        _ => g,
    };
    let at = |k: f64| x[(k.clamp(1.0, n) as usize) - 1];
    Ok(Between {
        lo: at(j),
        hi: at(j + 1.0),
        gamma,
    })
}

fn step(on: bool) -> f64 {
    if on { 1.0 } else { 0.0 }
}

/// n p + m is often an integer in exact arithmetic (the 10th percentile of
/// 20 values) but a hair off it in floating point, which would move the
/// discontinuous types to the next value. Snap within a few ulps.
fn snap_to_integer(h: f64) -> f64 {
    let r = h.round();
    if (h - r).abs() <= 8.0 * f64::EPSILON * r.abs().max(1.0) {
        r
    } else {
        h
    }
}

fn hinges(x: &[f64], p: f64) -> Stat<Between> {
    let n = x.len();
    // Depths as in Tukey (1977): median depth (n+1)/2, hinge depth
    // (floor(median depth) + 1) / 2, counted from either end. A depth
    // ending in .5 is halfway between two values.
    let hinge_depth = (n.div_ceil(2) + 1) as f64 / 2.0;
    let half = |depth: f64| if depth.fract() == 0.0 { 0.0 } else { 0.5 };
    let from_low = |depth: f64| {
        let i = depth.floor() as usize - 1;
        Between {
            lo: x[i],
            hi: x[(i + 1).min(n - 1)],
            gamma: half(depth),
        }
    };
    let from_high = |depth: f64| {
        let i = n - depth.floor() as usize;
        Between {
            lo: x[i.saturating_sub(1)],
            hi: x[i],
            gamma: 1.0 - half(depth),
        }
    };
    match p {
        0.0 => Ok(from_low(1.0)),
        0.25 => Ok(from_low(hinge_depth)),
        0.5 => Ok(from_low((n + 1) as f64 / 2.0)),
        0.75 => Ok(from_high(hinge_depth)),
        1.0 => Ok(from_high(1.0)),
        _ => Err(Undefined::HingesOnlyQuartiles),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(x: &[f64], p: f64, t: u8) -> f64 {
        quantile_sorted(x, p, QuantileMethod::HyndmanFan(t)).unwrap()
    }

    // Hand-checked from the definitions in Hyndman and Fan (1996), x = 1..10.
    #[test]
    fn first_quartile_of_one_to_ten_for_each_type() {
        let x: Vec<f64> = (1..=10).map(f64::from).collect();
        // np = 2.5 for p = 0.25.
        let expected = [
            3.0,                      // type 1: j = 2, g > 0 -> x[3]
            3.0,                      // type 2: same, no tie
            2.0,                      // type 3: np - 0.5 = 2, g = 0, j even -> x[2]
            2.5,                      // type 4: 2 + 0.5 * (3 - 2)
            3.0,                      // type 5: np + 0.5 = 3
            2.75,                     // type 6: np + p = 2.75
            3.25,                     // type 7: np + 1 - p = 3.25
            2.5 + 1.25 / 3.0 - 0.0,   // type 8: np + (p+1)/3 = 2.5 + 0.41666..
            2.5 + 0.25 / 4.0 + 0.375, // type 9: np + p/4 + 3/8 = 2.9375
        ];
        for (t, want) in (1..=9).zip(expected) {
            assert!(
                (q(&x, 0.25, t) - want).abs() < 1e-12,
                "type {t}: {} vs {want}",
                q(&x, 0.25, t)
            );
        }
    }

    #[test]
    fn extremes_and_median() {
        let x = [2.0, 4.0, 8.0, 16.0];
        for t in 1..=9 {
            assert_eq!(q(&x, 0.0, t), 2.0, "type {t}");
            assert_eq!(q(&x, 1.0, t), 16.0, "type {t}");
        }
        // Type 2 averages at the discontinuity: the ordinary median of even n.
        assert_eq!(q(&x, 0.5, 2), 6.0);
        assert_eq!(q(&x, 0.5, 7), 6.0);
    }

    #[test]
    fn type_one_lands_on_a_data_value_despite_rounding() {
        // 20 * 0.1 = 2 exactly in arithmetic; the 10th percentile (type 1) is x[2].
        let x: Vec<f64> = (1..=20).map(f64::from).collect();
        assert_eq!(q(&x, 0.1, 1), 2.0);
        assert_eq!(q(&x, 0.3, 1), 6.0);
    }

    // Tukey (1977) hinge depths, hand-checked: n = 8 -> depth 2.5,
    // n = 9 -> 3, n = 11 -> 3.5, n = 12 -> 3.5.
    #[test]
    fn tukey_hinges() {
        for (n, lower, upper) in [
            (8, 2.5, 6.5),
            (9, 3.0, 7.0),
            (11, 3.5, 8.5),
            (12, 3.5, 9.5),
            (1, 1.0, 1.0),
            (2, 1.0, 2.0),
        ] {
            let x: Vec<f64> = (1..=n).map(f64::from).collect();
            assert_eq!(
                quantile_sorted(&x, 0.25, QuantileMethod::Hinges),
                Ok(lower),
                "n = {n}"
            );
            assert_eq!(
                quantile_sorted(&x, 0.75, QuantileMethod::Hinges),
                Ok(upper),
                "n = {n}"
            );
        }
        assert!(matches!(
            quantile_sorted(&[1.0], 0.9, QuantileMethod::Hinges),
            Err(Undefined::HingesOnlyQuartiles)
        ));
    }

    #[test]
    fn words_round_trip() {
        for t in 1..=9 {
            let m = QuantileMethod::HyndmanFan(t);
            assert_eq!(QuantileMethod::from_word(&m.word()), Some(m));
        }
        assert_eq!(
            QuantileMethod::from_word("hinges"),
            Some(QuantileMethod::Hinges)
        );
        assert_eq!(QuantileMethod::from_word("hf10"), None);
        assert_eq!(QuantileMethod::from_word("hf0"), None);
    }
}
