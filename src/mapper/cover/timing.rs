//! Reference counts and required times of the current cover: which node
//! phases the cover uses, and by when each must arrive for the outputs to
//! meet their target.

use super::{Cover, CANDIDATE_BITS, FREE, INVERT, NONE};

impl Cover<'_> {
    /// Phases of `node` in the order their references must be propagated
    /// backwards (a phase derived by an inverter before its source).
    #[inline]
    pub(super) fn backward_order(&self, node: usize) -> [usize; 2] {
        if self.phases[2 * node + 1].choice == INVERT {
            [1, 0]
        } else {
            [0, 1]
        }
    }

    /// Calls `f(leaf_index, delay_through)` for each leaf phase the choice of
    /// `node`'s `phase` reads.
    #[inline]
    pub(super) fn for_each_leaf(&self, node: usize, phase: usize, mut f: impl FnMut(usize, f32)) {
        let c = self.phases[2 * node + phase].choice;
        match c {
            NONE | FREE => {}
            INVERT => f(2 * node + (1 - phase), self.inverter_delay(node)),
            _ => {
                let m = &self.digests[self.phases[2 * node + phase].digest as usize];
                let leaves = self.cuts.leaves((c >> CANDIDATE_BITS) as usize);
                let tail = m.root_per_load * self.load[node];
                for u in self.uses_of(m) {
                    f(
                        2 * leaves[(u.code >> 1) as usize] as usize + (u.code & 1) as usize,
                        u.delay + tail,
                    );
                }
            }
        }
    }

    /// Counts references of the current cover; returns the latest output
    /// arrival.
    pub fn mark(&mut self) -> f32 {
        for p in &mut self.phases {
            p.refs = 0;
        }
        let mut worst = 0f32;
        for l in self.net.combinational_outputs() {
            self.phases[l.raw() as usize].refs += 1;
            worst = worst.max(self.cost[l.raw() as usize].arrival);
        }
        let mut leaves = [0u32; 12];
        for node in (0..self.net.num_nodes()).rev() {
            for phase in self.backward_order(node) {
                let i = 2 * node + phase;
                if self.phases[i].refs > 0 {
                    let (_, count) = self.cone_step(i, &mut leaves);
                    for &leaf in &leaves[..count] {
                        self.phases[leaf as usize].refs += 1;
                    }
                }
            }
        }
        worst
    }

    /// Propagates required times from `target` at every output through the
    /// current cover (call [`Cover::mark`] first). Phases outside the cover
    /// get no requirement.
    pub fn set_required(&mut self, target: f32) {
        let mut required = std::mem::take(&mut self.required);
        required.fill(f32::INFINITY);
        for l in self.net.combinational_outputs() {
            let i = l.raw() as usize;
            required[i] = required[i].min(target);
        }
        for node in (0..self.net.num_nodes()).rev() {
            for phase in self.backward_order(node) {
                let i = 2 * node + phase;
                if self.phases[i].refs > 0 {
                    let r = required[i];
                    self.for_each_leaf(node, phase, |leaf, d| {
                        required[leaf] = required[leaf].min(r - d);
                    });
                }
            }
        }
        self.required = required;
    }

    /// Area of the choice of phase index `i` and the phase indices of the
    /// leaves it reads (written to `out`, count returned).
    #[inline]
    pub(super) fn cone_step(&self, i: usize, out: &mut [u32; 12]) -> (f32, usize) {
        let state = self.phases[i];
        match state.choice {
            NONE | FREE => (0.0, 0),
            INVERT => {
                out[0] = (i ^ 1) as u32;
                (self.inverter_area, 1)
            }
            c => {
                let leaves = self.cuts.leaves((c >> CANDIDATE_BITS) as usize);
                let m = &self.digests[state.digest as usize];
                let mut count = 0;
                for u in self.uses_of(m) {
                    out[count] = 2 * leaves[(u.code >> 1) as usize] + (u.code & 1);
                    count += 1;
                }
                (m.area, count)
            }
        }
    }

    /// References the cone of `node`/`phase` under its current choice;
    /// returns the area newly referenced.
    pub(super) fn reference(&mut self, node: usize, phase: usize, stack: &mut Vec<u32>) -> f32 {
        let mut area = 0.0;
        let mut leaves = [0u32; 12];
        stack.clear();
        stack.push((2 * node + phase) as u32);
        while let Some(i) = stack.pop() {
            let (a, count) = self.cone_step(i as usize, &mut leaves);
            area += a;
            for &leaf in &leaves[..count] {
                let r = &mut self.phases[leaf as usize].refs;
                *r += 1;
                if *r == 1 {
                    stack.push(leaf);
                }
            }
        }
        area
    }

    /// Releases the cone of `node`/`phase` under its current choice; returns
    /// the area released.
    pub(super) fn dereference(&mut self, node: usize, phase: usize, stack: &mut Vec<u32>) -> f32 {
        let mut area = 0.0;
        let mut leaves = [0u32; 12];
        stack.clear();
        stack.push((2 * node + phase) as u32);
        while let Some(i) = stack.pop() {
            let (a, count) = self.cone_step(i as usize, &mut leaves);
            area += a;
            for &leaf in &leaves[..count] {
                let r = &mut self.phases[leaf as usize].refs;
                *r -= 1;
                if *r == 0 {
                    stack.push(leaf);
                }
            }
        }
        area
    }

    /// Area of the current cover (call [`Cover::mark`] first).
    pub fn cover_area(&self) -> f64 {
        let mut area = 0.0;
        for node in 0..self.net.num_nodes() {
            for phase in 0..2 {
                if self.phases[2 * node + phase].refs > 0 {
                    let state = self.phases[2 * node + phase];
                    area += self.area_of(state.choice, state.digest) as f64;
                }
            }
        }
        area
    }
}
