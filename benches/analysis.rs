//! Speed of the core: the full analysis of a 15-line recipe including the
//! freezing curve (goal: under 20 µs median), and reporting 1000 recipe files
//! from disk as JSON (parse + analyse + serialise).

use std::hint::black_box;
use std::path::Path;

use criterion::{Criterion, criterion_group, criterion_main};
use gelu::analysis::{Options, analyze};
use gelu::catalog::Catalog;
use gelu::recipe_file::{parse_recipe, read_recipe};
use gelu::report::json::write_analysis_json;

/// A 15-line custard-and-fruit mix using a spread of solute models.
const FIFTEEN_LINES: &str = r#"
name = "Bench fifteen"
style = "ice-cream"
[[line]]
ingredient = "whole-milk"
g = 400
[[line]]
ingredient = "heavy-cream"
g = 200
[[line]]
ingredient = "skim-milk-powder"
g = 40
[[line]]
ingredient = "egg-yolk"
g = 50
[[line]]
ingredient = "sucrose"
g = 100
[[line]]
ingredient = "dextrose-monohydrate"
g = 20
[[line]]
ingredient = "glucose-syrup-42de"
g = 30
[[line]]
ingredient = "invert-syrup"
g = 15
[[line]]
ingredient = "honey"
g = 10
[[line]]
ingredient = "strawberry-puree"
g = 80
[[line]]
ingredient = "lemon-juice"
g = 10
[[line]]
ingredient = "salt"
g = 1
[[line]]
ingredient = "spirit-40"
g = 15
[[line]]
ingredient = "stabiliser-blend"
g = 3
[[line]]
ingredient = "inulin"
g = 6
"#;

fn bench_analysis(c: &mut Criterion) {
    let recipe = parse_recipe(Path::new("bench.toml"), FIFTEEN_LINES).expect("bench recipe parses");
    assert_eq!(recipe.lines.len(), 15);
    let catalog = Catalog::builtin();
    let options = Options::default();
    c.bench_function("analyze 15-line recipe with curve", |b| {
        b.iter(|| analyze(black_box(&recipe), catalog, &options).expect("analyses"))
    });
}

fn bench_report_files(c: &mut Criterion) {
    let dir = tempfile::tempdir().expect("temp dir");
    let samples = gelu::samples::SAMPLE_RECIPES;
    let paths: Vec<_> = (0..1000)
        .map(|k| {
            let (_, text) = samples[k % samples.len()];
            let p = dir.path().join(format!("r{k:04}.toml"));
            std::fs::write(&p, text).expect("write");
            p
        })
        .collect();
    let mut group = c.benchmark_group("report");
    group.sample_size(10);
    group.bench_function("1000 recipe files to JSON", |b| {
        b.iter(|| {
            let mut out = Vec::with_capacity(1 << 22);
            for p in &paths {
                let (recipe, _) = read_recipe(p).expect("reads");
                let a =
                    analyze(&recipe, Catalog::builtin(), &Options::default()).expect("analyses");
                write_analysis_json(&a, &mut out).expect("json");
                out.push(b'\n');
            }
            out
        })
    });
    group.finish();
}

criterion_group!(benches, bench_analysis, bench_report_files);
criterion_main!(benches);
