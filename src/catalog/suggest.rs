//! "Did you mean": the nearest known ids to a mistyped one.

/// Levenshtein edit distance between two strings (in chars).
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut prev = row[0];
        row[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let cur = row[j + 1];
            row[j + 1] = (prev + usize::from(ca != *cb)).min(row[j] + 1).min(cur + 1);
            prev = cur;
        }
    }
    row[b.len()]
}

/// Up to `n` candidates nearest to `wanted`: ids containing it (or contained in
/// it) first, then by edit distance; only reasonably close ones.
pub fn nearest<'a>(
    wanted: &str,
    candidates: impl Iterator<Item = &'a str>,
    n: usize,
) -> Vec<String> {
    let wanted = wanted.to_lowercase();
    let mut scored: Vec<(usize, &str)> = candidates
        .filter_map(|c| {
            let d = edit_distance(&wanted, c);
            let contains = !wanted.is_empty() && (c.contains(&wanted) || wanted.contains(c));
            let score = if contains { d.min(2) } else { d };
            (contains || d <= (wanted.len() / 2).max(2)).then_some((score, c))
        })
        .collect();
    scored.sort();
    scored
        .into_iter()
        .take(n)
        .map(|(_, c)| c.to_string())
        .collect()
}

/// " (did you mean `a`, `b`?)" or nothing.
pub fn did_you_mean(suggestions: &[String]) -> String {
    if suggestions.is_empty() {
        return String::new();
    }
    let list: Vec<String> = suggestions.iter().map(|s| format!("`{s}`")).collect();
    format!(" (did you mean {}?)", list.join(", "))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_close_ids() {
        let ids = ["whole-milk", "skim-milk", "heavy-cream", "sucrose"];
        assert_eq!(nearest("whole-mlk", ids.into_iter(), 3)[0], "whole-milk");
        assert_eq!(nearest("milk", ids.into_iter(), 3).len(), 2);
        assert!(nearest("zzzzzzzzzz", ids.into_iter(), 3).is_empty());
        assert_eq!(edit_distance("kitten", "sitting"), 3);
    }
}
