//! Materials by zone: an integer cell array names each cell's zone, and a JSON file maps zone ids
//! to materials, `{"1": {"youngs": 206000, "poisson": 0.3}, "2": {...}}`.

use super::{Material, MaterialError};
use std::collections::BTreeMap;
use thiserror::Error;

/// Problems reading a zone-to-material file.
#[derive(Debug, Error)]
pub enum ZoneMaterialsError {
    /// The file is not JSON of the expected shape.
    #[error("{file}: {message}")]
    Format {
        /// The file's name as given.
        file: String,
        /// What was wrong, with the value found and what was expected.
        message: String,
    },
    /// A material's values are out of range.
    #[error("{file}: {source}")]
    Material {
        /// The file's name as given.
        file: String,
        /// The range error.
        source: MaterialError,
    },
}

/// Which material each zone has. With a single material, every zone maps to it.
#[derive(Clone, Debug, PartialEq)]
pub enum MaterialMap {
    /// One material for the whole model.
    Single(Material),
    /// A material per zone id.
    ByZone(BTreeMap<i64, Material>),
}

impl MaterialMap {
    /// Parses the JSON text of a zone file: an object whose keys are integer zone ids and whose
    /// values are objects with numeric "youngs" and "poisson".
    pub fn from_json(text: &str, file: &str) -> Result<Self, ZoneMaterialsError> {
        let fail = |message: String| ZoneMaterialsError::Format {
            file: file.to_string(),
            message,
        };
        let value: serde_json::Value =
            serde_json::from_str(text).map_err(|e| fail(format!("not valid JSON ({e})")))?;
        let object = value.as_object().ok_or_else(|| {
            fail("expected an object mapping zone ids to {\"youngs\": E, \"poisson\": nu}".into())
        })?;
        if object.is_empty() {
            return Err(fail(
                "no zones defined: expected at least one zone id".into(),
            ));
        }
        let mut map = BTreeMap::new();
        for (key, entry) in object {
            let zone: i64 = key
                .trim()
                .parse()
                .map_err(|_| fail(format!("zone key '{key}' is not an integer zone id")))?;
            let number = |name: &str| -> Result<f64, ZoneMaterialsError> {
                entry
                    .get(name)
                    .and_then(|v| v.as_f64())
                    .ok_or_else(|| fail(format!("zone {zone}: missing numeric \"{name}\"")))
            };
            let material = Material::new(
                number("youngs")?,
                number("poisson")?,
                &format!("zone {zone}: "),
            )
            .map_err(|source| ZoneMaterialsError::Material {
                file: file.to_string(),
                source,
            })?;
            map.insert(zone, material);
        }
        Ok(MaterialMap::ByZone(map))
    }

    /// The material of `zone`, or `None` when the map has no entry for it.
    pub fn material(&self, zone: i64) -> Option<Material> {
        match self {
            MaterialMap::Single(m) => Some(*m),
            MaterialMap::ByZone(map) => map.get(&zone).copied(),
        }
    }
}
