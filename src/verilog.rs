//! Structural Verilog (IEEE 1364 gate primitives) and a self-checking test bench.
//!
//! **The netlist contract** (see the `synth` command): one module, named after the table;
//! ports named exactly as the table's inputs and outputs, plus the state variables
//! `y1..yk` as output ports; the feedback nets are those `y1..yk` (the gate computing
//! `Y_i` drives `y_i` directly), so a test bench may `force`/`release` them to start the
//! design in any state; one gate primitive instance per line (`and`, `or`, `not`, `buf`,
//! and `nand`/`nor` for hand-built networks); no delays and no other module. Names that
//! are Verilog keywords, that clash with one another, or that look like `y<N>` are refused.
//!
//! **The test bench** ([`testbench`]) is a separate file that holds its own copy of the
//! netlist, `<module>_timed`, in which every gate's output passes through a transport delay
//! drawn from the `SEED` parameter with `$random`: 1 unit for gates fed only by primary
//! inputs (the input inverters), 1 to 9 units for every other gate, and every feedback
//! net `y_i` reaches the logic between `FEEDBACK_DELAY` and twice that (default 20 to 40,
//! drawn per variable) after the gate that drives it: longer than the slowest path from
//! an input through the logic (1 + 9 + 9), and different per variable so that the state
//! variables really race.
//! That is the delay model the ternary verification uses by default
//! ([`crate::sim::DelayModel::FeedbackDelay`]). The bench module `<module>_tb` starts the
//! design in each stable state of each transition by forcing the `y` nets, checks the state
//! and outputs, applies the input change, waits far longer than the slowest path, and
//! checks the destination state, the outputs, and that no specified output changed more
//! often than the table asks (a glitch). It prints `PASS <n> transitions` or a `FAIL` line
//! per failure and `FAILED <n>`, then `$finish`. Run it with Icarus Verilog:
//! `iverilog -o tb design.v bench.v && vvp tb +seed=7` (or `-P<module>_tb.SEED=7`).

use crate::network::{Driver, GateKind, NetId, Network};
use crate::sim::TransitionCheck;
use std::collections::BTreeSet;
use std::fmt::Write as _;

/// What kind of name a [`VerilogError`] is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum NameKind {
    /// The table (module) name.
    Table,
    /// An input name.
    Input,
    /// An output name.
    Output,
}

impl std::fmt::Display for NameKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            NameKind::Table => "table name",
            NameKind::Input => "input",
            NameKind::Output => "output",
        })
    }
}

/// A name the netlist cannot carry. The CLI locates `name` in the table file.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum VerilogError {
    /// The name is a reserved word of IEEE 1364.
    #[error("{kind} `{name}` is a Verilog keyword; rename it to write a netlist")]
    Keyword {
        /// Which name.
        kind: NameKind,
        /// The name.
        name: String,
    },
    /// Two ports would have the same name.
    #[error("{kind} `{name}` has the same name as an {other}; rename one to write a netlist")]
    Clash {
        /// The later name.
        kind: NameKind,
        /// The name.
        name: String,
        /// The kind of the earlier one.
        other: NameKind,
    },
    /// The name looks like a state variable `y<N>`.
    #[error("{kind} `{name}` is reserved for the state variables y1, y2, ...; rename it")]
    StateName {
        /// Which name.
        kind: NameKind,
        /// The name.
        name: String,
    },
    /// Not a simple Verilog identifier.
    #[error("{kind} `{name}` is not a Verilog identifier")]
    NotIdentifier {
        /// Which name.
        kind: NameKind,
        /// The name.
        name: String,
    },
}

impl VerilogError {
    /// The offending name.
    pub fn name(&self) -> &str {
        match self {
            VerilogError::Keyword { name, .. }
            | VerilogError::Clash { name, .. }
            | VerilogError::StateName { name, .. }
            | VerilogError::NotIdentifier { name, .. } => name,
        }
    }
}

/// The reserved words of IEEE 1364-2005.
const KEYWORDS: &[&str] = &[
    "always",
    "and",
    "assign",
    "automatic",
    "begin",
    "buf",
    "bufif0",
    "bufif1",
    "case",
    "casex",
    "casez",
    "cell",
    "cmos",
    "config",
    "deassign",
    "default",
    "defparam",
    "design",
    "disable",
    "edge",
    "else",
    "end",
    "endcase",
    "endconfig",
    "endfunction",
    "endgenerate",
    "endmodule",
    "endprimitive",
    "endspecify",
    "endtable",
    "endtask",
    "event",
    "for",
    "force",
    "forever",
    "fork",
    "function",
    "generate",
    "genvar",
    "highz0",
    "highz1",
    "if",
    "ifnone",
    "incdir",
    "include",
    "initial",
    "inout",
    "input",
    "instance",
    "integer",
    "join",
    "large",
    "liblist",
    "library",
    "localparam",
    "macromodule",
    "medium",
    "module",
    "nand",
    "negedge",
    "nmos",
    "nor",
    "noshowcancelled",
    "not",
    "notif0",
    "notif1",
    "or",
    "output",
    "parameter",
    "pmos",
    "posedge",
    "primitive",
    "pull0",
    "pull1",
    "pulldown",
    "pullup",
    "pulsestyle_onevent",
    "pulsestyle_ondetect",
    "rcmos",
    "real",
    "realtime",
    "reg",
    "release",
    "repeat",
    "rnmos",
    "rpmos",
    "rtran",
    "rtranif0",
    "rtranif1",
    "scalared",
    "showcancelled",
    "signed",
    "small",
    "specify",
    "specparam",
    "strong0",
    "strong1",
    "supply0",
    "supply1",
    "table",
    "task",
    "time",
    "tran",
    "tranif0",
    "tranif1",
    "tri",
    "tri0",
    "tri1",
    "triand",
    "trior",
    "trireg",
    "unsigned",
    "use",
    "uwire",
    "vectored",
    "wait",
    "wand",
    "weak0",
    "weak1",
    "while",
    "wire",
    "wor",
    "xnor",
    "xor",
];

/// Whether `name` is a reserved word of IEEE 1364-2005.
pub fn is_keyword(name: &str) -> bool {
    KEYWORDS.contains(&name)
}

fn is_state_name(name: &str) -> bool {
    name.len() > 1 && name.starts_with('y') && name[1..].bytes().all(|b| b.is_ascii_digit())
}

fn is_identifier(name: &str) -> bool {
    let mut b = name.bytes();
    matches!(b.next(), Some(c) if c.is_ascii_alphabetic() || c == b'_')
        && b.all(|c| c.is_ascii_alphanumeric() || c == b'_' || c == b'$')
}

/// Checks that a module name and its port names can be written as the netlist contract
/// says.
///
/// # Errors
/// The first offending name, in the order module, inputs, outputs.
///
/// # Example
/// ```
/// use stillpoint::verilog::check_names;
/// let s = |v: &[&str]| v.iter().map(|x| x.to_string()).collect::<Vec<_>>();
/// assert!(check_names("latch", &s(&["set", "clr"]), &s(&["q"])).is_ok());
/// assert!(check_names("latch", &s(&["wire"]), &s(&["q"])).is_err());
/// assert!(check_names("latch", &s(&["y1"]), &s(&["q"])).is_err());
/// ```
pub fn check_names(
    module: &str,
    inputs: &[String],
    outputs: &[String],
) -> Result<(), VerilogError> {
    let mut seen: Vec<(&str, NameKind)> = Vec::new();
    let all = std::iter::once((module, NameKind::Table))
        .chain(inputs.iter().map(|n| (n.as_str(), NameKind::Input)))
        .chain(outputs.iter().map(|n| (n.as_str(), NameKind::Output)));
    for (name, kind) in all {
        let err_name = name.to_string();
        if !is_identifier(name) {
            return Err(VerilogError::NotIdentifier {
                kind,
                name: err_name,
            });
        }
        if is_keyword(name) {
            return Err(VerilogError::Keyword {
                kind,
                name: err_name,
            });
        }
        if kind == NameKind::Table {
            continue;
        }
        if is_state_name(name) {
            return Err(VerilogError::StateName {
                kind,
                name: err_name,
            });
        }
        if let Some((_, other)) = seen.iter().find(|(n, _)| *n == name) {
            return Err(VerilogError::Clash {
                kind,
                name: err_name,
                other: *other,
            });
        }
        seen.push((name, kind));
    }
    Ok(())
}

/// The comment header of both files.
#[derive(Debug, Clone, Default)]
pub struct Header {
    /// One line saying what the file is.
    pub title: String,
    /// Paragraphs (the caution, the delay model, ...), each wrapped into `//` lines.
    pub paragraphs: Vec<String>,
}

fn write_header(out: &mut String, h: &Header) {
    let _ = writeln!(out, "// {}", h.title);
    for p in &h.paragraphs {
        out.push_str("//\n");
        let mut line = String::from("//");
        for word in p.split_whitespace() {
            if line.len() + 1 + word.len() > 92 && line.len() > 2 {
                let _ = writeln!(out, "{line}");
                line = String::from("//");
            }
            line.push(' ');
            line.push_str(word);
        }
        let _ = writeln!(out, "{line}");
    }
    out.push('\n');
}

/// Verilog names for every net: ports keep theirs, `Y_i` is `y_i`, internal nets get
/// their network name unless it is taken or reserved.
struct Names {
    name: Vec<String>,
    /// Per gate: whether it drives a port or `y` net directly (else it gets a `buf`).
    port_of_gate: Vec<Option<String>>,
    /// Extra buffers: (port name, source net).
    bufs: Vec<(String, NetId)>,
    internal: Vec<NetId>,
    ports_out: Vec<String>,
    taken: BTreeSet<String>,
    /// Instance names of the gates and of the extra buffers (they share the net namespace).
    inst: Vec<String>,
    buf_inst: Vec<String>,
}

impl Names {
    fn fresh(&mut self, base: &str) -> String {
        let mut cand = base.to_string();
        let mut i = 2;
        while self.taken.contains(&cand) || is_keyword(&cand) || !is_identifier(&cand) {
            cand = format!("{base}_{i}");
            i += 1;
        }
        self.taken.insert(cand.clone());
        cand
    }
}

fn names(net: &Network) -> Names {
    let mut n = Names {
        name: vec![String::new(); net.num_nets()],
        port_of_gate: vec![None; net.gates().len()],
        bufs: Vec::new(),
        internal: Vec::new(),
        ports_out: Vec::new(),
        taken: BTreeSet::new(),
        inst: Vec::new(),
        buf_inst: Vec::new(),
    };
    for &i in net.inputs() {
        n.name[i.index()] = net.net_name(i).to_string();
        n.taken.insert(net.net_name(i).to_string());
    }
    for (name, _) in net.outputs() {
        n.taken.insert(name.clone());
        n.ports_out.push(name.clone());
    }
    for (i, s) in net.states().iter().enumerate() {
        let y = format!("y{}", i + 1);
        n.taken.insert(y.clone());
        n.name[s.net.index()] = y;
    }
    // Which gate outputs are ports.
    let mut claimed = vec![false; net.num_nets()];
    let mut claim =
        |n: &mut Names, net_id: NetId, port: &str, exclusive: bool| match net.driver(net_id) {
            Driver::Gate(g) if exclusive && !claimed[net_id.index()] => {
                claimed[net_id.index()] = true;
                n.port_of_gate[g] = Some(port.to_string());
                n.name[net_id.index()] = port.to_string();
            }
            _ => n.bufs.push((port.to_string(), net_id)),
        };
    for (i, s) in net.states().iter().enumerate() {
        let e = s.excitation;
        let exclusive = net.fanout(e).is_empty()
            && !net.outputs().iter().any(|(_, o)| *o == e)
            && net.states().iter().filter(|t| t.excitation == e).count() == 1;
        claim(&mut n, e, &format!("y{}", i + 1), exclusive);
    }
    for (name, o) in net.outputs() {
        let exclusive = net.fanout(*o).is_empty()
            && !net.states().iter().any(|s| s.excitation == *o)
            && net.outputs().iter().filter(|(_, p)| p == o).count() == 1;
        claim(&mut n, *o, name, exclusive);
    }
    for g in net.gates() {
        let id = g.output();
        if n.name[id.index()].is_empty() {
            let base = net.net_name(id).to_string();
            let base = if n.taken.contains(&base) || is_keyword(&base) {
                format!("n_{base}")
            } else {
                base
            };
            let v = n.fresh(&base);
            n.name[id.index()] = v;
            n.internal.push(id);
        }
    }
    for g in 0..net.gates().len() {
        let v = n.fresh(&format!("g{g}"));
        n.inst.push(v);
    }
    for b in 0..n.bufs.len() {
        let v = n.fresh(&format!("b{b}"));
        n.buf_inst.push(v);
    }
    n
}

fn ports(net: &Network, n: &Names) -> Vec<String> {
    let mut v: Vec<String> = net
        .inputs()
        .iter()
        .map(|i| n.name[i.index()].clone())
        .collect();
    v.extend(n.ports_out.iter().cloned());
    v.extend((1..=net.states().len()).map(|i| format!("y{i}")));
    v
}

fn decl(out: &mut String, kw: &str, list: &[String]) {
    for chunk in list.chunks(12) {
        let _ = writeln!(out, "  {kw} {};", chunk.join(", "));
    }
}

/// The structural netlist of `net` as module `module`.
///
/// # Errors
/// A name that breaks the contract (see [`check_names`]).
///
/// # Example
/// ```
/// use stillpoint::network::{Literal, Network};
/// use stillpoint::verilog::{netlist, Header};
/// let lit = |var, positive| Literal { var, positive };
/// let inputs = vec!["s".to_string(), "r".to_string()];
/// let y1 = vec![vec![lit(0, true)], vec![lit(2, true), lit(1, false)]];
/// let net = Network::from_sop(&inputs, &[y1], &[("q".to_string(), vec![vec![lit(2, true)]])])?;
/// let v = netlist(&net, "latch", &Header::default())?;
/// assert!(v.contains("module latch (s, r, q, y1);"));
/// assert!(v.contains("or g2 (y1, s, p0);"));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn netlist(net: &Network, module: &str, header: &Header) -> Result<String, VerilogError> {
    let ins: Vec<String> = net
        .inputs()
        .iter()
        .map(|&i| net.net_name(i).to_string())
        .collect();
    let outs: Vec<String> = net.outputs().iter().map(|(n, _)| n.clone()).collect();
    check_names(module, &ins, &outs)?;
    let n = names(net);
    let mut out = String::new();
    write_header(&mut out, header);
    let _ = writeln!(out, "module {module} ({});", ports(net, &n).join(", "));
    decl(&mut out, "input", &ins);
    if !outs.is_empty() {
        decl(&mut out, "output", &outs);
    }
    let ys: Vec<String> = (1..=net.states().len()).map(|i| format!("y{i}")).collect();
    if !ys.is_empty() {
        decl(&mut out, "output", &ys);
    }
    let wires: Vec<String> = n
        .internal
        .iter()
        .map(|i| n.name[i.index()].clone())
        .collect();
    if !wires.is_empty() {
        decl(&mut out, "wire", &wires);
    }
    out.push('\n');
    for (g, gate) in net.gates().iter().enumerate() {
        let o = &n.name[gate.output().index()];
        let args = match gate.kind() {
            GateKind::Const0 => format!("{o}, 1'b0"),
            GateKind::Const1 => format!("{o}, 1'b1"),
            _ => {
                let mut a = vec![o.clone()];
                a.extend(gate.inputs().iter().map(|i| n.name[i.index()].clone()));
                a.join(", ")
            }
        };
        let _ = writeln!(out, "  {} {} ({args});", gate.kind().primitive(), n.inst[g]);
    }
    for (b, (port, src)) in n.bufs.iter().enumerate() {
        let _ = writeln!(
            out,
            "  buf {} ({port}, {});",
            n.buf_inst[b],
            n.name[src.index()]
        );
    }
    out.push_str("endmodule\n");
    Ok(out)
}

fn bits(v: &[bool]) -> String {
    if v.is_empty() {
        return "1'b0".into();
    }
    let s: String = v.iter().map(|&b| if b { '1' } else { '0' }).collect();
    format!("{}'b{s}", v.len())
}

fn obits(v: &[Option<bool>]) -> (String, String) {
    let val: Vec<bool> = v.iter().map(|b| b.unwrap_or(false)).collect();
    let mask: Vec<bool> = v.iter().map(|b| b.is_some()).collect();
    (bits(&val), bits(&mask))
}

/// The self-checking test bench for `net` (module `module`) over the given transitions,
/// each with a label printed on failure. See the [module doc](self) for what it does.
///
/// # Errors
/// A name that breaks the contract (see [`check_names`]).
pub fn testbench(
    net: &Network,
    module: &str,
    vectors: &[(String, TransitionCheck)],
    header: &Header,
) -> Result<String, VerilogError> {
    let ins: Vec<String> = net
        .inputs()
        .iter()
        .map(|&i| net.net_name(i).to_string())
        .collect();
    let outs: Vec<String> = net.outputs().iter().map(|(n, _)| n.clone()).collect();
    check_names(module, &ins, &outs)?;
    let mut n = names(net);
    let k = net.states().len();
    let ys: Vec<String> = (1..=k).map(|i| format!("y{i}")).collect();
    let mut out = String::new();
    write_header(&mut out, header);

    // ---- the timed copy ----
    let all_ports = ports(net, &n);
    let _ = writeln!(out, "module {module}_timed ({});", all_ports.join(", "));
    let seed = n.fresh("SEED");
    let fb = n.fresh("FEEDBACK_DELAY");
    let seedvar = n.fresh("seed_state");
    let _ = writeln!(out, "  parameter {seed} = 1;");
    let _ = writeln!(out, "  parameter {fb} = 20;");
    decl(&mut out, "input", &ins);
    if !outs.is_empty() {
        decl(&mut out, "output", &outs);
    }
    if !ys.is_empty() {
        decl(&mut out, "output", &ys);
    }
    // Per gate: the zero-delay result t, the delayed value r (a reg), the delay d.
    let g_count = net.gates().len();
    let t: Vec<String> = (0..g_count).map(|g| n.fresh(&format!("t{g}"))).collect();
    let d: Vec<String> = (0..g_count).map(|g| n.fresh(&format!("d{g}"))).collect();
    let fbn: Vec<String> = (1..=k).map(|i| n.fresh(&format!("y{i}_fb"))).collect();
    let fbd: Vec<String> = (1..=k).map(|i| n.fresh(&format!("fb{i}"))).collect();
    // The name the logic reads for each net: inputs as is, y_i through the feedback delay,
    // gate outputs as their delayed reg.
    let mut read = n.name.clone();
    for (i, s) in net.states().iter().enumerate() {
        read[s.net.index()] = fbn[i].clone();
    }
    let regs: Vec<String> = net
        .gates()
        .iter()
        .enumerate()
        .map(|(gi, g)| match &n.port_of_gate[gi] {
            // a port: a reg drives it through an assign
            Some(p) => n.fresh(&format!("r_{p}")),
            None => n.name[g.output().index()].clone(),
        })
        .collect();
    for (gi, g) in net.gates().iter().enumerate() {
        read[g.output().index()] = regs[gi].clone();
    }
    decl(&mut out, "wire", &t);
    decl(&mut out, "reg", &regs);
    if !fbn.is_empty() {
        decl(&mut out, "reg", &fbn);
    }
    decl(&mut out, "integer", &d);
    if !fbd.is_empty() {
        decl(&mut out, "integer", &fbd);
    }
    let _ = writeln!(out, "  integer {seedvar};");
    let _ = writeln!(out, "  initial begin");
    let _ = writeln!(out, "    {seedvar} = {seed};");
    for (gi, dg) in d.iter().enumerate() {
        if net.fed_by_inputs_only(gi) {
            let _ = writeln!(out, "    {dg} = 1; // fed by primary inputs only");
        } else {
            let _ = writeln!(out, "    {dg} = 1 + {{$random({seedvar})}} % 9;");
        }
    }
    for f in &fbd {
        let _ = writeln!(out, "    {f} = {fb} + {{$random({seedvar})}} % ({fb} + 1);");
    }
    let _ = writeln!(out, "  end");
    for (gi, g) in net.gates().iter().enumerate() {
        let args = match g.kind() {
            GateKind::Const0 => format!("{}, 1'b0", t[gi]),
            GateKind::Const1 => format!("{}, 1'b1", t[gi]),
            _ => {
                let mut a = vec![t[gi].clone()];
                a.extend(g.inputs().iter().map(|i| read[i.index()].clone()));
                a.join(", ")
            }
        };
        let _ = writeln!(out, "  {} {} ({args});", g.kind().primitive(), n.inst[gi]);
        let _ = writeln!(
            out,
            "  always @({}) {} <= #({}) {};",
            t[gi], regs[gi], d[gi], t[gi]
        );
    }
    for (gi, p) in n.port_of_gate.iter().enumerate() {
        if let Some(p) = p {
            let _ = writeln!(out, "  assign {p} = {};", regs[gi]);
        }
    }
    for (port, src) in &n.bufs {
        let _ = writeln!(out, "  assign {port} = {};", read[src.index()]);
    }
    for (i, y) in ys.iter().enumerate() {
        let _ = writeln!(out, "  always @({y}) {} <= #({}) {y};", fbn[i], fbd[i]);
    }
    out.push_str("endmodule\n\n");

    // ---- the bench ----
    let tb = format!("{module}_tb");
    let errors = n.fresh("errors");
    let count = n.fresh("checks");
    let armed = n.fresh("armed");
    let hold = n.fresh("HOLD");
    let settle = n.fresh("SETTLE");
    let task = n.fresh("run_transition");
    let cnt: Vec<String> = outs
        .iter()
        .map(|o| n.fresh(&format!("changes_{o}")))
        .collect();
    let ni = ins.len();
    let no = outs.len();
    let _ = writeln!(out, "module {tb};");
    let _ = writeln!(out, "  parameter {seed} = 1;");
    let _ = writeln!(out, "  parameter {hold} = 100;");
    let _ = writeln!(out, "  parameter {settle} = 500;");
    decl(&mut out, "reg", &ins);
    let mut wires_tb: Vec<String> = outs.clone();
    wires_tb.extend(ys.iter().cloned());
    if !wires_tb.is_empty() {
        decl(&mut out, "wire", &wires_tb);
    }
    let _ = writeln!(out, "  integer {errors}, {count};");
    let _ = writeln!(out, "  reg {armed};");
    if !cnt.is_empty() {
        decl(&mut out, "integer", &cnt);
    }
    let conns: Vec<String> = all_ports.iter().map(|p| format!(".{p}({p})")).collect();
    let _ = writeln!(
        out,
        "  {module}_timed #(.{seed}({seed})) dut ({});",
        conns.join(", ")
    );
    for (o, c) in outs.iter().zip(&cnt) {
        let _ = writeln!(out, "  always @({o}) if ({armed}) {c} = {c} + 1;");
    }
    let cat = |v: &[String]| format!("{{{}}}", v.join(", "));
    let w = |len: usize| {
        if len == 0 {
            String::new()
        } else {
            format!("[{}:0] ", len - 1)
        }
    };
    let [a_id, a_from, a_to, a_start, a_dest, a_ob, a_obm, a_oa, a_oam] = [
        "id", "from", "to", "start", "dest", "ob", "obm", "oa", "oam",
    ]
    .map(|b| n.fresh(&format!("tr_{b}")));
    let _ = writeln!(out, "\n  task {task};");
    let _ = writeln!(out, "    input integer {a_id};");
    let _ = writeln!(out, "    input {}{a_from}, {a_to};", w(ni));
    if k > 0 {
        let _ = writeln!(out, "    input {}{a_start}, {a_dest};", w(k));
    }
    if no > 0 {
        let _ = writeln!(out, "    input {}{a_ob}, {a_obm}, {a_oa}, {a_oam};", w(no));
    }
    let _ = writeln!(out, "    begin");
    let _ = writeln!(out, "      {count} = {count} + 1;");
    let _ = writeln!(out, "      {} = {a_from};", cat(&ins));
    for (i, y) in ys.iter().enumerate() {
        let _ = writeln!(out, "      force dut.{y} = {a_start}[{}];", k - 1 - i);
    }
    let _ = writeln!(out, "      #({hold});");
    for y in &ys {
        let _ = writeln!(out, "      release dut.{y};");
    }
    let _ = writeln!(out, "      #({settle});");
    let mut conds_start = Vec::new();
    if k > 0 {
        conds_start.push(format!("{} !== {a_start}", cat(&ys)));
    }
    if no > 0 {
        conds_start.push(format!("((({} ^ {a_ob}) & {a_obm}) !== 0)", cat(&outs)));
    }
    if !conds_start.is_empty() {
        let _ = writeln!(out, "      if ({}) begin", conds_start.join(" || "));
        let _ = writeln!(out, "        {errors} = {errors} + 1;");
        let _ = writeln!(
            out,
            "        $display(\"FAIL transition %0d: start state not stable (state %b, outputs %b)\", {a_id}, {}, {});",
            if k > 0 { cat(&ys) } else { "1'b0".into() },
            if no > 0 { cat(&outs) } else { "1'b0".into() }
        );
        let _ = writeln!(out, "      end");
    }
    for c in &cnt {
        let _ = writeln!(out, "      {c} = 0;");
    }
    let _ = writeln!(out, "      {armed} = 1;");
    let _ = writeln!(out, "      {} = {a_to};", cat(&ins));
    let _ = writeln!(out, "      #({settle});");
    let _ = writeln!(out, "      {armed} = 0;");
    if k > 0 {
        let _ = writeln!(out, "      if ({} !== {a_dest}) begin", cat(&ys));
        let _ = writeln!(out, "        {errors} = {errors} + 1;");
        let _ = writeln!(
            out,
            "        $display(\"FAIL transition %0d: state %b, expected %b\", {a_id}, {}, {a_dest});",
            cat(&ys)
        );
        let _ = writeln!(out, "      end");
    }
    if no > 0 {
        let _ = writeln!(
            out,
            "      if ((({} ^ {a_oa}) & {a_oam}) !== 0) begin",
            cat(&outs)
        );
        let _ = writeln!(out, "        {errors} = {errors} + 1;");
        let _ = writeln!(
            out,
            "        $display(\"FAIL transition %0d: outputs %b, expected %b (mask %b)\", {a_id}, {}, {a_oa}, {a_oam});",
            cat(&outs)
        );
        let _ = writeln!(out, "      end");
        for (j, (o, c)) in outs.iter().zip(&cnt).enumerate() {
            let bit = no - 1 - j;
            let _ = writeln!(
                out,
                "      if ({a_obm}[{bit}] && {a_oam}[{bit}] && {c} > ({a_ob}[{bit}] != {a_oa}[{bit}])) begin"
            );
            let _ = writeln!(out, "        {errors} = {errors} + 1;");
            let _ = writeln!(
                out,
                "        $display(\"FAIL transition %0d: output {o} changed %0d times\", {a_id}, {c});"
            );
            let _ = writeln!(out, "      end");
        }
    }
    let _ = writeln!(out, "    end\n  endtask\n");
    let _ = writeln!(out, "  initial begin");
    let _ = writeln!(out, "    {errors} = 0; {count} = 0; {armed} = 0;");
    for (id, (label, v)) in vectors.iter().enumerate() {
        let _ = writeln!(out, "    // {id}: {label}");
        let mut args = vec![id.to_string(), bits(&v.from_inputs), bits(&v.to_inputs)];
        if k > 0 {
            args.push(bits(&v.start));
            args.push(bits(&v.dest));
        }
        if no > 0 {
            let (ob, obm) = obits(&v.outputs_before);
            let (oa, oam) = obits(&v.outputs_after);
            args.extend([ob, obm, oa, oam]);
        }
        let _ = writeln!(out, "    {task}({});", args.join(", "));
    }
    let _ = writeln!(
        out,
        "    if ({errors} == 0) $display(\"PASS %0d transitions\", {count});"
    );
    let _ = writeln!(out, "    else $display(\"FAILED %0d\", {errors});");
    let _ = writeln!(out, "    $finish;");
    let _ = writeln!(out, "  end");
    out.push_str("endmodule\n");
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::Literal;

    fn s(v: &[&str]) -> Vec<String> {
        v.iter().map(|x| x.to_string()).collect()
    }

    #[test]
    fn names_are_checked() {
        assert!(check_names("t", &s(&["a", "b"]), &s(&["z"])).is_ok());
        assert!(matches!(
            check_names("module", &s(&["a"]), &s(&[])),
            Err(VerilogError::Keyword {
                kind: NameKind::Table,
                ..
            })
        ));
        assert!(matches!(
            check_names("t", &s(&["a"]), &s(&["a"])),
            Err(VerilogError::Clash {
                kind: NameKind::Output,
                other: NameKind::Input,
                ..
            })
        ));
        assert!(matches!(
            check_names("t", &s(&["a"]), &s(&["y12"])),
            Err(VerilogError::StateName { .. })
        ));
        // `y` alone and `Y1` are fine: Verilog is case-sensitive.
        assert!(check_names("t", &s(&["y", "Y1"]), &s(&["y_1"])).is_ok());
    }

    #[test]
    fn one_primitive_per_line_and_ports_in_order() {
        let lit = |var, positive| Literal { var, positive };
        let inputs = s(&["a", "b"]);
        // Y1 = a b' + y1 a ; z = y1 (a buffer, since the output must be its own net)
        let y1 = vec![
            vec![lit(0, true), lit(1, false)],
            vec![lit(2, true), lit(0, true)],
        ];
        let net =
            Network::from_sop(&inputs, &[y1], &[("z".into(), vec![vec![lit(2, true)]])]).unwrap();
        let v = netlist(
            &net,
            "demo",
            &Header {
                title: "t".into(),
                paragraphs: vec![],
            },
        )
        .unwrap();
        assert!(v.contains("module demo (a, b, z, y1);"));
        let prims = v
            .lines()
            .filter(|l| {
                let w = l.trim_start().split(' ').next().unwrap_or("");
                ["and", "or", "not", "buf"].contains(&w)
            })
            .count();
        assert_eq!(prims, net.gates().len());
        assert!(v.contains("(y1, "), "the OR drives y1 directly:\n{v}");
    }
}
