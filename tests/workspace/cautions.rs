//! Safety: for every sample recipe, every caution of the model shows on the
//! recipe screen (at least its opening words) at 80x24 and at 120x40, every
//! warning does too or the panel points to the rest, and all of them show in
//! full in the warnings reader.

use std::path::Path;

use crate::common::draw;
use gelu::recipe_file::parse_recipe;
use gelu::samples::SAMPLE_RECIPES;
use gelu::tui::state::RecipeSource;
use gelu::tui::{Action, Command, State, update};

/// The screen text with line breaks and box edges turned into spaces, so
/// wrapped sentences can be searched.
fn flattened(screen: &str) -> String {
    screen
        .replace(['│', '\n'], " ")
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
}

fn opening(text: &str) -> String {
    text.chars().take(14).collect()
}

#[test]
fn every_caution_and_warning_of_every_sample_is_on_screen() {
    for (file, text) in SAMPLE_RECIPES {
        let recipe = match parse_recipe(Path::new(file), text) {
            Ok(r) => r,
            Err(e) => panic!("{file}: {e}"),
        };
        let mut state = State::new(false);
        update(
            &mut state,
            Action::RecipeLoaded {
                recipe,
                source: RecipeSource::New,
            },
        );
        let Ok(analysis) = state.recipe.analysis.clone() else {
            panic!("{file} does not analyse");
        };
        assert!(!analysis.cautions.is_empty(), "{file} has cautions");
        let notices: Vec<String> = analysis
            .warnings
            .iter()
            .map(|w| w.message.clone())
            .chain(analysis.cautions.iter().cloned())
            .collect();
        for (w, h) in [(80, 24), (120, 40)] {
            let screen = draw(&state, w, h);
            let shown = notices
                .iter()
                .filter(|n| screen.contains(&opening(n)))
                .count();
            // When not all fit, the panel says how many more there are.
            let more = screen.contains("more: press w");
            assert!(
                shown == notices.len() || more,
                "{file} at {w}x{h}: {shown} of {} notices shown and no pointer to the rest\n{screen}",
                notices.len()
            );
            // Cautions of safe practice are never the ones cut.
            for caution in &analysis.cautions {
                assert!(
                    screen.contains(&opening(caution)),
                    "{file} at {w}x{h}: caution `{caution}` not on screen\n{screen}"
                );
            }
        }
        update(&mut state, Action::Command(Command::ShowWarnings));
        let reader = flattened(&draw(&state, 120, 60));
        for n in &notices {
            let words = n.split_whitespace().collect::<Vec<_>>().join(" ");
            let head: String = words.chars().take(60).collect();
            assert!(reader.contains(&head), "{file}: the reader lacks `{n}`");
        }
    }
}
