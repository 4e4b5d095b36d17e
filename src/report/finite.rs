//! Results are finite or the run fails: a serde walk over any result that
//! finds the first number that is not finite (JSON would write it as `null`
//! and a table as `NaN`), with its path, before anything is written.

use serde::Serialize;
use serde::ser;
use std::fmt;

/// The path (`/study/rules/peak/regret_mean`) and value of the first
/// non-finite number in `value`, if any.
pub fn first_non_finite<T: Serialize + ?Sized>(value: &T) -> Option<(String, f64)> {
    let mut w = Walk { path: Vec::new(), found: None };
    let _ = value.serialize(&mut w);
    w.found
}

struct Walk {
    path: Vec<String>,
    found: Option<(String, f64)>,
}

/// Stops the walk at the first find (or never: the walk cannot fail otherwise).
#[derive(Debug)]
struct Stop;

impl fmt::Display for Stop {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str("non-finite number")
    }
}

impl std::error::Error for Stop {}

impl ser::Error for Stop {
    fn custom<M: fmt::Display>(_: M) -> Self {
        Stop
    }
}

impl Walk {
    fn float(&mut self, v: f64) -> Result<(), Stop> {
        if v.is_finite() {
            return Ok(());
        }
        self.found = Some((format!("/{}", self.path.join("/")), v));
        Err(Stop)
    }

    fn at<T: Serialize + ?Sized>(&mut self, key: String, value: &T) -> Result<(), Stop> {
        self.path.push(key);
        let r = value.serialize(&mut *self);
        self.path.pop();
        r
    }
}

/// Element counters for sequences.
struct Seq<'a> {
    w: &'a mut Walk,
    i: usize,
}

impl Seq<'_> {
    fn next<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), Stop> {
        let i = self.i;
        self.i += 1;
        self.w.at(i.to_string(), value)
    }
}

macro_rules! seq_like {
    ($($tr:ident :: $m:ident),*) => {$(
        impl ser::$tr for Seq<'_> {
            type Ok = ();
            type Error = Stop;
            fn $m<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), Stop> {
                self.next(value)
            }
            fn end(self) -> Result<(), Stop> {
                Ok(())
            }
        }
    )*};
}
seq_like!(
    SerializeSeq::serialize_element,
    SerializeTuple::serialize_element,
    SerializeTupleStruct::serialize_field,
    SerializeTupleVariant::serialize_field
);

/// Keys as text for maps.
struct Map<'a> {
    w: &'a mut Walk,
    key: String,
}

impl ser::SerializeMap for Map<'_> {
    type Ok = ();
    type Error = Stop;
    fn serialize_key<T: Serialize + ?Sized>(&mut self, key: &T) -> Result<(), Stop> {
        self.key =
            serde_json::to_value(key).map_or_else(|_| "?".into(), |v| v.as_str().map_or(v.to_string(), str::to_string));
        Ok(())
    }
    fn serialize_value<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), Stop> {
        let key = std::mem::take(&mut self.key);
        self.w.at(key, value)
    }
    fn end(self) -> Result<(), Stop> {
        Ok(())
    }
}

macro_rules! struct_like {
    ($($tr:ident),*) => {$(
        impl ser::$tr for &mut Walk {
            type Ok = ();
            type Error = Stop;
            fn serialize_field<T: Serialize + ?Sized>(&mut self, key: &'static str, value: &T) -> Result<(), Stop> {
                self.at(key.to_string(), value)
            }
            fn end(self) -> Result<(), Stop> {
                Ok(())
            }
        }
    )*};
}
struct_like!(SerializeStruct, SerializeStructVariant);

macro_rules! nothing {
    ($($m:ident($t:ty)),*) => {$(
        fn $m(self, _: $t) -> Result<(), Stop> {
            Ok(())
        }
    )*};
}

impl<'a> ser::Serializer for &'a mut Walk {
    type Ok = ();
    type Error = Stop;
    type SerializeSeq = Seq<'a>;
    type SerializeTuple = Seq<'a>;
    type SerializeTupleStruct = Seq<'a>;
    type SerializeTupleVariant = Seq<'a>;
    type SerializeMap = Map<'a>;
    type SerializeStruct = Self;
    type SerializeStructVariant = Self;

    nothing!(
        serialize_bool(bool),
        serialize_i8(i8),
        serialize_i16(i16),
        serialize_i32(i32),
        serialize_i64(i64),
        serialize_u8(u8),
        serialize_u16(u16),
        serialize_u32(u32),
        serialize_u64(u64),
        serialize_char(char),
        serialize_str(&str),
        serialize_bytes(&[u8]),
        serialize_unit_struct(&'static str)
    );

    fn serialize_f32(self, v: f32) -> Result<(), Stop> {
        self.float(f64::from(v))
    }
    fn serialize_f64(self, v: f64) -> Result<(), Stop> {
        self.float(v)
    }
    fn serialize_none(self) -> Result<(), Stop> {
        Ok(())
    }
    fn serialize_some<T: Serialize + ?Sized>(self, value: &T) -> Result<(), Stop> {
        value.serialize(self)
    }
    fn serialize_unit(self) -> Result<(), Stop> {
        Ok(())
    }
    fn serialize_unit_variant(self, _: &'static str, _: u32, _: &'static str) -> Result<(), Stop> {
        Ok(())
    }
    fn serialize_newtype_struct<T: Serialize + ?Sized>(self, _: &'static str, value: &T) -> Result<(), Stop> {
        value.serialize(self)
    }
    fn serialize_newtype_variant<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        value: &T,
    ) -> Result<(), Stop> {
        self.at(variant.to_string(), value)
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Seq<'a>, Stop> {
        Ok(Seq { w: self, i: 0 })
    }
    fn serialize_tuple(self, _: usize) -> Result<Seq<'a>, Stop> {
        Ok(Seq { w: self, i: 0 })
    }
    fn serialize_tuple_struct(self, _: &'static str, _: usize) -> Result<Seq<'a>, Stop> {
        Ok(Seq { w: self, i: 0 })
    }
    fn serialize_tuple_variant(self, _: &'static str, _: u32, _: &'static str, _: usize) -> Result<Seq<'a>, Stop> {
        Ok(Seq { w: self, i: 0 })
    }
    fn serialize_map(self, _: Option<usize>) -> Result<Map<'a>, Stop> {
        Ok(Map { w: self, key: String::new() })
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<Self, Stop> {
        Ok(self)
    }
    fn serialize_struct_variant(self, _: &'static str, _: u32, _: &'static str, _: usize) -> Result<Self, Stop> {
        Ok(self)
    }
}

#[cfg(test)]
mod tests {
    use super::first_non_finite;
    use std::collections::BTreeMap;

    #[derive(serde::Serialize)]
    struct Inner {
        x: Vec<f64>,
        y: Option<f64>,
    }

    #[derive(serde::Serialize)]
    struct Outer {
        name: String,
        inner: Inner,
        by: BTreeMap<String, f64>,
    }

    #[test]
    fn finds_the_first_non_finite_number_with_its_path() {
        let mut o = Outer { name: "a".into(), inner: Inner { x: vec![1.0, 2.0], y: None }, by: BTreeMap::new() };
        assert_eq!(first_non_finite(&o), None);
        o.by.insert("peak".into(), f64::INFINITY);
        assert_eq!(first_non_finite(&o), Some(("/by/peak".to_string(), f64::INFINITY)));
        o.inner.x[1] = f64::NAN;
        let (path, v) = first_non_finite(&o).unwrap();
        assert!(path == "/inner/x/1" && v.is_nan());
    }
}
