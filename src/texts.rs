//! Feature texts kept once: road names repeat along a road, and damage categories and structure
//! kinds take a handful of values, so each feature holds a 4-byte handle instead of its own copy
//! (a national layer has millions of features; see docs/benchmarks.md).

use std::collections::HashMap;
use std::num::NonZeroU32;
use std::sync::Arc;

/// A handle to one text of a [`TextTable`]; `Option<Text>` takes 4 bytes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Text(NonZeroU32);

/// The distinct texts of a layer's or network's features, each stored once, in order of first use.
#[derive(Clone, Debug, Default)]
pub struct TextTable {
    texts: Vec<Arc<str>>,
    index: HashMap<Arc<str>, Text>,
}

impl TextTable {
    /// The handle of `s`, adding it when it is new.
    pub fn intern(&mut self, s: &str) -> Text {
        if let Some(&t) = self.index.get(s) {
            return t;
        }
        // Handles count from 1, so `Option<Text>` needs no extra space; a table of more than
        // u32::MAX - 1 distinct texts would need more memory than any input may take.
        let n = u32::try_from(self.texts.len() + 1).expect("fewer than 2^32 distinct texts");
        let t = Text(NonZeroU32::new(n).expect("counts from 1"));
        let shared: Arc<str> = Arc::from(s);
        self.texts.push(shared.clone());
        self.index.insert(shared, t);
        t
    }

    /// The handle of `s` when there is one, adding it when it is new.
    pub fn intern_opt(&mut self, s: Option<&str>) -> Option<Text> {
        s.map(|s| self.intern(s))
    }

    /// The text of handle `t` (None for no handle).
    pub fn get(&self, t: Option<Text>) -> Option<&str> {
        t.map(|t| &*self.texts[t.0.get() as usize - 1])
    }

    /// Adds every text of `other` and returns each of its handles' new handle here, indexed by
    /// the old handle's number less 1 (see [`TextTable::moved`]).
    pub fn absorb(&mut self, other: &TextTable) -> Vec<Text> {
        other.texts.iter().map(|s| self.intern(s)).collect()
    }

    /// The handle `t` of a table absorbed here, given what [`TextTable::absorb`] returned.
    pub fn moved(map: &[Text], t: Option<Text>) -> Option<Text> {
        t.map(|t| map[t.0.get() as usize - 1])
    }

    /// How many distinct texts the table holds.
    pub fn len(&self) -> usize {
        self.texts.len()
    }

    /// True when the table holds no text.
    pub fn is_empty(&self) -> bool {
        self.texts.is_empty()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_text_is_kept_once_and_read_back() {
        let mut t = TextTable::default();
        let a = t.intern("Harbour Road");
        let b = t.intern("bridge");
        assert_eq!(t.intern("Harbour Road"), a);
        assert_ne!(a, b);
        assert_eq!(t.len(), 2);
        assert_eq!(t.get(Some(a)), Some("Harbour Road"));
        assert_eq!(t.get(Some(b)), Some("bridge"));
        assert_eq!(t.get(None), None);
        assert_eq!(std::mem::size_of::<Option<Text>>(), 4);
    }

    #[test]
    fn absorbed_handles_name_the_same_texts() {
        let mut first = TextTable::default();
        first.intern("culvert");
        let mut second = TextTable::default();
        let x = second.intern("Mill Lane");
        let y = second.intern("culvert");
        let map = first.absorb(&second);
        assert_eq!(first.len(), 2);
        assert_eq!(
            first.get(TextTable::moved(&map, Some(x))),
            Some("Mill Lane")
        );
        assert_eq!(first.get(TextTable::moved(&map, Some(y))), Some("culvert"));
        assert_eq!(TextTable::moved(&map, None), None);
    }
}
