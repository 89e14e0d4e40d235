//! Which installed face draws the diagram's text when it is rasterised. The
//! SVG asks only for the generic `monospace` family; a font database's idea
//! of that family may name a face the machine does not have, so before
//! rendering the generic name is pointed at a face the database holds and
//! flags as monospaced. Not for loading fonts (the caller does) and not for
//! the SVG text, which names no face.

use resvg::usvg::fontdb::{Database, Family, Language, Query};
use std::sync::Arc;

/// A copy of `fonts` whose generic monospace family is an installed
/// monospaced face, or `None` when `fonts` already has one for it or holds
/// no monospaced face at all (then nothing better can be chosen).
pub(crate) fn with_monospace(fonts: &Arc<Database>) -> Option<Arc<Database>> {
    let query = Query {
        families: &[Family::Monospace],
        ..Query::default()
    };
    let chosen = fonts.query(&query).and_then(|id| fonts.face(id));
    if chosen.is_some_and(|face| face.monospaced) {
        return None;
    }
    // The first monospaced face in load order, so one machine always draws
    // with the same face.
    let family = fonts
        .faces()
        .filter(|face| face.monospaced)
        .find_map(|face| {
            face.families
                .iter()
                .find(|(_, language)| *language == Language::English_UnitedStates)
                .or_else(|| face.families.first())
                .map(|(name, _)| name.clone())
        })?;
    let mut fonts = Arc::clone(fonts);
    Arc::make_mut(&mut fonts).set_monospace_family(family);
    Some(fonts)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_empty_database_is_left_alone() {
        assert!(with_monospace(&Arc::new(Database::new())).is_none());
    }
}
