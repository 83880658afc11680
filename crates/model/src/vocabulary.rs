//! Interned names (makes, models, variants, sellers): one copy of each distinct string.

use foldhash::HashMap;

/// Index of a name in a [`Vocabulary`].
pub type NameId = u32;

/// The id meaning "no value" in an interned column.
pub const NO_NAME: NameId = NameId::MAX;

/// A set of distinct strings, each with a stable small id.
#[derive(Debug, Clone, Default)]
pub struct Vocabulary {
    names: Vec<String>,
    ids: HashMap<String, NameId>,
}

impl Vocabulary {
    /// Returns the id of `name`, adding it when new.
    pub fn intern(&mut self, name: &str) -> NameId {
        if let Some(&id) = self.ids.get(name) {
            return id;
        }
        let id = self.names.len() as NameId;
        self.names.push(name.to_owned());
        self.ids.insert(name.to_owned(), id);
        id
    }

    /// The id of `name` if present.
    #[must_use]
    pub fn id(&self, name: &str) -> Option<NameId> {
        self.ids.get(name).copied()
    }

    /// The id of `name` compared without regard to ASCII case, if present.
    #[must_use]
    pub fn id_ignore_case(&self, name: &str) -> Option<NameId> {
        self.id(name).or_else(|| {
            self.names
                .iter()
                .position(|n| n.eq_ignore_ascii_case(name))
                .map(|i| i as NameId)
        })
    }

    /// The name behind `id`; empty for [`NO_NAME`] or an unknown id.
    #[must_use]
    pub fn name(&self, id: NameId) -> &str {
        self.names.get(id as usize).map_or("", String::as_str)
    }

    /// Number of distinct names.
    #[must_use]
    pub fn len(&self) -> usize {
        self.names.len()
    }

    /// Whether no name has been interned.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.names.is_empty()
    }
}
