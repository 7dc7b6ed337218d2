//! The stages as netlists: a builder per stage, so that no analysis needs
//! to know which stage it solves.

use super::netlist::{Element, Netlist, Node, GROUND};
use crate::stage::Stage;
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
        net.add(Element::Resistor {
            a: supply,
            b: base,
            ohms: r1,
        });
    }
    if let Some(r2) = stage.parts.r2 {
        net.add(Element::Resistor {
            a: base,
            b: GROUND,
            ohms: r2,
        });
    }
    net.add(Element::Resistor {
        a: base,
        b: base_internal,
        ohms: stage.transistor.rbb,
    });
    let polarity = stage.transistor.polarity;
    let (collector_rail, emitter_rail) = match polarity {
        Polarity::Npn => (supply, GROUND),
        Polarity::Pnp => (GROUND, supply),
    };
    net.add(Element::Resistor {
        a: collector_rail,
        b: collector,
        ohms: stage.parts.rc,
    });
    net.add(Element::Resistor {
        a: emitter,
        b: emitter_rail,
        ohms: stage.re_total(),
    });
    net.add(Element::Bjt {
        c: collector,
        b: base_internal,
        e: emitter,
        device: *device,
        polarity,
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
