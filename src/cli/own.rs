//! The user's own solutes and ingredients from the batch log, for the commands
//! that read recipe files (`gelu report`, `gelu batch new`, and `gelu balance`
//! through [`load_own_items`]).

use std::path::Path;

use crate::catalog::Catalog;
use crate::model::OwnItems;
use crate::recipe_file::own_items_in;
use crate::store::{Store, open};

/// The user's own items from the batch log at `db`, or from the default log
/// when `db` is `None`. The log is opened read-only and never created or
/// migrated to read them: no file there means no own items. An item whose id
/// the built-in catalog now uses is left out, with a notice on stderr (the
/// built-in one is what recipes get). Recipes read with
/// [`crate::recipe_file::read_recipe_using`] copy in what they use, so the
/// analysis needs only the built-in catalog; to use them as a catalog instead,
/// `Catalog::builtin().with_additions(&own.solutes, &own.ingredients)`.
pub fn load_own_items(db: Option<&Path>) -> anyhow::Result<OwnItems> {
    let path = match db {
        Some(p) => p.to_path_buf(),
        None => match open::default_path() {
            Ok(p) => p,
            Err(_) => return Ok(OwnItems::default()),
        },
    };
    if !path.exists() {
        return Ok(OwnItems::default());
    }
    match Store::open_read_only(&path)? {
        Some(store) => Ok(without_builtin_clashes(own_items_in(&store)?)),
        None => Ok(OwnItems::default()),
    }
}

/// The own items of an open log (already opened to write, as `batch new` does).
pub fn own_items_of(store: &Store) -> anyhow::Result<OwnItems> {
    Ok(without_builtin_clashes(own_items_in(store)?))
}

fn without_builtin_clashes(mut own: OwnItems) -> OwnItems {
    let builtin = Catalog::builtin();
    let clash = |id: &str| {
        let taken = builtin.ingredient(id).is_some();
        if taken {
            eprintln!(
                "gelu: your own item `{id}` in the batch log has the id of a built-in one; recipes get the built-in one"
            );
        }
        taken
    };
    own.solutes.retain(|s| !clash(&s.id));
    own.ingredients.retain(|i| !clash(&i.id));
    own
}
