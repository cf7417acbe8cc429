//! Eichelberger's ternary simulation of gate networks with feedback.
//!
//! Reference: E. B. Eichelberger, "Hazard detection in combinational and sequential
//! switching circuits", IBM J. Research and Development 9(2), 1965 (procedures A and B);
//! J. A. Brzozowski and C.-J. H. Seger, *Asynchronous Circuits*, Springer 1995 (ternary
//! simulation agrees with the general multiple-winner race analysis under unbounded gate
//! delays, for circuits started in a stable state).
//!
//! Values are `0`, `1` and `X` (unknown or changing), with Kleene's strong logic: a gate
//! gives `b` when every binary resolution of its `X` inputs gives `b`, else `X`.
//! **Procedure A** raises the changing inputs to `X` and iterates `v := v ⊔ f(v)` to a
//! fixpoint (values only move from binary to `X`); **procedure B** then sets the inputs to
//! their new values and iterates `v := f(v)` (values only move from `X` to binary). A net
//! that is `X` after B may end in either value or oscillate; a net whose value before and
//! after is the same binary value but which was `X` after A has a static hazard.
//!
//! [`Simulator`] is the step-by-step API for library users and test benches;
//! [`check_transition`] is the verifier the synthesiser runs on every total-state
//! transition, in one of two [`DelayModel`]s.
//!
//! # Example
//! Drive a set-dominant latch `Y1 = s + y1 r'` step by step:
//! ```
//! use stillpoint::network::{Literal, Network};
//! use stillpoint::sim::{Simulator, Ternary};
//! let lit = |var, positive| Literal { var, positive };
//! let inputs = vec!["s".to_string(), "r".to_string()];
//! let y1 = vec![vec![lit(0, true)], vec![lit(2, true), lit(1, false)]];
//! let net = Network::from_sop(&inputs, &[y1], &[("q".to_string(), vec![vec![lit(2, true)]])])?;
//! let mut sim = Simulator::new(&net);
//! sim.init(&[false, false], &[false]);      // s=0 r=0, state y1=0
//! assert!(sim.is_stable());
//! let step = sim.set_inputs(&[true, false]); // s rises
//! assert!(step.settled());
//! assert_eq!(sim.state(), vec![Ternary::One]);
//! assert_eq!(sim.outputs(), vec![Ternary::One]);
//! sim.set_inputs(&[false, false]);           // s falls: the latch holds
//! assert_eq!(sim.state(), vec![Ternary::One]);
//! sim.set_inputs(&[false, true]);            // r rises: reset
//! assert_eq!(sim.state(), vec![Ternary::Zero]);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use crate::network::{GateKind, NetId, Network};
use serde::Serialize;
use std::fmt;

/// A ternary value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
pub enum Ternary {
    /// Logic 0.
    Zero,
    /// Logic 1.
    One,
    /// Unknown or changing.
    X,
}

impl Ternary {
    /// `0` or `1`.
    pub fn from_bool(b: bool) -> Self {
        if b {
            Ternary::One
        } else {
            Ternary::Zero
        }
    }

    /// The binary value, or `None` for `X`.
    pub fn to_bool(self) -> Option<bool> {
        match self {
            Ternary::Zero => Some(false),
            Ternary::One => Some(true),
            Ternary::X => None,
        }
    }

    /// Least upper bound in the information order (`0 ⊔ 1 = X`).
    pub fn lub(self, other: Ternary) -> Ternary {
        if self == other {
            self
        } else {
            Ternary::X
        }
    }

    /// Whether the value is `X`.
    pub fn is_x(self) -> bool {
        self == Ternary::X
    }

    fn not(self) -> Ternary {
        match self {
            Ternary::Zero => Ternary::One,
            Ternary::One => Ternary::Zero,
            Ternary::X => Ternary::X,
        }
    }
}

impl fmt::Display for Ternary {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Ternary::Zero => "0",
            Ternary::One => "1",
            Ternary::X => "X",
        })
    }
}

/// Whether the feedback nets `y_i` follow their excitations.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Feedback {
    /// The feedback nets keep their values (the feedback delay has not yet expired).
    Held,
    /// Each feedback net follows its excitation.
    Released,
}

/// What one call of [`Simulator::set_inputs`] found.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Settle {
    /// Nets with the same binary value before and after that were `X` after procedure A:
    /// static hazards.
    pub hazards: Vec<NetId>,
    /// Nets still `X` after procedure B: they may settle either way, or oscillate.
    pub unsettled: Vec<NetId>,
    /// Whether both procedures reached a fixpoint within the round limit (always true for
    /// procedure A; B can only fail to converge when started from a state that was not a
    /// fixpoint of A).
    pub converged: bool,
}

impl Settle {
    /// Whether every net ended binary.
    pub fn settled(&self) -> bool {
        self.unsettled.is_empty() && self.converged
    }
}

/// A ternary simulator over a borrowed [`Network`]. See the [module doc](self).
#[derive(Debug, Clone)]
pub struct Simulator<'n> {
    net: &'n Network,
    values: Vec<Ternary>,
    feedback: Feedback,
}

impl<'n> Simulator<'n> {
    /// A simulator with every net at `X` and the feedback released.
    pub fn new(net: &'n Network) -> Self {
        Simulator {
            net,
            values: vec![Ternary::X; net.num_nets()],
            feedback: Feedback::Released,
        }
    }

    /// The network simulated.
    pub fn network(&self) -> &'n Network {
        self.net
    }

    /// Puts the circuit in a total state: primary inputs and feedback nets as given, every
    /// gate evaluated from them (with the feedback held). Check [`is_stable`](Self::is_stable)
    /// afterwards.
    ///
    /// # Panics
    /// If the slices are not as long as the network's inputs and state variables.
    pub fn init(&mut self, inputs: &[bool], state: &[bool]) {
        assert_eq!(inputs.len(), self.net.inputs().len(), "one value per input");
        assert_eq!(
            state.len(),
            self.net.states().len(),
            "one value per state variable"
        );
        self.values.fill(Ternary::X);
        for (n, &v) in self.net.inputs().iter().zip(inputs) {
            self.values[n.index()] = Ternary::from_bool(v);
        }
        for (s, &v) in self.net.states().iter().zip(state) {
            self.values[s.net.index()] = Ternary::from_bool(v);
        }
        let keep = self.feedback;
        self.feedback = Feedback::Held;
        self.run(false);
        self.feedback = keep;
    }

    /// Sets whether the feedback nets follow their excitations in the procedures below.
    pub fn set_feedback(&mut self, feedback: Feedback) {
        self.feedback = feedback;
    }

    /// Procedure A: every input whose new value differs from its present one goes to `X`
    /// (`X` stays `X`), then `v := v ⊔ f(v)` to a fixpoint. Returns the number of rounds.
    ///
    /// # Panics
    /// If `inputs` is not one value per primary input.
    pub fn procedure_a(&mut self, inputs: &[Ternary]) -> usize {
        assert_eq!(inputs.len(), self.net.inputs().len(), "one value per input");
        for (n, &v) in self.net.inputs().iter().zip(inputs) {
            let old = self.values[n.index()];
            self.values[n.index()] = old.lub(v);
        }
        self.run(true).0
    }

    /// Procedure B: inputs set to `inputs`, then `v := f(v)` to a fixpoint. Returns whether
    /// a fixpoint was reached within the round limit (one more round than there are nets).
    ///
    /// # Panics
    /// If `inputs` is not one value per primary input.
    pub fn procedure_b(&mut self, inputs: &[Ternary]) -> bool {
        assert_eq!(inputs.len(), self.net.inputs().len(), "one value per input");
        for (n, &v) in self.net.inputs().iter().zip(inputs) {
            self.values[n.index()] = v;
        }
        self.run(false).1
    }

    /// Applies new binary input values: procedure A, then B, with the present feedback
    /// setting (released unless [`set_feedback`](Self::set_feedback) said otherwise).
    ///
    /// # Panics
    /// If `inputs` is not one value per primary input.
    pub fn set_inputs(&mut self, inputs: &[bool]) -> Settle {
        let before = self.values.clone();
        let new: Vec<Ternary> = inputs.iter().map(|&b| Ternary::from_bool(b)).collect();
        self.procedure_a(&new);
        let after_a = self.values.clone();
        let converged = self.procedure_b(&new);
        let mut settle = Settle {
            converged,
            ..Settle::default()
        };
        for i in 0..self.values.len() {
            let id = NetId::from_index(i);
            if self.values[i].is_x() {
                settle.unsettled.push(id);
            } else if before[i] == self.values[i] && after_a[i].is_x() {
                settle.hazards.push(id);
            }
        }
        settle
    }

    /// The value of one net.
    pub fn value(&self, net: NetId) -> Ternary {
        self.values[net.index()]
    }

    /// Every net's value, by net index.
    pub fn values(&self) -> &[Ternary] {
        &self.values
    }

    /// The feedback nets `y1..yk`.
    pub fn state(&self) -> Vec<Ternary> {
        self.net
            .states()
            .iter()
            .map(|s| self.values[s.net.index()])
            .collect()
    }

    /// The excitations `Y1..Yk`.
    pub fn excitation(&self) -> Vec<Ternary> {
        self.net
            .states()
            .iter()
            .map(|s| self.values[s.excitation.index()])
            .collect()
    }

    /// The primary outputs, in port order.
    pub fn outputs(&self) -> Vec<Ternary> {
        self.net
            .outputs()
            .iter()
            .map(|(_, n)| self.values[n.index()])
            .collect()
    }

    /// Whether every net is binary and every excitation equals its feedback net.
    pub fn is_stable(&self) -> bool {
        self.values.iter().all(|v| !v.is_x())
            && self
                .net
                .states()
                .iter()
                .all(|s| self.values[s.net.index()] == self.values[s.excitation.index()])
    }

    fn eval(&self, kind: GateKind, inputs: &[NetId]) -> Ternary {
        let vals = inputs.iter().map(|i| self.values[i.index()]);
        match kind {
            GateKind::And | GateKind::Nand => {
                let mut r = Ternary::One;
                for v in vals {
                    match v {
                        Ternary::Zero => {
                            r = Ternary::Zero;
                            break;
                        }
                        Ternary::X => r = Ternary::X,
                        Ternary::One => {}
                    }
                }
                if kind == GateKind::Nand {
                    r.not()
                } else {
                    r
                }
            }
            GateKind::Or | GateKind::Nor => {
                let mut r = Ternary::Zero;
                for v in vals {
                    match v {
                        Ternary::One => {
                            r = Ternary::One;
                            break;
                        }
                        Ternary::X => r = Ternary::X,
                        Ternary::Zero => {}
                    }
                }
                if kind == GateKind::Nor {
                    r.not()
                } else {
                    r
                }
            }
            GateKind::Not => self.values[inputs[0].index()].not(),
            GateKind::Buf => self.values[inputs[0].index()],
            GateKind::Const0 => Ternary::Zero,
            GateKind::Const1 => Ternary::One,
        }
    }

    /// Iterates to a fixpoint; `raise` selects procedure A's `v := v ⊔ f(v)`.
    /// Returns (rounds, converged).
    fn run(&mut self, raise: bool) -> (usize, bool) {
        let limit = self.net.num_nets() + 2;
        for round in 1..=limit {
            let mut changed = false;
            if self.feedback == Feedback::Released {
                for s in self.net.states() {
                    let e = self.values[s.excitation.index()];
                    let old = self.values[s.net.index()];
                    let new = if raise { old.lub(e) } else { e };
                    if new != old {
                        self.values[s.net.index()] = new;
                        changed = true;
                    }
                }
            }
            for g in self.net.eval_order() {
                let old = self.values[g.output().index()];
                let mut new = self.eval(g.kind(), g.inputs());
                if raise {
                    new = old.lub(new);
                }
                if new != old {
                    self.values[g.output().index()] = new;
                    changed = true;
                }
            }
            if !changed {
                return (round, true);
            }
        }
        (limit, false)
    }
}

/// The delay model of a verification run.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum DelayModel {
    /// Fundamental-mode practice: an input change reaches the whole logic before the state
    /// variables respond (feedback delay), then the state variables race with arbitrary
    /// gate delays. Phase 1: changing inputs at `X`, feedback held, A then B with the new
    /// inputs; phase 2: feedback released, A then B.
    #[default]
    FeedbackDelay,
    /// Unbounded input-wire delay (`--strict`): the changing inputs stay `X` while the
    /// state moves (phase 1 A with feedback held, phase 2 A with feedback released), and
    /// only then take their new values (B). Exposes essential hazards.
    Unbounded,
}

impl DelayModel {
    /// One sentence for reports.
    pub fn describe(self) -> &'static str {
        match self {
            DelayModel::FeedbackDelay => {
                "fundamental mode with feedback delay: an input change reaches the whole logic \
                 before the state variables respond; the state variables then race with \
                 arbitrary gate delays"
            }
            DelayModel::Unbounded => {
                "unbounded delays on the input wires: the changing inputs are unknown while the \
                 state variables race (this also exposes essential hazards)"
            }
        }
    }
}

/// One total-state transition to verify: from the stable total state
/// (`from_inputs`, `start`) the inputs change to `to_inputs`; the circuit must settle in
/// `dest` with outputs `outputs_after` (`None` = unspecified).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TransitionCheck {
    /// The input values before the change.
    pub from_inputs: Vec<bool>,
    /// The input values after the change.
    pub to_inputs: Vec<bool>,
    /// The state code before (`y1` first).
    pub start: Vec<bool>,
    /// The state code the circuit must settle in.
    pub dest: Vec<bool>,
    /// The specified outputs of the stable start state.
    pub outputs_before: Vec<Option<bool>>,
    /// The specified outputs of the stable destination state.
    pub outputs_after: Vec<Option<bool>>,
    /// The specified outputs right after the input change, with the state not yet moved
    /// (the unstable entry's own outputs). An output specified equal before and after but
    /// different here is a pulse the table asks for, and is not checked for hazards; an
    /// output unspecified here (while `outputs_mid` is not empty) is not checked for
    /// hazards either. Empty: not given (every output is checked).
    pub outputs_mid: Vec<Option<bool>>,
}

/// The step of a verification run in which a problem showed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Phase {
    /// The start state, before any change.
    Start,
    /// Inputs changing, feedback held.
    Inputs,
    /// Feedback released, the state variables moving.
    State,
    /// After everything settled.
    End,
}

/// What went wrong with one signal.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum ProblemKind {
    /// The start total state is not stable, or its outputs differ from the table.
    NotStable,
    /// A signal whose value is the same before and after went to `X`.
    StaticHazard,
    /// A signal was still `X` after procedure B.
    Unsettled,
    /// A state variable or output settled to the wrong binary value.
    WrongValue {
        /// The value expected.
        expected: bool,
    },
    /// An output that must keep its value takes the other value between the two steps.
    Glitch,
}

/// One verification failure: the signal, the phase, what happened.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Problem {
    /// The net name (`y1`, `Y1` for an excitation, or an output name).
    pub signal: String,
    /// When it showed.
    pub phase: Phase,
    /// What happened.
    #[serde(flatten)]
    pub kind: ProblemKind,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let phase = match self.phase {
            Phase::Start => "in the start state",
            Phase::Inputs => "while the inputs change",
            Phase::State => "while the state variables move",
            Phase::End => "after settling",
        };
        match &self.kind {
            ProblemKind::NotStable => write!(f, "`{}` is not stable {phase}", self.signal),
            ProblemKind::StaticHazard => {
                write!(
                    f,
                    "`{}` has a static hazard (goes to X) {phase}",
                    self.signal
                )
            }
            ProblemKind::Unsettled => write!(f, "`{}` is left at X {phase}", self.signal),
            ProblemKind::WrongValue { expected } => {
                write!(
                    f,
                    "`{}` settles to {} instead of {}",
                    self.signal, !*expected as u8, *expected as u8
                )
            }
            ProblemKind::Glitch => {
                write!(
                    f,
                    "`{}` must keep its value but takes the other one {phase}",
                    self.signal
                )
            }
        }
    }
}

/// Binary evaluation of the logic at one total state (feedback held).
fn binary_at(sim: &mut Simulator<'_>, inputs: &[bool], state: &[bool]) -> Vec<Ternary> {
    sim.init(inputs, state);
    sim.values().to_vec()
}

/// Verifies one total-state transition by ternary simulation in the given delay model.
/// Returns every problem found (empty: the transition is verified).
///
/// Checks: the start is stable with its specified outputs; each excitation and output
/// whose binary value is the same before and after the input change never goes to `X`
/// while the inputs change; after the feedback is released the state variables settle to
/// `dest` and the outputs to `outputs_after`; an output specified equal before and after
/// never goes to `X` and never takes the other value; an output that changes goes to `X`
/// in at most one of the two steps.
///
/// # Panics
/// If the vectors do not match the network's inputs, state variables and outputs.
pub fn check_transition(net: &Network, t: &TransitionCheck, model: DelayModel) -> Vec<Problem> {
    let mut problems = Vec::new();
    let mut sim = Simulator::new(net);
    let b1 = binary_at(&mut sim, &t.to_inputs, &t.start);
    let b0 = binary_at(&mut sim, &t.from_inputs, &t.start);
    // The start must be stable with the table's outputs.
    if !sim.is_stable() {
        for s in net.states() {
            if sim.value(s.excitation) != sim.value(s.net) {
                problems.push(Problem {
                    signal: net.net_name(s.net).to_string(),
                    phase: Phase::Start,
                    kind: ProblemKind::NotStable,
                });
            }
        }
    }
    for ((_, n), want) in net.outputs().iter().zip(&t.outputs_before) {
        if let Some(w) = want {
            if sim.value(*n).to_bool() != Some(*w) {
                problems.push(Problem {
                    signal: net.net_name(*n).to_string(),
                    phase: Phase::Start,
                    kind: ProblemKind::NotStable,
                });
            }
        }
    }
    if !problems.is_empty() {
        return problems;
    }
    let new: Vec<Ternary> = t.to_inputs.iter().map(|&b| Ternary::from_bool(b)).collect();
    let changing: Vec<Ternary> = t
        .from_inputs
        .iter()
        .zip(&t.to_inputs)
        .map(|(&a, &b)| {
            if a == b {
                Ternary::from_bool(a)
            } else {
                Ternary::X
            }
        })
        .collect();
    // Snapshots: the step-1 values (inputs changing, feedback held) and step-2 values.
    sim.set_feedback(Feedback::Held);
    sim.procedure_a(&changing);
    let mut step1 = vec![sim.values().to_vec()];
    if model == DelayModel::FeedbackDelay {
        sim.procedure_b(&new);
        step1.push(sim.values().to_vec());
    }
    sim.set_feedback(Feedback::Released);
    let mut step2 = Vec::new();
    if model == DelayModel::FeedbackDelay {
        sim.procedure_a(&new);
    } else {
        sim.procedure_a(&changing);
    }
    step2.push(sim.values().to_vec());
    let converged = sim.procedure_b(&new);
    let end = sim.values().to_vec();
    let x_in = |snaps: &[Vec<Ternary>], n: NetId| snaps.iter().any(|s| s[n.index()].is_x());

    // Excitations: static across the input change means no X in step 1.
    for s in net.states() {
        let e = s.excitation;
        if b0[e.index()] == b1[e.index()] && x_in(&step1, e) {
            problems.push(Problem {
                signal: net.net_name(e).to_string(),
                phase: Phase::Inputs,
                kind: ProblemKind::StaticHazard,
            });
        }
    }
    // State variables settle to the destination.
    for (s, &want) in net.states().iter().zip(&t.dest) {
        let v = end[s.net.index()];
        let kind = match v.to_bool() {
            None => Some(ProblemKind::Unsettled),
            Some(b) if b != want => Some(ProblemKind::WrongValue { expected: want }),
            _ if !converged => Some(ProblemKind::Unsettled),
            _ => None,
        };
        if let Some(kind) = kind {
            problems.push(Problem {
                signal: net.net_name(s.net).to_string(),
                phase: Phase::End,
                kind,
            });
        }
    }
    // Outputs.
    for (j, (_, n)) in net.outputs().iter().enumerate() {
        let n = *n;
        let name = net.net_name(n).to_string();
        let before = t.outputs_before[j];
        let after = t.outputs_after[j];
        let push = |problems: &mut Vec<Problem>, phase, kind| {
            problems.push(Problem {
                signal: name.clone(),
                phase,
                kind,
            })
        };
        if let Some(a) = after {
            match end[n.index()].to_bool() {
                None => push(&mut problems, Phase::End, ProblemKind::Unsettled),
                Some(v) if v != a => push(
                    &mut problems,
                    Phase::End,
                    ProblemKind::WrongValue { expected: a },
                ),
                _ => {}
            }
        }
        let (Some(b), Some(a)) = (before, after) else {
            continue;
        };
        let mid = b1[n.index()].to_bool();
        let mid_spec = t.outputs_mid.get(j).copied().flatten();
        if (b == a && mid_spec == Some(!a)) || (!t.outputs_mid.is_empty() && mid_spec.is_none()) {
            // a pulse the table asks for, or an output left unspecified right after the
            // input change: only the end value is checked
            continue;
        }
        if b == a {
            if x_in(&step1, n) {
                push(&mut problems, Phase::Inputs, ProblemKind::StaticHazard);
            } else if x_in(&step2, n) {
                push(&mut problems, Phase::State, ProblemKind::StaticHazard);
            } else if mid != Some(a) {
                push(&mut problems, Phase::Inputs, ProblemKind::Glitch);
            }
        } else if mid == Some(b) {
            // keeps the old value while the inputs change, changes with the state
            if x_in(&step1, n) {
                push(&mut problems, Phase::Inputs, ProblemKind::StaticHazard);
            }
        } else if model == DelayModel::FeedbackDelay && x_in(&step2, n) {
            // changed with the inputs: must hold the new value while the state moves
            push(&mut problems, Phase::State, ProblemKind::StaticHazard);
        }
    }
    problems
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::{Literal, NetworkBuilder};
    use Ternary::{One, Zero, X};

    fn lit(var: usize, positive: bool) -> Literal {
        Literal { var, positive }
    }

    /// The cross-coupled NOR latch `Q = NOR(R, Qb)`, `Qb = NOR(S, Q)`; inputs (S, R).
    fn nor_latch() -> Network {
        let mut b = NetworkBuilder::new();
        let s = b.input("S").unwrap();
        let r = b.input("R").unwrap();
        let q = b.state("Q").unwrap();
        let qb = b.state("Qb").unwrap();
        let nq = b.gate(GateKind::Nor, &[r, qb], "nq").unwrap();
        let nqb = b.gate(GateKind::Nor, &[s, q], "nqb").unwrap();
        b.drive_state(q, nq).unwrap();
        b.drive_state(qb, nqb).unwrap();
        b.build().unwrap()
    }

    fn ab(v: &[bool]) -> Vec<Ternary> {
        v.iter().map(|&b| Ternary::from_bool(b)).collect()
    }

    // CHECK TS-1 (methods.md §8, [computed] by the brief's author; the latch is the
    // common textbook circuit, common practice, no source).
    #[test]
    fn ts1_nor_latch() {
        let net = nor_latch();
        let mut sim = Simulator::new(&net);
        // (a) from S=R=1 (Q=Qb=0) both inputs fall: A gives (X,X), B gives (X,X).
        sim.init(&[true, true], &[false, false]);
        assert!(sim.is_stable());
        sim.procedure_a(&ab(&[false, false]));
        assert_eq!(sim.state(), vec![X, X]);
        sim.procedure_b(&ab(&[false, false]));
        assert_eq!(sim.state(), vec![X, X]);
        // (b) from S=R=0, Q=0, Qb=1, S rises: A gives (X,X), B gives (1,0).
        sim.init(&[false, false], &[false, true]);
        assert!(sim.is_stable());
        sim.procedure_a(&ab(&[true, false]));
        assert_eq!(sim.state(), vec![X, X]);
        sim.procedure_b(&ab(&[true, false]));
        assert_eq!(sim.state(), vec![One, Zero]);
        // (c) from S=1,R=0 (Q=1,Qb=0) to S=0,R=1: B gives (0,1).
        sim.init(&[true, false], &[true, false]);
        assert!(sim.is_stable());
        let st = sim.set_inputs(&[false, true]);
        assert!(st.settled());
        assert_eq!(sim.state(), vec![Zero, One]);
    }

    // CHECK TS-2 = CHECK HAZ-1 (methods.md §7.2/§8; f = ab + a'c is the classic static-1
    // hazard example, [memory, high]; the ternary values are [computed] in the brief):
    // f(X,1,1) = X for the minimum cover, 1 once the consensus term bc is added.
    #[test]
    fn ts2_consensus_removes_the_static_hazard() {
        let inputs: Vec<String> = ["a", "b", "c"].iter().map(|s| s.to_string()).collect();
        let min = vec![
            vec![lit(0, true), lit(1, true)],
            vec![lit(0, false), lit(2, true)],
        ];
        let mut full = min.clone();
        full.push(vec![lit(1, true), lit(2, true)]);
        for (cover, want) in [(min, X), (full, One)] {
            let net = Network::from_sop(&inputs, &[], &[("f".into(), cover)]).unwrap();
            let mut sim = Simulator::new(&net);
            sim.init(&[false, true, true], &[]);
            assert_eq!(sim.outputs(), vec![One]);
            sim.procedure_a(&[X, One, One]);
            assert_eq!(sim.outputs(), vec![want]);
            sim.init(&[false, true, true], &[]);
            let st = sim.set_inputs(&[true, true, true]);
            assert_eq!(sim.outputs(), vec![One]);
            assert_eq!(st.hazards.contains(&net.outputs()[0].1), want == X);
        }
    }

    /// `Y1 = s + y1 r'`, `q = y1`; inputs (s, r).
    fn sr_latch(consensus: bool) -> Network {
        let inputs = vec!["s".to_string(), "r".to_string()];
        let mut y1 = vec![vec![lit(0, true)], vec![lit(2, true), lit(1, false)]];
        if consensus {
            y1.push(vec![lit(0, true), lit(1, false)]);
        }
        Network::from_sop(&inputs, &[y1], &[("q".into(), vec![vec![lit(2, true)]])]).unwrap()
    }

    #[test]
    fn transition_checks_on_a_latch() {
        let net = sr_latch(false);
        let set = TransitionCheck {
            from_inputs: vec![false, false],
            to_inputs: vec![true, false],
            start: vec![false],
            dest: vec![true],
            outputs_before: vec![Some(false)],
            outputs_after: vec![Some(true)],
            outputs_mid: vec![],
        };
        assert_eq!(
            check_transition(&net, &set, DelayModel::FeedbackDelay),
            vec![]
        );
        // A wrong destination is reported at the end.
        let mut wrong = set.clone();
        wrong.dest = vec![false];
        wrong.outputs_after = vec![Some(false)];
        let p = check_transition(&net, &wrong, DelayModel::FeedbackDelay);
        assert!(p.iter().any(|p| p.signal == "y1" && p.phase == Phase::End));
        // A start that is not stable is reported and nothing else.
        let mut unstable = set.clone();
        unstable.from_inputs = vec![true, false];
        let p = check_transition(&net, &unstable, DelayModel::FeedbackDelay);
        assert_eq!(p[0].kind, ProblemKind::NotStable);
    }

    // Y1 = s r' + y1 r holds y1 = 1 from (s, r) = (1, 0) to (1, 1) only through two
    // different products: a static-1 hazard on the change of r (methods.md §7.2).
    #[test]
    fn static_hazard_on_excitation_is_caught() {
        let inputs = vec!["s".to_string(), "r".to_string()];
        let y1 = vec![
            vec![lit(0, true), lit(1, false)],
            vec![lit(2, true), lit(1, true)],
        ];
        let net = Network::from_sop(&inputs, &[y1], &[]).unwrap();
        let t = TransitionCheck {
            from_inputs: vec![true, false],
            to_inputs: vec![true, true],
            start: vec![true],
            dest: vec![true],
            outputs_before: vec![],
            outputs_after: vec![],
            outputs_mid: vec![],
        };
        let p = check_transition(&net, &t, DelayModel::FeedbackDelay);
        assert!(p
            .iter()
            .any(|p| p.signal == "Y1" && p.kind == ProblemKind::StaticHazard));
        // With feedback released immediately (strict) the state itself is lost.
        let p = check_transition(&net, &t, DelayModel::Unbounded);
        assert!(p
            .iter()
            .any(|p| p.signal == "y1" && p.kind == ProblemKind::Unsettled));
    }
}
