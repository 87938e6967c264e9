//! Physical properties: materials and their enthalpy curves. Knows nothing of meshes.
pub mod climate;
pub mod library;
pub mod material;
pub mod soil;
