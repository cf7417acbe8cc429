//! Independent checkers, simpler than the algorithms they check, used by the tests and
//! available to downstream crates.

use crate::fundamental::collapse_chains;
use crate::ids::StateId;
use crate::reduce::Reduction;
use crate::table::FlowTable;

/// Checks that `classes` is a closed cover of `t` by output-compatible classes: every row
/// is in a class, no two rows of a class give `0` and `1` for one output in one column,
/// and for every class and column the next states of its members lie together in some
/// class.
///
/// # Errors
/// A message naming the first violation.
pub fn check_closed_cover(t: &FlowTable, classes: &[Vec<StateId>]) -> Result<(), String> {
    for s in t.states() {
        if !classes.iter().any(|c| c.contains(&s)) {
            return Err(format!("row {} is in no class", t.state_name(s)));
        }
    }
    for (i, c) in classes.iter().enumerate() {
        if c.is_empty() {
            return Err(format!("class {i} is empty"));
        }
        for &a in c {
            for &b in c {
                for col in t.columns() {
                    let (x, y) = (t.outputs(a, col), t.outputs(b, col));
                    if x.iter().zip(y).any(|(p, q)| p.conflicts(*q)) {
                        return Err(format!(
                            "class {i}: rows {} and {} disagree on an output in column {}",
                            t.state_name(a),
                            t.state_name(b),
                            t.column_label(col)
                        ));
                    }
                }
            }
        }
        for col in t.columns() {
            let implied: Vec<StateId> = c.iter().filter_map(|&s| t.next(s, col)).collect();
            if !classes
                .iter()
                .any(|d| implied.iter().all(|x| d.contains(x)))
            {
                return Err(format!(
                    "class {i}: its next states in column {} lie in no one class",
                    t.column_label(col)
                ));
            }
        }
    }
    Ok(())
}

/// Checks a [`Reduction`] of `original`: no more rows; the reduced table is normal; every
/// original row is in the class `class_of` names; and every class reproduces every
/// specified behaviour of each member (of the chain-collapsed original): each specified
/// output bit, and each specified next state lies in the class the new row goes to.
///
/// # Errors
/// A message naming the first violation.
pub fn check_reduction(original: &FlowTable, r: &Reduction) -> Result<(), String> {
    let t = collapse_chains(original).map_err(|e| e.to_string())?;
    let u = &r.table;
    if u.num_states() > t.num_states() {
        return Err("the reduction has more rows than the original".into());
    }
    if u.num_states() != r.classes.len() {
        return Err("one class per new row expected".into());
    }
    if !u.is_normal() {
        return Err("the reduced table is not normal".into());
    }
    if u.num_columns() != t.num_columns()
        || u.input_names() != t.input_names()
        || u.output_names() != t.output_names()
    {
        return Err("the reduced table has other inputs, outputs or columns".into());
    }
    for s in t.states() {
        let c = r.class_of[s.index()];
        if !r.classes[c.index()].contains(&s) {
            return Err(format!(
                "class_of sends {} to a class without it",
                t.state_name(s)
            ));
        }
    }
    for (i, members) in r.classes.iter().enumerate() {
        let row = StateId::from_index(i);
        for &s in members {
            for col in t.columns() {
                let (a, b) = (t.outputs(s, col), u.outputs(row, col));
                for (j, (x, y)) in a.iter().zip(b).enumerate() {
                    if *x != crate::OutBit::Free && x != y {
                        return Err(format!(
                            "row {} loses output {} of {} in column {}",
                            u.state_name(row),
                            t.output_names()[j],
                            t.state_name(s),
                            t.column_label(col)
                        ));
                    }
                }
                if let Some(n) = t.next(s, col) {
                    match u.next(row, col) {
                        Some(d) if r.classes[d.index()].contains(&n) => {}
                        _ => {
                            return Err(format!(
                                "row {} in column {} does not lead to a class holding {} (the next state of {})",
                                u.state_name(row),
                                t.column_label(col),
                                t.state_name(n),
                                t.state_name(s)
                            ))
                        }
                    }
                }
            }
        }
    }
    if let Some(rs) = t.reset() {
        match u.reset() {
            Some(x) if r.classes[x.index()].contains(&rs) => {}
            _ => return Err("the reset state is not carried over".into()),
        }
    }
    Ok(())
}
