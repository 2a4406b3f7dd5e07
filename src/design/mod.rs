//! Design tools: match a target colour, estimate manufacturing tolerance
//! and yield, fit thicknesses to a measured spectrum, and sweep a design
//! space. All of them work on the layers a scene marks with `vary_nm` (in
//! its stack, or in its coating's platelet, whose colours are judged at
//! measurement geometries).

pub mod coating;
pub mod evaluator;
pub mod finite;
pub mod fit;
pub mod matching;
pub mod report;
pub mod search;
pub mod sweep;
pub mod tolerance;
pub mod variables;
