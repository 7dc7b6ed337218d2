//! The worst case: every vertex of the box solved, the extremes of each
//! result with the vertex that gives them, and the requirements judged at
//! their worst vertex.

use super::*;

/// The extremes of one result over the parameter box.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Extreme {
    /// The result.
    pub quantity: Quantity,
    /// Its nominal value.
    pub nominal: f64,
    /// Its lowest value.
    pub min: f64,
    /// Its highest value.
    pub max: f64,
    /// The corner that gives `min`.
    pub min_corner: Corner,
    /// The corner that gives `max`.
    pub max_corner: Corner,
}

/// The worst-case analysis: the extremes of every result that exists.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct WorstCase {
    /// One entry per result, in the order of [`Quantity::ALL`]; a corner the
    /// nominal stage does not have is left out.
    pub extremes: Vec<Extreme>,
    /// Vertices solved (each with both capacitor settings when there are capacitors).
    pub vertices: usize,
    /// Vertices where the transistor is saturated or cut off. When there are
    /// any, the results are no longer monotonic over the box and the
    /// extremes are the vertex extremes only: points inside can fall outside
    /// them (module docs).
    pub inactive_vertices: usize,
    /// How the lower-corner search ended over the box: that of the nominal
    /// stage, or [`Edge::NoPassband`] when some vertex has no lower corner
    /// where the nominal stage has one (its response no longer crosses the
    /// −3 dB level there).
    pub low_edge: Edge,
    /// The same for the upper corner.
    pub high_edge: Edge,
}

impl WorstCase {
    /// The extremes of `q`, if the stage has that result.
    pub fn get(&self, q: Quantity) -> Option<&Extreme> {
        self.extremes.iter().find(|e| e.quantity == q)
    }
}

/// Running extremes of one value with the corner codes that give them.
#[derive(Clone, Copy)]
pub(super) struct Track {
    pub(super) min: f64,
    pub(super) max: f64,
    pub(super) min_at: (u32, i8),
    pub(super) max_at: (u32, i8),
}

impl Track {
    pub(super) fn new(v: f64) -> Track {
        // The nominal point, coded as vertex u32::MAX.
        Track {
            min: v,
            max: v,
            min_at: (u32::MAX, 0),
            max_at: (u32::MAX, 0),
        }
    }
    pub(super) fn add(&mut self, v: f64, at: (u32, i8)) {
        if !v.is_finite() {
            return;
        }
        if !self.min.is_finite() || v < self.min {
            self.min = v;
            self.min_at = at;
        }
        if !self.max.is_finite() || v > self.max {
            self.max = v;
            self.max_at = at;
        }
    }
}

impl Model {
    /// The corner of vertex `mask` over the varying non-capacitor
    /// parameters `axes`, with the capacitors at `caps` (−1 min, 0 nominal, 1 max).
    pub(super) fn corner(&self, axes: &[Parameter], at: (u32, i8)) -> Corner {
        let (mask, caps) = at;
        let settings = self
            .varying()
            .map(|p| {
                let level = if mask == u32::MAX {
                    Level::Nominal
                } else if p.is_capacitor() {
                    match caps {
                        -1 => Level::Min,
                        1 => Level::Max,
                        _ => Level::Nominal,
                    }
                } else {
                    match axes.iter().position(|a| *a == p) {
                        Some(bit) if mask & (1 << bit) != 0 => Level::Max,
                        Some(_) => Level::Min,
                        None => Level::Nominal,
                    }
                };
                Setting {
                    parameter: p,
                    level,
                }
            })
            .collect();
        Corner { settings }
    }

    pub(super) fn worst_case(&self) -> Result<WorstCase> {
        let axes: Vec<Parameter> = self.varying().filter(|p| !p.is_capacitor()).collect();
        let caps: Vec<Parameter> = self.varying().filter(|p| p.is_capacitor()).collect();
        let n = 1u32 << axes.len();
        let nominal = &self.sample;
        let mut tracks: Vec<Track> = nominal.values.iter().map(|&v| Track::new(v)).collect();
        let cap_settings: &[i8] = if caps.is_empty() { &[0] } else { &[-1, 1] };
        let mut inactive_vertices = 0;
        let mut edges = self.edges;
        for mask in 0..n {
            let mut x = self.nominal;
            for (bit, p) in axes.iter().enumerate() {
                let i = p.index();
                x[i] = if mask & (1 << bit) != 0 {
                    self.high[i]
                } else {
                    self.low[i]
                };
            }
            let solved = self
                .solve(&x)
                .map_err(|e| at_corner(e, &self.corner(&axes, (mask, 0))))?;
            let mut first = true;
            for &c in cap_settings {
                for p in &caps {
                    let i = p.index();
                    x[i] = if c < 0 { self.low[i] } else { self.high[i] };
                }
                let (stage, _) = self.stage_at(&x);
                let resp = Response::new(&stage, &solved.ss)?;
                let at = (mask, c);
                if first {
                    // The capacitors do not move the DC and midband results.
                    let at_mid = (mask, 0);
                    let s = midband_sample(&solved, &resp);
                    if !s.active {
                        inactive_vertices += 1;
                    }
                    for q in Quantity::ALL {
                        if !matches!(q, Quantity::FLow | Quantity::FHigh) {
                            tracks[q.index()].add(s.get(q), at_mid);
                        }
                    }
                    first = false;
                }
                let mut s = *nominal;
                corners_into(&resp, self.lower, self.upper, PRECISE, false, &mut s)?;
                for (k, q) in [Quantity::FLow, Quantity::FHigh].into_iter().enumerate() {
                    tracks[q.index()].add(s.get(q), at);
                    if self.edges[k] == Edge::Corner && !s.get(q).is_finite() {
                        edges[k] = Edge::NoPassband;
                    }
                }
            }
        }
        let extremes = Quantity::ALL
            .into_iter()
            .filter(|q| nominal.get(*q).is_finite())
            .map(|q| {
                let t = &tracks[q.index()];
                Extreme {
                    quantity: q,
                    nominal: nominal.get(q),
                    min: t.min,
                    max: t.max,
                    min_corner: self.corner(&axes, t.min_at),
                    max_corner: self.corner(&axes, t.max_at),
                }
            })
            .collect();
        Ok(WorstCase {
            extremes,
            vertices: n as usize,
            inactive_vertices,
            low_edge: edges[0],
            high_edge: edges[1],
        })
    }
}

pub(super) fn at_corner(e: Error, corner: &Corner) -> Error {
    let mut what = alloc::string::String::from("worst case at the corner");
    for s in &corner.settings {
        what.push(' ');
        what.push_str(s.parameter.name());
        what.push('=');
        what.push_str(s.level.name());
    }
    Error::inconsistent("tolerances", alloc::format!("{what}: {e}"))
}

/// The worst case of `stage` over the box of `tolerances`: every vertex of
/// the resistors, hFE, VBE, ambient and supply, each with the capacitors all
/// at their minimum and all at their maximum (see the module docs).
pub fn worst_case(stage: &Stage, tolerances: &Tolerances) -> Result<WorstCase> {
    Model::new(stage, Some(tolerances))?.worst_case()
}

/// One requirement judged at the vertex of the tolerance box where it is
/// worst (see [`worst_checks`]).
#[derive(Debug, Clone, PartialEq)]
pub struct WorstCheck {
    /// The check, with `id` the requirement's key (`min_swing`) and the
    /// worst value as its value.
    pub check: Check,
    /// The vertex of the worst value (`None` when the stage has no such
    /// corner frequency, which counts as in the nominal check).
    pub corner: Option<Corner>,
}

/// Each requirement that is set, judged at the vertex where it is worst:
/// the lowest value over the box for a lower bound (`min_…`), the highest
/// for an upper bound (`max_…`). The meaning is that of the nominal check:
/// a corner found at every vertex is judged at its worst; a corner the
/// stage has but some vertex lacks fails ([`WorstCase::low_edge`]); no
/// corner at all (the gain holds to DC) or one beyond the search range is
/// judged as the nominal check judges it; the gain is compared in dB. The
/// command line's `check --worst-case` and the page both judge with this.
pub fn worst_checks(requirements: &Requirements, worst: &WorstCase) -> Vec<WorstCheck> {
    let mut out = Vec::new();
    for (req, limit) in requirements.limits() {
        let what = ["worst-case ", req.label()].concat();
        let at_least = req.bound == Bound::AtLeast;
        // A corner that is not found at every vertex: the rules of the
        // nominal check (`corner_met`), with what the box showed.
        if let Some(side) = req.side() {
            let edge = if side == Side::Lower {
                worst.low_edge
            } else {
                worst.high_edge
            };
            if edge == Edge::NoPassband {
                let bound = if at_least { "at least" } else { "at most" };
                let check = Check {
                    id: req.key.into(),
                    pass: false,
                    value: 0.0,
                    limit,
                    unit: "Hz",
                    message: alloc::format!(
                        "{what}: none at some vertex of the tolerance box, where the response does not come within 3 dB of its midband gain; the required {bound} {} is not met",
                        crate::format::format_si(limit, "Hz")
                    ),
                };
                out.push(WorstCheck {
                    check,
                    corner: None,
                });
                continue;
            }
            if edge != Edge::Corner {
                let check = corner_check(side, &what, edge, None, limit, &Default::default());
                out.push(WorstCheck {
                    check,
                    corner: None,
                });
                continue;
            }
        }
        let (value, corner) = match worst.get(req.quantity) {
            Some(e) if at_least => (e.min, Some(e.min_corner.clone())),
            Some(e) => (e.max, Some(e.max_corner.clone())),
            None => (f64::NAN, None),
        };
        let check = req.check(&what, req.reading(value), limit);
        out.push(WorstCheck { check, corner });
    }
    out
}
