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
        "strawberry-liqueur.toml",
        include_str!("../sample-recipes/strawberry-liqueur.toml"),
    ),
];
