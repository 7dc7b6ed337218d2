//! The netlist: nodes and the elements between them.

use alloc::vec::Vec;

use super::charges::Charges;
use crate::transistor::{Device, Polarity};

/// A node of the netlist; [`GROUND`] is node 0.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Node(pub usize);

/// The reference node, 0 V.
pub const GROUND: Node = Node(0);

/// One element of the netlist.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Element {
    /// A resistor between two nodes, Ω (0 Ω is a short: its nodes are
    /// merged).
    Resistor {
        /// One end.
        a: Node,
        /// The other end.
        b: Node,
        /// Resistance, Ω (≥ 0).
        ohms: f64,
    },
    /// A capacitor between two nodes, F: open at DC. An infinite one is
    /// an ideal coupling or bypass capacitor: in the transient it holds the
    /// voltage the DC solve left across it.
    Capacitor {
        /// One end.
        a: Node,
        /// The other end.
        b: Node,
        /// Capacitance, F.
        farads: f64,
    },
    /// An independent voltage source: V(plus) − V(minus) = volts.
    VoltageSource {
        /// The positive terminal.
        plus: Node,
        /// The negative terminal.
        minus: Node,
        /// Its DC value, V.
        volts: f64,
    },
    /// An independent voltage source of a DC value and a sine:
    /// V(plus) − V(minus) = offset + amplitude·sin(2π·frequency·t). The DC
    /// solve takes the offset, the small-signal solve the amplitude (as a
    /// phasor of phase 0), the transient the whole.
    Sine {
        /// The positive terminal.
        plus: Node,
        /// The negative terminal.
        minus: Node,
        /// Its DC value, V.
        offset: f64,
        /// The sine's peak, V.
        amplitude: f64,
        /// The sine's frequency, Hz.
        frequency: f64,
    },
    /// An independent current source driving `amps` from `from` through
    /// itself into `to`.
    CurrentSource {
        /// Where the current leaves the circuit into the source.
        from: Node,
        /// Where the source drives it back into the circuit.
        to: Node,
        /// Its DC value, A.
        amps: f64,
    },
    /// A voltage-controlled current source: `siemens`·(V(plus) − V(minus))
    /// leaves the circuit at `from` and comes back at `to` (a
    /// transconductance of a small-signal model).
    Vccs {
        /// Where the current leaves the circuit.
        from: Node,
        /// Where it comes back.
        to: Node,
        /// The controlling voltage's positive node.
        plus: Node,
        /// Its negative node.
        minus: Node,
        /// Transconductance, S.
        siemens: f64,
    },
    /// A bipolar transistor: the Ebers–Moll transport model of `device`
    /// between the collector, the internal base and the emitter (rbb' is a
    /// resistor of the netlist).
    Bjt {
        /// Collector.
        c: Node,
        /// Internal base.
        b: Node,
        /// Emitter.
        e: Node,
        /// The model at the stage's temperature.
        device: Device,
        /// NPN or PNP.
        polarity: Polarity,
        /// Its stored charges (the transient's; [`Charges::NONE`] for DC).
        charges: Charges,
    },
}

/// A netlist: a number of nodes (ground included) and its elements.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Netlist {
    nodes: usize,
    elements: Vec<Element>,
}

impl Netlist {
    /// An empty netlist with only the ground node.
    pub fn new() -> Netlist {
        Netlist {
            nodes: 1,
            elements: Vec::new(),
        }
    }

    /// A new node.
    pub fn node(&mut self) -> Node {
        self.nodes += 1;
        Node(self.nodes - 1)
    }

    /// Adds an element.
    pub fn add(&mut self, e: Element) {
        self.elements.push(e);
    }

    /// Adds a resistor of `ohms` between `a` and `b` (0 Ω: a short).
    pub fn resistor(&mut self, a: Node, b: Node, ohms: f64) {
        self.add(Element::Resistor { a, b, ohms });
    }

    /// Adds a capacitor of `farads` between `a` and `b`.
    pub fn capacitor(&mut self, a: Node, b: Node, farads: f64) {
        self.add(Element::Capacitor { a, b, farads });
    }

    /// The number of nodes, ground included.
    pub fn nodes(&self) -> usize {
        self.nodes
    }

    /// The elements, in the order they were added.
    pub fn elements(&self) -> &[Element] {
        &self.elements
    }
}
