//! Pictures of a synthesis: the code cube, one Karnaugh-style map per function, and the
//! flow graph (as SVG, and the flow graph also as Graphviz DOT text).
//!
//! The inputs are plain structs of strings, independent of the pipeline's own types, so
//! the caller just fills them in: [`CodeCube`] for [`code_cube_svg`], [`KMap`] for
//! [`kmap_svg`], [`FlowGraph`] for [`flow_graph_svg`] and [`flow_graph_dot`];
//! [`write_all`] writes every picture into one folder. The look (layout, palette,
//! legend) is our own and is described in `docs/pictures.md`. Every SVG has a
//! `viewBox`, an explicit `width` and `height`, a white background, text in
//! `sans-serif`, and every name is XML-escaped. The same input always gives the same
//! bytes.
//!
//! ```
//! use stillpoint::pictures::{kmap_svg, KMap};
//! // f = a·b + a'·c over (a, b, c), minterms 1, 3, 6, 7.
//! let m = KMap {
//!     name: "f".into(),
//!     vars: vec!["a".into(), "b".into(), "c".into()],
//!     values: [0, 1, 0, 1, 0, 0, 1, 1].iter().map(|&v| Some(v == 1)).collect(),
//!     products: vec!["11-".into(), "0-1".into()],
//!     required: vec![],
//! };
//! let svg = kmap_svg(&m)?;
//! assert!(svg.contains("<svg") && svg.contains("viewBox"));
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

mod cube;
mod design;
mod dot;
mod graph;
mod map;
mod svg;

pub use cube::code_cube_svg;
pub use design::design_pictures;
pub use dot::flow_graph_dot;
pub use graph::flow_graph_svg;
pub use map::kmap_svg;

use std::path::{Path, PathBuf};

/// The most variables a map can show; the caller leaves larger functions out (and may
/// say so), since [`kmap_svg`] and [`write_all`] refuse them.
pub const MAX_MAP_VARS: usize = 6;

/// The state assignment to draw as corners of the `k`-cube.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct CodeCube {
    /// The state variables `y1..yk`, in code order (`vars[0]` is the leftmost code bit).
    pub vars: Vec<String>,
    /// `(state name, code)`: the code is a string of `0`/`1`, one per variable, `y1`
    /// leftmost. A code of the wrong length or with other characters is not drawn as a
    /// corner but listed under the legend, so nothing given is silently lost.
    pub states: Vec<(String, String)>,
    /// The transitions to draw as arrows between corners.
    pub transitions: Vec<CubeArrow>,
}

/// One transition of the coded table: in input column `column`, the state `from` moves
/// to the state `to`.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct CubeArrow {
    /// The input column's label, e.g. `"01"`.
    pub column: String,
    /// The source state's name (or, if no state has that name, its code).
    pub from: String,
    /// The destination state's name (or, if no state has that name, its code).
    pub to: String,
    /// For a critical race: the codes passed by a bad order of bit changes, as the race
    /// analysis reports them (the source code may be included or not). Drawn as a
    /// thick dashed polyline through those corners, starting at the source.
    pub critical_order: Option<Vec<String>>,
}

/// One next-state or output function to draw as a Karnaugh-style map.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct KMap {
    /// The function's name, e.g. `"Y1"`.
    pub name: String,
    /// The variables, at most 6; `vars[0]` is the most significant bit of a minterm
    /// number.
    pub vars: Vec<String>,
    /// `2^n` values indexed by minterm number; `None` is a don't-care.
    pub values: Vec<Option<bool>>,
    /// The chosen products, as cube strings over `vars` (`1`, `0`, `-`), each outlined.
    pub products: Vec<String>,
    /// Required transition cubes, as cube strings over `vars`, each hatched.
    pub required: Vec<String>,
}

/// The flow table as a graph: states as nodes, unstable entries as labelled arrows.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct FlowGraph {
    /// The table's name, shown as the title.
    pub name: String,
    /// The states, in the order to place them: clockwise from the top, starting with the
    /// reset state if there is one (the order is rotated to bring it to the top).
    pub states: Vec<String>,
    /// The reset state, if the table names one.
    pub reset: Option<String>,
    /// `(from, to, column label)`: in that column, `from` moves to `to`. Parallel edges
    /// are merged into one arrow carrying the list of columns.
    pub edges: Vec<(String, String, String)>,
    /// `(state, column label)`: the state is stable in that column.
    pub stable: Vec<(String, String)>,
}

/// What can go wrong when drawing a picture.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum PictureError {
    /// A map was asked for over more variables than it can show.
    #[error("map {name}: {vars} variables, but a map shows at most 6")]
    TooManyVars {
        /// The map's name.
        name: String,
        /// How many variables were given.
        vars: usize,
    },
    /// The value list does not have one entry per minterm.
    #[error("map {name}: {got} values given, but {vars} variables need {expected}")]
    ValueCount {
        /// The map's name.
        name: String,
        /// Number of variables.
        vars: usize,
        /// `2^vars`.
        expected: usize,
        /// What was given.
        got: usize,
    },
    /// A product or required cube is not a cube string over the map's variables.
    #[error("map {name}: {what} {index} \"{cube}\" is not a cube over {vars} variables (one of 0, 1, - per variable)")]
    BadCube {
        /// The map's name.
        name: String,
        /// `"product"` or `"required cube"`.
        what: &'static str,
        /// Index in its list (0-based).
        index: usize,
        /// The offending text.
        cube: String,
        /// Number of variables.
        vars: usize,
    },
}

/// Write every picture into `dir` (created if missing): `cube.svg`, one
/// `map_<name>.svg` per map (characters other than letters, digits, `-` and `_` in the
/// name become `_`; a clash gets a `_2`, `_3`, ... suffix), `flow.svg` and `flow.dot`.
/// Returns the paths written, in that order. A map that cannot be drawn (see
/// [`kmap_svg`]; in particular one over more than [`MAX_MAP_VARS`] variables, which the
/// caller should leave out) is an `InvalidInput` error naming it; nothing is written
/// after it.
pub fn write_all(
    dir: &Path,
    cube: &CodeCube,
    maps: &[KMap],
    graph: &FlowGraph,
) -> std::io::Result<Vec<PathBuf>> {
    std::fs::create_dir_all(dir)?;
    let mut written = Vec::with_capacity(maps.len() + 3);
    let mut put = |name: String, text: String| -> std::io::Result<()> {
        let p = dir.join(name);
        std::fs::write(&p, text)?;
        written.push(p);
        Ok(())
    };
    put("cube.svg".into(), code_cube_svg(cube))?;
    let mut used = std::collections::BTreeSet::new();
    for m in maps {
        let svg = kmap_svg(m)
            .map_err(|e| std::io::Error::new(std::io::ErrorKind::InvalidInput, e.to_string()))?;
        let base = file_stem(&m.name);
        let mut stem = base.clone();
        let mut k = 2;
        while !used.insert(stem.clone()) {
            stem = format!("{base}_{k}");
            k += 1;
        }
        put(format!("map_{stem}.svg"), svg)?;
    }
    put("flow.svg".into(), flow_graph_svg(graph))?;
    put("flow.dot".into(), flow_graph_dot(graph))?;
    Ok(written)
}

/// A file-name-safe form of a function name.
fn file_stem(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' {
                c
            } else {
                '_'
            }
        })
        .collect();
    if s.is_empty() {
        "unnamed".into()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn file_stems_are_safe() {
        assert_eq!(file_stem("Y1"), "Y1");
        assert_eq!(file_stem("a/b c"), "a_b_c");
        assert_eq!(file_stem(""), "unnamed");
    }
}
