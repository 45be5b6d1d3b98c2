//! A check that results hold no NaN or infinity.
//!
//! `results.json` turns a non-finite number into `null`, the same as "not
//! computed", so a NaN would pass silently. This walks the results through serde
//! (every field the JSON would have) and names the first non-finite number.

use serde::Serialize;
use serde::ser;

/// The path (`groups[2].slope_se`) of the first NaN or infinite number, if any.
pub fn first_non_finite<T: Serialize>(value: &T) -> Option<String> {
    let mut walk = Walk::default();
    // The walker's only error is "found one"; the path tells where.
    match value.serialize(&mut walk) {
        Ok(()) => None,
        Err(Found) => Some(walk.path.join("").trim_start_matches('.').to_string()),
    }
}

#[derive(Default)]
struct Walk {
    path: Vec<String>,
}

/// Stops the walk at the first non-finite number.
#[derive(Debug)]
struct Found;

impl std::fmt::Display for Found {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("non-finite number")
    }
}

impl std::error::Error for Found {}

impl ser::Error for Found {
    fn custom<M: std::fmt::Display>(_: M) -> Self {
        Found
    }
}

impl Walk {
    fn number(&mut self, v: f64) -> Result<(), Found> {
        if v.is_finite() { Ok(()) } else { Err(Found) }
    }

    fn enter<T: Serialize + ?Sized>(&mut self, step: String, v: &T) -> Result<(), Found> {
        self.path.push(step);
        v.serialize(&mut *self)?;
        self.path.pop();
        Ok(())
    }
}

/// Sequences and maps: the index of the element being walked.
struct Items<'a> {
    walk: &'a mut Walk,
    index: usize,
}

impl Items<'_> {
    fn element<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
        let step = format!("[{}]", self.index);
        self.index += 1;
        self.walk.enter(step, v)
    }
}

impl<'a> ser::Serializer for &'a mut Walk {
    type Ok = ();
    type Error = Found;
    type SerializeSeq = Items<'a>;
    type SerializeTuple = Items<'a>;
    type SerializeTupleStruct = Items<'a>;
    type SerializeTupleVariant = Items<'a>;
    type SerializeMap = Items<'a>;
    type SerializeStruct = &'a mut Walk;
    type SerializeStructVariant = &'a mut Walk;

    fn serialize_f64(self, v: f64) -> Result<(), Found> {
        self.number(v)
    }
    fn serialize_f32(self, v: f32) -> Result<(), Found> {
        self.number(f64::from(v))
    }
    fn serialize_bool(self, _: bool) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_i8(self, _: i8) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_i16(self, _: i16) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_i32(self, _: i32) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_i64(self, _: i64) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_u8(self, _: u8) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_u16(self, _: u16) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_u32(self, _: u32) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_u64(self, _: u64) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_char(self, _: char) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_str(self, _: &str) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_bytes(self, _: &[u8]) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_none(self) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_some<T: Serialize + ?Sized>(self, v: &T) -> Result<(), Found> {
        v.serialize(self)
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
        v: &T,
    ) -> Result<(), Found> {
        v.serialize(self)
    }
    fn serialize_newtype_variant<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        v: &T,
    ) -> Result<(), Found> {
        self.enter(format!(".{variant}"), v)
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Items<'a>, Found> {
        Ok(Items {
            walk: self,
            index: 0,
        })
    }
    fn serialize_tuple(self, _: usize) -> Result<Items<'a>, Found> {
        self.serialize_seq(None)
    }
    fn serialize_tuple_struct(self, _: &'static str, _: usize) -> Result<Items<'a>, Found> {
        self.serialize_seq(None)
    }
    fn serialize_tuple_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Items<'a>, Found> {
        self.serialize_seq(None)
    }
    fn serialize_map(self, _: Option<usize>) -> Result<Items<'a>, Found> {
        self.serialize_seq(None)
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<&'a mut Walk, Found> {
        Ok(self)
    }
    fn serialize_struct_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<&'a mut Walk, Found> {
        Ok(self)
    }
}

/// The sequence-like serde traits, each walking its elements in order.
macro_rules! walk_elements {
    ($($trait:ident :: $method:ident),*) => {$(
        impl ser::$trait for Items<'_> {
            type Ok = ();
            type Error = Found;
            fn $method<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
                self.element(v)
            }
            fn end(self) -> Result<(), Found> {
                Ok(())
            }
        }
    )*};
}

walk_elements!(
    SerializeSeq::serialize_element,
    SerializeTuple::serialize_element,
    SerializeTupleStruct::serialize_field,
    SerializeTupleVariant::serialize_field
);

impl ser::SerializeMap for Items<'_> {
    type Ok = ();
    type Error = Found;
    fn serialize_key<T: Serialize + ?Sized>(&mut self, _: &T) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_value<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
        self.element(v)
    }
    fn end(self) -> Result<(), Found> {
        Ok(())
    }
}

/// Struct fields, walked under their names.
macro_rules! walk_fields {
    ($($trait:ident),*) => {$(
        impl ser::$trait for &mut Walk {
            type Ok = ();
            type Error = Found;
            fn serialize_field<T: Serialize + ?Sized>(
                &mut self,
                key: &'static str,
                v: &T,
            ) -> Result<(), Found> {
                self.enter(format!(".{key}"), v)
            }
            fn end(self) -> Result<(), Found> {
                Ok(())
            }
        }
    )*};
}

walk_fields!(SerializeStruct, SerializeStructVariant);

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(Serialize)]
    struct Inner {
        a: f64,
        b: Option<f64>,
    }

    #[derive(Serialize)]
    struct Outer {
        name: String,
        items: Vec<Inner>,
        pair: [f64; 2],
    }

    #[test]
    fn names_the_first_non_finite_number() {
        let ok = Outer {
            name: "x".into(),
            items: vec![Inner { a: 1.0, b: None }],
            pair: [0.0, -1e300],
        };
        assert_eq!(first_non_finite(&ok), None);
        let bad = Outer {
            name: "x".into(),
            items: vec![
                Inner {
                    a: 1.0,
                    b: Some(2.0),
                },
                Inner {
                    a: 1.0,
                    b: Some(f64::NAN),
                },
            ],
            pair: [0.0, 1.0],
        };
        assert_eq!(first_non_finite(&bad).as_deref(), Some("items[1].b"));
        let inf = Outer {
            name: "x".into(),
            items: vec![],
            pair: [0.0, f64::INFINITY],
        };
        assert_eq!(first_non_finite(&inf).as_deref(), Some("pair[1]"));
    }
}
