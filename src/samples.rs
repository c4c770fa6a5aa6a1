//! The sample recipes shipped with gelu, embedded at build time: a harbour-town
//! kitchen and a small distillery. A new database is seeded with them.

/// (file name, TOML text) of every file in `sample-recipes/`.
pub const SAMPLE_RECIPES: &[(&str, &str)] = &[
    (
        "cream-liqueur.toml",
        include_str!("../sample-recipes/cream-liqueur.toml"),
    ),
    (
        "dark-rum-custard.toml",
        include_str!("../sample-recipes/dark-rum-custard.toml"),
    ),
    (
        "harbour-froyo.toml",
        include_str!("../sample-recipes/harbour-froyo.toml"),
    ),
    (
        "harbour-vanilla.toml",
        include_str!("../sample-recipes/harbour-vanilla.toml"),
    ),
    (
        "lemon-sorbet.toml",
        include_str!("../sample-recipes/lemon-sorbet.toml"),
    ),
    (
        "mango-sherbet.toml",
        include_str!("../sample-recipes/mango-sherbet.toml"),
    ),
    (
        "pier-gelato.toml",
        include_str!("../sample-recipes/pier-gelato.toml"),
    ),
    (
        "smoked-butter-sea-salt.toml",
        include_str!("../sample-recipes/smoked-butter-sea-salt.toml"),
    ),
    (
        "sour-cherry-liqueur.toml",
        include_str!("../sample-recipes/sour-cherry-liqueur.toml"),
    ),
    (
        "strawberry-liqueur.toml",
        include_str!("../sample-recipes/strawberry-liqueur.toml"),
    ),
];

/// The recipe name inside each file of [`SAMPLE_RECIPES`], in the same order (a
/// new batch log saves each sample under its name; a test checks they agree).
pub const SAMPLE_RECIPE_NAMES: [&str; 10] = [
    "Gullrock cream liqueur",
    "Dark spirit custard",
    "Promenade frozen yogurt",
    "Harbour vanilla",
    "Quay lemon sorbet",
    "Mango sherbet",
    "Pier milk gelato",
    "Smoked butter and sea salt",
    "Gullrock sour cherry liqueur",
    "Gullrock strawberry liqueur",
];

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_agree_with_the_files() {
        assert_eq!(SAMPLE_RECIPES.len(), SAMPLE_RECIPE_NAMES.len());
        for ((file, text), name) in SAMPLE_RECIPES.iter().zip(SAMPLE_RECIPE_NAMES) {
            let recipe = crate::recipe_file::parse_recipe(std::path::Path::new(file), text)
                .unwrap_or_else(|e| panic!("{e}"));
            assert_eq!(recipe.name, name, "{file}");
        }
    }
}
