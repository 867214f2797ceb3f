//! The SAT encoding of "a network of exactly k steps computes these
//! functions", and its decoding.
//!
//! Variables (following the published single-selection encodings of
//! SAT-based exact synthesis):
//! - `x[i][t]`: the value of step `i` on truth-table row `t`;
//! - `s[i][T]`: step `i` reads the fanin tuple `T` (strictly increasing node
//!   indices: literals first, then earlier steps);
//! - `f[i][a][p]`: the local function of step `i` on input pattern `p`, for
//!   each fanin count `a` the gates offer;
//! - `g[i][v]`: step `i` is gate variant `v`, which fixes `f[i][arity(v)]`;
//! - `o[h][i]` and `c[h]`: output `h` is step `i`, complemented when `c[h]`.
//!
//! Constraints: the chosen local function holds on every row; every step has
//! a tuple and a gate of the tuple's arity; every output is some step.
//! Symmetry breaking: every step is used (by a later step or an output);
//! consecutive steps have colexicographically ordered fanin tuples, and two
//! consecutive steps on the same tuple have strictly increasing variants (a
//! minimal network never holds two equal steps). With `Shape::minimal`, the
//! stronger facts of a network no step of which can be removed: no step is a
//! constant or equals a literal, and an inverter never reads a step whose
//! gate has a complemented twin (no dearer than gate and inverter together)
//! unless that step has another user. In normal mode, and when no step may be
//! an inverter, also every two steps differ; with inverters that fact is left
//! out, because its row-by-row difference variables made the hardest
//! four-input proofs two to seven times slower, while without them they let
//! more of the hardest searches finish within the usual conflict limit.
//! With `Shape::max_single_input`, at most that many steps are inverters.
//! Optional side constraints: a depth limit (order-encoded levels) and an
//! area limit (order-encoded partial sums of integer-scaled areas).
//!
//! In *normal* mode (complements free and the gates closed under negation)
//! every step has value 0 on row 0, so row 0 is dropped and only normal
//! variants are offered.

use super::gates::Variant;
use super::limits::{Budget, BudgetWriter};
use std::collections::BTreeMap;
use varisat::{CnfFormula, ExtendFormula, Lit, ProofFormat, Solver};

/// What the network must compute and from what.
pub(crate) struct Problem<'a> {
    /// Number of network inputs (at most 5).
    pub inputs: usize,
    /// Normal mode: rows without row 0, positive literals only.
    pub normal: bool,
    /// Negated inputs are available as literals (non-normal free mode).
    pub negated_inputs: bool,
    /// Output polarity is free (non-normal free mode).
    pub free_output_polarity: bool,
    /// Variants a step may be.
    pub variants: &'a [Variant],
    /// Functions to realise (distinct; normalised in normal mode).
    pub targets: Vec<u64>,
    /// Per variant: the variant index of its complemented twin (same arity,
    /// negated function) when the twin costs no more than the variant and an
    /// inverter together, so an inverter on its output alone is never minimal.
    pub absorbs_inverter: Vec<Option<usize>>,
}

/// Shape constraints of one SAT call.
#[derive(Clone, Debug)]
pub(crate) struct Shape {
    /// Exact number of steps.
    pub steps: usize,
    /// Maximum level of any step.
    pub depth: Option<usize>,
    /// Require every step to feed a later step or an output.
    pub all_used: bool,
    /// Require the properties of a network from which no step can be
    /// removed (see the module comment). Sound whenever removing a step and
    /// redirecting its users never makes the objective worse: cells and area,
    /// not depth.
    pub minimal: bool,
    /// At most this many steps may be single-input cells (inverters): a
    /// lower bound on the multi-input cells leaves `steps - bound` of them.
    pub max_single_input: Option<usize>,
    /// Integer cost of each variant and the largest allowed sum.
    pub area: Option<(Vec<u64>, u64)>,
}

/// A node of the decoded network: a literal or a step.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Node {
    /// Network input `index`, complemented or not.
    Literal { input: usize, complemented: bool },
    /// Step `index`.
    Step(usize),
}

/// A decoded network.
#[derive(Clone, Debug)]
pub(crate) struct Decoded {
    /// Per step: variant index and fanins.
    pub steps: Vec<(usize, Vec<Node>)>,
    /// Per target: the step and whether it is complemented.
    pub outputs: Vec<(usize, bool)>,
}

/// Outcome of one SAT call.
pub(crate) enum Outcome {
    /// A network exists.
    Found(Decoded),
    /// No network of this shape exists.
    Impossible,
    /// A resource limit stopped the solver.
    Stopped,
}

#[derive(Clone, Copy)]
enum Value {
    Const(bool),
    Var(Lit),
}

/// Builds and solves the instance for `shape`.
// Steps, rows and patterns index several parallel arrays at once.
#[allow(clippy::needless_range_loop)]
pub(crate) fn solve(problem: &Problem, shape: &Shape, budget: &Budget) -> Outcome {
    let k = shape.steps;
    let n = problem.inputs;
    let mut cnf = CnfFormula::new();
    let literals: Vec<(usize, bool)> = (0..n)
        .map(|i| (i, false))
        .chain((0..n).filter(|_| problem.negated_inputs).map(|i| (i, true)))
        .collect();
    let lcount = literals.len();
    let rows: Vec<usize> = (if problem.normal { 1 } else { 0 }..(1usize << n)).collect();
    let mut arities: Vec<usize> = problem.variants.iter().map(|v| v.arity).collect();
    arities.sort_unstable();
    arities.dedup();

    // x[i][row index]
    let x: Vec<Vec<Lit>> = (0..k)
        .map(|_| rows.iter().map(|_| cnf.new_lit()).collect())
        .collect();
    let value = |node: usize, ri: usize| -> Value {
        if node < lcount {
            let (input, complemented) = literals[node];
            Value::Const(((rows[ri] >> input) & 1 == 1) != complemented)
        } else {
            Value::Var(x[node - lcount][ri])
        }
    };

    // Fanin tuples per step.
    let mut tuples: Vec<Vec<(Vec<usize>, Lit)>> = Vec::with_capacity(k);
    for i in 0..k {
        let available = lcount + i;
        let mut list = Vec::new();
        for &a in &arities {
            for tuple in combinations(available, a) {
                let clash = tuple.iter().enumerate().any(|(p, &u)| {
                    u < lcount
                        && tuple[p + 1..]
                            .iter()
                            .any(|&w| w < lcount && literals[w].0 == literals[u].0)
                });
                if clash {
                    continue;
                }
                list.push((tuple, cnf.new_lit()));
            }
        }
        let at_least_one: Vec<Lit> = list.iter().map(|(_, l)| *l).collect();
        cnf.add_clause(&at_least_one);
        tuples.push(list);
    }

    // Local function bits and gate choices.
    let max_arity = arities.iter().copied().max().unwrap_or(0);
    let mut fbits: Vec<Vec<Vec<Option<Lit>>>> = Vec::with_capacity(k);
    let mut gvars: Vec<Vec<Lit>> = Vec::with_capacity(k);
    for i in 0..k {
        let mut per_arity = vec![Vec::new(); max_arity + 1];
        for &a in &arities {
            per_arity[a] = (0..(1usize << a))
                .map(|p| {
                    if problem.normal && p == 0 {
                        None
                    } else {
                        Some(cnf.new_lit())
                    }
                })
                .collect();
        }
        let g: Vec<Lit> = problem.variants.iter().map(|_| cnf.new_lit()).collect();
        for (v, variant) in problem.variants.iter().enumerate() {
            for (p, bit) in per_arity[variant.arity].iter().enumerate() {
                let wanted = variant.truth >> p & 1 == 1;
                match bit {
                    Some(b) => cnf.add_clause(&[!g[v], if wanted { *b } else { !*b }]),
                    None if wanted => cnf.add_clause(&[!g[v]]),
                    None => {}
                }
            }
        }
        for &a in &arities {
            let gates_of_arity: Vec<Lit> = problem
                .variants
                .iter()
                .enumerate()
                .filter(|(_, v)| v.arity == a)
                .map(|(v, _)| g[v])
                .collect();
            for (tuple, sel) in &tuples[i] {
                if tuple.len() == a {
                    let mut clause = vec![!*sel];
                    clause.extend(&gates_of_arity);
                    cnf.add_clause(&clause);
                }
            }
        }
        fbits.push(per_arity);
        gvars.push(g);
    }

    // The chosen function holds on every row.
    let mut clause = Vec::with_capacity(8);
    for i in 0..k {
        for (tuple, sel) in &tuples[i] {
            let a = tuple.len();
            for ri in 0..rows.len() {
                'pattern: for p in 0..(1usize << a) {
                    clause.clear();
                    clause.push(!*sel);
                    for (j, &node) in tuple.iter().enumerate() {
                        let bit = p >> j & 1 == 1;
                        match value(node, ri) {
                            Value::Const(c) if c != bit => continue 'pattern,
                            Value::Const(_) => {}
                            Value::Var(l) => clause.push(if bit { !l } else { l }),
                        }
                    }
                    let xi = x[i][ri];
                    match fbits[i][a][p] {
                        Some(f) => {
                            let base = clause.len();
                            clause.push(!xi);
                            clause.push(f);
                            cnf.add_clause(&clause);
                            clause.truncate(base);
                            clause.push(xi);
                            clause.push(!f);
                            cnf.add_clause(&clause);
                        }
                        None => {
                            clause.push(!xi);
                            cnf.add_clause(&clause);
                        }
                    }
                }
            }
        }
    }

    // Outputs.
    let single_last = problem.targets.len() == 1 && shape.all_used;
    let polarity: Vec<Option<Lit>> = problem
        .targets
        .iter()
        .map(|_| {
            if problem.free_output_polarity {
                Some(cnf.new_lit())
            } else {
                None
            }
        })
        .collect();
    let mut out_sel: Vec<Vec<Option<Lit>>> = Vec::new();
    for (h, &target) in problem.targets.iter().enumerate() {
        let mut sel = vec![None; k];
        for (i, slot) in sel.iter_mut().enumerate() {
            if single_last && i != k - 1 {
                continue;
            }
            let o = if single_last {
                None
            } else {
                Some(cnf.new_lit())
            };
            for (ri, &row) in rows.iter().enumerate() {
                let want = target >> row & 1 == 1;
                let xi = x[i][ri];
                let mut base: Vec<Lit> = o.iter().map(|o| !*o).collect();
                match polarity[h] {
                    None => {
                        base.push(if want { xi } else { !xi });
                        cnf.add_clause(&base);
                    }
                    Some(c) => {
                        // x = want xor c
                        let mut a = base.clone();
                        a.extend([if want { xi } else { !xi }, c]);
                        cnf.add_clause(&a);
                        base.extend([if want { !xi } else { xi }, !c]);
                        cnf.add_clause(&base);
                    }
                }
            }
            *slot = o;
        }
        if !single_last {
            let any: Vec<Lit> = sel.iter().flatten().copied().collect();
            cnf.add_clause(&any);
        }
        out_sel.push(sel);
    }

    // Every step is used.
    if shape.all_used {
        for i in 0..k {
            let node = lcount + i;
            let mut users: Vec<Lit> = Vec::new();
            for later in tuples.iter().skip(i + 1) {
                for (tuple, sel) in later {
                    if tuple.contains(&node) {
                        users.push(*sel);
                    }
                }
            }
            for sel in &out_sel {
                if let Some(o) = sel[i] {
                    users.push(o);
                }
            }
            if !(single_last && i == k - 1) {
                cnf.add_clause(&users);
            }
        }
    }

    if let Some(cap) = shape.max_single_input {
        add_single_input_cap(&mut cnf, &tuples, cap);
    }

    if shape.minimal {
        let all_distinct = problem.normal || shape.max_single_input == Some(0);
        add_minimality(
            &mut cnf,
            problem,
            &x,
            &rows,
            &literals,
            &tuples,
            &gvars,
            &out_sel,
            all_distinct,
        );
    }

    // Colexicographic order of consecutive steps.
    for i in 0..k.saturating_sub(1) {
        for (t1, s1) in &tuples[i] {
            for (t2, s2) in &tuples[i + 1] {
                match colex(t2, t1) {
                    std::cmp::Ordering::Less => cnf.add_clause(&[!*s1, !*s2]),
                    std::cmp::Ordering::Equal => {
                        for (v, variant) in problem.variants.iter().enumerate() {
                            if variant.arity != t1.len() {
                                continue;
                            }
                            for w in 0..=v {
                                if problem.variants[w].arity == variant.arity {
                                    cnf.add_clause(&[!*s1, !*s2, !gvars[i][v], !gvars[i + 1][w]]);
                                }
                            }
                        }
                    }
                    std::cmp::Ordering::Greater => {}
                }
            }
        }
    }

    // Depth limit: le[i][d] means level(step i) <= d, for d in 1..=depth.
    if let Some(depth) = shape.depth {
        let le: Vec<Vec<Lit>> = (0..k)
            .map(|_| (0..depth).map(|_| cnf.new_lit()).collect())
            .collect();
        for i in 0..k {
            cnf.add_clause(&[le[i][depth - 1]]);
            for d in 0..depth.saturating_sub(1) {
                cnf.add_clause(&[!le[i][d], le[i][d + 1]]);
            }
            for (tuple, sel) in &tuples[i] {
                for &node in tuple.iter().filter(|&&u| u >= lcount) {
                    let j = node - lcount;
                    cnf.add_clause(&[!*sel, !le[i][0]]);
                    for d in 1..depth {
                        cnf.add_clause(&[!*sel, !le[i][d], le[j][d - 1]]);
                    }
                }
            }
        }
    }

    // Area limit over reachable partial sums.
    if let Some((costs, limit)) = &shape.area {
        let mut previous: BTreeMap<u64, Option<Lit>> = BTreeMap::new();
        previous.insert(0, None); // None: known true
        for g in gvars.iter() {
            let mut next: BTreeMap<u64, Option<Lit>> = BTreeMap::new();
            for (&sum, &reached) in &previous {
                for (v, &cost) in costs.iter().enumerate() {
                    let total = sum + cost;
                    let target = *next.entry(total).or_insert_with(|| Some(cnf.new_lit()));
                    let target = target.expect("partial sums are fresh variables");
                    let mut c = vec![!g[v], target];
                    if let Some(r) = reached {
                        c.push(!r);
                    }
                    cnf.add_clause(&c);
                }
            }
            previous = next;
        }
        for (&sum, &reached) in &previous {
            if sum > *limit {
                if let Some(r) = reached {
                    cnf.add_clause(&[!r]);
                }
            }
        }
    }

    let mut solver = Solver::new();
    let mut writer_holder = None;
    if budget.is_limited() {
        writer_holder = Some(BudgetWriter::new(budget.clone()));
    }
    if let Some(w) = writer_holder.take() {
        solver.write_proof(w, ProofFormat::BinaryDrat);
    }
    solver.add_formula(&cnf);
    match solver.solve() {
        Ok(true) => {}
        Ok(false) => return Outcome::Impossible,
        Err(_) => return Outcome::Stopped,
    }
    let model = solver.model().unwrap_or_default();
    let mut truth = vec![false; cnf.var_count()];
    for lit in model {
        if lit.index() < truth.len() {
            truth[lit.index()] = lit.is_positive();
        }
    }
    let holds = |l: Lit| truth[l.index()] == l.is_positive();
    let mut steps = Vec::with_capacity(k);
    for i in 0..k {
        let (tuple, _) = tuples[i]
            .iter()
            .find(|(_, s)| holds(*s))
            .expect("every step selects a tuple");
        let v = (0..problem.variants.len())
            .find(|&v| problem.variants[v].arity == tuple.len() && holds(gvars[i][v]))
            .expect("every selected tuple has a gate");
        let fanins = tuple
            .iter()
            .map(|&u| {
                if u < lcount {
                    Node::Literal {
                        input: literals[u].0,
                        complemented: literals[u].1,
                    }
                } else {
                    Node::Step(u - lcount)
                }
            })
            .collect();
        steps.push((v, fanins));
    }
    let outputs = out_sel
        .iter()
        .enumerate()
        .map(|(h, sel)| {
            let step = if single_last {
                k - 1
            } else {
                (0..k)
                    .find(|&i| sel[i].map(holds).unwrap_or(false))
                    .expect("every output selects a step")
            };
            (step, polarity[h].map(holds).unwrap_or(false))
        })
        .collect();
    Outcome::Found(Decoded { steps, outputs })
}

/// At most `cap` steps read a single fanin (a sequential counter over one
/// indicator per step).
fn add_single_input_cap(cnf: &mut CnfFormula, tuples: &[Vec<(Vec<usize>, Lit)>], cap: usize) {
    let k = tuples.len();
    if cap >= k {
        return;
    }
    let singles = |i: usize| {
        tuples[i]
            .iter()
            .filter(|(t, _)| t.len() == 1)
            .map(|(_, s)| *s)
    };
    if cap == 0 {
        for i in 0..k {
            for sel in singles(i) {
                cnf.add_clause(&[!sel]);
            }
        }
        return;
    }
    let used: Vec<Lit> = (0..k)
        .map(|i| {
            let u = cnf.new_lit();
            for sel in singles(i) {
                cnf.add_clause(&[!sel, u]);
            }
            u
        })
        .collect();
    // count[i][j]: at least j + 1 of the first i + 1 steps are single-input.
    let count: Vec<Vec<Lit>> = (0..k)
        .map(|_| (0..cap).map(|_| cnf.new_lit()).collect())
        .collect();
    for i in 0..k {
        cnf.add_clause(&[!used[i], count[i][0]]);
        if i == 0 {
            for &later in &count[0][1..] {
                cnf.add_clause(&[!later]);
            }
            continue;
        }
        for j in 0..cap {
            cnf.add_clause(&[!count[i - 1][j], count[i][j]]);
            if j > 0 {
                cnf.add_clause(&[!used[i], !count[i - 1][j - 1], count[i][j]]);
            }
        }
        cnf.add_clause(&[!used[i], !count[i - 1][cap - 1]]);
    }
}

/// The facts of a network from which no step can be removed (see the module
/// comment): every step differs from the constants and from every literal
/// (with `all_distinct` also from every other step), and an inverter that could be absorbed into the
/// complemented twin of the gate it reads is not that gate's only user.
#[allow(clippy::too_many_arguments)]
fn add_minimality(
    cnf: &mut CnfFormula,
    problem: &Problem,
    x: &[Vec<Lit>],
    rows: &[usize],
    literals: &[(usize, bool)],
    tuples: &[Vec<(Vec<usize>, Lit)>],
    gvars: &[Vec<Lit>],
    out_sel: &[Vec<Option<Lit>>],
    all_distinct: bool,
) {
    let k = x.len();
    let lcount = literals.len();
    for xi in x {
        // Not constant 0; not constant 1 (in normal mode every step is 0 on
        // the dropped row 0 already, so all ones on the kept rows is allowed).
        cnf.add_clause(xi);
        if !problem.normal {
            let ones: Vec<Lit> = xi.iter().map(|&l| !l).collect();
            cnf.add_clause(&ones);
        }
        for &(input, complemented) in literals {
            let differs: Vec<Lit> = rows
                .iter()
                .zip(xi)
                .map(|(&row, &l)| {
                    if ((row >> input) & 1 == 1) != complemented {
                        !l
                    } else {
                        l
                    }
                })
                .collect();
            cnf.add_clause(&differs);
        }
    }
    if all_distinct {
        // Every two steps differ (see the module comment for why only here).
        for i in 0..k {
            for j in i + 1..k {
                let mut any = Vec::with_capacity(rows.len());
                for (&xi, &xj) in x[i].iter().zip(&x[j]) {
                    let d = cnf.new_lit();
                    cnf.add_clause(&[!d, xi, xj]);
                    cnf.add_clause(&[!d, !xi, !xj]);
                    any.push(d);
                }
                cnf.add_clause(&any);
            }
        }
    }
    let inverters: Vec<usize> = (0..problem.variants.len())
        .filter(|&v| problem.variants[v].arity == 1 && problem.variants[v].truth & 0b11 == 0b01)
        .collect();
    if inverters.is_empty() {
        return;
    }
    for i in 0..k {
        let node = lcount + i;
        for j in i + 1..k {
            let Some((_, reads_i)) = tuples[j].iter().find(|(t, _)| t.as_slice() == [node]) else {
                continue;
            };
            // Every other user of step i.
            let mut others: Vec<Lit> = Vec::new();
            for (later, list) in tuples.iter().enumerate().skip(i + 1) {
                for (tuple, sel) in list {
                    if tuple.contains(&node) && !(later == j && tuple.len() == 1) {
                        others.push(*sel);
                    }
                }
            }
            // Outputs reading step i (a single output fixed on the last step
            // has no selector, and the last step is never read by an inverter).
            others.extend(out_sel.iter().filter_map(|sel| sel[i]));
            for (v, twin) in problem.absorbs_inverter.iter().enumerate() {
                if twin.is_none() {
                    continue;
                }
                for &inv in &inverters {
                    let mut clause = vec![!*reads_i, !gvars[i][v], !gvars[j][inv]];
                    clause.extend(&others);
                    cnf.add_clause(&clause);
                }
            }
        }
    }
}

/// Compares tuples colexicographically: largest element first.
fn colex(a: &[usize], b: &[usize]) -> std::cmp::Ordering {
    a.iter().rev().cmp(b.iter().rev())
}

/// All strictly increasing `size`-tuples over `0..count`.
fn combinations(count: usize, size: usize) -> Vec<Vec<usize>> {
    let mut out = Vec::new();
    let mut current = Vec::with_capacity(size);
    fn go(
        start: usize,
        count: usize,
        size: usize,
        cur: &mut Vec<usize>,
        out: &mut Vec<Vec<usize>>,
    ) {
        if cur.len() == size {
            out.push(cur.clone());
            return;
        }
        for u in start..count {
            cur.push(u);
            go(u + 1, count, size, cur, out);
            cur.pop();
        }
    }
    go(0, count, size, &mut current, &mut out);
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::exact::gates::{expand_variants, GateSpec};

    /// AND2 and an inverter; `!a & !b` (NOR, 0b0001 over a, b).
    fn and_not_problem(variants: &[Variant]) -> Problem<'_> {
        Problem {
            inputs: 2,
            normal: false,
            negated_inputs: false,
            free_output_polarity: false,
            variants,
            targets: vec![0b0001],
            absorbs_inverter: vec![None; variants.len()],
        }
    }

    fn shape(steps: usize, cap: Option<usize>) -> Shape {
        Shape {
            steps,
            depth: None,
            all_used: true,
            minimal: true,
            max_single_input: cap,
            area: None,
        }
    }

    #[test]
    fn single_input_cap_is_honoured() {
        // Over AND and NOT, !a & !b needs both inputs inverted: every AND
        // network with at most one inverter is `and(literals, !and(...))`,
        // which is 1 on the row a = b = 1 or 0 on a row where the inverted
        // AND is 0 (reasoning in this comment, common practice).
        let variants = expand_variants(&[
            GateSpec::new("and2", 2, 0x8, 1.0),
            GateSpec::new("not", 1, 0b01, 1.0),
        ]);
        let problem = and_not_problem(&variants);
        let budget = Budget::default();
        assert!(matches!(
            solve(&problem, &shape(3, Some(2)), &budget),
            Outcome::Found(_)
        ));
        assert!(matches!(
            solve(&problem, &shape(3, None), &budget),
            Outcome::Found(_)
        ));
        for steps in 3..=6 {
            assert!(
                matches!(
                    solve(&problem, &shape(steps, Some(1)), &budget),
                    Outcome::Impossible
                ),
                "{steps} steps with one inverter"
            );
        }
    }

    fn minimal_and_loose(problem: &Problem, steps: usize) -> (bool, bool) {
        let budget = Budget::default();
        let found = |minimal| {
            let shape = Shape {
                minimal,
                ..shape(steps, None)
            };
            matches!(solve(problem, &shape, &budget), Outcome::Found(_))
        };
        (found(true), found(false))
    }

    #[test]
    fn minimal_networks_hold_no_literal_or_constant_step() {
        // Over AND and NOT: a = !(!a) and 0 = a & !a are two-step networks,
        // but the last step equals a literal or a constant.
        let variants = expand_variants(&[
            GateSpec::new("and2", 2, 0x8, 1.0),
            GateSpec::new("not", 1, 0b01, 1.0),
        ]);
        for target in [0b1010, 0b0000] {
            let problem = Problem {
                targets: vec![target],
                ..and_not_problem(&variants)
            };
            assert_eq!(
                minimal_and_loose(&problem, 2),
                (false, true),
                "{target:#06b}"
            );
        }
    }

    #[test]
    fn minimal_networks_never_invert_a_gate_that_has_a_complemented_twin() {
        // NAND over AND and NOT is AND then NOT (two steps, the only way:
        // an AND of anything with a literal is 0 where that literal is).
        // Marked as having a complemented twin (as if NAND were a cell), the
        // AND's lone inverter is ruled out.
        let variants = expand_variants(&[
            GateSpec::new("and2", 2, 0x8, 1.0),
            GateSpec::new("not", 1, 0b01, 1.0),
        ]);
        let unmarked = Problem {
            targets: vec![0b0111],
            ..and_not_problem(&variants)
        };
        assert_eq!(minimal_and_loose(&unmarked, 2), (true, true));
        let marked = Problem {
            absorbs_inverter: variants
                .iter()
                .map(|v| (v.arity == 2).then_some(0))
                .collect(),
            ..unmarked
        };
        assert_eq!(minimal_and_loose(&marked, 2), (false, true));
    }
}
