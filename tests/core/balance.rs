//! Balancing checked against the outside world: published least-cost blending
//! cases (solved again here by an independent vertex enumeration, shadow prices
//! and reduced costs included), spirit dilution against OIML R 22, and every
//! balanced answer checked by a fresh full analysis (property tests).

use std::collections::BTreeMap;

use gelu::analysis::{Analysis, Options, analyze};
use gelu::balance::{
    Balance, Figure, LineRule, Objective, Request, Status, Target, balance, parse_target,
    reduce_to_strength,
};
use gelu::catalog::Catalog;
use gelu::model::{Amount, Category, Ingredient, Line, Recipe, Style};
use gelu::thermo::ethanol::density_20c_kg_m3;
use proptest::prelude::*;

fn line(id: &str, g: f64) -> Line {
    Line {
        ingredient: id.into(),
        amount: Amount::Grams(g),
    }
}

fn recipe(name: &str, lines: Vec<Line>) -> Recipe {
    Recipe {
        name: name.into(),
        lines,
        ..Recipe::default()
    }
}

/// An own ingredient with the given parts (mass %), water making up the rest.
fn own(id: &str, protein: f64, fat: f64, other: f64, solutes: &[(&str, f64)]) -> Ingredient {
    let dissolved: f64 = solutes.iter().map(|(_, v)| v).sum();
    Ingredient {
        id: id.into(),
        name: id.into(),
        category: Category::Other,
        water_pct: 100.0 - protein - fat - other - dissolved,
        fat_pct: fat,
        protein_pct: protein,
        other_solids_pct: other,
        solutes_pct: solutes
            .iter()
            .map(|(k, v)| (k.to_string(), *v))
            .collect::<BTreeMap<_, _>>(),
        density_g_ml: 1.0,
        allergens: Vec::new(),
        source: "test data from a published LP case".into(),
    }
}

fn analysis_of(r: &Recipe, b: &Balance) -> Analysis {
    let at: Vec<f64> = b
        .targets
        .iter()
        .filter_map(|t| match Figure::parse(&t.name) {
            Ok(Figure::FrozenAt { temp_c }) => Some(temp_c),
            _ => None,
        })
        .collect();
    let options = Options {
        serving_frozen_fraction: None,
        at_temps_c: at,
        ..Options::default()
    };
    let _ = r;
    analyze(&b.recipe, Catalog::builtin(), &options).expect("the answer analyses")
}

/// Every target of a balanced answer is met by a fresh analysis within its tolerance.
fn assert_targets_met(request: &Request, b: &Balance, a: &Analysis) {
    for t in &request.targets {
        let v = t
            .figure
            .value_in(a)
            .unwrap_or_else(|| panic!("{} has a value", t.figure.name()));
        if let Some(l) = t.low {
            let tol = t.figure.tolerance_at(l);
            assert!(
                v >= l - tol,
                "{}: {v} below {l} (tolerance {tol})",
                t.figure.name()
            );
        }
        if let Some(h) = t.high {
            let tol = t.figure.tolerance_at(h);
            assert!(
                v <= h + tol,
                "{}: {v} above {h} (tolerance {tol})",
                t.figure.name()
            );
        }
    }
    assert!(b.targets.iter().all(|t| t.met));
}

// ---------------------------------------------------------------------------
// An independent least-cost solver for the checks: enumerate the vertices of
// {A_eq x = b_eq, A_ub x <= b_ub, x >= 0} by solving every square subsystem.

struct Lp {
    cost: Vec<f64>,
    eq: Vec<(Vec<f64>, f64)>,
    ub: Vec<(Vec<f64>, f64)>,
}

fn solve_square(mut m: Vec<Vec<f64>>, mut rhs: Vec<f64>) -> Option<Vec<f64>> {
    let n = rhs.len();
    for col in 0..n {
        let pivot = (col..n).max_by(|a, b| m[*a][col].abs().total_cmp(&m[*b][col].abs()))?;
        if m[pivot][col].abs() < 1e-12 {
            return None;
        }
        m.swap(col, pivot);
        rhs.swap(col, pivot);
        let pivot_row = m[col].clone();
        let pivot_rhs = rhs[col];
        for (r, (row, b)) in m.iter_mut().zip(rhs.iter_mut()).enumerate() {
            if r != col {
                let f = row[col] / pivot_row[col];
                for (v, p) in row.iter_mut().zip(&pivot_row).skip(col) {
                    *v -= f * p;
                }
                *b -= f * pivot_rhs;
            }
        }
    }
    Some((0..n).map(|i| rhs[i] / m[i][i]).collect())
}

fn choose(k: usize, from: usize) -> Vec<Vec<usize>> {
    let mut out = Vec::new();
    let mut pick = Vec::new();
    fn rec(start: usize, k: usize, from: usize, pick: &mut Vec<usize>, out: &mut Vec<Vec<usize>>) {
        if pick.len() == k {
            out.push(pick.clone());
            return;
        }
        for i in start..from {
            pick.push(i);
            rec(i + 1, k, from, pick, out);
            pick.pop();
        }
    }
    rec(0, k, from, &mut pick, &mut out);
    out
}

/// The least cost and a minimiser, by vertex enumeration.
fn vertex_optimum(lp: &Lp) -> (f64, Vec<f64>) {
    let n = lp.cost.len();
    // Inequalities that may be active: the `ub` rows, then x_j >= 0 as -x_j <= 0.
    let mut candidates: Vec<(Vec<f64>, f64)> = lp.ub.clone();
    for j in 0..n {
        let mut row = vec![0.0; n];
        row[j] = -1.0;
        candidates.push((row, 0.0));
    }
    let mut best: Option<(f64, Vec<f64>)> = None;
    for active in choose(n - lp.eq.len(), candidates.len()) {
        let rows: Vec<&(Vec<f64>, f64)> = lp
            .eq
            .iter()
            .chain(active.iter().map(|k| &candidates[*k]))
            .collect();
        let Some(x) = solve_square(
            rows.iter().map(|r| r.0.clone()).collect(),
            rows.iter().map(|r| r.1).collect(),
        ) else {
            continue;
        };
        let dot = |a: &[f64]| a.iter().zip(&x).map(|(a, x)| a * x).sum::<f64>();
        let ok = candidates.iter().all(|(a, b)| dot(a) <= b + 1e-9)
            && lp.eq.iter().all(|(a, b)| (dot(a) - b).abs() < 1e-9);
        if ok {
            let c = dot(&lp.cost);
            if best.as_ref().is_none_or(|(bc, _)| c < *bc - 1e-12) {
                best = Some((c, x));
            }
        }
    }
    best.expect("the published case is feasible")
}

/// d(least cost)/d(rhs of `ub` row k), by central differences of the vertex optimum.
fn vertex_shadow(lp: &Lp, k: usize, h: f64) -> f64 {
    let mut up = Lp {
        cost: lp.cost.clone(),
        eq: lp.eq.clone(),
        ub: lp.ub.clone(),
    };
    let mut down = Lp {
        cost: lp.cost.clone(),
        eq: lp.eq.clone(),
        ub: lp.ub.clone(),
    };
    up.ub[k].1 += h;
    down.ub[k].1 -= h;
    (vertex_optimum(&up).0 - vertex_optimum(&down).0) / (2.0 * h)
}

/// d(least cost)/d(x_j) when line j is forced in: (cost with x_j >= δ − cost)/δ.
fn vertex_reduced(lp: &Lp, j: usize, delta: f64) -> f64 {
    let mut forced = Lp {
        cost: lp.cost.clone(),
        eq: lp.eq.clone(),
        ub: lp.ub.clone(),
    };
    let mut row = vec![0.0; lp.cost.len()];
    row[j] = -1.0;
    forced.ub.push((row, -delta));
    (vertex_optimum(&forced).0 - vertex_optimum(lp).0) / delta
}

// ---------------------------------------------------------------------------
// Published case 1: the blending case study of the PuLP documentation
// (coin-or.github.io/pulp, "A Blending Problem", full formulation), also the
// University of Auckland OR notes: 100 g cans, protein >= 8 g, fat >= 6 g,
// fibre <= 2 g, salt <= 0.4 g; published optimum beef 60 g, gel 40 g, $0.52 a can.

const CAN_INGREDIENTS: [(&str, f64, f64, f64, f64, f64); 6] = [
    // id, protein, fat, fibre, salt (g per g), cost ($ per g)
    ("chicken", 0.100, 0.080, 0.001, 0.002, 0.013),
    ("beef", 0.200, 0.100, 0.005, 0.005, 0.008),
    ("mutton", 0.150, 0.110, 0.003, 0.007, 0.010),
    ("rice", 0.000, 0.010, 0.100, 0.002, 0.002),
    ("wheat-bran", 0.040, 0.010, 0.150, 0.008, 0.005),
    ("gel", 0.000, 0.000, 0.000, 0.000, 0.001),
];

fn can_case() -> (Recipe, Request, Lp) {
    let mut r = recipe(
        "Blending case",
        CAN_INGREDIENTS
            .iter()
            .map(|c| line(c.0, 100.0 / 6.0))
            .collect(),
    );
    r.style = Style::Other;
    // Fibre as other solids, salt as sodium chloride; the rest is water.
    r.ingredients = CAN_INGREDIENTS
        .iter()
        .map(|(id, p, f, fib, salt, _)| {
            own(
                id,
                100.0 * p,
                100.0 * f,
                100.0 * fib,
                &[("sodium-chloride", 100.0 * salt)],
            )
        })
        .collect();
    r.ingredients[5].solutes_pct.clear();
    let request = Request {
        targets: vec![
            Target::at_least(Figure::ProteinPct, 8.0),
            Target::at_least(Figure::FatPct, 6.0),
            Target::at_most(Figure::OtherSolidsPct, 2.0),
            Target::at_most(Figure::SolutePct("sodium-chloride".into()), 0.4),
            Target::value(Figure::MassG, 100.0),
        ],
        objective: Objective::Cost,
        prices_per_kg: CAN_INGREDIENTS
            .iter()
            .map(|c| (c.0.to_string(), 1000.0 * c.5))
            .collect(),
        ..Request::default()
    };
    let col = |k: usize| -> Vec<f64> {
        CAN_INGREDIENTS
            .iter()
            .map(|c| [c.1, c.2, c.3, c.4][k])
            .collect()
    };
    let neg = |v: Vec<f64>| v.into_iter().map(|x| -x).collect();
    let lp = Lp {
        cost: CAN_INGREDIENTS.iter().map(|c| c.5).collect(),
        eq: vec![(vec![1.0; 6], 100.0)],
        ub: vec![
            (neg(col(0)), -8.0),
            (neg(col(1)), -6.0),
            (col(2), 2.0),
            (col(3), 0.4),
        ],
    };
    (r, request, lp)
}

#[test]
fn least_cost_matches_the_published_blending_case() {
    let (r, request, lp) = can_case();
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced, "{:?}", b.conflicts);
    // Published optimum (PuLP case study): beef 60 g, gel 40 g, $0.52 a can.
    let g: BTreeMap<&str, f64> = b
        .lines
        .iter()
        .map(|l| (l.ingredient.as_str(), l.g))
        .collect();
    assert!((g["beef"] - 60.0).abs() < 1e-3, "beef {}", g["beef"]);
    assert!((g["gel"] - 40.0).abs() < 1e-3, "gel {}", g["gel"]);
    for id in ["chicken", "mutton", "rice", "wheat-bran"] {
        assert!(g[id].abs() < 1e-3, "{id} {}", g[id]);
    }
    let cost = b.cost.unwrap();
    assert!((cost - 0.52).abs() < 1e-5, "cost {cost}");
    assert!((b.cost_per_kg.unwrap() - 5.2).abs() < 1e-4);
    // The independent vertex enumeration agrees (to 1e-9 $).
    let (best, x) = vertex_optimum(&lp);
    assert!((best - 0.52).abs() < 1e-9 && (x[1] - 60.0).abs() < 1e-9);
    assert!((cost - best).abs() < 1e-5);
}

#[test]
fn least_cost_shadow_prices_and_reduced_costs_match_an_independent_solver() {
    let (r, request, lp) = can_case();
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    let t: BTreeMap<&str, _> = b.targets.iter().map(|t| (t.name.as_str(), t)).collect();
    // Fat binds at 6 %: in a 100 g can one percentage point is one gram, so the
    // shadow price per point equals d(cost)/d(g of fat) of the textbook LP,
    // found here by central differences of the vertex optimum (exact within a basis).
    let fat = t["fat_pct"];
    assert!(fat.binding);
    let expected = -vertex_shadow(&lp, 1, 0.01); // row 1 is −fat ≤ −6
    let got = fat.shadow_price.unwrap();
    assert!(
        (got - expected).abs() < 1e-5,
        "fat shadow {got} vs {expected}"
    );
    assert!((expected - 0.07).abs() < 1e-9);
    // Protein, fibre and salt do not bind: no shadow price.
    for name in [
        "protein_pct",
        "other_solids_pct",
        "solutes_pct.sodium-chloride",
    ] {
        assert!(!t[name].binding && t[name].shadow_price.is_none(), "{name}");
    }
    // Mass binds: d(cost)/d(g of can) = 0.52 / 100 $ per g (every share held).
    let mass = t["mass_g"]
        .shadow_price
        .unwrap_or_else(|| panic!("{:?}", t["mass_g"]));
    assert!((mass - 0.0052).abs() < 1e-6, "mass shadow {mass}");
    // Reduced costs ($ per kg): forcing in a gram of an unused ingredient.
    for (j, l) in b.lines.iter().enumerate() {
        if l.g > 1e-6 {
            assert!(l.reduced_cost_per_kg.is_none());
            continue;
        }
        let expected = 1000.0 * vertex_reduced(&lp, j, 0.01);
        let got = l.reduced_cost_per_kg.unwrap();
        assert!(
            (got - expected).abs() < 1e-3,
            "{}: {got} vs {expected}",
            l.ingredient
        );
        assert!(got > 0.0);
    }
}

#[test]
fn an_unused_line_of_a_scaled_least_cost_batch_is_zero_with_its_reduced_cost() {
    // Demo prices (invented); the check is against the engine itself re-solved:
    // a line left out must be exactly 0 g (not an interior-point crumb), carry a
    // reduced cost, and come in once its price falls by more than that, not less.
    let r = pier_gelato();
    let prices: BTreeMap<String, f64> = [
        ("whole-milk", 1.1),
        ("heavy-cream", 4.2),
        ("skim-milk-powder", 3.9),
        ("sucrose", 1.15),
        ("dextrose-monohydrate", 1.6),
        ("stabiliser-blend", 25.0),
    ]
    .into_iter()
    .map(|(id, p)| (id.to_string(), p))
    .collect();
    let mut request = Request::with_targets(vec![
        Target::value(Figure::MassG, 5000.0),
        Target::range(Figure::FatPct, 6.0, 9.0),
        Target::range(Figure::MsnfPct, 9.0, 11.0),
        Target::range(Figure::TotalSolidsPct, 34.0, 38.0),
        Target::range(Figure::FrozenAt { temp_c: -12.0 }, 0.65, 0.70),
        Target::range(Figure::SolutePct("glucose".into()), 0.0, 5.0),
    ]);
    request.objective = Objective::Cost;
    request.prices_per_kg = prices;
    request.rules.insert(
        "stabiliser-blend".into(),
        LineRule {
            fixed: true,
            ..LineRule::default()
        },
    );
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced, "{:?}", b.conflicts);
    let dextrose = b
        .lines
        .iter()
        .find(|l| l.ingredient == "dextrose-monohydrate")
        .unwrap();
    assert_eq!(dextrose.g, 0.0, "left out entirely: {dextrose:?}");
    // Glucose sits at 0 %, a bound every mix meets: it does not bind, has no price.
    let glucose = b
        .targets
        .iter()
        .find(|t| t.name == "solutes_pct.glucose")
        .unwrap();
    assert!(
        !glucose.binding && glucose.shadow_price.is_none(),
        "{glucose:?}"
    );
    let rc = dextrose
        .reduced_cost_per_kg
        .unwrap_or_else(|| panic!("no reduced cost: {dextrose:?}"));
    assert!(rc > 0.0, "{rc}");
    let used_at = |price: f64| {
        let mut cheaper = request.clone();
        cheaper
            .prices_per_kg
            .insert("dextrose-monohydrate".into(), price);
        let b = balance(&r, Catalog::builtin(), &cheaper).unwrap();
        b.lines
            .iter()
            .find(|l| l.ingredient == "dextrose-monohydrate")
            .map_or(0.0, |l| l.g)
    };
    // 5 % either side of the reduced cost: a margin for the interior-point answer.
    assert_eq!(used_at(1.6 - 0.95 * rc), 0.0);
    assert!(used_at(1.6 - 1.05 * rc) > 1.0, "reduced cost {rc} per kg");
}

// Published case 2: the blending example of the R package limSolve (Soetaert,
// Van den Meersche & van Oevelen, `Blending`): one kg of feed with at least
// 80 g of A, 50 g of B, 25 g of C and 5 g of D from two ingredients (40 and
// 60 per kg) and a free filler; published solution 0.5909 / 0.1364 / 0.2727 kg.
#[test]
fn least_cost_matches_the_published_feed_mix() {
    let mut r = recipe(
        "Feed mix",
        vec![
            line("ingredient-one", 300.0),
            line("ingredient-two", 300.0),
            line("filler", 400.0),
        ],
    );
    // A as protein, B as fat, C as other solids, D as sodium chloride (g/kg -> %).
    r.ingredients = vec![
        own(
            "ingredient-one",
            10.0,
            5.0,
            4.0,
            &[("sodium-chloride", 1.0)],
        ),
        own("ingredient-two", 20.0, 15.0, 1.0, &[]),
        own("filler", 0.0, 0.0, 0.0, &[]),
    ];
    let request = Request {
        targets: vec![
            Target::at_least(Figure::ProteinPct, 8.0),
            Target::at_least(Figure::FatPct, 5.0),
            Target::at_least(Figure::OtherSolidsPct, 2.5),
            Target::at_least(Figure::SolutePct("sodium-chloride".into()), 0.5),
            Target::value(Figure::MassG, 1000.0),
        ],
        objective: Objective::Cost,
        prices_per_kg: [
            ("ingredient-one", 40.0),
            ("ingredient-two", 60.0),
            ("filler", 0.0),
        ]
        .iter()
        .map(|(k, v)| (k.to_string(), *v))
        .collect(),
        ..Request::default()
    };
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced);
    // Published to four decimals of a kg: ±0.00005 kg = ±0.05 g, plus solver rounding.
    for (l, published) in b.lines.iter().zip([0.5909, 0.1364, 0.2727]) {
        assert!(
            (l.g / 1000.0 - published).abs() < 6e-5,
            "{} {}",
            l.ingredient,
            l.g
        );
    }
    // The vertex enumeration (g per kg of mix) agrees, shadow prices included.
    let lp = Lp {
        cost: vec![0.040, 0.060, 0.0],
        eq: vec![(vec![1.0; 3], 1000.0)],
        ub: vec![
            (vec![-0.10, -0.20, 0.0], -80.0),
            (vec![-0.05, -0.15, 0.0], -50.0),
            (vec![-0.04, -0.01, 0.0], -25.0),
            (vec![-0.01, 0.0, 0.0], -5.0),
        ],
    };
    let (best, _) = vertex_optimum(&lp);
    assert!(
        (b.cost.unwrap() - best).abs() < 1e-4,
        "{:?} vs {best}",
        b.cost
    );
    let t: BTreeMap<&str, _> = b.targets.iter().map(|t| (t.name.as_str(), t)).collect();
    // In a 1 kg batch one percentage point is 10 g.
    for (name, row) in [("fat_pct", 1), ("other_solids_pct", 2)] {
        let expected = -10.0 * vertex_shadow(&lp, row, 0.01);
        let got = t[name].shadow_price.unwrap();
        assert!((got - expected).abs() < 1e-4, "{name}: {got} vs {expected}");
    }
    assert!(t["protein_pct"].shadow_price.is_none());
}

// ---------------------------------------------------------------------------
// Spirits: dilution to strength conserves ethanol (PRACTICE.md, distillers'
// arithmetic: 10 L at 60 % vol diluted to 40 % vol gives 15.0 L and takes about
// 5.13 kg of water), with densities from OIML R 22.

#[test]
fn reducing_ten_litres_at_sixty_to_forty_percent_takes_about_5_13_kg_of_water() {
    // OIML R 22: 60 % vol is 52.09 % ethanol by mass (REFERENCES.md section 4).
    let p = 0.5209;
    let density = density_20c_kg_m3(p) / 1000.0;
    let mut spirit = own("spirit-60", 0.0, 0.0, 0.0, &[("ethanol", 100.0 * p)]);
    spirit.category = Category::Alcohol;
    spirit.density_g_ml = density;
    let mut r = recipe(
        "Cask strength",
        vec![Line {
            ingredient: "spirit-60".into(),
            amount: Amount::Millilitres(10_000.0),
        }],
    );
    r.style = Style::Spirit;
    r.ingredients = vec![spirit];
    let before = analyze(&r, Catalog::builtin(), &Options::default()).unwrap();
    assert!((before.abv_pct - 60.0).abs() < 0.01, "{}", before.abv_pct);
    let b = reduce_to_strength(&r, Catalog::builtin(), 40.0).unwrap();
    assert_eq!(b.status, Status::Balanced);
    let a = b.analysis.as_ref().unwrap();
    let water = b.lines.iter().find(|l| l.ingredient == "water").unwrap();
    // About 5.13 kg of water (PRACTICE.md); 5.130 kg by OIML R 22 itself.
    assert!((water.g / 1000.0 - 5.13).abs() < 0.005, "{} g", water.g);
    // 15.0 L (PRACTICE.md), within the promised 0.1 % of a volume.
    assert!(
        (a.volume_ml / 15_000.0 - 1.0).abs() < 1e-3,
        "{} mL",
        a.volume_ml
    );
    assert!((a.abv_pct - 40.0).abs() < 0.05);
    // The spirit line is untouched and stays in mL, so ethanol is conserved.
    assert_eq!(b.recipe.lines[0].amount, Amount::Millilitres(10_000.0));
    let ethanol = |x: &Analysis| x.composition.ethanol_pct * x.mass_g / 100.0;
    assert!((ethanol(a) - ethanol(&before)).abs() < 1e-6 * ethanol(&before));
}

#[test]
fn a_liqueur_hits_strength_sugar_and_volume_at_once() {
    // EU Reg. 2019/787: a "crème de" liqueur holds at least 250 g/L of sugar
    // (PRACTICE.md); here exactly 20.0 % vol, 250 g/L and 50 L.
    let r = recipe(
        "Harbour liqueur",
        vec![
            line("neutral-spirit-96", 165.0),
            line("strawberry-puree", 300.0),
            line("sucrose", 260.0),
            line("water", 300.0),
        ],
    );
    let request = Request {
        targets: vec![
            Target::value(Figure::AbvPct, 20.0),
            Target::value(Figure::SugarGPerL, 250.0),
            Target::value(Figure::VolumeMl, 50_000.0),
        ],
        ..Request::default()
    };
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced, "{:?}", b.conflicts);
    let a = analysis_of(&r, &b);
    // The promised tolerances: 0.05 % vol, 0.5 g/L, 0.1 % of a volume.
    assert!((a.abv_pct - 20.0).abs() <= 0.05, "{}", a.abv_pct);
    assert!(
        (a.sugar_g_per_l - 250.0).abs() <= 0.5,
        "{}",
        a.sugar_g_per_l
    );
    assert!((a.volume_ml - 50_000.0).abs() <= 50.0, "{}", a.volume_ml);
    assert_targets_met(&request, &b, &a);
}

// ---------------------------------------------------------------------------
// Frozen desserts.

/// The number in a relaxation's advice: "raise the maximum for fat to 12.5 % (…)".
fn number_after_to(text: &str) -> f64 {
    text.split(" to ")
        .nth(1)
        .and_then(|s| s.split_whitespace().next())
        .and_then(|s| s.parse().ok())
        .unwrap_or_else(|| panic!("a number in {text}"))
}

fn pier_gelato() -> Recipe {
    let mut r = recipe(
        "Pier gelato",
        vec![
            line("whole-milk", 650.0),
            line("heavy-cream", 120.0),
            line("skim-milk-powder", 40.0),
            line("sucrose", 160.0),
            line("dextrose-monohydrate", 25.0),
            line("stabiliser-blend", 4.0),
        ],
    );
    r.style = Style::Gelato;
    r
}

#[test]
fn a_gelato_is_brought_to_a_scoopable_frozen_share_at_minus_twelve() {
    // Scoopable: 65-70 % of the water frozen at serving (Mullan; PRACTICE.md);
    // gelato display -11 to -14 °C (common practice). Fat 6-9 % (PRACTICE.md).
    let r = pier_gelato();
    let before = analyze(
        &r,
        Catalog::builtin(),
        &Options {
            at_temps_c: vec![-12.0],
            ..Options::default()
        },
    )
    .unwrap();
    let share = before.at[0].frozen_fraction;
    assert!(
        !(0.65..=0.70).contains(&share),
        "the test needs a recipe outside the range: {share}"
    );
    let request = Request::with_targets(vec![
        Target::range(Figure::FrozenAt { temp_c: -12.0 }, 0.65, 0.70),
        Target::range(Figure::FatPct, 6.0, 9.0),
        Target::value(Figure::MassG, 1000.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced, "{:?}", b.conflicts);
    let a = analysis_of(&r, &b);
    let got = a.at[0].frozen_fraction;
    // Within the promised 0.005 of a frozen share.
    assert!((0.645..=0.705).contains(&got), "{got}");
    assert_targets_met(&request, &b, &a);
}

#[test]
fn freezing_point_and_serving_temperature_are_met_by_the_full_model() {
    // Ordinary mixes freeze at about -2.2 to -3.0 °C (PRACTICE.md).
    let r = pier_gelato();
    let request = Request::with_targets(vec![
        Target::value(Figure::FreezingPointC, -2.8),
        Target::range(Figure::ServingTempC, -12.0, -11.2),
        Target::range(Figure::TotalSolidsPct, 32.0, 40.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced, "{:?}", b.conflicts);
    let a = analysis_of(&r, &b);
    assert!((a.freezing_point_c.unwrap() + 2.8).abs() <= 0.05);
    assert_targets_met(&request, &b, &a);
    // A batch still, not a spoonful of stabiliser: within half and twice the start.
    let total: f64 = b.lines.iter().map(|l| l.g).sum();
    assert!((500.0..2000.0).contains(&total), "{total} g");
}

#[test]
fn a_serving_temperature_just_out_of_reach_gets_advice_near_what_was_asked() {
    // With the freezing point held at -2.8 °C this gelato's serving temperature
    // reaches about -11.3 °C, not -11.5 °C. The advice must be the nearest change
    // that holds (a few hundredths of a kelvin), and each, applied alone, balances.
    let r = pier_gelato();
    let request = Request::with_targets(vec![
        Target::value(Figure::FreezingPointC, -2.8),
        Target::range(Figure::ServingTempC, -12.5, -11.5),
        Target::range(Figure::TotalSolidsPct, 32.0, 40.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Infeasible);
    let c = &b.conflicts[0];
    for (name, text) in c.targets.iter().zip(&c.relax) {
        let v = number_after_to(text);
        let mut relaxed = request.clone();
        match name.as_str() {
            "freezing_point_c" => {
                assert!((-2.95..-2.8).contains(&v), "{text}");
                relaxed.targets[0] = Target::value(Figure::FreezingPointC, v);
            }
            "serving_temp_c" => {
                assert!((-11.5..-11.2).contains(&v), "{text}");
                relaxed.targets[1].high = Some(v);
            }
            "total_solids_pct" => relaxed.targets[2].high = Some(v),
            other => panic!("{other} in {c:?}"),
        }
        let again = balance(&r, Catalog::builtin(), &relaxed).unwrap();
        assert_eq!(again.status, Status::Balanced, "{text}");
    }
    // The nearest recipe shown is still a batch of about the size asked about.
    let total: f64 = b.lines.iter().map(|l| l.g).sum();
    assert!((500.0..2000.0).contains(&total), "{total} g");
}

#[test]
fn fat_of_twenty_percent_from_milk_and_sugar_is_a_conflict_naming_fat() {
    // Whole milk holds 3.25 % fat (USDA SR Legacy 01077): no mix of it with
    // sucrose reaches 20 %.
    let r = recipe(
        "Milk ice",
        vec![line("whole-milk", 800.0), line("sucrose", 150.0)],
    );
    let request = Request::with_targets(vec![
        Target::at_least(Figure::FatPct, 20.0),
        Target::range(Figure::SugarsPct, 10.0, 25.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Infeasible);
    assert_eq!(b.conflicts.len(), 1, "{:?}", b.conflicts);
    assert_eq!(b.conflicts[0].targets, vec!["fat_pct".to_string()]);
    // The least relaxation: fat at most what the mix can give, under 3.25 %.
    let advice = &b.conflicts[0].relax[0];
    assert!(
        advice.contains("lower the minimum for fat to 3."),
        "{advice}"
    );
    // The nearest makeable recipe is marked: fat unmet, the sugar range met.
    let t: BTreeMap<&str, _> = b.targets.iter().map(|t| (t.name.as_str(), t)).collect();
    assert!(!t["fat_pct"].met && t["sugars_pct"].met);
}

#[test]
fn a_freezing_point_only_approached_without_end_is_a_conflict_not_a_balance() {
    // Cow's milk freezes near -0.52 °C (its cryoscopic point; from memory, -0.512
    // to -0.550 °C in dairy surveys), and the model's whole milk at -0.54 °C: with
    // the sugar held, more milk only brings the mix toward that, never to -0.5 °C. Within the 0.05 K
    // tolerance of a reported figure is not enough when the target's own row
    // cannot hold: the answer must say so, not call it met.
    let r = recipe(
        "Milk ice",
        vec![line("whole-milk", 800.0), line("sucrose", 200.0)],
    );
    let mut request = Request::with_targets(vec![Target::range(Figure::FreezingPointC, -0.5, 0.0)]);
    request.vary = Some(vec!["whole-milk".into()]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Infeasible, "{:?}", b.targets);
    assert_eq!(b.conflicts[0].targets, vec!["freezing_point_c".to_string()]);
    let fp = &b.targets[0];
    assert!(
        fp.value.is_some_and(|v| v < -0.5) && !fp.met,
        "a value outside the range asked is not met: {fp:?}"
    );
    let advice = &b.conflicts[0].relax[0];
    assert!(
        advice.starts_with("lower the minimum for the freezing point to -0.5"),
        // (-0.54 or -0.55: the model's milk, rounded away from the bound)
        "{advice}"
    );
}

#[test]
fn conflict_advice_speaks_fahrenheit_when_asked() {
    // The same milk case, advice for a kitchen that reads °F: -0.5 °C is 31.1 °F
    // (°F = °C × 9/5 + 32, NIST SP 811 appendix B); the figure names stay in °C
    // (they are the file's keys), the words and numbers follow the unit.
    let r = recipe(
        "Milk ice",
        vec![line("whole-milk", 800.0), line("sucrose", 200.0)],
    );
    let mut request = Request::with_targets(vec![
        Target::range(Figure::FreezingPointC, -0.5, 0.0),
        Target::at_most(Figure::FrozenAt { temp_c: -12.0 }, 0.9),
    ]);
    request.vary = Some(vec!["whole-milk".into()]);
    let celsius = balance(&r, Catalog::builtin(), &request).unwrap();
    request.advice_unit = gelu::model::TempUnit::Fahrenheit;
    let fahrenheit = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(fahrenheit.status, Status::Infeasible);
    let c = &celsius.conflicts[0].relax[0];
    let f = &fahrenheit.conflicts[0].relax[0];
    assert!(c.contains("°C (asked at least -0.5 °C)"), "{c}");
    assert!(f.contains("°F (asked at least 31.1 °F)"), "{f}");
    // The same relaxation, rounded away from the bound in each unit (0.01 of a degree).
    let (in_c, in_f) = (number_after_to(c), number_after_to(f));
    assert!((in_c * 9.0 / 5.0 + 32.0 - in_f).abs() < 0.03, "{c} / {f}");
    // The answer itself is the same whatever the words.
    assert_eq!(celsius.lines, fahrenheit.lines);
}

#[test]
fn a_size_left_free_within_its_range_stays_the_size_of_the_recipe() {
    // "Fat 8-9 %, at most 2 kg" of a 1 kg gelato came back as a 55 g batch: with
    // the scale of the recipe free, every change shrank with the batch. The least
    // change is measured against the recipe at the size asked for (here, as it is).
    let r = pier_gelato();
    let request = Request::with_targets(vec![
        Target::range(Figure::FatPct, 8.0, 9.0),
        Target::at_most(Figure::MassG, 2000.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced, "{:?}", b.conflicts);
    let total: f64 = b.lines.iter().map(|l| l.g).sum();
    assert!((800.0..=1200.0).contains(&total), "{total} g");
    // Asked for at least 1.5 kg, the recipe is measured at 1.5 kg.
    let request = Request::with_targets(vec![
        Target::range(Figure::FatPct, 8.0, 9.0),
        Target::range(Figure::MassG, 1500.0, 2000.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    let total: f64 = b.lines.iter().map(|l| l.g).sum();
    assert!((1500.0 - 0.01..=1600.0).contains(&total), "{total} g");
}

#[test]
fn no_ice_yet_at_a_temperature_above_the_freezing_point_holds() {
    // A frozen share of exactly 0 at -2.5 °C means no ice there yet, which any
    // freezing point below -2.5 °C gives (Raoult: ice forms only below the
    // freezing point). Its row was the freezing point itself, so asking for
    // -3.0 °C as well was called a conflict.
    let r = pier_gelato();
    let request = Request::with_targets(vec![
        Target::value(Figure::FreezingPointC, -3.0),
        Target::value(Figure::FrozenAt { temp_c: -2.5 }, 0.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced, "{:?}", b.conflicts);
    let a = analysis_of(&r, &b);
    assert_targets_met(&request, &b, &a);
}

#[test]
fn all_of_the_water_frozen_is_a_conflict_not_an_ocean() {
    // A mix with anything dissolved in it never freezes whole: some water stays
    // liquid at any temperature above the eutectic (Raoult; the frozen share only
    // approaches 1 as the solutes are diluted without end). Found by the CLI
    // property test: it came back "balanced" with a billion grams of water.
    let mut r = pier_gelato();
    r.lines.push(line("water", 25.0));
    let mut request =
        Request::with_targets(vec![Target::value(Figure::FrozenAt { temp_c: -18.0 }, 1.0)]);
    // Some dextrose must stay (a batch of nothing but stabiliser, whose gums hold
    // no water liquid, would be "all frozen" by the model).
    request.rules.insert(
        "dextrose-monohydrate".into(),
        LineRule {
            min_g: Some(9.0),
            ..LineRule::default()
        },
    );
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Infeasible, "{:?}", b.lines);
    // With the dextrose it must keep (without it, a batch of stabiliser alone).
    assert!(
        b.conflicts[0]
            .targets
            .contains(&"frozen_at.-18".to_string()),
        "{:?}",
        b.conflicts
    );
    assert!(!b.targets[0].met, "{:?}", b.targets[0]);
    // The nearest recipe shown is one a kitchen could weigh: not a tank of water.
    let total: f64 = b.lines.iter().map(|l| l.g).sum();
    assert!(total < 200_000.0, "{total} g");
}

#[test]
fn two_targets_that_clash_are_named_together_with_a_relaxation_each() {
    // Cream and milk: fat of at least 14 % needs cream, whose solids push total
    // solids past 20 %.
    let r = recipe(
        "Clash",
        vec![
            line("whole-milk", 500.0),
            line("heavy-cream", 300.0),
            line("sucrose", 150.0),
        ],
    );
    let request = Request::with_targets(vec![
        Target::at_least(Figure::FatPct, 14.0),
        Target::at_most(Figure::TotalSolidsPct, 20.0),
    ]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Infeasible);
    let c = &b.conflicts[0];
    assert_eq!(
        c.targets,
        vec!["fat_pct".to_string(), "total_solids_pct".to_string()]
    );
    assert_eq!(c.relax.len(), 2);
    assert!(
        c.relax[0].starts_with("lower the minimum for fat to"),
        "{:?}",
        c.relax
    );
    assert!(
        c.relax[1].starts_with("raise the maximum for total solids to"),
        "{:?}",
        c.relax
    );
    // Each relaxation, applied alone, balances.
    for (k, text) in c.relax.iter().enumerate() {
        let v = number_after_to(text);
        let mut relaxed = request.clone();
        if k == 0 {
            relaxed.targets[0].low = Some(v);
        } else {
            relaxed.targets[1].high = Some(v);
        }
        let again = balance(&r, Catalog::builtin(), &relaxed).unwrap();
        assert_eq!(again.status, Status::Balanced, "{text}");
    }
}

#[test]
fn line_rules_that_clash_are_named() {
    let r = recipe(
        "Shares",
        vec![line("whole-milk", 500.0), line("sucrose", 500.0)],
    );
    let mut request = Request::default();
    for id in ["whole-milk", "sucrose"] {
        request.rules.insert(
            id.into(),
            LineRule {
                min_pct: Some(60.0),
                ..LineRule::default()
            },
        );
    }
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Infeasible);
    let names = &b.conflicts[0].targets;
    assert!(
        names.contains(&"line.whole-milk.min_pct".to_string()),
        "{names:?}"
    );
    assert!(
        names.contains(&"line.sucrose.min_pct".to_string()),
        "{names:?}"
    );
    // Nothing can be made within the rules: the recipe comes back unchanged.
    assert_eq!(b.recipe.lines, r.lines);
}

#[test]
fn a_line_given_in_millilitres_stays_in_millilitres() {
    let mut r = pier_gelato();
    r.lines[0].amount = Amount::Millilitres(630.0);
    let request = Request::with_targets(vec![Target::range(Figure::FatPct, 7.0, 8.0)]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(b.status, Status::Balanced);
    let Amount::Millilitres(ml) = b.recipe.lines[0].amount else {
        panic!("the milk line changed kind: {:?}", b.recipe.lines[0].amount);
    };
    // Whole milk 1.03 g/mL in the catalog.
    assert!((ml * 1.03 - b.lines[0].g).abs() < 1e-9);
}

#[test]
fn the_same_request_gives_the_same_answer() {
    let r = pier_gelato();
    let request = Request::with_targets(vec![
        parse_target("frozen_at.-12=0.65..0.70").unwrap(),
        parse_target("fat_pct=6..9").unwrap(),
        parse_target("solutes_pct.glucose=..2").unwrap(),
    ]);
    let a = balance(&r, Catalog::builtin(), &request).unwrap();
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    assert_eq!(a, b);
    assert_eq!(
        serde_json::to_string(&a).unwrap(),
        serde_json::to_string(&b).unwrap()
    );
}

#[test]
fn the_json_shape_has_the_public_names() {
    let r = pier_gelato();
    let request = Request::with_targets(vec![parse_target("fat_pct=6..9").unwrap()]);
    let b = balance(&r, Catalog::builtin(), &request).unwrap();
    let v = serde_json::to_value(&b).unwrap();
    for key in [
        "name",
        "status",
        "objective",
        "cost",
        "cost_per_kg",
        "lines",
        "targets",
        "conflicts",
    ] {
        assert!(v.get(key).is_some(), "{key}");
    }
    assert_eq!(v["status"], "balanced");
    assert_eq!(v["objective"], "nearest");
    for key in ["ingredient", "before_g", "g"] {
        assert!(v["lines"][0].get(key).is_some(), "{key}");
    }
    for key in [
        "name",
        "low",
        "high",
        "value",
        "met",
        "binding",
        "shadow_price",
    ] {
        assert!(v["targets"][0].get(key).is_some(), "{key}");
    }
    assert_eq!(v["targets"][0]["name"], "fat_pct");
}

#[test]
fn requests_that_make_no_sense_are_refused_with_the_reason() {
    let r = pier_gelato();
    let mut request = Request::with_targets(vec![Target::at_most(Figure::FatPct, 9.0)]);
    request.vary = Some(vec!["hazelnut-paste".into()]);
    let e = balance(&r, Catalog::builtin(), &request)
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("hazelnut-paste") && e.contains("whole-milk"),
        "{e}"
    );
    let mut request = Request::with_targets(vec![Target::at_most(Figure::FatPct, 9.0)]);
    request.objective = Objective::Cost;
    let e = balance(&r, Catalog::builtin(), &request)
        .unwrap_err()
        .to_string();
    assert!(e.contains("missing") && e.contains("sucrose"), "{e}");
    let request = Request::with_targets(vec![Target::at_most(
        Figure::SolutePct("glucoze".into()),
        9.0,
    )]);
    let e = balance(&r, Catalog::builtin(), &request)
        .unwrap_err()
        .to_string();
    assert!(e.contains("glucose"), "{e}");
}

// ---------------------------------------------------------------------------
// Properties, sampled to stay quick.

const POOL: [&str; 9] = [
    "whole-milk",
    "heavy-cream",
    "skim-milk-powder",
    "sucrose",
    "dextrose-monohydrate",
    "glucose-syrup-42de",
    "egg-yolk",
    "water",
    "stabiliser-blend",
];

fn figure_pool() -> Vec<Figure> {
    vec![
        Figure::FatPct,
        Figure::MsnfPct,
        Figure::TotalSolidsPct,
        Figure::SugarsPct,
        Figure::Sweetness,
        Figure::FreezingPointC,
        Figure::FrozenAt { temp_c: -12.0 },
        Figure::FrozenAt { temp_c: -18.0 },
        Figure::ServingTempC,
        Figure::MassG,
    ]
}

prop_compose! {
    fn mix()(picks in prop::sample::subsequence((0..POOL.len()).collect::<Vec<_>>(), 3..7),
             grams in prop::collection::vec(5.0f64..600.0, 7)) -> Recipe {
        recipe("random", picks.iter().zip(&grams).map(|(k, g)| line(POOL[*k], *g)).collect())
    }
}

fn request_for(r: Recipe) -> impl Strategy<Value = (Recipe, Request)> {
    (
        prop::sample::subsequence((0..10usize).collect::<Vec<_>>(), 1..5),
        prop::collection::vec(-0.25f64..0.25, 10),
        prop::collection::vec(0.0f64..0.1, 10),
        prop::collection::vec(0u8..4, 10),
        prop::collection::vec(0u8..6, 7),
    )
        .prop_map(move |(which, shifts, widths, kinds, rules)| {
            let options = Options {
                at_temps_c: vec![-12.0, -18.0],
                ..Options::default()
            };
            let a = analyze(&r, Catalog::builtin(), &options).unwrap();
            let figures = figure_pool();
            let mut request = Request::default();
            for k in which {
                let f = figures[k].clone();
                let Some(v) = f.value_in(&a) else { continue };
                let center = v + shifts[k] * v.abs().max(1.0);
                let half = widths[k] * v.abs().max(1.0);
                let clamp = |x: f64| match f {
                    Figure::FrozenAt { .. } => x.clamp(0.0, 1.0),
                    Figure::FreezingPointC | Figure::ServingTempC => x.clamp(-40.0, -0.1),
                    Figure::MassG => x.max(10.0),
                    _ => x.clamp(0.0, 100.0),
                };
                let t = match kinds[k] {
                    0 => Target::value(f.clone(), clamp(center)),
                    1 => Target::at_least(f.clone(), clamp(center - half)),
                    2 => Target::at_most(f.clone(), clamp(center + half)),
                    _ => Target::range(f.clone(), clamp(center - half), clamp(center + half)),
                };
                request.targets.push(t);
            }
            for (l, rule) in r.lines.iter().zip(rules) {
                let g = l.amount.grams(1.0);
                let rule = match rule {
                    0 => LineRule::fixed(),
                    1 => LineRule {
                        max_g: Some(1.5 * g),
                        ..LineRule::default()
                    },
                    2 => LineRule {
                        min_g: Some(0.5 * g),
                        ..LineRule::default()
                    },
                    3 => LineRule {
                        max_pct: Some(60.0),
                        ..LineRule::default()
                    },
                    _ => continue,
                };
                request.rules.insert(l.ingredient.clone(), rule);
            }
            (r.clone(), request)
        })
}

/// Line rules hold in any answer, balanced or not.
fn assert_rules_hold(r: &Recipe, request: &Request, b: &Balance) {
    let total: f64 = b.lines.iter().map(|l| l.g).sum();
    for (before, l) in r.lines.iter().zip(&b.lines) {
        assert!(l.g >= 0.0);
        let Some(rule) = request.rules.get(&l.ingredient) else {
            continue;
        };
        if rule.fixed {
            let after = b
                .recipe
                .lines
                .iter()
                .find(|x| x.ingredient == l.ingredient)
                .unwrap();
            assert_eq!(after.amount, before.amount, "{} moved", l.ingredient);
        }
        if let Some(lo) = rule.min_g {
            assert!(l.g >= lo, "{} {} < {lo}", l.ingredient, l.g);
        }
        if let Some(hi) = rule.max_g {
            assert!(l.g <= hi, "{} {} > {hi}", l.ingredient, l.g);
        }
        if b.status == Status::Balanced
            && let Some(hi) = rule.max_pct
        {
            assert!(100.0 * l.g / total <= hi + 1e-4, "{} share", l.ingredient);
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(32))]

    #[test]
    fn a_balanced_answer_meets_every_target_in_a_fresh_analysis((r, request) in mix().prop_flat_map(request_for)) {
        let b = balance(&r, Catalog::builtin(), &request).unwrap();
        assert_rules_hold(&r, &request, &b);
        match b.status {
            Status::Balanced => {
                prop_assert!(b.conflicts.is_empty());
                let a = analysis_of(&r, &b);
                assert_targets_met(&request, &b, &a);
            }
            Status::Infeasible => {
                prop_assert!(!b.conflicts.is_empty());
                prop_assert!(b.conflicts.iter().all(|c| !c.targets.is_empty() && c.relax.len() >= c.targets.len()));
            }
        }
    }

    #[test]
    fn fat_beyond_whole_milk_is_always_a_conflict_naming_fat(
        milk in 10.0f64..2000.0,
        sugar in 0.0f64..500.0,
        fat in 3.3f64..60.0,
    ) {
        // Whole milk holds 3.25 % fat (USDA SR Legacy 01077), sucrose none.
        let r = recipe("Milk ice", vec![line("whole-milk", milk), line("sucrose", sugar)]);
        let request = Request::with_targets(vec![Target::at_least(Figure::FatPct, fat)]);
        let b = balance(&r, Catalog::builtin(), &request).unwrap();
        prop_assert_eq!(b.status, Status::Infeasible);
        prop_assert_eq!(&b.conflicts[0].targets, &vec!["fat_pct".to_string()]);
        prop_assert!(b.conflicts[0].relax[0].contains("lower the minimum for fat to 3.2 %"), "{:?}", b.conflicts);
    }

    #[test]
    fn scaling_the_mass_target_scales_the_answer(r in mix(), k in 0.2f64..5.0) {
        let a = analyze(&r, Catalog::builtin(), &Options { at_temps_c: vec![-12.0], ..Options::default() }).unwrap();
        let fat = a.composition.fat_pct;
        let targets = |mass: f64| Request::with_targets(vec![
            Target::range(Figure::FatPct, 0.9 * fat, 0.95 * fat),
            Target::value(Figure::MassG, mass),
        ]);
        let one = balance(&r, Catalog::builtin(), &targets(1000.0)).unwrap();
        let many = balance(&r, Catalog::builtin(), &targets(1000.0 * k)).unwrap();
        prop_assert_eq!(one.status, many.status);
        for (x, y) in one.lines.iter().zip(&many.lines) {
            prop_assert!((y.g - k * x.g).abs() <= 1e-4 * (k * 1000.0), "{} {} vs {}", x.ingredient, y.g, k * x.g);
        }
    }
}

// Every relaxation the engine advises, applied alone, must let the others hold:
// the advice is read and typed back as printed. A fixed seed keeps the quick run
// the same everywhere; sweeps of 1,500 cases with random seeds passed three times
// in a row when this was written (change `rng_seed` and `cases` to run one).
proptest! {
    #![proptest_config(ProptestConfig {
        cases: 24,
        max_global_rejects: 100_000,
        rng_seed: proptest::test_runner::RngSeed::Fixed(20261202),
        ..ProptestConfig::default()
    })]

    #[test]
    fn each_relaxation_alone_lets_the_others_hold((r, request) in mix().prop_flat_map(request_for)) {
        let b = balance(&r, Catalog::builtin(), &request).unwrap();
        prop_assume!(b.status == Status::Infeasible && b.conflicts.len() == 1);
        let c = &b.conflicts[0];
        for (name, text) in c.targets.iter().zip(&c.relax) {
            let Some(k) = request.targets.iter().position(|t| t.figure.name() == *name) else { continue };
            // Advice on targets only (a line rule's is checked in the examples above).
            if !(text.starts_with("lower the minimum") || text.starts_with("raise the maximum") || text.starts_with("change")) { continue; }
            let v = number_after_to(text);
            let mut relaxed = request.clone();
            let t = &mut relaxed.targets[k];
            if text.starts_with("lower the minimum") { t.low = Some(v); }
            else if text.starts_with("raise the maximum") { t.high = Some(v); }
            else { t.low = Some(v); t.high = Some(v); }
            let again = balance(&r, Catalog::builtin(), &relaxed);
            prop_assert!(again.is_ok(), "{text}: {again:?}");
            let Ok(again) = again else { continue };
            let still = again.conflicts.iter().any(|x| x.targets == c.targets);
            prop_assert!(again.status == Status::Balanced || !still, "{text}: {:?} / asked {:?} / rules {:?} / recipe {:?}", again.conflicts, request.targets, request.rules, r.lines);
        }
    }


}
