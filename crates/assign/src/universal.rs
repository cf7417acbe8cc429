//! Universal single-transition-time codes: race-free for every normal table on `n`
//! states, whatever its columns.
//!
//! A unicode code is universal exactly when every two disjoint pairs of states are
//! separated by some variable (and a pair from a single state, and two single states),
//! methods.md §5.2; [`separation::is_universal`](crate::separation::is_universal) checks it.
//!
//! - [`liu`]: C. N. Liu, "A state variable assignment method for asynchronous sequential
//!   switching circuits", J. ACM 10(2), 1963: `2^S0 - 1` variables, `S0 = ceil(log2 n)`.
//!   Each state gets the `S0`-bit index `v(s)` = its row number; one variable per non-zero
//!   linear form `w`: `y_w(s) = <w, v(s)> mod 2`. Variable `y_j` (1-based) is the form
//!   `w = j`. The construction is recalled (methods.md §5.1, the count was read);
//!   universality is proven there and tested here for n = 2..32.
//! - [`pruned_linear`]: **our own construction, not verified to be Tan's.** The universal
//!   assignment of C. J. Tan (IEEE Trans. Computers C-20(4), 1971) could not be read
//!   while this was written (only a summary: its procedure builds a Liu assignment first
//!   and then refines it, aiming at few gate inputs), so the `tan` method slot runs this
//!   instead, which follows that outline with a refinement rule of our own: start from Liu's
//!   linear forms and delete forms, last first, as long as every split of states (pair
//!   from pair, pair from single, single from single) is still separated by a kept form.
//!   Universality is proven by construction (a form is deleted only after an exhaustive
//!   check that every split it separates is also separated by another kept form) and
//!   re-checked by the tests. It never uses more variables than Liu and uses fewer for
//!   many `n` (e.g. 14 instead of 15 for 16 states: in `F_2^4` the forms separating a
//!   given split are two, so any single form may go). Cost `O(n^4 2^S0)`; `n <= 64`.

use crate::tracey::log2_bound;
use crate::AssignError;

/// The most states the universal constructions accept (Liu's width `2^S0 - 1` must fit
/// in 64 bits).
pub const MAX_UNIVERSAL_STATES: usize = 64;

fn check(n: usize) -> Result<(), AssignError> {
    if n > MAX_UNIVERSAL_STATES {
        Err(AssignError::TooManyStates {
            states: n,
            max: MAX_UNIVERSAL_STATES,
        })
    } else {
        Ok(())
    }
}

/// Liu's forms for `n` states: `w = 1 ..= 2^S0 - 1`.
fn liu_forms(n: usize) -> Vec<u64> {
    let s0 = if n <= 1 { 1 } else { log2_bound(n) };
    (1..(1u64 << s0)).collect()
}

/// Codes from linear forms: variable `j` (0 = `y1`, the most significant bit) is
/// `forms[j]`.
fn codes_of(n: usize, forms: &[u64]) -> Vec<u64> {
    let k = forms.len();
    (0..n as u64)
        .map(|v| {
            forms.iter().enumerate().fold(0u64, |acc, (j, &w)| {
                acc | (u64::from((w & v).count_ones() % 2 == 1) << (k - 1 - j))
            })
        })
        .collect()
}

/// Liu's universal code for `n` states: `(width, codes)`.
///
/// # Errors
/// [`AssignError::TooManyStates`] beyond [`MAX_UNIVERSAL_STATES`].
pub fn liu(n: usize) -> Result<(usize, Vec<u64>), AssignError> {
    check(n)?;
    let forms = liu_forms(n);
    Ok((forms.len(), codes_of(n, &forms)))
}

/// Every split of `n` states that a universal code must separate, as `(side A, side B)`
/// bitsets over `u64`: pair/pair, pair/single, single/single.
fn splits(n: usize) -> Vec<(u64, u64)> {
    let mut v = Vec::new();
    let b = |i: usize| 1u64 << i;
    for a1 in 0..n {
        for a2 in a1..n {
            let a = b(a1) | b(a2);
            // side B holds no state below a1, so each unordered split appears once.
            for c1 in a1 + 1..n {
                if c1 == a2 {
                    continue;
                }
                for c2 in c1..n {
                    if c2 == a2 {
                        continue;
                    }
                    v.push((a, b(c1) | b(c2)));
                }
            }
        }
    }
    v
}

/// Our pruned linear universal code (see the module doc): `(width, codes)`.
///
/// # Errors
/// [`AssignError::TooManyStates`] beyond [`MAX_UNIVERSAL_STATES`].
pub fn pruned_linear(n: usize) -> Result<(usize, Vec<u64>), AssignError> {
    check(n)?;
    let forms = liu_forms(n);
    if n <= 2 {
        return Ok((forms.len(), codes_of(n, &forms)));
    }
    let sp = splits(n);
    // For each form, the value of each state.
    let val: Vec<u64> = forms
        .iter()
        .map(|&w| {
            (0..n).fold(0u64, |acc, s| {
                acc | (u64::from((w & s as u64).count_ones() % 2 == 1) << s)
            })
        })
        .collect();
    let separates = |f: usize, (a, b): (u64, u64)| {
        let va = val[f] & a;
        let vb = val[f] & b;
        (va == 0 && vb == b) || (va == a && vb == 0)
    };
    let mut count: Vec<u8> = sp
        .iter()
        .map(|&x| {
            (0..forms.len())
                .filter(|&f| separates(f, x))
                .count()
                .min(255) as u8
        })
        .collect();
    let mut kept = vec![true; forms.len()];
    for f in (0..forms.len()).rev() {
        let ok = sp
            .iter()
            .zip(&count)
            .all(|(&x, &c)| !separates(f, x) || c >= 2);
        if ok {
            kept[f] = false;
            for (x, c) in sp.iter().zip(count.iter_mut()) {
                if separates(f, *x) {
                    *c -= 1;
                }
            }
        }
    }
    let forms: Vec<u64> = forms
        .iter()
        .zip(&kept)
        .filter(|(_, &k)| k)
        .map(|(&w, _)| w)
        .collect();
    Ok((forms.len(), codes_of(n, &forms)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::separation::is_universal;

    #[test]
    fn liu_width_formula() {
        // Liu's bound 2^S0 - 1, S0 = ceil(log2 n): read in the abstract of Friedman,
        // Graham & Ullman, IEEE Trans. Computers 1969 (methods.md §5.1).
        for (n, w) in [
            (2, 1),
            (3, 3),
            (4, 3),
            (5, 7),
            (8, 7),
            (9, 15),
            (16, 15),
            (17, 31),
            (32, 31),
        ] {
            assert_eq!(liu(n).unwrap().0, w, "n = {n}");
        }
    }

    #[test]
    fn both_universal_2_to_32() {
        for n in 2..=32 {
            let (_, l) = liu(n).unwrap();
            assert!(is_universal(&l), "liu n={n}");
            let (w, t) = pruned_linear(n).unwrap();
            assert!(is_universal(&t), "pruned n={n}");
            assert!(w <= liu(n).unwrap().0);
        }
    }
}
