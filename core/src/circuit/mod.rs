//! One general circuit engine: a netlist of elements and a DC solve by
//! modified nodal analysis, for every stage alike.
//!
//! # Formulation
//! Modified nodal analysis (Ho, Ruehli & Brennan, IEEE Trans. Circuits and
//! Systems CAS-22, 1975; the stamps as in Vlach & Singhal, *Computer
//! Methods for Circuit Analysis and Design*): the unknowns are the voltage
//! of every node but ground (node 0) and the current of every voltage
//! source. Resistors and current sources stamp the conductance matrix and
//! the right-hand side; a voltage source adds a row and a column. A
//! zero-ohm resistor is a short: its two nodes are merged before the
//! unknowns are numbered (union–find, as in [`crate::AcNetwork`]), so no
//! infinite conductance is ever stamped. Capacitors are open at DC.
//!
//! # The transistor
//! The Ebers–Moll transport model with the Early effect of [`Device`]
//! (the same [`Device::currents`] the topology-specific solve uses), in
//! the NPN frame; a PNP device is the same model with every terminal
//! voltage and current negated. Its base spreading resistance rbb' is a
//! resistor of the netlist between the base terminal and the internal
//! base node.
//!
//! # DC
//! Newton–Raphson on the MNA residual with the device linearised at each
//! iterate (its currents and their derivatives stamped as a Norton
//! companion). Steps of the two junction voltages are limited
//! logarithmically above the junction's critical voltage (Nagel, SPICE2,
//! UC Berkeley memorandum ERL-M520, 1975). Convergence asks both for a
//! small step (absolute plus relative in volts) and a small KCL residual
//! (absolute plus relative in amperes). When plain Newton fails, gmin
//! stepping (a conductance from every node to ground, stepped down to
//! zero) and then source stepping (every source ramped up from zero) are
//! tried, as circuit simulators do (Vlach & Singhal; Kundert, *The
//! Designer's Guide to SPICE and Spectre*).
//!
//! # Matrices
//! Small and dense: at most [`MAX_UNKNOWNS`] unknowns, on the stack, LU
//! with partial pivoting. No allocation inside the Newton loop.
//!
//! # AC
//! The same netlist, linear (each transistor as its hybrid-π model:
//! resistors, capacitors and transconductances), one complex solve per
//! frequency ([`solve_ac`]).
//!
//! # Transient and periodic steady state
//! The same netlist with each transistor's charges ([`Charges`]), a sine
//! source and ideal capacitors: the charge-based BDF2 transient
//! ([`transient`]) and the shooting steady state
//! ([`periodic_steady_state`]), as the `transient` module's docs describe.
//!
//! The stages' DC netlists ([`dc_netlist`]) solve to the operating point
//! of [`crate::OperatingPoint::solve`], and their small-signal netlists
//! ([`ac_netlist`]) to the response of [`crate::AcNetwork`] (tests hold
//! them together to 1e-9); the whole netlist of [`stage_netlist`] carries
//! the large-signal analysis ([`crate::LargeSignal`]). The small-signal
//! analyses move onto the engine next.

mod ac;
mod charges;
mod dc;
mod dense;
mod netlist;
mod stages;
mod transient;

pub use ac::{solve_ac, AcSolution};
pub use charges::{collector_junction, Charges, Depletion, FORWARD_COEFFICIENT};
pub use dc::{solve_dc, DcSolution};
pub use dense::MAX_UNKNOWNS;
pub use netlist::{Element, Netlist, Node, GROUND};
#[cfg(test)]
pub(crate) use stages::example_stages;
pub use stages::{ac_netlist, dc_netlist, stage_netlist, AcNodes, SignalNodes, StageNodes};
pub use transient::{
    periodic_steady_state, periodic_steady_state_from, transient, Periodic, TransientOptions,
    TransientRun,
};

#[cfg(doc)]
use crate::transistor::Device;
