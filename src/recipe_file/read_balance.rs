//! Reading what a recipe file asks balancing: the `[balance]` table (objective,
//! the batch size, `vary`, targets by name, `solutes_pct`, `frozen_at`), the
//! rules on its `[[line]]`s (`fixed`, `min_g`, `max_g`, `min_pct`, `max_pct`),
//! `price_per_kg` on its own `[[ingredient]]`s and its `[prices]` table. Every
//! error names the file, line and column and says what would be valid.

use std::collections::BTreeMap;
use std::fmt;
use std::ops::Range;

use serde::Deserialize;
use serde::de::{self, IgnoredAny, MapAccess, SeqAccess, Visitor};
use toml::Spanned;

use crate::catalog::{Catalog, IngredientTable, suggest_text};
use crate::model::Line;
use crate::model::balancing::{Figure, LineRule, Objective, PLAIN, Request, SOLUTE_PREFIX, Target};

/// A target as a file writes it: a number, or a `[low, high]` pair.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct TargetDoc {
    low: f64,
    high: f64,
}

impl<'de> Deserialize<'de> for TargetDoc {
    fn deserialize<D: de::Deserializer<'de>>(d: D) -> Result<TargetDoc, D::Error> {
        struct V;
        impl<'de> Visitor<'de> for V {
            type Value = TargetDoc;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a target: a number (like 20) or a [low, high] pair (like [6, 9])")
            }
            fn visit_f64<E: de::Error>(self, v: f64) -> Result<TargetDoc, E> {
                Ok(TargetDoc { low: v, high: v })
            }
            fn visit_i64<E: de::Error>(self, v: i64) -> Result<TargetDoc, E> {
                self.visit_f64(v as f64)
            }
            fn visit_u64<E: de::Error>(self, v: u64) -> Result<TargetDoc, E> {
                self.visit_f64(v as f64)
            }
            fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<TargetDoc, A::Error> {
                let pair = "a [low, high] pair of two numbers (like [6, 9])";
                let low: f64 = seq
                    .next_element()?
                    .ok_or_else(|| de::Error::custom(format!("expected {pair}")))?;
                let high: f64 = seq
                    .next_element()?
                    .ok_or_else(|| de::Error::custom(format!("expected {pair}")))?;
                if seq.next_element::<IgnoredAny>()?.is_some() {
                    return Err(de::Error::custom(format!(
                        "expected {pair}, not more numbers"
                    )));
                }
                Ok(TargetDoc { low, high })
            }
        }
        d.deserialize_any(V)
    }
}

/// One frozen share: `{ temp_c = -12, fraction = [0.65, 0.70] }`.
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct FrozenDoc {
    temp_c: Spanned<f64>,
    fraction: Spanned<TargetDoc>,
}

/// The `[balance]` table, key by key with their places in the file.
#[derive(Default)]
pub(super) struct BalanceDoc {
    objective: Option<Spanned<String>>,
    vary: Option<Vec<Spanned<String>>>,
    targets: Vec<(Spanned<String>, Spanned<TargetDoc>)>,
    solutes: Vec<(Spanned<String>, Spanned<TargetDoc>)>,
    frozen: Vec<Spanned<FrozenDoc>>,
    unknown: Vec<Spanned<String>>,
}

/// The keys the `[balance]` table knows, for messages.
fn balance_keys() -> String {
    let mut keys = vec!["objective", "vary"];
    keys.extend(PLAIN.iter().map(|(n, _)| *n));
    keys.extend(["solutes_pct", "frozen_at"]);
    keys.join(", ")
}

impl<'de> Deserialize<'de> for BalanceDoc {
    fn deserialize<D: de::Deserializer<'de>>(d: D) -> Result<BalanceDoc, D::Error> {
        struct V;
        impl<'de> Visitor<'de> for V {
            type Value = BalanceDoc;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("the [balance] table")
            }
            fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<BalanceDoc, A::Error> {
                let mut doc = BalanceDoc::default();
                while let Some(key) = map.next_key::<Spanned<String>>()? {
                    match key.get_ref().as_str() {
                        "objective" => doc.objective = Some(map.next_value()?),
                        "vary" => doc.vary = Some(map.next_value()?),
                        "solutes_pct" => {
                            let shares: BTreeMap<Spanned<String>, Spanned<TargetDoc>> =
                                map.next_value()?;
                            doc.solutes.extend(shares);
                        }
                        "frozen_at" => doc.frozen = map.next_value()?,
                        name if PLAIN.iter().any(|(n, _)| *n == name) => {
                            doc.targets.push((key, map.next_value()?));
                        }
                        _ => {
                            map.next_value::<IgnoredAny>()?;
                            doc.unknown.push(key);
                        }
                    }
                }
                Ok(doc)
            }
        }
        d.deserialize_map(V)
    }
}

/// The balancing keys of a `[[line]]`, with their places in the file.
pub(super) struct RuleDoc {
    /// `fixed = true`.
    pub fixed: Option<Spanned<bool>>,
    /// `min_g`.
    pub min_g: Option<Spanned<f64>>,
    /// `max_g`.
    pub max_g: Option<Spanned<f64>>,
    /// `min_pct`.
    pub min_pct: Option<Spanned<f64>>,
    /// `max_pct`.
    pub max_pct: Option<Spanned<f64>>,
}

impl RuleDoc {
    fn rule(&self) -> LineRule {
        let v = |x: &Option<Spanned<f64>>| x.as_ref().map(|s| *s.get_ref());
        LineRule {
            fixed: self.fixed.as_ref().is_some_and(|f| *f.get_ref()),
            min_g: v(&self.min_g),
            max_g: v(&self.max_g),
            min_pct: v(&self.min_pct),
            max_pct: v(&self.max_pct),
        }
    }

    /// Where the rule is written: its first key.
    fn span(&self) -> Option<Range<usize>> {
        let spans = [
            self.fixed.as_ref().map(Spanned::span),
            self.min_g.as_ref().map(Spanned::span),
            self.max_g.as_ref().map(Spanned::span),
            self.min_pct.as_ref().map(Spanned::span),
            self.max_pct.as_ref().map(Spanned::span),
        ];
        spans.into_iter().flatten().min_by_key(|s| s.start)
    }
}

/// What the reader hands over: the parsed pieces with their places.
pub(super) struct BalanceParts<'a> {
    /// The `[balance]` table, if any.
    pub table: Option<&'a Spanned<BalanceDoc>>,
    /// The rule of each line, in line order, with the line's ingredient id.
    pub rules: Vec<(&'a str, &'a RuleDoc)>,
    /// The `[prices]` table.
    pub prices: &'a BTreeMap<Spanned<String>, Spanned<f64>>,
    /// The file's own ingredients (for `price_per_kg`).
    pub own_ingredients: Vec<&'a IngredientTable>,
}

/// An error at a place in the file.
pub(super) type Fail = (Range<usize>, String);

/// Builds the recipe's [`Request`] from the file's pieces, checking each
/// against the recipe's lines and `catalog` (which holds the file's own items).
pub(super) fn request_from_doc(
    parts: &BalanceParts,
    lines: &[Line],
    catalog: &Catalog,
) -> Result<Request, Fail> {
    let mut request = Request::default();
    read_rules(parts, &mut request)?;
    read_prices(parts, catalog, &mut request)?;
    if let Some(table) = parts.table {
        read_table(table, lines, catalog, &mut request)?;
    }
    request.sort_targets();
    Ok(request)
}

fn read_rules(parts: &BalanceParts, request: &mut Request) -> Result<(), Fail> {
    for (id, doc) in &parts.rules {
        let rule = doc.rule();
        let Some(span) = doc.span() else { continue };
        rule.validate()
            .map_err(|reason| (span.clone(), format!("the rule for `{id}`: {reason}")))?;
        if rule.is_empty() {
            // `fixed = false` and nothing else says nothing.
            continue;
        }
        if request.rules.contains_key(*id) {
            return Err((
                span,
                format!(
                    "`{id}` already has a rule on an earlier line; a rule applies to every line of its ingredient, so give it once"
                ),
            ));
        }
        request.rules.insert(id.to_string(), rule);
    }
    Ok(())
}

fn price(value: &Spanned<f64>, id: &str) -> Result<f64, Fail> {
    let p = *value.get_ref();
    if p >= 0.0 && p.is_finite() {
        Ok(p)
    } else {
        Err((
            value.span(),
            format!("the price of `{id}` must be zero or more per kg, not {p}"),
        ))
    }
}

fn read_prices(parts: &BalanceParts, catalog: &Catalog, request: &mut Request) -> Result<(), Fail> {
    for own in &parts.own_ingredients {
        if let Some(p) = &own.price_per_kg {
            let id = own.id.get_ref();
            request.prices_per_kg.insert(id.clone(), price(p, id)?);
        }
    }
    for (key, value) in parts.prices {
        let id = key.get_ref();
        if parts.own_ingredients.iter().any(|o| o.id.get_ref() == id) {
            return Err((
                key.span(),
                format!(
                    "`{id}` is this file's own ingredient: give its price as `price_per_kg` in its [[ingredient]]"
                ),
            ));
        }
        if catalog.ingredient(id).is_none() {
            return Err((
                key.span(),
                format!(
                    "[prices] names `{id}`, which is no ingredient{}",
                    suggest_text(&catalog.nearest_ingredients(id))
                ),
            ));
        }
        request.prices_per_kg.insert(id.clone(), price(value, id)?);
    }
    Ok(())
}

fn target(figure: Figure, doc: &Spanned<TargetDoc>, request: &mut Request) -> Result<(), Fail> {
    let TargetDoc { low, high } = *doc.get_ref();
    let t = Target {
        figure,
        low: Some(low),
        high: Some(high),
    };
    t.validate().map_err(|e| (doc.span(), e.to_string()))?;
    let name = t.figure.name();
    if request.targets.iter().any(|o| o.figure == t.figure) {
        return Err((doc.span(), format!("`{name}` is given twice; give it once")));
    }
    let size = |f: &Figure| matches!(f, Figure::MassG | Figure::VolumeMl);
    if size(&t.figure) && request.targets.iter().any(|o| size(&o.figure)) {
        return Err((
            doc.span(),
            "give the batch size once: `mass_g` or `volume_ml`, not both".into(),
        ));
    }
    request.targets.push(t);
    Ok(())
}

fn read_table(
    table: &Spanned<BalanceDoc>,
    lines: &[Line],
    catalog: &Catalog,
    request: &mut Request,
) -> Result<(), Fail> {
    let doc = table.get_ref();
    if let Some(key) = doc.unknown.first() {
        return Err((
            key.span(),
            format!(
                "unknown key `{}` in [balance]; valid keys: {} (a solute's share is `solutes_pct = {{ id = ... }}`, a frozen share `frozen_at = [{{ temp_c = -12, fraction = [0.65, 0.70] }}]`)",
                key.get_ref(),
                balance_keys()
            ),
        ));
    }
    if let Some(o) = &doc.objective {
        request.objective = Objective::parse(o.get_ref()).ok_or_else(|| {
            (
                o.span(),
                format!(
                    "objective `{}`: give \"nearest\" (least change) or \"cost\" (least cost)",
                    o.get_ref()
                ),
            )
        })?;
    }
    if let Some(vary) = &doc.vary {
        let ids: Vec<&str> = lines.iter().map(|l| l.ingredient.as_str()).collect();
        let mut out = Vec::new();
        for id in vary {
            if !ids.contains(&id.get_ref().as_str()) {
                return Err((
                    id.span(),
                    format!(
                        "`vary` names `{}`, which no line of the recipe uses; the lines are: {}",
                        id.get_ref(),
                        ids.join(", ")
                    ),
                ));
            }
            if !out.contains(id.get_ref()) {
                out.push(id.get_ref().clone());
            }
        }
        request.vary = Some(out);
    }
    for (key, value) in &doc.targets {
        let figure = Figure::parse(key.get_ref()).map_err(|e| (key.span(), e.to_string()))?;
        target(figure, value, request)?;
    }
    for (key, value) in &doc.solutes {
        let id = key.get_ref();
        if catalog.solute(id).is_none() {
            return Err((
                key.span(),
                format!(
                    "`{SOLUTE_PREFIX}{id}`: no solute has the id `{id}`{}",
                    suggest_text(&catalog.nearest_solutes(id))
                ),
            ));
        }
        target(Figure::SolutePct(id.clone()), value, request)?;
    }
    for frozen in &doc.frozen {
        let f = frozen.get_ref();
        let temp_c = *f.temp_c.get_ref();
        let figure = Figure::FrozenAt { temp_c };
        // The temperature is checked where it is written, before the shares.
        if let Err(e) = Target::value(figure.clone(), 0.5).validate() {
            return Err((f.temp_c.span(), e.to_string()));
        }
        target(figure, &f.fraction, request)?;
    }
    Ok(())
}
