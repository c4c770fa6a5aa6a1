//! The recipe as balancing sees it: one variable per line (its mass in g) and,
//! per gram of each line, what it brings to every figure. The per-gram numbers
//! come from the pure analysis itself (a full analysis of 100 g of the line
//! alone, and its [`Mix`]), so the definitions are the analysis's, written once.
//!
//! Composition figures are sums over lines, so they are linear in the masses.
//! The freezing figures are linear too at a fixed temperature: by ZSR the
//! unfrozen water at T is Σ n_i / m*_i(T), a sum over lines. Only the volume
//! (through the ethanol-water contraction of OIML R 22) is not; it is evaluated
//! here by the analysis's own [`Mix::volume_ml`] on a reused mix.

use crate::analysis::{Analysis, AnalysisError, Mix, Options, analyze};
use crate::catalog::Catalog;
use crate::model::{Amount, Line, Recipe};
use crate::thermo::zsr::Serum;

use crate::model::balancing::Figure;

/// One line: its ingredient and what one gram of it brings.
pub(crate) struct LineModel<'c> {
    /// Ingredient id.
    pub ingredient: String,
    /// Density (g/mL), for lines given by volume.
    pub density_g_ml: f64,
    /// Mass before balancing (g).
    pub before_g: f64,
    /// Full analysis of 100 g of the line alone.
    alone: Analysis,
    /// Water of one gram (g).
    pub water_g: f64,
    /// Water the glass-forming solutes of one gram keep unfrozen (g).
    pub glass_g: f64,
    /// The serum of one gram, for the ZSR sum.
    serum: Serum<'c>,
    /// One gram's mix, for the volume.
    mix: Mix<'c>,
    /// Each solute of the template mix in one gram (g), in the template's order.
    solutes_g: Vec<f64>,
}

/// The whole recipe as balancing sees it.
pub(crate) struct Model<'c> {
    /// The lines, in recipe order.
    pub lines: Vec<LineModel<'c>>,
    /// Reference mass (g): the recipe's current mass, or the size asked for.
    pub mass_ref_g: f64,
    /// Share of water frozen at serving (0..1) for the serving temperature.
    pub serving_frozen_fraction: f64,
    /// A mix holding every solute of every line, reused to evaluate the volume.
    template: Mix<'c>,
}

fn one_line(id: &str, g: f64) -> Recipe {
    Recipe {
        lines: vec![Line {
            ingredient: id.to_string(),
            amount: Amount::Grams(g),
        }],
        ..Recipe::default()
    }
}

impl<'c> Model<'c> {
    /// Builds the model of `recipe` (whose own items are already in `catalog`);
    /// the serving temperature is where the recipe's own serving share is frozen.
    pub fn new(recipe: &Recipe, catalog: &'c Catalog) -> Result<Model<'c>, AnalysisError> {
        let mut lines = Vec::with_capacity(recipe.lines.len());
        for (index, line) in recipe.lines.iter().enumerate() {
            let Some(ing) = catalog.ingredient(&line.ingredient) else {
                return Err(AnalysisError::UnknownIngredient {
                    line: index + 1,
                    id: line.ingredient.clone(),
                    suggestions: catalog.nearest_ingredients(&line.ingredient),
                });
            };
            let before_g = line.amount.grams(ing.density_g_ml);
            if !(before_g >= 0.0 && before_g.is_finite()) {
                return Err(AnalysisError::BadAmount {
                    line: index + 1,
                    grams: before_g,
                });
            }
            let alone = analyze(
                &one_line(&line.ingredient, 100.0),
                catalog,
                &Options::default(),
            )?;
            let mix = Mix::from_recipe(&one_line(&line.ingredient, 1.0), catalog)?;
            let serum = mix.serum();
            lines.push(LineModel {
                ingredient: line.ingredient.clone(),
                density_g_ml: ing.density_g_ml,
                before_g,
                alone,
                water_g: mix.water_g,
                glass_g: serum.glass_water_g(),
                serum,
                mix,
                solutes_g: Vec::new(),
            });
        }
        let mut all = recipe.clone();
        all.solutes.clear();
        all.ingredients.clear();
        for line in &mut all.lines {
            line.amount = Amount::Grams(1.0);
        }
        // The serving share exactly as the analysis picks it.
        let serving = if all.lines.is_empty() {
            crate::analysis::DEFAULT_SERVING_FROZEN_FRACTION
        } else {
            analyze(&all, catalog, &Options::default())?.serving_frozen_fraction
        };
        let template = if all.lines.is_empty() {
            Mix::default()
        } else {
            Mix::from_recipe(&all, catalog)?
        };
        for l in &mut lines {
            l.solutes_g = template
                .solutes
                .keys()
                .map(|id| l.mix.solute_g(id))
                .collect();
        }
        Ok(Model {
            mass_ref_g: lines.iter().map(|l| l.before_g).sum(),
            lines,
            serving_frozen_fraction: serving,
            template,
        })
    }

    /// Number of lines (variables).
    pub fn len(&self) -> usize {
        self.lines.len()
    }

    /// Per gram of each line, the numerator N of a share figure whose value is
    /// 100 · N·x / Σx (composition %, a solute's %, sweetness); `None` for
    /// figures of another form.
    pub fn share_numerator(&self, figure: &Figure) -> Option<Vec<f64>> {
        let per_g = |f: &dyn Fn(&Analysis) -> f64| -> Vec<f64> {
            self.lines.iter().map(|l| f(&l.alone) / 100.0).collect()
        };
        Some(match figure {
            Figure::FatPct => per_g(&|a| a.composition.fat_pct),
            Figure::MsnfPct => per_g(&|a| a.composition.msnf_pct),
            Figure::ProteinPct => per_g(&|a| a.composition.protein_pct),
            Figure::LactosePct => per_g(&|a| a.composition.lactose_pct),
            Figure::SugarsPct => per_g(&|a| a.composition.sugars_pct),
            Figure::TotalSolidsPct => per_g(&|a| a.composition.total_solids_pct),
            Figure::WaterPct => per_g(&|a| a.composition.water_pct),
            Figure::EthanolPct => per_g(&|a| a.composition.ethanol_pct),
            Figure::OtherSolidsPct => per_g(&|a| a.composition.other_solids_pct),
            Figure::Sweetness => per_g(&|a| a.sweetness),
            Figure::SolutePct(id) => per_g(&|a| a.solutes_pct.get(id).copied().unwrap_or(0.0)),
            _ => return None,
        })
    }

    /// Ethanol per gram of each line (g/g).
    pub fn ethanol_per_g(&self) -> Vec<f64> {
        self.lines
            .iter()
            .map(|l| l.alone.composition.ethanol_pct / 100.0)
            .collect()
    }

    /// Sugars and other sweeteners counted in g/L, per gram of each line (g/g).
    pub fn sugar_per_g(&self) -> Vec<f64> {
        self.lines
            .iter()
            .map(|l| l.alone.sugar_g_per_l * l.alone.volume_ml / 1000.0 / 100.0)
            .collect()
    }

    /// Unfrozen water by ZSR at `temp_c` (°C) per gram of each line (g/g).
    pub fn zsr_per_g(&self, temp_c: f64) -> Vec<f64> {
        self.lines
            .iter()
            .map(|l| {
                if l.serum.solutes.iter().any(|s| s.moles > 0.0) {
                    l.serum.zsr_water_g(temp_c)
                } else {
                    0.0
                }
            })
            .collect()
    }

    /// A scratch mix for evaluating the volume many times.
    pub fn volume_evaluator(&self) -> VolumeEvaluator<'_, 'c> {
        VolumeEvaluator {
            model: self,
            mix: self.template.clone(),
        }
    }
}

/// Evaluates the analysis's volume at given line masses, reusing one mix.
pub(crate) struct VolumeEvaluator<'m, 'c> {
    model: &'m Model<'c>,
    mix: Mix<'c>,
}

impl VolumeEvaluator<'_, '_> {
    /// Volume at 20 °C (mL) of the mix with line masses `x_g` (g), by [`Mix::volume_ml`].
    pub fn volume_ml(&mut self, x_g: &[f64]) -> f64 {
        let lines = &self.model.lines;
        let sum = |f: &dyn Fn(&Mix) -> f64| -> f64 {
            lines.iter().zip(x_g).map(|(l, x)| x * f(&l.mix)).sum()
        };
        self.mix.mass_g = x_g.iter().sum();
        self.mix.water_g = sum(&|m| m.water_g);
        self.mix.fat_g = sum(&|m| m.fat_g);
        self.mix.protein_g = sum(&|m| m.protein_g);
        self.mix.other_solids_g = sum(&|m| m.other_solids_g);
        self.mix.msnf_g = sum(&|m| m.msnf_g);
        for (k, entry) in self.mix.solutes.values_mut().enumerate() {
            entry.1 = lines.iter().zip(x_g).map(|(l, x)| x * l.solutes_g[k]).sum();
        }
        self.mix.volume_ml()
    }

    /// The volume and its gradient (mL/g per line) at `x_g`, by forward
    /// differences of the full volume (the step is a millionth of the batch).
    pub fn volume_and_gradient(&mut self, x_g: &[f64]) -> (f64, Vec<f64>) {
        let v = self.volume_ml(x_g);
        let total: f64 = x_g.iter().sum();
        let h = 1e-6 * total.max(self.model.mass_ref_g).max(1.0);
        let mut x = x_g.to_vec();
        let grad = (0..x.len())
            .map(|j| {
                x[j] += h;
                let up = self.volume_ml(&x);
                x[j] = x_g[j];
                (up - v) / h
            })
            .collect();
        (v, grad)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sums_over_lines_give_the_analysis_of_the_whole_mix() {
        let line = |id: &str, g: f64| Line {
            ingredient: id.into(),
            amount: Amount::Grams(g),
        };
        let recipe = Recipe {
            lines: vec![
                line("whole-milk", 500.0),
                line("heavy-cream", 200.0),
                line("invert-syrup", 80.0),
                line("spirit-40", 60.0),
                line("cocoa-powder", 20.0),
            ],
            ..Recipe::default()
        };
        let catalog = Catalog::builtin();
        let model = Model::new(&recipe, catalog).unwrap();
        let x: Vec<f64> = model.lines.iter().map(|l| l.before_g).collect();
        let a = analyze(&recipe, catalog, &Options::default()).unwrap();
        let mass: f64 = x.iter().sum();
        let share = |f: Figure| {
            let n = model.share_numerator(&f).unwrap();
            100.0 * n.iter().zip(&x).map(|(n, x)| n * x).sum::<f64>() / mass
        };
        let c = &a.composition;
        for (f, v) in [
            (Figure::FatPct, c.fat_pct),
            (Figure::MsnfPct, c.msnf_pct),
            (Figure::SugarsPct, c.sugars_pct),
            (Figure::TotalSolidsPct, c.total_solids_pct),
            (Figure::EthanolPct, c.ethanol_pct),
            (Figure::OtherSolidsPct, c.other_solids_pct),
            (Figure::Sweetness, a.sweetness),
            (
                Figure::SolutePct("fructose".into()),
                a.solutes_pct["fructose"],
            ),
        ] {
            assert!((share(f.clone()) - v).abs() < 1e-9, "{}", f.name());
        }
        let volume = model.volume_evaluator().volume_ml(&x);
        assert!((volume - a.volume_ml).abs() < 1e-9 * volume);
        let sugar: f64 = model.sugar_per_g().iter().zip(&x).map(|(s, x)| s * x).sum();
        assert!((1000.0 * sugar / volume - a.sugar_g_per_l).abs() < 1e-9);
    }
}
