//! Reading recipe files: TOML -> [`Recipe`], every id checked against the
//! catalog and the file's own items. Every error names the file, the line and
//! column, and what would be valid; nothing here panics on any input.

use std::collections::BTreeMap;
use std::ops::Range;
use std::path::Path;

use serde::Deserialize;
use toml::Spanned;

use crate::catalog::{Catalog, CatalogError, IngredientTable, suggest_text};
use crate::model::{Amount, Ingredient, Line, OwnItems, Recipe, Solute, SoluteKind, Style};
use crate::thermo::binary::WaterModel;

use super::RecipeFileError;
use super::read_balance::{BalanceDoc, BalanceParts, RuleDoc, request_from_doc};
use crate::model::units::COLDEST_TEMP_C;

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RecipeDoc {
    name: Spanned<String>,
    #[serde(default)]
    style: Option<Spanned<String>>,
    #[serde(default)]
    notes: Option<String>,
    #[serde(default)]
    serving_target: Option<Spanned<f64>>,
    #[serde(default)]
    cabinet_temp_c: Option<Spanned<f64>>,
    #[serde(default)]
    freezer_temp_c: Option<Spanned<f64>>,
    #[serde(default)]
    solute: Vec<Spanned<SoluteDoc>>,
    #[serde(default)]
    ingredient: Vec<Spanned<IngredientTable>>,
    #[serde(default)]
    line: Vec<Spanned<LineDoc>>,
    #[serde(default)]
    prices: BTreeMap<Spanned<String>, Spanned<f64>>,
    #[serde(default)]
    balance: Option<Spanned<BalanceDoc>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct SoluteDoc {
    id: Spanned<String>,
    name: String,
    molar_mass_g_mol: Spanned<f64>,
    #[serde(default = "one")]
    dissociation: Spanned<f64>,
    #[serde(default)]
    norrish_k: Option<Spanned<f64>>,
    #[serde(default)]
    sweetness: Option<Spanned<f64>>,
    #[serde(default)]
    source: Option<String>,
}

fn one() -> Spanned<f64> {
    Spanned::new(0..0, 1.0)
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct LineDoc {
    ingredient: Spanned<String>,
    #[serde(default)]
    g: Option<Spanned<f64>>,
    #[serde(default)]
    kg: Option<Spanned<f64>>,
    #[serde(default)]
    ml: Option<Spanned<f64>>,
    #[serde(default)]
    l: Option<Spanned<f64>>,
    #[serde(default)]
    fixed: Option<Spanned<bool>>,
    #[serde(default)]
    min_g: Option<Spanned<f64>>,
    #[serde(default)]
    max_g: Option<Spanned<f64>>,
    #[serde(default)]
    min_pct: Option<Spanned<f64>>,
    #[serde(default)]
    max_pct: Option<Spanned<f64>>,
}

impl LineDoc {
    /// The balancing rule written on the line.
    fn rule(&self) -> RuleDoc {
        RuleDoc {
            fixed: self.fixed.clone(),
            min_g: self.min_g.clone(),
            max_g: self.max_g.clone(),
            min_pct: self.min_pct.clone(),
            max_pct: self.max_pct.clone(),
        }
    }
}

/// 1-based line and column of byte offset `at` in `text`.
fn line_column(text: &str, at: usize) -> (usize, usize) {
    let at = at.min(text.len());
    let before = &text[..text.floor_char_boundary(at)];
    let line = before.matches('\n').count() + 1;
    let column = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
    (line, column)
}

struct Ctx<'a> {
    path: &'a Path,
    text: &'a str,
}

impl Ctx<'_> {
    fn err(&self, span: Range<usize>, message: impl Into<String>) -> RecipeFileError {
        let (line, column) = if span.start == 0 && span.end == 0 {
            (1, 1)
        } else {
            line_column(self.text, span.start)
        };
        RecipeFileError {
            path: self.path.to_path_buf(),
            line,
            column,
            message: message.into(),
        }
    }
}

/// Reads and parses a recipe file. Returns the recipe and the file's text.
pub fn read_recipe(path: &Path) -> Result<(Recipe, String), RecipeFileError> {
    let text = read_text(path)?;
    let recipe = parse_recipe(path, &text)?;
    Ok((recipe, text))
}

fn read_text(path: &Path) -> Result<String, RecipeFileError> {
    std::fs::read_to_string(path).map_err(|e| RecipeFileError {
        path: path.to_path_buf(),
        line: 0,
        column: 0,
        message: format!("cannot read the file: {e}"),
    })
}

/// Parses recipe TOML `text` (from `path`, for messages), checking every id
/// against the built-in catalog and the file's own solutes and ingredients.
pub fn parse_recipe(path: &Path, text: &str) -> Result<Recipe, RecipeFileError> {
    parse_recipe_with(path, text, Catalog::builtin())
}

/// As [`parse_recipe`], against a given catalog (built-in plus the user's own).
pub fn parse_recipe_with(
    path: &Path,
    text: &str,
    catalog: &Catalog,
) -> Result<Recipe, RecipeFileError> {
    parse(path, text, catalog, &OwnItems::default(), None)
}

/// Reads and parses a recipe file that may use the user's own items (`own`,
/// from the batch log); see [`parse_recipe_using`]. Returns the recipe and the
/// file's text and the library items copied into the recipe.
pub fn read_recipe_using(
    path: &Path,
    own: &OwnItems,
) -> Result<(Recipe, String, OwnItems), RecipeFileError> {
    let text = read_text(path)?;
    let (recipe, borrowed) = parse_recipe_using(path, &text, own)?;
    Ok((recipe, text, borrowed))
}

/// Parses recipe TOML that may use the user's own solutes and ingredients
/// (`own`, from the batch log) besides the built-in ones and its own. The file's
/// own items come first: one of the same id shadows the library's, and a
/// built-in id shadows both. The library items the recipe uses are copied into
/// the recipe ([`Recipe::solutes`], [`Recipe::ingredients`]), so that it
/// analyses, saves and records without the log; they are also returned, as
/// what the file's text lacks.
pub fn parse_recipe_using(
    path: &Path,
    text: &str,
    own: &OwnItems,
) -> Result<(Recipe, OwnItems), RecipeFileError> {
    let mut borrowed = OwnItems::default();
    let recipe = parse(path, text, Catalog::builtin(), own, Some(&mut borrowed))?;
    Ok((recipe, borrowed))
}

/// As [`parse_recipe_using`], but without copying the library items in: the
/// recipe as the file itself states it (for comparing with an edited recipe).
pub(super) fn parse_recipe_leaning_on(
    path: &Path,
    text: &str,
    own: &OwnItems,
) -> Result<Recipe, RecipeFileError> {
    parse(path, text, Catalog::builtin(), own, None)
}

/// The library items that neither the catalog nor the file define.
fn library_layer(catalog: &Catalog, own: &OwnItems, file_ids: &[&str]) -> OwnItems {
    let free = |id: &str| catalog.ingredient(id).is_none() && !file_ids.contains(&id);
    OwnItems {
        solutes: own
            .solutes
            .iter()
            .filter(|s| free(&s.id))
            .cloned()
            .collect(),
        ingredients: own
            .ingredients
            .iter()
            .filter(|i| free(&i.id))
            .cloned()
            .collect(),
    }
}

fn parse(
    path: &Path,
    text: &str,
    catalog: &Catalog,
    own: &OwnItems,
    adopted: Option<&mut OwnItems>,
) -> Result<Recipe, RecipeFileError> {
    let ctx = Ctx { path, text };
    let doc: RecipeDoc = toml::from_str(text).map_err(|e| {
        let span = e.span().unwrap_or(0..0);
        let message = e.message().trim().replace('\n', " ");
        ctx.err(span, message)
    })?;
    let name = doc.name.get_ref().trim().to_string();
    if name.is_empty() {
        return Err(ctx.err(doc.name.span(), "the recipe `name` must not be empty"));
    }
    if let Err(e) = crate::catalog::validate_name(&name, &name) {
        let found = match e {
            CatalogError::ControlCharacter { found, .. } => found,
            other => other.to_string(),
        };
        return Err(ctx.err(
            doc.name.span(),
            format!("the recipe `name` holds the control character {found}; a name is plain text"),
        ));
    }
    let style = match &doc.style {
        None => Style::default(),
        Some(s) => Style::parse(s.get_ref()).ok_or_else(|| {
            let all: Vec<&str> = Style::ALL.iter().map(|s| s.as_str()).collect();
            ctx.err(
                s.span(),
                format!(
                    "unknown style `{}`; valid styles: {}",
                    s.get_ref(),
                    all.join(", ")
                ),
            )
        })?,
    };
    let serving_target = match &doc.serving_target {
        None => None,
        Some(t) => {
            let v = *t.get_ref();
            if !(v > 0.0 && v < 1.0) {
                return Err(ctx.err(t.span(), format!("serving_target is the share of water frozen at serving, between 0 and 1 (like 0.70), not {v}")));
            }
            Some(v)
        }
    };
    let cabinet_temp_c = freezing_temp(&ctx, doc.cabinet_temp_c.as_ref(), "cabinet_temp_c")?;
    let freezer_temp_c = freezing_temp(&ctx, doc.freezer_temp_c.as_ref(), "freezer_temp_c")?;
    let solutes = doc
        .solute
        .iter()
        .map(|s| solute_from_doc(&ctx, s.get_ref()))
        .collect::<Result<Vec<_>, _>>()?;
    for table in &doc.ingredient {
        if let Some(d) = &table.get_ref().density_g_ml {
            in_range(
                &ctx,
                d,
                "density_g_ml (g/mL)",
                false,
                crate::catalog::MAX_DENSITY_G_ML,
            )?;
        }
    }
    let ingredients = doc
        .ingredient
        .iter()
        .map(|i| {
            i.get_ref()
                .to_ingredient("the recipe file's own ingredient")
                .map_err(|(span, message)| ctx.err(span, message))
        })
        .collect::<Result<Vec<_>, _>>()?;
    // Validate the user's own items, pointing at the one at fault. (Without any, the
    // catalog is used as it is: no copy per file.)
    let file_ids: Vec<&str> = solutes
        .iter()
        .map(|s| s.id.as_str())
        .chain(ingredients.iter().map(|i| i.id.as_str()))
        .collect();
    let library = library_layer(catalog, own, &file_ids);
    let extended;
    let catalog = if solutes.is_empty() && ingredients.is_empty() && library.is_empty() {
        catalog
    } else {
        let all_solutes: Vec<Solute> = library.solutes.iter().chain(&solutes).cloned().collect();
        let all_ingredients: Vec<Ingredient> = library
            .ingredients
            .iter()
            .chain(&ingredients)
            .cloned()
            .collect();
        extended = catalog
            .with_additions(&all_solutes, &all_ingredients)
            .map_err(|e| {
                let id = catalog_error_id(&e);
                let span = doc
                    .solute
                    .iter()
                    .map(|s| &s.get_ref().id)
                    .chain(doc.ingredient.iter().map(|i| &i.get_ref().id))
                    .find(|sid| sid.get_ref() == id)
                    .map_or(0..0, |sid| sid.span());
                ctx.err(span, e.to_string())
            })?;
        &extended
    };
    let mut lines = Vec::with_capacity(doc.line.len());
    for l in &doc.line {
        lines.push(line_from_doc(&ctx, l, catalog)?);
    }
    let total: f64 = lines
        .iter()
        .map(|l: &Line| {
            l.amount.grams(
                catalog
                    .ingredient(&l.ingredient)
                    .map_or(1.0, |i| i.density_g_ml),
            )
        })
        .sum();
    if !(total > 0.0) {
        let span = doc.line.first().map_or(doc.name.span(), |l| l.span());
        return Err(ctx.err(span, "the recipe's lines add up to nothing: give at least one line an amount above zero (`[[line]]` with `g = ...`)"));
    }
    let rules: Vec<RuleDoc> = doc.line.iter().map(|l| l.get_ref().rule()).collect();
    let parts = BalanceParts {
        table: doc.balance.as_ref(),
        rules: lines
            .iter()
            .map(|l| l.ingredient.as_str())
            .zip(&rules)
            .collect(),
        prices: &doc.prices,
        own_ingredients: doc.ingredient.iter().map(Spanned::get_ref).collect(),
    };
    let balance = request_from_doc(&parts, &lines, catalog)
        .map_err(|(span, message)| ctx.err(span, message))?;
    let mut recipe = Recipe {
        name,
        style,
        notes: doc.notes.unwrap_or_default(),
        serving_frozen_fraction: serving_target,
        cabinet_temp_c,
        freezer_temp_c,
        solutes,
        ingredients,
        lines,
        balance,
    };
    if let Some(adopted) = adopted
        && !library.is_empty()
    {
        let file_solute_ids: Vec<String> = recipe
            .ingredients
            .iter()
            .flat_map(|i| i.solutes_pct.keys().cloned())
            .collect();
        let used = library.used_by(
            recipe
                .lines
                .iter()
                .map(|l| l.ingredient.as_str())
                .chain(file_solute_ids.iter().map(String::as_str)),
        );
        recipe.solutes.extend(used.solutes.iter().cloned());
        recipe.ingredients.extend(used.ingredients.iter().cloned());
        *adopted = used;
    }
    Ok(recipe)
}

/// A recipe's own cabinet or freezer temperature (°C): where mixes freeze,
/// between 0 °C and -60 °C.
fn freezing_temp(
    ctx: &Ctx,
    value: Option<&Spanned<f64>>,
    key: &str,
) -> Result<Option<f64>, RecipeFileError> {
    let Some(t) = value else {
        return Ok(None);
    };
    let v = *t.get_ref();
    if !(COLDEST_TEMP_C..=0.0).contains(&v) {
        return Err(ctx.err(
            t.span(),
            format!(
                "{key} is a temperature in °C between 0 and {COLDEST_TEMP_C} (like -12), not {v}"
            ),
        ));
    }
    Ok(Some(v))
}

fn catalog_error_id(e: &CatalogError) -> &str {
    match e {
        CatalogError::DuplicateId(id) | CatalogError::BadId(id) => id,
        CatalogError::NotPositive { id, .. }
        | CatalogError::BadPart { id, .. }
        | CatalogError::BadRange { id, .. }
        | CatalogError::ControlCharacter { id, .. }
        | CatalogError::NotHundred { id, .. } => id,
        CatalogError::UnknownSolute { ingredient, .. } => ingredient,
    }
}

/// A number above zero (or from zero, with `zero`) up to `max`, or the error at it.
fn in_range(
    ctx: &Ctx,
    v: &Spanned<f64>,
    what: &str,
    zero: bool,
    max: f64,
) -> Result<f64, RecipeFileError> {
    let x = *v.get_ref();
    let low_ok = if zero { x >= 0.0 } else { x > 0.0 };
    if low_ok && x <= max {
        Ok(x)
    } else if zero {
        Err(ctx.err(
            v.span(),
            format!("{what} must be a number from 0 to {max}, not {x}"),
        ))
    } else {
        Err(ctx.err(
            v.span(),
            format!("{what} must be a positive number up to {max}, not {x}"),
        ))
    }
}

fn solute_from_doc(ctx: &Ctx, s: &SoluteDoc) -> Result<Solute, RecipeFileError> {
    use crate::catalog::{MAX_DISSOCIATION, MAX_MOLAR_MASS_G_MOL, MAX_NORRISH_K, MAX_SWEETNESS};
    let molar_mass = in_range(
        ctx,
        &s.molar_mass_g_mol,
        "molar_mass_g_mol (g/mol)",
        false,
        MAX_MOLAR_MASS_G_MOL,
    )?;
    let dissociation = in_range(
        ctx,
        &s.dissociation,
        "dissociation (the van 't Hoff factor i, 1 for sugars, 2 for table salt)",
        false,
        MAX_DISSOCIATION,
    )?;
    let norrish_k = match &s.norrish_k {
        None => 0.0,
        Some(k) => in_range(ctx, k, "norrish_k", true, MAX_NORRISH_K)?,
    };
    let sweetness = match &s.sweetness {
        None => None,
        Some(v) => Some(in_range(
            ctx,
            v,
            "sweetness (sucrose = 100)",
            true,
            MAX_SWEETNESS,
        )?),
    };
    Ok(Solute {
        id: s.id.get_ref().clone(),
        name: s.name.clone(),
        kind: SoluteKind::Other,
        molar_mass_g_mol: molar_mass,
        dissociation,
        model: WaterModel::Ideal { norrish_k },
        sweetness,
        solubility_g_per_100g_water_0c: None,
        source: s
            .source
            .clone()
            .unwrap_or_else(|| "the recipe file's own solute".into()),
    })
}

/// The unit a line's amount is written in.
fn unit_of(doc: &LineDoc) -> &'static str {
    if doc.kg.is_some() {
        "kg"
    } else if doc.ml.is_some() {
        "mL"
    } else if doc.l.is_some() {
        "L"
    } else {
        "g"
    }
}

/// Turns a number in a line's unit into an [`Amount`].
type MakeAmount = fn(f64) -> Amount;

fn line_from_doc(
    ctx: &Ctx,
    l: &Spanned<LineDoc>,
    catalog: &Catalog,
) -> Result<Line, RecipeFileError> {
    let doc = l.get_ref();
    let id = doc.ingredient.get_ref();
    if catalog.ingredient(id).is_none() {
        return Err(ctx.err(
            doc.ingredient.span(),
            format!(
                "unknown ingredient `{id}`{}",
                suggest_text(&catalog.nearest_ingredients(id))
            ),
        ));
    }
    let given: Vec<(&Spanned<f64>, MakeAmount)> = [
        (doc.g.as_ref(), Amount::Grams as MakeAmount),
        (doc.kg.as_ref(), |v| Amount::Grams(v * 1000.0)),
        (doc.ml.as_ref(), Amount::Millilitres),
        (doc.l.as_ref(), |v| Amount::Millilitres(v * 1000.0)),
    ]
    .into_iter()
    .filter_map(|(v, f)| v.map(|v| (v, f)))
    .collect();
    let [(value, make)] = given.as_slice() else {
        let span = given.get(1).map_or(l.span(), |g| g.0.span());
        return Err(ctx.err(
            span,
            format!("the line for `{id}` needs exactly one amount: `g`, `kg`, `ml` or `l`"),
        ));
    };
    let v = *value.get_ref();
    if !(v >= 0.0 && v.is_finite()) {
        return Err(ctx.err(
            value.span(),
            format!("the amount of `{id}` must be a finite number, zero or more, not {v}"),
        ));
    }
    let amount = make(v);
    crate::model::units::check_amount(amount).map_err(|why| {
        ctx.err(
            value.span(),
            format!("the amount of `{id}`, {v} {}, {why}", unit_of(doc)),
        )
    })?;
    Ok(Line {
        ingredient: id.clone(),
        amount,
    })
}
