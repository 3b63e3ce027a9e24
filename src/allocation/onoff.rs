//! Least-gas on/off valve sets for the 26 per-axis commands c ∈ {−1, 0, 1}³ \ {0}.
//!
//! Many cold-gas systems use plain solenoid valves: a port is open or shut for a
//! whole control step. For each command the chosen set must
//! - on each commanded axis a, push the right way with at least
//!   (`fraction` − ε) × best(a, cₐ), where best(a, σ) is the largest σ-torque any
//!   valve set gives on that axis (with full supply, the sum of the positive
//!   contributions σ·b_{i,a}; with supply droop, the largest f(k)·(sum of the k
//!   largest));
//! - on each uncommanded axis keep |τₐ| ≤ (`tolerance` + ε) × scaleₐ, with
//!   scaleₐ = max(best(a, +), best(a, −)), the axis's best on/off torque.
//!
//! ε = [`Tolerances::onoff_share`] (1e-9) is the comparison tolerance on these
//! shares. It exists for one common case: a port that gives exactly the
//! threshold share of an axis, such as one port of a mirrored roll pair at the
//! default fraction ½. In exact arithmetic both mirror ports give exactly half;
//! in floating point their sums differ in the last bit, and without ε one would
//! pass and its mirror fail, so the table would depend on rounding. With it,
//! mirror ports are treated alike.
//!
//! "Right way" also means beyond a noise floor of [`Tolerances::onoff_noise`] × the
//! largest axis scale, so that exact symmetry survives the rounding of sums.
//!
//! Among the qualifying sets the least gas wins; gas rates within ε (relative) of
//! each other count as equal, and then the set with fewer open valves wins, and
//! then the one with the smaller mask (bit i = port i), i.e. the one whose
//! highest differing port comes earlier in the layout. So the choice is always
//! made by this stated rule, never by rounding.
//!
//! Supply droop: with k valves open each delivers the fraction f(k) of its full
//! thrust (caller's `thrust_factor`), which scales the set's torque, force and gas.
//! Peak coil current is k × the caller's per-valve current.
//!
//! Search: exact enumeration of all 2ⁿ − 1 non-empty sets for n up to
//! [`OnOffOptions::max_enumerated_ports`] (Gray-code order: one valve changes per
//! step, so each set costs one column update; sums are recomputed from scratch
//! every 1024 steps to keep rounding from building up); above that, one integer
//! program per valve count k through `good_lp`/`microlp` (binary variables),
//! which is needed because f(k) makes the thresholds depend on k. The same tie
//! rule is then applied by fixing ports from the highest index down (one more
//! integer program each): of the sets of the chosen count within ε of its least
//! gas, the smallest mask. For near misses the integer-program path keeps the
//! solver's choice among sets of equal shortfall and gas.
//!
//! When no set qualifies the plan gives the best near miss: the non-empty set
//! with the smallest shortfall, the sum over axes of the missing amount
//! (commanded: threshold − achieved; uncommanded: |τₐ| − limit; each only when
//! positive) divided by that axis's scale; shortfalls within ε of each other
//! count as equal, and ties go to less gas, then fewer valves, then the smaller mask.

use super::{Effectiveness, LpError, Tolerances};
use good_lp::{microlp, variable, Expression, ProblemVariables, Solution, SolverModel, Variable};
use nalgebra::Vector3;
use thiserror::Error;

/// Settings of the on/off search.
#[derive(Debug, Clone, PartialEq)]
pub struct OnOffOptions {
    /// Commanded axes need at least this fraction of the axis's best torque.
    pub fraction: f64,
    /// Uncommanded axes may carry at most this fraction of their scale.
    pub tolerance: f64,
    /// Coil current of one open valve, A.
    pub coil_current_a: f64,
    /// Largest port count searched by enumeration; above it, integer programming.
    pub max_enumerated_ports: usize,
}

impl Default for OnOffOptions {
    fn default() -> Self {
        Self {
            fraction: 0.5,
            tolerance: 0.1,
            coil_current_a: 0.5,
            max_enumerated_ports: 20,
        }
    }
}

/// Failures of the on/off search.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum OnOffError {
    /// A setting is out of range.
    #[error("on/off setting `{0}` must be a finite number in its range")]
    BadOption(&'static str),
    /// The thrust factor is not positive and finite for some valve count.
    #[error("thrust factor for {0} open valves is not a positive finite number")]
    BadThrustFactor(usize),
    /// Enumeration is limited to 63 ports (set masks are 64-bit).
    #[error("{0} ports is too many to enumerate")]
    TooManyPorts(usize),
    /// An integer program failed.
    #[error("integer program: {0}")]
    Solver(#[from] LpError),
}

/// One valve set and what it does (including supply droop).
#[derive(Debug, Clone, PartialEq)]
pub struct ValveSet {
    /// Open ports, ascending.
    pub ports: Vec<usize>,
    /// Torque, N·m.
    pub torque: Vector3<f64>,
    /// Total force, N (y and z are the side force).
    pub force: Vector3<f64>,
    /// Gas rate, kg/s.
    pub gas_rate_kg_s: f64,
    /// Number of open valves.
    pub valves_open: usize,
    /// Peak coil current, A.
    pub peak_coil_current_a: f64,
}

/// The choice for one command.
#[derive(Debug, Clone, PartialEq)]
pub enum OnOffSelection {
    /// The least-gas set meeting every threshold.
    Meets(ValveSet),
    /// No set qualifies; the best near miss and its shortfall (dimensionless).
    NearMiss {
        /// The set.
        set: ValveSet,
        /// Its shortfall, as defined in the module notes.
        shortfall: f64,
    },
}

impl OnOffSelection {
    /// The chosen set, qualifying or not.
    pub fn set(&self) -> &ValveSet {
        match self {
            OnOffSelection::Meets(s) => s,
            OnOffSelection::NearMiss { set, .. } => set,
        }
    }
}

/// All 26 commands with their selections.
#[derive(Debug, Clone, PartialEq)]
pub struct OnOffPlan {
    /// (command, selection), commands in lexicographic order of (roll, pitch, yaw).
    pub entries: Vec<([i8; 3], OnOffSelection)>,
    /// best(a, +) per axis, N·m.
    pub best_positive: Vector3<f64>,
    /// best(a, −) per axis, N·m (magnitudes).
    pub best_negative: Vector3<f64>,
}

/// The 26 non-zero commands in lexicographic order.
pub fn commands() -> Vec<[i8; 3]> {
    let mut out = Vec::with_capacity(26);
    for a in -1..=1i8 {
        for b in -1..=1i8 {
            for c in -1..=1i8 {
                if (a, b, c) != (0, 0, 0) {
                    out.push([a, b, c]);
                }
            }
        }
    }
    out
}

/// Thresholds shared by both searches.
struct Limits {
    factor: Vec<f64>,
    best_pos: Vector3<f64>,
    best_neg: Vector3<f64>,
    axis_scale: Vector3<f64>,
    noise: f64,
    fraction: f64,
    tolerance: f64,
    share: f64,
}

impl Limits {
    fn new(
        e: &Effectiveness,
        opts: &OnOffOptions,
        thrust_factor: &dyn Fn(usize) -> f64,
        tol: &Tolerances,
    ) -> Result<Self, OnOffError> {
        let ok = |v: f64| v.is_finite() && v >= 0.0;
        if !ok(opts.fraction) || opts.fraction > 1.0 {
            return Err(OnOffError::BadOption("fraction"));
        }
        if !ok(opts.tolerance) {
            return Err(OnOffError::BadOption("tolerance"));
        }
        if !ok(opts.coil_current_a) {
            return Err(OnOffError::BadOption("coil_current_a"));
        }
        let n = e.len();
        let mut factor = vec![0.0; n + 1];
        for (k, f) in factor.iter_mut().enumerate().skip(1) {
            *f = thrust_factor(k);
            if !(f.is_finite() && *f > 0.0) {
                return Err(OnOffError::BadThrustFactor(k));
            }
        }
        let mut best_pos = Vector3::zeros();
        let mut best_neg = Vector3::zeros();
        for a in 0..3 {
            for (sign, out) in [(1.0, &mut best_pos[a]), (-1.0, &mut best_neg[a])] {
                let mut c: Vec<f64> = (0..n).map(|i| sign * e.torque()[(a, i)]).collect();
                c.sort_by(|x, y| y.total_cmp(x));
                let mut prefix = 0.0;
                let mut best = 0.0_f64;
                for (k, v) in c.iter().enumerate() {
                    prefix += v;
                    best = best.max(factor[k + 1] * prefix);
                }
                *out = best;
            }
        }
        let axis_scale = best_pos.sup(&best_neg);
        let noise = tol.onoff_noise * axis_scale.max();
        Ok(Self {
            factor,
            best_pos,
            best_neg,
            axis_scale,
            noise,
            fraction: opts.fraction,
            tolerance: opts.tolerance,
            share: tol.onoff_share,
        })
    }

    /// Least signed torque c·τₐ on commanded axis a.
    fn threshold(&self, a: usize, c: i8) -> f64 {
        let best = if c > 0 {
            self.best_pos[a]
        } else {
            self.best_neg[a]
        };
        ((self.fraction - self.share) * best).max(self.noise)
    }

    /// Largest |τₐ| on uncommanded axis a.
    fn limit(&self, a: usize) -> f64 {
        (self.tolerance + self.share) * self.axis_scale[a] + self.noise
    }

    /// True when gas rate `a` is less than `b` by more than the share tolerance.
    fn cheaper(&self, a: f64, b: f64) -> bool {
        a < b - self.share * a.abs().max(b.abs())
    }

    /// The stated order of candidates: gas (equal within the share tolerance),
    /// then valve count, then mask.
    fn before(&self, a: (f64, usize, u64), b: (f64, usize, u64)) -> bool {
        if self.cheaper(a.0, b.0) {
            return true;
        }
        if self.cheaper(b.0, a.0) {
            return false;
        }
        (a.1, a.2) < (b.1, b.2)
    }

    /// Near misses: shortfall (equal within the share tolerance), then as [`Self::before`].
    fn before_near(&self, a: (f64, f64, usize, u64), b: (f64, f64, usize, u64)) -> bool {
        if a.0 < b.0 - self.share {
            return true;
        }
        if b.0 < a.0 - self.share {
            return false;
        }
        self.before((a.1, a.2, a.3), (b.1, b.2, b.3))
    }

    fn norm(&self, a: usize) -> f64 {
        if self.axis_scale[a] > 0.0 {
            self.axis_scale[a]
        } else {
            1.0
        }
    }

    #[cfg(test)]
    fn qualifies(&self, t: &Vector3<f64>, c: &[i8; 3]) -> bool {
        (0..3).all(|a| match c[a] {
            0 => t[a].abs() <= self.limit(a),
            s => f64::from(s) * t[a] >= self.threshold(a, s),
        })
    }

    fn shortfall(&self, t: &Vector3<f64>, c: &[i8; 3]) -> f64 {
        (0..3)
            .map(|a| {
                let miss = match c[a] {
                    0 => t[a].abs() - self.limit(a),
                    s => self.threshold(a, s) - f64::from(s) * t[a],
                };
                miss.max(0.0) / self.norm(a)
            })
            .sum()
    }
}

fn valve_set(e: &Effectiveness, ports: Vec<usize>, lim: &Limits, current: f64) -> ValveSet {
    let k = ports.len();
    let f = lim.factor[k];
    let mut u = vec![0.0; e.len()];
    for &p in &ports {
        u[p] = 1.0;
    }
    ValveSet {
        torque: e.torque_for(&u) * f,
        force: e.force_for(&u) * f,
        gas_rate_kg_s: e.gas_for(&u) * f,
        valves_open: k,
        peak_coil_current_a: k as f64 * current,
        ports,
    }
}

fn ports_of(mask: u64) -> Vec<usize> {
    (0..64).filter(|i| mask & (1 << i) != 0).collect()
}

impl OnOffPlan {
    /// Exact enumeration up to `max_enumerated_ports`, integer programming above.
    pub fn new(
        e: &Effectiveness,
        opts: &OnOffOptions,
        thrust_factor: &dyn Fn(usize) -> f64,
        tol: &Tolerances,
    ) -> Result<Self, OnOffError> {
        if e.len() <= opts.max_enumerated_ports {
            Self::by_enumeration(e, opts, thrust_factor, tol)
        } else {
            Self::by_integer_program(e, opts, thrust_factor, tol)
        }
    }

    /// Exact search over all non-empty valve sets.
    pub fn by_enumeration(
        e: &Effectiveness,
        opts: &OnOffOptions,
        thrust_factor: &dyn Fn(usize) -> f64,
        tol: &Tolerances,
    ) -> Result<Self, OnOffError> {
        let n = e.len();
        if n > 63 {
            return Err(OnOffError::TooManyPorts(n));
        }
        let lim = Limits::new(e, opts, thrust_factor, tol)?;
        let cmds = commands();
        // Best per command: (gas, valves, mask) in lexicographic order.
        let mut best: Vec<Option<(f64, usize, u64)>> = vec![None; cmds.len()];
        let index_of = |c: [i8; 3]| -> usize {
            let i = ((c[0] + 1) * 9 + (c[1] + 1) * 3 + (c[2] + 1)) as usize;
            if i > 13 {
                i - 1
            } else {
                i
            }
        };
        let mut near: Vec<Option<(f64, f64, usize, u64)>> = vec![None; cmds.len()];
        for pass in 0..2 {
            if pass == 1 && best.iter().all(Option::is_some) {
                break;
            }
            gray_walk(e, |mask, k, t_raw, gas_raw| {
                let f = lim.factor[k];
                let t = t_raw * f;
                let gas = gas_raw * f;
                if pass == 0 {
                    let mut allowed = [[false; 3]; 3];
                    for a in 0..3 {
                        allowed[a][1] = t[a].abs() <= lim.limit(a);
                        allowed[a][2] = t[a] >= lim.threshold(a, 1);
                        allowed[a][0] = -t[a] >= lim.threshold(a, -1);
                    }
                    for x in 0..3 {
                        if !allowed[0][x] {
                            continue;
                        }
                        for y in 0..3 {
                            if !allowed[1][y] {
                                continue;
                            }
                            for (z, &ok) in allowed[2].iter().enumerate() {
                                if !ok || (x, y, z) == (1, 1, 1) {
                                    continue;
                                }
                                let c = [x as i8 - 1, y as i8 - 1, z as i8 - 1];
                                let slot = &mut best[index_of(c)];
                                let cand = (gas, k, mask);
                                if slot.is_none_or(|b| lim.before(cand, b)) {
                                    *slot = Some(cand);
                                }
                            }
                        }
                    }
                } else {
                    for (ci, c) in cmds.iter().enumerate() {
                        if best[ci].is_some() {
                            continue;
                        }
                        let cand = (lim.shortfall(&t, c), gas, k, mask);
                        let slot = &mut near[ci];
                        if slot.is_none_or(|b| lim.before_near(cand, b)) {
                            *slot = Some(cand);
                        }
                    }
                }
            });
        }
        let entries = cmds
            .iter()
            .enumerate()
            .map(|(ci, c)| {
                let sel = match (best[ci], near[ci]) {
                    (Some((_, _, mask)), _) => OnOffSelection::Meets(valve_set(
                        e,
                        ports_of(mask),
                        &lim,
                        opts.coil_current_a,
                    )),
                    (None, Some((_, _, _, mask))) => {
                        let set = valve_set(e, ports_of(mask), &lim, opts.coil_current_a);
                        OnOffSelection::NearMiss {
                            shortfall: lim.shortfall(&set.torque, c),
                            set,
                        }
                    }
                    // With at least one port there is always a non-empty set, so the
                    // near-miss pass always records one; keep a defined answer anyway.
                    (None, None) => OnOffSelection::NearMiss {
                        set: valve_set(e, vec![0], &lim, opts.coil_current_a),
                        shortfall: f64::INFINITY,
                    },
                };
                (*c, sel)
            })
            .collect();
        Ok(Self {
            entries,
            best_positive: lim.best_pos,
            best_negative: lim.best_neg,
        })
    }

    /// The same search by integer programming: for each command and each valve
    /// count k, a binary program with the thresholds scaled by f(k).
    pub fn by_integer_program(
        e: &Effectiveness,
        opts: &OnOffOptions,
        thrust_factor: &dyn Fn(usize) -> f64,
        tol: &Tolerances,
    ) -> Result<Self, OnOffError> {
        let n = e.len();
        let lim = Limits::new(e, opts, thrust_factor, tol)?;
        let mut entries = Vec::with_capacity(26);
        for c in commands() {
            let mut found: Option<(f64, usize, Vec<usize>)> = None;
            for k in 1..=n {
                if let Some((gas, ports)) = ilp(e, &lim, &c, k, None)? {
                    // Valve counts rise with k: a later k wins only when cheaper.
                    if found.as_ref().is_none_or(|b| lim.cheaper(gas, b.0)) {
                        found = Some((gas, k, ports));
                    }
                }
            }
            let sel = if let Some((gas, k, ports)) = found {
                // The same tie rule as the enumeration: of the sets this cheap with
                // this valve count, the smallest mask.
                let ports = smallest_mask(e, &lim, &c, k, gas)?.unwrap_or(ports);
                OnOffSelection::Meets(valve_set(e, ports, &lim, opts.coil_current_a))
            } else {
                let mut shortfalls = Vec::with_capacity(n);
                for k in 1..=n {
                    let v = ilp_shortfall(e, &lim, &c, k)?;
                    shortfalls.push(v);
                }
                let least = shortfalls.iter().copied().fold(f64::INFINITY, f64::min);
                let allowed = least + tol.onoff_noise * (1.0 + least);
                let mut pick: Option<(f64, Vec<usize>)> = None;
                for k in 1..=n {
                    if shortfalls[k - 1] > allowed {
                        continue;
                    }
                    if let Some((gas, ports)) = ilp(e, &lim, &c, k, Some(allowed))? {
                        if pick.as_ref().is_none_or(|b| lim.cheaper(gas, b.0)) {
                            pick = Some((gas, ports));
                        }
                    }
                }
                let ports = pick.map(|p| p.1).unwrap_or_else(|| vec![0]);
                let set = valve_set(e, ports, &lim, opts.coil_current_a);
                OnOffSelection::NearMiss {
                    shortfall: lim.shortfall(&set.torque, &c),
                    set,
                }
            };
            entries.push((c, sel));
        }
        Ok(Self {
            entries,
            best_positive: lim.best_pos,
            best_negative: lim.best_neg,
        })
    }

    /// The selection for command `c`, if `c` is one of the 26.
    pub fn get(&self, c: [i8; 3]) -> Option<&OnOffSelection> {
        self.entries.iter().find(|(k, _)| *k == c).map(|(_, s)| s)
    }
}

/// Calls `visit(mask, k, Σ torque, Σ gas)` for every non-empty set in Gray-code order.
fn gray_walk(e: &Effectiveness, mut visit: impl FnMut(u64, usize, Vector3<f64>, f64)) {
    let n = e.len();
    let b = e.torque();
    let m = e.mass_flow_kg_s();
    let mut mask: u64 = 0;
    let mut t = Vector3::zeros();
    let mut gas = 0.0;
    let total: u64 = 1 << n;
    for step in 1..total {
        let bit = step.trailing_zeros() as usize;
        mask ^= 1 << bit;
        if step % 1024 == 0 {
            t = Vector3::zeros();
            gas = 0.0;
            for i in 0..n {
                if mask & (1 << i) != 0 {
                    t += b.column(i);
                    gas += m[i];
                }
            }
        } else if mask & (1 << bit) != 0 {
            t += b.column(bit);
            gas += m[bit];
        } else {
            t -= b.column(bit);
            gas -= m[bit];
        }
        visit(mask, mask.count_ones() as usize, t, gas);
    }
}

struct Binary {
    vars: ProblemVariables,
    v: Vec<Variable>,
    torque: [Expression; 3],
    count: Expression,
    gas: Expression,
}

fn binary_model(e: &Effectiveness) -> Binary {
    let mut vars = ProblemVariables::new();
    let v: Vec<Variable> = (0..e.len())
        .map(|_| vars.add(variable().binary()))
        .collect();
    let row = |r: usize| -> Expression {
        v.iter()
            .enumerate()
            .map(|(i, x)| e.torque()[(r, i)] * *x)
            .sum()
    };
    let torque = [row(0), row(1), row(2)];
    let count: Expression = v.iter().map(|x| Expression::from(*x)).sum();
    let gas: Expression = v
        .iter()
        .zip(e.mass_flow_kg_s().iter())
        .map(|(x, m)| *m * *x)
        .sum();
    Binary {
        vars,
        v,
        torque,
        count,
        gas,
    }
}

/// Least-gas set with exactly k valves meeting the thresholds, or (with
/// `shortfall_cap`) with shortfall at most the cap. `None` when infeasible.
fn ilp(
    e: &Effectiveness,
    lim: &Limits,
    c: &[i8; 3],
    k: usize,
    shortfall_cap: Option<f64>,
) -> Result<Option<(f64, Vec<usize>)>, OnOffError> {
    ilp_pinned(e, lim, c, k, shortfall_cap, &[], None)
}

/// Of the qualifying sets of exactly k valves with gas at most `gas` (within the
/// share tolerance), the one with the smallest mask: ports are decided from the
/// highest index down, each left shut when a qualifying set with it shut exists.
fn smallest_mask(
    e: &Effectiveness,
    lim: &Limits,
    c: &[i8; 3],
    k: usize,
    gas: f64,
) -> Result<Option<Vec<usize>>, OnOffError> {
    let n = e.len();
    let cap = gas * (1.0 + lim.share);
    let mut pins: Vec<Option<bool>> = vec![None; n];
    for i in (0..n).rev() {
        pins[i] = Some(false);
        if ilp_pinned(e, lim, c, k, None, &pins, Some(cap))?.is_none() {
            pins[i] = Some(true);
        }
    }
    let ports: Vec<usize> = (0..n).filter(|&i| pins[i] == Some(true)).collect();
    // The last pin always left a qualifying set, so this one qualifies; check it.
    Ok(ilp_pinned(e, lim, c, k, None, &pins, Some(cap))?.map(|_| ports))
}

/// As [`ilp`], with some ports pinned open (`Some(true)`) or shut, and the gas
/// rate capped.
fn ilp_pinned(
    e: &Effectiveness,
    lim: &Limits,
    c: &[i8; 3],
    k: usize,
    shortfall_cap: Option<f64>,
    pins: &[Option<bool>],
    gas_cap: Option<f64>,
) -> Result<Option<(f64, Vec<usize>)>, OnOffError> {
    let Binary {
        mut vars,
        v,
        torque,
        count,
        gas,
    } = binary_model(e);
    let f = lim.factor[k];
    let slack: Vec<Variable> = (0..3)
        .map(|_| {
            if shortfall_cap.is_some() {
                vars.add(variable().min(0.0))
            } else {
                vars.add(variable().min(0.0).max(0.0))
            }
        })
        .collect();
    let mut p = vars.minimise(gas.clone() * f).using(microlp);
    p.add_constraint(count.eq(k as f64));
    for (i, pin) in pins.iter().enumerate() {
        if let Some(open) = pin {
            p.add_constraint(Expression::from(v[i]).eq(if *open { 1.0 } else { 0.0 }));
        }
    }
    if let Some(cap) = gas_cap {
        p.add_constraint((gas.clone() * f).leq(cap));
    }
    for a in 0..3 {
        let t = torque[a].clone() * f;
        let s = slack[a];
        match c[a] {
            0 => {
                p.add_constraint((t.clone() - s).leq(lim.limit(a)));
                p.add_constraint((t + s).geq(-lim.limit(a)));
            }
            sign => {
                p.add_constraint((t * f64::from(sign) + s).geq(lim.threshold(a, sign)));
            }
        }
    }
    if let Some(cap) = shortfall_cap {
        let total: Expression = (0..3).map(|a| slack[a] * (1.0 / lim.norm(a))).sum();
        p.add_constraint(total.leq(cap));
    }
    match p.solve() {
        Ok(sol) => {
            let ports: Vec<usize> = (0..e.len()).filter(|&i| sol.value(v[i]) > 0.5).collect();
            let g = f * ports.iter().map(|&i| e.mass_flow_kg_s()[i]).sum::<f64>();
            Ok(Some((g, ports)))
        }
        Err(good_lp::ResolutionError::Infeasible) => Ok(None),
        Err(other) => Err(LpError::from(other).into()),
    }
}

/// Least shortfall over sets of exactly k valves.
fn ilp_shortfall(
    e: &Effectiveness,
    lim: &Limits,
    c: &[i8; 3],
    k: usize,
) -> Result<f64, OnOffError> {
    let Binary {
        mut vars,
        torque,
        count,
        ..
    } = binary_model(e);
    let f = lim.factor[k];
    let slack: Vec<Variable> = (0..3).map(|_| vars.add(variable().min(0.0))).collect();
    let total: Expression = (0..3).map(|a| slack[a] * (1.0 / lim.norm(a))).sum();
    let mut p = vars.minimise(total.clone()).using(microlp);
    p.add_constraint(count.eq(k as f64));
    for a in 0..3 {
        let t = torque[a].clone() * f;
        let s = slack[a];
        match c[a] {
            0 => {
                p.add_constraint((t.clone() - s).leq(lim.limit(a)));
                p.add_constraint((t + s).geq(-lim.limit(a)));
            }
            sign => {
                p.add_constraint((t * f64::from(sign) + s).geq(lim.threshold(a, sign)));
            }
        }
    }
    let sol = p.solve().map_err(LpError::from)?;
    Ok(sol.eval(&total))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::testkit::{port_at, random_layout, Rng};
    use approx::assert_relative_eq;
    use proptest::prelude::*;
    use std::f64::consts::{FRAC_PI_2, FRAC_PI_4, PI};

    fn full_supply(_: usize) -> f64 {
        1.0
    }

    /// Supply droop: each extra open valve costs 8 % of the thrust of all.
    fn droop(k: usize) -> f64 {
        1.0 / (1.0 + 0.08 * (k as f64 - 1.0))
    }

    /// Independent statement of the thresholds, written from the module notes
    /// rather than from `Limits`.
    fn honours(
        plan: &OnOffPlan,
        set: &ValveSet,
        c: &[i8; 3],
        o: &OnOffOptions,
        noise: f64,
    ) -> bool {
        let eps = Tolerances::default().onoff_share;
        (0..3).all(|a| {
            let scale = plan.best_positive[a].max(plan.best_negative[a]);
            match c[a] {
                0 => set.torque[a].abs() <= (o.tolerance + eps) * scale + noise,
                1 => set.torque[a] >= ((o.fraction - eps) * plan.best_positive[a]).max(noise),
                _ => -set.torque[a] >= ((o.fraction - eps) * plan.best_negative[a]).max(noise),
            }
        })
    }

    #[test]
    fn enumeration_and_integer_programming_agree() {
        // Reference: microlp's branch and bound over binaries, against the exact
        // enumeration. Gas of the chosen sets must agree to 1e-9 relative (sums of
        // the same few flows); qualifying or not must agree exactly.
        let tol = Tolerances::default();
        let mut rng = Rng(4242);
        let mut compared = 0;
        for (case, n) in [5usize, 7, 9, 12].into_iter().enumerate() {
            let e = random_layout(&mut rng, n);
            let opts = OnOffOptions {
                fraction: 0.3 + 0.1 * case as f64,
                tolerance: 0.15,
                ..OnOffOptions::default()
            };
            let factor: &dyn Fn(usize) -> f64 = if case % 2 == 0 { &full_supply } else { &droop };
            let a = OnOffPlan::by_enumeration(&e, &opts, factor, &tol).expect("enumerates");
            let b = OnOffPlan::by_integer_program(&e, &opts, factor, &tol).expect("solves");
            for ((ca, sa), (cb, sb)) in a.entries.iter().zip(&b.entries) {
                assert_eq!(ca, cb);
                match (sa, sb) {
                    (OnOffSelection::Meets(x), OnOffSelection::Meets(y)) => {
                        assert_relative_eq!(x.gas_rate_kg_s, y.gas_rate_kg_s, max_relative = 1e-9);
                        // The same tie rule on both paths: the very same set.
                        assert_eq!(x.ports, y.ports, "case {case} command {ca:?}");
                        compared += 1;
                    }
                    (
                        OnOffSelection::NearMiss {
                            shortfall: p,
                            set: x,
                        },
                        OnOffSelection::NearMiss {
                            shortfall: q,
                            set: y,
                        },
                    ) => {
                        assert_relative_eq!(p, q, max_relative = 1e-9, epsilon = 1e-12);
                        assert_relative_eq!(x.gas_rate_kg_s, y.gas_rate_kg_s, max_relative = 1e-9);
                        compared += 1;
                    }
                    _ => panic!("case {case} command {ca:?}: {sa:?} vs {sb:?}"),
                }
            }
        }
        assert_eq!(compared, 4 * 26);
        // Exact gas ties everywhere: mirrored roll pairs, and every port doubled by an
        // identical copy. The integer program must pick the enumeration's set (fewer
        // valves, then the smaller mask), not whichever tie the solver meets first.
        for step in [0, 7, 13] {
            let theta = FRAC_PI_4 + 0.01 * step as f64;
            let e = if step == 7 {
                doubled_cross(theta, -0.3, -0.1)
            } else {
                cross_with_roll_pairs(theta, -0.3, -0.1)
            };
            let o = OnOffOptions::default();
            let a = OnOffPlan::by_enumeration(&e, &o, &droop, &tol).expect("enumerates");
            let b = OnOffPlan::by_integer_program(&e, &o, &droop, &tol).expect("solves");
            for ((c, sa), (_, sb)) in a.entries.iter().zip(&b.entries) {
                if let (OnOffSelection::Meets(x), OnOffSelection::Meets(y)) = (sa, sb) {
                    assert_eq!(x.ports, y.ports, "step {step} command {c:?}");
                }
            }
        }
    }

    #[test]
    fn box_layout_by_hand() {
        // Radial ports (0.5 m aft, T = 2 N) give ±TL pitch and yaw; tangential ports
        // at the CG station give ±RT roll (see zonotope.rs for the cross products).
        // Best +pitch = TL (one radial port), best +roll = 2RT (two ports), so with
        // fraction ½ a single valve suffices for each single-axis command.
        let (t, r, l) = (2.0, 0.027, 0.5);
        let mut ports: Vec<_> = (0..4)
            .map(|k| {
                let a = k as f64 * FRAC_PI_2;
                port_at(
                    &format!("r{k}"),
                    -l,
                    r,
                    a,
                    -Vector3::new(0.0, a.cos(), a.sin()),
                    t,
                )
            })
            .collect();
        ports.extend((0..4).map(|k| {
            let a = k as f64 * FRAC_PI_2;
            let s = if k % 2 == 0 { 1.0 } else { -1.0 };
            port_at(
                &format!("t{k}"),
                0.0,
                r,
                a,
                Vector3::new(0.0, -a.sin(), a.cos()) * s,
                t,
            )
        }));
        let e = Effectiveness::from_ports(&ports).expect("valid");
        let opts = OnOffOptions {
            fraction: 0.5,
            tolerance: 0.05,
            coil_current_a: 0.4,
            ..Default::default()
        };
        let plan = OnOffPlan::new(&e, &opts, &full_supply, &Tolerances::default()).expect("plans");
        assert_relative_eq!(plan.best_positive.x, 2.0 * r * t, max_relative = 1e-12);
        assert_relative_eq!(plan.best_positive.y, t * l, max_relative = 1e-12);
        // r3 sits at clock 270°: τ = T L (eₓ × ĉ) with ĉ = −z gives +TL pitch.
        let pitch = plan.get([0, 1, 0]).expect("present");
        assert_eq!(pitch, &OnOffSelection::Meets(pitch.set().clone()));
        assert_eq!(pitch.set().ports, vec![3]);
        let both = plan.get([1, 1, 0]).expect("present").set();
        assert_eq!(both.valves_open, 2);
        assert_relative_eq!(both.peak_coil_current_a, 0.8, max_relative = 1e-15);
        assert_relative_eq!(
            both.gas_rate_kg_s,
            2.0 * e.mass_flow_kg_s()[0],
            max_relative = 1e-12
        );
        // Every command is met with one valve per commanded axis: 26 entries.
        for (c, s) in &plan.entries {
            let axes = c.iter().filter(|v| **v != 0).count();
            assert!(matches!(s, OnOffSelection::Meets(_)), "{c:?}");
            assert_eq!(s.set().valves_open, axes, "{c:?}");
        }
    }

    /// A pitch/yaw cross of radial ports and two mirrored tangential roll pairs
    /// (clock θ and θ + 180° push the same roll sense), on a 27 mm radius, with
    /// the roll ports `roll_arm` m and the radial ports `pitch_arm` m from the CG
    /// along the axis.
    fn cross_with_roll_pairs(theta: f64, roll_arm: f64, pitch_arm: f64) -> Effectiveness {
        Effectiveness::from_ports(&cross_ports(theta, roll_arm, pitch_arm)).expect("valid")
    }

    /// The same ports, each followed by an identical copy: every set has an exact twin.
    fn doubled_cross(theta: f64, roll_arm: f64, pitch_arm: f64) -> Effectiveness {
        let ports: Vec<_> = cross_ports(theta, roll_arm, pitch_arm)
            .into_iter()
            .flat_map(|p| [p.clone(), p])
            .collect();
        Effectiveness::from_ports(&ports).expect("valid")
    }

    fn cross_ports(
        theta: f64,
        roll_arm: f64,
        pitch_arm: f64,
    ) -> Vec<crate::allocation::PortGeometry> {
        let r = 0.027;
        let mut ports: Vec<_> = (0..4)
            .map(|k| {
                let a = k as f64 * FRAC_PI_2;
                let radial = Vector3::new(0.0, a.cos(), a.sin());
                port_at(&format!("radial-{k}"), pitch_arm, r, a, -radial, 1.6)
            })
            .collect();
        for (name, clock, sense) in [
            ("roll-pos-a", theta, 1.0),
            ("roll-pos-b", theta + PI, 1.0),
            ("roll-neg-a", theta + FRAC_PI_2, -1.0),
            ("roll-neg-b", theta + 3.0 * FRAC_PI_2, -1.0),
        ] {
            let travel = Vector3::new(0.0, -clock.sin(), clock.cos());
            ports.push(port_at(name, roll_arm, r, clock, travel * sense, 0.9));
        }
        ports
    }

    /// Least gas (kg/s) and valve count of a qualifying set.
    type GasAndCount = (f64, usize);

    /// Brute force, written from the module notes alone: every non-empty set, its
    /// torque summed from scratch in reverse port order (a different rounding from
    /// the Gray walk), thresholds with the share tolerance ε, least gas. Returns
    /// the least gas and valve count per command, `None` where nothing qualifies.
    fn brute_force(
        e: &Effectiveness,
        o: &OnOffOptions,
        factor: &dyn Fn(usize) -> f64,
    ) -> Vec<([i8; 3], Option<GasAndCount>)> {
        let tol = Tolerances::default();
        let (eps, n) = (tol.onoff_share, e.len());
        let sets: Vec<(Vector3<f64>, f64, usize)> = (1u32..(1 << n))
            .map(|mask| {
                let k = mask.count_ones() as usize;
                let mut t = Vector3::zeros();
                let mut gas = 0.0;
                for i in (0..n).rev().filter(|i| mask >> i & 1 == 1) {
                    t += e.torque().column(i) * factor(k);
                    gas += e.mass_flow_kg_s()[i] * factor(k);
                }
                (t, gas, k)
            })
            .collect();
        let best = |a: usize, sign: f64| sets.iter().map(|s| sign * s.0[a]).fold(0.0, f64::max);
        let pos = Vector3::from_fn(|a, _| best(a, 1.0));
        let neg = Vector3::from_fn(|a, _| best(a, -1.0));
        let noise = tol.onoff_noise * pos.sup(&neg).max();
        commands()
            .into_iter()
            .map(|c| {
                let ok = |t: &Vector3<f64>| {
                    (0..3).all(|a| match c[a] {
                        0 => t[a].abs() <= (o.tolerance + eps) * pos[a].max(neg[a]) + noise,
                        1 => t[a] >= ((o.fraction - eps) * pos[a]).max(noise),
                        _ => -t[a] >= ((o.fraction - eps) * neg[a]).max(noise),
                    })
                };
                let least = sets.iter().filter(|s| ok(&s.0)).map(|s| (s.1, s.2)).fold(
                    None,
                    |acc: Option<(f64, usize)>, s| match acc {
                        Some(b) if b.0 < s.0 * (1.0 - eps) => Some(b),
                        Some(b) if b.0 <= s.0 * (1.0 + eps) && b.1 <= s.1 => Some(b),
                        _ => Some(s),
                    },
                );
                (c, least)
            })
            .collect()
    }

    #[test]
    fn mirrored_roll_pairs_get_the_least_gas_rows() {
        // One port of a mirrored roll pair gives exactly half the best roll, the
        // default fraction. Over many clocks and lever arms (each like another
        // flight state's CG) and with and without droop, every row must cost the
        // brute-force least gas (1e-12 relative: sums of the same few flows) with
        // the same valve count, and ±roll rows must be alike: the same valve count
        // and gas, since the two pairs are mirror images.
        let tol = Tolerances::default();
        let o = OnOffOptions::default();
        let mut checked = 0;
        for step in 0..24 {
            let theta = FRAC_PI_4 + 0.01 * step as f64;
            let roll_arm = -0.40 + 0.013 * step as f64;
            let pitch_arm = -0.05 - 0.011 * step as f64;
            let e = cross_with_roll_pairs(theta, roll_arm, pitch_arm);
            let factor: &dyn Fn(usize) -> f64 = if step % 2 == 0 { &full_supply } else { &droop };
            let plan = OnOffPlan::by_enumeration(&e, &o, factor, &tol).expect("plans");
            for ((c, sel), (cb, reference)) in plan.entries.iter().zip(brute_force(&e, &o, factor))
            {
                assert_eq!(*c, cb);
                match (sel, reference) {
                    (OnOffSelection::Meets(set), Some((gas, k))) => {
                        assert_relative_eq!(set.gas_rate_kg_s, gas, max_relative = 1e-12);
                        assert_eq!(set.valves_open, k, "step {step} command {c:?}");
                        checked += 1;
                    }
                    (OnOffSelection::NearMiss { .. }, None) => {}
                    (got, want) => panic!("step {step} command {c:?}: {got:?} vs {want:?}"),
                }
            }
            let pos = plan.get([1, 0, 0]).expect("present").set();
            let neg = plan.get([-1, 0, 0]).expect("present").set();
            assert_eq!(pos.valves_open, neg.valves_open, "step {step}");
            assert_relative_eq!(pos.gas_rate_kg_s, neg.gas_rate_kg_s, max_relative = 1e-12);
        }
        assert!(checked > 24 * 12, "only {checked} rows compared");
    }

    #[test]
    fn near_miss_when_nothing_qualifies() {
        // A tangential pair at the CG station: both ports give +RT roll and nothing
        // else, so −roll is impossible and every non-empty set rolls positive.
        let e = Effectiveness::from_ports(&[
            port_at("a", 0.0, 0.027, 0.0, Vector3::z(), 1.0),
            port_at("b", 0.0, 0.027, std::f64::consts::PI, -Vector3::z(), 1.0),
        ])
        .expect("valid");
        let tol = Tolerances::default();
        let plan = OnOffPlan::new(&e, &OnOffOptions::default(), &full_supply, &tol).expect("plans");
        match plan.get([-1, 0, 0]).expect("present") {
            OnOffSelection::NearMiss { shortfall, set } => {
                // By hand: best −roll is 0, so the −roll threshold is the noise floor
                // (1e-9 of 2RT); one valve gives −roll = −RT, missing RT + floor, over
                // the roll scale 2RT: ½ + 1e-9. Two valves would miss 1, so one valve.
                assert_relative_eq!(*shortfall, 0.5, max_relative = 1e-8);
                assert_eq!(set.valves_open, 1);
            }
            other => panic!("expected a near miss, got {other:?}"),
        }
        assert!(matches!(
            plan.get([1, 0, 0]),
            Some(OnOffSelection::Meets(_))
        ));
    }

    #[test]
    fn droop_scales_the_set() {
        let mut rng = Rng(10);
        let e = random_layout(&mut rng, 6);
        let plan = OnOffPlan::new(&e, &OnOffOptions::default(), &droop, &Tolerances::default())
            .expect("plans");
        for (_, s) in &plan.entries {
            let set = s.set();
            let mut u = vec![0.0; e.len()];
            for &p in &set.ports {
                u[p] = 1.0;
            }
            let f = droop(set.valves_open);
            assert_relative_eq!(set.gas_rate_kg_s, e.gas_for(&u) * f, max_relative = 1e-14);
            assert!((set.torque - e.torque_for(&u) * f).norm() <= 1e-15);
        }
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(24))]
        #[test]
        fn selected_sets_honour_thresholds(seed in 0u64..100_000, n in 2usize..11,
                                           fraction in 0.0f64..1.0, tolerance in 0.0f64..0.5) {
            let tol = Tolerances::default();
            let e = random_layout(&mut Rng(seed), n);
            let opts = OnOffOptions { fraction, tolerance, ..Default::default() };
            let plan = OnOffPlan::new(&e, &opts, &droop, &tol).expect("plans");
            let noise = tol.onoff_noise * plan.best_positive.sup(&plan.best_negative).max();
            for (c, s) in &plan.entries {
                match s {
                    OnOffSelection::Meets(set) => {
                        prop_assert!(honours(&plan, set, c, &opts, noise), "{:?} {:?}", c, set);
                    }
                    OnOffSelection::NearMiss { shortfall, set } => {
                        prop_assert!(*shortfall > 0.0);
                        prop_assert!(!honours(&plan, set, c, &opts, noise));
                    }
                }
                // The limits agree with the independent statement.
                let lim = Limits::new(&e, &opts, &droop, &tol).expect("valid");
                prop_assert_eq!(lim.qualifies(&s.set().torque, c), honours(&plan, s.set(), c, &opts, noise));
            }
        }
    }
}
