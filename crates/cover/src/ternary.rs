//! Kleene (strong three-valued) evaluation of a sum of products, after Eichelberger's
//! ternary hazard detection (E. B. Eichelberger, "Hazard detection in combinational and
//! sequential switching circuits", IBM J. Res. Dev. 9(2), 1965; from memory).
//!
//! A changing input is `X`; a product is 0 if some literal is 0, else `X` if some
//! literal is `X`, else 1; the sum is 1 if some product is 1, else `X` if some product
//! is `X`, else 0.

use crate::cube::Cube;
use crate::function::Transition;

/// A ternary value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Tern {
    /// Logic 0.
    Zero,
    /// Logic 1.
    One,
    /// Unknown or changing.
    X,
}

impl From<bool> for Tern {
    fn from(b: bool) -> Tern {
        if b {
            Tern::One
        } else {
            Tern::Zero
        }
    }
}

/// The ternary value of one product at `point` (`point[i]` is variable `i`).
pub fn eval_cube(cube: &Cube, point: &[Tern]) -> Tern {
    let mut out = Tern::One;
    for (i, &v) in point.iter().enumerate() {
        match (cube.literal(i), v) {
            (None, _) => {}
            (Some(_), Tern::X) => out = Tern::X,
            (Some(p), Tern::One) if !p => return Tern::Zero,
            (Some(p), Tern::Zero) if p => return Tern::Zero,
            _ => {}
        }
    }
    out
}

/// The ternary value of the sum of `cubes` at `point` (only the first `nvars` entries
/// are read).
///
/// ```
/// use stillpoint_cover::{Cube, ternary::{eval_sop, Tern}};
/// // methods.md §7.2 CHECK HAZ-1 [memory, high; ternary value computed]: ab + a'c at
/// // (X, 1, 1) is X; with bc added it is 1.
/// let f = [Cube::parse("11-")?, Cube::parse("0-1")?];
/// let p = [Tern::X, Tern::One, Tern::One];
/// assert_eq!(eval_sop(&f, 3, &p), Tern::X);
/// let g = [f[0], f[1], Cube::parse("-11")?];
/// assert_eq!(eval_sop(&g, 3, &p), Tern::One);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn eval_sop(cubes: &[Cube], nvars: usize, point: &[Tern]) -> Tern {
    let point = &point[..nvars.min(point.len())];
    let mut out = Tern::Zero;
    for c in cubes {
        match eval_cube(c, point) {
            Tern::One => return Tern::One,
            Tern::X => out = Tern::X,
            Tern::Zero => {}
        }
    }
    out
}

/// The ternary point of a transition: variables that change are `X`, the others keep
/// their value.
pub fn transition_point(nvars: usize, t: &Transition) -> Vec<Tern> {
    let a = Cube::minterm(nvars, t.start);
    let b = Cube::minterm(nvars, t.end);
    (0..nvars)
        .map(|i| match (a.literal(i), b.literal(i)) {
            (Some(x), Some(y)) if x == y => Tern::from(x),
            _ => Tern::X,
        })
        .collect()
}

/// Eichelberger's test for one transition: when the sum has the same binary value at
/// both ends, the transition is clean iff the ternary value with the changing inputs
/// at X is that value (no static hazard). When the end values differ, ternary
/// evaluation cannot see dynamic hazards (the value is X while inputs change), and the
/// transition counts as clean; use the Nowick & Dill conditions of
/// [`crate::verify::check`] for those.
pub fn transition_is_clean(cubes: &[Cube], nvars: usize, t: &Transition) -> bool {
    let at = |m: u64| {
        let p = Cube::minterm(nvars, m);
        cubes.iter().any(|c| c.contains(&p))
    };
    let (a, b) = (at(t.start), at(t.end));
    if a != b {
        return true;
    }
    eval_sop(cubes, nvars, &transition_point(nvars, t)) == Tern::from(a)
}
