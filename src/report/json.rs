//! The JSON renderer: one object, SI units, pressures absolute in pascals.

use serde::ser::{self, Serialize};

/// A report as one pretty-printed JSON object.
///
/// Refuses to write a non-finite number. serde_json would print NaN and infinities as
/// `null`, indistinguishable from an absent optional result; in a safety record that is a
/// defect to surface, so every float is checked first.
pub fn to_json<T: Serialize>(report: &T) -> Result<String, String> {
    report
        .serialize(FiniteCheck)
        .map_err(|e| format!("internal error: {e}"))?;
    serde_json::to_string_pretty(report).map_err(|e| e.to_string())
}

/// A serializer that writes nothing and fails on the first non-finite float.
struct FiniteCheck;

#[derive(Debug)]
struct NotFinite(String);

impl std::fmt::Display for NotFinite {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for NotFinite {}

impl ser::Error for NotFinite {
    fn custom<M: std::fmt::Display>(msg: M) -> Self {
        NotFinite(msg.to_string())
    }
}

macro_rules! accept {
    ($($name:ident: $t:ty),*) => {
        $(fn $name(self, _: $t) -> Result<(), NotFinite> { Ok(()) })*
    };
}

impl ser::Serializer for FiniteCheck {
    type Ok = ();
    type Error = NotFinite;
    type SerializeSeq = Self;
    type SerializeTuple = Self;
    type SerializeTupleStruct = Self;
    type SerializeTupleVariant = Self;
    type SerializeMap = Self;
    type SerializeStruct = Self;
    type SerializeStructVariant = Self;

    accept!(serialize_bool: bool, serialize_i8: i8, serialize_i16: i16, serialize_i32: i32,
        serialize_i64: i64, serialize_u8: u8, serialize_u16: u16, serialize_u32: u32,
        serialize_u64: u64, serialize_char: char, serialize_str: &str, serialize_bytes: &[u8],
        serialize_unit_struct: &'static str);

    fn serialize_f32(self, v: f32) -> Result<(), NotFinite> {
        self.serialize_f64(f64::from(v))
    }
    fn serialize_f64(self, v: f64) -> Result<(), NotFinite> {
        if v.is_finite() {
            Ok(())
        } else {
            Err(NotFinite(format!("a result is {v}, not a finite number")))
        }
    }
    fn serialize_none(self) -> Result<(), NotFinite> {
        Ok(())
    }
    fn serialize_some<T: ?Sized + Serialize>(self, v: &T) -> Result<(), NotFinite> {
        v.serialize(self)
    }
    fn serialize_unit(self) -> Result<(), NotFinite> {
        Ok(())
    }
    fn serialize_unit_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
    ) -> Result<(), NotFinite> {
        Ok(())
    }
    fn serialize_newtype_struct<T: ?Sized + Serialize>(
        self,
        _: &'static str,
        v: &T,
    ) -> Result<(), NotFinite> {
        v.serialize(self)
    }
    fn serialize_newtype_variant<T: ?Sized + Serialize>(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        v: &T,
    ) -> Result<(), NotFinite> {
        v.serialize(self)
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Self, NotFinite> {
        Ok(self)
    }
    fn serialize_tuple(self, _: usize) -> Result<Self, NotFinite> {
        Ok(self)
    }
    fn serialize_tuple_struct(self, _: &'static str, _: usize) -> Result<Self, NotFinite> {
        Ok(self)
    }
    fn serialize_tuple_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Self, NotFinite> {
        Ok(self)
    }
    fn serialize_map(self, _: Option<usize>) -> Result<Self, NotFinite> {
        Ok(self)
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<Self, NotFinite> {
        Ok(self)
    }
    fn serialize_struct_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Self, NotFinite> {
        Ok(self)
    }
}

macro_rules! compound {
    ($($tr:ident :: $method:ident),*) => {
        $(impl ser::$tr for FiniteCheck {
            type Ok = ();
            type Error = NotFinite;
            fn $method<T: ?Sized + Serialize>(&mut self, v: &T) -> Result<(), NotFinite> {
                v.serialize(FiniteCheck)
            }
            fn end(self) -> Result<(), NotFinite> {
                Ok(())
            }
        })*
    };
}

compound!(
    SerializeSeq::serialize_element,
    SerializeTuple::serialize_element,
    SerializeTupleStruct::serialize_field,
    SerializeTupleVariant::serialize_field
);

impl ser::SerializeMap for FiniteCheck {
    type Ok = ();
    type Error = NotFinite;
    fn serialize_key<T: ?Sized + Serialize>(&mut self, k: &T) -> Result<(), NotFinite> {
        k.serialize(FiniteCheck)
    }
    fn serialize_value<T: ?Sized + Serialize>(&mut self, v: &T) -> Result<(), NotFinite> {
        v.serialize(FiniteCheck)
    }
    fn end(self) -> Result<(), NotFinite> {
        Ok(())
    }
}

macro_rules! fields {
    ($($tr:ident),*) => {
        $(impl ser::$tr for FiniteCheck {
            type Ok = ();
            type Error = NotFinite;
            fn serialize_field<T: ?Sized + Serialize>(&mut self, key: &'static str, v: &T) -> Result<(), NotFinite> {
                v.serialize(FiniteCheck).map_err(|e| NotFinite(format!("{key}: {e}")))
            }
            fn end(self) -> Result<(), NotFinite> {
                Ok(())
            }
        })*
    };
}

fields!(SerializeStruct, SerializeStructVariant);

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(serde::Serialize)]
    struct Sample {
        ok: f64,
        maybe: Option<f64>,
        list: Vec<f64>,
    }

    #[test]
    fn finite_reports_print_and_nan_is_refused() {
        let good = Sample {
            ok: 1.0,
            maybe: None,
            list: vec![2.0],
        };
        assert!(to_json(&good).unwrap().contains("\"ok\": 1.0"));
        let bad = Sample {
            ok: 1.0,
            maybe: Some(f64::NAN),
            list: vec![],
        };
        assert!(to_json(&bad).unwrap_err().contains("maybe"));
        let bad = Sample {
            ok: 1.0,
            maybe: None,
            list: vec![f64::INFINITY],
        };
        assert!(to_json(&bad).is_err());
    }
}
