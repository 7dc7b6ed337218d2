//! The transient and the periodic steady state of a netlist.
//!
//! # Integration
//! Charges, not capacitances, are integrated, so that no charge drifts
//! over many cycles: each storing branch (a capacitor, a transistor's
//! base–emitter and base–collector charges) carries its charge q(v), and
//! its current is the backward-difference formula of second order (BDF2)
//! applied to q:
//!
//! ```text
//! i_n = (3·q_n − 4·q_(n−1) + q_(n−2)) / (2h)        (equal steps h)
//! ```
//!
//! BDF2 is second order and L-stable (Gear, *Numerical Initial Value
//! Problems in Ordinary Differential Equations*, 1971): the very fast
//! modes of the junction charges (picoseconds beside a millisecond
//! period) are damped in one step instead of ringing as under the
//! trapezoidal rule. The first step, which has no second history point,
//! is backward Euler (the damped start). At each time point Newton solves
//! the MNA equations with every charge replaced by its companion: the
//! conductance (3/2h)·C(v) and the current the history leaves, C and q
//! evaluated at the iterate (the transistor's junctions limited as in the
//! DC solve).
//!
//! The free-running transient ([`transient`]) varies its step to hold the
//! local truncation error of every charge within a tolerance. The error is
//! estimated by Milne's device: the gap between the BDF2 charge and the
//! quadratic extrapolation of the three previous ones, times the ratio of
//! the two formulas' error constants (2/9 against 1, so 2/11 of the gap at
//! equal steps); a step whose error is over the tolerance is taken again,
//! shorter, and the next step is scaled by (tolerance/error)^(1/3)
//! (Hairer, Nørsett & Wanner, *Solving Ordinary Differential Equations I*,
//! §II.4; the variable-step BDF2 coefficients as in Hairer & Wanner II,
//! §III.5).
//!
//! # Periodic steady state
//! Shooting (Aprille & Trick, Proc. IEEE 60, 1972): the state at the start
//! of a period, z = (q_0, q_(−1)) (the two charge histories BDF2 starts
//! from), is sought with Φ(z) = z, where Φ integrates one period on
//! uniform steps T/N. Newton on z needs ∂Φ/∂z: it is carried along the
//! period from each step's factored Jacobian J. The history moves the
//! branch voltages by −K·∂hist/∂z with K = Bᵀ·J⁻¹·B (B the branches'
//! incidence), so a step costs m extra solves (m storing branches) and a
//! small m × m × 2m product. A few periods then find the steady state
//! however long the coupling capacitors' time constants are. A Newton step
//! that does not reduce the residual is halved. Once a step is below
//! 1 mV across its capacitance, the next period skips the sensitivities
//! and, if it does not end the search, the last Jacobian serves (a chord
//! step, at most one in a row). The search ends when every charge returns
//! to within 1e-10 V·(1 + |v|) across its capacitance and to 1e-10 of its
//! own swing (or 16 ε of itself), the latter pursued only while Newton
//! still gains (at most three periods). A time point that does not
//! converge is solved again from the last point with more iterations,
//! then with a 1 pS GMIN to ground, then in 4, 16 or 64 backward-Euler
//! steps (their sensitivities carried through). The waveform returned is
//! the period integrated from the final z, on the same uniform grid, so
//! that a DFT of its samples needs no window.
//!
//! An ideal (infinite) capacitor holds the voltage the DC solve leaves
//! across it.

// The loops index the branches' charges, histories and sensitivities together.
#![allow(clippy::needless_range_loop)]

use alloc::string::String;
use alloc::vec;
use alloc::vec::Vec;

use super::charges::Charges;
use super::dc::{
    is_ideal, limit_transistors, solve_dc, stamp_linear, stamp_transistor, transistors, DcSolution,
    Junctions, Numbered,
};
use super::dense::{Dense, Lu, MAX_UNKNOWNS};
use super::netlist::{Element, Netlist, Node};
use crate::error::{Error, ErrorKind, Result};
use crate::transistor::Device;

type X = [f64; MAX_UNKNOWNS];

/// Largest number of Newton iterations at one time point.
const POINT_ITERATIONS: u32 = 60;
/// A time point has converged when no node moves by more than this, V,
/// plus the relative part below.
const POINT_STEP_ABS: f64 = 1e-10;
/// The relative part of the time point's step test.
const POINT_STEP_REL: f64 = 1e-10;
/// Newton steps (V) below which a time point's solves are refined.
const REFINE_BELOW: f64 = 1e-6;
/// The conductance from every node to ground of a time point's last try,
/// S (a circuit simulator's customary GMIN): it keeps a node that the
/// junctions alone hold, both cut off, from making the matrix singular.
const POINT_GMIN: f64 = 1e-12;
/// Largest number of shooting periods.
const SHOOTING_PERIODS: u32 = 40;
/// The steady state is found when every charge returns to its start to
/// within this many volts across its capacitance (its charge change over
/// its capacitance at the bias, or 1 fF if less) plus the relative part.
const SHOOTING_ABS: f64 = 1e-10;
/// The relative part of the shooting test, of the branch voltage.
const SHOOTING_REL: f64 = 1e-10;
/// And, while Newton still gains, every charge returns to within this
/// share of its swing over the period.
const SHOOTING_SWING: f64 = 1e-10;

/// What a branch stores.
#[derive(Debug, Clone, Copy)]
enum Store {
    /// A linear capacitor, F.
    Linear(f64),
    /// The base–emitter charge of transistor `t` (its order in the netlist).
    BaseEmitter {
        t: usize,
        device: Device,
        charges: Charges,
        sign: f64,
    },
    /// The base–collector charge of transistor `t`.
    BaseCollector {
        t: usize,
        charges: Charges,
        sign: f64,
    },
}

/// A charge-storing branch from `a` to `b` (its current flows from `a`
/// through it to `b`).
#[derive(Debug, Clone, Copy)]
struct Branch {
    a: Node,
    b: Node,
    store: Store,
}

impl Branch {
    /// The charge and the capacitance at the branch voltage V(a) − V(b).
    fn charge(&self, v: f64) -> (f64, f64) {
        match self.store {
            Store::Linear(c) => (c * v, c),
            Store::BaseEmitter {
                device,
                charges,
                sign,
                ..
            } => {
                let (q, c) = charges.base_emitter(&device, sign * v);
                (sign * q, c)
            }
            Store::BaseCollector { charges, sign, .. } => {
                let (q, c) = charges.base_collector(sign * v);
                (sign * q, c)
            }
        }
    }

    /// The branch voltage at the iterate `x`, a transistor's from its
    /// (limited) junction voltages `j`.
    fn voltage(&self, num: &Numbered<'_>, x: &X, j: &[Junctions]) -> f64 {
        match self.store {
            Store::Linear(_) => num.v(x, self.a.0) - num.v(x, self.b.0),
            Store::BaseEmitter { t, sign, .. } => sign * j[t].vbe,
            Store::BaseCollector { t, sign, .. } => sign * j[t].vbc,
        }
    }
}

/// The netlist made ready for time stepping.
struct Engine<'a> {
    num: Numbered<'a>,
    branches: Vec<Branch>,
    /// Each ideal capacitor's nodes and the DC voltage it holds.
    held: Vec<(Node, Node, f64)>,
    /// The number of transistors.
    transistors: usize,
    /// The DC solution as unknowns.
    x_dc: X,
}

/// The stored state at the end of a time step (per branch) and the
/// factored Jacobian there.
struct PointOut {
    lu: Lu,
    iterations: u32,
}

fn no_convergence(field: &str, iterations: u32, residual: f64) -> Error {
    Error::new(
        field,
        ErrorKind::NoConvergence {
            iterations,
            residual,
        },
    )
}

impl<'a> Engine<'a> {
    fn new(net: &'a Netlist, dc: &DcSolution) -> Result<Engine<'a>> {
        let num = Numbered::new(net, true)?;
        let mut branches = Vec::new();
        let mut held = Vec::new();
        let mut t = 0;
        for e in net.elements() {
            match *e {
                Element::Capacitor { a, b, farads } if is_ideal(farads) => {
                    held.push((a, b, dc.voltages[a.0] - dc.voltages[b.0]));
                }
                Element::Capacitor { a, b, farads } if farads > 0.0 => branches.push(Branch {
                    a,
                    b,
                    store: Store::Linear(farads),
                }),
                Element::Bjt {
                    c,
                    b,
                    e,
                    device,
                    polarity,
                    charges,
                } => {
                    let sign = polarity.sign();
                    if charges.tau_f > 0.0 || charges.emitter.cj0 > 0.0 {
                        branches.push(Branch {
                            a: b,
                            b: e,
                            store: Store::BaseEmitter {
                                t,
                                device,
                                charges,
                                sign,
                            },
                        });
                    }
                    if charges.collector.cj0 > 0.0 {
                        branches.push(Branch {
                            a: b,
                            b: c,
                            store: Store::BaseCollector { t, charges, sign },
                        });
                    }
                    t += 1;
                }
                _ => {}
            }
        }
        if 2 * branches.len() > MAX_UNKNOWNS {
            return Err(Error::new(
                "netlist",
                ErrorKind::OutOfRange {
                    value: branches.len() as f64,
                    unit: "",
                    allowed: String::from(
                        "at most 8 charge-storing branches (capacitors and junction charges)",
                    ),
                },
            ));
        }
        let mut x_dc = [0.0; MAX_UNKNOWNS];
        for (node, slot) in num.index.iter().enumerate() {
            if let Some(k) = *slot {
                x_dc[k] = dc.voltages[node];
            }
        }
        for (k, i) in dc.source_currents.iter().enumerate() {
            x_dc[num.first_source + k] = *i;
        }
        Ok(Engine {
            num,
            branches,
            held,
            transistors: t,
            x_dc,
        })
    }

    /// The linear part at time `t`, the ideal capacitors held.
    fn linear(&self, t: f64) -> Dense {
        let mut lin = Dense::new(self.num.n);
        stamp_linear(&self.num, &mut lin, 1.0, Some(t));
        for (k, &(a, b, v)) in self.held.iter().enumerate() {
            let row = self.num.first_ideal + k;
            self.num.stamp_source(&mut lin.a, row, a, b, 1.0);
            lin.b[row] = v;
        }
        lin
    }

    /// The junction voltages of every transistor at `x`, unlimited.
    fn junctions(&self, x: &X, j: &mut [Junctions]) {
        for (t, (c, b, e, _, polarity)) in transistors(self.num.net).enumerate() {
            let s = polarity.sign();
            let vb = self.num.v(x, b.0);
            j[t] = Junctions {
                vbe: s * (vb - self.num.v(x, e.0)),
                vbc: s * (vb - self.num.v(x, c.0)),
            };
        }
    }

    /// Solves the time point `t` where each branch's current is
    /// a0·q(v) + hist[b], from the guess in `x`; leaves the solution in
    /// `x`, its charges in `q` and capacitances in `c`.
    #[allow(clippy::too_many_arguments)]
    fn point(
        &self,
        t: f64,
        a0: f64,
        hist: &[f64],
        x: &mut X,
        j: &mut [Junctions],
        q: &mut [f64],
        c: &mut [f64],
        iterations: u32,
        gmin: f64,
    ) -> Option<PointOut> {
        let mut lin = self.linear(t);
        for i in 0..self.num.first_source {
            lin.a[i][i] += gmin;
        }
        let mut last_step = f64::INFINITY;
        self.junctions(x, j);
        let nodes = self.num.first_source;
        for it in 1..=iterations {
            let mut sys = lin;
            for (k, (cn, b, e, device, polarity)) in transistors(self.num.net).enumerate() {
                stamp_transistor(&self.num, &mut sys, (cn, b, e), &device, polarity, j[k]);
            }
            for (br, h) in self.branches.iter().zip(hist) {
                let v0 = br.voltage(&self.num, x, j);
                let (q0, c0) = br.charge(v0);
                let g = a0 * c0;
                // i = a0·q(v) + hist ≈ g·v + (a0·q0 + hist − g·v0), from a to b.
                let i_eq = a0 * q0 + h - g * v0;
                self.num.stamp_admittance(&mut sys.a, br.a, br.b, g);
                if let Some(r) = self.num.index[br.a.0] {
                    sys.b[r] -= i_eq;
                }
                if let Some(r) = self.num.index[br.b.0] {
                    sys.b[r] += i_eq;
                }
            }
            let lu = Lu::factor(&sys)?;
            // On a retry, near the answer the solve is refined (as the DC
            // solve's), so that an ill-conditioned network still meets the
            // step test (the first try goes without: it is the common case).
            let refine = iterations > POINT_ITERATIONS && last_step < REFINE_BELOW;
            let new = sys.solve_factored(&lu, if refine { 2 } else { 0 })?;
            let limited = limit_transistors(&self.num, &new, j);
            let mut step: f64 = 0.0;
            let mut size: f64 = 0.0;
            for i in 0..nodes {
                step = step.max(libm::fabs(new[i] - x[i]));
                size = size.max(libm::fabs(new[i]));
            }
            *x = new;
            if !limited && step <= POINT_STEP_ABS + POINT_STEP_REL * size {
                for (k, br) in self.branches.iter().enumerate() {
                    let (qk, ck) = br.charge(br.voltage(&self.num, x, j));
                    q[k] = qk;
                    c[k] = ck;
                }
                return Some(PointOut { lu, iterations: it });
            }
            last_step = step;
        }
        None
    }

    /// A time point with its retries: from the guess in `x`, then from
    /// `last` with more iterations, then with a GMIN to ground. Adds the
    /// iterations of the failed tries to `spent`.
    #[allow(clippy::too_many_arguments)]
    fn point_tries(
        &self,
        t: f64,
        a0: f64,
        hist: &[f64],
        x: &mut X,
        last: &X,
        j: &mut [Junctions],
        q: &mut [f64],
        c: &mut [f64],
        spent: &mut u32,
    ) -> Option<PointOut> {
        for (k, (its, gmin)) in [
            (POINT_ITERATIONS, 0.0),
            (8 * POINT_ITERATIONS, 0.0),
            (8 * POINT_ITERATIONS, POINT_GMIN),
        ]
        .into_iter()
        .enumerate()
        {
            if k > 0 {
                *x = *last;
            }
            if let Some(out) = self.point(t, a0, hist, x, j, q, c, its, gmin) {
                *spent += out.iterations;
                return Some(out);
            }
            *spent += its;
        }
        None
    }

    /// The charges' sensitivities after a time point whose factored
    /// Jacobian is `lu` and whose history moves by `dh(k, col)` (branch k,
    /// state column col): S = C·(−K·∂hist/∂z), K = Bᵀ·J⁻¹·B, into `out`
    /// (m × w, row-major).
    fn propagate(
        &self,
        lu: &Lu,
        c: &[f64],
        kmat: &mut [f64],
        out: &mut [f64],
        w: usize,
        dh: impl Fn(usize, usize) -> f64,
    ) -> Option<()> {
        let m = self.branches.len();
        for k in 0..m {
            let br = &self.branches[k];
            let mut rhs = [0.0; MAX_UNKNOWNS];
            if let Some(r) = self.num.index[br.a.0] {
                rhs[r] += 1.0;
            }
            if let Some(r) = self.num.index[br.b.0] {
                rhs[r] -= 1.0;
            }
            let y = lu.solve(&rhs)?;
            for (r, other) in self.branches.iter().enumerate() {
                kmat[r * m + k] = self.num.v(&y, other.a.0) - self.num.v(&y, other.b.0);
            }
        }
        let mut d = [0.0; MAX_UNKNOWNS];
        for col in 0..w {
            for (k, dk) in d.iter_mut().enumerate().take(m) {
                *dk = dh(k, col);
            }
            for r in 0..m {
                let mut dv = 0.0;
                for k in 0..m {
                    dv -= kmat[r * m + k] * d[k];
                }
                out[r * w + col] = c[r] * dv;
            }
        }
        Some(())
    }

    /// The charges and capacitances at `x`.
    fn charges_at(&self, x: &X) -> (Vec<f64>, Vec<f64>) {
        let mut j = vec![Junctions { vbe: 0.0, vbc: 0.0 }; self.transistors];
        self.junctions(x, &mut j);
        self.branches
            .iter()
            .map(|br| br.charge(br.voltage(&self.num, x, &j)))
            .unzip()
    }
}

/// One period's record.
struct Record {
    /// The unknowns at each step's end.
    x: Vec<X>,
    /// Each branch's current at each step, `[step][branch]`.
    current: Vec<Vec<f64>>,
    /// Each branch's lowest and highest charge over the period, C.
    range: Vec<(f64, f64)>,
}

impl<'a> Engine<'a> {
    /// Integrates one period of `steps` uniform steps from the state `z`
    /// (q_0 then q_(−1)) and the guess `x`; returns Φ(z), its Jacobian
    /// ∂Φ/∂z (row-major, 2m × 2m) and the Newton iterations, and records
    /// the period in `rec` (without `sensitivities`, the Jacobian returned
    /// is not computed).
    fn period(
        &self,
        z: &[f64],
        x: &mut X,
        steps: usize,
        period: f64,
        rec: &mut Record,
        sensitivities: bool,
    ) -> Result<(Vec<f64>, Vec<f64>, u32)> {
        let m = self.branches.len();
        let w = 2 * m;
        let h = period / steps as f64;
        let a0 = 1.5 / h;
        let mut q1 = z[..m].to_vec();
        let mut q2 = z[m..].to_vec();
        let mut q = vec![0.0; m];
        let mut c = vec![0.0; m];
        let mut hist = vec![0.0; m];
        // ∂q_(n−1)/∂z and ∂q_(n−2)/∂z, m × 2m each.
        let mut s1 = vec![0.0; m * w];
        let mut s2 = vec![0.0; m * w];
        for k in 0..m {
            s1[k * w + k] = 1.0;
            s2[k * w + m + k] = 1.0;
        }
        let mut s_new = vec![0.0; m * w];
        let mut kmat = vec![0.0; m * m];
        let mut j = vec![Junctions { vbe: 0.0, vbc: 0.0 }; self.transistors];
        let mut iterations = 0;
        rec.x.clear();
        rec.range.clear();
        rec.range.extend(z[..m].iter().map(|q| (*q, *q)));
        for n in 1..=steps {
            let t = n as f64 * h;
            for k in 0..m {
                // formula: hist = (−4·q_(n−1) + q_(n−2))/(2h)
                hist[k] = (-4.0 * q1[k] + q2[k]) / (2.0 * h);
            }
            // The guess: the quadratic through the last three points
            // (the waveform is smooth on the grid), else the last point.
            let last = *x;
            if n > 3 {
                let (x1, x2, x3) = (&rec.x[n - 2], &rec.x[n - 3], &rec.x[n - 4]);
                for i in 0..self.num.n {
                    x[i] = 3.0 * x1[i] - 3.0 * x2[i] + x3[i];
                }
            }
            // Should the guess lead Newton astray (a corner of a clipped
            // waveform), the point is solved again from the last one with
            // more iterations, then with a GMIN to ground, and last the
            // step is divided into 4, 16 or 64 backward-Euler steps.
            let mut spent = 0;
            let solved =
                self.point_tries(t, a0, &hist, x, &last, &mut j, &mut q, &mut c, &mut spent);
            iterations += spent;
            let current_a0;
            match solved {
                Some(out) => {
                    // The sensitivities: J·∂x/∂z = −B·∂hist/∂z (B the
                    // branches' incidence), so the branch voltages move by
                    // ∂v/∂z = −K·∂hist/∂z with K = Bᵀ·J⁻¹·B (m solves, not
                    // 2m), and then ∂q/∂z = C·∂v/∂z.
                    if sensitivities {
                        self.propagate(&out.lu, &c, &mut kmat, &mut s_new, w, |k, col| {
                            (-4.0 * s1[k * w + col] + s2[k * w + col]) / (2.0 * h)
                        })
                        .ok_or_else(|| no_convergence("steady state", iterations, f64::NAN))?;
                    }
                    current_a0 = (a0, hist.clone());
                }
                None => {
                    let mut done = None;
                    for parts in [4usize, 16, 64] {
                        let d = h / parts as f64;
                        *x = last;
                        let mut qs = q1.clone();
                        let mut ss = s1.clone();
                        let mut ok = true;
                        let mut hs = vec![0.0; m];
                        for i in 1..=parts {
                            for k in 0..m {
                                hs[k] = -qs[k] / d;
                            }
                            let guess = *x;
                            let ti = t - h + i as f64 * d;
                            let mut spent = 0;
                            let out = self.point_tries(
                                ti,
                                1.0 / d,
                                &hs,
                                x,
                                &guess,
                                &mut j,
                                &mut q,
                                &mut c,
                                &mut spent,
                            );
                            iterations += spent;
                            let Some(out) = out else {
                                ok = false;
                                break;
                            };
                            if sensitivities {
                                let prev = ss.clone();
                                self.propagate(&out.lu, &c, &mut kmat, &mut ss, w, |k, col| {
                                    -prev[k * w + col] / d
                                })
                                .ok_or_else(|| {
                                    no_convergence("steady state", iterations, f64::NAN)
                                })?;
                            }
                            if i < parts {
                                qs.copy_from_slice(&q);
                            }
                        }
                        if ok {
                            done = Some((1.0 / d, hs, ss));
                            break;
                        }
                    }
                    let (a0s, hs, ss) =
                        done.ok_or_else(|| no_convergence("steady state", iterations, f64::NAN))?;
                    s_new.copy_from_slice(&ss);
                    current_a0 = (a0s, hs);
                }
            }
            let row = rec.x.len();
            if rec.current.len() <= row {
                rec.current.push(vec![0.0; m]);
            }
            for k in 0..m {
                rec.current[row][k] = current_a0.0 * q[k] + current_a0.1[k];
            }
            rec.x.push(*x);
            core::mem::swap(&mut q2, &mut q1);
            q1.copy_from_slice(&q);
            for (r, qk) in rec.range.iter_mut().zip(&q) {
                *r = (r.0.min(*qk), r.1.max(*qk));
            }
            core::mem::swap(&mut s2, &mut s1);
            s1.copy_from_slice(&s_new);
        }
        let mut phi = q1;
        phi.extend_from_slice(&q2);
        let mut jac = s1;
        jac.extend_from_slice(&s2);
        Ok((phi, jac, iterations))
    }
}

/// A periodic steady state on a uniform grid.
#[derive(Debug, Clone, PartialEq)]
pub struct Periodic {
    /// The period, s.
    pub period: f64,
    /// The sample times, s: T/N, 2T/N, …, T (the waveform repeats, so the
    /// last is also the start).
    pub time: Vec<f64>,
    /// The voltage of every node at each sample, `[node][sample]`, V.
    pub voltages: Vec<Vec<f64>>,
    /// The current into each transistor's collector terminal at each
    /// sample (transport, junction and charge currents together),
    /// `[transistor][sample]`, A.
    pub collector_currents: Vec<Vec<f64>>,
    /// The current of each finite capacitor, in netlist order, from its
    /// first node through it to its second, `[capacitor][sample]`, A.
    pub capacitor_currents: Vec<Vec<f64>>,
    /// Shooting periods integrated.
    pub periods: u32,
    /// The state the accepted period starts from: each charge-storing
    /// branch's charge at the start, then one step before (C), to seed a
    /// neighbouring solve ([`periodic_steady_state_from`]).
    pub start: Vec<f64>,
    /// The DC state's charges, one per charge-storing branch: what `start`
    /// departs from.
    pub dc: Vec<f64>,
    /// Newton iterations over every time point of every period.
    pub newton_iterations: u32,
    /// The largest charge mismatch over the accepted period, in volts
    /// across its capacitance (at the bias, or 1 fF if less).
    pub residual: f64,
}

/// The periodic steady state of `net` when every sine source runs at
/// `frequency` hertz, sampled at `samples` uniform steps per period.
///
/// # Errors
/// [`ErrorKind::OutOfRange`] naming `frequency` or `samples` (16 to 8192)
/// for values outside those ranges; the DC solve's errors;
/// [`ErrorKind::NoConvergence`] naming `steady state` when a time point or
/// the shooting Newton does not converge.
pub fn periodic_steady_state(net: &Netlist, frequency: f64, samples: usize) -> Result<Periodic> {
    periodic_steady_state_from(net, frequency, samples, None)
}

/// [`periodic_steady_state`] started from a neighbouring solution: with
/// `seed` = (the [`Periodic::start`] and [`Periodic::dc`] of a steady state
/// of a netlist of the same elements, at another drive or with other
/// values, and the ratio r of this drive to that one), the first guess of
/// the state is this netlist's DC state plus r times that one's departure
/// from its own DC state (exact for a linear circuit), which saves a period
/// or two along a sweep of amplitudes or over a tolerance box. A seed of
/// another shape is ignored.
///
/// # Errors
/// As [`periodic_steady_state`].
pub fn periodic_steady_state_from(
    net: &Netlist,
    frequency: f64,
    samples: usize,
    seed: Option<(&[f64], &[f64], f64)>,
) -> Result<Periodic> {
    if !(frequency.is_finite() && frequency > 0.0) {
        return Err(Error::new(
            "frequency",
            ErrorKind::OutOfRange {
                value: frequency,
                unit: "Hz",
                allowed: String::from("a positive frequency"),
            },
        ));
    }
    if !(16..=8192).contains(&samples) {
        return Err(Error::new(
            "samples",
            ErrorKind::OutOfRange {
                value: samples as f64,
                unit: "",
                allowed: String::from("16 to 8192 samples per period"),
            },
        ));
    }
    let dc = solve_dc(net)?;
    let engine = Engine::new(net, &dc)?;
    let m = engine.branches.len();
    let period = 1.0 / frequency;
    let (q_dc, c_dc) = engine.charges_at(&engine.x_dc);
    let scale: Vec<f64> = c_dc.iter().map(|c| libm::fmax(*c, 1e-15)).collect();
    let mut z = q_dc.clone();
    z.extend_from_slice(&q_dc);
    if let Some((start, seed_dc, r)) = seed {
        if start.len() == z.len() && seed_dc.len() == m && r.is_finite() {
            for (k, zk) in z.iter_mut().enumerate() {
                *zk = q_dc[k % m] + r * (start[k] - seed_dc[k % m]);
            }
        }
    }
    let mut x = engine.x_dc;
    let mut rec = Record {
        x: Vec::with_capacity(samples),
        current: Vec::with_capacity(samples),
        range: Vec::with_capacity(m),
    };
    let mut newton_iterations = 0;
    let mut previous: Option<(Vec<f64>, Vec<f64>, f64)> = None;
    let mut periods = 0;
    // Without sensitivities once Newton's last step was this small (volts
    // across a capacitance): its quadratic convergence makes the next
    // period the last, and if not, the last Jacobian serves (a chord step).
    const CHORD_BELOW: f64 = 1e-3;
    let mut jac_last: Vec<f64> = Vec::new();
    let mut strict_prev = f64::INFINITY;
    let mut loose_passes = 0;
    let mut sensitivities = true;
    let residual = loop {
        if periods >= SHOOTING_PERIODS {
            return Err(no_convergence("steady state", newton_iterations, f64::NAN));
        }
        periods += 1;
        let (phi, jac, its) =
            engine.period(&z, &mut x, samples, period, &mut rec, sensitivities)?;
        newton_iterations += its;
        if sensitivities {
            jac_last = jac;
        }
        // The mismatch, in volts across each branch's capacitance.
        let mut norm: f64 = 0.0;
        for k in 0..2 * m {
            let b = k % m;
            let v = libm::fabs(phi[k] / scale[b]);
            let gap = libm::fabs(phi[k] - z[k]) / scale[b];
            norm = norm.max(gap / (SHOOTING_ABS + SHOOTING_REL * v));
        }
        // The stricter test, of the branch's own charge swing over the
        // period (a nearly idle capacitor's mean current stays a small
        // share of its own peak), down to a few units of rounding of its
        // charge; once the first test holds, it is pursued as long as
        // Newton still gains.
        let mut strict: f64 = 0.0;
        for k in 0..2 * m {
            let b = k % m;
            let (lo, hi) = rec.range[b];
            let floor = 16.0 * f64::EPSILON * libm::fmax(libm::fabs(lo), libm::fabs(hi));
            let gap = libm::fabs(phi[k] - z[k]);
            strict = strict.max(gap / (SHOOTING_SWING * (hi - lo) + floor + f64::MIN_POSITIVE));
        }
        if norm <= 1.0 {
            loose_passes += 1;
        }
        if norm <= 1.0 && (strict <= 1.0 || strict >= 0.25 * strict_prev || loose_passes >= 3) {
            let mut gap_v: f64 = 0.0;
            for k in 0..2 * m {
                gap_v = gap_v.max(libm::fabs(phi[k] - z[k]) / scale[k % m]);
            }
            break gap_v;
        }
        strict_prev = strict;
        if let Some((z_prev, step, norm_prev)) = &previous {
            // A step that made things worse is halved (from where it began).
            if norm > *norm_prev && step.iter().any(|d| *d != 0.0) {
                let half: Vec<f64> = step.iter().map(|d| 0.5 * d).collect();
                z = z_prev.iter().zip(&half).map(|(a, d)| a + d).collect();
                previous = Some((z_prev.clone(), half, *norm_prev));
                sensitivities = true;
                continue;
            }
        }
        // Newton: (∂Φ/∂z − I)·Δ = −(Φ(z) − z).
        let w = 2 * m;
        let mut sys = Dense::new(w);
        for r in 0..w {
            for col in 0..w {
                sys.a[r][col] = jac_last[r * w + col] - if r == col { 1.0 } else { 0.0 };
            }
            sys.b[r] = -(phi[r] - z[r]);
        }
        let delta = sys
            .solve_refined(1)
            .ok_or_else(|| no_convergence("steady state", newton_iterations, norm))?;
        let step: Vec<f64> = delta[..w].to_vec();
        let z_prev = z.clone();
        let mut largest: f64 = 0.0;
        for k in 0..w {
            z[k] += step[k];
            largest = largest.max(libm::fabs(step[k]) / scale[k % m]);
        }
        // One chord step at most in a row: a period without sensitivities
        // that did not end it is followed by one with them.
        sensitivities = largest > CHORD_BELOW || !sensitivities;
        previous = Some((z_prev, step, norm));
    };
    let start = z.clone();
    // Read the accepted period out.
    let nodes = net.nodes();
    let mut voltages = vec![Vec::with_capacity(samples); nodes];
    for xs in &rec.x {
        for (node, v) in voltages.iter_mut().enumerate() {
            v.push(engine.num.v(xs, node));
        }
    }
    let h = period / samples as f64;
    let time = (1..=samples).map(|n| n as f64 * h).collect();
    let mut collector_currents = vec![Vec::with_capacity(samples); engine.transistors];
    let mut j = vec![Junctions { vbe: 0.0, vbc: 0.0 }; engine.transistors];
    for (n, xs) in rec.x.iter().enumerate() {
        engine.junctions(xs, &mut j);
        for (t, (_, _, _, device, polarity)) in transistors(net).enumerate() {
            let mut ic = polarity.sign() * device.currents(j[t].vbe, j[t].vbc).ic;
            for (k, br) in engine.branches.iter().enumerate() {
                if let Store::BaseCollector { t: bt, .. } = br.store {
                    if bt == t {
                        // The charge current flows from the base into the
                        // collector node inside the device.
                        ic -= rec.current[n][k];
                    }
                }
            }
            collector_currents[t].push(ic);
        }
    }
    let capacitor_currents = engine
        .branches
        .iter()
        .enumerate()
        .filter(|(_, br)| matches!(br.store, Store::Linear(_)))
        .map(|(k, _)| rec.current[..rec.x.len()].iter().map(|i| i[k]).collect())
        .collect();
    Ok(Periodic {
        period,
        time,
        voltages,
        collector_currents,
        capacitor_currents,
        periods,
        start,
        dc: q_dc,
        newton_iterations,
        residual,
    })
}

/// What [`transient`] is asked for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TransientOptions {
    /// Where it stops, s.
    pub stop: f64,
    /// The step, s: the fixed step, or the first and largest one when
    /// `tolerance` is set.
    pub step: f64,
    /// The local truncation error allowed per step, in volts across each
    /// charge's capacitance: `None` for fixed steps.
    pub tolerance: Option<f64>,
    /// Time points before this are not kept, s.
    pub record_from: f64,
}

/// A transient's record.
#[derive(Debug, Clone, PartialEq)]
pub struct TransientRun {
    /// The kept time points, s.
    pub time: Vec<f64>,
    /// The voltage of every node at each kept point, `[node][point]`, V.
    pub voltages: Vec<Vec<f64>>,
    /// Steps taken and steps taken again (shorter), all told.
    pub steps: u32,
    /// Steps rejected for their truncation error, or taken again at a
    /// quarter of the step when a time point did not converge.
    pub rejected: u32,
}

/// The transient of `net` from its DC state at t = 0: backward Euler for
/// the first step, BDF2 after it (with variable-step coefficients when
/// `tolerance` is set, the step then chosen by the truncation error, as
/// the module docs say).
///
/// # Errors
/// [`ErrorKind::OutOfRange`] naming `stop`, `step` or `tolerance` for
/// non-positive or non-finite values, or for more than ten million fixed
/// steps;
/// the DC solve's errors; [`ErrorKind::NoConvergence`] naming `transient`
/// when a time point does not converge even at a step a millionth of the
/// first.
pub fn transient(net: &Netlist, o: &TransientOptions) -> Result<TransientRun> {
    let positive = |v: f64| v.is_finite() && v > 0.0;
    for (field, v, unit) in [("stop", o.stop, "s"), ("step", o.step, "s")] {
        if !positive(v) {
            return Err(Error::new(
                field,
                ErrorKind::OutOfRange {
                    value: v,
                    unit,
                    allowed: String::from("a positive time"),
                },
            ));
        }
    }
    if o.tolerance.is_some_and(|t| !positive(t)) {
        return Err(Error::new(
            "tolerance",
            ErrorKind::OutOfRange {
                value: o.tolerance.unwrap_or(0.0),
                unit: "V",
                allowed: String::from("a positive voltage"),
            },
        ));
    }
    if o.tolerance.is_none() && o.stop / o.step > 1e7 {
        return Err(Error::new(
            "step",
            ErrorKind::OutOfRange {
                value: o.step,
                unit: "s",
                allowed: String::from("at most ten million steps to the stop time"),
            },
        ));
    }
    let dc = solve_dc(net)?;
    let engine = Engine::new(net, &dc)?;
    let m = engine.branches.len();
    let mut x = engine.x_dc;
    let (q0, c0) = engine.charges_at(&x);
    let scale: Vec<f64> = c0.iter().map(|c| libm::fmax(*c, 1e-15)).collect();
    // History: (t, q) of the last three accepted points, newest first.
    let mut past: Vec<(f64, Vec<f64>)> = vec![(0.0, q0); 3];
    let mut filled = 1;
    let mut q = vec![0.0; m];
    let mut c = vec![0.0; m];
    let mut hist = vec![0.0; m];
    let mut j = vec![Junctions { vbe: 0.0, vbc: 0.0 }; engine.transistors];
    let nodes = net.nodes();
    let mut run = TransientRun {
        time: Vec::new(),
        voltages: vec![Vec::new(); nodes],
        steps: 0,
        rejected: 0,
    };
    let keep = |run: &mut TransientRun, t: f64, x: &X| {
        if t >= o.record_from {
            run.time.push(t);
            for (node, v) in run.voltages.iter_mut().enumerate() {
                v.push(engine.num.v(x, node));
            }
        }
    };
    keep(&mut run, 0.0, &x);
    let mut t = 0.0;
    // The first step is short when the step is chosen, so that the error
    // estimate has history to work from.
    let mut h = match o.tolerance {
        Some(_) => o.step * 1e-3,
        None => o.step,
    };
    let h_min = o.step * 1e-6;
    while t < o.stop * (1.0 - 1e-12) {
        h = libm::fmin(h, o.stop - t);
        let tn = t + h;
        // The integration formula: i = a0·q_n + hist.
        let a0 = if filled == 1 {
            for k in 0..m {
                hist[k] = -past[0].1[k] / h;
            }
            1.0 / h
        } else {
            // formula: variable-step BDF2, ω = h_n/h_(n−1):
            // h·q' = (1+2ω)/(1+ω)·q_n − (1+ω)·q_(n−1) + ω²/(1+ω)·q_(n−2)
            let h1 = past[0].0 - past[1].0;
            let w = h / h1;
            for k in 0..m {
                hist[k] = (-(1.0 + w) * past[0].1[k] + w * w / (1.0 + w) * past[1].1[k]) / h;
            }
            (1.0 + 2.0 * w) / ((1.0 + w) * h)
        };
        let mut guess = x;
        run.steps += 1;
        let Some(_) = engine.point(
            tn,
            a0,
            &hist,
            &mut guess,
            &mut j,
            &mut q,
            &mut c,
            POINT_ITERATIONS,
            0.0,
        ) else {
            // A point that does not converge is tried again at a quarter of the step.
            if h * 0.25 < h_min {
                return Err(no_convergence("transient", run.steps, f64::NAN));
            }
            h *= 0.25;
            run.rejected += 1;
            continue;
        };
        // The error estimate, with three points of history (Milne's device).
        let mut grow = 2.0;
        if let (Some(tol), true) = (o.tolerance, filled >= 3) {
            let (t1, t2, t3) = (past[0].0, past[1].0, past[2].0);
            let mut worst: f64 = 0.0;
            for k in 0..m {
                // The quadratic through the three previous points, at tn (Lagrange form).
                let l1 = (tn - t2) * (tn - t3) / ((t1 - t2) * (t1 - t3));
                let l2 = (tn - t1) * (tn - t3) / ((t2 - t1) * (t2 - t3));
                let l3 = (tn - t1) * (tn - t2) / ((t3 - t1) * (t3 - t2));
                let pred = l1 * past[0].1[k] + l2 * past[1].1[k] + l3 * past[2].1[k];
                // formula: LTE ≈ (2/9)/(1 + 2/9)·|q_n − q_pred| = (2/11)·|q_n − q_pred|
                let err = 2.0 / 11.0 * libm::fabs(q[k] - pred) / scale[k];
                worst = worst.max(err / tol);
            }
            if worst > 1.0 {
                run.rejected += 1;
                h *= libm::fmax(0.2, 0.9 * libm::cbrt(1.0 / worst));
                if h < h_min {
                    return Err(no_convergence("transient", run.steps, worst));
                }
                continue;
            }
            grow = libm::fmin(
                2.0,
                libm::fmax(0.2, 0.9 * libm::cbrt(1.0 / libm::fmax(worst, 1e-9))),
            );
        }
        x = guess;
        t = tn;
        past.rotate_right(1);
        past[0].0 = t;
        past[0].1.copy_from_slice(&q);
        filled = (filled + 1).min(3);
        keep(&mut run, t, &x);
        h = match o.tolerance {
            Some(_) => libm::fmin(h * grow, o.step),
            None => o.step,
        };
    }
    Ok(run)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::netlist::GROUND;
    use core::f64::consts::PI;

    /// A sine of 1 V at 1 kHz into 1 kΩ and 0.1 µF (τ = 0.1 ms), from rest.
    fn rc() -> (Netlist, Node) {
        let mut net = Netlist::new();
        let (a, b) = (net.node(), net.node());
        net.add(Element::Sine {
            plus: a,
            minus: GROUND,
            offset: 0.0,
            amplitude: 1.0,
            frequency: 1e3,
        });
        net.resistor(a, b, 1e3);
        net.capacitor(b, GROUND, 0.1e-6);
        (net, b)
    }

    /// RC·v' + v = A·sin(ωt), v(0) = 0: v = A·(sin ωt − ωτ·cos ωt +
    /// ωτ·e^(−t/τ))/(1 + ω²τ²) (the first-order circuit's complete
    /// response, as in every circuits text).
    fn exact(t: f64) -> f64 {
        let (w, tau) = (2.0 * PI * 1e3, 1e-4);
        let wt = w * tau;
        (libm::sin(w * t) - wt * libm::cos(w * t) + wt * libm::exp(-t / tau)) / (1.0 + wt * wt)
    }

    #[test]
    fn fixed_steps_converge_to_the_rc_response_at_second_order() {
        // BDF2 is second order: halving the step quarters the global error
        // (ratio 4 within 15 %, the first backward-Euler step's own error
        // being of the same order over one step). Each error is the largest
        // over 2 ms against the exact response.
        let (net, b) = rc();
        let error = |h: f64| {
            let r = transient(
                &net,
                &TransientOptions {
                    stop: 2e-3,
                    step: h,
                    tolerance: None,
                    record_from: 0.0,
                },
            )
            .expect("runs");
            r.time
                .iter()
                .zip(&r.voltages[b.0])
                .fold(0.0f64, |m, (t, v)| m.max((v - exact(*t)).abs()))
        };
        let (e1, e2) = (error(4e-6), error(2e-6));
        assert!(e1 < 1e-3, "{e1}");
        let ratio = e1 / e2;
        assert!((ratio - 4.0).abs() <= 0.6, "{e1} / {e2} = {ratio}");
    }

    #[test]
    fn the_chosen_step_follows_the_tolerance() {
        // With the step chosen by the truncation error (h ∝ tol^(1/3) for a
        // second-order method), the global error of this contracting
        // circuit is about the per-step error times τ/h, so ∝ tol^(2/3):
        // a tolerance 8 times tighter gives 4 times less error (2.5 to 6
        // allowed: the step also meets its cap and the start) in about
        // twice the steps (1.5 to 2.6); and each run's error stays within
        // twice that sum, 2·tol·τ/h̄ with h̄ the mean step.
        let (net, b) = rc();
        let run = |tol: f64| {
            let r = transient(
                &net,
                &TransientOptions {
                    stop: 2e-3,
                    step: 20e-6,
                    tolerance: Some(tol),
                    record_from: 0.0,
                },
            )
            .expect("runs");
            assert!((r.time.last().expect("points") - 2e-3).abs() < 1e-15);
            let worst = r
                .time
                .iter()
                .zip(&r.voltages[b.0])
                .fold(0.0f64, |m, (t, v)| m.max((v - exact(*t)).abs()));
            (worst, r.steps as f64)
        };
        let (e1, n1) = run(8e-6);
        let (e2, n2) = run(1e-6);
        for (e, tol, n) in [(e1, 8e-6, n1), (e2, 1e-6, n2)] {
            let bound = 2.0 * tol * 1e-4 / (2e-3 / n);
            assert!(e <= bound, "{e} over {n} steps at {tol}: bound {bound}");
        }
        assert!((2.5..=6.0).contains(&(e1 / e2)), "{e1} / {e2}");
        assert!((1.5..=2.6).contains(&(n2 / n1)), "{n2} / {n1} steps");
    }

    #[test]
    fn a_long_transient_settles_onto_the_shooting_steady_state() {
        // Issue 10: the brute-force check of the steady state. The example
        // common-emitter stage with coupling capacitors small enough that
        // 60 periods settle it (the slowest time constant is about 2 ms,
        // so 60 ms leave e^(−30) of the start), driven into clipping:
        // the last period of the transient on the same uniform steps equals
        // the shooting solution to 1e-7 of the output's peak (both are the
        // same BDF2 recursion; what is left is the settling and the
        // Newton tolerances).
        use crate::analysis::analyze;
        use crate::circuit::charges::Charges;
        use crate::circuit::stages::stage_netlist;
        let mut s = crate::stage::Stage::example();
        s.parts.c_in = Some(0.1e-6);
        s.parts.c_out = Some(0.1e-6);
        s.parts.c_emitter = Some(2.2e-6);
        let a = analyze(&s).expect("analyses");
        let ch = Charges::at_bias(&s.transistor, &a.operating_point, &a.small_signal);
        let (net, nodes) = stage_netlist(&s, &a.operating_point.device, ch, 0.4, 1e3);
        let pss = periodic_steady_state(&net, 1e3, 256).expect("steady state");
        let periods = 60;
        let h = 1e-3 / 256.0;
        let run = transient(
            &net,
            &TransientOptions {
                stop: periods as f64 * 1e-3,
                step: h,
                tolerance: None,
                record_from: (periods - 1) as f64 * 1e-3 + 0.5 * h,
            },
        )
        .expect("runs");
        let want = &pss.voltages[nodes.output.0];
        let got = &run.voltages[nodes.output.0];
        assert_eq!(got.len(), want.len());
        let peak = want.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let worst = got
            .iter()
            .zip(want)
            .fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
        assert!(worst <= 1e-7 * peak, "{worst} of {peak}");
        assert!(pss.periods <= 8, "{} shooting periods", pss.periods);
    }
}
