//! The last gate before a figure leaves the engine: walks any serializable value and names the
//! first number in it that is infinite or not a number. (A JSON writer would turn such a number
//! into `null` without a word, so it has to be caught while the value is still typed.)

use serde::ser::{self, Serialize};

/// The path (`loads[3].power_w`) of the first non-finite number in `value`, if any.
pub fn first_non_finite<T: Serialize + ?Sized>(value: &T) -> Option<String> {
    let mut walker = Walker { path: Vec::new() };
    match value.serialize(&mut walker) {
        Ok(()) => None,
        Err(Found(path)) => Some(path),
    }
}

/// The error that carries the path out.
#[derive(Debug)]
pub struct Found(String);

impl std::fmt::Display for Found {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for Found {}

impl ser::Error for Found {
    fn custom<T: std::fmt::Display>(msg: T) -> Self {
        Found(msg.to_string())
    }
}

enum Step {
    Key(String),
    Index(usize),
}

struct Walker {
    path: Vec<Step>,
}

impl Walker {
    fn here(&self) -> String {
        let mut s = String::new();
        for step in &self.path {
            match step {
                Step::Key(k) if s.is_empty() => s.push_str(k),
                Step::Key(k) => {
                    s.push('.');
                    s.push_str(k);
                }
                Step::Index(i) => s.push_str(&format!("[{i}]")),
            }
        }
        if s.is_empty() {
            s.push_str("value");
        }
        s
    }

    fn number(&self, v: f64) -> Result<(), Found> {
        if v.is_finite() {
            Ok(())
        } else {
            Err(Found(self.here()))
        }
    }

    fn element<T: Serialize + ?Sized>(&mut self, step: Step, value: &T) -> Result<(), Found> {
        self.path.push(step);
        let r = value.serialize(&mut *self);
        self.path.pop();
        r
    }
}

/// A sequence, tuple, map or struct being walked, counting its elements.
struct Compound<'a> {
    walker: &'a mut Walker,
    index: usize,
}

impl<'a> Compound<'a> {
    fn new(walker: &'a mut Walker) -> Compound<'a> {
        Compound { walker, index: 0 }
    }

    fn next<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), Found> {
        let i = self.index;
        self.index += 1;
        self.walker.element(Step::Index(i), value)
    }
}

macro_rules! accept {
    ($($method:ident: $ty:ty),* $(,)?) => {
        $(fn $method(self, _: $ty) -> Result<(), Found> { Ok(()) })*
    };
}

impl<'a> ser::Serializer for &'a mut Walker {
    type Ok = ();
    type Error = Found;
    type SerializeSeq = Compound<'a>;
    type SerializeTuple = Compound<'a>;
    type SerializeTupleStruct = Compound<'a>;
    type SerializeTupleVariant = Compound<'a>;
    type SerializeMap = Compound<'a>;
    type SerializeStruct = Compound<'a>;
    type SerializeStructVariant = Compound<'a>;

    accept!(
        serialize_bool: bool, serialize_i8: i8, serialize_i16: i16, serialize_i32: i32,
        serialize_i64: i64, serialize_u8: u8, serialize_u16: u16, serialize_u32: u32,
        serialize_u64: u64, serialize_char: char, serialize_str: &str, serialize_bytes: &[u8],
    );

    fn serialize_f32(self, v: f32) -> Result<(), Found> {
        self.number(f64::from(v))
    }
    fn serialize_f64(self, v: f64) -> Result<(), Found> {
        self.number(v)
    }
    fn serialize_none(self) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_some<T: Serialize + ?Sized>(self, value: &T) -> Result<(), Found> {
        value.serialize(self)
    }
    fn serialize_unit(self) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_unit_struct(self, _: &'static str) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_unit_variant(self, _: &'static str, _: u32, _: &'static str) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_newtype_struct<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        value: &T,
    ) -> Result<(), Found> {
        value.serialize(self)
    }
    fn serialize_newtype_variant<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        value: &T,
    ) -> Result<(), Found> {
        self.element(Step::Key(variant.to_string()), value)
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Compound<'a>, Found> {
        Ok(Compound::new(self))
    }
    fn serialize_tuple(self, _: usize) -> Result<Compound<'a>, Found> {
        Ok(Compound::new(self))
    }
    fn serialize_tuple_struct(self, _: &'static str, _: usize) -> Result<Compound<'a>, Found> {
        Ok(Compound::new(self))
    }
    fn serialize_tuple_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Compound<'a>, Found> {
        Ok(Compound::new(self))
    }
    fn serialize_map(self, _: Option<usize>) -> Result<Compound<'a>, Found> {
        Ok(Compound::new(self))
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<Compound<'a>, Found> {
        Ok(Compound::new(self))
    }
    fn serialize_struct_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Compound<'a>, Found> {
        Ok(Compound::new(self))
    }
}

/// Sequences and tuples of every kind walk their elements by index.
macro_rules! by_index {
    ($($trait:ident :: $method:ident),* $(,)?) => {
        $(impl ser::$trait for Compound<'_> {
            type Ok = ();
            type Error = Found;
            fn $method<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), Found> {
                self.next(value)
            }
            fn end(self) -> Result<(), Found> {
                Ok(())
            }
        })*
    };
}

by_index!(
    SerializeSeq::serialize_element,
    SerializeTuple::serialize_element,
    SerializeTupleStruct::serialize_field,
    SerializeTupleVariant::serialize_field,
);

impl ser::SerializeMap for Compound<'_> {
    type Ok = ();
    type Error = Found;
    fn serialize_key<T: Serialize + ?Sized>(&mut self, _: &T) -> Result<(), Found> {
        // A map's entries are named by their place (`legs[1]`): the report's maps are small, and
        // writing keys out as text would take a serializer of its own.
        Ok(())
    }
    fn serialize_value<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), Found> {
        self.next(value)
    }
    fn end(self) -> Result<(), Found> {
        Ok(())
    }
}

/// Structs of both kinds walk their fields by name.
macro_rules! by_name {
    ($($trait:ident),*) => {
        $(impl ser::$trait for Compound<'_> {
            type Ok = ();
            type Error = Found;
            fn serialize_field<T: Serialize + ?Sized>(
                &mut self,
                key: &'static str,
                value: &T,
            ) -> Result<(), Found> {
                self.walker.element(Step::Key(key.to_string()), value)
            }
            fn end(self) -> Result<(), Found> {
                Ok(())
            }
        })*
    };
}

by_name!(SerializeStruct, SerializeStructVariant);

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::BTreeMap;

    #[derive(serde::Serialize)]
    struct Inner {
        ok: f64,
        maybe: Option<f64>,
    }

    #[derive(serde::Serialize)]
    struct Outer {
        items: Vec<Inner>,
        legs: BTreeMap<String, f64>,
    }

    #[test]
    fn names_the_first_bad_number() {
        let mut legs = BTreeMap::new();
        legs.insert("L1".to_string(), 1.0);
        let good = Outer {
            items: vec![Inner {
                ok: 1.0,
                maybe: None,
            }],
            legs: legs.clone(),
        };
        assert_eq!(first_non_finite(&good), None);
        let bad = Outer {
            items: vec![
                Inner {
                    ok: 1.0,
                    maybe: Some(2.0),
                },
                Inner {
                    ok: 1.0,
                    maybe: Some(f64::NAN),
                },
            ],
            legs: legs.clone(),
        };
        assert_eq!(first_non_finite(&bad).as_deref(), Some("items[1].maybe"));
        legs.insert("L2".to_string(), f64::INFINITY);
        let bad_leg = Outer {
            items: vec![],
            legs,
        };
        assert_eq!(first_non_finite(&bad_leg).as_deref(), Some("legs[1]"));
    }
}
