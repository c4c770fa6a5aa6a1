//! The import line reader under attack: any line is read without a panic; a line
//! it takes is a record the command line could have made, its trail applies to
//! its first form and gives back the record as it stood, and that record, written
//! as JSON again, reads back as the same.

#![no_main]

use gelu::batch::amend::apply_trail;
use gelu::batch::jsonl::{batch_json, read_line};
use gelu::batch::validate::{Recipes, check_record};
use gelu::catalog::Catalog;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let catalog = Catalog::builtin();
    let mut recipes = Recipes::default();
    let Ok((first, prediction)) = read_line(text, &mut recipes, catalog) else {
        return;
    };
    let mut current = first.clone();
    if let Err(e) = apply_trail(&mut current) {
        panic!("a record taken in does not apply its own trail: {e}");
    }
    current.prediction = serde_json::from_str(prediction).expect("the prediction is JSON");
    check_record(&current).expect("the record as it stands is one the command line could make");
    let line = batch_json(&current).to_string();
    let (again, _) = match read_line(&line, &mut recipes, catalog) {
        Ok(again) => again,
        Err(e) => panic!("the record written again is refused: {e}\n{line}"),
    };
    assert_eq!(
        again, first,
        "the record written again reads back as another"
    );
});
