//! Build a flow table in code, synthesise it, and drive the verified gate network step by
//! step with the ternary simulator, as a Rust test bench would.
//!
//! The table is our own: a two-button "press both" detector. `left` and `right` are two
//! push buttons; `both` rises when the second button joins the first, and stays up until
//! either is released. Pressing them in either order works; releasing one and pressing it
//! again while the other is held raises `both` again.
//!
//! Run with `cargo run --example stepper`.

use stillpoint::sim::{Simulator, Ternary};
use stillpoint::synth::{synthesize, Design, SynthConfig};
use stillpoint::table::{FlowTable, FlowTableBuilder};

/// The table, entry by entry. Columns are `left right`.
pub fn press_both() -> FlowTable {
    let mut b = FlowTableBuilder::new(["left", "right"], ["both"]);
    b.name("press_both").reset("none");
    for c in ["00", "10", "11", "01"] {
        b.column(c);
    }
    b.entry("none", "00", Some("none"), "0")
        .entry("none", "10", Some("left"), "0")
        .entry("none", "01", Some("right"), "0")
        .entry("left", "10", Some("left"), "0")
        .entry("left", "00", Some("none"), "0")
        .entry("left", "11", Some("on"), "-")
        .entry("right", "01", Some("right"), "0")
        .entry("right", "00", Some("none"), "0")
        .entry("right", "11", Some("on"), "-")
        .entry("on", "11", Some("on"), "1")
        .entry("on", "10", Some("left"), "-")
        .entry("on", "01", Some("right"), "-");
    b.build().expect("the table is well formed")
}

/// Drives the design through a press sequence and returns the output after each step.
pub fn drive(d: &Design, steps: &[[bool; 2]]) -> Vec<Ternary> {
    let net = &d.network;
    let mut sim = Simulator::new(net);
    // Start in the reset state with both buttons up.
    let reset = d.table.reset().expect("a reset state");
    let code = d.assignment.codes.code(reset);
    let k = d.assignment.codes.width();
    let bits: Vec<bool> = (0..k).map(|i| (code >> (k - 1 - i)) & 1 == 1).collect();
    sim.init(&[false, false], &bits);
    assert!(sim.is_stable());
    let mut seen = Vec::new();
    for step in steps {
        let r = sim.set_inputs(step);
        assert!(r.settled(), "the circuit settles after every change");
        seen.push(sim.outputs()[0]);
    }
    seen
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let t = press_both();
    let d = synthesize(&t, &SynthConfig::default())?;
    println!(
        "{} rows coded with {} variable(s); verified: {}",
        d.table.num_states(),
        d.assignment.codes.width(),
        d.verification.ok
    );
    for oc in &d.solution.outputs {
        let n = d.encoding.support.len();
        let cubes: Vec<String> = oc.cubes.iter().map(|c| c.to_string(n)).collect();
        println!("{} = {}", oc.name, cubes.join(" + "));
    }
    let steps = [
        [true, false],
        [true, true],
        [false, true],
        [true, true],
        [false, false],
    ];
    for (s, v) in steps.iter().zip(drive(&d, &steps)) {
        println!("left={} right={} -> both={v}", s[0] as u8, s[1] as u8);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_detector_rises_only_with_both_buttons() {
        let d = synthesize(&press_both(), &SynthConfig::default()).unwrap();
        assert!(d.verification.ok);
        let steps = [
            [true, false],
            [true, true],
            [false, true],
            [true, true],
            [false, false],
        ];
        use Ternary::{One, Zero};
        assert_eq!(drive(&d, &steps), vec![Zero, One, Zero, One, Zero]);
    }
}
