//! The small-signal (AC) solve of a linear netlist: one complex MNA solve
//! per frequency.
//!
//! Every element is stamped into `Y(ω) = G + jω·C` over the same unknowns
//! as the DC solve (node voltages, shorts merged, plus voltage-source
//! currents): resistors, capacitors as jωC, voltage-controlled current
//! sources (the transconductances of a small-signal model) and the
//! sources at their AC values. A transistor must come linearised (its
//! small-signal model as resistors, capacitors and transconductances):
//! an Ebers–Moll element in the netlist is refused. LU with partial
//! pivoting on the stack with iterative refinement, as the DC solve's.
#![allow(clippy::needless_range_loop)]

use alloc::string::String;
use alloc::vec::Vec;

use num_complex::Complex64;

use super::dc::{is_ideal, Numbered};
use super::dense::MAX_UNKNOWNS;
use super::netlist::{Element, Netlist};
use crate::error::{Error, Result};

/// A solved small-signal state at one frequency.
#[derive(Debug, Clone, PartialEq)]
pub struct AcSolution {
    /// The frequency, Hz.
    pub frequency: f64,
    /// The complex voltage of every node (ground included, 0), V.
    pub voltages: Vec<Complex64>,
    /// The current of every voltage source, flowing into its plus terminal
    /// from the circuit, A.
    pub source_currents: Vec<Complex64>,
}

/// Solves `net` at `frequency` hertz, every source at its value as an AC
/// amplitude (phase 0): a voltage source at its value, a sine at its
/// amplitude; an ideal (infinite) capacitor is a short.
///
/// # Errors
/// [`ErrorKind::Inconsistent`](crate::ErrorKind::Inconsistent) naming
/// `netlist` for a transistor not linearised or a singular network (a node
/// with no path to ground); [`ErrorKind::OutOfRange`](crate::ErrorKind::OutOfRange)
/// for more than [`MAX_UNKNOWNS`] unknowns.
pub fn solve_ac(net: &Netlist, frequency: f64) -> Result<AcSolution> {
    let num = Numbered::new(net, true)?;
    let n = num.n;
    let w = 2.0 * core::f64::consts::PI * frequency.max(0.0);
    let zero = Complex64::new(0.0, 0.0);
    let mut a = [[zero; MAX_UNKNOWNS]; MAX_UNKNOWNS];
    let mut b = [zero; MAX_UNKNOWNS];
    let mut k = num.first_source;
    let mut ideal = num.first_ideal;
    for e in net.elements() {
        match *e {
            Element::Resistor { a: p, b: q, ohms } if ohms > 0.0 => {
                num.stamp_admittance(&mut a, p, q, Complex64::new(1.0 / ohms, 0.0));
            }
            Element::Resistor { .. } => {}
            // An ideal capacitor: a short, held by a 0 V source of its own.
            Element::Capacitor { a: p, b: q, farads } if is_ideal(farads) => {
                num.stamp_source(&mut a, ideal, p, q, Complex64::new(1.0, 0.0));
                ideal += 1;
            }
            Element::Capacitor { a: p, b: q, farads } => {
                num.stamp_admittance(&mut a, p, q, Complex64::new(0.0, w * farads));
            }
            Element::VoltageSource { plus, minus, .. } | Element::Sine { plus, minus, .. } => {
                num.stamp_source(&mut a, k, plus, minus, Complex64::new(1.0, 0.0));
                let volts = match *e {
                    Element::Sine { amplitude, .. } => amplitude,
                    _ => super::dc::source_value(e, None),
                };
                b[k] = Complex64::new(volts, 0.0);
                k += 1;
            }
            Element::CurrentSource { from, to, amps } => {
                if let Some(i) = num.index[from.0] {
                    b[i] -= amps;
                }
                if let Some(i) = num.index[to.0] {
                    b[i] += amps;
                }
            }
            Element::Vccs {
                from,
                to,
                plus,
                minus,
                siemens,
            } => num.stamp_vccs(&mut a, from, to, plus, minus, siemens),
            Element::Bjt { .. } => {
                return Err(Error::inconsistent(
                    "netlist",
                    String::from("the small-signal solve needs each transistor linearised (its hybrid-π model), not its Ebers–Moll element"),
                ))
            }
        }
    }
    let x = refined(&a, &b, n).ok_or_else(|| {
        Error::inconsistent(
            "netlist",
            String::from("the small-signal network is singular; a node has no path to ground"),
        )
    })?;
    let voltages = (0..net.nodes())
        .map(|i| num.index[i].map_or(zero, |j| x[j]))
        .collect();
    Ok(AcSolution {
        frequency,
        voltages,
        source_currents: x[num.first_source..n].to_vec(),
    })
}

/// `a·x = b` by [`lu`], then two steps of iterative refinement with the
/// residual b − a·x summed in double-double arithmetic, part by part (as
/// the DC solve's; Golub & Van Loan §3.5.3), so that admittances spanning
/// many decades do not cost the answer its digits.
fn refined(
    a: &[[Complex64; MAX_UNKNOWNS]; MAX_UNKNOWNS],
    b: &[Complex64; MAX_UNKNOWNS],
    n: usize,
) -> Option<[Complex64; MAX_UNKNOWNS]> {
    let mut x = lu(*a, *b, n)?;
    for _ in 0..2 {
        let mut r = [Complex64::new(0.0, 0.0); MAX_UNKNOWNS];
        for i in 0..n {
            // Re(b − a·x) = b.re − Σ(a.re·x.re − a.im·x.im),
            // Im(b − a·x) = b.im − Σ(a.re·x.im + a.im·x.re).
            let mut re = DoubleDouble::new(b[i].re);
            let mut im = DoubleDouble::new(b[i].im);
            for j in 0..n {
                re.sub_product(a[i][j].re, x[j].re);
                re.add_product(a[i][j].im, x[j].im);
                im.sub_product(a[i][j].re, x[j].im);
                im.sub_product(a[i][j].im, x[j].re);
            }
            r[i] = Complex64::new(re.value(), im.value());
        }
        let d = lu(*a, r, n)?;
        for i in 0..n {
            x[i] += d[i];
        }
    }
    Some(x)
}

/// A sum kept as a double-double: the error-free transformations TwoSum
/// and TwoProduct (by fused multiply–add) of Ogita, Rump & Oishi (2005).
struct DoubleDouble {
    hi: f64,
    lo: f64,
}

impl DoubleDouble {
    fn new(v: f64) -> DoubleDouble {
        DoubleDouble { hi: v, lo: 0.0 }
    }

    fn add_product(&mut self, a: f64, b: f64) {
        let p = a * b;
        let pe = libm::fma(a, b, -p);
        let s = self.hi + p;
        let bb = s - self.hi;
        let e = (self.hi - (s - bb)) + (p - bb);
        self.hi = s;
        self.lo += e + pe;
    }

    fn sub_product(&mut self, a: f64, b: f64) {
        self.add_product(-a, b);
    }

    fn value(&self) -> f64 {
        self.hi + self.lo
    }
}

/// Gaussian elimination with partial pivoting (by modulus) of `a·x = b`
/// over the first `n` unknowns.
fn lu(
    mut a: [[Complex64; MAX_UNKNOWNS]; MAX_UNKNOWNS],
    mut b: [Complex64; MAX_UNKNOWNS],
    n: usize,
) -> Option<[Complex64; MAX_UNKNOWNS]> {
    let modulus = |z: Complex64| libm::hypot(z.re, z.im);
    for k in 0..n {
        let mut p = k;
        for i in k + 1..n {
            if modulus(a[i][k]) > modulus(a[p][k]) {
                p = i;
            }
        }
        if modulus(a[p][k]) == 0.0 || !modulus(a[p][k]).is_finite() {
            return None;
        }
        a.swap(k, p);
        b.swap(k, p);
        for i in k + 1..n {
            let m = a[i][k] / a[k][k];
            for j in k..n {
                let t = m * a[k][j];
                a[i][j] -= t;
            }
            let t = m * b[k];
            b[i] -= t;
        }
    }
    let mut x = [Complex64::new(0.0, 0.0); MAX_UNKNOWNS];
    for i in (0..n).rev() {
        let mut s = b[i];
        for j in i + 1..n {
            s -= a[i][j] * x[j];
        }
        x[i] = s / a[i][i];
        if !(x[i].re.is_finite() && x[i].im.is_finite()) {
            return None;
        }
    }
    Some(x)
}
