//! The forms for the user's own solutes and ingredients: opened empty or as a
//! copy of a built-in one, checked field by field with the reason shown (and
//! for ingredients the running total of the composition), then validated as a
//! whole against the catalog and saved into the own library.

use std::collections::BTreeMap;

use crate::catalog::{Catalog, validate_id, validate_solute};
use crate::model::{Category, Ingredient, Solute, SoluteKind};
use crate::thermo::binary::WaterModel;

use super::super::action::Effect;
use super::super::state::{CatalogList, Field, Form, FormPurpose, Overlay, State};
use crate::model::units::trim_number;

/// Field order of the ingredient form.
const ING_ID: usize = 0;
const ING_NAME: usize = 1;
const ING_CATEGORY: usize = 2;
const ING_WATER: usize = 3;
const ING_FAT: usize = 4;
const ING_PROTEIN: usize = 5;
const ING_OTHER: usize = 6;
const ING_SOLUTES: usize = 7;
const ING_DENSITY: usize = 8;
const ING_ALLERGENS: usize = 9;
const ING_SOURCE: usize = 10;

/// Field order of the solute form.
const SOL_ID: usize = 0;
const SOL_NAME: usize = 1;
const SOL_MOLAR_MASS: usize = 2;
const SOL_DISSOCIATION: usize = 3;
const SOL_NORRISH: usize = 4;
const SOL_SWEETNESS: usize = 5;
const SOL_SOURCE: usize = 6;

fn copy_id(id: &str, own: Option<usize>) -> String {
    if own.is_some() {
        id.to_string()
    } else {
        format!("my-{id}")
    }
}

/// Opens the ingredient form: empty, the own item at `own`, or a copy of `base`.
pub fn open_ingredient_form(state: &mut State, own: Option<usize>, base: Option<Ingredient>) {
    let i = base.unwrap_or_else(|| Ingredient {
        id: String::new(),
        name: String::new(),
        category: Category::Other,
        water_pct: 0.0,
        fat_pct: 0.0,
        protein_pct: 0.0,
        other_solids_pct: 0.0,
        solutes_pct: BTreeMap::new(),
        density_g_ml: 1.0,
        allergens: Vec::new(),
        source: String::new(),
    });
    let id = if i.id.is_empty() {
        String::new()
    } else {
        copy_id(&i.id, own)
    };
    let solutes = i
        .solutes_pct
        .iter()
        .map(|(s, pct)| format!("{s} {}", trim_number(*pct)))
        .collect::<Vec<_>>()
        .join(", ");
    let fields = vec![
        Field::new("Id (kebab-case)", id),
        Field::new("Name", i.name.clone()),
        Field::new("Category", i.category.as_str()),
        Field::new("Water, %", trim_number(i.water_pct)),
        Field::new("Fat, %", trim_number(i.fat_pct)),
        Field::new("Protein, %", trim_number(i.protein_pct)),
        Field::new("Other solids, %", trim_number(i.other_solids_pct)),
        Field::new("Dissolved (id %, …)", solutes),
        Field::new("Density, g/mL", trim_number(i.density_g_ml)),
        Field::new("Allergens (a, b, …)", i.allergens.join(", ")),
        Field::new("Source of the numbers", i.source.clone()),
    ];
    let mut form = Form {
        purpose: FormPurpose::Ingredient(own),
        title: if own.is_some() {
            "Edit your ingredient".into()
        } else {
            "New ingredient of your own".into()
        },
        fields,
        focus: 0,
        summary: None,
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

/// Opens the solute form: empty, the own item at `own`, or a copy of `base`.
pub fn open_solute_form(state: &mut State, own: Option<usize>, base: Option<Solute>) {
    let (id, name, molar, diss, norrish, sweet, source) = match base {
        Some(s) => {
            let k = match s.model {
                WaterModel::Ideal { norrish_k } | WaterModel::NorrishSeries { norrish_k, .. } => {
                    if norrish_k > 0.0 {
                        trim_number(norrish_k)
                    } else {
                        String::new()
                    }
                }
                _ => String::new(),
            };
            (
                copy_id(&s.id, own),
                s.name,
                trim_number(s.molar_mass_g_mol),
                trim_number(s.dissociation),
                k,
                s.sweetness.map(trim_number).unwrap_or_default(),
                s.source,
            )
        }
        None => Default::default(),
    };
    let diss = if diss.is_empty() { "1".into() } else { diss };
    let fields = vec![
        Field::new("Id (kebab-case)", id),
        Field::new("Name", name),
        Field::new("Molar mass, g/mol", molar),
        Field::new("Dissociation factor i", diss),
        Field::new("Norrish K (optional)", norrish),
        Field::new("Sweetness, sucrose = 100 (optional)", sweet),
        Field::new("Source of the numbers", source),
    ];
    let mut form = Form {
        purpose: FormPurpose::Solute(own),
        title: if own.is_some() {
            "Edit your solute".into()
        } else {
            "New solute of your own".into()
        },
        fields,
        focus: 0,
        summary: None,
    };
    check_form(state, &mut form);
    state.overlay = Some(Overlay::Form(form));
}

fn value(form: &Form, at: usize) -> &str {
    form.fields.get(at).map_or("", |f| f.input.value().trim())
}

fn number(text: &str) -> Result<f64, String> {
    match text.replace(',', ".").parse::<f64>() {
        Ok(x) if x.is_finite() => Ok(x),
        _ if text.is_empty() => Err("type a number".into()),
        _ => Err(format!("`{text}` is not a number")),
    }
}

fn part(text: &str) -> Result<f64, String> {
    let x = number(text)?;
    if (0.0..=100.0).contains(&x) {
        Ok(x)
    } else {
        Err("must be between 0 and 100".into())
    }
}

fn positive(text: &str) -> Result<f64, String> {
    let x = number(text)?;
    if x > 0.0 {
        Ok(x)
    } else {
        Err("must be above zero".into())
    }
}

fn optional(text: &str, check: fn(&str) -> Result<f64, String>) -> Result<Option<f64>, String> {
    if text.is_empty() {
        Ok(None)
    } else {
        check(text).map(Some)
    }
}

fn non_negative(text: &str) -> Result<f64, String> {
    let x = number(text)?;
    if x >= 0.0 {
        Ok(x)
    } else {
        Err("must be zero or more".into())
    }
}

fn check_id(state: &State, form: &Form, text: &str) -> Result<(), String> {
    validate_id(text).map_err(|e| e.to_string())?;
    let editing_same = match form.purpose {
        FormPurpose::Ingredient(Some(k)) => {
            state.own.ingredients.get(k).is_some_and(|i| i.id == text)
        }
        FormPurpose::Solute(Some(k)) => state.own.solutes.get(k).is_some_and(|s| s.id == text),
        _ => false,
    };
    if !editing_same && state.catalog.ingredient(text).is_some() {
        return Err(format!("`{text}` is already used; choose another id"));
    }
    Ok(())
}

/// Reads "sucrose 20, lactose 4.7" into solute id -> mass %.
fn parse_solutes(catalog: &Catalog, text: &str) -> Result<BTreeMap<String, f64>, String> {
    let mut out = BTreeMap::new();
    for item in text
        .split([',', ';'])
        .map(str::trim)
        .filter(|s| !s.is_empty())
    {
        let mut words = item.split_whitespace();
        let (Some(id), Some(pct), None) = (words.next(), words.next(), words.next()) else {
            return Err(format!(
                "`{item}`: write a solute id and its %, like `sucrose 20`"
            ));
        };
        let pct = part(pct).map_err(|e| format!("{id}: {e}"))?;
        if catalog.solute(id).is_none() {
            let near = catalog.nearest_solutes(id);
            return Err(format!(
                "`{id}` is not a known solute{}",
                crate::catalog::suggest_text(&near)
            ));
        }
        *out.entry(id.to_string()).or_insert(0.0) += pct;
    }
    Ok(out)
}

fn field_problem(state: &State, form: &Form, at: usize) -> Result<(), String> {
    let text = value(form, at);
    match form.purpose {
        FormPurpose::Ingredient(_) => match at {
            ING_ID => check_id(state, form, text),
            ING_NAME | ING_SOURCE if text.is_empty() => Err("must not be empty".into()),
            ING_CATEGORY => Category::parse(text).map(|_| ()).ok_or_else(|| {
                let all: Vec<&str> = Category::ALL.iter().map(|c| c.as_str()).collect();
                format!("one of: {}", all.join(", "))
            }),
            ING_WATER | ING_FAT | ING_PROTEIN | ING_OTHER => part(text).map(|_| ()),
            ING_SOLUTES => parse_solutes(&state.catalog, text).map(|_| ()),
            ING_DENSITY => positive(text).map(|_| ()),
            _ => Ok(()),
        },
        FormPurpose::Solute(_) => match at {
            SOL_ID => check_id(state, form, text),
            SOL_NAME | SOL_SOURCE if text.is_empty() => Err("must not be empty".into()),
            SOL_MOLAR_MASS | SOL_DISSOCIATION => positive(text).map(|_| ()),
            SOL_NORRISH | SOL_SWEETNESS => optional(text, non_negative).map(|_| ()),
            _ => Ok(()),
        },
        _ => Ok(()),
    }
}

/// Checks every field of an own-item form, and for ingredients shows the running total.
pub fn check_form(state: &State, form: &mut Form) {
    for at in 0..form.fields.len() {
        let problem = field_problem(state, form, at).err();
        if let Some(field) = form.fields.get_mut(at) {
            field.problem = problem;
        }
    }
    if let FormPurpose::Ingredient(_) = form.purpose {
        let parts: f64 = [ING_WATER, ING_FAT, ING_PROTEIN, ING_OTHER]
            .iter()
            .filter_map(|at| part(value(form, *at)).ok())
            .sum();
        let dissolved: f64 = parse_solutes(&state.catalog, value(form, ING_SOLUTES))
            .map(|m| m.values().sum())
            .unwrap_or(0.0);
        form.summary = Some(format!(
            "Adds up to {} % (must be 100 %)",
            trim_number(parts + dissolved)
        ));
    }
}

fn first_problem(form: &Form) -> Result<(), String> {
    match form.fields.iter().find(|f| f.problem.is_some()) {
        Some(f) => Err(format!(
            "{}: {}",
            f.label,
            f.problem.clone().unwrap_or_default()
        )),
        None => Ok(()),
    }
}

/// Builds the ingredient a form describes.
pub fn ingredient_from(state: &State, form: &Form) -> Result<Ingredient, String> {
    first_problem(form)?;
    let allergens = value(form, ING_ALLERGENS)
        .split(',')
        .map(|a| a.trim().to_lowercase())
        .filter(|a| !a.is_empty())
        .collect();
    let ingredient = Ingredient {
        id: value(form, ING_ID).to_string(),
        name: value(form, ING_NAME).to_string(),
        category: Category::parse(value(form, ING_CATEGORY)).unwrap_or(Category::Other),
        water_pct: part(value(form, ING_WATER))?,
        fat_pct: part(value(form, ING_FAT))?,
        protein_pct: part(value(form, ING_PROTEIN))?,
        other_solids_pct: part(value(form, ING_OTHER))?,
        solutes_pct: parse_solutes(&state.catalog, value(form, ING_SOLUTES))?,
        density_g_ml: positive(value(form, ING_DENSITY))?,
        allergens,
        source: value(form, ING_SOURCE).to_string(),
    };
    state
        .catalog
        .validate_ingredient(&ingredient)
        .map_err(|e| e.to_string())?;
    Ok(ingredient)
}

/// Builds the solute a form describes.
pub fn solute_from(form: &Form) -> Result<Solute, String> {
    first_problem(form)?;
    let norrish_k = optional(value(form, SOL_NORRISH), non_negative)?.unwrap_or(0.0);
    let solute = Solute {
        id: value(form, SOL_ID).to_string(),
        name: value(form, SOL_NAME).to_string(),
        kind: SoluteKind::Other,
        molar_mass_g_mol: positive(value(form, SOL_MOLAR_MASS))?,
        dissociation: positive(value(form, SOL_DISSOCIATION))?,
        model: WaterModel::Ideal { norrish_k },
        sweetness: optional(value(form, SOL_SWEETNESS), non_negative)?,
        solubility_g_per_100g_water_0c: None,
        source: value(form, SOL_SOURCE).to_string(),
    };
    validate_solute(&solute).map_err(|e| e.to_string())?;
    Ok(solute)
}

/// Saves a submitted own-item form into the library (and the recipe's copy).
pub fn submit(state: &mut State, form: &Form) -> Result<Vec<Effect>, String> {
    match form.purpose {
        FormPurpose::Ingredient(own) => {
            let ingredient = ingredient_from(state, form)?;
            let name = ingredient.name.clone();
            match own.and_then(|k| state.own.ingredients.get_mut(k)) {
                Some(slot) => *slot = ingredient.clone(),
                None => state.own.ingredients.push(ingredient.clone()),
            }
            let id = ingredient.id.clone();
            let solutes = state
                .own
                .solutes
                .iter()
                .filter(|s| ingredient.solutes_pct.contains_key(&s.id))
                .cloned()
                .collect();
            let effect = Effect::SaveOwnIngredient {
                ingredient: ingredient.clone(),
                solutes,
            };
            super::recipe::change(state, |r| {
                if let Some(copy) = r.ingredients.iter_mut().find(|i| i.id == id) {
                    *copy = ingredient;
                }
            });
            state.ingredients.list = CatalogList::Ingredients;
            state.tell(format!("Saved your ingredient {name}."));
            finish(state);
            Ok(vec![effect])
        }
        FormPurpose::Solute(own) => {
            let solute = solute_from(form)?;
            let name = solute.name.clone();
            match own.and_then(|k| state.own.solutes.get_mut(k)) {
                Some(slot) => *slot = solute.clone(),
                None => state.own.solutes.push(solute.clone()),
            }
            let id = solute.id.clone();
            let effect = Effect::SaveOwnSolute(solute.clone());
            super::recipe::change(state, |r| {
                if let Some(copy) = r.solutes.iter_mut().find(|s| s.id == id) {
                    *copy = solute;
                }
            });
            state.ingredients.list = CatalogList::Solutes;
            state.tell(format!("Saved your solute {name}."));
            finish(state);
            Ok(vec![effect])
        }
        _ => Ok(Vec::new()),
    }
}

/// After the library changed: the catalog, the analysis and the lists again.
pub fn finish(state: &mut State) {
    state.refresh_catalog();
    state.reanalyse();
    state.refresh_ingredient_matches();
}
