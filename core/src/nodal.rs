//! Complex nodal analysis of the whole small-signal network.
//!
//! The stage at signal frequencies is a linear network: the source EMF
//! behind `rs`, the coupling and bypass capacitors, the bias resistors (both
//! rails are AC ground), rbb', the hybrid-π core (gπ, Cπ, Cμ, gm, ro and the
//! tiny reverse term) and the load. Its nodal admittance matrix
//! `Y(ω) = G + jω·C` is assembled once per operating point; each frequency
//! is then one LU factorisation (partial pivoting) of a matrix of at most
//! 7×7 with two right-hand sides:
//!
//! 1. the EMF node held at 1 V: every node voltage per volt of EMF, and the
//!    source current from the EMF node's row of Y (so `rs` = 0 works too);
//! 2. the EMF held at 0 V and 1 A pushed into the load node: the impedance
//!    `Zt = Zout ∥ RL` seen there, from which `Zout = 1/(1/Zt − 1/RL)`.
//!
//! Zero-ohm resistors and ideal (`None`) capacitors are shorts: their two
//! nodes are merged before numbering (a union–find), so they cost nothing
//! and never make the matrix ill-conditioned.
//!
//! The *midband* network shorts every coupling and bypass capacitor and
//! leaves out the device capacitances Cπ and Cμ.

use num_complex::Complex64;

use crate::complex::{magnitude, phase};
use crate::decibel::{db10, db20};
use crate::error::{Error, Result};
use crate::hybrid_pi::SmallSignal;
use crate::stage::{Stage, StageKind};

const GND: usize = 0;
const SRC: usize = 1;
const IN: usize = 2;
const B: usize = 3;
const BI: usize = 4;
const E: usize = 5;
const X: usize = 6;
const C: usize = 7;
const OUT: usize = 8;
const NODES: usize = 9;
/// Largest matrix: every node but ground.
const M: usize = NODES - 1;

/// Which network to build.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Band {
    /// Every capacitor at its value.
    Full,
    /// Coupling and bypass capacitors shorted, device capacitances open.
    Midband,
}

/// Small-signal response per volt of EMF at one frequency.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FrequencyPoint {
    /// Frequency, Hz.
    pub frequency: f64,
    /// V(load)/V(input terminal).
    pub voltage_gain: Complex64,
    /// V(load)/EMF.
    pub voltage_gain_from_source: Complex64,
    /// I(load)/I(into the input terminal).
    pub current_gain: Complex64,
    /// Impedance at the input terminal with the load connected, Ω.
    pub input_impedance: Complex64,
    /// Impedance seen by the load with the EMF zeroed and rs kept, Ω.
    pub output_impedance: Complex64,
}

impl FrequencyPoint {
    /// Voltage gain (terminal) in dB.
    pub fn voltage_gain_db(&self) -> f64 {
        db20(magnitude(self.voltage_gain))
    }
    /// Voltage gain from the source EMF in dB.
    pub fn voltage_gain_from_source_db(&self) -> f64 {
        db20(magnitude(self.voltage_gain_from_source))
    }
    /// Current gain in dB.
    pub fn current_gain_db(&self) -> f64 {
        db20(magnitude(self.current_gain))
    }
    /// Power gain |Av·Ai| in dB (10·log10).
    pub fn power_gain_db(&self) -> f64 {
        db10(magnitude(self.voltage_gain * self.current_gain))
    }
    /// Phase of the voltage gain, degrees in (−180, 180].
    pub fn phase_deg(&self) -> f64 {
        phase(self.voltage_gain).to_degrees()
    }
}

fn find(parent: &mut [usize; NODES], mut a: usize) -> usize {
    while parent[a] != a {
        parent[a] = parent[parent[a]];
        a = parent[a];
    }
    a
}

fn union(parent: &mut [usize; NODES], a: usize, b: usize) {
    let (ra, rb) = (find(parent, a), find(parent, b));
    if ra == rb {
        return;
    }
    // Ground, then the source node, stay roots so that they keep their role.
    let (keep, drop) = if ra == GND || (ra == SRC && rb != GND) {
        (ra, rb)
    } else {
        (rb, ra)
    };
    parent[drop] = keep;
}

#[derive(Clone, Copy)]
enum Part {
    Conductance(usize, usize, f64),
    Capacitor(usize, usize, f64),
}

/// Collects the parts and shorts of a network before numbering.
struct Builder {
    parts: [Option<Part>; 20],
    count: usize,
    shorts: [(usize, usize); 12],
    n_shorts: usize,
    band: Band,
}

impl Builder {
    fn push(&mut self, part: Part) {
        self.parts[self.count] = Some(part);
        self.count += 1;
    }
    fn short(&mut self, a: usize, b: usize) {
        self.shorts[self.n_shorts] = (a, b);
        self.n_shorts += 1;
    }
    /// A resistor of `r` ohms; 0 Ω is a short.
    fn resistor(&mut self, a: usize, b: usize, r: f64) {
        if r > 0.0 {
            self.push(Part::Conductance(a, b, 1.0 / r));
        } else {
            self.short(a, b);
        }
    }
    /// A coupling or bypass capacitor: a short when ideal or at midband.
    fn coupling(&mut self, a: usize, b: usize, c: Option<f64>) {
        match (c, self.band) {
            (Some(c), Band::Full) => self.push(Part::Capacitor(a, b, c)),
            _ => self.short(a, b),
        }
    }
}

/// The assembled network: `Y(ω) = G + jω·Cm` over the source node (index 0)
/// and the unknown nodes (1..=n).
#[derive(Debug, Clone)]
pub struct AcNetwork {
    n: usize,
    g: [[f64; M]; M],
    cm: [[f64; M]; M],
    input: usize,
    output: usize,
    g_load: f64,
}

/// Position in the compact numbering: `None` for ground.
fn slot(map: &[Option<usize>; NODES], parent: &mut [usize; NODES], node: usize) -> Option<usize> {
    map[find(parent, node)]
}

impl AcNetwork {
    /// Assembles the small-signal network of `stage` with the hybrid-π
    /// parameters `ss`.
    pub fn new(stage: &Stage, ss: &SmallSignal, band: Band) -> Result<AcNetwork> {
        let p = &stage.parts;
        let mut k = Builder {
            parts: [None; 20],
            count: 0,
            shorts: [(GND, GND); 12],
            n_shorts: 0,
            band,
        };
        // Source, bias network, rbb', load: common to all stages.
        k.resistor(SRC, IN, p.rs);
        // Both bias resistors run from the base to AC ground: one
        // conductance, g1 + g2, whose sum does not depend on the order of
        // the parts (so a PNP stage, whose r1 and r2 swap roles, rounds
        // exactly as its NPN mirror image).
        let g_bias = p.r1.map_or(0.0, |r| 1.0 / r) + p.r2.map_or(0.0, |r| 1.0 / r);
        k.push(Part::Conductance(B, GND, g_bias));
        k.resistor(B, BI, ss.rbb);
        k.resistor(OUT, GND, p.rl);
        if band == Band::Full {
            k.push(Part::Capacitor(BI, E, ss.c_pi));
            k.push(Part::Capacitor(BI, C, ss.c_mu));
        }
        match stage.kind {
            StageKind::CommonEmitter => {
                k.coupling(IN, B, p.c_in);
                k.resistor(C, GND, p.rc);
                k.resistor(E, X, p.re);
                if p.re_bypassed > 0.0 {
                    k.resistor(X, GND, p.re_bypassed);
                    k.coupling(X, GND, p.c_emitter);
                } else {
                    k.short(X, GND);
                }
                k.coupling(C, OUT, p.c_out);
            }
            StageKind::CommonCollector => {
                k.coupling(IN, B, p.c_in);
                k.resistor(C, GND, p.rc);
                k.resistor(E, GND, p.re);
                k.coupling(E, OUT, p.c_out);
            }
            StageKind::CommonBase => {
                k.coupling(IN, E, p.c_in);
                k.resistor(E, GND, p.re);
                k.coupling(B, GND, p.c_base);
                k.resistor(C, GND, p.rc);
                k.coupling(C, OUT, p.c_out);
            }
        }
        let mut parent = [0usize; NODES];
        for (i, v) in parent.iter_mut().enumerate() {
            *v = i;
        }
        let (parts, count, shorts, n_shorts) = (k.parts, k.count, k.shorts, k.n_shorts);
        for &(a, b) in &shorts[..n_shorts] {
            union(&mut parent, a, b);
        }
        if find(&mut parent, SRC) == GND || find(&mut parent, OUT) == GND {
            return Err(Error::inconsistent(
                "parts",
                "the signal path is shorted to ground; check rc, re and the capacitors",
            ));
        }
        // Compact numbering: the source root is 0, other used roots 1..
        let mut used = [false; NODES];
        for part in parts[..count].iter().flatten() {
            let (a, b) = match *part {
                Part::Conductance(a, b, _) | Part::Capacitor(a, b, _) => (a, b),
            };
            used[find(&mut parent, a)] = true;
            used[find(&mut parent, b)] = true;
        }
        for node in [BI, E, C] {
            used[find(&mut parent, node)] = true;
        }
        used[find(&mut parent, IN)] = true;
        used[find(&mut parent, OUT)] = true;
        let mut map: [Option<usize>; NODES] = [None; NODES];
        map[find(&mut parent, SRC)] = Some(0);
        let mut next = 1;
        for node in 1..NODES {
            if parent[node] == node && node != SRC && used[node] {
                map[node] = Some(next);
                next += 1;
            }
        }
        let size = next;
        let mut g = [[0.0; M]; M];
        let mut cm = [[0.0; M]; M];
        let stamp = |m: &mut [[f64; M]; M], a: Option<usize>, b: Option<usize>, y: f64| {
            if let Some(a) = a {
                m[a][a] += y;
            }
            if let Some(b) = b {
                m[b][b] += y;
            }
            if let (Some(a), Some(b)) = (a, b) {
                m[a][b] -= y;
                m[b][a] -= y;
            }
        };
        for part in parts[..count].iter().flatten() {
            match *part {
                Part::Conductance(a, b, y) => {
                    let (a, b) = (slot(&map, &mut parent, a), slot(&map, &mut parent, b));
                    if a != b {
                        stamp(&mut g, a, b, y);
                    }
                }
                Part::Capacitor(a, b, c) => {
                    let (a, b) = (slot(&map, &mut parent, a), slot(&map, &mut parent, b));
                    if a != b {
                        stamp(&mut cm, a, b, c);
                    }
                }
            }
        }
        // The hybrid-π core: gπ from B' to E, and the controlled currents
        // iC = gm·vB'E + go·vCE (into C, out of E), iB = gπ·vB'E + gr·vCE.
        let bi = slot(&map, &mut parent, BI);
        let e = slot(&map, &mut parent, E);
        let c = slot(&map, &mut parent, C);
        let (gm, go, gpi, gr) = (ss.gm, ss.g_o(), ss.g_pi(), ss.g_r);
        // Current leaving node `row` into the device = Σ coeff·V(node).
        let mut vccs = |row: Option<usize>, col: Option<usize>, y: f64| {
            if let (Some(r), Some(k)) = (row, col) {
                g[r][k] += y;
            }
        };
        // Collector row: iC = gm(vbi − ve) + go(vc − ve)
        vccs(c, bi, gm);
        vccs(c, e, -(gm + go));
        vccs(c, c, go);
        // Base row: iB = gπ(vbi − ve) + gr(vc − ve)
        vccs(bi, bi, gpi);
        vccs(bi, e, -(gpi + gr));
        vccs(bi, c, gr);
        // Emitter row: −(iB + iC)
        vccs(e, bi, -(gm + gpi));
        vccs(e, e, gm + go + gpi + gr);
        vccs(e, c, -(go + gr));
        let input = slot(&map, &mut parent, IN).unwrap_or(0);
        let output = slot(&map, &mut parent, OUT).unwrap_or(0);
        Ok(AcNetwork {
            n: size - 1,
            g,
            cm,
            input,
            output,
            g_load: 1.0 / p.rl,
        })
    }

    /// Number of unknown node voltages.
    pub fn unknowns(&self) -> usize {
        self.n
    }

    /// The response at `frequency` hertz (0 or less evaluates the network
    /// with every capacitor open, i.e. its DC-blocked limit).
    pub fn solve(&self, frequency: f64) -> Result<FrequencyPoint> {
        let w = 2.0 * core::f64::consts::PI * frequency.max(0.0);
        let size = self.n + 1;
        let y = |i: usize, j: usize| Complex64::new(self.g[i][j], w * self.cm[i][j]);
        let n = self.n;
        // Reduced system over the unknowns 1..=n.
        let mut a = [[Complex64::new(0.0, 0.0); M]; M];
        let mut rhs_gain = [Complex64::new(0.0, 0.0); M];
        let mut rhs_z = [Complex64::new(0.0, 0.0); M];
        for (i, row) in a.iter_mut().enumerate().take(n) {
            for (j, v) in row.iter_mut().enumerate().take(n) {
                *v = y(i + 1, j + 1);
            }
            // formula: Y_uu·V_u = −Y_us·V_s with V_s = 1 V
            rhs_gain[i] = -y(i + 1, 0);
        }
        if self.output > 0 {
            rhs_z[self.output - 1] = Complex64::new(1.0, 0.0);
        }
        lu_solve(&mut a, n, &mut rhs_gain, &mut rhs_z).ok_or_else(|| {
            Error::inconsistent(
                "parts",
                alloc::format!(
                    "the small-signal network is singular at {}; a node has no path to ground",
                    crate::format::format_si(frequency, "Hz")
                ),
            )
        })?;
        let mut v = [Complex64::new(0.0, 0.0); M];
        v[0] = Complex64::new(1.0, 0.0);
        v[1..=n].copy_from_slice(&rhs_gain[..n]);
        // Current delivered by the EMF into the network: its node's row of Y times V.
        let mut i_in = Complex64::new(0.0, 0.0);
        for (j, vj) in v.iter().enumerate().take(size) {
            i_in += y(0, j) * vj;
        }
        let v_in = v[self.input];
        let v_out = v[self.output];
        let z_t = if self.output > 0 {
            rhs_z[self.output - 1]
        } else {
            Complex64::new(0.0, 0.0)
        };
        let tiny = Complex64::new(1e-300, 0.0);
        let i_load = v_out * self.g_load;
        let voltage_gain = v_out / (v_in + tiny);
        let current_gain = i_load / (i_in + tiny);
        let input_impedance = v_in / (i_in + tiny);
        // formula: Zout = 1/(1/Zt − 1/RL), Zt = Zout ∥ RL
        let y_out = Complex64::new(1.0, 0.0) / (z_t + tiny) - self.g_load;
        let output_impedance = if magnitude(y_out) > 1e-15 {
            Complex64::new(1.0, 0.0) / y_out
        } else {
            Complex64::new(crate::hybrid_pi::OPEN_RESISTANCE, 0.0)
        };
        Ok(FrequencyPoint {
            frequency,
            voltage_gain,
            voltage_gain_from_source: v_out,
            current_gain,
            input_impedance,
            output_impedance,
        })
    }
}

/// Solves `a·x = b1` and `a·x = b2` in place (results in `b1`, `b2`) by LU
/// with partial pivoting. Returns `None` when a pivot vanishes.
fn lu_solve(
    a: &mut [[Complex64; M]; M],
    n: usize,
    b1: &mut [Complex64; M],
    b2: &mut [Complex64; M],
) -> Option<()> {
    // Scale for the singularity test: the largest diagonal entry (every
    // node of a valid stage has its own conductance to somewhere).
    let mut scale = 0.0f64;
    for (k, row) in a.iter().enumerate().take(n) {
        scale = scale.max(row[k].norm_sqr());
    }
    let tiny = scale * 1e-60;
    // Non-zero columns right of the diagonal in each row of U, for the back substitution.
    let mut ucols = [[0usize; M]; M];
    let mut unc = [0usize; M];
    let mut pivot_inverse = [Complex64::new(0.0, 0.0); M];
    for k in 0..n {
        let mut p = k;
        let mut best = a[k][k].norm_sqr();
        for (i, row) in a.iter().enumerate().take(n).skip(k + 1) {
            let m = row[k].norm_sqr();
            if m > best {
                best = m;
                p = i;
            }
        }
        if best <= tiny || best.is_nan() || !best.is_finite() {
            return None;
        }
        if p != k {
            a.swap(p, k);
            b1.swap(p, k);
            b2.swap(p, k);
        }
        let inv = Complex64::new(1.0, 0.0) / a[k][k];
        pivot_inverse[k] = inv;
        // The network is sparse (a node touches two to four others): update
        // only the columns where the pivot row is non-zero.
        let cols = &mut ucols[k];
        let mut nc = 0;
        for (j, v) in a[k].iter().enumerate().take(n).skip(k + 1) {
            if v.re != 0.0 || v.im != 0.0 {
                cols[nc] = j;
                nc += 1;
            }
        }
        unc[k] = nc;
        let (t1, t2) = (b1[k], b2[k]);
        let (upper, lower) = a.split_at_mut(k + 1);
        let pivot_row = &upper[k];
        for (offset, row) in lower.iter_mut().take(n - k - 1).enumerate() {
            let below = row[k];
            if below.re == 0.0 && below.im == 0.0 {
                continue;
            }
            let f = below * inv;
            for &j in &cols[..nc] {
                row[j] -= f * pivot_row[j];
            }
            let i = k + 1 + offset;
            b1[i] -= f * t1;
            b2[i] -= f * t2;
        }
    }
    for k in (0..n).rev() {
        let mut s1 = b1[k];
        let mut s2 = b2[k];
        for &j in &ucols[k][..unc[k]] {
            s1 -= a[k][j] * b1[j];
            s2 -= a[k][j] * b2[j];
        }
        let inv = pivot_inverse[k];
        b1[k] = s1 * inv;
        b2[k] = s2 * inv;
    }
    Some(())
}
