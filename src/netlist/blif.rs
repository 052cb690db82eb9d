//! BLIF reader: combinational models, `.names` covers in any order, hierarchical `.subckt` flattened.

use super::{text_error, Budget, Edge, NodeKind, ReadError, ReadLimits};
use super::{Netlist, Source};
use std::collections::HashMap;

/// Reads a combinational BLIF file (Berkeley Logic Interchange Format, as
/// described in "BLIF: Berkeley Logic Interchange Format", UC Berkeley, 1992)
/// into a [`Netlist`].
///
/// Accepted: `.model`, `.inputs`, `.outputs` (repeatable), `.names` covers
/// (single-output PLA rows of `0 1 -` and an output value, one polarity per
/// cover; a row `1` or ` 1` alone is a constant-1 cover, no rows is the
/// constant 0), `.subckt`, `.end`, `#` comments, and `\` at the end of a line
/// to continue it. Covers may come in any order; they are sorted
/// topologically (iteratively) and a combinational cycle is refused at the
/// `.names` line of a cover on the cycle.
///
/// Each cover becomes one AND node per row (of the row's literals) and one OR
/// node of those; a cover whose rows give the output 0 lists the off-set, and
/// its signal is that OR complemented. Nothing is simplified.
///
/// Hierarchy: the first model is the design. `.subckt m formal=actual ...`
/// is flattened when model `m` is defined in the same file (each instance
/// gets its own copy of `m`'s nodes, in the order its `.names` appear); a
/// `.subckt` of a model the file does not define is refused, as are
/// recursive instantiation, an unbound input formal, and a formal `m` does
/// not declare. Sequential and library constructs (`.latch`, `.mlatch`,
/// `.gate`, `.clock`, `.exdc`) and any other directive are refused at their
/// line.
///
/// Errors, each at its line and column: an undefined signal (at its first
/// use), a signal defined twice (at the second definition), a row whose input
/// plane has the wrong length or a character other than `0 1 -`, an output
/// value other than `0 1`, rows of both output values in one cover.
///
/// Time and memory O(size of the text + size of the flattened netlist);
/// [`ReadLimits`] bound the nodes, fanins and inputs: counted per model while
/// reading and again while flattening, before the nodes are built.
pub fn read_blif(path: &str, text: &str, limits: &ReadLimits) -> Result<Netlist, ReadError> {
    let mut budget = Budget::new(limits);
    let mut models = parse(path, text, &mut budget)?;
    resolve(path, text, &mut models)?;
    check_recursion(path, text, &models)?;
    let flat = flatten(&models, limits)?;
    let order = sort(path, text, &models, &flat)?;
    Ok(emit(text, &models, &flat, &order))
}

/// Sentinel for "no value" in `u32` and `usize` tables.
const NONE: u32 = u32::MAX;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Def {
    None,
    Input,
    Cover(u32),
    /// An output of a `.subckt` instance.
    Instance,
}

struct Cover {
    output: u32,
    /// Offset of the `.names` keyword.
    line: usize,
    fanin_start: u32,
    fanin_len: u32,
    cube_start: u32,
    cube_len: u32,
    /// The rows give the on-set (output value 1); false: the off-set.
    on_set: bool,
}

struct Instance<'a> {
    model: &'a str,
    model_offset: usize,
    binding_start: u32,
    binding_len: u32,
    /// The instantiated model, once resolved.
    sub: u32,
}

struct Binding<'a> {
    formal: &'a str,
    formal_offset: usize,
    actual: u32,
    actual_offset: usize,
    /// The formal's id in the instantiated model, once resolved.
    formal_id: u32,
    /// Whether the formal is an output of the instantiated model.
    is_output: bool,
}

struct Model<'a> {
    name: &'a str,
    offset: usize,
    ids: HashMap<&'a str, u32>,
    names: Vec<&'a str>,
    /// Offset of the first use of each name, `usize::MAX` when unused.
    first_use: Vec<usize>,
    def: Vec<Def>,
    def_offset: Vec<usize>,
    inputs: Vec<u32>,
    outputs: Vec<u32>,
    covers: Vec<Cover>,
    cover_fanins: Vec<u32>,
    /// Byte offset of each row's input plane (its length is its cover's fanin count).
    cubes: Vec<usize>,
    instances: Vec<Instance<'a>>,
    bindings: Vec<Binding<'a>>,
    /// The nodes and fanins this model adds itself, not counting instances.
    own_nodes: usize,
    own_fanins: usize,
}

impl<'a> Model<'a> {
    fn new(name: &'a str, offset: usize) -> Self {
        Model {
            name,
            offset,
            ids: HashMap::new(),
            names: Vec::new(),
            first_use: Vec::new(),
            def: Vec::new(),
            def_offset: Vec::new(),
            inputs: Vec::new(),
            outputs: Vec::new(),
            covers: Vec::new(),
            cover_fanins: Vec::new(),
            cubes: Vec::new(),
            instances: Vec::new(),
            bindings: Vec::new(),
            own_nodes: 0,
            own_fanins: 0,
        }
    }

    fn id(&mut self, name: &'a str) -> u32 {
        if let Some(&i) = self.ids.get(name) {
            return i;
        }
        let i = self.names.len() as u32;
        self.ids.insert(name, i);
        self.names.push(name);
        self.first_use.push(usize::MAX);
        self.def.push(Def::None);
        self.def_offset.push(usize::MAX);
        i
    }

    fn use_at(&mut self, name: &'a str, offset: usize) -> u32 {
        let i = self.id(name);
        let u = &mut self.first_use[i as usize];
        *u = (*u).min(offset);
        i
    }

    fn define(
        &mut self,
        path: &str,
        text: &str,
        name: &'a str,
        offset: usize,
        def: Def,
    ) -> Result<u32, ReadError> {
        let i = self.id(name);
        if self.def[i as usize] != Def::None {
            return Err(twice(path, text, name, offset, self.def_offset[i as usize]));
        }
        self.def[i as usize] = def;
        self.def_offset[i as usize] = offset;
        Ok(i)
    }
}

fn twice(path: &str, text: &str, name: &str, offset: usize, first: usize) -> ReadError {
    let line = Source { path, text }.locate(first).line;
    text_error(
        path,
        text,
        offset,
        format!("signal `{name}` is defined twice (first at line {line})"),
    )
}

/// Logical lines: comments cut, `\` continuations joined, tokens with their offsets.
struct LogicalLines<'a> {
    text: &'a str,
    pos: usize,
}

impl<'a> LogicalLines<'a> {
    /// Fills `tokens` with the next non-empty logical line; false at the end.
    fn next_into(&mut self, tokens: &mut Vec<(usize, &'a str)>) -> bool {
        tokens.clear();
        let text = self.text;
        loop {
            if self.pos >= text.len() {
                return !tokens.is_empty();
            }
            let start = self.pos;
            let end = text[start..].find('\n').map_or(text.len(), |i| start + i);
            self.pos = end + 1;
            let mut line = &text[start..end];
            if let Some(h) = line.find('#') {
                line = &line[..h];
            }
            let line = line.trim_end();
            let (body, continued) = match line.strip_suffix('\\') {
                Some(b) => (b, true),
                None => (line, false),
            };
            tokens.extend(super::tokens(text, body));
            if !continued && !tokens.is_empty() {
                return true;
            }
        }
    }
}

fn parse<'a>(path: &str, text: &'a str, budget: &mut Budget) -> Result<Vec<Model<'a>>, ReadError> {
    let err = |offset: usize, msg: String| text_error(path, text, offset, msg);
    let mut models: Vec<Model<'a>> = Vec::new();
    // Whether the last model is still open (no `.end` yet).
    let mut open = false;
    // The cover whose rows are being read, if any (index in the last model).
    let mut in_cover = false;
    let mut lines = LogicalLines { text, pos: 0 };
    let mut toks: Vec<(usize, &'a str)> = Vec::new();
    while lines.next_into(&mut toks) {
        let (at, head) = toks[0];
        if !head.starts_with('.') {
            if !in_cover {
                return Err(err(
                    at,
                    format!("unexpected `{head}`: rows belong after a `.names` line"),
                ));
            }
            let m = models.last_mut().expect("a cover is open");
            row(path, text, m, &toks, budget)?;
            continue;
        }
        in_cover = false;
        match head {
            ".model" => {
                let name = toks.get(1).map_or("", |t| t.1);
                if let Some(&(o, extra)) = toks.get(2) {
                    return Err(err(o, format!("unexpected `{extra}` after the model name")));
                }
                models.push(Model::new(name, at));
                open = true;
                continue;
            }
            ".end" => {
                if !open {
                    return Err(err(at, "`.end` outside a model".into()));
                }
                if let Some(&(o, extra)) = toks.get(1) {
                    return Err(err(o, format!("unexpected `{extra}` after `.end`")));
                }
                open = false;
                continue;
            }
            _ => {}
        }
        if !open {
            if models.is_empty() {
                // A file may start without `.model`: the design is unnamed.
                models.push(Model::new("", at));
                open = true;
            } else {
                return Err(err(at, format!("`{head}` outside a model (after `.end`)")));
            }
        }
        let top = models.len() == 1;
        let m = models.last_mut().expect("a model is open");
        match head {
            ".inputs" => {
                for &(o, name) in &toks[1..] {
                    let id = m.define(path, text, name, o, Def::Input)?;
                    m.inputs.push(id);
                }
                if top {
                    budget.inputs(m.inputs.len())?;
                }
            }
            ".outputs" => {
                for &(o, name) in &toks[1..] {
                    let id = m.use_at(name, o);
                    m.outputs.push(id);
                }
            }
            ".names" => {
                let Some(&(out_at, out)) = toks.last().filter(|_| toks.len() > 1) else {
                    return Err(err(at, "`.names` needs at least the output's name".into()));
                };
                let fanin_start = m.cover_fanins.len() as u32;
                for &(o, name) in &toks[1..toks.len() - 1] {
                    let id = m.use_at(name, o);
                    m.cover_fanins.push(id);
                }
                let c = m.covers.len() as u32;
                let output = m.define(path, text, out, out_at, Def::Cover(c))?;
                m.covers.push(Cover {
                    output,
                    line: at,
                    fanin_start,
                    fanin_len: (toks.len() - 2) as u32,
                    cube_start: m.cubes.len() as u32,
                    cube_len: 0,
                    on_set: true,
                });
                budget.charge(1, 0)?;
                m.own_nodes += 1;
                in_cover = true;
            }
            ".subckt" => {
                let Some(&(model_offset, model)) = toks.get(1) else {
                    return Err(err(at, "`.subckt` needs a model name".into()));
                };
                let binding_start = m.bindings.len() as u32;
                for &(o, b) in &toks[2..] {
                    let Some(eq) = b.find('=') else {
                        return Err(err(o, format!("expected `formal=actual`, found `{b}`")));
                    };
                    let (formal, actual) = (&b[..eq], &b[eq + 1..]);
                    if formal.is_empty() {
                        return Err(err(o, "missing formal name before `=`".into()));
                    }
                    if actual.is_empty() {
                        return Err(err(o + eq + 1, "missing actual signal after `=`".into()));
                    }
                    let actual_offset = o + eq + 1;
                    let actual = m.id(actual);
                    m.bindings.push(Binding {
                        formal,
                        formal_offset: o,
                        actual,
                        actual_offset,
                        formal_id: NONE,
                        is_output: false,
                    });
                }
                m.instances.push(Instance {
                    model,
                    model_offset,
                    binding_start,
                    binding_len: m.bindings.len() as u32 - binding_start,
                    sub: NONE,
                });
            }
            ".latch" | ".mlatch" => {
                return Err(err(
                    at,
                    format!("`{head}` is sequential: only combinational BLIF is read"),
                ))
            }
            ".gate" => {
                return Err(err(
                    at,
                    "`.gate` needs a cell library: only `.names` covers are read".into(),
                ))
            }
            _ => return Err(err(at, format!("unsupported BLIF directive `{head}`"))),
        }
    }
    if models.is_empty() {
        return Err(text_error(path, text, text.len(), "no model in the file"));
    }
    Ok(models)
}

/// One row of the open cover.
fn row<'a>(
    path: &str,
    text: &'a str,
    m: &mut Model<'a>,
    toks: &[(usize, &'a str)],
    budget: &mut Budget,
) -> Result<(), ReadError> {
    let err = |offset: usize, msg: String| text_error(path, text, offset, msg);
    let c = m.covers.last_mut().expect("a cover is open");
    let k = c.fanin_len as usize;
    let (plane, (out_at, out)) = if k == 0 {
        if toks.len() > 1 {
            return Err(err(
                toks[1].0,
                "a cover without inputs has rows of one output value".into(),
            ));
        }
        ((toks[0].0, ""), toks[0])
    } else {
        if toks.len() != 2 {
            let at = toks.get(2).map_or(toks[0].0 + toks[0].1.len(), |t| t.0);
            return Err(err(
                at,
                format!("expected an input plane of {k} characters and an output value"),
            ));
        }
        (toks[0], toks[1])
    };
    let (plane_at, plane) = plane;
    let n = plane.chars().count();
    if n != k {
        let at = if n > k {
            plane_at + plane.char_indices().nth(k).map_or(0, |(i, _)| i)
        } else {
            plane_at + plane.len()
        };
        return Err(err(
            at,
            format!("the input plane has {n} characters, the cover has {k} inputs"),
        ));
    }
    let mut literals = 0;
    for (i, ch) in plane.char_indices() {
        match ch {
            '0' | '1' => literals += 1,
            '-' => {}
            _ => {
                return Err(err(
                    plane_at + i,
                    format!("bad input plane character `{ch}` (expected 0, 1 or -)"),
                ))
            }
        }
    }
    let on = match out {
        "1" => true,
        "0" => false,
        _ => {
            return Err(err(
                out_at,
                format!("bad output value `{out}` (expected 0 or 1)"),
            ))
        }
    };
    if c.cube_len == 0 {
        c.on_set = on;
    } else if c.on_set != on {
        return Err(err(
            out_at,
            format!(
                "this row gives {}, the cover's earlier rows give {}: one cover lists either the on-set or the off-set",
                on as u8, c.on_set as u8
            ),
        ));
    }
    c.cube_len += 1;
    budget.charge(1, literals + 1)?;
    m.own_nodes += 1;
    m.own_fanins += literals + 1;
    m.cubes.push(plane_at);
    Ok(())
}

/// Binds instances to models and formals to their ports; checks definitions.
fn resolve(path: &str, text: &str, models: &mut [Model]) -> Result<(), ReadError> {
    let err = |offset: usize, msg: String| text_error(path, text, offset, msg);
    let mut by_name: HashMap<&str, u32> = HashMap::new();
    for (i, m) in models.iter().enumerate() {
        if by_name.insert(m.name, i as u32).is_some() {
            return Err(err(
                m.offset,
                format!("model `{}` is defined twice", m.name),
            ));
        }
    }
    // Which names each model declares as outputs, for O(1) port look-ups.
    let is_output: Vec<Vec<bool>> = models
        .iter()
        .map(|m| {
            let mut v = vec![false; m.names.len()];
            for &o in &m.outputs {
                v[o as usize] = true;
            }
            v
        })
        .collect();
    let mut ports: Vec<(u32, bool)> = Vec::new();
    let mut bound: std::collections::HashSet<u32> = std::collections::HashSet::new();
    for mi in 0..models.len() {
        for ii in 0..models[mi].instances.len() {
            let inst = &models[mi].instances[ii];
            let Some(&sub) = by_name.get(inst.model) else {
                return Err(ReadError::Malformed(
                    Source { path, text }
                        .error(
                            inst.model_offset,
                            format!("model `{}` is not in this file", inst.model),
                        )
                        .with_hint(
                            "`.subckt` is flattened only when its model is defined in the same file (hierarchical BLIF)",
                        ),
                ));
            };
            let (b0, bn) = (inst.binding_start as usize, inst.binding_len as usize);
            let sub_model = &models[sub as usize];
            ports.clear();
            bound.clear();
            for b in &models[mi].bindings[b0..b0 + bn] {
                let no_port = || {
                    err(
                        b.formal_offset,
                        format!("model `{}` has no port `{}`", sub_model.name, b.formal),
                    )
                };
                let &f = sub_model.ids.get(b.formal).ok_or_else(no_port)?;
                // A port that is both an input and an output of the model is
                // an input: its output side is the same actual signal.
                let input = sub_model.def[f as usize] == Def::Input;
                if !input && !is_output[sub as usize][f as usize] {
                    return Err(no_port());
                }
                if !bound.insert(f) {
                    return Err(err(
                        b.formal_offset,
                        format!("port `{}` is bound twice", b.formal),
                    ));
                }
                ports.push((f, !input));
            }
            if let Some(&missing) = sub_model.inputs.iter().find(|f| !bound.contains(f)) {
                return Err(err(
                    inst.model_offset,
                    format!(
                        "input `{}` of model `{}` is not connected",
                        sub_model.names[missing as usize], sub_model.name
                    ),
                ));
            }
            let m = &mut models[mi];
            m.instances[ii].sub = sub;
            for (k, &(f, output)) in ports.iter().enumerate() {
                let b = &mut m.bindings[b0 + k];
                b.formal_id = f;
                b.is_output = output;
                let (i, at) = (b.actual as usize, b.actual_offset);
                if output {
                    if m.def[i] != Def::None {
                        return Err(twice(path, text, m.names[i], at, m.def_offset[i]));
                    }
                    m.def[i] = Def::Instance;
                    m.def_offset[i] = at;
                } else {
                    m.first_use[i] = m.first_use[i].min(at);
                }
            }
        }
    }
    // Every used name must be defined; report the earliest such use.
    for m in models.iter() {
        let undefined = (0..m.names.len())
            .filter(|&i| m.def[i] == Def::None && m.first_use[i] != usize::MAX)
            .min_by_key(|&i| m.first_use[i]);
        if let Some(i) = undefined {
            return Err(err(
                m.first_use[i],
                format!("signal `{}` is used but never defined", m.names[i]),
            ));
        }
    }
    Ok(())
}

/// Refuses a model that instantiates itself, directly or not.
fn check_recursion(path: &str, text: &str, models: &[Model]) -> Result<(), ReadError> {
    // 0 new, 1 on the path, 2 done.
    let mut state = vec![0u8; models.len()];
    let mut stack: Vec<(u32, u32)> = Vec::new();
    for root in 0..models.len() {
        if state[root] != 0 {
            continue;
        }
        state[root] = 1;
        stack.push((root as u32, 0));
        while let Some(top) = stack.last_mut() {
            let (m, next) = (top.0 as usize, top.1 as usize);
            if next < models[m].instances.len() {
                top.1 += 1;
                let inst = &models[m].instances[next];
                let sub = inst.sub as usize;
                match state[sub] {
                    0 => {
                        state[sub] = 1;
                        stack.push((sub as u32, 0));
                    }
                    1 => {
                        return Err(text_error(
                            path,
                            text,
                            inst.model_offset,
                            format!(
                                "model `{}` instantiates itself (through this `.subckt`)",
                                inst.model
                            ),
                        ))
                    }
                    _ => {}
                }
            } else {
                state[m] = 2;
                stack.pop();
            }
        }
    }
    Ok(())
}

/// One cover of the flattened design: a cover of a model, in one instance.
#[derive(Clone, Copy)]
struct FlatCover {
    model: u32,
    cover: u32,
    /// Start of the instance's name table in `Flat::maps`.
    map: u32,
}

struct Flat {
    /// Global signal of each local name, per instance, back to back.
    maps: Vec<u32>,
    covers: Vec<FlatCover>,
    /// For each global signal: `NONE`, an input (`INPUT_FLAG | j`) or the
    /// index of the cover that defines it.
    driver: Vec<u32>,
    nodes: usize,
    fanins: usize,
}

const INPUT_FLAG: u32 = 1 << 31;

/// Expands every instance, depth first with an explicit stack, charging each
/// instance's nodes and wiring before allocating them.
fn flatten(models: &[Model], limits: &ReadLimits) -> Result<Flat, ReadError> {
    let mut budget = Budget::new(limits);
    let top = &models[0];
    budget.charge(top.own_nodes, top.own_fanins)?;
    let mut flat = Flat {
        maps: (0..top.names.len() as u32).collect(),
        covers: Vec::new(),
        driver: vec![NONE; top.names.len()],
        nodes: 0,
        fanins: 0,
    };
    for (j, &id) in top.inputs.iter().enumerate() {
        flat.driver[id as usize] = INPUT_FLAG | j as u32;
    }
    let mut stack: Vec<(u32, u32)> = vec![(0, 0)];
    while let Some((mi, base)) = stack.pop() {
        let m = &models[mi as usize];
        for (ci, c) in m.covers.iter().enumerate() {
            let g = flat.maps[(base + c.output) as usize];
            flat.driver[g as usize] = flat.covers.len() as u32;
            flat.covers.push(FlatCover {
                model: mi,
                cover: ci as u32,
                map: base,
            });
        }
        for inst in &m.instances {
            let sub = &models[inst.sub as usize];
            // Nodes and fanins, plus the wiring this instance copies and
            // walks: its name table and its covers' input lists.
            let wiring = sub.names.len() + sub.cover_fanins.len();
            budget.charge(sub.own_nodes, sub.own_fanins + wiring)?;
            let new = flat.maps.len();
            flat.maps.resize(new + sub.names.len(), NONE);
            let bindings = &m.bindings
                [inst.binding_start as usize..(inst.binding_start + inst.binding_len) as usize];
            for b in bindings {
                flat.maps[new + b.formal_id as usize] = flat.maps[(base + b.actual) as usize];
            }
            for slot in &mut flat.maps[new..] {
                if *slot == NONE {
                    *slot = flat.driver.len() as u32;
                    flat.driver.push(NONE);
                }
            }
            stack.push((inst.sub, new as u32));
        }
    }
    flat.nodes = budget.nodes;
    flat.fanins = budget.fanins;
    Ok(flat)
}

impl Flat {
    /// The model, the cover and the global fanins of flattened cover `d`.
    fn cover<'m>(&self, models: &'m [Model], d: usize) -> (&'m Model<'m>, &'m Cover, u32) {
        let FlatCover { model, cover, map } = self.covers[d];
        let m = &models[model as usize];
        (m, &m.covers[cover as usize], map)
    }
}

fn fanins<'m>(m: &'m Model, c: &Cover) -> &'m [u32] {
    let s = c.fanin_start as usize;
    &m.cover_fanins[s..s + c.fanin_len as usize]
}

/// The flattened covers in topological order, by iterative depth-first search.
fn sort(path: &str, text: &str, models: &[Model], flat: &Flat) -> Result<Vec<u32>, ReadError> {
    let n = flat.covers.len();
    // 0 new, 1 on the path, 2 done.
    let mut state = vec![0u8; n];
    let mut order = Vec::with_capacity(n);
    let mut stack: Vec<(u32, u32)> = Vec::new();
    for root in 0..n {
        if state[root] != 0 {
            continue;
        }
        state[root] = 1;
        stack.push((root as u32, 0));
        while let Some(top) = stack.last_mut() {
            let (d, next) = (top.0 as usize, top.1 as usize);
            let (m, c, map) = flat.cover(models, d);
            let fanins = fanins(m, c);
            if next < fanins.len() {
                top.1 += 1;
                let drv = flat.driver[flat.maps[(map + fanins[next]) as usize] as usize];
                if drv == NONE || drv & INPUT_FLAG != 0 {
                    continue;
                }
                match state[drv as usize] {
                    0 => {
                        state[drv as usize] = 1;
                        stack.push((drv, 0));
                    }
                    1 => {
                        let (m, c, _) = flat.cover(models, drv as usize);
                        return Err(text_error(
                            path,
                            text,
                            c.line,
                            format!(
                                "combinational cycle: `{}` depends on itself",
                                m.names[c.output as usize]
                            ),
                        ));
                    }
                    _ => {}
                }
            } else {
                state[d] = 2;
                order.push(d as u32);
                stack.pop();
            }
        }
    }
    Ok(order)
}

fn emit(text: &str, models: &[Model], flat: &Flat, order: &[u32]) -> Netlist {
    let top = &models[0];
    let inputs = top
        .inputs
        .iter()
        .map(|&i| top.names[i as usize].to_string())
        .collect();
    let mut net = Netlist::new(inputs);
    net.reserve(flat.nodes, flat.fanins);
    let mut edge = vec![Edge::FALSE; flat.driver.len()];
    for (j, &id) in top.inputs.iter().enumerate() {
        edge[id as usize] = net.input_edge(j);
    }
    let bytes = text.as_bytes();
    let mut cube_edges: Vec<Edge> = Vec::new();
    let mut literals: Vec<Edge> = Vec::new();
    for &d in order {
        let (m, c, map) = flat.cover(models, d as usize);
        let fanins = fanins(m, c);
        cube_edges.clear();
        let cs = c.cube_start as usize;
        for &plane_at in &m.cubes[cs..cs + c.cube_len as usize] {
            literals.clear();
            let plane = &bytes[plane_at..plane_at + fanins.len()];
            for (&ch, &f) in plane.iter().zip(fanins) {
                let e = edge[flat.maps[(map + f) as usize] as usize];
                match ch {
                    b'1' => literals.push(e),
                    b'0' => literals.push(e.inverted()),
                    _ => {}
                }
            }
            cube_edges.push(net.add_node(NodeKind::And, &literals));
        }
        let value = net
            .add_node(NodeKind::Or, &cube_edges)
            .complemented_if(!c.on_set);
        edge[flat.maps[(map + c.output) as usize] as usize] = value;
    }
    for &o in &top.outputs {
        net.add_output(top.names[o as usize].to_string(), edge[o as usize], None);
    }
    net
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Result<Netlist, ReadError> {
        read_blif("t.blif", text, &ReadLimits::default())
    }

    fn error_at(text: &str) -> (usize, usize, String) {
        match read(text) {
            Err(ReadError::Malformed(e)) => (e.location.line, e.location.column, e.message()),
            other => panic!("expected an error, got {other:?}"),
        }
    }

    #[test]
    fn covers_are_transcribed_as_written() {
        // f = !(a & !b) written as an off-set cover; g = const 1; h = const 0.
        let n = read(".model m\n.inputs a b\n.outputs f g h\n.names a b f\n10 0\n.names g\n 1\n.names h\n.end\n")
            .unwrap();
        // f: one AND + one OR; g: one AND (no literals) + OR; h: OR with no cubes.
        assert_eq!(n.node_count(), 5);
        assert_eq!(
            n.node(0),
            (
                NodeKind::And,
                &[Edge::new(1, false), Edge::new(2, true)][..]
            )
        );
        assert_eq!(n.node(1), (NodeKind::Or, &[Edge::new(3, false)][..]));
        assert_eq!(n.outputs()[0].edge, Edge::new(4, true));
        for m in 0..4u32 {
            let (a, b) = (m & 1 == 1, m & 2 == 2);
            assert_eq!(n.eval(&[a, b]), vec![!a || b, true, false]);
        }
    }

    #[test]
    fn covers_in_any_order_and_continuations() {
        let n =
            read(".model m\n.inputs a \\\n b\n.outputs y\n.names t b y\n11 1\n.names a t\n0 1\n")
                .unwrap();
        assert_eq!(n.inputs(), ["a", "b"]);
        for m in 0..4u32 {
            let (a, b) = (m & 1 == 1, m & 2 == 2);
            assert_eq!(n.eval(&[a, b]), vec![!a && b]);
        }
    }

    #[test]
    fn hierarchy_is_flattened() {
        // top: y = xor2(a, b) & c, with xor2 a model defined after the top.
        // `thru` has a port that is both input and output, `inv` is used inside `xor2`.
        let text = ".model top\n.inputs a b c\n.outputs y c\n.subckt xor2 x=a z=t w=b\n.subckt thru i=c\n.names t c y\n11 1\n.end\n\
                    .model xor2\n.inputs x w\n.outputs z\n.subckt inv i=w o=nw\n.names x nw z\n11 1\n00 1\n.end\n\
                    .model thru\n.inputs i\n.outputs i\n.end\n\
                    .model inv\n.inputs i\n.outputs o\n.names i o\n0 1\n.end\n";
        let n = read(text).unwrap();
        for m in 0..8u32 {
            let (a, b, c) = (m & 1 == 1, m & 2 == 2, m & 4 == 4);
            assert_eq!(n.eval(&[a, b, c]), vec![(a ^ b) && c, c]);
        }
    }

    #[test]
    fn hierarchy_errors() {
        let (l, c, m) =
            error_at(".model top\n.inputs a\n.outputs y\n.subckt nowhere q=a r=y\n.end\n");
        assert_eq!((l, c), (4, 9), "{m}");
        assert!(m.contains("not in this file"));
        let rec = ".model a\n.inputs x\n.outputs y\n.subckt b i=x o=y\n.end\n.model b\n.inputs i\n.outputs o\n.subckt a x=i y=o\n.end\n";
        let (l, c, m) = error_at(rec);
        assert!(m.contains("instantiates itself"), "{m}");
        assert_eq!((l, c), (9, 9));
        let unbound = ".model a\n.inputs x\n.outputs y\n.subckt b o=y\n.end\n.model b\n.inputs i\n.outputs o\n.names i o\n1 1\n.end\n";
        let (l, c, m) = error_at(unbound);
        assert_eq!((l, c), (4, 9), "{m}");
        assert!(m.contains("input `i` of model `b` is not connected"), "{m}");
        let noport = ".model a\n.inputs x\n.outputs y\n.subckt b i=x q=y\n.end\n.model b\n.inputs i\n.outputs o\n.names i o\n1 1\n.end\n";
        let (l, c, m) = error_at(noport);
        assert_eq!((l, c), (4, 15), "{m}");
        let twice = ".model a\n.inputs x\n.outputs y\n.names x y\n1 1\n.subckt b i=x o=y\n.end\n.model b\n.inputs i\n.outputs o\n.names i o\n1 1\n.end\n";
        let (l, c, m) = error_at(twice);
        assert_eq!((l, c), (6, 17), "{m}");
        assert!(m.contains("defined twice (first at line 4)"), "{m}");
    }

    #[test]
    fn malformed_lines_are_located() {
        let head = ".model m\n.inputs a b\n.outputs y\n";
        let cases: &[(&str, (usize, usize), &str)] = &[
            (
                ".names a b y\n1 1\n",
                (5, 2),
                "input plane has 1 characters",
            ),
            (
                ".names a b y\n111 1\n",
                (5, 3),
                "input plane has 3 characters",
            ),
            (
                ".names a b y\n1x 1\n",
                (5, 2),
                "bad input plane character `x`",
            ),
            (".names a b y\n11 2\n", (5, 4), "bad output value `2`"),
            (".names a b y\n11 1\n00 0\n", (6, 4), "this row gives 0"),
            (".names a b y\n11 1 1\n", (5, 6), "expected an input plane"),
            (
                ".names a q y\n11 1\n",
                (4, 10),
                "`q` is used but never defined",
            ),
            (
                ".names a b y\n11 1\n.names a y\n1 1\n",
                (6, 10),
                "defined twice (first at line 4)",
            ),
            (
                ".names a b a\n11 1\n",
                (4, 12),
                "defined twice (first at line 2)",
            ),
            (".latch a y 0\n", (4, 1), "sequential"),
            (
                ".names a b y\n11 1\n.exdc\n",
                (6, 1),
                "unsupported BLIF directive `.exdc`",
            ),
            ("11 1\n", (4, 1), "rows belong after a `.names`"),
            (".names\n", (4, 1), "needs at least the output"),
        ];
        for &(body, (line, col), msg) in cases {
            let (l, c, m) = error_at(&format!("{head}{body}"));
            assert_eq!((l, c), (line, col), "{body}: {m}");
            assert!(m.contains(msg), "{body}: {m}");
        }
        let (l, c, m) =
            error_at(".model m\n.inputs a\n.outputs y\n.names y t\n1 1\n.names t y\n1 1\n");
        assert_eq!((l, c), (4, 1), "{m}");
        assert!(m.contains("combinational cycle"), "{m}");
        let (l, c, m) = error_at(".model m\n.outputs y\n");
        assert_eq!((l, c), (2, 10), "{m}");
        let (l, c, m) = error_at(".model m\n.end\n.names y\n");
        assert_eq!((l, c), (3, 1), "{m}");
    }

    #[test]
    fn limits_stop_reading() {
        let text = ".model m\n.inputs a b c\n.outputs y\n.names a b y\n11 1\n";
        let tight = ReadLimits {
            max_inputs: 2,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_blif("t", text, &tight),
            Err(ReadError::Limit {
                what: "inputs",
                value: 3,
                limit: 2
            })
        ));
        let tight = ReadLimits {
            max_nodes: 1,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_blif("t", text, &tight),
            Err(ReadError::Limit { what: "nodes", .. })
        ));
        // Each of 10 instances of a 2-node model: 20 nodes after flattening.
        let mut h = String::from(".model top\n.inputs a\n.outputs\n");
        for k in 0..10 {
            h.push_str(&format!(".subckt buf i=a o=t{k}\n"));
        }
        h.push_str(".end\n.model buf\n.inputs i\n.outputs o\n.names i o\n1 1\n.end\n");
        let tight = ReadLimits {
            max_nodes: 19,
            ..ReadLimits::default()
        };
        assert!(matches!(
            read_blif("t", &h, &tight),
            Err(ReadError::Limit { what: "nodes", .. })
        ));
        let ok = ReadLimits {
            max_nodes: 20,
            ..ReadLimits::default()
        };
        assert_eq!(read_blif("t", &h, &ok).unwrap().node_count(), 20);
    }
}
