//! Speed of balancing: a 15-line gelato with six targets including the frozen
//! share at the cabinet temperature (goal: under 5 ms median), and a
//! 27-ingredient least-cost problem with linear targets (goal: under 2 ms);
//! and, for information, a conflict explained.
//! Prices are invented demo numbers.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use gelu::analysis::DEFAULT_CABINET_TEMP_C;
use gelu::balance::{Figure, Objective, Request, Status, Target, balance};
use gelu::catalog::Catalog;
use gelu::model::{Amount, Line, Recipe, Style};

fn line(id: &str, g: f64) -> Line {
    Line {
        ingredient: id.into(),
        amount: Amount::Grams(g),
    }
}

fn fifteen_line_gelato() -> Recipe {
    let lines = [
        ("whole-milk", 520.0),
        ("heavy-cream", 110.0),
        ("skim-milk-powder", 35.0),
        ("egg-yolk", 20.0),
        ("sucrose", 120.0),
        ("dextrose-monohydrate", 30.0),
        ("glucose-syrup-42de", 30.0),
        ("invert-syrup", 15.0),
        ("honey", 10.0),
        ("strawberry-puree", 80.0),
        ("lemon-juice", 10.0),
        ("salt", 0.5),
        ("inulin", 6.0),
        ("stabiliser-blend", 3.5),
        ("water", 10.0),
    ];
    Recipe {
        name: "Bench gelato".into(),
        style: Style::Gelato,
        lines: lines.iter().map(|(id, g)| line(id, *g)).collect(),
        ..Recipe::default()
    }
}

fn bench_gelato(c: &mut Criterion) {
    let recipe = fifteen_line_gelato();
    assert_eq!(recipe.lines.len(), 15);
    let request = Request::with_targets(vec![
        Target::range(Figure::FatPct, 6.0, 8.0),
        Target::range(Figure::MsnfPct, 8.0, 11.0),
        Target::range(Figure::SugarsPct, 18.0, 22.0),
        Target::range(Figure::TotalSolidsPct, 32.0, 40.0),
        Target::range(
            Figure::FrozenAt {
                temp_c: DEFAULT_CABINET_TEMP_C,
            },
            0.65,
            0.70,
        ),
        Target::value(Figure::MassG, 1000.0),
    ]);
    let catalog = Catalog::builtin();
    let first = balance(&recipe, catalog, &request).expect("balances");
    assert_eq!(first.status, Status::Balanced, "{:?}", first.conflicts);
    c.bench_function("balance 15-line gelato, six targets", |b| {
        b.iter(|| balance(black_box(&recipe), catalog, &request).expect("balances"))
    });
}

const TWENTY_SEVEN: [(&str, f64); 27] = [
    ("water", 0.0),
    ("whole-milk", 1.1),
    ("skim-milk", 0.9),
    ("heavy-cream", 4.2),
    ("butter", 9.5),
    ("skim-milk-powder", 3.8),
    ("whole-milk-powder", 5.1),
    ("sweetened-condensed-milk", 3.2),
    ("plain-yogurt", 2.4),
    ("egg-yolk", 8.0),
    ("whole-egg", 4.5),
    ("sucrose", 1.2),
    ("glucose", 1.6),
    ("fructose", 2.9),
    ("dextrose-monohydrate", 1.4),
    ("invert-syrup", 1.8),
    ("honey", 7.5),
    ("glucose-syrup-42de", 1.3),
    ("glucose-syrup-63de", 1.35),
    ("maltodextrin-10de", 1.5),
    ("inulin", 6.0),
    ("cocoa-powder", 9.0),
    ("dark-chocolate", 12.0),
    ("strawberry-puree", 3.5),
    ("mango-puree", 3.0),
    ("coconut-milk", 3.3),
    ("stabiliser-blend", 20.0),
];

fn bench_least_cost(c: &mut Criterion) {
    let recipe = Recipe {
        name: "Bench least cost".into(),
        lines: TWENTY_SEVEN
            .iter()
            .map(|(id, _)| line(id, 1000.0 / 27.0))
            .collect(),
        ..Recipe::default()
    };
    let request = Request {
        targets: vec![
            Target::range(Figure::FatPct, 8.0, 12.0),
            Target::range(Figure::MsnfPct, 9.0, 11.0),
            Target::range(Figure::SugarsPct, 16.0, 20.0),
            Target::range(Figure::TotalSolidsPct, 36.0, 40.0),
            Target::at_least(Figure::ProteinPct, 3.5),
            Target::at_most(Figure::SolutePct("glucose".into()), 5.0),
            Target::range(Figure::Sweetness, 14.0, 18.0),
            Target::value(Figure::MassG, 1000.0),
        ],
        objective: Objective::Cost,
        prices_per_kg: TWENTY_SEVEN
            .iter()
            .map(|(id, p)| (id.to_string(), *p))
            .collect(),
        ..Request::default()
    };
    let catalog = Catalog::builtin();
    let first = balance(&recipe, catalog, &request).expect("balances");
    assert_eq!(first.status, Status::Balanced, "{:?}", first.conflicts);
    c.bench_function("least cost over 27 ingredients, linear targets", |b| {
        b.iter(|| balance(black_box(&recipe), catalog, &request).expect("balances"))
    });
}

/// For information (no goal): explaining a conflict takes many more programmes.
fn bench_conflict(c: &mut Criterion) {
    let recipe = Recipe {
        name: "Bench clash".into(),
        lines: vec![
            line("whole-milk", 500.0),
            line("heavy-cream", 300.0),
            line("sucrose", 150.0),
            line("water", 20.0),
        ],
        ..Recipe::default()
    };
    let request = Request::with_targets(vec![
        Target::at_least(Figure::FatPct, 14.0),
        Target::at_most(Figure::TotalSolidsPct, 30.0),
        Target::range(Figure::FreezingPointC, -2.0, -1.5),
    ]);
    let catalog = Catalog::builtin();
    let first = balance(&recipe, catalog, &request).expect("answers");
    assert_eq!(first.status, Status::Infeasible);
    c.bench_function("explain a conflict of three targets", |b| {
        b.iter(|| balance(black_box(&recipe), catalog, &request).expect("answers"))
    });
}

criterion_group!(benches, bench_gelato, bench_least_cost, bench_conflict);
criterion_main!(benches);
