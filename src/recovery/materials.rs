//! The elasticity of every element: zone id -> material -> D and C in the analysis mode.

use crate::material::{AnalysisMode, Elasticity, MaterialMap};
use crate::mesh::Mesh;
use std::collections::BTreeMap;
use thiserror::Error;

/// A zone with cells but no material.
#[derive(Debug, Error, Clone, PartialEq)]
#[error("zone {zone} ({cells} cells, first cell {first_cell}) has no material: add it to the materials file, which defines zones {defined}")]
pub struct MissingZoneMaterial {
    /// The zone id without a material.
    pub zone: i64,
    /// How many cells have that zone.
    pub cells: usize,
    /// File id of the first such cell.
    pub first_cell: u32,
    /// The zone ids the map defines, for the message.
    pub defined: String,
}

/// D and C for each element, through a small table indexed per element.
#[derive(Clone, Debug)]
pub struct ElementMaterials {
    /// The analysis mode shared by all elements.
    pub mode: AnalysisMode,
    table: Vec<Elasticity>,
    index: Vec<u16>,
}

impl ElementMaterials {
    /// Resolves every element's zone through `materials`.
    pub fn new(
        mesh: &Mesh,
        materials: &MaterialMap,
        mode: AnalysisMode,
    ) -> Result<Self, MissingZoneMaterial> {
        let mut zone_index: BTreeMap<i64, u16> = BTreeMap::new();
        let mut table = Vec::new();
        let mut index = Vec::with_capacity(mesh.element_count());
        for (e, &zone) in mesh.zone.iter().enumerate() {
            let idx = match zone_index.get(&zone) {
                Some(&i) => i,
                None => {
                    let Some(material) = materials.material(zone) else {
                        let cells = mesh.zone.iter().filter(|&&z| z == zone).count();
                        let defined = match materials {
                            MaterialMap::ByZone(m) => m
                                .keys()
                                .map(|k| k.to_string())
                                .collect::<Vec<_>>()
                                .join(", "),
                            MaterialMap::Single(_) => "all".into(),
                        };
                        return Err(MissingZoneMaterial {
                            zone,
                            cells,
                            first_cell: mesh.file_cell[e],
                            defined,
                        });
                    };
                    let i = table.len() as u16;
                    table.push(Elasticity::new(material, mode));
                    zone_index.insert(zone, i);
                    i
                }
            };
            index.push(idx);
        }
        Ok(Self { mode, table, index })
    }

    /// D and C of global element `e`.
    #[inline]
    pub fn of(&self, e: usize) -> &Elasticity {
        &self.table[self.index[e] as usize]
    }
}
