//! Supergate generation: cheap multi-cell implementations of functions of up
//! to four cut leaves.
//!
//! A cut whose function no single cell realises can still be covered in one
//! step by a small tree of cells (a *supergate*). The generator enumerates,
//! over four variables, each cell on literal and constant inputs (level 1),
//! a cell with one level-1 child (level 2), a cell with two level-1 children
//! of at most two variables each, and a cell of at most two inputs over a
//! level-2 child (level 3). For every function it keeps the cheapest
//! implementation by area, the fastest by delay, and the cheapest by area
//! with an inverter charged for each complemented leaf (the cover decides
//! whether a complemented leaf is free; a table that kept only the raw
//! cheapest would map a NOR3 as an AND3 behind three inverters), and one
//! implementation of the least area for every set of leaf phases it can be
//! had with (ties in area go to the one generated first, never to the
//! faster, so the area-optimal entries do not depend on delays). The bounds keep the
//! enumeration to a few million table evaluations, done once per library.
//! Functions are handled as 16-bit tables during generation and handed to
//! the match table in replicated 64-bit form.

use super::implementation::{ImplGate, Implementation, KeepCosts, Source, KEEP_CRITERIA};
use super::small_truth::{depends_on, replicate};
use crate::library::Library;
use rustc_hash::FxHashMap;

const VARS: usize = 4;
const VAR16: [u16; 4] = [0xAAAA, 0xCCCC, 0xF0F0, 0xFF00];

/// Per keep criterion (in the order of [`KEEP_CRITERIA`]), the best
/// implementation found per 16-bit function.
type Best = [Vec<u32>; 3];

/// The index of the cheapest-by-area criterion in [`Best`].
const CHEAPEST: usize = 0;

struct Generator<'a> {
    lib: &'a Library,
    load: f32,
    impls: Vec<Implementation>,
    /// Per implementation: its function and costs.
    costs: Vec<(u16, KeepCosts)>,
    best: Best,
    /// Per function: the least-area implementations offered first with
    /// each set of leaf phases (see [`MatchTable::add`](super::MatchTable::add)).
    ties: FxHashMap<u16, Vec<(u16, u32)>>,
    inverter_area: f64,
}

const NONE: u32 = u32::MAX;

/// Area differences smaller than this are ties.
const AREA_TIE: f32 = 1e-6;

impl<'a> Generator<'a> {
    /// Whether an implementation of `f` with these costs, reading the leaf
    /// phases `phases` (as [`Implementation::leaf_phases`]), would become
    /// one of the kept ones: it beats one under a criterion, or its area
    /// ties the least so far with a set of leaf phases not seen yet. Asked
    /// before the implementation is built, so that [`Generator::offer`]
    /// builds only likely keepers.
    fn better(&self, f: u16, costs: &KeepCosts, phases: u16) -> bool {
        self.beats_a_criterion(f, costs) || {
            let id = self.best[CHEAPEST][f as usize];
            costs.area <= self.costs[id as usize].1.area + AREA_TIE && self.new_phases(f, phases)
        }
    }

    /// Whether no least-area implementation of `f` kept so far reads
    /// exactly the leaf phases `phases`.
    fn new_phases(&self, f: u16, phases: u16) -> bool {
        self.ties
            .get(&f)
            .is_none_or(|t| t.iter().all(|&(p, _)| p != phases))
    }

    /// Whether an implementation of `f` with these costs beats a kept one
    /// under some keep criterion.
    fn beats_a_criterion(&self, f: u16, costs: &KeepCosts) -> bool {
        KEEP_CRITERIA.iter().zip(&self.best).any(|(better, best)| {
            let id = best[f as usize];
            id == NONE || better(costs, &self.costs[id as usize].1)
        })
    }

    fn offer(&mut self, gates: Vec<ImplGate>) {
        let Some(imp) = Implementation::new(self.lib, gates) else {
            return;
        };
        let f = (imp.function & 0xFFFF) as u16;
        let costs = KeepCosts::of(&imp, self.inverter_area, self.load);
        let phases = imp.leaf_phases();
        let cheapest = self.best[CHEAPEST][f as usize];
        let least = if cheapest == NONE {
            f32::INFINITY
        } else {
            self.costs[cheapest as usize].1.area
        };
        let tie = costs.area <= least + AREA_TIE;
        let new_phases = tie && self.new_phases(f, phases);
        if !new_phases && !self.beats_a_criterion(f, &costs) {
            return;
        }
        let id = self.impls.len() as u32;
        self.impls.push(imp);
        self.costs.push((f, costs));
        for (better, best) in KEEP_CRITERIA.iter().zip(self.best.iter_mut()) {
            let kept = best[f as usize];
            if kept == NONE || better(&costs, &self.costs[kept as usize].1) {
                best[f as usize] = id;
            }
        }
        if costs.area < least - AREA_TIE {
            self.ties.insert(f, vec![(phases, id)]);
        } else if new_phases {
            self.ties.entry(f).or_default().push((phases, id));
        }
    }
}

fn eval16(truth: u64, inputs: &[u16]) -> u16 {
    let mut out = 0u16;
    for r in 0..(1usize << inputs.len()) {
        if (truth >> r) & 1 == 1 {
            let mut m = u16::MAX;
            for (i, &t) in inputs.iter().enumerate() {
                m &= if (r >> i) & 1 == 1 { t } else { !t };
            }
            out |= m;
        }
    }
    out
}

fn atoms() -> Vec<(Source, u16)> {
    let mut a = Vec::new();
    for (v, &table) in VAR16.iter().enumerate() {
        a.push((
            Source::Leaf {
                var: v as u8,
                complemented: false,
            },
            table,
        ));
        a.push((
            Source::Leaf {
                var: v as u8,
                complemented: true,
            },
            !table,
        ));
    }
    a.push((Source::Constant(false), 0));
    a.push((Source::Constant(true), u16::MAX));
    a
}

/// The leaf phases (as [`Implementation::leaf_phases`]) the atoms `t`
/// read.
fn atom_phases(atoms: &[(Source, u16)], t: &[usize]) -> u16 {
    t.iter().fold(0, |m, &i| match atoms[i].0 {
        Source::Leaf { var, complemented } => m | 1 << (2 * var as u16 + complemented as u16),
        _ => m,
    })
}

fn is_atomic(f: u16) -> bool {
    f == 0 || f == u16::MAX || VAR16.iter().any(|&v| f == v || f == !v)
}

fn support16(f: u16) -> u32 {
    (0..VARS)
        .filter(|&v| depends_on(replicate(f as u64, VARS), v))
        .count() as u32
}

/// Enumerates the tuples of `n` atoms (indices into the atom list).
fn for_each_tuple(n: usize, atoms: usize, mut f: impl FnMut(&[usize])) {
    let mut idx = vec![0usize; n];
    loop {
        f(&idx);
        let mut i = 0;
        loop {
            if i == n {
                return;
            }
            idx[i] += 1;
            if idx[i] < atoms {
                break;
            }
            idx[i] = 0;
            i += 1;
        }
    }
}

/// Shifts the gate references of `gates` by `offset`.
fn shifted(gates: &[ImplGate], offset: u8) -> impl Iterator<Item = ImplGate> + '_ {
    gates.iter().map(move |g| ImplGate {
        cell: g.cell,
        inputs: g
            .inputs
            .iter()
            .map(|s| match *s {
                Source::Gate(j) => Source::Gate(j + offset),
                other => other,
            })
            .collect(),
    })
}

/// Generates single-cell and supergate implementations of all functions of
/// up to four variables the library reaches within the bounds above, plus
/// every input permutation and phase of cells with five or six inputs.
/// `typical_load` is the load assumed at the output when ranking by delay.
pub fn generate(lib: &Library, typical_load: f32) -> Vec<Implementation> {
    let mut g = Generator {
        lib,
        load: typical_load,
        impls: Vec::new(),
        costs: Vec::new(),
        best: [
            vec![NONE; 1 << 16],
            vec![NONE; 1 << 16],
            vec![NONE; 1 << 16],
        ],
        ties: FxHashMap::default(),
        inverter_area: Implementation::inverter_area(lib),
    };
    let atoms = atoms();
    let small_cells: Vec<usize> = (0..lib.cells.len())
        .filter(|&c| lib.cells[c].arity() >= 1 && lib.cells[c].arity() <= VARS)
        .collect();

    // Level 1: one cell over literals and constants.
    let mut ins = [0u16; 6];
    for &c in &small_cells {
        let cell = &lib.cells[c];
        let a = cell.arity();
        for_each_tuple(a, atoms.len(), |t| {
            if t.iter().all(|&i| matches!(atoms[i].0, Source::Constant(_))) {
                return;
            }
            for (k, &i) in t.iter().enumerate() {
                ins[k] = atoms[i].1;
            }
            let f = eval16(cell.truth, &ins[..a]);
            if f == 0 || f == u16::MAX {
                return;
            }
            let area = cell.area as f32;
            let delay = (cell.delay.intrinsic + cell.delay.per_load * typical_load as f64) as f32;
            if g.better(
                f,
                &KeepCosts::before_leaves(area, delay),
                atom_phases(&atoms, t),
            ) {
                g.offer(vec![ImplGate {
                    cell: c as u32,
                    inputs: t.iter().map(|&i| atoms[i].0).collect(),
                }]);
            }
        });
    }
    let level1 = children(&g);

    // Level 2: a cell of at most three inputs with one level-1 child.
    let roots: Vec<usize> = small_cells
        .iter()
        .copied()
        .filter(|&c| lib.cells[c].arity() <= 3)
        .collect();
    compose_one_child(&mut g, &roots, &level1, &atoms);
    let level2: Vec<u32> = children(&g)
        .into_iter()
        .filter(|&id| g.impls[id as usize].gates.len() == 2)
        .collect();

    // Level 3: two small level-1 children; or a narrow cell over a level-2 child.
    let small: Vec<u32> = level1
        .iter()
        .copied()
        .filter(|&id| support16(g.costs[id as usize].0) <= 2)
        .collect();
    for &r in &roots {
        let cell = &lib.cells[r];
        let a = cell.arity();
        if a < 2 {
            continue;
        }
        for p in 0..a {
            for q in p + 1..a {
                let rest = a - 2;
                for &c1 in &small {
                    for &c2 in &small {
                        let f1 = g.costs[c1 as usize].0;
                        let f2 = g.costs[c2 as usize].0;
                        let base_area = cell.area as f32
                            + g.costs[c1 as usize].1.area
                            + g.costs[c2 as usize].1.area;
                        let d1 = g.impls[c1 as usize].delay(cell.input_load as f32);
                        let d2 = g.impls[c2 as usize].delay(cell.input_load as f32);
                        let kid_phases =
                            g.impls[c1 as usize].leaf_phases() | g.impls[c2 as usize].leaf_phases();
                        for_each_tuple(rest, atoms.len(), |t| {
                            let mut k = 0;
                            for (pin, slot) in ins.iter_mut().enumerate().take(a) {
                                *slot = if pin == p {
                                    f1
                                } else if pin == q {
                                    f2
                                } else {
                                    k += 1;
                                    atoms[t[k - 1]].1
                                };
                            }
                            let f = eval16(cell.truth, &ins[..a]);
                            if is_atomic(f) {
                                return;
                            }
                            let delay = d1.max(d2)
                                + (cell.delay.intrinsic + cell.delay.per_load * typical_load as f64)
                                    as f32;
                            let phases = kid_phases | atom_phases(&atoms, t);
                            if !g.better(f, &KeepCosts::before_leaves(base_area, delay), phases) {
                                return;
                            }
                            let g1 = g.impls[c1 as usize].gates.clone();
                            let g2 = g.impls[c2 as usize].gates.clone();
                            let n1 = g1.len() as u8;
                            let n2 = g2.len() as u8;
                            let mut gates = g1;
                            gates.extend(shifted(&g2, n1));
                            let mut k = 0;
                            let inputs = (0..a)
                                .map(|pin| {
                                    if pin == p {
                                        Source::Gate(n1 - 1)
                                    } else if pin == q {
                                        Source::Gate(n1 + n2 - 1)
                                    } else {
                                        k += 1;
                                        atoms[t[k - 1]].0
                                    }
                                })
                                .collect();
                            gates.push(ImplGate {
                                cell: r as u32,
                                inputs,
                            });
                            g.offer(gates);
                        });
                    }
                }
            }
        }
    }
    let narrow: Vec<usize> = roots
        .iter()
        .copied()
        .filter(|&c| lib.cells[c].arity() <= 2)
        .collect();
    compose_one_child(&mut g, &narrow, &level2, &atoms);

    // Collect the survivors: best by area, by delay and by area with
    // complemented leaves paid for, per function (repeats go below).
    let mut keep: Vec<u32> = Vec::new();
    for f in 0..(1usize << 16) {
        keep.extend(g.best.iter().map(|best| best[f]).filter(|&id| id != NONE));
        if let Some(ties) = g.ties.get(&(f as u16)) {
            keep.extend(ties.iter().map(|&(_, id)| id));
        }
    }
    keep.sort_unstable();
    keep.dedup();
    let mut out: Vec<Implementation> = keep
        .into_iter()
        .map(|id| g.impls[id as usize].clone())
        .collect();
    for imp in &mut out {
        imp.function = replicate(imp.function & 0xFFFF, VARS);
    }
    out.extend(wide_cells(lib));
    out
}

/// Best-by-area implementations per function, non-atomic, in function order.
fn children(g: &Generator) -> Vec<u32> {
    (0..(1usize << 16))
        .filter(|&f| !is_atomic(f as u16))
        .filter_map(|f| {
            let id = g.best[CHEAPEST][f];
            (id != NONE).then_some(id)
        })
        .collect()
}

fn compose_one_child(g: &mut Generator, roots: &[usize], kids: &[u32], atoms: &[(Source, u16)]) {
    let lib = g.lib;
    let load = g.load;
    let mut ins = [0u16; 6];
    for &r in roots {
        let cell = &lib.cells[r];
        let a = cell.arity();
        for p in 0..a {
            for &child in kids {
                let fc = g.costs[child as usize].0;
                let area = cell.area as f32 + g.costs[child as usize].1.area;
                let dc = g.impls[child as usize].delay(cell.input_load as f32);
                let kid_phases = g.impls[child as usize].leaf_phases();
                let delay = dc + (cell.delay.intrinsic + cell.delay.per_load * load as f64) as f32;
                for_each_tuple(a - 1, atoms.len(), |t| {
                    let mut k = 0;
                    for (pin, slot) in ins.iter_mut().enumerate().take(a) {
                        *slot = if pin == p {
                            fc
                        } else {
                            k += 1;
                            atoms[t[k - 1]].1
                        };
                    }
                    let f = eval16(cell.truth, &ins[..a]);
                    if is_atomic(f) {
                        return;
                    }
                    let phases = kid_phases | atom_phases(atoms, t);
                    if !g.better(f, &KeepCosts::before_leaves(area, delay), phases) {
                        return;
                    }
                    let mut gates = g.impls[child as usize].gates.clone();
                    let n = gates.len() as u8;
                    let mut k = 0;
                    let inputs = (0..a)
                        .map(|pin| {
                            if pin == p {
                                Source::Gate(n - 1)
                            } else {
                                k += 1;
                                atoms[t[k - 1]].0
                            }
                        })
                        .collect();
                    gates.push(ImplGate {
                        cell: r as u32,
                        inputs,
                    });
                    g.offer(gates);
                });
            }
        }
    }
}

/// Cells with five or six inputs, in every input permutation and phase.
fn wide_cells(lib: &Library) -> Vec<Implementation> {
    let mut out = Vec::new();
    for (c, cell) in lib.cells.iter().enumerate() {
        let a = cell.arity();
        if a <= VARS {
            continue;
        }
        let mut perm: Vec<u8> = (0..a as u8).collect();
        permutations(&mut perm, 0, &mut |p| {
            for neg in 0..(1u32 << a) {
                let inputs = p
                    .iter()
                    .enumerate()
                    .map(|(i, &v)| Source::Leaf {
                        var: v,
                        complemented: (neg >> i) & 1 == 1,
                    })
                    .collect();
                if let Some(imp) = Implementation::new(
                    lib,
                    vec![ImplGate {
                        cell: c as u32,
                        inputs,
                    }],
                ) {
                    out.push(imp);
                }
            }
        });
    }
    out
}

fn permutations(p: &mut Vec<u8>, k: usize, f: &mut impl FnMut(&[u8])) {
    if k == p.len() {
        f(p);
        return;
    }
    for i in k..p.len() {
        p.swap(k, i);
        permutations(p, k + 1, f);
        p.swap(k, i);
    }
}
