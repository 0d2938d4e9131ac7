//! The members of a large JSON object read on all cores: a first pass keeps each member's
//! value as its text (serde_json's `RawValue`, which checks the JSON but builds nothing),
//! then the values are read from their texts in pieces on every core, in order.
//!
//! A value read alone is read as it would be in place, with one difference: serde_json
//! limits how deep lists and objects nest (128 levels, counted from the text's top), and a
//! value read alone starts higher up. The caller checks that what it read nests nowhere
//! near that limit.

use serde::de::{Deserializer, MapAccess, Visitor};
use serde::Deserialize;
use serde_json::value::RawValue;
use std::borrow::Cow;
use std::fmt;

/// A JSON object's members in the order written, each value as its text (duplicate names
/// kept, for the caller to settle as a map would).
#[derive(Debug, Default)]
pub struct MemberTexts<'a>(pub Vec<(Cow<'a, str>, &'a RawValue)>);

impl<'de: 'a, 'a> Deserialize<'de> for MemberTexts<'a> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct Members;
        impl<'de> Visitor<'de> for Members {
            type Value = MemberTexts<'de>;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a map")
            }
            fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Self::Value, A::Error> {
                let mut members = Vec::new();
                while let Some((name, text)) = map.next_entry::<Name, &RawValue>()? {
                    members.push((name.0, text));
                }
                Ok(MemberTexts(members))
            }
        }
        d.deserialize_map(Members)
    }
}

/// A member's name, borrowed from the text where it has no escapes.
struct Name<'a>(Cow<'a, str>);

impl<'de: 'a, 'a> Deserialize<'de> for Name<'a> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        #[derive(Deserialize)]
        struct Borrowed<'a>(#[serde(borrow)] Cow<'a, str>);
        Borrowed::deserialize(d).map(|b| Name(b.0))
    }
}

/// Members read at a time on one core: enough to make each hand-off worth it.
const PIECE: usize = 64;

/// Every member's value read from its text as `T`, on all cores, in pieces in order (to be
/// taken apart without a copy of them all); `None` if any of them does not read (the caller
/// then reads the whole text in one pass, which says what is wrong and where).
pub fn read_values<'a, T: Deserialize<'a> + Send>(
    members: &MemberTexts<'a>,
) -> Option<Vec<Vec<T>>> {
    let pieces: Vec<&[(Cow<'a, str>, &'a RawValue)]> = members.0.chunks(PIECE).collect();
    crate::cores::in_order(pieces.len(), |k| {
        pieces[k]
            .iter()
            .map(|(_, text)| serde_json::from_str(text.get()).ok())
            .collect::<Option<Vec<T>>>()
    })
    .into_iter()
    .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn members_keep_their_order_duplicates_and_text() {
        let text = r#"{"b": [1, 2], "a\u0041": {"x": null}, "b": 3}"#;
        let members: MemberTexts = serde_json::from_str(text).unwrap();
        let names: Vec<&str> = members.0.iter().map(|(n, _)| n.as_ref()).collect();
        assert_eq!(names, ["b", "aA", "b"]);
        assert!(matches!(members.0[0].0, Cow::Borrowed(_)));
        let texts: Vec<&str> = members.0.iter().map(|(_, t)| t.get()).collect();
        assert_eq!(texts, ["[1, 2]", r#"{"x": null}"#, "3"]);
    }

    #[test]
    fn values_read_in_order_or_not_at_all() {
        // More members than one piece, so that several cores take part.
        let many: Vec<String> = (0..1000).map(|k| format!("\"m{k}\": {k}")).collect();
        let text = format!("{{{}}}", many.join(", "));
        let members: MemberTexts = serde_json::from_str(&text).unwrap();
        let values: Vec<u32> = read_values(&members).unwrap().concat();
        assert_eq!(values, (0..1000).collect::<Vec<u32>>());
        let bad = text.replace("\"m700\": 700", "\"m700\": \"seven hundred\"");
        let members: MemberTexts = serde_json::from_str(&bad).unwrap();
        assert_eq!(read_values::<u32>(&members), None);
    }

    #[test]
    fn only_an_object_has_members() {
        for text in ["[1, 2]", "null", "7"] {
            assert!(serde_json::from_str::<MemberTexts>(text).is_err(), "{text}");
        }
    }
}
