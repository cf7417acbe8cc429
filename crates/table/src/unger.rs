//! Essential hazards by Unger's one-versus-three-changes test (S. H. Unger, "Hazards and
//! delays in asynchronous sequential switching circuits", IRE Trans. Circuit Theory
//! CT-6(1), 1959; also his 1969 book *Asynchronous Sequential Switching Circuits*).
//!
//! From a stable total state `(s, x)` change input `x_i` once (column `x'`): the machine
//! settles in `s1`. Had the change reached part of the circuit three times (`x'`, back to
//! `x`, `x'` again), it would settle in `s3`. If `s3 != s1` the table has an essential
//! hazard for `(s, x, x_i)`: no choice of logic removes it; delays in the feedback paths
//! do. Exact test of the flow table; cases where any of the three settlings is
//! unspecified, dangles or oscillates are not decided and not reported.

use crate::fundamental::Settling;
use crate::ids::{ColumnId, InputId, StateId};
use crate::table::FlowTable;

/// An essential hazard: changing `input` from the stable `state` in `column`.
#[derive(Copy, Clone, Debug, PartialEq, Eq, PartialOrd, Ord)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct EssentialHazard {
    /// The stable row before the change.
    pub state: StateId,
    /// The column before the change.
    pub column: ColumnId,
    /// The input that changes.
    pub input: InputId,
    /// Where one change settles (`s1`).
    pub once: StateId,
    /// Where three changes settle (`s3`).
    pub thrice: StateId,
}

/// Every essential hazard of the table, sorted by state, column, input.
///
/// # Complexity
/// O(rows x columns x inputs) after one settling pass.
///
/// # Example
/// ```
/// use stillpoint_table::{essential_hazards, parse_text};
/// // from (a, 0) a change of x leads to b; back to 0 leads to c; again to 1 stays in c
/// let t = parse_text("inputs x\n   0    1\na  (a)  b\nb  c    (b)\nc  (c)  (c)\n")?;
/// let h = essential_hazards(&t);
/// assert_eq!(h.len(), 1);
/// assert_eq!(t.state_name(h[0].state), "a");
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn essential_hazards(t: &FlowTable) -> Vec<EssentialHazard> {
    let st = Settling::of(t);
    let n = t.num_inputs();
    let mut out = Vec::new();
    for s in t.states() {
        for x in t.columns() {
            if !t.is_stable(s, x) {
                continue;
            }
            for i in 0..n {
                let v = t.column_value(x) ^ (1u32 << (n - 1 - i));
                let Some(x2) = t.column_by_value(v) else {
                    continue;
                };
                let Some(s1) = st.stable(s, x2) else { continue };
                let Some(s2) = st.stable(s1, x) else { continue };
                let Some(s3) = st.stable(s2, x2) else {
                    continue;
                };
                if s3 != s1 {
                    out.push(EssentialHazard {
                        state: s,
                        column: x,
                        input: InputId::from_index(i),
                        once: s1,
                        thrice: s3,
                    });
                }
            }
        }
    }
    out.sort();
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::parse_text;

    #[test]
    fn check_eh_1() {
        // CHECK EH-1 (methods.md §6): table read from S. H. Unger, Columbia CS E6831 04f
        // HW 9, problem NT1 (www.cs.columbia.edu/~unger/cs6831/04f/hwk9Prob.html); the
        // answer is [computed] in the brief: exactly (1, 11, A) with s1=2, s3=4 and
        // (4, 10, A) with s1=3, s3=1.
        let t = parse_text(
            "inputs A B\noutputs z\n\
             \x20   00      01      11      10\n\
             r1  (r1)/0  r2/0    (r1)/0  (r1)/1\n\
             r2  (r2)/1  (r2)/0  r4/0    r1/1\n\
             r3  (r3)/1  (r3)/0  r4/0    r1/1\n\
             r4  r3/1    (r4)/1  (r4)/0  (r4)/1\n",
        )
        .unwrap();
        let h = essential_hazards(&t);
        let got: Vec<(&str, &str, &str, &str, &str)> = h
            .iter()
            .map(|e| {
                (
                    t.state_name(e.state),
                    t.column_label(e.column),
                    t.input_names()[e.input.index()].as_str(),
                    t.state_name(e.once),
                    t.state_name(e.thrice),
                )
            })
            .collect();
        assert_eq!(
            got,
            vec![("r1", "11", "A", "r2", "r4"), ("r4", "10", "A", "r3", "r1")]
        );
    }
}
