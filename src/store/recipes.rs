//! Recipes and their immutable versions, the user's own solutes and ingredients,
//! and settings.

use rusqlite::{OptionalExtension, Transaction, params};

use super::Store;
use super::error::{Result, StoreError};
use super::types::{CustomItem, RecipeSummary};
use crate::batch::version::content_hash;
use crate::batch::{MeasurementKind, RecipeVersion};
use crate::clock;
use crate::model::time::time_text;

/// Row ids of a saved recipe version.
#[derive(Debug, Clone, Copy)]
pub(crate) struct VersionIds {
    pub recipe_id: i64,
    pub version_id: i64,
}

pub(crate) fn recipe_id(tx: &Transaction, name: &str) -> Result<i64> {
    let found: Option<i64> = tx
        .prepare_cached("SELECT id FROM recipes WHERE name = ?1")?
        .query_row([name], |r| r.get(0))
        .optional()?;
    if let Some(id) = found {
        return Ok(id);
    }
    tx.execute(
        "INSERT INTO recipes (name, created_at) VALUES (?1, ?2)",
        params![name, time_text(&clock::now())],
    )?;
    Ok(tx.last_insert_rowid())
}

/// Saves `text` as the next version of `name`, unless it equals the newest version.
pub(crate) fn save_version(
    tx: &Transaction,
    name: &str,
    text: &str,
) -> Result<(VersionIds, RecipeVersion)> {
    if name.trim().is_empty() {
        return Err(StoreError::Invalid("a recipe needs a name".into()));
    }
    let recipe_id = recipe_id(tx, name)?;
    let hash = content_hash(text);
    let newest: Option<(i64, u32, String)> = tx
        .query_row(
            "SELECT id, version, content_hash FROM recipe_versions
             WHERE recipe_id = ?1 ORDER BY version DESC LIMIT 1",
            [recipe_id],
            |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?)),
        )
        .optional()?;
    let version = match newest {
        Some((version_id, version, newest_hash)) if newest_hash == hash => {
            let ids = VersionIds {
                recipe_id,
                version_id,
            };
            return Ok((ids, version_row(name, version, hash, text)));
        }
        Some((_, version, _)) => version + 1,
        None => 1,
    };
    let version_id = insert_version(tx, recipe_id, version, text, &hash)?;
    let ids = VersionIds {
        recipe_id,
        version_id,
    };
    Ok((ids, version_row(name, version, hash, text)))
}

fn version_row(name: &str, version: u32, hash: String, text: &str) -> RecipeVersion {
    RecipeVersion {
        recipe: name.to_owned(),
        version,
        content_hash: hash,
        text: text.to_owned(),
    }
}

fn insert_version(
    tx: &Transaction,
    recipe_id: i64,
    version: u32,
    text: &str,
    hash: &str,
) -> Result<i64> {
    tx.execute(
        "INSERT INTO recipe_versions (recipe_id, version, text, content_hash, created_at)
         VALUES (?1, ?2, ?3, ?4, ?5)",
        params![recipe_id, version, text, hash, time_text(&clock::now())],
    )?;
    Ok(tx.last_insert_rowid())
}

/// Adds version `v` of a recipe pulled from the hub as version `number` here, with
/// the site that saved it (and its number there when that differs).
pub(crate) fn insert_pulled_version(
    tx: &Transaction,
    v: &RecipeVersion,
    number: u32,
    site: &str,
) -> Result<VersionIds> {
    let recipe_id = recipe_id(tx, &v.recipe)?;
    tx.execute(
        "INSERT INTO recipe_versions (recipe_id, version, text, content_hash, created_at, site, origin_version)
         VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7)",
        params![
            recipe_id,
            number,
            v.text,
            v.content_hash,
            time_text(&clock::now()),
            site,
            (number != v.version).then_some(v.version)
        ],
    )?;
    Ok(VersionIds {
        recipe_id,
        version_id: tx.last_insert_rowid(),
    })
}

/// Finds version `v` of a recipe as recorded elsewhere (an import), or adds it with
/// that number. Refuses when this database has different text under that number.
pub(crate) fn ensure_version(tx: &Transaction, v: &RecipeVersion) -> Result<VersionIds> {
    let recipe_id = recipe_id(tx, &v.recipe)?;
    let hash = content_hash(&v.text);
    if hash != v.content_hash {
        return Err(StoreError::Invalid(format!(
            "the recipe text of `{}` version {} does not match its recorded hash {}",
            v.recipe, v.version, v.content_hash
        )));
    }
    let found: Option<(i64, String)> = tx
        .prepare_cached(
            "SELECT id, content_hash FROM recipe_versions WHERE recipe_id = ?1 AND version = ?2",
        )?
        .query_row(params![recipe_id, v.version], |r| {
            Ok((r.get(0)?, r.get(1)?))
        })
        .optional()?;
    let version_id = match found {
        Some((id, h)) if h == hash => id,
        Some(_) => {
            return Err(StoreError::Invalid(format!(
                "recipe `{}` version {} in this database has different text than in the file",
                v.recipe, v.version
            )));
        }
        None => insert_version(tx, recipe_id, v.version, &v.text, &hash)?,
    };
    Ok(VersionIds {
        recipe_id,
        version_id,
    })
}

impl Store {
    /// Saves a recipe's TOML text as its next version (or returns the newest version
    /// when the text is unchanged).
    pub fn save_recipe_version(&mut self, name: &str, text: &str) -> Result<RecipeVersion> {
        self.write(|tx| save_version(tx, name, text).map(|(_, v)| v))
    }

    /// Every recipe with its newest version, by name.
    pub fn recipes(&self) -> Result<Vec<RecipeSummary>> {
        let mut stmt = self.conn.prepare(
            "SELECT r.name, v.version, v.text FROM recipes r
             JOIN recipe_versions v ON v.recipe_id = r.id
             WHERE v.version = (SELECT max(version) FROM recipe_versions WHERE recipe_id = r.id)
             ORDER BY r.name",
        )?;
        let rows = stmt.query_map([], |r| {
            Ok(RecipeSummary {
                name: r.get(0)?,
                latest_version: r.get(1)?,
                latest_text: r.get(2)?,
            })
        })?;
        Ok(rows.collect::<rusqlite::Result<_>>()?)
    }

    /// Every version of one recipe, oldest first.
    pub fn recipe_versions(&self, name: &str) -> Result<Vec<RecipeVersion>> {
        let mut stmt = self.conn.prepare(
            "SELECT v.version, v.content_hash, v.text FROM recipe_versions v
             JOIN recipes r ON r.id = v.recipe_id WHERE r.name = ?1 ORDER BY v.version",
        )?;
        let rows = stmt.query_map([name], |r| {
            Ok(RecipeVersion {
                recipe: name.to_owned(),
                version: r.get(0)?,
                content_hash: r.get(1)?,
                text: r.get(2)?,
            })
        })?;
        Ok(rows.collect::<rusqlite::Result<_>>()?)
    }

    /// A setting's value, if set.
    pub fn get_setting(&self, key: &str) -> Result<Option<String>> {
        Ok(self
            .conn
            .query_row("SELECT value FROM settings WHERE key = ?1", [key], |r| {
                r.get(0)
            })
            .optional()?)
    }

    /// Sets a setting.
    pub fn set_setting(&mut self, key: &str, value: &str) -> Result<()> {
        self.write(|tx| {
            tx.execute(
                "INSERT INTO settings (key, value) VALUES (?1, ?2)
                 ON CONFLICT (key) DO UPDATE SET value = excluded.value",
                params![key, value],
            )?;
            Ok(())
        })
    }

    /// The share of water frozen at draw (0..1) set for this log, else the default.
    pub fn draw_frozen_fraction(&self) -> Result<f64> {
        let value = self.get_setting(crate::measure::DRAW_FROZEN_FRACTION_SETTING)?;
        Ok(crate::measure::draw_frozen_fraction_from_setting(
            value.as_deref(),
        ))
    }

    /// What setting readings against predictions takes from this log: the draw
    /// share, the corrections turned on and the log's instrument precisions.
    pub fn log_setting(&self) -> Result<crate::batch::compare::LogSetting> {
        Ok(crate::batch::compare::LogSetting {
            draw_frozen_fraction: self.draw_frozen_fraction()?,
            corrections: self.corrections_in_force()?,
            precisions: self.instrument_precisions()?,
        })
    }

    /// The instrument precisions set for this log, by kind (in each kind's
    /// difference unit); kinds not listed use their usual precision.
    pub fn instrument_precisions(&self) -> Result<Vec<(MeasurementKind, f64)>> {
        let mut out = Vec::new();
        for kind in MeasurementKind::ALL {
            let key = format!(
                "{}{}",
                crate::measure::PRECISION_SETTING_PREFIX,
                kind.as_str()
            );
            if let Some(p) =
                crate::measure::precision_from_setting(self.get_setting(&key)?.as_deref())
            {
                out.push((kind, p));
            }
        }
        Ok(out)
    }

    /// Sets this log's instrument precision for `kind` (above zero, in its
    /// difference unit), or with `None` goes back to the kind's usual one.
    pub fn set_instrument_precision(
        &mut self,
        kind: MeasurementKind,
        precision: Option<f64>,
    ) -> Result<()> {
        let key = format!(
            "{}{}",
            crate::measure::PRECISION_SETTING_PREFIX,
            kind.as_str()
        );
        match precision {
            Some(p) if p > 0.0 && p.is_finite() => self.set_setting(&key, &p.to_string()),
            Some(p) => Err(StoreError::Invalid(format!(
                "an instrument's precision is above zero, not {p}"
            ))),
            None => self.write(|tx| {
                tx.execute("DELETE FROM settings WHERE key = ?1", params![key])?;
                Ok(())
            }),
        }
    }

    /// Sets the share of water frozen at draw (0..1) for this log.
    pub fn set_draw_frozen_fraction(&mut self, share: f64) -> Result<()> {
        if !(share > 0.0 && share < 1.0) {
            return Err(StoreError::Invalid(format!(
                "the share of water frozen at draw is between 0 and 1 (like 0.5), not {share}"
            )));
        }
        self.set_setting(
            crate::measure::DRAW_FROZEN_FRACTION_SETTING,
            &share.to_string(),
        )
    }

    /// Saves (or replaces) one of the user's own solutes.
    pub fn save_custom_solute(&mut self, item: &CustomItem) -> Result<()> {
        self.save_custom("custom_solutes", item)
    }

    /// Saves (or replaces) one of the user's own ingredients.
    pub fn save_custom_ingredient(&mut self, item: &CustomItem) -> Result<()> {
        self.save_custom("custom_ingredients", item)
    }

    /// The user's own solutes, by id.
    pub fn custom_solutes(&self) -> Result<Vec<CustomItem>> {
        self.customs("custom_solutes")
    }

    /// The user's own ingredients, by id.
    pub fn custom_ingredients(&self) -> Result<Vec<CustomItem>> {
        self.customs("custom_ingredients")
    }

    // `table` is always one of the two literal names above, never user input.
    fn save_custom(&mut self, table: &'static str, item: &CustomItem) -> Result<()> {
        let sql = format!(
            "INSERT INTO {table} (id, name, definition, updated_at) VALUES (?1, ?2, ?3, ?4)
             ON CONFLICT (id) DO UPDATE SET name = excluded.name,
             definition = excluded.definition, updated_at = excluded.updated_at"
        );
        self.write(|tx| {
            tx.execute(
                &sql,
                params![
                    item.id,
                    item.name,
                    item.definition,
                    time_text(&clock::now())
                ],
            )?;
            Ok(())
        })
    }

    fn customs(&self, table: &'static str) -> Result<Vec<CustomItem>> {
        let sql = format!("SELECT id, name, definition FROM {table} ORDER BY id");
        let mut stmt = self.conn.prepare(&sql)?;
        let rows = stmt.query_map([], |r| {
            Ok(CustomItem {
                id: r.get(0)?,
                name: r.get(1)?,
                definition: r.get(2)?,
            })
        })?;
        Ok(rows.collect::<rusqlite::Result<_>>()?)
    }
}
