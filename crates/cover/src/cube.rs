//! Cubes (product terms) over up to 64 variables, packed into two `u64` words.
//!
//! Variable `i` of a cube is bit `i` of both words: `care` says whether the variable
//! appears as a literal, `value` gives its polarity (only meaningful where `care` is set;
//! always kept zero elsewhere so that equal cubes have equal words).
//!
//! Minterm numbers follow the textbook convention: with `n` variables, `vars[0]` is the
//! most significant bit of the minterm number, so minterm 13 over `abcd` is `a b c' d`.

use crate::CoverError;
use std::cmp::Ordering;
use std::fmt;

/// The largest number of variables a [`Cube`] can hold.
pub const MAX_VARS: usize = 64;

/// A product term (a cube of the Boolean space), `Copy`, 16 bytes.
///
/// The cube does not store how many variables its space has; functions that print or
/// enumerate take `nvars`. The empty product (the universe, all `-`) is [`Cube::full`].
///
/// ```
/// use stillpoint_cover::Cube;
/// let c = Cube::parse("1-0")?;           // a c'
/// assert_eq!(c.literal(0), Some(true));
/// assert_eq!(c.literal(1), None);
/// assert_eq!(c.literal(2), Some(false));
/// assert!(c.contains_minterm(3, 0b100)); // a=1 b=0 c=0
/// assert!(c.contains(&Cube::minterm(3, 6)));
/// assert_eq!(c.to_string(3), "1-0");
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct Cube {
    care: u64,
    value: u64,
}

impl Cube {
    /// The universe: no literal at all (`---…`).
    pub fn full() -> Cube {
        Cube { care: 0, value: 0 }
    }

    /// Builds a cube from its two words (bit `i` = variable `i`); value bits outside
    /// `care` are cleared.
    pub fn from_words(care: u64, value: u64) -> Cube {
        Cube {
            care,
            value: value & care,
        }
    }

    /// The bit mask of variables that appear as literals.
    pub fn care_bits(&self) -> u64 {
        self.care
    }

    /// The polarity bits (set = positive literal), zero outside [`Cube::care_bits`].
    pub fn value_bits(&self) -> u64 {
        self.value
    }

    /// The minterm `m` over `nvars` variables (`vars[0]` is the most significant bit).
    ///
    /// Bits of `m` above `nvars` are ignored; `nvars` is clamped to 64.
    pub fn minterm(nvars: usize, m: u64) -> Cube {
        let n = nvars.min(MAX_VARS);
        let mut value = 0u64;
        for i in 0..n {
            if (m >> (n - 1 - i)) & 1 == 1 {
                value |= 1 << i;
            }
        }
        Cube {
            care: mask(n),
            value,
        }
    }

    /// Parses a cube string: character `i` is variable `i`: `1` positive literal, `0`
    /// complemented literal, `-` absent.
    pub fn parse(s: &str) -> Result<Cube, CoverError> {
        let mut care = 0u64;
        let mut value = 0u64;
        let mut count = 0usize;
        for (i, ch) in s.chars().enumerate() {
            if i >= MAX_VARS {
                return Err(CoverError::BadCube {
                    text: s.to_string(),
                    reason: format!("longer than {MAX_VARS} variables"),
                });
            }
            match ch {
                '1' => {
                    care |= 1 << i;
                    value |= 1 << i;
                }
                '0' => care |= 1 << i,
                '-' => {}
                other => {
                    return Err(CoverError::BadCube {
                        text: s.to_string(),
                        reason: format!("unexpected character {other:?} (expected 0, 1 or -)"),
                    })
                }
            }
            count = i + 1;
        }
        let _ = count;
        Ok(Cube { care, value })
    }

    /// The full-length cube string over `nvars` variables.
    pub fn to_string(&self, nvars: usize) -> String {
        (0..nvars.min(MAX_VARS))
            .map(|i| match self.literal(i) {
                Some(true) => '1',
                Some(false) => '0',
                None => '-',
            })
            .collect()
    }

    /// The literal of variable `var`: `Some(true)` positive, `Some(false)` complemented,
    /// `None` absent (also for `var >= 64`).
    pub fn literal(&self, var: usize) -> Option<bool> {
        if var >= MAX_VARS || (self.care >> var) & 1 == 0 {
            None
        } else {
            Some((self.value >> var) & 1 == 1)
        }
    }

    /// This cube with the literal of `var` set (`Some`) or removed (`None`).
    ///
    /// `var` must be below 64 (larger values leave the cube unchanged).
    pub fn with_literal(&self, var: usize, lit: Option<bool>) -> Cube {
        if var >= MAX_VARS {
            return *self;
        }
        let bit = 1u64 << var;
        match lit {
            None => Cube {
                care: self.care & !bit,
                value: self.value & !bit,
            },
            Some(true) => Cube {
                care: self.care | bit,
                value: self.value | bit,
            },
            Some(false) => Cube {
                care: self.care | bit,
                value: self.value & !bit,
            },
        }
    }

    /// The number of literals.
    pub fn literal_count(&self) -> usize {
        self.care.count_ones() as usize
    }

    /// Whether every point of `other` lies in `self`.
    pub fn contains(&self, other: &Cube) -> bool {
        self.care & !other.care == 0 && (other.value ^ self.value) & self.care == 0
    }

    /// Whether the two cubes share a point.
    pub fn intersects(&self, other: &Cube) -> bool {
        (self.value ^ other.value) & self.care & other.care == 0
    }

    /// The common subcube, if the cubes intersect.
    pub fn intersection(&self, other: &Cube) -> Option<Cube> {
        if self.intersects(other) {
            Some(Cube {
                care: self.care | other.care,
                value: self.value | other.value,
            })
        } else {
            None
        }
    }

    /// Whether minterm `m` (over `nvars` variables) lies in the cube.
    pub fn contains_minterm(&self, nvars: usize, m: u64) -> bool {
        self.contains(&Cube::minterm(nvars, m))
    }

    /// The smallest cube containing both.
    pub fn supercube(&self, other: &Cube) -> Cube {
        let care = self.care & other.care & !(self.value ^ other.value);
        Cube {
            care,
            value: self.value & care,
        }
    }

    /// The consensus of two cubes at distance exactly one: the variable in conflict is
    /// dropped and the other literals are combined (`x·P` and `x'·Q` give `P·Q`).
    /// `None` at any other distance.
    pub fn consensus(&self, other: &Cube) -> Option<Cube> {
        let conflict = (self.value ^ other.value) & self.care & other.care;
        if conflict.count_ones() != 1 {
            return None;
        }
        let care = (self.care | other.care) & !conflict;
        Some(Cube {
            care,
            value: (self.value | other.value) & care,
        })
    }

    /// The number of variables on which the cubes have opposite literals.
    pub fn distance(&self, other: &Cube) -> usize {
        ((self.value ^ other.value) & self.care & other.care).count_ones() as usize
    }

    /// The number of points of the cube in a space of `nvars` variables (saturating).
    pub fn size(&self, nvars: usize) -> u128 {
        let free = nvars.min(MAX_VARS).saturating_sub(self.literal_count());
        1u128 << free
    }

    /// The minterm number of this cube if it is a single point of `nvars` variables.
    pub fn as_minterm(&self, nvars: usize) -> Option<u64> {
        let n = nvars.min(MAX_VARS);
        if self.care != mask(n) {
            return None;
        }
        Some(self.some_minterm(n))
    }

    /// The smallest minterm number (over `nvars` variables) in the cube: absent variables
    /// read as 0.
    pub fn some_minterm(&self, nvars: usize) -> u64 {
        let n = nvars.min(MAX_VARS);
        let mut m = 0u64;
        for i in 0..n {
            if (self.value >> i) & 1 == 1 {
                m |= 1 << (n - 1 - i);
            }
        }
        m
    }

    /// Iterates the minterm numbers of the cube over `nvars` variables, ascending.
    ///
    /// The count is [`Cube::size`]; callers limit it.
    pub fn minterms(&self, nvars: usize) -> impl Iterator<Item = u64> {
        let n = nvars.min(MAX_VARS);
        let base = self.some_minterm(n);
        // Free variables as minterm bit positions.
        let mut free_mask = 0u64;
        for i in 0..n {
            if (self.care >> i) & 1 == 0 {
                free_mask |= 1 << (n - 1 - i);
            }
        }
        // Enumerate subsets of free_mask (ascending) with the standard trick.
        let mut next = Some(0u64);
        std::iter::from_fn(move || {
            let cur = next?;
            next = if cur == free_mask {
                None
            } else {
                Some((cur.wrapping_sub(free_mask)) & free_mask)
            };
            Some(base | cur)
        })
    }

    /// The order code of variable `v`: `-` 0, `0` 1, `1` 2.
    fn code(&self, v: u32) -> u8 {
        if (self.care >> v) & 1 == 0 {
            0
        } else {
            1 + ((self.value >> v) & 1) as u8
        }
    }
}

/// The mask of the low `n` bits.
pub(crate) fn mask(n: usize) -> u64 {
    if n >= 64 {
        u64::MAX
    } else {
        (1u64 << n) - 1
    }
}

impl PartialOrd for Cube {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Cube {
    /// Orders like the cube strings compared byte by byte (`-` < `0` < `1`, variable 0
    /// first).
    fn cmp(&self, other: &Self) -> Ordering {
        let diff = (self.care ^ other.care) | (self.value ^ other.value);
        if diff == 0 {
            return Ordering::Equal;
        }
        let v = diff.trailing_zeros();
        self.code(v).cmp(&other.code(v))
    }
}

impl fmt::Debug for Cube {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let top = 64 - (self.care.leading_zeros() as usize);
        write!(f, "Cube({})", self.to_string(top.max(1)))
    }
}

/// Sorts `cubes` in the order of [`Cube`]'s `Ord` (the cube strings compared byte by
/// byte): when every literal lies among the first 32 variables, a least-significant-
/// digit radix sort whose digit is a group of [`SORT_GROUP`] variables read as a base-3
/// number (variable order, `-` 0, `0` 1, `1` 2) from a table of their care and value
/// bits; else the comparison sort. The same order as `sort_unstable` (equal cubes are
/// identical), in time linear in the number of cubes.
pub(crate) fn sort_cubes(cubes: &mut [Cube]) {
    let top = cubes
        .iter()
        .map(|c| 64 - c.care.leading_zeros() as usize)
        .max()
        .unwrap_or(0);
    if top > 32 || cubes.len() < 256 {
        cubes.sort_unstable();
        return;
    }
    // digit[care][value] of one group: its variables' codes, the first most significant.
    let mut digit = [[0u8; 1 << SORT_GROUP]; 1 << SORT_GROUP];
    for (care, row) in digit.iter_mut().enumerate() {
        for (value, d) in row.iter_mut().enumerate() {
            *d = (0..SORT_GROUP).fold(0, |a, i| {
                let code = if care >> i & 1 == 0 {
                    0
                } else {
                    1 + (value >> i & 1) as u8
                };
                3 * a + code
            });
        }
    }
    let groups = top.div_ceil(SORT_GROUP);
    let of = |c: &Cube, g: usize| -> usize {
        let m = (1u64 << SORT_GROUP) - 1;
        let shift = g * SORT_GROUP;
        usize::from(digit[(c.care >> shift & m) as usize][(c.value >> shift & m) as usize])
    };
    // Every group's digit counts in one pass.
    let mut counts = vec![[0usize; DIGITS]; groups];
    for c in cubes.iter() {
        for (g, count) in counts.iter_mut().enumerate() {
            count[of(c, g)] += 1;
        }
    }
    let mut spare = cubes.to_vec();
    // The last group first; the passes alternate between `cubes` and `spare`.
    for (pass, g) in (0..groups).rev().enumerate() {
        let (from, to): (&[Cube], &mut [Cube]) = if pass % 2 == 0 {
            (cubes, &mut spare)
        } else {
            (&spare, cubes)
        };
        let mut start = [0usize; DIGITS];
        let mut sum = 0;
        for (s, &k) in start.iter_mut().zip(&counts[g]) {
            *s = sum;
            sum += k;
        }
        for c in from {
            let d = of(c, g);
            to[start[d]] = *c;
            start[d] += 1;
        }
    }
    if groups % 2 == 1 {
        cubes.copy_from_slice(&spare);
    }
}

/// Variables per digit of [`sort_cubes`].
const SORT_GROUP: usize = 5;

/// The digits of [`sort_cubes`].
const DIGITS: usize = 3usize.pow(SORT_GROUP as u32);

/// Writes a cover in readable form, e.g. `a c' + b d` (`0` for the empty cover, `1` for
/// the universe).
pub fn expression(cubes: &[Cube], vars: &[String]) -> String {
    if cubes.is_empty() {
        return "0".to_string();
    }
    let terms: Vec<String> = cubes
        .iter()
        .map(|c| {
            let lits: Vec<String> = (0..vars.len())
                .filter_map(|i| {
                    c.literal(i).map(|p| {
                        if p {
                            vars[i].clone()
                        } else {
                            format!("{}'", vars[i])
                        }
                    })
                })
                .collect();
            if lits.is_empty() {
                "1".to_string()
            } else {
                lits.join(" ")
            }
        })
        .collect();
    terms.join(" + ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn radix_sort_is_the_comparison_sort() {
        // Reference: the standard library's sort on `Ord` (random cubes of 1 to 32 and
        // of 40 variables, with repeats).
        let mut x = 0x9E37_79B9_7F4A_7C15u64;
        let mut next = move || {
            x ^= x >> 12;
            x ^= x << 25;
            x ^= x >> 27;
            x.wrapping_mul(0x2545_F491_4F6C_DD1D)
        };
        for n in [1usize, 3, 7, 16, 20, 31, 32, 40] {
            let m = if n == 64 { u64::MAX } else { (1u64 << n) - 1 };
            let mut cubes: Vec<Cube> = (0..3000)
                .map(|_| {
                    let care = next() & m;
                    Cube::from_words(care, next() & care)
                })
                .collect();
            let again = cubes[..500].to_vec();
            cubes.extend(again);
            let mut want = cubes.clone();
            want.sort_unstable();
            sort_cubes(&mut cubes);
            assert_eq!(cubes, want, "n={n}");
        }
    }

    #[test]
    fn minterm_numbering_is_textbook() {
        // formats.md §2: with abcd, minterm 13 = 1101 is a=1 b=1 c=0 d=1.
        let c = Cube::minterm(4, 13);
        assert_eq!(c.to_string(4), "1101");
        assert_eq!(c.as_minterm(4), Some(13));
    }

    #[test]
    fn parse_round_trip_and_errors() {
        let c = Cube::parse("1-0-").unwrap();
        assert_eq!(c.to_string(4), "1-0-");
        assert_eq!(c.literal_count(), 2);
        assert!(Cube::parse("1x0").is_err());
    }

    #[test]
    fn supercube_consensus_distance() {
        let a = Cube::parse("11-").unwrap();
        let b = Cube::parse("0-1").unwrap();
        assert_eq!(a.distance(&b), 1);
        assert_eq!(a.consensus(&b).unwrap().to_string(3), "-11");
        assert_eq!(a.supercube(&b).to_string(3), "---");
        assert_eq!(
            Cube::minterm(3, 5)
                .supercube(&Cube::minterm(3, 7))
                .to_string(3),
            "1-1"
        );
        assert!(a.consensus(&a).is_none());
    }

    #[test]
    fn minterm_enumeration() {
        let c = Cube::parse("1-0-").unwrap();
        let ms: Vec<u64> = c.minterms(4).collect();
        assert_eq!(ms, vec![8, 9, 12, 13]);
        assert_eq!(Cube::full().minterms(2).count(), 4);
    }

    #[test]
    fn ordering_matches_strings() {
        let mut v: Vec<Cube> = ["1-0", "-11", "0-1", "---", "110"]
            .iter()
            .map(|s| Cube::parse(s).unwrap())
            .collect();
        v.sort();
        let s: Vec<String> = v.iter().map(|c| c.to_string(3)).collect();
        let mut t = s.clone();
        t.sort();
        assert_eq!(s, t);
    }

    #[test]
    fn expression_form() {
        let vars: Vec<String> = ["a", "b", "c", "d"].iter().map(|s| s.to_string()).collect();
        let cubes = [Cube::parse("1-0-").unwrap(), Cube::parse("-1-1").unwrap()];
        assert_eq!(expression(&cubes, &vars), "a c' + b d");
    }
}
