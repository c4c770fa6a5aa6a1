//! Adding the user's own solutes and ingredients to an existing TOML file
//! (`gelu characterise --save`, and a recipe version recorded with the own
//! items it uses). The file's text is kept to the byte: the new `[[solute]]`
//! and `[[ingredient]]` tables, written as a recipe file writes them
//! ([`super::own_items_toml`]), go after it. A file where that would not read
//! back safely is refused and left alone: one that is not TOML, one whose
//! `solute` or `ingredient` is not a list of tables, one that already defines
//! an id, or one whose own items would no longer read.

use std::path::{Path, PathBuf};

use toml_edit::{DocumentMut, Item};

use crate::model::{OwnItems, Recipe};

use super::read::parse_recipe_leaning_on;
use super::{own_items_toml, parse_recipe};

/// Why own items cannot be added to a file; nothing was written.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{}: {reason}; nothing was written", path.display())]
pub struct AppendRefused {
    /// The file.
    pub path: PathBuf,
    /// What is wrong, and what to do.
    pub reason: String,
}

/// The ids of the `[[key]]` tables of a document; `Err` when `key` is something
/// other than a list of tables.
fn table_ids(doc: &DocumentMut, key: &str) -> Result<Vec<String>, String> {
    match doc.get(key) {
        None => Ok(Vec::new()),
        Some(Item::ArrayOfTables(tables)) => Ok(tables
            .iter()
            .filter_map(|t| t.get("id").and_then(Item::as_str).map(str::to_string))
            .collect()),
        Some(_) => Err(format!(
            "its `{key}` is not written as `[[{key}]]` tables, so more cannot be added after it; \
             add the tables by hand or choose another file"
        )),
    }
}

/// The file's own items read on their own (a recipe holding only them), so a
/// file that is not a whole recipe can still be checked.
fn read_own_items(path: &Path, doc: &DocumentMut) -> Result<Recipe, String> {
    let mut holder = DocumentMut::new();
    holder.insert("name", toml_edit::value("own items"));
    for key in ["solute", "ingredient"] {
        if let Some(item) = doc.get(key) {
            holder.insert(key, item.clone());
        }
    }
    let text = format!("{holder}\n[[line]]\ningredient = \"water\"\ng = 1\n");
    parse_recipe(path, &text).map_err(|e| e.message)
}

/// The text of `original` (the file at `path`) with `items` added after it.
pub fn append_own_items(
    path: &Path,
    original: &str,
    items: &OwnItems,
) -> Result<String, AppendRefused> {
    let refuse = |reason: String| AppendRefused {
        path: path.to_path_buf(),
        reason,
    };
    let doc: DocumentMut = original.parse().map_err(|e: toml_edit::TomlError| {
        refuse(format!(
            "it is not a TOML file ({})",
            one_line(&e.to_string())
        ))
    })?;
    let mut present = table_ids(&doc, "solute").map_err(refuse)?;
    present.extend(table_ids(&doc, "ingredient").map_err(refuse)?);
    let new_ids = items
        .solutes
        .iter()
        .map(|s| &s.id)
        .chain(items.ingredients.iter().map(|i| &i.id));
    for id in new_ids {
        if present.iter().any(|p| p == id) {
            return Err(refuse(format!(
                "it already defines `{id}`; give the new one another id, or remove the old one by hand"
            )));
        }
    }
    let mut text = original.to_string();
    if !text.is_empty() && !text.ends_with('\n') {
        text.push('\n');
    }
    text.push_str(&own_items_toml(&items.solutes, &items.ingredients));
    let after: DocumentMut = text.parse().map_err(|e: toml_edit::TomlError| {
        refuse(format!(
            "the tables would not read back in it ({})",
            one_line(&e.to_string())
        ))
    })?;
    let read = read_own_items(path, &after)
        .map_err(|e| refuse(format!("its own items would not read: {e}")))?;
    let all_back = items.solutes.iter().all(|s| read.solutes.contains(s))
        && items
            .ingredients
            .iter()
            .all(|i| read.ingredients.contains(i));
    if !all_back {
        return Err(refuse(
            "the items would not read back as they were found".into(),
        ));
    }
    // A file that was a whole recipe stays one.
    if parse_recipe_leaning_on(path, original, &OwnItems::default()).is_ok()
        && let Err(e) = parse_recipe(path, &text)
    {
        return Err(refuse(format!(
            "the recipe would no longer read ({})",
            e.message
        )));
    }
    Ok(text)
}

fn one_line(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}
