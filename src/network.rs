//! Gate networks with feedback: the circuit the synthesiser emits and verifies.
//!
//! A [`Network`] is a set of nets, each driven by exactly one source: a primary input, a
//! gate, or (for a state variable) the feedback from its excitation. State variables are
//! modelled as a pair of nets: the *excitation* `Y_i`, a gate output, and the *feedback
//! net* `y_i` that the logic reads. In an ideal circuit `y_i` follows `Y_i` after the
//! feedback delay; the simulator ([`crate::sim`]) can hold the feedback nets (the
//! fundamental-mode assumption that an input change reaches the whole logic first) or
//! release them. In the Verilog netlist the two are one wire: the gate that computes `Y_i`
//! drives the net `y_i` directly.
//!
//! [`Network::from_sop`] builds the two-level AND-OR form from sum-of-products covers:
//! one inverter per variable that appears complemented, one AND gate per distinct product
//! of two or more literals (shared by every function that uses it), and one root gate per
//! function (an OR of its products, or a buffer when there is only one product or a
//! constant). [`NetworkBuilder`] builds any other network by hand (NOR latches and the
//! like), for tests and for library users who simulate their own circuits.

use std::collections::BTreeMap;
use std::fmt;

/// A net of a [`Network`], by index.
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize, serde::Deserialize,
)]
pub struct NetId(u32);

impl NetId {
    /// The 0-based index of the net.
    pub fn index(self) -> usize {
        self.0 as usize
    }

    /// The net with 0-based index `i`.
    ///
    /// # Panics
    /// If `i` does not fit in 32 bits.
    pub fn from_index(i: usize) -> Self {
        NetId(u32::try_from(i).expect("net index fits in 32 bits"))
    }
}

/// The function of a gate.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum GateKind {
    /// Conjunction of one or more inputs.
    And,
    /// Disjunction of one or more inputs.
    Or,
    /// Negated conjunction.
    Nand,
    /// Negated disjunction.
    Nor,
    /// Inverter (one input).
    Not,
    /// Buffer (one input).
    Buf,
    /// Constant 0 (no inputs).
    Const0,
    /// Constant 1 (no inputs).
    Const1,
}

impl GateKind {
    /// The IEEE 1364 gate primitive that realises this kind (`buf` for constants).
    pub fn primitive(self) -> &'static str {
        match self {
            GateKind::And => "and",
            GateKind::Or => "or",
            GateKind::Nand => "nand",
            GateKind::Nor => "nor",
            GateKind::Not => "not",
            GateKind::Buf | GateKind::Const0 | GateKind::Const1 => "buf",
        }
    }

    fn arity_ok(self, n: usize) -> bool {
        match self {
            GateKind::And | GateKind::Or | GateKind::Nand | GateKind::Nor => n >= 1,
            GateKind::Not | GateKind::Buf => n == 1,
            GateKind::Const0 | GateKind::Const1 => n == 0,
        }
    }
}

/// One gate: its kind, the nets it reads, the net it drives.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Gate {
    kind: GateKind,
    inputs: Vec<NetId>,
    output: NetId,
}

impl Gate {
    /// The gate's function.
    pub fn kind(&self) -> GateKind {
        self.kind
    }
    /// The nets it reads, in order.
    pub fn inputs(&self) -> &[NetId] {
        &self.inputs
    }
    /// The net it drives.
    pub fn output(&self) -> NetId {
        self.output
    }
}

/// What drives a net.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Driver {
    /// Primary input number `i` (0-based, in the order of [`Network::inputs`]).
    Input(usize),
    /// The feedback net of state variable number `i` (0-based: `y1` is 0).
    State(usize),
    /// Gate number `i` (0-based, in the order of [`Network::gates`]).
    Gate(usize),
}

/// A state variable: its feedback net `y_i` and the net computing its excitation `Y_i`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StateVar {
    /// The feedback net (`y1`, `y2`, ...), read by the logic.
    pub net: NetId,
    /// The excitation net (`Y1`, ...), a gate output.
    pub excitation: NetId,
}

/// A literal of a product: variable `var` of the support, true or complemented.
///
/// The support of [`Network::from_sop`] is the primary inputs in order, then the state
/// variables `y1..yk`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Literal {
    /// Index into the support.
    pub var: usize,
    /// `true` for the variable itself, `false` for its complement.
    pub positive: bool,
}

/// A product term: the conjunction of its literals (the empty product is constant 1).
pub type Product = Vec<Literal>;

/// Errors while building a network.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum NetworkError {
    /// A gate was given the wrong number of inputs.
    #[error("gate `{name}`: a {kind:?} gate cannot take {got} inputs")]
    Arity {
        /// The gate's output net name.
        name: String,
        /// Its kind.
        kind: GateKind,
        /// How many inputs it was given.
        got: usize,
    },
    /// A net name was used twice.
    #[error("net name `{0}` is used twice")]
    DuplicateName(String),
    /// A net id does not belong to this network.
    #[error("net {0} does not exist")]
    UnknownNet(usize),
    /// A state variable's feedback net was never connected to an excitation.
    #[error("state variable `{0}` has no excitation")]
    Undriven(String),
    /// A state variable was connected twice, or a net that is not a feedback net was
    /// connected.
    #[error("`{0}` is not an unconnected feedback net")]
    NotFeedback(String),
    /// A product names a support variable that does not exist.
    #[error("literal on support variable {var}, but the support has {len} variables")]
    BadLiteral {
        /// The variable index.
        var: usize,
        /// The support length.
        len: usize,
    },
}

#[derive(Debug, Clone, PartialEq, Eq)]
struct NetInfo {
    name: String,
    driver: Driver,
}

/// A gate network with feedback through state variables. See the [module doc](self).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Network {
    nets: Vec<NetInfo>,
    gates: Vec<Gate>,
    inputs: Vec<NetId>,
    states: Vec<StateVar>,
    outputs: Vec<(String, NetId)>,
    /// Gates in an evaluation order: topological with feedback nets cut; gates on
    /// combinational cycles (hand-built networks only) come last in index order.
    order: Vec<usize>,
    /// Per net, the gates that read it.
    fanout: Vec<Vec<usize>>,
}

/// Builds a [`Network`] gate by gate.
///
/// # Example
/// A set-reset latch from two NOR gates, with `q` and `qb` as the fed-back nets:
/// ```
/// use stillpoint::network::{GateKind, NetworkBuilder};
/// let mut b = NetworkBuilder::new();
/// let s = b.input("s")?;
/// let r = b.input("r")?;
/// let q = b.state("q")?;
/// let qb = b.state("qb")?;
/// let nq = b.gate(GateKind::Nor, &[r, qb], "nq")?;
/// let nqb = b.gate(GateKind::Nor, &[s, q], "nqb")?;
/// b.drive_state(q, nq)?;
/// b.drive_state(qb, nqb)?;
/// b.output("out", q)?;
/// let net = b.build()?;
/// assert_eq!(net.gates().len(), 2);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[derive(Debug, Clone, Default)]
pub struct NetworkBuilder {
    nets: Vec<NetInfo>,
    gates: Vec<Gate>,
    inputs: Vec<NetId>,
    states: Vec<(NetId, Option<NetId>)>,
    outputs: Vec<(String, NetId)>,
    names: BTreeMap<String, NetId>,
}

impl NetworkBuilder {
    /// An empty builder.
    pub fn new() -> Self {
        Self::default()
    }

    fn add_net(&mut self, name: &str, driver: Driver) -> Result<NetId, NetworkError> {
        if self.names.contains_key(name) {
            return Err(NetworkError::DuplicateName(name.to_string()));
        }
        let id = NetId::from_index(self.nets.len());
        self.nets.push(NetInfo {
            name: name.to_string(),
            driver,
        });
        self.names.insert(name.to_string(), id);
        Ok(id)
    }

    fn check(&self, id: NetId) -> Result<(), NetworkError> {
        if id.index() < self.nets.len() {
            Ok(())
        } else {
            Err(NetworkError::UnknownNet(id.index()))
        }
    }

    /// Adds a primary input.
    ///
    /// # Errors
    /// [`NetworkError::DuplicateName`] when the name is taken.
    pub fn input(&mut self, name: &str) -> Result<NetId, NetworkError> {
        let id = self.add_net(name, Driver::Input(self.inputs.len()))?;
        self.inputs.push(id);
        Ok(id)
    }

    /// Adds a state variable's feedback net; connect its excitation with
    /// [`drive_state`](Self::drive_state) before [`build`](Self::build).
    ///
    /// # Errors
    /// [`NetworkError::DuplicateName`] when the name is taken.
    pub fn state(&mut self, name: &str) -> Result<NetId, NetworkError> {
        let id = self.add_net(name, Driver::State(self.states.len()))?;
        self.states.push((id, None));
        Ok(id)
    }

    /// Adds a gate reading `inputs` and driving a new net called `name`.
    ///
    /// # Errors
    /// Wrong arity, a taken name, or an unknown input net.
    pub fn gate(
        &mut self,
        kind: GateKind,
        inputs: &[NetId],
        name: &str,
    ) -> Result<NetId, NetworkError> {
        if !kind.arity_ok(inputs.len()) {
            return Err(NetworkError::Arity {
                name: name.to_string(),
                kind,
                got: inputs.len(),
            });
        }
        for &i in inputs {
            self.check(i)?;
        }
        let id = self.add_net(name, Driver::Gate(self.gates.len()))?;
        self.gates.push(Gate {
            kind,
            inputs: inputs.to_vec(),
            output: id,
        });
        Ok(id)
    }

    /// Connects feedback net `state` (from [`state`](Self::state)) to the net computing its
    /// excitation.
    ///
    /// # Errors
    /// [`NetworkError::NotFeedback`] if `state` is not an unconnected feedback net.
    pub fn drive_state(&mut self, state: NetId, excitation: NetId) -> Result<(), NetworkError> {
        self.check(state)?;
        self.check(excitation)?;
        let name = self.nets[state.index()].name.clone();
        match self.nets[state.index()].driver {
            Driver::State(i) if self.states[i].1.is_none() => {
                self.states[i].1 = Some(excitation);
                Ok(())
            }
            _ => Err(NetworkError::NotFeedback(name)),
        }
    }

    /// Declares `net` as a primary output called `name` (output names are separate from
    /// net names).
    ///
    /// # Errors
    /// An unknown net, or an output name used twice.
    pub fn output(&mut self, name: &str, net: NetId) -> Result<(), NetworkError> {
        self.check(net)?;
        if self.outputs.iter().any(|(n, _)| n == name) {
            return Err(NetworkError::DuplicateName(name.to_string()));
        }
        self.outputs.push((name.to_string(), net));
        Ok(())
    }

    /// Finishes the network.
    ///
    /// # Errors
    /// [`NetworkError::Undriven`] when a feedback net has no excitation.
    pub fn build(self) -> Result<Network, NetworkError> {
        let mut states = Vec::with_capacity(self.states.len());
        for (net, exc) in &self.states {
            match exc {
                Some(e) => states.push(StateVar {
                    net: *net,
                    excitation: *e,
                }),
                None => return Err(NetworkError::Undriven(self.nets[net.index()].name.clone())),
            }
        }
        let mut fanout = vec![Vec::new(); self.nets.len()];
        for (g, gate) in self.gates.iter().enumerate() {
            for &i in &gate.inputs {
                if !fanout[i.index()].contains(&g) {
                    fanout[i.index()].push(g);
                }
            }
        }
        // Kahn's algorithm with inputs and feedback nets as sources.
        let mut pending: Vec<usize> = self
            .gates
            .iter()
            .map(|g| {
                g.inputs
                    .iter()
                    .filter(|i| matches!(self.nets[i.index()].driver, Driver::Gate(_)))
                    .count()
            })
            .collect();
        let mut order = Vec::with_capacity(self.gates.len());
        let mut placed = vec![false; self.gates.len()];
        let mut queue: std::collections::VecDeque<usize> =
            (0..self.gates.len()).filter(|&g| pending[g] == 0).collect();
        let mut queued = vec![false; self.gates.len()];
        for &g in &queue {
            queued[g] = true;
        }
        while let Some(g) = queue.pop_front() {
            placed[g] = true;
            order.push(g);
            let out = self.gates[g].output.index();
            for &h in &fanout[out] {
                for &i in &self.gates[h].inputs {
                    if i.index() == out {
                        pending[h] -= 1;
                    }
                }
                if pending[h] == 0 && !queued[h] {
                    queued[h] = true;
                    queue.push_back(h);
                }
            }
        }
        order.extend((0..self.gates.len()).filter(|&g| !placed[g]));
        Ok(Network {
            nets: self.nets,
            gates: self.gates,
            inputs: self.inputs,
            states,
            outputs: self.outputs,
            order,
            fanout,
        })
    }
}

impl Network {
    /// The two-level network of a set of sum-of-products covers.
    ///
    /// The support is `inputs` in order, then the state variables `y1..yk` with
    /// `k = next_state.len()`; `next_state[i]` is the cover of `Y(i+1)` and `outputs` the
    /// output covers, in port order. An empty cover is constant 0, a cover holding the
    /// empty product constant 1.
    ///
    /// # Errors
    /// A literal outside the support, or clashing names.
    ///
    /// # Example
    /// A set-dominant latch `Y1 = s + y1 r'` with output `q = y1`:
    /// ```
    /// use stillpoint::network::{Literal, Network};
    /// let lit = |var, positive| Literal { var, positive };
    /// let inputs = vec!["s".to_string(), "r".to_string()];
    /// let y1 = vec![vec![lit(0, true)], vec![lit(2, true), lit(1, false)]];
    /// let q = vec![vec![lit(2, true)]];
    /// let net = Network::from_sop(&inputs, &[y1], &[("q".to_string(), q)])?;
    /// // one inverter (r'), one AND (y1 r'), one OR (Y1), one buffer (q)
    /// assert_eq!(net.gates().len(), 4);
    /// # Ok::<(), Box<dyn std::error::Error>>(())
    /// ```
    pub fn from_sop(
        inputs: &[String],
        next_state: &[Vec<Product>],
        outputs: &[(String, Vec<Product>)],
    ) -> Result<Network, NetworkError> {
        let p = inputs.len();
        let k = next_state.len();
        let len = p + k;
        let mut b = NetworkBuilder::new();
        let mut vars = Vec::with_capacity(len);
        for name in inputs {
            vars.push(b.input(name)?);
        }
        for i in 0..k {
            vars.push(b.state(&format!("y{}", i + 1))?);
        }
        let all = next_state.iter().chain(outputs.iter().map(|(_, c)| c));
        // Normalise products (sorted, deduplicated literals); check the support.
        let mut norm: Vec<Vec<Product>> = Vec::new();
        for cover in all {
            let mut c = Vec::with_capacity(cover.len());
            for prod in cover {
                let mut q = prod.clone();
                for l in &q {
                    if l.var >= len {
                        return Err(NetworkError::BadLiteral { var: l.var, len });
                    }
                }
                q.sort();
                q.dedup();
                c.push(q);
            }
            c.sort();
            c.dedup();
            norm.push(c);
        }
        // Inverters, in support order.
        let mut inv: Vec<Option<NetId>> = vec![None; len];
        for v in 0..len {
            let used = norm
                .iter()
                .flatten()
                .flatten()
                .any(|l| l.var == v && !l.positive);
            if used {
                let name = format!("{}_n", b.nets[vars[v].index()].name);
                inv[v] = Some(b.gate(GateKind::Not, &[vars[v]], &fresh(&b, &name))?);
            }
        }
        let lit_net = |l: &Literal| {
            if l.positive {
                vars[l.var]
            } else {
                inv[l.var].unwrap()
            }
        };
        // One AND per distinct product of two or more literals, in first-use order.
        let mut products: BTreeMap<Product, NetId> = BTreeMap::new();
        for cover in &norm {
            for prod in cover {
                if prod.len() >= 2 && !products.contains_key(prod) {
                    let ins: Vec<NetId> = prod.iter().map(lit_net).collect();
                    let name = fresh(&b, &format!("p{}", products.len()));
                    let id = b.gate(GateKind::And, &ins, &name)?;
                    products.insert(prod.clone(), id);
                }
            }
        }
        // One root gate per function.
        let mut roots = Vec::with_capacity(norm.len());
        for (f, cover) in norm.iter().enumerate() {
            let name = if f < k {
                format!("Y{}", f + 1)
            } else {
                outputs[f - k].0.clone()
            };
            let name = fresh(&b, &name);
            let id = if cover.is_empty() {
                b.gate(GateKind::Const0, &[], &name)?
            } else if cover.iter().any(|p| p.is_empty()) {
                b.gate(GateKind::Const1, &[], &name)?
            } else {
                let ins: Vec<NetId> = cover
                    .iter()
                    .map(|p| {
                        if p.len() == 1 {
                            lit_net(&p[0])
                        } else {
                            products[p]
                        }
                    })
                    .collect();
                let kind = if ins.len() == 1 {
                    GateKind::Buf
                } else {
                    GateKind::Or
                };
                b.gate(kind, &ins, &name)?
            };
            roots.push(id);
        }
        for i in 0..k {
            b.drive_state(vars[p + i], roots[i])?;
        }
        for (j, (name, _)) in outputs.iter().enumerate() {
            b.output(name, roots[k + j])?;
        }
        b.build()
    }

    /// Every gate, in creation order.
    pub fn gates(&self) -> &[Gate] {
        &self.gates
    }

    /// The gates in evaluation order (topological, feedback cut).
    pub fn eval_order(&self) -> impl Iterator<Item = &Gate> + '_ {
        self.order.iter().map(move |&g| &self.gates[g])
    }

    /// The number of nets.
    pub fn num_nets(&self) -> usize {
        self.nets.len()
    }

    /// The name of a net.
    pub fn net_name(&self, net: NetId) -> &str {
        &self.nets[net.index()].name
    }

    /// What drives a net.
    pub fn driver(&self, net: NetId) -> Driver {
        self.nets[net.index()].driver
    }

    /// The gates reading a net.
    pub fn fanout(&self, net: NetId) -> &[usize] {
        &self.fanout[net.index()]
    }

    /// The primary-input nets, in order.
    pub fn inputs(&self) -> &[NetId] {
        &self.inputs
    }

    /// The state variables, `y1` first.
    pub fn states(&self) -> &[StateVar] {
        &self.states
    }

    /// The primary outputs: name and the net that drives them.
    pub fn outputs(&self) -> &[(String, NetId)] {
        &self.outputs
    }

    /// Whether every input of gate `g` is a primary input (such gates get the smallest
    /// delay in the test bench's delay model).
    pub fn fed_by_inputs_only(&self, g: usize) -> bool {
        self.gates[g]
            .inputs
            .iter()
            .all(|i| matches!(self.nets[i.index()].driver, Driver::Input(_)))
    }

    /// The gate driving `net`, if a gate drives it.
    pub fn gate_of(&self, net: NetId) -> Option<&Gate> {
        match self.nets[net.index()].driver {
            Driver::Gate(g) => Some(&self.gates[g]),
            _ => None,
        }
    }
}

impl fmt::Display for Network {
    /// One line per gate: `name = kind(input, ...)`, then the feedback connections.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for g in self.eval_order() {
            let ins: Vec<&str> = g.inputs.iter().map(|&i| self.net_name(i)).collect();
            writeln!(
                f,
                "{} = {}({})",
                self.net_name(g.output),
                g.kind.primitive(),
                ins.join(", ")
            )?;
        }
        for s in &self.states {
            writeln!(
                f,
                "{} <- {}",
                self.net_name(s.net),
                self.net_name(s.excitation)
            )?;
        }
        Ok(())
    }
}

/// `base`, or `base_2`, `base_3`, ... when taken.
fn fresh(b: &NetworkBuilder, base: &str) -> String {
    if !b.names.contains_key(base) {
        return base.to_string();
    }
    (2..)
        .map(|i| format!("{base}_{i}"))
        .find(|n| !b.names.contains_key(n))
        .unwrap()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lit(var: usize, positive: bool) -> Literal {
        Literal { var, positive }
    }

    #[test]
    fn products_are_shared_and_inverters_single() {
        let inputs = vec!["a".to_string(), "b".to_string()];
        let y1 = vec![
            vec![lit(0, true), lit(1, false)],
            vec![lit(2, true), lit(0, false)],
        ];
        let z = vec![vec![lit(1, false), lit(0, true)], vec![lit(0, false)]];
        let net = Network::from_sop(&inputs, &[y1], &[("z".into(), z)]).unwrap();
        let kinds: Vec<GateKind> = net.gates().iter().map(|g| g.kind()).collect();
        assert_eq!(kinds.iter().filter(|k| **k == GateKind::Not).count(), 2);
        assert_eq!(kinds.iter().filter(|k| **k == GateKind::And).count(), 2);
        assert_eq!(kinds.iter().filter(|k| **k == GateKind::Or).count(), 2);
        assert_eq!(net.states().len(), 1);
        assert_eq!(net.net_name(net.states()[0].net), "y1");
        assert_eq!(net.net_name(net.states()[0].excitation), "Y1");
        // evaluation order: every gate after the gates it reads
        let mut seen = vec![false; net.num_nets()];
        for n in net.inputs() {
            seen[n.index()] = true;
        }
        for s in net.states() {
            seen[s.net.index()] = true;
        }
        for g in net.eval_order() {
            assert!(g.inputs().iter().all(|i| seen[i.index()]));
            seen[g.output().index()] = true;
        }
    }

    #[test]
    fn constants_and_bad_literals() {
        let inputs = vec!["a".to_string()];
        let net = Network::from_sop(&inputs, &[vec![], vec![vec![]]], &[]).unwrap();
        assert_eq!(net.gates()[0].kind(), GateKind::Const0);
        assert_eq!(net.gates()[1].kind(), GateKind::Const1);
        assert!(matches!(
            Network::from_sop(&inputs, &[vec![vec![lit(5, true)]]], &[]),
            Err(NetworkError::BadLiteral { var: 5, len: 2 })
        ));
    }

    #[test]
    fn builder_refuses_undriven_state() {
        let mut b = NetworkBuilder::new();
        b.state("q").unwrap();
        assert!(matches!(b.build(), Err(NetworkError::Undriven(_))));
    }
}
