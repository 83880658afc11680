//! Interned names (makes, models, variants, sellers): one copy of each distinct string.

use foldhash::HashMap;

/// The form a name is matched by: surrounding spaces dropped, runs of inner white space made
/// one space, letters in lower case ("  QUELLMARK " and "Quellmark" are one make). Every
/// look-up of a make, model or variant by name goes through this one function.
#[must_use]
pub fn name_key(name: &str) -> String {
    let mut key = String::with_capacity(name.len());
    for word in name.split_whitespace() {
        if !key.is_empty() {
            key.push(' ');
        }
        key.extend(word.chars().flat_map(char::to_lowercase));
    }
    key
}

/// Index of a name in a [`Vocabulary`].
pub type NameId = u32;

/// The id meaning "no value" in an interned column.
pub const NO_NAME: NameId = NameId::MAX;

/// How a listing or subject without a variant is printed in every output.
pub const NO_VARIANT: &str = "(no variant)";

/// A variant as every output prints it: its name, or [`NO_VARIANT`].
#[must_use]
pub fn variant_text(variant: Option<&str>) -> &str {
    variant.unwrap_or(NO_VARIANT)
}

/// A set of distinct strings, each with a stable small id. A spelling merged into another
/// ([`Vocabulary::alias`]) answers with the other's id.
#[derive(Debug, Clone, Default)]
pub struct Vocabulary {
    names: Vec<String>,
    ids: HashMap<String, NameId>,
    /// The id each name stands for: itself, or the spelling it was merged into.
    canonical: Vec<NameId>,
}

impl Vocabulary {
    /// Returns the id of `name`, adding it when new.
    pub fn intern(&mut self, name: &str) -> NameId {
        if let Some(&id) = self.ids.get(name) {
            return self.canonical[id as usize];
        }
        let id = self.names.len() as NameId;
        self.names.push(name.to_owned());
        self.ids.insert(name.to_owned(), id);
        self.canonical.push(id);
        id
    }

    /// The id of `name` if present.
    #[must_use]
    pub fn id(&self, name: &str) -> Option<NameId> {
        self.ids.get(name).map(|&i| self.canonical[i as usize])
    }

    /// The id of `name`, matched exactly or else by [`name_key`], if present.
    #[must_use]
    pub fn id_ignore_case(&self, name: &str) -> Option<NameId> {
        self.id(name).or_else(|| {
            let key = name_key(name);
            self.names
                .iter()
                .position(|n| name_key(n) == key)
                .map(|i| self.canonical[i])
        })
    }

    /// Makes `spelling` stand for `shown` from now on (both ids stay valid; look-ups and new
    /// interning of `spelling` answer with `shown`).
    pub fn alias(&mut self, spelling: NameId, shown: NameId) {
        if let Some(c) = self.canonical.get_mut(spelling as usize) {
            *c = shown;
        }
    }

    /// A variant's name as every output prints it: [`NO_VARIANT`] for [`NO_NAME`].
    #[must_use]
    pub fn variant_name(&self, id: NameId) -> &str {
        if id == NO_NAME {
            NO_VARIANT
        } else {
            self.name(id)
        }
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

#[cfg(test)]
mod tests {
    use super::name_key;

    #[test]
    fn names_match_without_case_or_extra_spaces() {
        assert_eq!(name_key("  QUELLMARK "), "quellmark");
        assert_eq!(name_key("Tessel\t  Ambrel"), "tessel ambrel");
        assert_eq!(name_key("ÉCLAT"), "éclat");
        assert_eq!(name_key(""), "");
    }
}
