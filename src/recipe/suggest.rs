//! "Did you mean ...?": the closest of a set of names.

/// Edit distance (Levenshtein), case-insensitive.
fn distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.to_lowercase().chars().collect();
    let b: Vec<char> = b.to_lowercase().chars().collect();
    let mut previous: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.iter().enumerate() {
        let mut current = vec![i + 1];
        for (j, cb) in b.iter().enumerate() {
            let substitute = previous[j] + usize::from(ca != cb);
            current.push(substitute.min(previous[j + 1] + 1).min(current[j] + 1));
        }
        previous = current;
    }
    previous[b.len()]
}

/// The candidate nearest to `name`, if it is near enough to be a likely typo.
pub fn closest<'a>(name: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    let limit = (name.chars().count() / 3).max(2);
    candidates
        .into_iter()
        .map(|c| (distance(name, c), c))
        .filter(|(d, _)| *d <= limit)
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_typos_and_ignores_strangers() {
        assert_eq!(distance("kitten", "sitting"), 3);
        assert_eq!(
            closest("wieght_kg", ["weight_kg", "depot"]),
            Some("weight_kg")
        );
        assert_eq!(closest("Depot", ["depot", "status"]), Some("depot"));
        assert_eq!(closest("xyz", ["weight_kg", "depot"]), None);
    }
}
