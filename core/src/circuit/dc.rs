//! The DC solve of a netlist: Newton–Raphson on the MNA residual, with the
//! junction limiter, gmin stepping and source stepping.

use alloc::string::String;
use alloc::vec;
use alloc::vec::Vec;

use super::dense::{Dense, MAX_UNKNOWNS};
use super::netlist::{Element, Netlist, Node};
use crate::error::{Error, ErrorKind, Result};
use crate::transistor::{Device, Polarity};
// The classic junction voltage limiter (Nagel 1975), shared with the
// stage-specific solve.
use crate::operating_point::limit_junction;

/// Largest number of Newton iterations per attempt.
const MAX_ITERATIONS: u32 = 200;
/// Converged when no node moves by more than this, V, plus the relative
/// part below (both far below any meaningful bias change).
const STEP_ABS: f64 = 1e-12;
/// The relative part of the step test.
const STEP_REL: f64 = 1e-11;
/// And when Kirchhoff's current law holds at every node to this, A, plus
/// the relative part below.
const KCL_ABS: f64 = 1e-15;
/// Newton steps (V) below which the linear solves are refined.
const REFINE_BELOW: f64 = 1e-6;
/// The relative part of the KCL test: of the largest current at the node.
const KCL_REL: f64 = 1e-9;

/// A solved DC state.
#[derive(Debug, Clone, PartialEq)]
pub struct DcSolution {
    /// The voltage of every node of the netlist (ground included, 0 V), V.
    pub voltages: Vec<f64>,
    /// The current of every voltage source, in the order of the netlist,
    /// flowing into its plus terminal from the circuit, A.
    pub source_currents: Vec<f64>,
    /// Newton iterations spent, all attempts together.
    pub iterations: u32,
}

/// The netlist numbered for the solve: shorts merged, an unknown per node
/// class but ground's and per voltage source.
pub(super) struct Numbered<'a> {
    pub(super) net: &'a Netlist,
    /// The unknown of each node's class (`None` for ground).
    pub(super) index: Vec<Option<usize>>,
    /// The first voltage-source unknown.
    pub(super) first_source: usize,
    /// The first unknown of an ideal capacitor's holding source (after
    /// every voltage source; as many as there are infinite capacitors when
    /// they are held, else `n`).
    pub(super) first_ideal: usize,
    /// The number of unknowns.
    pub(super) n: usize,
}

fn find(parent: &mut [usize], mut i: usize) -> usize {
    while parent[i] != i {
        parent[i] = parent[parent[i]];
        i = parent[i];
    }
    i
}

/// Whether a capacitor is ideal (infinite).
pub(super) fn is_ideal(farads: f64) -> bool {
    farads == f64::INFINITY
}

impl<'a> Numbered<'a> {
    /// Numbers `net`'s unknowns; with `hold_ideal`, each infinite
    /// capacitor gets a voltage-source unknown of its own (the transient
    /// holds it at its DC voltage, the small-signal solve at 0).
    pub(super) fn new(net: &'a Netlist, hold_ideal: bool) -> Result<Numbered<'a>> {
        let nodes = net.nodes();
        let mut parent: Vec<usize> = (0..nodes).collect();
        for e in net.elements() {
            if let Element::Resistor { a, b, ohms } = *e {
                if ohms == 0.0 {
                    let (ra, rb) = (find(&mut parent, a.0), find(&mut parent, b.0));
                    // Ground stays the root of its class.
                    let (keep, drop) = if rb == 0 { (rb, ra) } else { (ra, rb) };
                    parent[drop] = keep;
                }
            }
        }
        let ground = find(&mut parent, 0);
        // A node no element touches has no unknown (it would make the
        // matrix singular); it reads as 0 V.
        let mut touched = vec![false; nodes];
        for e in net.elements() {
            let ends: [usize; 4] = match *e {
                Element::Resistor { a, b, .. } | Element::Capacitor { a, b, .. } => {
                    [a.0, b.0, 0, 0]
                }
                Element::VoltageSource { plus, minus, .. } | Element::Sine { plus, minus, .. } => {
                    [plus.0, minus.0, 0, 0]
                }
                Element::CurrentSource { from, to, .. } => [from.0, to.0, 0, 0],
                Element::Vccs {
                    from,
                    to,
                    plus,
                    minus,
                    ..
                } => [from.0, to.0, plus.0, minus.0],
                Element::Bjt { c, b, e, .. } => [c.0, b.0, e.0, 0],
            };
            for n in ends {
                touched[n] = true;
            }
        }
        let mut class_index: Vec<Option<usize>> = vec![None; nodes];
        let mut index = vec![None; nodes];
        let mut next = 0;
        for (i, slot) in index.iter_mut().enumerate() {
            let r = find(&mut parent, i);
            if r == ground || !touched[i] {
                continue;
            }
            if class_index[r].is_none() {
                class_index[r] = Some(next);
                next += 1;
            }
            *slot = class_index[r];
        }
        let sources = net
            .elements()
            .iter()
            .filter(|e| matches!(e, Element::VoltageSource { .. } | Element::Sine { .. }))
            .count();
        let ideal = if hold_ideal {
            net.elements()
                .iter()
                .filter(|e| matches!(e, Element::Capacitor { farads, .. } if is_ideal(*farads)))
                .count()
        } else {
            0
        };
        let n = next + sources + ideal;
        if n > MAX_UNKNOWNS {
            return Err(Error::new(
                "netlist",
                ErrorKind::OutOfRange {
                    value: n as f64,
                    unit: "",
                    allowed: String::from(
                        "at most 16 unknowns (node voltages and voltage-source currents)",
                    ),
                },
            ));
        }
        Ok(Numbered {
            net,
            index,
            first_source: next,
            first_ideal: next + sources,
            n,
        })
    }

    /// Stamps a transconductance `g`·(V(plus) − V(minus)) leaving `from`
    /// and entering `to` into the matrix `a` (of any scalar).
    pub(super) fn stamp_vccs<T>(
        &self,
        a: &mut [[T; MAX_UNKNOWNS]; MAX_UNKNOWNS],
        from: Node,
        to: Node,
        plus: Node,
        minus: Node,
        g: f64,
    ) where
        T: core::ops::AddAssign<f64> + core::ops::SubAssign<f64>,
    {
        for (row, sign) in [(self.index[from.0], 1.0), (self.index[to.0], -1.0)] {
            let Some(r) = row else { continue };
            if let Some(c) = self.index[plus.0] {
                a[r][c] += sign * g;
            }
            if let Some(c) = self.index[minus.0] {
                a[r][c] -= sign * g;
            }
        }
    }

    /// Stamps an admittance `y` between nodes `p` and `q` into `a`.
    pub(super) fn stamp_admittance<T>(
        &self,
        a: &mut [[T; MAX_UNKNOWNS]; MAX_UNKNOWNS],
        p: Node,
        q: Node,
        y: T,
    ) where
        T: Copy + core::ops::AddAssign + core::ops::SubAssign,
    {
        let (ip, iq) = (self.index[p.0], self.index[q.0]);
        if let Some(i) = ip {
            a[i][i] += y;
        }
        if let Some(j) = iq {
            a[j][j] += y;
        }
        if let (Some(i), Some(j)) = (ip, iq) {
            a[i][j] -= y;
            a[j][i] -= y;
        }
    }

    /// Stamps the incidence of a voltage source whose current is unknown
    /// `row`, V(plus) − V(minus) its value, into `a` (`one` is 1 in the
    /// matrix's scalar).
    pub(super) fn stamp_source<T>(
        &self,
        a: &mut [[T; MAX_UNKNOWNS]; MAX_UNKNOWNS],
        row: usize,
        plus: Node,
        minus: Node,
        one: T,
    ) where
        T: Copy + core::ops::AddAssign + core::ops::SubAssign,
    {
        if let Some(i) = self.index[plus.0] {
            a[i][row] += one;
            a[row][i] += one;
        }
        if let Some(i) = self.index[minus.0] {
            a[i][row] -= one;
            a[row][i] -= one;
        }
    }

    pub(super) fn v(&self, x: &[f64; MAX_UNKNOWNS], node: usize) -> f64 {
        self.index[node].map_or(0.0, |i| x[i])
    }
}

/// The transistors of `net`, in order: collector, internal base, emitter,
/// model, polarity.
pub(super) fn transistors(
    net: &Netlist,
) -> impl Iterator<Item = (Node, Node, Node, Device, Polarity)> + '_ {
    net.elements().iter().filter_map(|e| match *e {
        Element::Bjt {
            c,
            b,
            e,
            device,
            polarity,
            ..
        } => Some((c, b, e, device, polarity)),
        _ => None,
    })
}

/// The state of each transistor's two junctions between iterations (in
/// its NPN frame).
#[derive(Debug, Clone, Copy)]
pub(super) struct Junctions {
    pub(super) vbe: f64,
    pub(super) vbc: f64,
}

/// Stamps the Norton companion of a transistor at the junction voltages
/// `jn` (its NPN frame) into `sys`.
pub(super) fn stamp_transistor(
    num: &Numbered<'_>,
    sys: &mut Dense,
    (c, b, em): (Node, Node, Node),
    device: &Device,
    polarity: Polarity,
    jn: Junctions,
) {
    let s = polarity.sign();
    let cur = device.currents(jn.vbe, jn.vbc);
    // Norton companion in the real frame: the current into each
    // terminal is s·(I0 + g·(v − v0)) with v = s·(node differences),
    // so the conductances are the NPN frame's and the equivalent
    // currents change sign with the polarity.
    let ic_eq = s * (cur.ic - cur.dic_dvbe * jn.vbe - cur.dic_dvbc * jn.vbc);
    let ib_eq = s * (cur.ib - cur.dib_dvbe * jn.vbe - cur.dib_dvbc * jn.vbc);
    let rows = [
        (num.index[c.0], cur.dic_dvbe, cur.dic_dvbc, ic_eq),
        (num.index[b.0], cur.dib_dvbe, cur.dib_dvbc, ib_eq),
        (
            num.index[em.0],
            -(cur.dic_dvbe + cur.dib_dvbe),
            -(cur.dic_dvbc + cur.dib_dvbc),
            -(ic_eq + ib_eq),
        ),
    ];
    let (nb, ne, nc) = (num.index[b.0], num.index[em.0], num.index[c.0]);
    for (row, g_be, g_bc, i_eq) in rows {
        let Some(r) = row else { continue };
        // i = g_be·(Vb − Ve) + g_bc·(Vb − Vc) + i_eq leaves the node.
        if let Some(col) = nb {
            sys.a[r][col] += g_be + g_bc;
        }
        if let Some(col) = ne {
            sys.a[r][col] -= g_be;
        }
        if let Some(col) = nc {
            sys.a[r][col] -= g_bc;
        }
        sys.b[r] -= i_eq;
    }
}

/// The junction voltages of every transistor at `x`, each limited against
/// its previous value in `j` (which it replaces); true when any was limited.
pub(super) fn limit_transistors(
    num: &Numbered<'_>,
    x: &[f64; MAX_UNKNOWNS],
    j: &mut [Junctions],
) -> bool {
    let mut limited = false;
    for (t, (c, b, em, device, polarity)) in transistors(num.net).enumerate() {
        let s = polarity.sign();
        let vb = num.v(x, b.0);
        let vbe = s * (vb - num.v(x, em.0));
        let vbc = s * (vb - num.v(x, c.0));
        let vcrit = device.v_critical();
        let (vbe, l1) = limit_junction(vbe, j[t].vbe, device.vt, vcrit);
        let (vbc, l2) = limit_junction(vbc, j[t].vbc, device.vt, vcrit);
        limited |= l1 || l2;
        j[t] = Junctions { vbe, vbc };
    }
    limited
}

/// Stamps the linear part of the netlist into `lin`: resistors,
/// transconductances, voltage sources (their incidence, and the value at
/// source scale `scale` and time `t`: a sine's offset plus its value at
/// `t` when `sine` is on) and current sources (scaled). Ideal capacitors'
/// holding sources are left to the caller.
pub(super) fn stamp_linear(num: &Numbered<'_>, lin: &mut Dense, scale: f64, t: Option<f64>) {
    let mut k = num.first_source;
    for e in num.net.elements() {
        match *e {
            Element::Resistor { a, b, ohms } if ohms > 0.0 => {
                num.stamp_admittance(&mut lin.a, a, b, 1.0 / ohms);
            }
            Element::VoltageSource { plus, minus, .. } | Element::Sine { plus, minus, .. } => {
                num.stamp_source(&mut lin.a, k, plus, minus, 1.0);
                lin.b[k] = source_value(e, t) * scale;
                k += 1;
            }
            Element::CurrentSource { from, to, amps } => {
                if let Some(i) = num.index[from.0] {
                    lin.b[i] -= amps * scale;
                }
                if let Some(i) = num.index[to.0] {
                    lin.b[i] += amps * scale;
                }
            }
            Element::Vccs {
                from,
                to,
                plus,
                minus,
                siemens,
            } => num.stamp_vccs(&mut lin.a, from, to, plus, minus, siemens),
            _ => {}
        }
    }
}

/// A voltage source's value: its DC value, or at time `t` (`None`: DC).
pub(super) fn source_value(e: &Element, t: Option<f64>) -> f64 {
    match *e {
        Element::VoltageSource { volts, .. } => volts,
        Element::Sine {
            offset,
            amplitude,
            frequency,
            ..
        } => match t {
            None => offset,
            // formula: v(t) = offset + A·sin(2π·f·t)
            Some(t) => offset + amplitude * libm::sin(2.0 * core::f64::consts::PI * frequency * t),
        },
        _ => 0.0,
    }
}

/// One Newton attempt at source scale `scale` and node-to-ground
/// conductance `gmin`, from `x` and the junction states `j`; returns the
/// solution and its iterations, or `None`.
fn newton(
    num: &Numbered<'_>,
    x: &mut [f64; MAX_UNKNOWNS],
    j: &mut [Junctions],
    scale: f64,
    gmin: f64,
) -> Option<u32> {
    let n = num.n;
    // The linear part, stamped once per attempt.
    let mut lin = Dense::new(n);
    stamp_linear(num, &mut lin, scale, None);
    for i in 0..num.first_source {
        lin.a[i][i] += gmin;
    }
    let mut last_step = f64::INFINITY;
    for it in 1..=MAX_ITERATIONS {
        let mut sys = lin;
        for (t, (c, b, em, device, polarity)) in transistors(num.net).enumerate() {
            stamp_transistor(num, &mut sys, (c, b, em), &device, polarity, j[t]);
        }
        // Far from the answer a plain LU step does (Newton corrects it
        // anyway); near it, the refined one, whose digits the convergence
        // test below asks for.
        let refine = last_step < REFINE_BELOW;
        let new = sys.solve_refined(if refine { 2 } else { 0 })?;
        // The new junction voltages, limited.
        let limited = limit_transistors(num, &new, j);
        let mut step: f64 = 0.0;
        let mut size: f64 = 0.0;
        for i in 0..n {
            step = step.max(libm::fabs(new[i] - x[i]));
            size = size.max(libm::fabs(new[i]));
        }
        *x = new;
        last_step = step;
        if refine
            && !limited
            && step <= STEP_ABS + STEP_REL * size
            && kcl_holds(num, x, scale, gmin)
        {
            return Some(it);
        }
    }
    None
}

/// Whether Kirchhoff's current law holds at every node at `x`, with the
/// devices' currents evaluated at the node voltages themselves: the sum at
/// each node within [`KCL_ABS`] plus [`KCL_REL`] of the largest current
/// there, plus what the rounding of the node voltages alone makes of each
/// current (8 ε of the voltages, through each element's conductance: a
/// 1 Ω resistor at 25 V carries 6e-15 A of rounding, more than a cut-off
/// transistor's whole current).
fn kcl_holds(num: &Numbered<'_>, x: &[f64; MAX_UNKNOWNS], scale: f64, gmin: f64) -> bool {
    let m = num.first_source;
    let mut sum = [0.0; MAX_UNKNOWNS];
    let mut big = [0.0f64; MAX_UNKNOWNS];
    let mut round = [0.0f64; MAX_UNKNOWNS];
    let mut add = |node: usize, i: f64, rounding: f64| {
        if let Some(r) = num.index[node] {
            sum[r] += i;
            big[r] = big[r].max(libm::fabs(i));
            round[r] += rounding;
        }
    };
    let eps = 8.0 * f64::EPSILON;
    let mut k = num.first_source;
    for e in num.net.elements() {
        match *e {
            Element::Resistor { a, b, ohms } if ohms > 0.0 => {
                let (va, vb) = (num.v(x, a.0), num.v(x, b.0));
                let i = (va - vb) / ohms;
                let rounding = eps * libm::fmax(libm::fabs(va), libm::fabs(vb)) / ohms;
                add(a.0, i, rounding);
                add(b.0, -i, rounding);
            }
            Element::VoltageSource { plus, minus, .. } | Element::Sine { plus, minus, .. } => {
                let i = x[k];
                add(plus.0, i, 0.0);
                add(minus.0, -i, 0.0);
                k += 1;
            }
            Element::CurrentSource { from, to, amps } => {
                add(from.0, amps * scale, 0.0);
                add(to.0, -amps * scale, 0.0);
            }
            Element::Vccs {
                from,
                to,
                plus,
                minus,
                siemens,
            } => {
                let (vp, vm) = (num.v(x, plus.0), num.v(x, minus.0));
                let i = siemens * (vp - vm);
                let rounding =
                    eps * libm::fabs(siemens) * libm::fmax(libm::fabs(vp), libm::fabs(vm));
                add(from.0, i, rounding);
                add(to.0, -i, rounding);
            }
            Element::Bjt {
                c,
                b,
                e: em,
                device,
                polarity,
                ..
            } => {
                let s = polarity.sign();
                let (vb, ve, vc) = (num.v(x, b.0), num.v(x, em.0), num.v(x, c.0));
                let cur = device.currents(s * (vb - ve), s * (vb - vc));
                let v =
                    eps * libm::fmax(libm::fabs(vb), libm::fmax(libm::fabs(ve), libm::fabs(vc)));
                let gc = libm::fabs(cur.dic_dvbe) + libm::fabs(cur.dic_dvbc);
                let gb = libm::fabs(cur.dib_dvbe) + libm::fabs(cur.dib_dvbc);
                add(c.0, s * cur.ic, gc * v);
                add(b.0, s * cur.ib, gb * v);
                add(em.0, -s * (cur.ic + cur.ib), (gc + gb) * v);
            }
            _ => {}
        }
    }
    (0..m).all(|r| libm::fabs(sum[r] + gmin * x[r]) <= KCL_ABS + KCL_REL * big[r] + round[r])
}

/// Solves the DC state of `net`: plain Newton first, then gmin stepping,
/// then source stepping.
///
/// # Errors
/// [`ErrorKind::OutOfRange`] naming `netlist` when it has more than
/// [`MAX_UNKNOWNS`] unknowns; [`ErrorKind::NoConvergence`] naming
/// `operating point` when no method converges.
pub fn solve_dc(net: &Netlist) -> Result<DcSolution> {
    solve_with(
        net,
        &[Method::Newton, Method::GminStepping, Method::SourceStepping],
    )
}

/// The ways to a DC solution, tried in the order given.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Method {
    /// Plain Newton from the starting junction voltages.
    Newton,
    /// A conductance from every node to ground, stepped down to zero.
    GminStepping,
    /// Every source ramped up from zero.
    SourceStepping,
}

/// [`solve_dc`] with the given methods, in order, until one converges.
pub(crate) fn solve_with(net: &Netlist, methods: &[Method]) -> Result<DcSolution> {
    let num = Numbered::new(net, false)?;
    let transistors: Vec<_> = net
        .elements()
        .iter()
        .filter_map(|e| match *e {
            Element::Bjt { device, .. } => Some(device),
            _ => None,
        })
        .collect();
    let supply = net
        .elements()
        .iter()
        .filter_map(|e| match *e {
            Element::VoltageSource { volts, .. } => Some(libm::fabs(volts)),
            Element::Sine { offset, .. } => Some(libm::fabs(offset)),
            _ => None,
        })
        .fold(0.0, f64::max);
    // Each junction starts just on: the base–emitter at 0.6 V (or its
    // critical voltage, if lower), the base–collector reverse biased by
    // half the largest supply.
    let start: Vec<Junctions> = transistors
        .iter()
        .map(|d| {
            let vbe = libm::fmin(d.v_critical(), 0.6);
            Junctions {
                vbe,
                vbc: vbe - 0.5 * supply,
            }
        })
        .collect();
    let mut x = [0.0; MAX_UNKNOWNS];
    let mut j = start.clone();
    let mut total = 0;
    // A continuation: Newton at each (source scale, gmin) in turn, each
    // solution seeding the next; true when every step converged.
    let mut ramp = |x: &mut [f64; MAX_UNKNOWNS],
                    j: &mut [Junctions],
                    steps: &mut dyn Iterator<Item = (f64, f64)>| {
        for (scale, gmin) in steps {
            match newton(&num, x, j, scale, gmin) {
                Some(it) => total += it,
                None => return false,
            }
        }
        true
    };
    let mut solved = None;
    for method in methods {
        x = [0.0; MAX_UNKNOWNS];
        let ok = match method {
            Method::Newton => {
                j.clone_from(&start);
                ramp(&mut x, &mut j, &mut core::iter::once((1.0, 0.0)))
            }
            // From 10 mS down by decades, then without.
            Method::GminStepping => {
                j.clone_from(&start);
                let mut steps = (0..=11).map(|k| {
                    (
                        1.0,
                        if k == 11 {
                            0.0
                        } else {
                            libm::pow(10.0, -2.0 - k as f64)
                        },
                    )
                });
                ramp(&mut x, &mut j, &mut steps)
            }
            // From nothing to the full sources in 20 steps.
            Method::SourceStepping => {
                for jn in j.iter_mut() {
                    *jn = Junctions { vbe: 0.0, vbc: 0.0 };
                }
                let mut steps = (1..=20).map(|k| (k as f64 / 20.0, 0.0));
                ramp(&mut x, &mut j, &mut steps)
            }
        };
        if ok {
            solved = Some(());
            break;
        }
    }
    if solved.is_none() {
        return Err(Error::new(
            "operating point",
            ErrorKind::NoConvergence {
                iterations: total,
                residual: f64::NAN,
            },
        ));
    }
    let voltages = (0..net.nodes()).map(|i| num.v(&x, i)).collect();
    let source_currents = x[num.first_source..num.n].to_vec();
    Ok(DcSolution {
        voltages,
        source_currents,
        iterations: total,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::netlist::{Netlist, GROUND};

    #[test]
    fn each_continuation_reaches_the_same_operating_point() {
        // gmin stepping and source stepping alone (the fallbacks when plain
        // Newton fails) end where plain Newton does, for the example stage
        // in each configuration and polarity: to 1e-9 of the supply (both
        // stop at steps of 1e-11 of the unknowns).
        use crate::circuit::stages::{dc_netlist, example_stages};
        for s in example_stages() {
            let (kind, pnp) = (s.kind, s.transistor.polarity == Polarity::Pnp);
            let d = s.transistor.device(s.ambient, s.transistor.hfe, 0.0);
            let (net, _) = dc_netlist(&s, &d);
            let plain = solve_with(&net, &[Method::Newton]).expect("plain Newton");
            for m in [Method::GminStepping, Method::SourceStepping] {
                let other = solve_with(&net, &[m]).unwrap_or_else(|e| panic!("{m:?}: {e}"));
                for (a, b) in plain.voltages.iter().zip(&other.voltages) {
                    assert!(
                        (a - b).abs() <= 1e-9 * s.supply,
                        "{kind:?} pnp {pnp} {m:?}: {a} vs {b}"
                    );
                }
                assert!(
                    other.iterations > plain.iterations,
                    "{m:?} takes more steps"
                );
            }
        }
    }

    #[test]
    fn a_divider_and_a_short_solve_by_ohms_law() {
        // 12 V across 10 kΩ + 20 kΩ, and a 0 Ω link to a third node: 8 V at
        // the middle (Ohm's law), 0.4 mA drawn from the source.
        let mut net = Netlist::new();
        let (top, mid, link) = (net.node(), net.node(), net.node());
        net.add(Element::VoltageSource {
            plus: top,
            minus: GROUND,
            volts: 12.0,
        });
        net.resistor(top, mid, 10e3);
        net.resistor(mid, GROUND, 20e3);
        net.resistor(mid, link, 0.0);
        net.capacitor(link, GROUND, 1e-6);
        let s = solve_dc(&net).expect("linear");
        assert!((s.voltages[mid.0] - 8.0).abs() < 1e-12);
        assert!((s.voltages[link.0] - 8.0).abs() < 1e-12, "the short");
        // Into the plus terminal from the circuit: −0.4 mA (the source drives).
        assert!((s.source_currents[0] + 0.4e-3).abs() < 1e-15);
        // A current source of 1 mA into 1 kΩ: 1 V.
        let mut net = Netlist::new();
        let a = net.node();
        net.add(Element::CurrentSource {
            from: GROUND,
            to: a,
            amps: 1e-3,
        });
        net.resistor(a, GROUND, 1e3);
        assert!((solve_dc(&net).expect("linear").voltages[a.0] - 1.0).abs() < 1e-12);
    }
}
