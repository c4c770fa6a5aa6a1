//! Search as people type it: every word must match, and the closest matches come
//! first, so "whole milk" picks whole milk rather than the powder and an exact
//! id or name is always on top.

/// How well an item matches a query, as a sort key (lower is better): the rank
/// below, then the number of words in the name (a query covering more of a
/// name is a closer match: "milk" puts "Skim milk" before "Coconut milk,
/// canned"). `None`: no match.
pub fn search_key(name: &str, id: &str, query: &str) -> Option<(u8, usize)> {
    let rank = search_rank(name, id, query)?;
    if query.trim().is_empty() {
        // Nothing typed: every item matches alike, in name order.
        return Some((rank, 0));
    }
    let words = name
        .split(|c: char| !c.is_alphanumeric())
        .filter(|w| !w.is_empty())
        .count();
    Some((rank, words))
}

/// How well an item matches a query; lower is better. `None`: no match.
///
/// 0: the query is the id (spaces read as dashes) or the whole name;
/// 1: the name or id begins with the query;
/// 2: every query word is a whole word of the name or id;
/// 3: every query word begins a word of the name or id;
/// 4: every query word occurs somewhere in them.
pub fn search_rank(name: &str, id: &str, query: &str) -> Option<u8> {
    let query = query.trim().to_lowercase();
    let name = name.to_lowercase();
    if query.is_empty() {
        return Some(4);
    }
    let query_id: String = query.split_whitespace().collect::<Vec<_>>().join("-");
    if id == query_id || name == query {
        return Some(0);
    }
    if name.starts_with(&query) || id.starts_with(&query_id) {
        return Some(1);
    }
    let words: Vec<&str> = name
        .split(|c: char| !c.is_alphanumeric())
        .chain(id.split('-'))
        .filter(|w| !w.is_empty())
        .collect();
    let query_words: Vec<&str> = query.split_whitespace().collect();
    if query_words.iter().all(|q| words.contains(q)) {
        return Some(2);
    }
    if query_words
        .iter()
        .all(|q| words.iter().any(|w| w.starts_with(q)))
    {
        return Some(3);
    }
    let hay = format!("{name} {id}");
    query_words.iter().all(|q| hay.contains(q)).then_some(4)
}

#[cfg(test)]
mod tests {
    use super::{search_key, search_rank};

    #[test]
    fn closest_matches_rank_first() {
        let whole = search_rank("Whole milk, 3.25 % fat", "whole-milk", "whole milk");
        let powder = search_rank("Whole milk powder", "whole-milk-powder", "whole milk");
        assert_eq!(whole, Some(0));
        assert!(powder > whole);
        assert_eq!(search_rank("Skim milk", "skim-milk", "milk"), Some(2));
        assert_eq!(search_rank("Skim milk", "skim-milk", "mil"), Some(3));
        assert_eq!(
            search_rank("Buttermilk, cultured", "buttermilk", "milk"),
            Some(4)
        );
        assert_eq!(search_rank("Sucrose", "sucrose", "milk"), None);
        assert_eq!(search_rank("Sucrose", "sucrose", ""), Some(4));
        assert_eq!(search_rank("Sucrose", "sucrose", "SUC"), Some(1));
        assert!(
            search_key("Skim milk", "skim-milk", "milk")
                < search_key("Coconut milk, canned", "coconut-milk", "milk")
        );
    }
}
