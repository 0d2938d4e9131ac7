//! A CityJSON geometry's boundaries (nested arrays of vertex indices, as deep as the
//! geometry's type makes them) and its semantic values (nested alike, one surface index or
//! null per surface), read flat: one list of numbers per geometry rather than a tree of
//! lists per surface, which a city of a million surfaces would allocate and free one by
//! one.
//!
//! The flat form keeps the nesting exactly as written, odd files included: each list is a
//! header, then its contents; the header says whether the list holds vertex indices (a
//! ring; an empty list counts as one) or lists, and how many numbers follow it.

use serde::de::{DeserializeSeed, Deserializer, Error, IgnoredAny, SeqAccess, Visitor};
use serde::Deserialize;
use std::fmt;

/// Nested boundary arrays, flat (module docs): a list's header is its length in numbers
/// after it, shifted up one, with the low bit set for a list of lists.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Boundaries(Vec<u32>);

/// One list of a [`Boundaries`]: a ring of vertex indices, or lists.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Node<'a> {
    /// Vertex indices (or nothing).
    Ring(&'a [u32]),
    /// Deeper lists, in order.
    List(Lists<'a>),
}

/// The lists inside a list, in order.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Lists<'a>(&'a [u32]);

impl<'a> Iterator for Lists<'a> {
    type Item = Node<'a>;

    fn next(&mut self) -> Option<Node<'a>> {
        let (node, rest) = split_node(self.0)?;
        self.0 = rest;
        Some(node)
    }
}

/// The first list of `flat` and what follows it.
fn split_node(flat: &[u32]) -> Option<(Node<'_>, &[u32])> {
    let (&header, rest) = flat.split_first()?;
    let (inside, rest) = rest.split_at((header >> 1) as usize);
    let node = if header & 1 == 1 {
        Node::List(Lists(inside))
    } else {
        Node::Ring(inside)
    };
    Some((node, rest))
}

impl Boundaries {
    /// The outermost list.
    pub fn root(&self) -> Node<'_> {
        split_node(&self.0).map_or(Node::Ring(&[]), |(node, _)| node)
    }
}

impl<'de> Deserialize<'de> for Boundaries {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct Outer;
        impl<'de> Visitor<'de> for Outer {
            type Value = Boundaries;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("nested lists of vertex indices")
            }
            fn visit_seq<A: SeqAccess<'de>>(self, seq: A) -> Result<Boundaries, A::Error> {
                let mut flat = Vec::new();
                read_list(seq, &mut flat)?;
                Ok(Boundaries(flat))
            }
        }
        d.deserialize_seq(Outer)
    }
}

/// Appends a list (its header, then its contents) to `flat`.
fn read_list<'de, A: SeqAccess<'de>>(mut seq: A, flat: &mut Vec<u32>) -> Result<(), A::Error> {
    let header = flat.len();
    flat.push(0);
    let (mut indices, mut lists) = (false, false);
    while let Some(element) = seq.next_element_seed(ElementSeed(flat))? {
        match element {
            Element::Index => indices = true,
            Element::List => lists = true,
        }
    }
    if indices && lists {
        return Err(A::Error::custom("a list mixes vertex indices and lists"));
    }
    let length = u32::try_from(flat.len() - header - 1)
        .ok()
        .filter(|&n| n < 1 << 31)
        .ok_or_else(|| A::Error::custom("the boundaries are too long"))?;
    flat[header] = length << 1 | lists as u32;
    Ok(())
}

/// What an element of a list was.
enum Element {
    Index,
    List,
}

/// Reads one element of a list into the flat numbers.
struct ElementSeed<'a>(&'a mut Vec<u32>);

impl<'de> DeserializeSeed<'de> for ElementSeed<'_> {
    type Value = Element;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<Element, D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for ElementSeed<'_> {
    type Value = Element;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a vertex index or a list of them")
    }
    fn visit_u64<E: Error>(self, v: u64) -> Result<Element, E> {
        let index =
            u32::try_from(v).map_err(|_| E::custom(format!("vertex index {v} is too large")))?;
        self.0.push(index);
        Ok(Element::Index)
    }
    fn visit_seq<A: SeqAccess<'de>>(self, seq: A) -> Result<Element, A::Error> {
        read_list(seq, self.0)?;
        Ok(Element::List)
    }
}

/// Nested semantic values: at the bottom, one surface index (or null) per surface.
#[derive(Clone, Debug, PartialEq)]
pub enum Values {
    Surfaces(Vec<Option<u32>>),
    List(Vec<Values>),
}

/// What values that match neither form are called: the words serde gives an untagged enum
/// of the two forms, which this reader replaced.
const VALUES_MISMATCH: &str = "data did not match any variant of untagged enum Values";

impl<'de> Deserialize<'de> for Values {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        // The whole value is read before a mismatch is reported, as serde's untagged
        // enums do: the message then points after it.
        d.deserialize_any(ValuesVisitor)?
            .ok_or_else(|| D::Error::custom(VALUES_MISMATCH))
    }
}

/// Reads values, `None` where they match neither form.
struct ValuesVisitor;

impl<'de> DeserializeSeed<'de> for ValuesVisitor {
    type Value = Option<Values>;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<Option<Values>, D::Error> {
        d.deserialize_any(self)
    }
}

/// One element of a list of values.
enum Slot {
    Surface(Option<u32>),
    Deeper(Values),
    Mismatch,
}

struct SlotSeed;

impl<'de> DeserializeSeed<'de> for SlotSeed {
    type Value = Slot;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<Slot, D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for SlotSeed {
    type Value = Slot;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a surface index, null or a list")
    }
    fn visit_u64<E: Error>(self, v: u64) -> Result<Slot, E> {
        Ok(u32::try_from(v).map_or(Slot::Mismatch, |s| Slot::Surface(Some(s))))
    }
    fn visit_unit<E: Error>(self) -> Result<Slot, E> {
        Ok(Slot::Surface(None))
    }
    fn visit_none<E: Error>(self) -> Result<Slot, E> {
        Ok(Slot::Surface(None))
    }
    fn visit_seq<A: SeqAccess<'de>>(self, seq: A) -> Result<Slot, A::Error> {
        Ok(ValuesVisitor
            .visit_seq(seq)?
            .map_or(Slot::Mismatch, Slot::Deeper))
    }
    fn visit_i64<E: Error>(self, _: i64) -> Result<Slot, E> {
        Ok(Slot::Mismatch)
    }
    fn visit_f64<E: Error>(self, _: f64) -> Result<Slot, E> {
        Ok(Slot::Mismatch)
    }
    fn visit_bool<E: Error>(self, _: bool) -> Result<Slot, E> {
        Ok(Slot::Mismatch)
    }
    fn visit_str<E: Error>(self, _: &str) -> Result<Slot, E> {
        Ok(Slot::Mismatch)
    }
    fn visit_map<A: serde::de::MapAccess<'de>>(self, mut map: A) -> Result<Slot, A::Error> {
        while map.next_entry::<IgnoredAny, IgnoredAny>()?.is_some() {}
        Ok(Slot::Mismatch)
    }
}

impl<'de> Visitor<'de> for ValuesVisitor {
    type Value = Option<Values>;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("nested lists of surface indices")
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Option<Values>, A::Error> {
        let (mut surfaces, mut lists, mut matches) = (Vec::new(), Vec::new(), true);
        while let Some(slot) = seq.next_element_seed(SlotSeed)? {
            match slot {
                Slot::Surface(s) => surfaces.push(s),
                Slot::Deeper(v) => lists.push(v),
                Slot::Mismatch => matches = false,
            }
        }
        Ok(match (matches, surfaces.is_empty(), lists.is_empty()) {
            (true, _, true) => Some(Values::Surfaces(surfaces)),
            (true, true, false) => Some(Values::List(lists)),
            _ => None,
        })
    }
    // Anything else matches neither form; it is read whole first.
    fn visit_u64<E: Error>(self, _: u64) -> Result<Option<Values>, E> {
        Ok(None)
    }
    fn visit_i64<E: Error>(self, _: i64) -> Result<Option<Values>, E> {
        Ok(None)
    }
    fn visit_f64<E: Error>(self, _: f64) -> Result<Option<Values>, E> {
        Ok(None)
    }
    fn visit_bool<E: Error>(self, _: bool) -> Result<Option<Values>, E> {
        Ok(None)
    }
    fn visit_str<E: Error>(self, _: &str) -> Result<Option<Values>, E> {
        Ok(None)
    }
    fn visit_unit<E: Error>(self) -> Result<Option<Values>, E> {
        Ok(None)
    }
    fn visit_map<A: serde::de::MapAccess<'de>>(
        self,
        mut map: A,
    ) -> Result<Option<Values>, A::Error> {
        while map.next_entry::<IgnoredAny, IgnoredAny>()?.is_some() {}
        Ok(None)
    }
}

/// Where a surface is in its boundaries: its index at each level, outermost first.
pub type SurfacePath = [usize];

/// The JSON path of a surface's place, `[0][3]`.
pub fn path_text(path: &SurfacePath) -> String {
    path.iter().map(|k| format!("[{k}]")).collect()
}

/// Calls `surface(rings, semantic value, path)` for every surface of boundaries of `depth`
/// levels (3 for surfaces, 4 for a solid, 5 for several solids), walking the semantic
/// values alongside. A surface is a list of rings; lists found where rings belong are
/// passed over, and so are rings found where surfaces or shells belong.
pub fn walk(
    boundaries: &Boundaries,
    values: Option<&Values>,
    depth: usize,
    surface: &mut impl FnMut(&[&[u32]], Option<u32>, &SurfacePath),
) {
    fn go<'a>(
        node: Node<'a>,
        values: Option<&Values>,
        depth: usize,
        path: &mut Vec<usize>,
        rings: &mut Vec<&'a [u32]>,
        surface: &mut impl FnMut(&[&[u32]], Option<u32>, &SurfacePath),
    ) {
        let Node::List(items) = node else {
            return;
        };
        for (k, item) in items.enumerate() {
            path.push(k);
            if depth == 3 {
                // `item` is a surface: a list of rings.
                let mut found = std::mem::take(rings);
                found.clear();
                if let Node::List(rs) = item {
                    found.extend(rs.filter_map(|r| match r {
                        Node::Ring(ring) => Some(ring),
                        Node::List(_) => None,
                    }));
                }
                let value = match values {
                    Some(Values::Surfaces(v)) => v.get(k).copied().flatten(),
                    _ => None,
                };
                if !found.is_empty() {
                    surface(&found, value, path);
                }
                *rings = found;
            } else {
                let inner = match values {
                    Some(Values::List(v)) => v.get(k),
                    _ => None,
                };
                go(item, inner, depth - 1, path, rings, surface);
            }
            path.pop();
        }
    }
    go(
        boundaries.root(),
        values,
        depth,
        &mut Vec::new(),
        &mut Vec::new(),
        surface,
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Boundaries {
        serde_json::from_str(text).unwrap()
    }

    /// Every surface's rings and path, by [`walk`].
    fn surfaces(b: &Boundaries, depth: usize) -> Vec<(Vec<Vec<u32>>, String)> {
        let mut out = Vec::new();
        walk(b, None, depth, &mut |rings, _, path| {
            out.push((rings.iter().map(|r| r.to_vec()).collect(), path_text(path)));
        });
        out
    }

    #[test]
    fn a_solid_flat_keeps_its_shells_surfaces_and_holes() {
        // A Solid as the CityJSON 2.0 specification nests one: shells, surfaces, rings.
        let b = read("[[[[0, 1, 2, 3]], [[4, 5, 6], [7, 8, 9]]], [[[10, 11, 12]]]]");
        assert_eq!(
            surfaces(&b, 4),
            [
                (vec![vec![0, 1, 2, 3]], "[0][0]".to_owned()),
                (vec![vec![4, 5, 6], vec![7, 8, 9]], "[0][1]".to_owned()),
                (vec![vec![10, 11, 12]], "[1][0]".to_owned()),
            ]
        );
    }

    #[test]
    fn odd_nesting_is_kept_and_passed_over_as_before() {
        // An empty surface, a ring where a surface belongs, a list where a ring belongs.
        let b = read("[[], [0, 1, 2], [[3, 4, 5], [[6]]], [[]]]");
        assert_eq!(
            surfaces(&b, 3),
            [
                (vec![vec![3, 4, 5]], "[2]".to_owned()),
                (vec![vec![]], "[3]".to_owned()),
            ]
        );
        assert_eq!(read("[7]").root(), Node::Ring(&[7]));
        assert_eq!(read("[]").root(), Node::Ring(&[]));
    }

    #[test]
    fn mixed_lists_and_bad_numbers_are_refused_in_words() {
        let mixed = serde_json::from_str::<Boundaries>("[[0, [1]]]").unwrap_err();
        assert!(mixed.to_string().contains("mixes vertex indices and lists"));
        let big = serde_json::from_str::<Boundaries>("[[4294967296]]").unwrap_err();
        assert!(big
            .to_string()
            .contains("vertex index 4294967296 is too large"));
        let negative = serde_json::from_str::<Boundaries>("[[-1]]").unwrap_err();
        assert!(negative
            .to_string()
            .contains("expected a vertex index or a list of them"));
        let scalar = serde_json::from_str::<Boundaries>("5").unwrap_err();
        assert!(scalar
            .to_string()
            .contains("expected nested lists of vertex indices"));
    }

    /// The form these values had before: serde's untagged enum, the reference here.
    mod before {
        #[derive(Debug, PartialEq, serde::Deserialize)]
        #[serde(untagged)]
        pub enum Values {
            Surfaces(Vec<Option<u32>>),
            List(Vec<Values>),
        }
    }

    #[derive(Debug, serde::Deserialize)]
    struct Held<T> {
        #[allow(dead_code)]
        values: T,
    }

    #[test]
    fn values_read_as_an_untagged_enum_of_the_two_forms_would() {
        let v: Values = serde_json::from_str("[[0, 1, null], []]").unwrap();
        assert_eq!(
            v,
            Values::List(vec![
                Values::Surfaces(vec![Some(0), Some(1), None]),
                Values::Surfaces(vec![]),
            ])
        );
        for bad in [
            "[0, [1]]",
            "[[0], [-1]]",
            "3",
            "[1.5]",
            "{\"a\": [1]}",
            "[[4294967296]]",
        ] {
            let text = format!("{{\"values\": {bad}, \"after\": 1}}");
            let ours = serde_json::from_str::<Held<Values>>(&text).unwrap_err();
            let serde = serde_json::from_str::<Held<before::Values>>(&text).unwrap_err();
            assert!(ours.to_string().contains(VALUES_MISMATCH), "{bad}: {ours}");
            // The same words at the same place.
            assert_eq!(ours.to_string(), serde.to_string(), "{bad}");
        }
    }

    #[test]
    fn semantic_values_walk_beside_their_surfaces() {
        let b = read("[[[[0, 1, 2]], [[3, 4, 5]]]]");
        let v: Values = serde_json::from_str("[[2, null]]").unwrap();
        let mut seen = Vec::new();
        walk(&b, Some(&v), 4, &mut |_, value, path| {
            seen.push((value, path_text(path)))
        });
        assert_eq!(
            seen,
            [(Some(2), "[0][0]".to_owned()), (None, "[0][1]".to_owned())]
        );
    }
}
