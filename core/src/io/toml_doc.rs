//! TOML documents read into serde structs: parse errors located at their line and column, and
//! one document's top-level keys shared among several structs as if one struct held them all.

use crate::error::{Error, Result};
use serde::de::{self, Visitor};
use std::cell::Cell;
use std::ops::Range;
use toml::Spanned;
use toml::de::{DeString, DeTable, DeValue};

type Entry<'t> = (Spanned<DeString<'t>>, Spanned<DeValue<'t>>);

/// Line (1-based) and column of a byte offset.
fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(text.len());
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let col = before.rfind('\n').map_or(offset, |p| offset - p - 1) + 1;
    (line, col)
}

/// Byte offset of a line `key = ...` (or `key.sub = ...`) in the table that starts at `start`
/// (up to the next table header).
fn find_key(text: &str, start: usize, key: &str) -> Option<usize> {
    let region = text.get(start..)?;
    let mut off = start;
    for (i, line) in region.split_inclusive('\n').enumerate() {
        let t = line.trim_start();
        if i > 0 && t.starts_with('[') {
            break;
        }
        if let Some(rest) = t.strip_prefix(key) {
            let rest = rest.trim_start();
            if rest.starts_with('=') || rest.starts_with('.') {
                return Some(off + (line.len() - t.len()));
            }
        }
        off += line.len();
    }
    None
}

/// [`Error::Parse`] for a message at `span` of `text`; `file` names the source.
fn located(text: &str, file: &str, message: &str, span: Option<Range<usize>>) -> Error {
    let msg = message.trim().to_string();
    let location = match span {
        Some(s) => {
            // For an unknown key the span covers its table: point at the key itself.
            let key_at = msg
                .strip_prefix("unknown field `")
                .and_then(|r| r.split('`').next())
                .and_then(|key| find_key(text, s.start, key));
            let (l, c) = line_col(text, key_at.unwrap_or(s.start));
            format!("line {l}, column {c}")
        }
        None => "unknown line".into(),
    };
    Error::Parse { file: file.into(), location, reason: msg }
}

/// [`Error::Parse`] for a TOML error in `text`, with its line and column.
pub fn parse_error(text: &str, file: &str, e: &toml::de::Error) -> Error {
    located(text, file, e.message(), e.span())
}

/// The field names serde derives for the struct `T` (the list its `Deserialize` passes to
/// `deserialize_struct`); empty when `T` is not a struct.
pub fn struct_fields<T: de::DeserializeOwned>() -> &'static [&'static str] {
    struct Probe<'a>(&'a Cell<&'static [&'static str]>);
    impl<'de> de::Deserializer<'de> for Probe<'_> {
        type Error = de::value::Error;
        fn deserialize_any<V: Visitor<'de>>(self, _: V) -> std::result::Result<V::Value, Self::Error> {
            Err(de::Error::custom("not a struct"))
        }
        fn deserialize_struct<V: Visitor<'de>>(
            self,
            _name: &'static str,
            fields: &'static [&'static str],
            _: V,
        ) -> std::result::Result<V::Value, Self::Error> {
            self.0.set(fields);
            Err(de::Error::custom("fields read"))
        }
        serde::forward_to_deserialize_any! {
            bool i8 i16 i32 i64 i128 u8 u16 u32 u64 u128 f32 f64 char str string bytes byte_buf
            option unit unit_struct newtype_struct seq tuple tuple_struct map enum identifier
            ignored_any
        }
    }
    let fields = Cell::new(&[][..]);
    // The probe always fails: it only records the field list.
    let _ = T::deserialize(Probe(&fields));
    fields.get()
}

/// serde's message for an unknown field (as `de::Error::unknown_field` words it).
fn unknown_field_message(key: &str, expected: &[&str]) -> String {
    let quoted: Vec<String> = expected.iter().map(|f| format!("`{f}`")).collect();
    match quoted.as_slice() {
        [] => format!("unknown field `{key}`, there are no fields"),
        [a] => format!("unknown field `{key}`, expected {a}"),
        [a, b] => format!("unknown field `{key}`, expected {a} or {b}"),
        _ => format!("unknown field `{key}`, expected one of {}", quoted.join(", ")),
    }
}

fn table<'t>(span: Range<usize>, entries: impl IntoIterator<Item = Entry<'t>>) -> toml::de::Deserializer<'t> {
    let mut t = DeTable::new();
    for (k, v) in entries {
        t.insert(k, v);
    }
    toml::de::Deserializer::from(Spanned::new(span, t))
}

/// Read a TOML document whose top-level keys are shared among structs with the field lists
/// `shares` (each a struct whose fields all have defaults): `read(i, d)` deserializes share `i`
/// from `d`, a table holding only that share's keys, and keeps the result. Errors are those of
/// one struct holding every share's fields: the first bad entry in table order, an unknown key
/// listing every known one, each with its line and column ([`Error::Parse`], `file` naming the
/// source).
pub fn read_shared<'t>(
    text: &'t str,
    file: &str,
    shares: &[&'static [&'static str]],
    mut read: impl FnMut(usize, toml::de::Deserializer<'t>) -> std::result::Result<(), toml::de::Error>,
) -> Result<()> {
    let share_of = |key: &str| shares.iter().position(|fields| fields.contains(&key));
    let expected: Vec<&str> = shares.iter().flat_map(|f| f.iter().copied()).collect();
    let unknown_key = |k: &Spanned<DeString<'_>>| {
        located(text, file, &unknown_field_message(k.get_ref(), &expected), Some(k.span()))
    };
    let parse = || DeTable::parse(text).map_err(|e| parse_error(text, file, &e));
    let root = parse()?;
    let span = root.span();
    let mut split: Vec<Vec<Entry<'t>>> = shares.iter().map(|_| Vec::new()).collect();
    let mut first_unknown = None;
    for (k, v) in root.into_inner() {
        match share_of(k.get_ref()) {
            Some(i) => split[i].push((k, v)),
            None => {
                first_unknown.get_or_insert_with(|| unknown_key(&k));
            }
        }
    }
    let mut first_error = None;
    if first_unknown.is_none() {
        for (i, entries) in split.into_iter().enumerate() {
            if let Err(e) = read(i, table(span.clone(), entries)) {
                first_error = Some(e);
                break;
            }
        }
        if first_error.is_none() {
            return Ok(());
        }
    }
    // Something failed: report the first bad entry in table order, as one struct would.
    for (k, v) in parse()?.into_inner() {
        let Some(i) = share_of(k.get_ref()) else {
            return Err(unknown_key(&k));
        };
        if let Err(e) = read(i, table(span.clone(), [(k, v)])) {
            return Err(parse_error(text, file, &e));
        }
    }
    match (first_unknown, first_error) {
        (Some(e), _) => Err(e),
        (None, Some(e)) => Err(parse_error(text, file, &e)),
        (None, None) => Ok(()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde::Deserialize;

    #[derive(Debug, Default, Deserialize)]
    #[serde(deny_unknown_fields)]
    struct One {
        #[serde(default)]
        z: Option<f64>,
    }

    #[derive(Debug, Default, Deserialize)]
    #[serde(deny_unknown_fields)]
    struct Two {
        #[serde(default)]
        b: Option<String>,
        #[serde(default)]
        c: Vec<One>,
    }

    #[derive(Debug, Default, Deserialize)]
    #[serde(deny_unknown_fields)]
    struct Both {
        #[serde(default)]
        z: Option<f64>,
        #[serde(default)]
        b: Option<String>,
        #[serde(default)]
        c: Vec<One>,
    }

    fn shared(text: &str) -> Result<(One, Two)> {
        let (mut one, mut two) = (One::default(), Two::default());
        read_shared(text, "t.toml", &[struct_fields::<One>(), struct_fields::<Two>()], |i, d| {
            match i {
                0 => one = One::deserialize(d)?,
                _ => two = Two::deserialize(d)?,
            }
            Ok(())
        })?;
        Ok((one, two))
    }

    fn whole(text: &str) -> Result<Both> {
        toml::from_str::<Both>(text).map_err(|e| parse_error(text, "t.toml", &e))
    }

    #[test]
    fn field_lists_are_serdes() {
        assert_eq!(struct_fields::<Both>(), ["z", "b", "c"]);
        assert_eq!(struct_fields::<One>(), ["z"]);
        assert!(struct_fields::<f64>().is_empty());
    }

    #[test]
    fn shares_read_like_one_struct() {
        let text = "z = 2.5\nb = \"x\"\n[[c]]\nz = 1\n[[c]]\n";
        let (one, two) = shared(text).unwrap();
        let both = whole(text).unwrap();
        assert_eq!((one.z, two.b.clone(), two.c.len()), (both.z, both.b, both.c.len()));
        assert_eq!((one.z, two.b.as_deref(), two.c.len(), two.c[0].z), (Some(2.5), Some("x"), 2, Some(1.0)));
    }

    #[test]
    fn errors_match_one_struct_word_for_word() {
        // Unknown keys (top level, table header, array of tables, dotted, nested), bad values
        // in either share, two errors in either order and in either share first (the shares
        // are read z first, the table runs b, c, z), a syntax error, an empty document.
        for text in [
            "q = 1\n",
            "z = 1\n[q]\nr = 1\n",
            "b = \"x\"\n[[q]]\n",
            "q.r = 1\n",
            "[[c]]\nz = 1\nq = 2\n",
            "z = \"x\"\n",
            "b = 3\n",
            "[[c]]\nz = true\n",
            "z = \"x\"\nb = 3\n",
            "b = 3\nz = \"x\"\n",
            "q = 1\nz = \"x\"\n",
            "z = \"x\"\nq = 1\n",
            "a = 1\nz = \"x\"\n",
            "[[c]\n",
            "",
        ] {
            let want = whole(text).map(|_| ());
            assert_eq!(want.is_err(), !text.is_empty(), "{text:?}");
            let got = shared(text).map(|_| ());
            assert_eq!(got, want, "{text:?}");
        }
        // ... and serde's wording for unknown fields with one, two or more known ones.
        let e = toml::from_str::<One>("q = 1").unwrap_err();
        assert_eq!(unknown_field_message("q", &["z"]), e.message());
        #[derive(Debug, Deserialize)]
        #[serde(deny_unknown_fields)]
        #[allow(dead_code)]
        struct Pair {
            a: Option<f64>,
            b: Option<f64>,
        }
        let e = toml::from_str::<Pair>("q = 1").unwrap_err();
        assert_eq!(unknown_field_message("q", &["a", "b"]), e.message());
    }
}
