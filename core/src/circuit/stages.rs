//! The stages as netlists: a builder per stage, so that no analysis needs
//! to know which stage it solves.

use super::charges::Charges;
use super::netlist::{Element, Netlist, Node, GROUND};
use crate::hybrid_pi::SmallSignal;
use crate::nodal::Band;
use crate::stage::{Stage, StageKind};
use crate::transistor::{Device, Polarity};

/// The nodes of a stage's netlist that the results name.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct StageNodes {
    /// The supply rail.
    pub supply: Node,
    /// The base terminal (the divider's middle).
    pub base: Node,
    /// The internal base, behind rbb'.
    pub base_internal: Node,
    /// The emitter.
    pub emitter: Node,
    /// The collector.
    pub collector: Node,
}

/// The DC netlist of `stage` with the transistor model `device`: the
/// supply, the base divider (`r1` from the supply to the base, `r2` from
/// the base to ground; either may be absent), rbb' from the base terminal
/// to the internal base, the collector resistor and the whole DC emitter
/// resistance (`re` + `re_bypassed`); a 0 Ω part is a short. An NPN
/// stage's collector resistor goes to the supply and its emitter resistor
/// to ground; a PNP stage is the mirror image, with its emitter resistor
/// to the supply and its collector resistor to ground. The source, the
/// load and the coupling and bypass capacitors carry no DC and are left
/// out.
pub fn dc_netlist(stage: &Stage, device: &Device) -> (Netlist, StageNodes) {
    let mut net = Netlist::new();
    let supply = net.node();
    let base = net.node();
    let base_internal = net.node();
    let emitter = net.node();
    let collector = net.node();
    net.add(Element::VoltageSource {
        plus: supply,
        minus: GROUND,
        volts: stage.supply,
    });
    if let Some(r1) = stage.parts.r1 {
        net.resistor(supply, base, r1);
    }
    if let Some(r2) = stage.parts.r2 {
        net.resistor(base, GROUND, r2);
    }
    net.resistor(base, base_internal, stage.transistor.rbb);
    let polarity = stage.transistor.polarity;
    let (collector_rail, emitter_rail) = match polarity {
        Polarity::Npn => (supply, GROUND),
        Polarity::Pnp => (GROUND, supply),
    };
    net.resistor(collector_rail, collector, stage.parts.rc);
    net.resistor(emitter, emitter_rail, stage.re_total());
    net.add(Element::Bjt {
        c: collector,
        b: base_internal,
        e: emitter,
        device: *device,
        polarity,
        charges: Charges::NONE,
    });
    (
        net,
        StageNodes {
            supply,
            base,
            base_internal,
            emitter,
            collector,
        },
    )
}

/// The nodes of a stage's small-signal netlist that its figures read.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct AcNodes {
    /// The source EMF's node (held at 1 V by the netlist's one source).
    pub emf: Node,
    /// The input terminal, after the source resistance.
    pub input: Node,
    /// The load.
    pub output: Node,
}

/// The small-signal netlist of `stage` with the hybrid-π parameters `ss`:
/// a 1 V EMF behind `rs`, the bias resistors (both rails are AC ground;
/// one conductance g1 + g2, as [`crate::AcNetwork`] takes them), rbb', the
/// hybrid-π core (gπ and go as resistors, gm and the reverse term gr as
/// transconductances, Cπ and Cμ), the collector and emitter parts, the
/// coupling and bypass capacitors (shorts when ideal or at midband, where
/// Cπ and Cμ are left out) and the load.
pub fn ac_netlist(stage: &Stage, ss: &SmallSignal, band: Band) -> (Netlist, AcNodes) {
    let p = &stage.parts;
    let mut net = Netlist::new();
    let emf = net.node();
    let input = net.node();
    let base = net.node();
    let bi = net.node();
    let e = net.node();
    let x = net.node();
    let c = net.node();
    let output = net.node();
    // A coupling or bypass capacitor: a short when ideal or at midband.
    let coupling = |net: &mut Netlist, a: Node, b: Node, cap: Option<f64>| match (cap, band) {
        (Some(farads), Band::Full) => net.capacitor(a, b, farads),
        _ => net.resistor(a, b, 0.0),
    };
    net.add(Element::VoltageSource {
        plus: emf,
        minus: GROUND,
        volts: 1.0,
    });
    net.resistor(emf, input, p.rs);
    let g_bias = p.r1.map_or(0.0, |r| 1.0 / r) + p.r2.map_or(0.0, |r| 1.0 / r);
    if g_bias > 0.0 {
        net.resistor(base, GROUND, 1.0 / g_bias);
    }
    net.resistor(base, bi, ss.rbb);
    net.resistor(output, GROUND, p.rl);
    if band == Band::Full {
        net.capacitor(bi, e, ss.c_pi);
        net.capacitor(bi, c, ss.c_mu);
    }
    match stage.kind {
        StageKind::CommonEmitter => {
            coupling(&mut net, input, base, p.c_in);
            net.resistor(c, GROUND, p.rc);
            net.resistor(e, x, p.re);
            if p.re_bypassed > 0.0 {
                net.resistor(x, GROUND, p.re_bypassed);
                coupling(&mut net, x, GROUND, p.c_emitter);
            } else {
                net.resistor(x, GROUND, 0.0);
            }
            coupling(&mut net, c, output, p.c_out);
        }
        StageKind::CommonCollector => {
            coupling(&mut net, input, base, p.c_in);
            net.resistor(c, GROUND, p.rc);
            net.resistor(e, GROUND, p.re);
            coupling(&mut net, e, output, p.c_out);
        }
        StageKind::CommonBase => {
            coupling(&mut net, input, e, p.c_in);
            net.resistor(e, GROUND, p.re);
            coupling(&mut net, base, GROUND, p.c_base);
            net.resistor(c, GROUND, p.rc);
            coupling(&mut net, c, output, p.c_out);
        }
    }
    // The hybrid-π core: iB = gπ·vB'E + gr·vCE, iC = gm·vB'E + go·vCE.
    let (gpi, go) = (ss.g_pi(), ss.g_o());
    if gpi > 0.0 {
        net.resistor(bi, e, 1.0 / gpi);
    }
    if go > 0.0 {
        net.resistor(c, e, 1.0 / go);
    }
    net.add(Element::Vccs {
        from: c,
        to: e,
        plus: bi,
        minus: e,
        siemens: ss.gm,
    });
    net.add(Element::Vccs {
        from: bi,
        to: e,
        plus: c,
        minus: e,
        siemens: ss.g_r,
    });
    (net, AcNodes { emf, input, output })
}

/// The nodes of a stage's whole netlist ([`stage_netlist`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SignalNodes {
    /// The supply rail.
    pub supply: Node,
    /// The source EMF.
    pub emf: Node,
    /// The input terminal, after the source resistance.
    pub input: Node,
    /// The base terminal.
    pub base: Node,
    /// The internal base, behind rbb'.
    pub base_internal: Node,
    /// The emitter.
    pub emitter: Node,
    /// The collector.
    pub collector: Node,
    /// The load.
    pub output: Node,
    /// The transistor's own output terminal: the collector, or the
    /// emitter of a follower.
    pub terminal: Node,
}

/// The whole netlist of `stage`, for the transient: the supply, a sine
/// EMF of `amplitude` volts peak at `frequency` hertz behind `rs`, the
/// coupling and bypass capacitors (an absent one is ideal: an infinite
/// capacitor, which holds its DC voltage), the load, the bias network of
/// [`dc_netlist`] and the transistor `device` with its `charges`. The
/// emitter resistance is `re` in series with `re_bypassed`, the bypass
/// capacitor across the latter; a common-base stage's base capacitor goes
/// from the base to ground. Its DC solution is [`dc_netlist`]'s.
pub fn stage_netlist(
    stage: &Stage,
    device: &Device,
    charges: Charges,
    amplitude: f64,
    frequency: f64,
) -> (Netlist, SignalNodes) {
    let p = &stage.parts;
    let mut net = Netlist::new();
    let supply = net.node();
    let emf = net.node();
    let input = net.node();
    let base = net.node();
    let base_internal = net.node();
    let emitter = net.node();
    let x = net.node();
    let collector = net.node();
    let output = net.node();
    let cap = |c: Option<f64>| c.unwrap_or(f64::INFINITY);
    net.add(Element::VoltageSource {
        plus: supply,
        minus: GROUND,
        volts: stage.supply,
    });
    net.add(Element::Sine {
        plus: emf,
        minus: GROUND,
        offset: 0.0,
        amplitude,
        frequency,
    });
    net.resistor(emf, input, p.rs);
    if let Some(r1) = p.r1 {
        net.resistor(supply, base, r1);
    }
    if let Some(r2) = p.r2 {
        net.resistor(base, GROUND, r2);
    }
    net.resistor(base, base_internal, stage.transistor.rbb);
    let polarity = stage.transistor.polarity;
    let (collector_rail, emitter_rail) = match polarity {
        Polarity::Npn => (supply, GROUND),
        Polarity::Pnp => (GROUND, supply),
    };
    net.resistor(collector_rail, collector, p.rc);
    net.resistor(emitter, x, p.re);
    net.resistor(x, emitter_rail, p.re_bypassed);
    if stage.kind == StageKind::CommonEmitter && p.re_bypassed > 0.0 {
        net.capacitor(x, emitter_rail, cap(p.c_emitter));
    }
    net.resistor(output, GROUND, p.rl);
    let terminal = match stage.kind {
        StageKind::CommonEmitter => {
            net.capacitor(input, base, cap(p.c_in));
            collector
        }
        StageKind::CommonCollector => {
            net.capacitor(input, base, cap(p.c_in));
            emitter
        }
        StageKind::CommonBase => {
            net.capacitor(input, emitter, cap(p.c_in));
            net.capacitor(base, GROUND, cap(p.c_base));
            collector
        }
    };
    net.capacitor(terminal, output, cap(p.c_out));
    net.add(Element::Bjt {
        c: collector,
        b: base_internal,
        e: emitter,
        device: *device,
        polarity,
        charges,
    });
    (
        net,
        SignalNodes {
            supply,
            emf,
            input,
            base,
            base_internal,
            emitter,
            collector,
            output,
            terminal,
        },
    )
}

/// The example stage in each configuration and polarity (the follower and
/// the common base with the whole emitter resistance unbypassed, the common
/// base with its base decoupled by 10 µF), for the engine's tests.
#[cfg(test)]
pub(crate) fn example_stages() -> alloc::vec::Vec<Stage> {
    let mut out = alloc::vec::Vec::new();
    for kind in [
        StageKind::CommonEmitter,
        StageKind::CommonCollector,
        StageKind::CommonBase,
    ] {
        for polarity in [Polarity::Npn, Polarity::Pnp] {
            let mut s = Stage::example();
            s.kind = kind;
            if kind != StageKind::CommonEmitter {
                s.parts.re += s.parts.re_bypassed;
                s.parts.re_bypassed = 0.0;
                s.parts.c_emitter = None;
            }
            if kind == StageKind::CommonBase {
                s.parts.c_base = Some(10e-6);
            }
            s.transistor.polarity = polarity;
            out.push(s);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::analyze;
    use crate::circuit::ac::solve_ac;
    use crate::nodal::AcNetwork;

    #[test]
    fn the_example_stages_small_signal_netlists_give_the_stage_network() {
        // The example stage in each configuration and polarity, with every
        // capacitor and at midband, from 1 Hz to 100 MHz: the engine's
        // gain from the EMF and terminal gain equal the stage-specific
        // nodal network's to 1e-9 (issue 10's invariant; these networks
        // are well conditioned, so both solves keep nearly every digit).
        for s in example_stages() {
            let (kind, pnp) = (s.kind, s.transistor.polarity == Polarity::Pnp);
            let a = analyze(&s).expect("the example analyses");
            for band in [Band::Full, Band::Midband] {
                let reference = AcNetwork::new(&s, &a.small_signal, band).expect("a network");
                let (net, nodes) = ac_netlist(&s, &a.small_signal, band);
                for k in 0..=8 {
                    let f = libm::pow(10.0, k as f64);
                    let want = reference.solve(f).expect("solves");
                    let got = solve_ac(&net, f).expect("solves");
                    let v_out = got.voltages[nodes.output.0];
                    let av = v_out / got.voltages[nodes.input.0];
                    let rel = |x: num_complex::Complex64, y: num_complex::Complex64| {
                        (x - y).norm() / x.norm().max(y.norm())
                    };
                    assert!(
                        rel(v_out, want.voltage_gain_from_source) <= 1e-9,
                        "{kind:?} pnp {pnp} {band:?} {f} Hz: {v_out} vs {}",
                        want.voltage_gain_from_source
                    );
                    assert!(
                        rel(av, want.voltage_gain) <= 1e-9,
                        "{kind:?} pnp {pnp} {band:?} {f} Hz: {av} vs {}",
                        want.voltage_gain
                    );
                }
            }
        }
    }

    #[test]
    fn an_rc_low_pass_is_one_over_one_plus_j_omega_rc() {
        // 1 kΩ and 1 µF: H(f) = 1/(1 + j·2πf·RC), the first-order low-pass
        // of every circuits text; at the corner 1/(2πRC) its magnitude is
        // 1/√2. Bound 1e-15: a two-node solve and the formula round a few ε
        // of a value of at most 1.
        let mut net = Netlist::new();
        let (a, b) = (net.node(), net.node());
        net.add(Element::VoltageSource {
            plus: a,
            minus: GROUND,
            volts: 1.0,
        });
        net.resistor(a, b, 1e3);
        net.capacitor(b, GROUND, 1e-6);
        for f in [1.0, 159.15494309189535, 1e4] {
            let h = solve_ac(&net, f).expect("solves").voltages[b.0];
            let want = num_complex::Complex64::new(1.0, 0.0)
                / num_complex::Complex64::new(1.0, 2.0 * core::f64::consts::PI * f * 1e-3);
            assert!((h - want).norm() <= 1e-15, "{f} Hz: {h} vs {want}");
        }
        let corner = solve_ac(&net, 1.0 / (2.0 * core::f64::consts::PI * 1e-3))
            .expect("solves")
            .voltages[b.0];
        assert!((corner.norm() - core::f64::consts::FRAC_1_SQRT_2).abs() < 1e-15);
    }
}
